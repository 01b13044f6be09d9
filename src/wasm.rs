//! The wasm32 bindings: converts between JS values and core types, nothing
//! more. Heavy arrays cross as typed arrays; problems as plain objects.
//!
//! **Invariant:** no logic lives here that a native test cannot reach; every
//! function is a conversion around a core call.

use js_sys::{Array, Float64Array, Object, Reflect, Uint32Array};
use wasm_bindgen::prelude::*;

use crate::model::{Mdp, Problems};

fn set(obj: &Object, key: &str, value: impl Into<JsValue>) {
    Reflect::set(obj, &JsValue::from_str(key), &value.into()).expect("setting a plain object");
}

/// `{ok: false, problems: [{path, message}], unlisted}`.
fn problems_value(p: &Problems) -> JsValue {
    let obj = Object::new();
    set(&obj, "ok", false);
    let list = Array::new();
    for pr in p.list() {
        let o = Object::new();
        set(&o, "path", pr.path.as_str());
        set(&o, "message", pr.message.as_str());
        list.push(&o);
    }
    set(&obj, "problems", list);
    set(&obj, "unlisted", p.unlisted() as u32);
    obj.into()
}

fn summary(obj: &Object, m: &Mdp) {
    set(obj, "ok", true);
    set(obj, "name", m.name());
    set(obj, "notes", m.notes().unwrap_or(""));
    set(obj, "states", labels(m.states()));
    set(obj, "actions", labels(m.actions()));
    set(obj, "horizon", m.horizon() as u32);
    set(obj, "stationary", m.is_stationary());
    set(obj, "entries", m.entries() as u32);
}

fn labels(ls: &[String]) -> Array {
    ls.iter().map(|s| JsValue::from_str(s)).collect()
}

/// Checks a model file's text: `{ok: true, name, states, actions, horizon,
/// stationary, entries}` or `{ok: false, problems, unlisted}`.
#[wasm_bindgen(js_name = checkModel)]
pub fn check_model(text: &str) -> JsValue {
    match crate::parse_model(text) {
        Ok(m) => {
            let obj = Object::new();
            summary(&obj, &m);
            obj.into()
        }
        Err(p) => problems_value(&p),
    }
}

/// A solved model kept in the worker, so that Q* (H·S·A values) never has to
/// cross to the page whole: the page asks for the step it shows.
#[wasm_bindgen]
pub struct SolvedModel {
    q: ndarray::Array3<f64>,
}

#[wasm_bindgen]
impl SolvedModel {
    /// Q*_h(s, a) of step `h` (0-based), row-major [s][a] (Float64Array, S·A).
    #[wasm_bindgen(js_name = qStep)]
    pub fn q_step(&self, h: u32) -> Float64Array {
        let h = (h as usize).min(self.q.dim().0.saturating_sub(1));
        let step = self.q.index_axis(ndarray::Axis(0), h);
        Float64Array::from(step.as_slice().expect("contiguous"))
    }
}

/// Solves a model file's text: the summary plus `canonical` (the model's
/// text in the canonical layout, every field explicit), `optimal_value`, `v`
/// (Float64Array, H·S, row-major [h][s]), `policy` (Uint32Array, H·S) and
/// `solved` (a [`SolvedModel`] holding Q*); or the problems. The gap of
/// (h, s, a) is max(0, v − q); the page derives it for the step it shows.
#[wasm_bindgen(js_name = solveModel)]
pub fn solve_model(text: &str) -> JsValue {
    let m = match crate::parse_model(text) {
        Ok(m) => m,
        Err(p) => return problems_value(&p),
    };
    let sol = crate::solve::solve(&m);
    let obj = Object::new();
    summary(&obj, &m);
    set(&obj, "optimal_value", sol.optimal_value);
    let h = m.horizon();
    let v = sol.v.slice(ndarray::s![..h, ..]);
    let v: Vec<f64> = v.iter().copied().collect();
    set(&obj, "v", Float64Array::from(v.as_slice()));
    set(
        &obj,
        "policy",
        Uint32Array::from(sol.policy.as_slice().expect("contiguous")),
    );
    set(&obj, "solved", SolvedModel { q: sol.q });
    // The canonical text the editor and the graph work on, from the same
    // parse (a second call would read the file again).
    set(&obj, "canonical", crate::write_model(&m));
    obj.into()
}

/// An experiment being run in the worker: every run of every sweep point,
/// stepped in chunks so the worker can report progress and hear a cancel.
#[wasm_bindgen]
pub struct ExperimentRun {
    batch: crate::experiment::RunQueue,
    text: String,
    index: usize,
    count: usize,
}

#[wasm_bindgen]
impl ExperimentRun {
    /// Reads an experiment file's text and takes shard `index` (0-based) of
    /// `count` of its runs; throws `{ok: false, problems, unlisted}`.
    #[wasm_bindgen(constructor)]
    pub fn new(text: &str, index: u32, count: u32) -> Result<ExperimentRun, JsValue> {
        let exp =
            crate::experiment::parse_experiment(text, None).map_err(|p| problems_value(&p))?;
        let count = count.max(1) as usize;
        let index = (index as usize).min(count - 1);
        Ok(ExperimentRun {
            batch: crate::experiment::RunQueue::shard(exp, index, count),
            text: text.to_owned(),
            index,
            count,
        })
    }

    /// The finished shard as a burnin-shard file's text (for `mergeShards`).
    #[wasm_bindgen(js_name = shardJson)]
    pub fn shard_json(&self) -> String {
        crate::experiment::ShardFile::new(
            self.index,
            self.count,
            self.text.clone(),
            None,
            self.batch.records(),
        )
        .to_json()
    }

    /// Runs up to `max` more episodes; true when everything is done.
    pub fn advance(&mut self, max: f64) -> bool {
        self.batch.advance(max.max(1.0) as u64)
    }

    #[wasm_bindgen(js_name = episodesDone)]
    pub fn episodes_done(&self) -> f64 {
        self.batch.episodes_done() as f64
    }

    #[wasm_bindgen(js_name = totalEpisodes)]
    pub fn total_episodes(&self) -> f64 {
        self.batch.total_episodes() as f64
    }
}

/// A generated model file's text from a generator object's JSON text
/// (`{"kind": …, "seed": …, …}`), or the problems.
#[wasm_bindgen(js_name = generateModel)]
pub fn generate_model(spec: &str) -> JsValue {
    let value: serde_json::Value = match serde_json::from_str(spec) {
        Ok(v) => v,
        Err(e) => {
            return problems_value(&Problems::single(
                "",
                crate::format::lax::syntax_problem(&e),
            ));
        }
    };
    match crate::generate::GeneratorSpec::from_json(&value, "generator")
        .and_then(|g| g.generate("generator"))
    {
        Ok(m) => JsValue::from_str(&crate::write_model(&m)),
        Err(p) => problems_value(&p),
    }
}

/// The catalogues of algorithms and generators and the file limits (see
/// `src/catalogue.rs`), as plain objects.
#[wasm_bindgen]
pub fn catalogue() -> JsValue {
    to_js(&crate::catalogue::catalogue())
}

/// A serialisable value as a plain JS value (objects, not Maps).
fn to_js<T: serde::Serialize>(v: &T) -> JsValue {
    v.serialize(&serde_wasm_bindgen::Serializer::json_compatible())
        .expect("catalogue and summaries serialise")
}

/// What a file is, read by the core: `{kind: "experiment", experiment}`
/// (its set-up, model text and generator), `{kind: "results", json, csv}`,
/// or `{kind: "model"}` for anything else (solving it reports its
/// problems); problems for a broken experiment or results file.
#[wasm_bindgen(js_name = readDocument)]
pub fn read_document(text: &str) -> JsValue {
    use crate::experiment::{EXPERIMENT_FORMAT, RESULTS_FORMAT, SWEEP_FORMAT};
    let obj = Object::new();
    match crate::format::identify(text).as_deref() {
        Some(EXPERIMENT_FORMAT) => match crate::experiment::parse_experiment(text, None) {
            Ok(e) => {
                set(&obj, "kind", "experiment");
                set(&obj, "experiment", to_js(&e.summary()));
            }
            Err(p) => return problems_value(&p),
        },
        Some(RESULTS_FORMAT) | Some(SWEEP_FORMAT) => match crate::experiment::parse_results(text) {
            Ok(out) => {
                set(&obj, "kind", "results");
                set(&obj, "json", out.to_json());
                set(&obj, "csv", out.to_csv());
            }
            Err(p) => return problems_value(&p),
        },
        _ => set(&obj, "kind", "model"),
    }
    set(&obj, "ok", true);
    obj.into()
}

/// The model with its graph layout replaced by `positions` (x, y pairs,
/// flattened), as canonical text; or the problems.
#[wasm_bindgen(js_name = withLayout)]
pub fn with_layout(text: &str, positions: &[f64]) -> JsValue {
    let mut m = match crate::parse_model(text) {
        Ok(m) => m,
        Err(p) => return problems_value(&p),
    };
    let layout: Vec<[f64; 2]> = positions.chunks_exact(2).map(|c| [c[0], c[1]]).collect();
    match m.set_layout(Some(layout)) {
        Ok(()) => JsValue::from_str(&crate::write_model(&m)),
        Err(p) => problems_value(&p),
    }
}

/// Checks an experiment file's text: `{ok: true}` or the problems.
#[wasm_bindgen(js_name = checkExperiment)]
pub fn check_experiment(text: &str) -> JsValue {
    match crate::experiment::parse_experiment(text, None) {
        Ok(_) => {
            let obj = Object::new();
            set(&obj, "ok", true);
            obj.into()
        }
        Err(p) => problems_value(&p),
    }
}

/// Merges shard files' texts into `{json, csv}` of the results, or problems.
#[wasm_bindgen(js_name = mergeShards)]
pub fn merge_shards(shards: Vec<String>) -> JsValue {
    let mut files = Vec::with_capacity(shards.len());
    for (i, t) in shards.iter().enumerate() {
        match serde_json::from_str::<crate::experiment::ShardFile>(t) {
            Ok(f) => files.push(f),
            Err(e) => {
                return problems_value(&Problems::single(
                    format!("shard {}", i + 1),
                    e.to_string(),
                ));
            }
        }
    }
    let name = |i: usize| format!("shard {}", i + 1);
    match crate::experiment::merge(&files, &name) {
        Ok(out) => {
            let obj = Object::new();
            set(&obj, "json", out.to_json());
            set(&obj, "csv", out.to_csv());
            obj.into()
        }
        Err(p) => problems_value(&p),
    }
}

/// `performance.now()` in seconds, from the worker's global scope.
fn now_seconds() -> f64 {
    let perf = Reflect::get(&js_sys::global(), &JsValue::from_str("performance"))
        .expect("a performance object");
    let now = Reflect::get(&perf, &JsValue::from_str("now")).expect("performance.now");
    let f: js_sys::Function = now.into();
    f.call0(&perf)
        .expect("performance.now()")
        .as_f64()
        .unwrap_or(0.0)
        / 1000.0
}

/// The wasm heap's size in bytes (its peak so far: wasm memory never shrinks).
fn heap_bytes() -> u32 {
    wasm_bindgen::memory()
        .unchecked_into::<js_sys::WebAssembly::Memory>()
        .buffer()
        .unchecked_into::<js_sys::ArrayBuffer>()
        .byte_length()
}

/// Runs the reference workloads (see `src/bench.rs`) and returns their
/// figures as JSON, with the wasm heap size at the end (its peak: wasm
/// memory never shrinks). With `only` (an algorithm key), only that
/// learner's learning workload, as `burnin bench --only`; with
/// `no_learners`, none, as `burnin bench --no-learners`.
#[wasm_bindgen(js_name = benchFigures)]
pub fn bench_figures(quick: bool, only: Option<String>, no_learners: bool) -> String {
    let sel = crate::bench::Selection {
        quick,
        only: only.as_deref(),
        no_learners,
    };
    crate::bench::report("wasm", &now_seconds, &|| Some(heap_bytes().into()), sel)
}

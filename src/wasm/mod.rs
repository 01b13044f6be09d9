//! The wasm32 bindings: converts between JS values and core types, nothing
//! more. Heavy arrays cross as typed arrays; problems as plain objects.
//!
//! **Invariant:** no logic lives here that a native test cannot reach; every
//! function is a conversion around a core call.

use js_sys::{Float64Array, Object, Reflect, Uint32Array};
use wasm_bindgen::prelude::*;

use crate::model::{Mdp, Problems};

mod chart;

pub(crate) fn set(obj: &Object, key: &str, value: impl Into<JsValue>) {
    Reflect::set(obj, &JsValue::from_str(key), &value.into()).expect("setting a plain object");
}

/// `{ok: false, problems: [{path, message}], unlisted}`.
fn problems_value(p: &Problems) -> JsValue {
    #[derive(serde::Serialize)]
    struct Item<'a> {
        path: &'a str,
        message: &'a str,
    }
    #[derive(serde::Serialize)]
    struct Value<'a> {
        ok: bool,
        problems: Vec<Item<'a>>,
        unlisted: usize,
    }
    to_js(&Value {
        ok: false,
        problems: p
            .list()
            .iter()
            .map(|pr| Item {
                path: &pr.path,
                message: &pr.message,
            })
            .collect(),
        unlisted: p.unlisted(),
    })
}

/// A model's summary as the page shows it.
#[derive(serde::Serialize)]
struct Summary<'a> {
    ok: bool,
    name: &'a str,
    notes: &'a str,
    states: &'a [String],
    actions: &'a [String],
    horizon: usize,
    stationary: bool,
    entries: usize,
}

fn summary(m: &Mdp) -> JsValue {
    to_js(&Summary {
        ok: true,
        name: m.name(),
        notes: m.notes().unwrap_or(""),
        states: m.states(),
        actions: m.actions(),
        horizon: m.horizon(),
        stationary: m.is_stationary(),
        entries: m.entries(),
    })
}

/// Checks a model file's text: `{ok: true, name, states, actions, horizon,
/// stationary, entries}` or `{ok: false, problems, unlisted}`.
#[wasm_bindgen(js_name = checkModel)]
pub fn check_model(text: &str) -> JsValue {
    match crate::parse_model(text) {
        Ok(m) => summary(&m),
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
    let obj: Object = summary(&m).unchecked_into();
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
    /// `count` of its runs, as the core's runner plans it (one lane of
    /// `planRun`); throws `{ok: false, problems, unlisted}`.
    /// `guests` maps each guest learner's name to the function its module
    /// exports (`start(intro)` → `{decide(batch)}`, docs/formats.md); it may
    /// be undefined when the experiment names none.
    #[wasm_bindgen(constructor)]
    pub fn new(
        text: &str,
        index: u32,
        count: u32,
        guests: JsValue,
    ) -> Result<ExperimentRun, JsValue> {
        let exp =
            crate::experiment::parse_experiment(text, None).map_err(|p| problems_value(&p))?;
        let count = count.max(1) as usize;
        let index = (index as usize).min(count - 1);
        let host: Option<crate::learn::Guests> = guests
            .is_object()
            .then(|| std::sync::Arc::new(JsHost(guests)) as crate::learn::Guests);
        let runner = crate::experiment::Runner::new(exp, host.as_ref(), (index, count), 1);
        Ok(ExperimentRun {
            batch: runner.into_queue(),
            text: text.to_owned(),
            index,
            count,
        })
    }

    /// The finished shard as a burnin-shard file's text (for `mergeShards`).
    #[wasm_bindgen(js_name = shardJson)]
    pub fn shard_json(&self) -> String {
        let mut f = crate::experiment::ShardFile::new(
            self.index,
            self.count,
            self.text.clone(),
            None,
            self.batch.points(),
            self.batch.records(),
        );
        f.faults = self.batch.faults().to_vec();
        f.to_json()
    }

    /// The run in progress as `[learner, seed index, episodes done]`, or
    /// undefined between runs (for the page's watchdog).
    pub fn current(&self) -> Option<Vec<f64>> {
        self.batch
            .current()
            .map(|(l, s, d)| vec![l as f64, s as f64, d as f64])
    }

    /// Records that `learner`'s run of seed `seed_index` gave no answer for
    /// `seconds` after `episodes` episodes and its worker was stopped: its
    /// runs in this shard are left out (see `RunQueue::gave_no_answer`).
    #[wasm_bindgen(js_name = gaveNoAnswer)]
    pub fn gave_no_answer(&mut self, learner: u32, seed_index: f64, episodes: f64, seconds: f64) {
        self.batch.gave_no_answer(
            learner as usize,
            seed_index as u64,
            episodes as u64,
            seconds,
        );
    }

    /// Runs up to `max` more episodes; true when everything is done.
    pub fn advance(&mut self, max: f64) -> bool {
        self.batch.advance(max.max(1.0) as u64)
    }

    /// `advance`, but not past the end of the run in progress (so that
    /// `current()` before the call names the run a hang is in).
    #[wasm_bindgen(js_name = advanceOneRun)]
    pub fn advance_one_run(&mut self, max: f64) -> bool {
        self.batch.advance_one_run(max.max(1.0) as u64)
    }

    /// Whether any learner is a guest.
    #[wasm_bindgen(js_name = hasGuests)]
    pub fn has_guests(&self) -> bool {
        self.batch
            .experiment()
            .learners
            .iter()
            .any(|l| l.guest().is_some())
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

/// The page's guest learners: name → the start function of a JavaScript
/// module, called in this worker.
struct JsHost(JsValue);

// SAFETY: the page's wasm module is built without threads (no atomics), so
// these JS values are only ever touched by the one worker thread that made
// them; `Send`/`Sync` are needed only by the core's native thread pool.
unsafe impl Send for JsHost {}
unsafe impl Sync for JsHost {}

/// A guest's `decide` function and its object.
struct JsGuest {
    this: JsValue,
    decide: js_sys::Function,
    setting: crate::learn::Setting,
}

// SAFETY: as for `JsHost`.
unsafe impl Send for JsGuest {}

/// What a JS exception says.
fn thrown(e: &JsValue) -> String {
    if let Some(err) = e.dyn_ref::<js_sys::Error>() {
        String::from(err.message())
    } else {
        e.as_string().unwrap_or_else(|| format!("{e:?}"))
    }
}

/// The guest's introduction as a plain object (the process protocol's
/// first line, with the same keys).
#[derive(serde::Serialize)]
struct IntroJs<'a> {
    protocol: &'a str,
    version: u32,
    states: usize,
    actions: usize,
    horizon: usize,
    episodes: u64,
    delta: f64,
    seed: u64,
    state_labels: &'a [String],
    action_labels: &'a [String],
}

impl crate::learn::GuestHost for JsHost {
    fn start(
        &self,
        name: &str,
        intro: &crate::learn::GuestIntro,
    ) -> Result<Box<dyn crate::learn::Guest>, String> {
        let start = Reflect::get(&self.0, &JsValue::from_str(name))
            .ok()
            .and_then(|f| f.dyn_into::<js_sys::Function>().ok())
            .ok_or_else(|| format!("your learner {name:?} is not loaded in this worker"))?;
        let s = intro.setting;
        let js_intro = to_js(&IntroJs {
            protocol: crate::learn::GUEST_PROTOCOL,
            version: crate::learn::GUEST_VERSION,
            states: s.states,
            actions: s.actions,
            horizon: s.horizon,
            episodes: s.episodes,
            delta: s.delta,
            seed: intro.seed,
            state_labels: &intro.state_labels,
            action_labels: &intro.action_labels,
        });
        let this = start
            .call1(&JsValue::UNDEFINED, &js_intro)
            .map_err(|e| format!("its start function threw: {}", thrown(&e)))?;
        let decide = Reflect::get(&this, &JsValue::from_str("decide"))
            .ok()
            .and_then(|f| f.dyn_into::<js_sys::Function>().ok())
            .ok_or_else(|| {
                "its start function must return an object with a decide(batch) method".to_string()
            })?;
        Ok(Box::new(JsGuest {
            this,
            decide,
            setting: s,
        }))
    }
}

impl crate::learn::Guest for JsGuest {
    fn decide(&mut self, batch: crate::learn::Batch<'_>) -> Result<crate::learn::Decision, String> {
        let n = batch.steps.len();
        let (mut st, mut ac, mut nx) = (
            Vec::with_capacity(n),
            Vec::with_capacity(n),
            Vec::with_capacity(n),
        );
        let mut rw = Vec::with_capacity(n);
        for x in batch.steps {
            st.push(x.state);
            ac.push(x.action);
            rw.push(x.reward);
            nx.push(x.next);
        }
        let b = Object::new();
        set(&b, "done", batch.done as f64);
        set(&b, "episodes", batch.episodes() as f64);
        set(&b, "horizon", batch.horizon as f64);
        set(&b, "states", Uint32Array::from(st.as_slice()));
        set(&b, "actions", Uint32Array::from(ac.as_slice()));
        set(&b, "rewards", Float64Array::from(rw.as_slice()));
        set(&b, "next", Uint32Array::from(nx.as_slice()));
        let answer = self
            .decide
            .call1(&self.this, &b)
            .map_err(|e| format!("decide threw: {}", thrown(&e)))?;
        // The answer goes through JSON, so the page and a process are read
        // by the same reader with the same messages.
        let text = js_sys::JSON::stringify(&answer)
            .ok()
            .and_then(|t| t.as_string())
            .ok_or_else(|| {
                "decide returned a value that is not JSON (undefined or a function)".to_string()
            })?;
        let v: serde_json::Value = serde_json::from_str(&text)
            .map_err(|_| format!("decide returned {text:.80}, not an answer object"))?;
        crate::learn::Decision::from_json(&v, &self.setting)
    }
}

/// A generated model file's text from a generator object's JSON text
/// (`{"kind": …, "seed": …, …}`), or the problems.
#[wasm_bindgen(js_name = generateModel)]
pub fn generate_model(spec: &str) -> JsValue {
    let value: crate::format::Bounded = match serde_json::from_str(spec) {
        Ok(v) => v,
        Err(e) => {
            return problems_value(&Problems::single(
                "",
                crate::format::lax::syntax_problem(&e),
            ));
        }
    };
    if !value.problems.is_empty() {
        let mut p = Problems::default();
        p.nest("generator", &value.problems);
        return problems_value(&p);
    }
    match crate::generate::GeneratorSpec::from_json(&value.value, "generator")
        .and_then(|g| g.generate("generator"))
    {
        Ok(m) => JsValue::from_str(&crate::write_model(&m)),
        Err(p) => problems_value(&p),
    }
}

/// The core's runner for the experiment `text` on `workers` workers, or
/// the problems.
fn runner(text: &str, workers: usize) -> Result<crate::experiment::Runner, JsValue> {
    let exp = crate::experiment::parse_experiment(text, None).map_err(|p| problems_value(&p))?;
    Ok(crate::experiment::Runner::new(exp, None, (0, 1), workers))
}

/// `{ok, estimate, words, over}`: `over` when the estimate is over
/// `budget` seconds (the runner's decision; none without a budget).
fn estimate_value(e: &crate::experiment::Estimate, budget: Option<f64>) -> JsValue {
    use crate::experiment::Budget;
    let budget = budget.map_or(Budget::Unchecked, |seconds| Budget::Within {
        seconds,
        free_bytes: None,
    });
    let obj = Object::new();
    set(&obj, "ok", true);
    set(&obj, "estimate", to_js(e));
    set(&obj, "words", e.words_with("worker"));
    set(&obj, "over", !budget.allows(e));
    obj.into()
}

/// How long and how much memory the experiment `text` will take on
/// `workers` workers, and whether that is over `budget` seconds: the
/// runner times each learner here for a few episodes (about a second in
/// all; `Runner::estimate_here`). `{ok, estimate, words, over}`, or the
/// problems.
#[wasm_bindgen(js_name = estimateRun)]
pub fn estimate_run(text: &str, workers: usize, budget: Option<f64>) -> JsValue {
    match runner(text, workers) {
        Ok(r) => estimate_value(&r.estimate_here(&now_seconds), budget),
        Err(p) => p,
    }
}

/// `estimateRun`'s answer when the page stopped waiting for it after
/// `waited` seconds (one episode outlasted the calibration): the runner's
/// lower bound (`Runner::late_estimate`).
#[wasm_bindgen(js_name = lateEstimate)]
pub fn late_estimate(text: &str, workers: usize, waited: f64, budget: Option<f64>) -> JsValue {
    match runner(text, workers) {
        Ok(r) => estimate_value(&r.late_estimate(waited), budget),
        Err(p) => p,
    }
}

/// Which shard of the experiment `text` each of `workers` workers runs, as
/// the runner plans it (at most one worker per run): `{ok, lanes: [{shard,
/// of}]}` (shard 0-based), or the problems.
#[wasm_bindgen(js_name = planRun)]
pub fn plan_run(text: &str, workers: usize) -> JsValue {
    #[derive(serde::Serialize)]
    struct Lane {
        shard: usize,
        of: usize,
    }
    #[derive(serde::Serialize)]
    struct Plan {
        ok: bool,
        lanes: Vec<Lane>,
    }
    match crate::experiment::parse_experiment(text, None) {
        Ok(exp) => to_js(&Plan {
            ok: true,
            lanes: crate::experiment::Runner::lanes(&exp, workers)
                .into_iter()
                .map(|(shard, of)| Lane { shard, of })
                .collect(),
        }),
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
pub(crate) fn to_js<T: serde::Serialize>(v: &T) -> JsValue {
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
    if crate::format::is_burnin_csv(text) {
        return problems_value(&Problems::single("", crate::format::CSV_NOT_OPENED));
    }
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
                set_results(&obj, &out);
            }
            Err(p) => return problems_value(&p),
        },
        _ => set(&obj, "kind", "model"),
    }
    set(&obj, "ok", true);
    obj.into()
}

/// What a front end shows of results, on `obj`: the JSON, every CSV table,
/// the chart data, the reading texts, and `tables`, the comparison table in
/// every format (`[{key, name, extension, media_type, text}]`, from
/// `experiment::table_exports`) — a results file read, or a merge.
fn set_results(obj: &Object, out: &crate::experiment::Output) {
    set(obj, "json", out.to_json());
    set(obj, "csv", out.to_csv());
    set(obj, "cellsCsv", out.cells_csv());
    set(obj, "summaryCsv", out.summary_csv());
    set(obj, "seedsCsv", out.seeds_csv());
    set(obj, "chartText", crate::chart::chart_text(out));
    set(obj, "readings", to_js(&out.reading_texts()));
    set(obj, "scaling", to_js(&out.scaling_texts()));
    set(obj, "tables", to_js(&crate::experiment::table_exports(out)));
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

/// Merges shard files' texts into `{json, csv, cellsCsv}` of the results
/// (`cellsCsv`: where regret was paid, by cell), or problems.
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
            set_results(&obj, &out);
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
/// `no_learners`, none, as `burnin bench --no-learners`; with `research`,
/// only the research-scale workload, as `burnin bench --research`.
#[wasm_bindgen(js_name = benchFigures)]
pub fn bench_figures(
    quick: bool,
    only: Option<String>,
    no_learners: bool,
    research: bool,
) -> String {
    let sel = crate::bench::Selection {
        quick,
        only: only.as_deref(),
        no_learners,
        research,
    };
    crate::bench::report("wasm", &now_seconds, &|| Some(heap_bytes().into()), sel)
}

/// A fresh base seed from the browser's Crypto.getRandomValues (through
/// getrandom), for the page's "New seed"; the page writes it into the
/// experiment.
#[wasm_bindgen(js_name = freshSeed)]
pub fn fresh_seed() -> Result<f64, JsValue> {
    let bits = getrandom::u64().map_err(|e| JsValue::from_str(&format!("no random bits: {e}")))?;
    Ok(crate::experiment::fresh_seed(bits) as f64)
}

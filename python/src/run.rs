//! Experiments in process: the core's runner on this machine's threads
//! with the GIL released; a user's learner written as a Python class is a
//! guest (the same contract as the CLI's processes and the page's modules,
//! through `GuestLearner`); figures and tables of a results file.

use std::collections::HashMap;
use std::path::PathBuf;
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::time::Duration;

use burnin::chart::{Options, View};
use burnin::experiment::{
    Budget, Estimate, Pool, Runner, Stopped, Watch, bytes_words, parse_experiment, parse_results,
};
use burnin::learn::{Batch, Decision, Guest, GuestHost, GuestIntro, Guests, Setting};
use burnin::native::Threads;
use pyo3::exceptions::{PyRuntimeError, PyTypeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyBytes, PyDict, PyFloat, PyInt, PyList, PyString, PyTuple};
use serde_json::Value;

use crate::arrays::array;
use crate::{invalid, raise};

/// Learner classes by the guest name an experiment gives them.
struct ClassHost {
    classes: HashMap<String, Py<PyAny>>,
}

impl GuestHost for ClassHost {
    fn start(&self, name: &str, intro: &GuestIntro) -> Result<Box<dyn Guest>, String> {
        let cls = self
            .classes
            .get(name)
            .ok_or_else(|| format!("no class for guest learner {name:?}"))?;
        Python::attach(|py| {
            let d = intro_dict(py, intro).map_err(|e| e.to_string())?;
            let obj = cls
                .bind(py)
                .call1((d,))
                .map_err(|e| format!("its class raised {}", described(py, &e)))?;
            Ok(Box::new(ClassGuest {
                obj: obj.unbind(),
                setting: intro.setting,
                answers: 0,
            }) as Box<dyn Guest>)
        })
    }
}

/// The introduction: the process protocol's first message as a dict, with
/// the learner's label and the run's seed index.
fn intro_dict<'py>(py: Python<'py>, intro: &GuestIntro) -> PyResult<Bound<'py, PyDict>> {
    let s = &intro.setting;
    let d = PyDict::new(py);
    d.set_item("protocol", burnin::learn::GUEST_PROTOCOL)?;
    d.set_item("version", burnin::learn::GUEST_VERSION)?;
    d.set_item("states", s.states)?;
    d.set_item("actions", s.actions)?;
    d.set_item("horizon", s.horizon)?;
    d.set_item("episodes", s.episodes)?;
    d.set_item("delta", s.delta)?;
    d.set_item("seed", intro.seed)?;
    d.set_item("state_labels", intro.state_labels.clone())?;
    d.set_item("action_labels", intro.action_labels.clone())?;
    d.set_item("label", intro.label.clone())?;
    d.set_item("seed_index", intro.seed_index)?;
    Ok(d)
}

/// A Python exception as one line: its type, message and where it was
/// raised (the innermost frame of its traceback).
fn described(py: Python<'_>, e: &PyErr) -> String {
    let mut text = e.to_string();
    if let Some(tb) = e.traceback(py) {
        let mut tb = tb.into_any();
        while let Ok(next) = tb.getattr("tb_next") {
            if next.is_none() {
                break;
            }
            tb = next;
        }
        let at = (|| -> PyResult<String> {
            let frame = tb.getattr("tb_frame")?;
            let file: String = frame.getattr("f_code")?.getattr("co_filename")?.extract()?;
            let line: i64 = tb.getattr("tb_lineno")?.extract()?;
            Ok(format!(" (at {file}:{line})"))
        })();
        if let Ok(at) = at {
            text.push_str(&at);
        }
    }
    text
}

struct ClassGuest {
    obj: Py<PyAny>,
    setting: Setting,
    answers: u64,
}

impl Guest for ClassGuest {
    fn decide(&mut self, batch: Batch<'_>) -> Result<Decision, String> {
        Python::attach(|py| {
            let b = batch_dict(py, &batch).map_err(|e| e.to_string())?;
            let answer = self
                .obj
                .bind(py)
                .call_method1("decide", (b,))
                .map_err(|e| format!("decide raised {}", described(py, &e)))?;
            self.answers += 1;
            let n = self.answers;
            let v = to_value(&answer).map_err(|e| format!("answer {n}: {e}"))?;
            Decision::from_json(&v, &self.setting)
                .and_then(|d| d.check(&self.setting, n == 1).map(|()| d))
                .map_err(|e| format!("answer {n}: {e}"))
        })
    }
}

/// The batch as numpy arrays of shape (episodes, H): `states`, `actions`,
/// `rewards`, `next_states`, and `done`, the episodes finished so far.
fn batch_dict<'py>(py: Python<'py>, b: &Batch<'_>) -> PyResult<Bound<'py, PyDict>> {
    let shape = [b.episodes(), b.horizon];
    let d = PyDict::new(py);
    d.set_item("done", b.done)?;
    let ints = |f: fn(&burnin::learn::GuestStep) -> u32| -> Vec<i64> {
        b.steps.iter().map(|s| f(s) as i64).collect()
    };
    d.set_item("states", array(py, ints(|s| s.state), &shape)?)?;
    d.set_item("actions", array(py, ints(|s| s.action), &shape)?)?;
    d.set_item(
        "rewards",
        array(py, b.steps.iter().map(|s| s.reward).collect(), &shape)?,
    )?;
    d.set_item("next_states", array(py, ints(|s| s.next), &shape)?)?;
    Ok(d)
}

/// A Python answer as the JSON value the process protocol would have
/// sent (numpy arrays and scalars through their `tolist`), so that
/// `Decision::from_json` reads both alike.
fn to_value(o: &Bound<'_, PyAny>) -> Result<Value, String> {
    if o.is_none() {
        return Ok(Value::Null);
    }
    if o.is_instance_of::<PyBool>() {
        return Ok(Value::Bool(o.extract::<bool>().map_err(|e| e.to_string())?));
    }
    if o.is_instance_of::<PyInt>() {
        if let Ok(x) = o.extract::<i64>() {
            return Ok(x.into());
        }
        if let Ok(x) = o.extract::<u64>() {
            return Ok(x.into());
        }
        return Err(format!("the integer {o} is too large"));
    }
    if o.is_instance_of::<PyFloat>() {
        let x: f64 = o.extract().map_err(|e: PyErr| e.to_string())?;
        return Ok(serde_json::Number::from_f64(x).map_or(Value::Null, Value::Number));
    }
    if o.is_instance_of::<PyString>() {
        return Ok(Value::String(
            o.extract().map_err(|e: PyErr| e.to_string())?,
        ));
    }
    if let Ok(d) = o.cast::<PyDict>() {
        let mut m = serde_json::Map::new();
        for (k, v) in d.iter() {
            let k: String = k
                .extract()
                .map_err(|_| format!("a key of the answer is {k}, not a string"))?;
            m.insert(k, to_value(&v)?);
        }
        return Ok(Value::Object(m));
    }
    if o.is_instance_of::<PyList>() || o.is_instance_of::<PyTuple>() {
        let items: Vec<Bound<'_, PyAny>> = o
            .try_iter()
            .map_err(|e| e.to_string())?
            .collect::<PyResult<_>>()
            .map_err(|e| e.to_string())?;
        return items
            .iter()
            .map(to_value)
            .collect::<Result<_, _>>()
            .map(Value::Array);
    }
    if o.hasattr("tolist").unwrap_or(false) {
        let l = o.call_method0("tolist").map_err(|e| e.to_string())?;
        return to_value(&l);
    }
    let kind = o
        .get_type()
        .name()
        .map_or_else(|_| "?".to_string(), |n| n.to_string());
    Err(format!(
        "expected a dict like {{\"actions\": …}}, lists, numbers or numpy arrays, found a {kind}"
    ))
}

/// This machine's threads (`burnin::native::Threads`), each lane made
/// known to Python once for the whole run (attached, then detached): a
/// learner class's calls from that lane then only take the GIL, instead
/// of making and dropping a Python thread state each time.
struct PyThreads;

impl Pool for PyThreads {
    fn scope(&self, lanes: usize, work: &(dyn Fn(usize) + Sync)) {
        Threads.scope(lanes, &|lane| {
            Python::attach(|py| py.detach(|| work(lane)));
        });
    }

    fn within(&self, seconds: f64, work: Box<dyn FnOnce() + Send>) {
        Threads.within(seconds, work);
    }

    fn rest(&self) {
        Threads.rest();
    }
}

/// What the Python side hears while a run goes, and whether it asked to stop.
struct Watcher {
    done: AtomicU64,
    total: AtomicU64,
    cancel: AtomicBool,
}

impl Watch for Watcher {
    fn progress(&self, done: u64, total: u64) {
        self.done.store(done, Ordering::Relaxed);
        self.total.store(total, Ordering::Relaxed);
    }
    fn estimated(&self, _e: &Estimate) {}
    fn cancelled(&self) -> bool {
        self.cancel.load(Ordering::Relaxed)
    }
}

/// Runs an experiment file's text and returns (the results JSON, the
/// warnings). `base` resolves a `model_path`; `learners` maps guest names
/// to classes; `progress(done, total)` is called from the calling thread
/// about ten times a second; an interrupt (Ctrl-C, the notebook's stop)
/// stops the run and is raised again, nothing written.
#[pyfunction]
#[pyo3(signature = (text, base, learners, threads=None, progress=None, budget_minutes=None))]
fn run_experiment(
    py: Python<'_>,
    text: String,
    base: Option<PathBuf>,
    learners: HashMap<String, Py<PyAny>>,
    threads: Option<usize>,
    progress: Option<Py<PyAny>>,
    budget_minutes: Option<f64>,
) -> PyResult<(String, Vec<String>)> {
    let base = base.unwrap_or_default();
    let loader = |rel: &str| -> Result<String, String> {
        let path = base.join(rel);
        std::fs::read_to_string(&path).map_err(|e| format!("cannot read {}: {e}", path.display()))
    };
    let exp = py
        .detach(|| parse_experiment(&text, Some(&loader)))
        .map_err(|p| invalid(py, &p))?;
    let mut warnings = Vec::new();
    if let Some(w) = exp.seed_warning() {
        warnings.push(w.to_string());
    }
    for (i, l) in exp.learners.iter().enumerate() {
        if let Some(g) = l.guest()
            && !learners.contains_key(g)
        {
            return Err(PyValueError::new_err(format!(
                "learners[{i}] is the guest learner {g:?}; pass its class as learners={{{g:?}: YourClass}}"
            )));
        }
    }
    for name in learners.keys() {
        if !exp.learners.iter().any(|l| l.guest() == Some(name)) {
            warnings.push(format!(
                "learners={{{name:?}: …}}: the experiment names no guest learner {name:?}"
            ));
        }
    }
    let guests: Guests = Arc::new(ClassHost { classes: learners });
    let threads = threads
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, |n| n.get()))
        .max(1);
    let runner = Runner::new(exp, Some(&guests), (0, 1), threads);
    let budget = match budget_minutes {
        None => Budget::Unchecked,
        Some(m) => Budget::Within {
            seconds: 60.0 * m,
            free_bytes: None,
        },
    };
    let watch = Watcher {
        done: AtomicU64::new(0),
        total: AtomicU64::new(runner.total_episodes()),
        cancel: AtomicBool::new(false),
    };
    let clock = burnin::native::clock();
    let (records, interrupted) = py.detach(|| {
        std::thread::scope(|s| {
            let job = s.spawn(|| runner.run(&budget, &clock, &PyThreads, &watch));
            let mut interrupted: Option<PyErr> = None;
            let mut last = u64::MAX;
            let mut polls = 0u32;
            loop {
                let finished = job.is_finished();
                polls += 1;
                // Signals and progress about ten times a second (and at the
                // end), without holding a short run up for a whole period.
                if !finished && polls % 20 != 1 {
                    std::thread::sleep(Duration::from_millis(5));
                    continue;
                }
                Python::attach(|py| {
                    if interrupted.is_none()
                        && let Err(e) = py.check_signals()
                    {
                        watch.cancel.store(true, Ordering::Relaxed);
                        interrupted = Some(e);
                    }
                    let done = watch.done.load(Ordering::Relaxed);
                    if let Some(cb) = &progress
                        && interrupted.is_none()
                        && (done != last || finished)
                    {
                        last = done;
                        let total = watch.total.load(Ordering::Relaxed);
                        if let Err(e) = cb.call1(py, (done, total)) {
                            watch.cancel.store(true, Ordering::Relaxed);
                            interrupted = Some(e);
                        }
                    }
                });
                if finished {
                    break;
                }
                std::thread::sleep(Duration::from_millis(5));
            }
            (job.join(), interrupted)
        })
    });
    let records = match records {
        Ok(r) => r,
        Err(panic) => std::panic::resume_unwind(panic),
    };
    if let Some(e) = interrupted {
        return Err(e);
    }
    match records {
        Ok(records) => {
            let out = py.detach(|| runner.output(records).to_json());
            Ok((out, warnings))
        }
        Err(Stopped::Fault(f)) => Err(raise(
            py,
            "LearnerError",
            (
                f.to_string(),
                f.label.clone(),
                f.seed_index,
                f.episode,
                f.message.clone(),
            ),
        )),
        Err(Stopped::Cancelled { done, total }) => Err(PyRuntimeError::new_err(format!(
            "cancelled after {done} of {total} episodes"
        ))),
        Err(Stopped::OverTime { estimate, .. }) => Err(PyRuntimeError::new_err(format!(
            "this run is estimated to take {}, over the budget of {} min; give a larger budget_minutes or None",
            estimate.words(),
            budget_minutes.unwrap_or(0.0)
        ))),
        Err(Stopped::OverMemory { needed, free }) => Err(PyRuntimeError::new_err(format!(
            "this run is estimated to need {}, more than the {} free",
            bytes_words(needed),
            bytes_words(free)
        ))),
    }
}

/// Reads a results file's text (burnin-results or burnin-sweep v1) and
/// gives it back as the core writes it.
#[pyfunction]
fn read_results(py: Python<'_>, text: &str) -> PyResult<String> {
    let out = parse_results(text).map_err(|p| invalid(py, &p))?;
    Ok(out.to_json())
}

/// The curves of a (single) results file as numpy arrays: per learner
/// label, `episodes` (C,), `mean`/`lo`/`hi` (C,) and `seeds` (n, C).
#[pyfunction]
fn curves<'py>(py: Python<'py>, text: &str) -> PyResult<Bound<'py, PyDict>> {
    let out = parse_results(text).map_err(|p| invalid(py, &p))?;
    let burnin::experiment::Output::Single(r) = out else {
        return Err(PyValueError::new_err(
            "a sweep's results have no curves; read its points from to_dict()",
        ));
    };
    let d = PyDict::new(py);
    for l in &r.learners {
        let c = PyDict::new(py);
        let k = l.checkpoints.len();
        c.set_item("episodes", array(py, l.checkpoints.clone(), &[k])?)?;
        c.set_item("mean", array(py, l.regret_mean.clone(), &[k])?)?;
        c.set_item("lo", array(py, l.regret_lo.clone(), &[k])?)?;
        c.set_item("hi", array(py, l.regret_hi.clone(), &[k])?)?;
        let n = l.regret_by_seed.len();
        let seeds: Vec<f64> = l.regret_by_seed.iter().flatten().copied().collect();
        c.set_item("seeds", array(py, seeds, &[n, k])?)?;
        d.set_item(l.label.clone(), c)?;
    }
    Ok(d)
}

/// The chart of a results file as `burnin plot` draws it: SVG text, or PNG
/// bytes when `png`.
#[pyfunction]
#[pyo3(signature = (text, view=None, log=false, bands=true, lower=false, bounds=false, compare=None, caption=true, width=1280, height=720, type_scale=1.25, png=false))]
#[allow(clippy::too_many_arguments)]
fn figure<'py>(
    py: Python<'py>,
    text: &str,
    view: Option<&str>,
    log: bool,
    bands: bool,
    lower: bool,
    bounds: bool,
    compare: Option<(String, String)>,
    caption: bool,
    width: u32,
    height: u32,
    type_scale: f64,
    png: bool,
) -> PyResult<Bound<'py, PyAny>> {
    const MAX_SIDE: u32 = 8192;
    for (name, v) in [("width", width), ("height", height)] {
        if !(16..=MAX_SIDE).contains(&v) {
            return Err(PyValueError::new_err(format!(
                "{name}={v}: expected 16 to {MAX_SIDE} pixels"
            )));
        }
    }
    if !(type_scale > 0.1 && type_scale <= 10.0) {
        return Err(PyValueError::new_err(format!(
            "type_scale={type_scale}: expected a number above 0.1 and at most 10"
        )));
    }
    let view = match view {
        None => None,
        Some(k) => Some(View::from_key(k).ok_or_else(|| {
            let keys: Vec<&str> = View::ALL.iter().map(|v| v.key()).collect();
            PyValueError::new_err(format!("view={k:?}: expected one of {}", keys.join(", ")))
        })?),
    };
    if compare.is_some() && view != Some(View::Difference) {
        return Err(PyValueError::new_err(
            "compare chooses the learners of view=\"difference\"; give that view too",
        ));
    }
    let opts = Options {
        view,
        log,
        bands,
        lower,
        bounds,
        compare,
        caption,
    };
    let out = parse_results(text).map_err(|p| invalid(py, &p))?;
    let fig = burnin::chart::figure(&out, &opts).map_err(PyValueError::new_err)?;
    Ok(if png {
        let bytes = py.detach(|| burnin::chart::raster::png(&fig, width, height, type_scale));
        PyBytes::new(py, &bytes).into_any()
    } else {
        let svg = burnin::chart::draw::svg(&fig, width, height, type_scale);
        PyString::new(py, &svg).into_any()
    })
}

/// The comparison table (`burnin table`) as markdown, latex or csv.
#[pyfunction]
#[pyo3(signature = (text, format="markdown"))]
fn table(py: Python<'_>, text: &str, format: &str) -> PyResult<String> {
    let out = parse_results(text).map_err(|p| invalid(py, &p))?;
    burnin_table(&out, format)
}

fn burnin_table(out: &burnin::experiment::Output, format: &str) -> PyResult<String> {
    use burnin::experiment::TableFormat;
    let f = TableFormat::ALL
        .into_iter()
        .find(|f| f.key() == format)
        .ok_or_else(|| {
            PyTypeError::new_err(format!(
                "format={format:?}: expected markdown, latex or csv"
            ))
        })?;
    Ok(out.table(f))
}

pub fn register(m: &Bound<'_, PyModule>) -> PyResult<()> {
    m.add_function(wrap_pyfunction!(run_experiment, m)?)?;
    m.add_function(wrap_pyfunction!(read_results, m)?)?;
    m.add_function(wrap_pyfunction!(curves, m)?)?;
    m.add_function(wrap_pyfunction!(figure, m)?)?;
    m.add_function(wrap_pyfunction!(table, m)?)?;
    Ok(())
}

//! Experiments in process: the core's runner on this machine's threads
//! with the GIL released; a user's learner written as a Python class (made
//! and called on the thread that called `burnin.run`) is a
//! guest (the same contract as the CLI's processes and the page's modules,
//! through `GuestLearner`); figures and tables of a results file.

use std::collections::HashMap;
use std::path::PathBuf;
use std::sync::Arc;
use std::sync::atomic::{AtomicBool, AtomicU64, Ordering};
use std::sync::mpsc;
use std::time::{Duration, Instant};

use burnin::chart::{Options, View};
use burnin::experiment::{
    Budget, Estimate, Runner, Stopped, Watch, bytes_words, parse_experiment, parse_results,
};
use burnin::learn::{Batch, Decision, Guest, GuestHost, GuestIntro, Guests, Setting};
use burnin::native::Threads;
use pyo3::exceptions::{PyKeyboardInterrupt, PyRuntimeError, PyTypeError, PyValueError};
use pyo3::prelude::*;
use pyo3::types::{PyBool, PyBytes, PyDict, PyFloat, PyInt, PyList, PyString, PyTuple};
use serde_json::Value;

use crate::arrays::array;
use crate::{invalid, raise};

/// A call of a learner class, sent by a lane of the runner to the thread
/// that called `burnin.run` (see [`Calls`]).
enum Call {
    /// Make an object of the class named `name`; the reply is its id.
    Start {
        name: String,
        intro: GuestIntro,
        reply: mpsc::Sender<Result<u64, String>>,
    },
    /// Call `decide` of object `id` with the batch (`answers` answers
    /// given before).
    Decide {
        id: u64,
        done: u64,
        horizon: usize,
        steps: Vec<burnin::learn::GuestStep>,
        setting: Setting,
        answers: u64,
        reply: mpsc::Sender<Result<Decision, String>>,
    },
    /// The run of object `id` is over: drop it.
    Drop { id: u64 },
    /// The runner has returned.
    Finished,
}

/// How long a thread waiting for the other side of a call first polls
/// before it sleeps: a learner answering every episode makes a call every
/// few microseconds, and two sleeps and wake-ups a call (each a trip
/// through the scheduler, slower still on a busy machine) would cost
/// more than the call itself.
const SPIN: Duration = Duration::from_micros(50);

/// The next message of `rx`: polled for [`SPIN`], then waited for (at
/// most `timeout`, or until the sender is gone when None).
fn soon<T>(rx: &mpsc::Receiver<T>, timeout: Option<Duration>) -> Option<T> {
    let start = Instant::now();
    let mut polls = 0u32;
    loop {
        match rx.try_recv() {
            Ok(m) => return Some(m),
            Err(mpsc::TryRecvError::Disconnected) => return None,
            Err(mpsc::TryRecvError::Empty) => {}
        }
        polls += 1;
        if polls.is_multiple_of(64) && start.elapsed() >= SPIN {
            break;
        }
        std::hint::spin_loop();
    }
    match timeout {
        None => rx.recv().ok(),
        Some(t) => rx.recv_timeout(t).ok(),
    }
}

/// Learner classes as guests. Their objects live on the thread that
/// called `burnin.run`, and every call of them is made there: Python runs
/// a signal's handler only in the main thread, and a call blocked in C
/// (`time.sleep`) is woken by a signal only there, so a `decide` that
/// never returns is still stopped by Ctrl-C (#32). Learner classes lose
/// no parallelism by it: they hold the GIL when they run anyway.
struct ClassHost {
    calls: mpsc::Sender<Call>,
}

/// What a lane hears when the calling thread stopped answering.
const INTERRUPTED: &str = "the run was interrupted";

impl GuestHost for ClassHost {
    fn start(&self, name: &str, intro: &GuestIntro) -> Result<Box<dyn Guest>, String> {
        let (reply, answer) = mpsc::channel();
        self.calls
            .send(Call::Start {
                name: name.to_owned(),
                intro: intro.clone(),
                reply,
            })
            .map_err(|_| INTERRUPTED.to_string())?;
        let id = soon(&answer, None).ok_or_else(|| INTERRUPTED.to_string())??;
        Ok(Box::new(ClassGuest {
            id,
            setting: intro.setting,
            answers: 0,
            calls: self.calls.clone(),
        }))
    }
}

/// One object of a learner class, by its id on the calling thread.
struct ClassGuest {
    id: u64,
    setting: Setting,
    answers: u64,
    calls: mpsc::Sender<Call>,
}

impl Guest for ClassGuest {
    fn decide(&mut self, batch: Batch<'_>) -> Result<Decision, String> {
        let (reply, answer) = mpsc::channel();
        self.calls
            .send(Call::Decide {
                id: self.id,
                done: batch.done,
                horizon: batch.horizon,
                steps: batch.steps.to_vec(),
                setting: self.setting,
                answers: self.answers,
                reply,
            })
            .map_err(|_| INTERRUPTED.to_string())?;
        let d = soon(&answer, None).ok_or_else(|| INTERRUPTED.to_string())??;
        self.answers += 1;
        Ok(d)
    }
}

impl Drop for ClassGuest {
    fn drop(&mut self) {
        let _ = self.calls.send(Call::Drop { id: self.id });
    }
}

/// The calling thread's side: the classes, their live objects, and the
/// interrupt once one came.
struct Calls {
    classes: HashMap<String, Py<PyAny>>,
    objects: HashMap<u64, Py<PyAny>>,
    next: u64,
    interrupted: Option<PyErr>,
}

impl Calls {
    /// Makes a call; a KeyboardInterrupt raised inside the class (the
    /// signal's handler runs in its code) is kept as the run's interrupt,
    /// and every later call is refused without running Python.
    fn answer(&mut self, py: Python<'_>, call: Call) {
        match call {
            Call::Start { name, intro, reply } => {
                let r = match self.interrupted {
                    Some(_) => Err(INTERRUPTED.to_string()),
                    None => self.start(py, &name, &intro),
                };
                let _ = reply.send(r);
            }
            Call::Decide {
                id,
                done,
                horizon,
                steps,
                setting,
                answers,
                reply,
            } => {
                let batch = Batch {
                    done,
                    horizon,
                    steps: &steps,
                };
                let r = match self.interrupted {
                    Some(_) => Err(INTERRUPTED.to_string()),
                    None => self.decide(py, id, batch, &setting, answers),
                };
                let _ = reply.send(r);
            }
            Call::Drop { id } => {
                self.objects.remove(&id);
            }
            Call::Finished => {}
        }
    }

    /// A Python error of a class: an interrupt is kept, anything else is
    /// the learner's fault, in one line.
    fn failed(&mut self, py: Python<'_>, e: PyErr, what: &str) -> String {
        if e.is_instance_of::<PyKeyboardInterrupt>(py) {
            self.interrupted = Some(e);
            return INTERRUPTED.to_string();
        }
        format!("{what} {}", described(py, &e))
    }

    fn start(&mut self, py: Python<'_>, name: &str, intro: &GuestIntro) -> Result<u64, String> {
        let cls = self
            .classes
            .get(name)
            .ok_or_else(|| format!("no class for guest learner {name:?}"))?;
        let d = intro_dict(py, intro).map_err(|e| e.to_string())?;
        let obj = match cls.bind(py).call1((d,)) {
            Ok(o) => o.unbind(),
            Err(e) => return Err(self.failed(py, e, "its class raised")),
        };
        self.next += 1;
        self.objects.insert(self.next, obj);
        Ok(self.next)
    }

    fn decide(
        &mut self,
        py: Python<'_>,
        id: u64,
        batch: Batch<'_>,
        setting: &Setting,
        answers: u64,
    ) -> Result<Decision, String> {
        let obj = self
            .objects
            .get(&id)
            .ok_or("the learner's object is gone")?
            .clone_ref(py);
        let b = batch_dict(py, &batch).map_err(|e| e.to_string())?;
        let answer = match obj.bind(py).call_method1("decide", (b,)) {
            Ok(a) => a,
            Err(e) => return Err(self.failed(py, e, "decide raised")),
        };
        let n = answers + 1;
        let v = to_value(&answer).map_err(|e| format!("answer {n}: {e}"))?;
        Decision::from_json(&v, setting)
            .and_then(|d| d.check(setting, n == 1).map(|()| d))
            .map_err(|e| format!("answer {n}: {e}"))
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
    let (calls, incoming) = mpsc::channel();
    let guests: Guests = Arc::new(ClassHost {
        calls: calls.clone(),
    });
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
    let mut host = Calls {
        classes: learners,
        objects: HashMap::new(),
        next: 0,
        interrupted: None,
    };
    // This thread answers the learner classes' calls as they come, and
    // about ten times a second (and at the end) runs Python's signal
    // handlers and reports progress; it holds the GIL only for those.
    let records = py.detach(|| {
        let incoming = incoming;
        std::thread::scope(|s| {
            let job = s.spawn(|| {
                let r = runner.run(&budget, &clock, &Threads, &watch);
                let _ = calls.send(Call::Finished);
                r
            });
            let mut last = u64::MAX;
            let mut polled = Instant::now();
            loop {
                let call = soon(&incoming, Some(Duration::from_millis(100)));
                let finished = matches!(call, Some(Call::Finished)) || job.is_finished();
                let poll = finished || polled.elapsed() >= Duration::from_millis(100);
                Python::attach(|py| {
                    if let Some(call) = call {
                        host.answer(py, call);
                    }
                    // Every call the lanes made before they returned.
                    if finished {
                        while let Ok(call) = incoming.try_recv() {
                            host.answer(py, call);
                        }
                    }
                    if !poll {
                        return;
                    }
                    polled = Instant::now();
                    if host.interrupted.is_none()
                        && let Err(e) = py.check_signals()
                    {
                        host.interrupted = Some(e);
                    }
                    let done = watch.done.load(Ordering::Relaxed);
                    if let Some(cb) = &progress
                        && host.interrupted.is_none()
                        && (done != last || finished)
                    {
                        last = done;
                        let total = watch.total.load(Ordering::Relaxed);
                        if let Err(e) = cb.call1(py, (done, total)) {
                            host.interrupted = Some(e);
                        }
                    }
                });
                if host.interrupted.is_some() {
                    watch.cancel.store(true, Ordering::Relaxed);
                }
                if finished {
                    break;
                }
            }
            job.join()
        })
    });
    let interrupted = host.interrupted.take();
    drop(host);
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
            "a sweep's results have no curves of their own: each point's are in .points[i].curves, the readings against the swept value in .sweep",
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

/// A sweep's readings as numpy arrays (`burnin.Sweep`): the swept values,
/// the size the scaling exponents are in, and per learner label its
/// readings at each point — regret at K with its interval, the tail slope
/// and the burn-in with their bootstrap intervals (NaN where the file has
/// null: no interval with one seed, not settled by K), how many seeds were
/// still linear at K — and its scaling reading as JSON; `points` holds each
/// point's own results file text.
#[pyfunction]
fn sweep<'py>(py: Python<'py>, text: &str) -> PyResult<Bound<'py, PyDict>> {
    let out = parse_results(text).map_err(|p| invalid(py, &p))?;
    let burnin::experiment::Output::Sweep(s) = out else {
        return Err(PyValueError::new_err(
            "these are the results of one experiment, not of a sweep; read its curves",
        ));
    };
    let n = s.values.len();
    let vec = |v: Vec<f64>| array(py, v, &[n]);
    let d = PyDict::new(py);
    d.set_item("parameter", &s.parameter)?;
    d.set_item("values", vec(s.values.clone())?)?;
    d.set_item("scaling_in", s.scaling_in.clone())?;
    d.set_item(
        "scaling_x",
        if s.scaling_x.len() == n {
            Some(vec(s.scaling_x.clone())?)
        } else {
            None
        },
    )?;
    let nan = f64::NAN;
    let whole = |x: Option<u64>| x.map_or(nan, |v| v as f64);
    let learners = PyDict::new(py);
    for (li, l) in s.learners.iter().enumerate() {
        // The same learner in each point's own results.
        let at: Vec<&burnin::experiment::LearnerResult> = s
            .points
            .iter()
            .map(|p| {
                p.learners
                    .get(li)
                    .filter(|pl| pl.label == l.label)
                    .ok_or_else(|| {
                        PyValueError::new_err(format!(
                            "learner {:?} is missing from a point of the sweep",
                            l.label
                        ))
                    })
            })
            .collect::<PyResult<_>>()?;
        let c = PyDict::new(py);
        c.set_item("algorithm", &l.algorithm)?;
        c.set_item("values", vec(s.values.clone())?)?;
        c.set_item("regret_mean", vec(l.regret_mean.clone())?)?;
        c.set_item("regret_lo", vec(l.regret_lo.clone())?)?;
        c.set_item("regret_hi", vec(l.regret_hi.clone())?)?;
        c.set_item(
            "slope",
            vec(l.slope.iter().map(|x| x.unwrap_or(nan)).collect())?,
        )?;
        let slope_iv = |end: fn((f64, f64)) -> f64| -> Vec<f64> {
            at.iter()
                .map(|p| p.slope_interval.map_or(nan, end))
                .collect()
        };
        c.set_item("slope_lo", vec(slope_iv(|i| i.0))?)?;
        c.set_item("slope_hi", vec(slope_iv(|i| i.1))?)?;
        c.set_item(
            "burn_in",
            vec(l.burn_in.iter().map(|&b| whole(b)).collect())?,
        )?;
        // Each end of the burn-in's interval (null inside: not settled).
        let burn_iv = |hi: bool| -> Vec<f64> {
            at.iter()
                .map(|p| whole(p.burn_in_interval.and_then(|i| if hi { i.1 } else { i.0 })))
                .collect()
        };
        c.set_item("burn_in_lo", vec(burn_iv(false))?)?;
        c.set_item("burn_in_hi", vec(burn_iv(true))?)?;
        c.set_item(
            "seeds_linear_at_k",
            vec(at.iter().map(|p| whole(p.seeds_linear_at_k)).collect())?,
        )?;
        c.set_item(
            "scaling",
            l.scaling
                .as_ref()
                .map(|sc| serde_json::to_string(sc).expect("a reading serialises")),
        )?;
        learners.set_item(&l.label, c)?;
    }
    d.set_item("learners", learners)?;
    let points: Vec<String> = s.points.iter().map(|p| p.to_json()).collect();
    d.set_item("points", points)?;
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
    m.add_function(wrap_pyfunction!(sweep, m)?)?;
    m.add_function(wrap_pyfunction!(figure, m)?)?;
    m.add_function(wrap_pyfunction!(table, m)?)?;
    Ok(())
}

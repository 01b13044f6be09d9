//! How long and how much memory a run will take, said before it starts.
//!
//! Learners differ in cost per episode by orders of magnitude (BENCHMARKS.md)
//! and with the model's size, so the time is measured, not guessed: each
//! built-in learner runs a few episodes of its first run at each sweep point
//! ([`calibrate`], with the clock passed in by the front end; the core reads
//! none), and the per-episode costs found are multiplied out over every run
//! of the experiment or shard ([`estimate`]). Memory is counted from the sizes
//! the run will hold: the models, every run's record until the summary,
//! and one learner's state per thread.

use std::sync::Arc;

use serde::Serialize;

use super::Point;

/// What calibration measured of one learner.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct LearnerCost {
    pub label: String,
    /// Seconds per episode, on the experiment's largest model; None for a
    /// guest learner (not started to be measured) or one not measured.
    pub seconds_per_episode: Option<f64>,
    /// Episodes timed.
    pub episodes: u64,
}

/// A run's expected time and peak memory.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Estimate {
    /// Wall-clock seconds on `threads` threads.
    pub seconds: f64,
    /// Whether some learner's cost is unknown (a guest learner, or one whose
    /// first episode outlasted the calibration): then `seconds` leaves it out
    /// and the run takes longer.
    pub at_least: bool,
    /// Peak memory, bytes.
    pub bytes: f64,
    pub threads: usize,
    pub learners: Vec<LearnerCost>,
}

/// The points from the heaviest model to the lightest (H·S·A, then
/// transition entries).
fn by_weight(points: &[Arc<Point>]) -> Vec<usize> {
    let mut order: Vec<usize> = (0..points.len()).collect();
    order.sort_by_key(|&i| {
        let m = &points[i].exp.model;
        std::cmp::Reverse((m.horizon() * m.n_states() * m.n_actions(), m.entries()))
    });
    order
}

/// What calibration measured: seconds per episode of each learner at each
/// point (None: a guest learner, or not measured before the deadline).
#[derive(Debug, Clone, PartialEq)]
pub struct Calibration {
    pub per_point: Vec<Vec<Option<f64>>>,
    /// Each learner at the heaviest point, for the front ends to show.
    pub learners: Vec<LearnerCost>,
}

/// Times each built-in learner on its first run at each point, heaviest
/// point first: a chunk of 1 episode, then 2, 4, … until `per_run` seconds
/// of `now()` have passed or the run is done. Guest learners are not
/// started. Once `stop()` (the front end's deadline) says so, the rest is
/// left unmeasured; [`estimate`] then counts each such pair at its cost at
/// the nearest heavier point measured.
pub fn calibrate(
    points: &[Arc<Point>],
    now: &dyn Fn() -> f64,
    per_run: f64,
    stop: &dyn Fn() -> bool,
) -> Calibration {
    calibrate_keeping(points, now, per_run, stop).0
}

/// The first run of learner `li` at a point: the run calibration times.
pub fn calibration_run(points: &[Arc<Point>], li: usize) -> usize {
    li * points[0].exp.seeds as usize
}

/// A run calibration timed, with its (point, run index).
pub type TimedRun = ((usize, usize), super::Run);

/// [`calibrate`], keeping the runs it timed as they are, `((point, run
/// index), run)`: a run continued from there gives the bits the same run
/// started afresh gives, so a front end that goes on to run the experiment
/// loses none of the calibration's episodes.
pub fn calibrate_keeping(
    points: &[Arc<Point>],
    now: &dyn Fn() -> f64,
    per_run: f64,
    stop: &dyn Fn() -> bool,
) -> (Calibration, Vec<TimedRun>) {
    let learners = points[0].exp.learners.len();
    let mut per_point = vec![vec![None; learners]; points.len()];
    let mut shown = Vec::new();
    let mut runs = Vec::new();
    for (rank, &p) in by_weight(points).iter().enumerate() {
        let ctx = &points[p];
        for (li, spec) in ctx.exp.learners.iter().enumerate() {
            let mut cost = LearnerCost {
                label: spec.label.clone(),
                seconds_per_episode: None,
                episodes: 0,
            };
            if spec.guest().is_none() && !stop() {
                let index = calibration_run(points, li);
                let mut run = super::Run::new(Arc::clone(ctx), index);
                let start = now();
                let mut chunk = 1;
                loop {
                    let before = run.episodes_done();
                    let finished = run.advance(chunk).unwrap_or(true);
                    cost.episodes += run.episodes_done() - before;
                    let spent = now() - start;
                    if finished || spent >= per_run || stop() {
                        if cost.episodes > 0 {
                            cost.seconds_per_episode = Some(spent.max(0.0) / cost.episodes as f64);
                        }
                        break;
                    }
                    chunk *= 2;
                }
                runs.push(((p, index), run));
            }
            per_point[p][li] = cost.seconds_per_episode;
            if rank == 0 {
                shown.push(cost);
            }
        }
    }
    let cal = Calibration {
        per_point,
        learners: shown,
    };
    (cal, runs)
}

/// The least time a variate takes to draw (an exponential or a gamma):
/// a few nanoseconds on current machines (BENCHMARKS.md's PSRL rows), so
/// one nanosecond is a floor.
const DRAW_SECONDS: f64 = 1e-9;

/// A floor on a built-in learner's seconds per episode from the model's
/// size alone, where its cost is dominated by draws it must make: PSRL
/// samples every row of its model each episode, H·S·A rows of S draws
/// (src/learn/psrl.rs). None for the others. On a 100 000-state model one
/// such episode outlasted calibration and the run started anyway (#35).
pub fn floor_seconds_per_episode(c: &Point, li: usize) -> Option<f64> {
    let a = c.exp.learners[li].builtin()?;
    let m = &c.exp.model;
    let (h, s, na) = (
        m.horizon() as f64,
        m.n_states() as f64,
        m.n_actions() as f64,
    );
    (a.key() == "psrl").then_some(h * s * s * na * DRAW_SECONDS)
}

/// The time and memory of the runs `jobs` ((point, run) pairs, as
/// [`super::shard_jobs`] gives them) on `threads` threads, from the
/// learners' measured costs.
pub fn estimate(
    points: &[Arc<Point>],
    jobs: &[(usize, usize)],
    cal: &Calibration,
    threads: usize,
) -> Estimate {
    let threads = threads.clamp(1, jobs.len().max(1));
    // An unmeasured pair costs what the nearest heavier point measured.
    let order = by_weight(points);
    let cost = |p: usize, li: usize| -> Option<f64> {
        let rank = order.iter().position(|&q| q == p)?;
        order[..=rank]
            .iter()
            .rev()
            .find_map(|&q| cal.per_point.get(q)?.get(li).copied().flatten())
    };
    let mut total = 0.0f64;
    let mut longest = 0.0f64;
    let mut at_least = false;
    let mut records = 0.0f64;
    for &(p, i) in jobs {
        let e = &points[p].exp;
        let li = i / e.seeds as usize;
        match cost(p, li) {
            Some(c) => {
                let t = c * e.episodes as f64;
                total += t;
                longest = longest.max(t);
            }
            None => at_least = true,
        }
        records += record_bytes(&points[p]);
    }
    // The models of every point stay in memory, and one learner's state
    // per thread at the heaviest point.
    let models: f64 = points.iter().map(|c| model_bytes(c)).sum();
    let learner = points
        .iter()
        .map(|c| learner_bytes(c))
        .fold(0.0f64, f64::max);
    Estimate {
        seconds: (total / threads as f64).max(longest),
        at_least,
        bytes: BASE_BYTES + models + records + threads as f64 * learner,
        threads,
        learners: cal.learners.clone(),
    }
}

/// The program itself (the CLI's resident size before it reads a file,
/// measured on Linux; the page's wasm memory starts near it too).
const BASE_BYTES: f64 = 4e6;

/// What a point's model, sampler and solution hold: 12 bytes per
/// transition entry in the model, as many again in the alias tables and
/// the file's text or generator, and several doubles per (h, s, a) (Q*,
/// V*, gaps, rewards and their means).
fn model_bytes(c: &Point) -> f64 {
    let m = &c.exp.model;
    let cells = (m.horizon() * m.n_states() * m.n_actions()) as f64;
    32.0 * m.entries() as f64 + 64.0 * cells
}

/// One finished run's record: three curves at the checkpoints, counts per
/// ε target, visits per (h, s) and, with `decompose`, regret per (h, s, a).
fn record_bytes(c: &Point) -> f64 {
    let m = &c.exp.model;
    let hs = (m.horizon() * m.n_states()) as f64;
    let cells = if c.exp.decompose {
        hs * m.n_actions() as f64
    } else {
        0.0
    };
    200.0
        + 24.0 * c.checkpoints.len() as f64
        + 24.0 * c.exp.eps_targets.len() as f64
        + 8.0 * (hs + cells)
}

/// A learner's state at its largest: per (h, s, a) its counts and
/// estimates (about 100 bytes, the next states it has seen growing up to
/// one entry per step run), its plan, and the evaluator's tables. A guest
/// learner's is its largest batch (at most
/// [`MAX_BATCH_STEPS`](crate::learn::MAX_BATCH_STEPS) steps, 24 bytes each
/// held, and up to three messages of a process's protocol being built,
/// waiting and written, [`MAX_STEP_TEXT`](crate::learn::MAX_STEP_TEXT)
/// bytes a step) beside its policy (an answer's text and its table, within
/// the 100 bytes a cell).
fn learner_bytes(c: &Point) -> f64 {
    use crate::learn::{MAX_BATCH_STEPS, MAX_STEP_TEXT};
    let m = &c.exp.model;
    let cells = (m.horizon() * m.n_states() * m.n_actions()) as f64;
    let steps_run = c.exp.episodes as f64 * m.horizon() as f64;
    let seen = (m.entries() as f64).min(steps_run);
    let own = 100.0 * cells + 8.0 * seen + 16.0 * m.n_states() as f64;
    if c.exp.learners.iter().any(|l| l.guest().is_some()) {
        let batch = (MAX_BATCH_STEPS as f64).min(steps_run);
        own.max(100.0 * cells + batch * (24.0 + 3.0 * MAX_STEP_TEXT as f64))
    } else {
        own
    }
}

/// A duration as people say it: "40 s", "12 min", "3 h 20 min", "5 days".
pub fn duration_words(seconds: f64) -> String {
    let s = seconds.max(0.0);
    if s < 1.0 {
        "under a second".into()
    } else if s < 90.0 {
        format!("{:.0} s", s)
    } else if s < 90.0 * 60.0 {
        format!("{:.0} min", s / 60.0)
    } else if s < 48.0 * 3600.0 {
        let h = (s / 3600.0).floor();
        let min = ((s - h * 3600.0) / 60.0).round();
        format!("{h:.0} h {min:.0} min")
    } else if s < 3.0 * 365.0 * 86400.0 {
        format!("{:.0} days", s / 86400.0)
    } else {
        format!("{:.0} years", s / (365.0 * 86400.0))
    }
}

/// A size as people say it: "640 kB", "12 MB", "3.4 GB".
pub fn bytes_words(bytes: f64) -> String {
    let b = bytes.max(0.0);
    if b < 1e6 {
        format!("{:.0} kB", (b / 1e3).max(1.0))
    } else if b < 1e9 {
        format!("{:.0} MB", b / 1e6)
    } else {
        format!("{:.1} GB", b / 1e9)
    }
}

impl Estimate {
    /// One line for a person: "about 12 min on 2 threads, peak memory about 40 MB".
    pub fn words(&self) -> String {
        self.words_with("thread")
    }

    /// [`Estimate::words`] naming what runs in parallel ("worker" in the page).
    pub fn words_with(&self, unit: &str) -> String {
        format!(
            "{}{} on {} {unit}{}, peak memory about {}",
            if self.at_least {
                "at least "
            } else if self.seconds < 1.0 {
                ""
            } else {
                "about "
            },
            duration_words(self.seconds),
            self.threads,
            if self.threads == 1 { "" } else { "s" },
            bytes_words(self.bytes)
        )
    }
}

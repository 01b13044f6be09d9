//! Running an experiment, once for every front end: the runs of an
//! experiment (or of one shard of it) are planned, timed, estimated,
//! checked against a budget, scheduled on the front end's threads with the
//! timed runs continued, reported on as they go, stopped on a cancel, and
//! handed back as records or as the reason they stopped.
//!
//! The core touches no clock and no thread: the front end passes its clock
//! ([`Clock`]), its threads ([`Pool`]) and what it does with progress and
//! cancels ([`Watch`]). `burnin run` passes `Instant` and scoped
//! `std::thread`s ([`Runner::run`]); the page's workers each step one lane
//! of the plan ([`Runner::lanes`], [`Runner::into_queue`]), because a worker
//! must return to its event loop between slices, and the page asks the
//! runner for its estimate and budget decision before it starts
//! ([`Runner::estimate_here`], [`Runner::late_estimate`], [`Budget::allows`]).

use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
use std::sync::{Arc, Mutex};

use super::estimate::{Calibration, Estimate, TimedRun, calibrate_keeping, calibration_run};
use super::{
    Experiment, Output, Point, Run, RunFault, RunQueue, RunRecord, ShardFile, assemble, shard_jobs,
};
use crate::learn::Guests;

/// The front end's clock: seconds since any fixed origin.
pub trait Clock: Send + Sync {
    fn seconds(&self) -> f64;
}

impl<F: Fn() -> f64 + Send + Sync> Clock for F {
    fn seconds(&self) -> f64 {
        self()
    }
}

/// The front end's threads.
pub trait Pool: Sync {
    /// Calls `work(lane)` for every lane in `0..lanes`, each on a thread of
    /// its own, and returns when every call has returned.
    fn scope(&self, lanes: usize, work: &(dyn Fn(usize) + Sync));
    /// Calls `work` on a thread of its own and waits at most `seconds` for
    /// it to return (past that it is left to finish on its own).
    fn within(&self, seconds: f64, work: Box<dyn FnOnce() + Send>);
    /// Lets a lane that has nothing to do yet wait a moment (a millisecond
    /// or so) before it looks again.
    fn rest(&self);
}

/// What a front end hears of a run as it goes, and how it stops one. Called
/// from any of the pool's threads.
pub trait Watch: Sync {
    /// `done` of the run's `total` episodes are done.
    fn progress(&self, done: u64, total: u64);
    /// The estimate, once the run has been timed, when it is long enough to
    /// be worth saying ([`SAY_ESTIMATE_SECONDS`]) and within the budget.
    fn estimated(&self, _estimate: &Estimate) {}
    /// Whether the front end wants the run stopped; asked between chunks.
    fn cancelled(&self) -> bool {
        false
    }
}

/// How long calibration may take: `total` seconds shared over every
/// (point, learner) pair (each gets 0.01 to 0.1 s), and a `deadline` after
/// which the pairs not reached are left unmeasured (counted at their
/// nearest heavier point's cost). One episode may outlast the deadline, so
/// a front end waits a while longer and then estimates without the
/// calibration ([`Runner::late_estimate`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Limits {
    pub total: f64,
    pub deadline: f64,
}

/// Calibration while the run starts (`burnin run`): the other threads take
/// the other runs meanwhile and the timed runs are continued, so it may
/// take longer.
pub const WHILE_RUNNING: Limits = Limits {
    total: 1.0,
    deadline: 2.0,
};

/// How long [`Runner::run`] and [`Runner::estimate`] wait for a
/// [`WHILE_RUNNING`] calibration: its deadline and a second.
pub const CALIBRATION_WAIT: f64 = 3.0;

/// Calibration before the run starts (the page asks first and runs in its
/// workers afterwards): nothing runs meanwhile, so it is kept short. The
/// page's own wait for it is `compute.js`'s.
pub const BEFORE_RUNNING: Limits = Limits {
    total: 0.5,
    deadline: 1.0,
};

/// A run estimated to take at least this long says its estimate as it starts.
pub const SAY_ESTIMATE_SECONDS: f64 = 10.0;

/// Episodes a lane runs between looks at the progress, a cancel and a stop.
const CHUNK: u64 = 512;

/// What a run may take.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Budget {
    /// Run without estimating first.
    Unchecked,
    /// Refuse a run estimated over `seconds`, or, when the front end can
    /// tell the free memory, needing more than `free_bytes`.
    Within {
        seconds: f64,
        free_bytes: Option<f64>,
    },
}

impl Budget {
    /// Whether a run of estimate `e` is within the budget (time only: the
    /// memory is checked from sizes before anything runs).
    pub fn allows(&self, e: &Estimate) -> bool {
        match *self {
            Budget::Unchecked => true,
            Budget::Within { seconds, .. } => e.seconds <= seconds,
        }
    }
}

/// Why a run stopped before its end: nothing of it is kept.
#[derive(Debug, Clone, PartialEq)]
pub enum Stopped {
    /// Estimated over the budget's time (the estimate and the budget in seconds).
    OverTime { estimate: Estimate, budget: f64 },
    /// Estimated to need more memory than is free (bytes).
    OverMemory { needed: f64, free: f64 },
    /// A guest learner failed.
    Fault(RunFault),
    /// The front end cancelled it after `done` of `total` episodes.
    Cancelled { done: u64, total: u64 },
}

/// The runs of one experiment (or one shard of it) on a number of threads.
pub struct Runner {
    exp: Experiment,
    points: Vec<Arc<Point>>,
    /// Shard index (0-based) and count.
    shard: (usize, usize),
    /// (point, run index) in order.
    jobs: Vec<(usize, usize)>,
    threads: usize,
}

impl Runner {
    /// Plans shard `shard.0` (0-based) of `shard.1` of `exp`'s runs (every
    /// point of a sweep: they share one pool) on `threads` threads, at
    /// most one per run; `guests` starts its guest learners.
    pub fn new(
        exp: Experiment,
        guests: Option<&Guests>,
        shard: (usize, usize),
        threads: usize,
    ) -> Runner {
        let points = Point::all(&exp, guests);
        let jobs = shard_jobs(&points, shard.0, shard.1);
        let threads = threads.clamp(1, jobs.len().max(1));
        Runner {
            exp,
            points,
            shard,
            jobs,
            threads,
        }
    }

    pub fn experiment(&self) -> &Experiment {
        &self.exp
    }

    /// The experiment's points (one per sweep value).
    pub fn points(&self) -> &[Arc<Point>] {
        &self.points
    }

    /// Threads the runs go on (the threads asked for, at most one per run).
    pub fn threads(&self) -> usize {
        self.threads
    }

    /// Episodes of every run of the plan.
    pub fn total_episodes(&self) -> u64 {
        self.jobs
            .iter()
            .map(|&(p, _)| self.points[p].exp.episodes)
            .sum()
    }

    /// The lanes of a pool of `workers` workers that each step their own
    /// runs (the page's), read from the experiment alone (no model is
    /// solved): lane i runs shard i of as many lanes as there are, at most
    /// one per run ([`Runner::into_queue`] of that shard), and the core
    /// merges their shards into what one lane gives.
    pub fn lanes(exp: &Experiment, workers: usize) -> Vec<(usize, usize)> {
        let points = exp.sweep.as_ref().map_or(1, |s| s.values.len());
        let runs = points * exp.learners.len() * exp.seeds as usize;
        let n = workers.clamp(1, runs.max(1));
        (0..n).map(|i| (i, n)).collect()
    }

    /// The plan as one lane's steppable queue (`threads` aside): what a
    /// page's worker steps, in slices, between looks at its messages.
    pub fn into_queue(self) -> RunQueue {
        RunQueue::planned(self.exp, self.points, self.jobs)
    }

    /// Times each built-in learner on its first run at each point within
    /// `limits`, with `now` from the front end (and `stop` as a further
    /// reason to end early), keeping the runs it timed.
    fn calibrate(
        &self,
        clock: &dyn Clock,
        limits: &Limits,
        stop: &dyn Fn() -> bool,
    ) -> (Calibration, Vec<TimedRun>) {
        calibrate_points(&self.points, clock, limits, stop)
    }

    /// The estimate from a calibration.
    pub fn estimate_from(&self, cal: &Calibration) -> Estimate {
        super::estimate(&self.points, &self.jobs, cal, self.threads)
    }

    /// The estimate when calibration outlasted the front end's wait, after
    /// `spent` seconds: every learner counted at `spent` seconds an episode,
    /// a lower bound for the one being timed ("at least").
    pub fn late_estimate(&self, spent: f64) -> Estimate {
        let n = self.exp.learners.len();
        let cal = Calibration {
            per_point: vec![vec![Some(spent); n]; self.points.len()],
            learners: Vec::new(),
        };
        let mut e = self.estimate_from(&cal);
        e.at_least = true;
        e
    }

    /// A floor on the run's time from the models' sizes alone (nothing is
    /// timed): the learners whose episodes must make a number of draws set
    /// by the model ([`super::estimate::floor_seconds_per_episode`]); the
    /// others count nothing.
    pub fn floor_estimate(&self) -> Estimate {
        let per_point = self
            .points
            .iter()
            .map(|c| {
                (0..c.exp.learners.len())
                    .map(|li| super::estimate::floor_seconds_per_episode(c, li))
                    .collect()
            })
            .collect();
        let mut e = self.estimate_from(&Calibration {
            per_point,
            learners: Vec::new(),
        });
        e.at_least = true;
        e
    }

    /// The memory the run will need, counted from sizes (nothing is timed).
    pub fn memory_needed(&self) -> f64 {
        let unmeasured = Calibration {
            per_point: vec![Vec::new(); self.points.len()],
            learners: Vec::new(),
        };
        self.estimate_from(&unmeasured).bytes
    }

    /// The estimate, timing the learners here and now with the
    /// [`BEFORE_RUNNING`] limits (the page's worker, which runs nothing
    /// else meanwhile; a front end that stops waiting for it asks for
    /// [`Runner::late_estimate`]).
    pub fn estimate_here(&self, clock: &dyn Clock) -> Estimate {
        self.estimate_from(&self.calibrate(clock, &BEFORE_RUNNING, &|| false).0)
    }

    /// The estimate, timing the learners on a thread of the pool with the
    /// [`WHILE_RUNNING`] limits (`burnin run --estimate`): what
    /// [`Runner::run`] would decide on, and nothing runs after it.
    pub fn estimate(&self, clock: Arc<dyn Clock>, pool: &dyn Pool) -> Estimate {
        let slot = Arc::new(Mutex::new(None));
        let (points, out, c) = (self.points.clone(), Arc::clone(&slot), Arc::clone(&clock));
        let start = clock.seconds();
        pool.within(
            CALIBRATION_WAIT,
            Box::new(move || {
                let cal = calibrate_points(&points, &*c, &WHILE_RUNNING, &|| false).0;
                *out.lock().unwrap_or_else(|e| e.into_inner()) = Some(cal);
            }),
        );
        let cal = slot.lock().unwrap_or_else(|e| e.into_inner()).take();
        match cal {
            Some(cal) => self.estimate_from(&cal),
            None => self.late_estimate(clock.seconds() - start),
        }
    }

    /// Runs every run of the plan on the pool's threads and hands back the
    /// records, (point, record) in job order.
    ///
    /// Within a budget, the memory is checked from sizes first; then one
    /// lane times each learner's first run while the others start on the
    /// rest, and the timed runs are continued, not started again (a run
    /// continued gives the bits of a run started afresh); one more lane
    /// waits for the calibration (at most [`CALIBRATION_WAIT`]) and
    /// stops everything when the estimate is over the budget.
    pub fn run(
        &self,
        budget: &Budget,
        clock: &dyn Clock,
        pool: &dyn Pool,
        watch: &dyn Watch,
    ) -> Result<Vec<(usize, RunRecord)>, Stopped> {
        if let Budget::Within {
            free_bytes: Some(free),
            ..
        } = *budget
        {
            let needed = self.memory_needed();
            if needed > free {
                return Err(Stopped::OverMemory { needed, free });
            }
        }
        if let Budget::Within { seconds, .. } = *budget {
            // Refused before anything starts when the models' sizes alone
            // put the run over the budget (#35).
            let floor = self.floor_estimate();
            if floor.seconds > seconds {
                return Err(Stopped::OverTime {
                    estimate: floor,
                    budget: seconds,
                });
            }
        }
        let s = Schedule::new(self, budget, clock, pool, watch);
        let calibrates = s.calibrating.load(Ordering::Relaxed);
        let workers = self.threads;
        pool.scope(workers + usize::from(calibrates), &|lane| match lane {
            0 if calibrates => s.calibrate_then_work(),
            l if l == workers => s.decide(),
            _ => s.work(),
        });
        s.finish()
    }

    /// The results of the whole experiment from the records [`Runner::run`]
    /// gave (an unsharded plan).
    pub fn output(&self, records: Vec<(usize, RunRecord)>) -> Output {
        let mut by_point = vec![Vec::new(); self.points.len()];
        for (p, r) in records {
            by_point[p].push(r);
        }
        assemble(&self.exp, &self.points, by_point)
    }

    /// The shard file of the records [`Runner::run`] gave: `text` is the
    /// experiment file's text, `model` the text of the model it names.
    pub fn shard_file(
        &self,
        text: String,
        model: Option<String>,
        records: Vec<(usize, RunRecord)>,
    ) -> ShardFile {
        ShardFile::new(
            self.shard.0,
            self.shard.1,
            text,
            model,
            &self.points,
            records,
        )
    }

    /// Whether job (point, run) is one calibration times.
    fn calibrated(&self, p: usize, i: usize) -> bool {
        let e = &self.points[p].exp;
        let li = i / e.seeds as usize;
        e.learners[li].guest().is_none() && i == calibration_run(&self.points, li)
    }
}

/// [`calibrate_keeping`] within `limits`.
fn calibrate_points(
    points: &[Arc<Point>],
    clock: &dyn Clock,
    limits: &Limits,
    stop: &dyn Fn() -> bool,
) -> (Calibration, Vec<TimedRun>) {
    let pairs = points.len() * points[0].exp.learners.len();
    let per_run = (limits.total / pairs as f64).clamp(0.01, 0.1);
    let start = clock.seconds();
    let now = || clock.seconds() - start;
    let over = || now() > limits.deadline || stop();
    calibrate_keeping(points, &now, per_run, &over)
}

/// A run a lane works on: (job number, point, run).
type Taken = (usize, usize, Run);

/// The state the lanes of [`Runner::run`] share.
struct Schedule<'a> {
    runner: &'a Runner,
    budget: &'a Budget,
    clock: &'a dyn Clock,
    pool: &'a dyn Pool,
    watch: &'a dyn Watch,
    /// The jobs calibration times, set aside for it.
    reserved: Vec<bool>,
    /// Whether calibration may still hand runs over.
    calibrating: AtomicBool,
    /// What calibration measured, for the deciding lane.
    calibration: Mutex<Option<Calibration>>,
    /// Runs calibration timed and handed over, to be continued.
    started: Mutex<Vec<Taken>>,
    next: AtomicUsize,
    done: AtomicU64,
    total: u64,
    records: Mutex<Vec<(usize, usize, RunRecord)>>,
    stop: AtomicBool,
    refused: Mutex<Option<Stopped>>,
    fault: Mutex<Option<RunFault>>,
    cancelled: AtomicBool,
    start: f64,
}

/// A lock that a panicking lane poisoned still holds good data here
/// (every update is a single push or assignment).
fn lock<T>(m: &Mutex<T>) -> std::sync::MutexGuard<'_, T> {
    m.lock().unwrap_or_else(|e| e.into_inner())
}

impl<'a> Schedule<'a> {
    fn new(
        runner: &'a Runner,
        budget: &'a Budget,
        clock: &'a dyn Clock,
        pool: &'a dyn Pool,
        watch: &'a dyn Watch,
    ) -> Schedule<'a> {
        let timed = matches!(budget, Budget::Within { .. });
        let reserved: Vec<bool> = runner
            .jobs
            .iter()
            .map(|&(p, i)| timed && runner.calibrated(p, i))
            .collect();
        Schedule {
            calibrating: AtomicBool::new(reserved.iter().any(|&r| r)),
            reserved,
            calibration: Mutex::new(None),
            started: Mutex::new(Vec::new()),
            next: AtomicUsize::new(0),
            done: AtomicU64::new(0),
            total: runner.total_episodes(),
            records: Mutex::new(Vec::with_capacity(runner.jobs.len())),
            stop: AtomicBool::new(false),
            refused: Mutex::new(None),
            fault: Mutex::new(None),
            cancelled: AtomicBool::new(false),
            start: clock.seconds(),
            runner,
            budget,
            clock,
            pool,
            watch,
        }
    }

    fn stopping(&self) -> bool {
        self.stop.load(Ordering::Relaxed)
    }

    /// Counts `step` more episodes done and tells the front end.
    fn count(&self, step: u64) {
        let done = self.done.fetch_add(step, Ordering::Relaxed) + step;
        self.watch.progress(done, self.total);
    }

    /// The next run to work on: one calibration started or set aside, else
    /// a job nobody has taken; None when there is none left (waiting while
    /// calibration may still hand runs over).
    fn take(&self) -> Option<Taken> {
        let (jobs, points) = (&self.runner.jobs, &self.runner.points);
        loop {
            if let Some(r) = lock(&self.started).pop() {
                return Some(r);
            }
            loop {
                let j = self.next.fetch_add(1, Ordering::Relaxed);
                let Some(&(p, i)) = jobs.get(j) else { break };
                if !self.reserved[j] {
                    return Some((j, p, Run::new(Arc::clone(&points[p]), i)));
                }
            }
            // No fresh job left: wait for the runs calibration hands over.
            if !self.calibrating.load(Ordering::Acquire) {
                return lock(&self.started).pop();
            }
            if self.stopping() {
                return None;
            }
            self.pool.rest();
        }
    }

    /// A worker lane: takes runs and steps them to their end in chunks,
    /// until none is left or the run is stopping.
    fn work(&self) {
        'jobs: while !self.stopping() {
            let Some((j, p, mut r)) = self.take() else {
                break;
            };
            loop {
                if self.watch.cancelled() {
                    self.cancelled.store(true, Ordering::Relaxed);
                    self.stop.store(true, Ordering::Relaxed);
                }
                if self.stopping() {
                    break 'jobs;
                }
                let before = r.episodes_done();
                let finished = match r.advance(CHUNK) {
                    Ok(f) => f,
                    Err(f) => {
                        self.stop.store(true, Ordering::Relaxed);
                        lock(&self.fault).get_or_insert(f);
                        break 'jobs;
                    }
                };
                self.count(r.episodes_done() - before);
                if finished {
                    break;
                }
            }
            lock(&self.records).push((j, p, r.finish()));
        }
    }

    /// The calibrating lane: times the learners, hands the calibration to
    /// the deciding lane and the timed runs to the workers, then works.
    fn calibrate_then_work(&self) {
        let runner = self.runner;
        let stop = || self.stopping();
        let (cal, mut timed) = runner.calibrate(self.clock, &WHILE_RUNNING, &stop);
        *lock(&self.calibration) = Some(cal);
        let mut mine = Vec::new();
        for (j, &(p, i)) in runner.jobs.iter().enumerate() {
            if !self.reserved[j] {
                continue;
            }
            let run = match timed.iter().position(|(k, _)| *k == (p, i)) {
                Some(at) => timed.swap_remove(at).1,
                // Not reached before the deadline.
                None => Run::new(Arc::clone(&runner.points[p]), i),
            };
            self.count(run.episodes_done());
            mine.push((j, p, run));
        }
        lock(&self.started).extend(mine);
        self.calibrating.store(false, Ordering::Release);
        self.work();
    }

    /// The deciding lane: waits for the calibration (at most
    /// [`CALIBRATION_WAIT`]), estimates, and stops the run when the
    /// estimate is over the budget.
    fn decide(&self) {
        let e = loop {
            if let Some(cal) = lock(&self.calibration).take() {
                break self.runner.estimate_from(&cal);
            }
            let spent = self.clock.seconds() - self.start;
            if spent > CALIBRATION_WAIT {
                break self.runner.late_estimate(spent);
            }
            if self.stopping() {
                return;
            }
            self.pool.rest();
        };
        match *self.budget {
            Budget::Within { seconds, .. } if !self.budget.allows(&e) => {
                self.stop.store(true, Ordering::Relaxed);
                *lock(&self.refused) = Some(Stopped::OverTime {
                    estimate: e,
                    budget: seconds,
                });
            }
            _ if e.seconds >= SAY_ESTIMATE_SECONDS => self.watch.estimated(&e),
            _ => {}
        }
    }

    /// The records in job order, or why the run stopped (a refusal first,
    /// then a guest's failure, then a cancel).
    fn finish(self) -> Result<Vec<(usize, RunRecord)>, Stopped> {
        if let Some(s) = self.refused.into_inner().unwrap_or_else(|e| e.into_inner()) {
            return Err(s);
        }
        if let Some(f) = self.fault.into_inner().unwrap_or_else(|e| e.into_inner()) {
            return Err(Stopped::Fault(f));
        }
        if self.cancelled.load(Ordering::Relaxed) {
            return Err(Stopped::Cancelled {
                done: self.done.load(Ordering::Relaxed),
                total: self.total,
            });
        }
        let mut records = self.records.into_inner().unwrap_or_else(|e| e.into_inner());
        records.sort_by_key(|r| r.0);
        Ok(records.into_iter().map(|(_, p, r)| (p, r)).collect())
    }
}

//! The core's runner (src/experiment/runner.rs), driven as a front end
//! drives it: std threads for its pool (`burnin::native`, as `burnin run`
//! gives them), a clock made up for the test. What
//! it gives is checked against the runs done one after another
//! (`run_all`): runs are independent and each draws only from its own
//! seeded generator, so the order and the threads they ran on change no
//! number (the project's reproducibility rule, docs/formats.md). The
//! estimates are checked against the arithmetic of `estimate`, worked out
//! by hand from the clock given.

use std::sync::Arc;
use std::sync::atomic::{AtomicU64, AtomicUsize, Ordering};

use serde_json::{Value, json};

use burnin::experiment::{
    Budget, Estimate, Experiment, Point, Pool, RunQueue, Runner, SAY_ESTIMATE_SECONDS, Stopped,
    Watch, assemble, merge, parse_experiment, run_all,
};
use burnin::learn::{Guest, GuestIntro, Guests};
use burnin::native::Threads;

/// A sweep over two model sizes, three learners (one of them a planner) and
/// three seeds: 18 runs.
fn sweep(episodes: u64) -> Value {
    json!({"format": "burnin-experiment", "version": 1, "episodes": episodes, "seeds": 3, "seed": 4,
           "generator": {"kind": "random", "states": 5, "actions": 3, "successors": 2, "horizon": 4},
           "sweep": {"parameter": "states", "values": [3, 6]},
           "learners": [{"algorithm": "mvp"}, {"algorithm": "eps-greedy", "epsilon": 0.1},
                        {"algorithm": "uniform"}]})
}

fn experiment(v: &Value) -> Experiment {
    parse_experiment(&v.to_string(), None).expect("a valid experiment")
}

/// The results of every run done one after another.
fn one_after_another(exp: &Experiment) -> String {
    let points = Point::all(exp, None);
    let records = points.iter().map(run_all).collect();
    assemble(exp, &points, records).to_json()
}

/// A clock that moves `step` seconds each time it is read.
fn ticking(step: f64) -> impl Fn() -> f64 + Send + Sync + Clone {
    let reads = Arc::new(AtomicU64::new(0));
    move || reads.fetch_add(1, Ordering::Relaxed) as f64 * step
}

/// What the runner told: the last progress, the estimates said, and a
/// cancel once `cancel_at` episodes are done.
#[derive(Default)]
struct Heard {
    done: AtomicU64,
    total: AtomicU64,
    said: std::sync::Mutex<Vec<Estimate>>,
    cancel_at: Option<u64>,
}

impl Watch for Heard {
    fn progress(&self, done: u64, total: u64) {
        self.done.fetch_max(done, Ordering::Relaxed);
        self.total.store(total, Ordering::Relaxed);
    }
    fn estimated(&self, e: &Estimate) {
        self.said.lock().unwrap().push(e.clone());
    }
    fn cancelled(&self) -> bool {
        self.cancel_at
            .is_some_and(|n| self.done.load(Ordering::Relaxed) >= n)
    }
}

const GENEROUS: Budget = Budget::Within {
    seconds: 1e300,
    free_bytes: None,
};

/// Any thread count, with and without calibration first (whose timed runs
/// are continued), gives the bytes of the runs done one after another;
/// progress ends at every episode.
#[test]
fn the_runner_gives_the_results_of_the_runs_done_one_after_another() {
    let exp = experiment(&sweep(700));
    let want = one_after_another(&exp);
    for threads in [1, 2, 3, 64] {
        for budget in [Budget::Unchecked, GENEROUS] {
            let runner = Runner::new(exp.clone(), None, (0, 1), threads);
            assert_eq!(
                runner.threads(),
                threads.min(18),
                "at most one thread per run"
            );
            let heard = Heard::default();
            let clock = ticking(1e-6);
            let records = runner
                .run(&budget, &clock, &Threads, &heard)
                .unwrap_or_else(|s| panic!("{threads} threads, {budget:?}: stopped: {s:?}"));
            assert_eq!(
                runner.output(records).to_json(),
                want,
                "{threads} threads, {budget:?}"
            );
            let total = 18 * 700;
            assert_eq!(heard.done.load(Ordering::Relaxed), total);
            assert_eq!(heard.total.load(Ordering::Relaxed), total);
        }
    }
}

/// The shards of a run, each run by the runner and merged by the core,
/// give the whole run's results (what `burnin run --shard` and `burnin
/// merge` do).
#[test]
fn shards_run_by_the_runner_merge_into_the_whole() {
    let v = sweep(300);
    let exp = experiment(&v);
    let text = v.to_string();
    let files: Vec<_> = (0..4)
        .map(|i| {
            let runner = Runner::new(exp.clone(), None, (i, 4), 2);
            let records = runner
                .run(&GENEROUS, &ticking(1e-6), &Threads, &Heard::default())
                .unwrap();
            runner.shard_file(text.clone(), None, records)
        })
        .collect();
    let merged = merge(&files, &|i| format!("shard {}", i + 1)).unwrap();
    assert_eq!(merged.to_json(), one_after_another(&exp));
}

/// The page's plan: one lane per worker, never more lanes than runs; each
/// lane's queue, stepped as a worker steps it, merges into the whole.
#[test]
fn the_pages_lanes_merge_into_the_whole() {
    let one_seed = json!({"format": "burnin-experiment", "version": 1, "episodes": 50, "seeds": 2,
        "generator": {"kind": "river", "states": 4, "horizon": 5}, "learners": [{"algorithm": "uniform"}]});
    assert_eq!(
        Runner::lanes(&experiment(&one_seed), 8),
        vec![(0, 2), (1, 2)],
        "two runs, two lanes"
    );
    let v = sweep(200);
    let exp = experiment(&v);
    let lanes = Runner::lanes(&exp, 5);
    assert_eq!(lanes, (0..5).map(|i| (i, 5)).collect::<Vec<_>>());
    let files: Vec<_> = lanes
        .iter()
        .map(|&lane| {
            let mut q: RunQueue = Runner::new(exp.clone(), None, lane, 1).into_queue();
            while !q.advance(64) {}
            burnin::experiment::ShardFile::new(
                lane.0,
                lane.1,
                v.to_string(),
                None,
                q.points(),
                q.records(),
            )
        })
        .collect();
    let merged = merge(&files, &|i| format!("lane {}", i + 1)).unwrap();
    assert_eq!(merged.to_json(), one_after_another(&exp));
}

/// A clock that reads a second later each time makes every episode cost
/// seconds: the run is refused as over a one-minute budget, with the
/// estimate it was refused on, and nothing else is given back.
#[test]
fn a_run_estimated_over_the_budget_is_refused() {
    let exp = experiment(&sweep(100_000));
    let runner = Runner::new(exp, None, (0, 1), 2);
    let budget = Budget::Within {
        seconds: 60.0,
        free_bytes: None,
    };
    let heard = Heard::default();
    match runner.run(&budget, &ticking(1.0), &Threads, &heard) {
        Err(Stopped::OverTime { estimate, budget }) => {
            assert_eq!(budget, 60.0);
            assert!(estimate.seconds > 60.0, "{estimate:?}");
            assert_eq!(estimate.threads, 2);
        }
        other => panic!("not refused: {:?}", other.map(|r| r.len())),
    }
    assert!(
        heard.said.lock().unwrap().is_empty(),
        "a refused run says no estimate"
    );
    assert!(heard.done.load(Ordering::Relaxed) < 18 * 100_000);
}

/// A run within its budget says its estimate when it is long enough to
/// matter ([`SAY_ESTIMATE_SECONDS`]); one run not timed says none.
#[test]
fn a_long_run_within_its_budget_says_its_estimate() {
    let exp = experiment(&sweep(2000));
    let runner = Runner::new(exp.clone(), None, (0, 1), 2);
    let heard = Heard::default();
    runner
        .run(&GENEROUS, &ticking(1.0), &Threads, &heard)
        .unwrap();
    let said = heard.said.lock().unwrap();
    assert_eq!(said.len(), 1, "said once");
    assert!(said[0].seconds >= SAY_ESTIMATE_SECONDS, "{:?}", said[0]);
    let quiet = Heard::default();
    Runner::new(exp, None, (0, 1), 2)
        .run(&Budget::Unchecked, &ticking(1.0), &Threads, &quiet)
        .unwrap();
    assert!(quiet.said.lock().unwrap().is_empty());
}

/// More memory than is free is refused before anything runs, with the
/// memory counted from sizes.
#[test]
fn a_run_needing_more_memory_than_is_free_is_refused_before_it_starts() {
    let runner = Runner::new(experiment(&sweep(100)), None, (0, 1), 2);
    let heard = Heard::default();
    let budget = Budget::Within {
        seconds: 1e300,
        free_bytes: Some(1e6),
    };
    match runner.run(&budget, &ticking(1e-6), &Threads, &heard) {
        Err(Stopped::OverMemory { needed, free }) => {
            assert_eq!(free, 1e6);
            assert_eq!(needed, runner.memory_needed());
            assert!(needed > 4e6, "the program itself is counted: {needed}");
        }
        other => panic!("not refused: {:?}", other.map(|r| r.len())),
    }
    assert_eq!(heard.done.load(Ordering::Relaxed), 0, "nothing ran");
}

/// A cancel stops every lane within a chunk and gives back no results.
#[test]
fn a_cancel_stops_the_run() {
    let runner = Runner::new(experiment(&sweep(50_000)), None, (0, 1), 2);
    let heard = Heard {
        cancel_at: Some(2000),
        ..Heard::default()
    };
    match runner.run(&Budget::Unchecked, &ticking(1e-6), &Threads, &heard) {
        Err(Stopped::Cancelled { done, total }) => {
            assert_eq!(total, 18 * 50_000);
            assert!((2000..total).contains(&done), "{done} of {total}");
        }
        other => panic!("not cancelled: {:?}", other.map(|r| r.len())),
    }
}

/// A guest learner that fails stops the run, naming it.
#[test]
fn a_failing_guest_stops_the_run() {
    let v = json!({"format": "burnin-experiment", "version": 1, "episodes": 100, "seeds": 2,
        "generator": {"kind": "river", "states": 4, "horizon": 5},
        "learners": [{"algorithm": "uniform"}, {"guest": "broken", "label": "mine"}]});
    let host: Guests = Arc::new(
        |name: &str, _: &GuestIntro| -> Result<Box<dyn Guest>, String> {
            Err(format!("{name} cannot start"))
        },
    );
    let runner = Runner::new(experiment(&v), Some(&host), (0, 1), 2);
    match runner.run(&GENEROUS, &ticking(1e-6), &Threads, &Heard::default()) {
        Err(Stopped::Fault(f)) => {
            assert_eq!((f.learner, f.label.as_str()), (1, "mine"));
            assert!(f.message.contains("broken cannot start"), "{}", f.message);
        }
        other => panic!("not stopped: {:?}", other.map(|r| r.len())),
    }
}

/// When calibration outlasts the wait (a pool whose thread never comes
/// back in time), the estimate counts every episode at the time waited
/// and says "at least": 18 runs × 100 episodes × 3 s over 2 threads
/// (derived by hand).
#[test]
fn an_estimate_whose_calibration_outlasts_the_wait_is_a_lower_bound() {
    struct Late;
    impl Pool for Late {
        fn scope(&self, _: usize, _: &(dyn Fn(usize) + Sync)) {
            unreachable!("an estimate runs nothing")
        }
        fn within(&self, _: f64, _: Box<dyn FnOnce() + Send>) {}
        fn rest(&self) {}
    }
    let runner = Runner::new(experiment(&sweep(100)), None, (0, 1), 2);
    let reads = Arc::new(AtomicUsize::new(0));
    let r = Arc::clone(&reads);
    // Read once before the wait and once after it, 3 s apart.
    let clock = move || 3.0 * r.fetch_add(1, Ordering::Relaxed) as f64;
    let e = runner.estimate(Arc::new(clock), &Late);
    assert!(e.at_least);
    assert_eq!(e.seconds, 18.0 * 100.0 * 3.0 / 2.0);
    assert_eq!(reads.load(Ordering::Relaxed), 2);
    assert_eq!(e, runner.late_estimate(3.0));
    assert!(e.words().starts_with("at least "), "{}", e.words());
}

/// The estimate measured on a pool's thread (`burnin run --estimate`) and
/// in place (the page's worker) from a clock that moves a millisecond each
/// time it is read: calibration reads it at least once per chunk of
/// episodes, so no learner is measured at more than a millisecond an
/// episode, and 18 runs × 100 episodes on 3 threads are estimated at no
/// more than 0.6 s (derived by hand).
#[test]
fn estimates_multiply_the_measured_cost_out_over_the_runs() {
    let runner = Runner::new(experiment(&sweep(100)), None, (0, 1), 3);
    let here = runner.estimate_here(&ticking(1e-3));
    let there = runner.estimate(Arc::new(ticking(1e-3)), &Threads);
    for e in [&here, &there] {
        assert!(!e.at_least);
        assert_eq!(e.threads, 3);
        assert_eq!(e.learners.len(), 3, "each learner at the heaviest point");
        for l in &e.learners {
            let per = l.seconds_per_episode.expect("measured");
            assert!(per > 0.0 && per <= 1e-3 + 1e-12, "{}: {per}", l.label);
        }
        assert!(e.seconds > 0.0 && e.seconds <= 0.6 + 1e-9, "{e:?}");
    }
}

/// A learner the page's watchdog gave up on (its guest never answered) is
/// left out of its lane's results, the fault naming the episode it was to
/// decide for and how long it was silent.
#[test]
fn a_learner_that_gave_no_answer_is_left_out_of_its_lane() {
    let v = json!({"format": "burnin-experiment", "version": 1, "episodes": 40, "seeds": 2,
        "generator": {"kind": "river", "states": 4, "horizon": 5},
        "learners": [{"algorithm": "uniform"}, {"algorithm": "eps-greedy", "label": "slow"}]});
    let exp = experiment(&v);
    let mut q = Runner::new(exp.clone(), None, (0, 1), 1).into_queue();
    q.gave_no_answer(1, 0, 12, 10.4);
    let f = &q.faults()[0];
    assert_eq!(
        (f.learner, f.label.as_str(), f.seed_index, f.episode),
        (1, "slow", 0, 13)
    );
    assert_eq!(
        f.message,
        "gave no answer within 10 s; its worker was stopped"
    );
    while !q.advance(64) {}
    let out = q.output().to_json();
    let r: Value = serde_json::from_str(&out).unwrap();
    let labels: Vec<&str> = r["learners"]
        .as_array()
        .unwrap()
        .iter()
        .map(|l| l["label"].as_str().unwrap())
        .collect();
    assert_eq!(labels, ["uniform"]);
    assert_eq!(r["failed"][0]["label"], "slow");
}

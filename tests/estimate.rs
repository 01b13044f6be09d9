//! The run estimate (#11, class 8): what `burnin run` says a run will take
//! is within a factor of 3 of what it then takes, and a run over the
//! budget is refused before it starts. Alone in its binary, so that no
//! other test shares the machine while the times are taken; one thread,
//! so the two measurements see the same machine.

mod common;

use common::{Scratch, burnin, p};
use serde_json::Value;
use std::sync::Mutex;
use std::time::Instant;

/// The tests of this binary take turns: a timed one shares the machine with nothing.
static ALONE: Mutex<()> = Mutex::new(());

/// The estimated and the measured seconds of running `file`.
fn estimated_and_taken(file: &str) -> (f64, f64) {
    let r = burnin(&["run", "--estimate", "--json", "--threads", "1", file]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let e: Value = serde_json::from_str(&r.stdout).unwrap();
    assert_eq!(e["at_least"], false);
    let start = Instant::now();
    let r = burnin(&["run", "--no-budget", "--json", "--threads", "1", file]);
    let taken = start.elapsed().as_secs_f64();
    assert_eq!(r.code, 0, "{}", r.stderr);
    (e["seconds"].as_f64().unwrap(), taken)
}

#[test]
fn the_estimate_is_within_a_factor_of_three_of_the_time_taken() {
    let _alone = ALONE.lock().unwrap_or_else(|e| e.into_inner());
    let d = Scratch::new("estimate");
    d.demo("pearl-reef.json", "reef.json");
    // Seven learners of costs three orders of magnitude apart, and a sweep
    // whose points differ in size (the estimate times the largest).
    let race = d.file(
        "race.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "reef.json",
            "episodes": 20000, "seeds": 3, "learners": [
            {"algorithm": "mvp"}, {"algorithm": "mvp", "bonus_scale": 0.002},
            {"algorithm": "ucbvi-bernstein", "bonus_scale": 0.05},
            {"algorithm": "q-ucb-hoeffding", "bonus_scale": 0.05}, {"algorithm": "psrl"},
            {"algorithm": "eps-greedy", "epsilon": 0.1}, {"algorithm": "uniform"}]}"#,
    );
    let sweep = d.file(
        "sweep.json",
        r#"{"format": "burnin-experiment", "version": 1, "episodes": 4000, "seeds": 3,
            "generator": {"kind": "random", "states": 10, "actions": 3, "successors": 3, "horizon": 10},
            "sweep": {"parameter": "states", "values": [10, 20, 40]},
            "learners": [{"algorithm": "ucbvi-hoeffding"}, {"algorithm": "psrl"}]}"#,
    );
    for f in [&race, &sweep] {
        let (estimated, taken) = estimated_and_taken(p(f));
        let ratio = estimated / taken;
        eprintln!(
            "{}: estimated {estimated:.2} s, took {taken:.2} s",
            f.display()
        );
        assert!(
            (1.0 / 3.0..=3.0).contains(&ratio),
            "{}: estimated {estimated:.2} s, took {taken:.2} s",
            f.display()
        );
    }
}

/// A run estimated over the budget is refused before it starts, saying
/// how long it would take; `--no-budget` would run it.
#[test]
fn a_run_over_the_budget_is_refused_before_it_starts() {
    let _alone = ALONE.lock().unwrap_or_else(|e| e.into_inner());
    let d = Scratch::new("budget");
    let f = d.file(
        "long.json",
        r#"{"format": "burnin-experiment", "version": 1, "episodes": 1000000000, "seeds": 100,
            "generator": {"kind": "random", "states": 50, "actions": 4, "successors": 5, "horizon": 20},
            "learners": [{"algorithm": "ucbvi-bernstein"}]}"#,
    );
    let start = Instant::now();
    let r = burnin(&["run", "--budget", "5", p(&f)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(
        r.stderr
            .starts_with("burnin: this run is estimated to take about ")
            && r.stderr.contains("over the budget of 5 min"),
        "{}",
        r.stderr
    );
    assert!(r.stdout.is_empty());
    assert!(
        start.elapsed().as_secs_f64() < 30.0,
        "refused after calibrating, not after running"
    );
    let r = burnin(&["run", "--budget", "0", p(&f)]);
    assert_eq!(r.code, 2);
    assert_eq!(
        r.stderr,
        "burnin: --budget: expected a number of minutes > 0, found 0\n"
    );
}

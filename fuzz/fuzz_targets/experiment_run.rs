//! Any bytes as an experiment file: reading never panics, and an experiment
//! that reads runs (shortened to a few episodes) to finite results.
#![no_main]

use burnin::experiment::{parse_experiment, RunQueue, Output};
use libfuzzer_sys::fuzz_target;

/// Most (step, state, action) rows × runs × episodes a fuzz case may run.
const WORK: u64 = 200_000;

fuzz_target!(|data: &[u8]| {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(mut exp) = parse_experiment(text, None) else { return };
    let m = &exp.model;
    let rows = (m.horizon() * m.n_states() * m.n_actions()) as u64;
    let points = exp.sweep.as_ref().map_or(1, |s| s.values.len()) as u64;
    exp.episodes = exp.episodes.min(20);
    exp.seeds = exp.seeds.min(2);
    if rows * points * exp.seeds * exp.learners.len() as u64 * exp.episodes > WORK {
        return;
    }
    let mut b = RunQueue::new(exp);
    while !b.advance(64) {}
    let json = match b.output() {
        Output::Single(r) => r.to_json(),
        Output::Sweep(r) => r.to_json(),
    };
    assert!(!json.contains("NaN") && !json.contains("inf"));
});

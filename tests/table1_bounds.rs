//! Every learner of Table 1 of arXiv:2307.13586 (and the others with a
//! published bound) against its own bound, on the lower-bound family's
//! instance (Domingues, Ménard, Kaufmann & Valko, ALT 2021).

mod common;

use burnin::experiment::{Point, parse_experiment, run_all, summarise};
use burnin::learn::ALGORITHMS;

/// Each learner's measured regret stays under its published bound, read as
/// drawn (constants and log factors dropped, so the stated constant is 1,
/// which the logs the bound leaves out only make looser): at every
/// checkpoint where the bound says more than the trivial H·K, the upper
/// end of the 95% interval of the mean regret over 4 seeds is at most the
/// bound. Where a learner's lower-order term keeps its bound at H·K for
/// the whole run, the theory says nothing a run this short can check, and
/// the test says which learners those are (it asserts their list, so a
/// bound that changes is noticed). Each learner runs at its published
/// constants (`bonus_scale` 1); PSRL's bound, on the Bayesian regret, does
/// not apply to one instance and is left out.
#[test]
fn every_learner_stays_under_its_published_bound_on_the_lower_bound_instance() {
    const K: u64 = 3000;
    let learners: Vec<String> = ALGORITHMS
        .iter()
        .filter(|a| a.has_bound && !a.bandit_only)
        .map(|a| format!(r#"{{"algorithm": "{}"}}"#, a.key))
        .collect();
    let text = format!(
        r#"{{"format": "burnin-experiment", "version": 1,
            "generator": {{"kind": "lower-bound", "actions": 2, "horizon": 10, "depth": 1}},
            "episodes": {K}, "seeds": 4, "seed": 9, "checkpoints": 40,
            "learners": [{}]}}"#,
        learners.join(", ")
    );
    let exp = parse_experiment(&text, None).expect("a valid experiment");
    let ctx = Point::new(exp);
    let r = summarise(&ctx, run_all(&ctx));
    let h = r.horizon as f64;
    let (mut vacuous, mut checked_learners) = (Vec::new(), Vec::new());
    for l in &r.learners {
        let b = l.bound.as_ref().expect("a bound");
        if !b.applies {
            // PSRL's bound is on the Bayesian regret (expected over a
            // prior), not on the regret of one instance.
            assert_eq!(l.algorithm, "psrl");
            continue;
        }
        let mut checked = 0;
        for (c, &k) in l.checkpoints.iter().enumerate() {
            if b.values[c] < h * k as f64 - 1e-9 {
                checked += 1;
                assert!(
                    l.regret_hi[c] <= b.values[c],
                    "{} at k = {k}: regret up to {} above its bound {}",
                    l.label,
                    l.regret_hi[c],
                    b.values[c]
                );
            }
        }
        if checked == 0 {
            vacuous.push(l.algorithm.as_str());
        } else {
            checked_learners.push(l.algorithm.as_str());
        }
    }
    // Derived from the bounds by hand (S = 6, A = 2, H = 10, K ≤ 3000):
    // only MVP's bound, √(S·A·H³·K) with no lower-order term, and OPSRL's
    // (√(S·A·H³·K) drawn alone: its lower-order term was not read) fall
    // below H·K within the run (from K = S·A·H = 120); every other bound's
    // lower-order term (S²·A·H⁴ = 720 000 for UCBVI-Hoeffding, S·A·H⁶ for
    // Q-EarlySettled-Advantage, and so on) or larger leading term keeps it at
    // H·K.
    assert_eq!(checked_learners, ["mvp", "opsrl"], "vacuous: {vacuous:?}");
    assert!(vacuous.contains(&"ucbvi-hoeffding"), "vacuous: {vacuous:?}");
    assert!(vacuous.contains(&"q-early-settled"), "vacuous: {vacuous:?}");
}

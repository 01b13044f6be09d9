//! Scaling readings of sweeps: the exponent of burn-in and of regret at K
//! in the size a sweep changes.

mod common;

use burnin::experiment::scaling::{Scaling, exponent, exponent_intervals};
use burnin::experiment::{burn_in, checkpoints};
use common::{burnin, p};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// A regret curve that grows linearly up to `k0` and like √k after it
/// (slope 1, then ½ on log–log axes: a burn-in of `k0` by construction).
fn kinked(k0: f64, ks: &[u64]) -> Vec<f64> {
    ks.iter()
        .map(|&k| {
            let k = k as f64;
            if k <= k0 { k } else { k0 * (k / k0).sqrt() }
        })
        .collect()
}

/// The fit recovers a planted exponent: per-seed curves whose burn-in is
/// 30·S²·e^ξ, ξ ~ U(−0.2, 0.2) per seed (so the truth is S², with noise),
/// at S = 2, 3, 4, 6, 8, 8 seeds each. The exponent is the least-squares
/// slope of ln burn-in on ln S (common practice for reading a power law on
/// log–log axes); its 95% bootstrap interval must cover 2, and the point
/// value lie within 0.15 of it.
#[test]
fn the_exponent_fit_recovers_a_planted_square() {
    let sizes = [2.0, 3.0, 4.0, 6.0, 8.0];
    let ks = checkpoints(1_000_000, 120);
    let mut rng = ChaCha8Rng::seed_from_u64(11);
    let curves: Vec<Vec<Vec<f64>>> = sizes
        .iter()
        .map(|&s| {
            (0..8)
                .map(|_| {
                    let noise = libm::exp(rng.random_range(-0.2..0.2));
                    kinked(30.0 * s * s * noise, &ks)
                })
                .collect()
        })
        .collect();
    let burn: Vec<f64> = curves
        .iter()
        .map(|runs| {
            let mean: Vec<f64> = (0..ks.len())
                .map(|c| runs.iter().map(|r| r[c]).sum::<f64>() / runs.len() as f64)
                .collect();
            burn_in(&ks, &mean).expect("settled") as f64
        })
        .collect();
    let b = exponent(&sizes, &burn).expect("a fit");
    assert!((b - 2.0).abs() < 0.15, "exponent {b}");
    let points: Vec<(&[u64], &[Vec<f64>])> = curves
        .iter()
        .map(|runs| (ks.as_slice(), runs.as_slice()))
        .collect();
    let (burn_iv, regret_iv) = exponent_intervals(&points, &sizes, 5);
    let (lo, hi) = burn_iv.expect("an interval");
    assert!(lo <= 2.0 && 2.0 <= hi, "[{lo}, {hi}]");
    assert!(hi - lo < 0.5, "[{lo}, {hi}]");
    // Regret at K = √(k0·K) ∝ S: exponent 1 (derived by hand from the
    // construction), and the interval covers it.
    let (lo, hi) = regret_iv.expect("an interval");
    assert!(lo <= 1.0 && 1.0 <= hi, "[{lo}, {hi}]");
}

/// A planted cube is not read as a square: the interval of a burn-in ∝ S³
/// excludes 2 (so the check above can fail).
#[test]
fn a_planted_cube_is_told_from_a_square() {
    let sizes = [2.0, 3.0, 4.0, 6.0];
    let ks = checkpoints(1_000_000, 120);
    let curves: Vec<Vec<Vec<f64>>> = sizes
        .iter()
        .map(|&s| {
            (0..4)
                .map(|i| kinked(20.0 * s * s * s * (1.0 + 0.05 * i as f64), &ks))
                .collect()
        })
        .collect();
    let points: Vec<(&[u64], &[Vec<f64>])> = curves
        .iter()
        .map(|runs| (ks.as_slice(), runs.as_slice()))
        .collect();
    let (lo, hi) = exponent_intervals(&points, &sizes, 5)
        .0
        .expect("an interval");
    assert!(lo > 2.5 && hi < 3.5, "[{lo}, {hi}]");
}

/// Where the budget is too short the reading says so instead of fitting:
/// one settled point gives no exponent.
#[test]
fn too_few_settled_points_say_so() {
    let sc = Scaling {
        burn_in_exponent: None,
        burn_in_exponent_interval: None,
        settled_points: 1,
        points: 6,
        regret_exponent: Some(0.51),
        regret_exponent_interval: Some((0.4, 0.6)),
        published_burn_in_exponent: Some(3.0),
        published_regret_exponent: Some(0.5),
        published_applies: true,
        published_no_burn_in: false,
        published_regret_trivial: false,
    };
    assert_eq!(
        sc.burn_in_text("S"),
        "did not settle by K at 5 of 6 points; published S^3"
    );
    assert_eq!(
        sc.regret_text("S"),
        "regret at K ∝ S^0.51 [0.4, 0.6]; published S^0.5"
    );
}

/// End to end: a sweep over the lower-bound family's depth changes S alone
/// (Domingues et al. 2021's tree: a waiting state, the (A^(d+1) − 1)/(A − 1)
/// nodes of the tree and the good and bad states, as
/// tests/generators.rs counts them), so the exponents are read in S; the uniform learner's
/// regret is exactly linear and never settles (common practice: a policy
/// that never changes pays the same regret every episode), and MVP's
/// published bound has no lower-order term.
#[test]
fn a_depth_sweep_reads_exponents_in_s() {
    let d = common::Scratch::new("scaling");
    let f = d.0.join("sweep.json");
    std::fs::write(
        &f,
        r#"{"format": "burnin-experiment", "version": 1, "name": "depth sweep",
            "generator": {"kind": "lower-bound", "actions": 2, "horizon": 10, "depth": 1},
            "episodes": 2000, "seeds": 2, "seed": 4,
            "learners": [{"algorithm": "uniform"}, {"algorithm": "mvp"}],
            "sweep": {"parameter": "depth", "values": [1, 2, 3]}}"#,
    )
    .unwrap();
    let r = burnin(&["run", "--json", p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    assert_eq!(v["scaling_in"], "S");
    let states: Vec<f64> = [1u32, 2, 3]
        .iter()
        .map(|&d| (1 + (2u32.pow(d + 1) - 1) + 2) as f64)
        .collect();
    assert_eq!(v["scaling_x"], serde_json::json!(states));
    let uniform = &v["learners"][0]["scaling"];
    assert_eq!(uniform["settled_points"], 0);
    assert!(uniform["burn_in_exponent"].is_null());
    assert_eq!(v["learners"][1]["scaling"]["published_no_burn_in"], true);
    let table = burnin(&["run", p(&f)]);
    assert!(
        table
            .stdout
            .contains("did not settle by K at 3 of 3 points; published no bound"),
        "{}",
        table.stdout
    );
    assert!(
        table
            .stdout
            .contains("published none (no lower-order term)")
    );
    let out = d.0.join("sweep-out.json");
    std::fs::write(&out, &r.stdout).unwrap();
    let svg = d.0.join("scaling.svg");
    let plot = burnin(&[
        "plot",
        p(&out),
        "--view",
        "sweep-regret-scaling",
        "-o",
        p(&svg),
    ]);
    assert_eq!(plot.code, 0, "{}", plot.stderr);
    let text = std::fs::read_to_string(&svg).unwrap();
    assert!(text.contains("uniform: fit S^"), "no fitted line");
    assert!(text.contains("mvp") || text.contains("MVP"));
}

/// UCB1 on Bernoulli bandits (S = 1, H = 1) with A arms, one at ½ + Δ and
/// the rest at ½, Δ = √(A/K): the instance on which the minimax regret
/// √(A·K) is met up to the log (Auer, Cesa-Bianchi, Freund & Schapire,
/// SIAM J. Comput. 32, 2002, Theorem 5.1, the lower-bound construction;
/// UCB1's matching upper bound √(A·K·ln K) follows from Auer,
/// Cesa-Bianchi & Fischer 2002, Theorem 1, since each of the A − 1 arms
/// costs at most min(Δ·K/A, 8·ln K/Δ)). At fixed K the regret at K then
/// grows like (A − 1)·Δ·K/A = (A − 1)/√A·√K, which tends to √A: over
/// A = 16 … 128 the least-squares exponent of (A − 1)/√A is 0.53 (derived by
/// hand). The measured exponent lies within 0.06 of ½, and its 95%
/// interval over seeds excludes 1 (linear in A) and 0 by far. (Its
/// interval, a few hundredths wide with 16 seeds, does not reach ½ itself:
/// the A − 1 bad arms, not A, make the finite-A exponent a little above.)
#[test]
fn ucb1_regret_grows_like_root_a_on_the_hard_bandits() {
    use burnin::experiment::{Point, SweepResults, parse_experiment, run_all, summarise};
    const K: u64 = 20_000;
    let arms = [16u32, 32, 64, 128];
    let points: Vec<_> = arms
        .iter()
        .map(|&a| {
            let delta = (a as f64 / K as f64).sqrt();
            let mut means = vec![0.5; a as usize];
            means[0] += delta;
            let text = format!(
                r#"{{"format": "burnin-experiment", "version": 1,
                    "generator": {{"kind": "bandit", "means": {means:?}}},
                    "episodes": {K}, "seeds": 16, "seed": 2,
                    "learners": [{{"algorithm": "ucb1"}}]}}"#
            );
            let ctx = Point::new(parse_experiment(&text, None).expect("valid"));
            summarise(&ctx, run_all(&ctx))
        })
        .collect();
    let values: Vec<f64> = arms.iter().map(|&a| a as f64).collect();
    let s = SweepResults::new("hard bandits", "arms", &values, points);
    assert_eq!(s.scaling_in.as_deref(), Some("A"));
    let sc = s.learners[0].scaling.as_ref().expect("a scaling reading");
    let b = sc.regret_exponent.expect("an exponent");
    let (lo, hi) = sc.regret_exponent_interval.expect("an interval");
    assert!((b - 0.5).abs() < 0.06, "exponent {b} [{lo}, {hi}]");
    assert!(lo <= b && b <= hi, "exponent {b} [{lo}, {hi}]");
    assert!(hi < 0.75 && lo > 0.25, "exponent {b} [{lo}, {hi}]");
}

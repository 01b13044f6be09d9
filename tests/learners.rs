//! Learners and the regret accounting, against published results.

mod common;

use std::sync::Arc;

use burnin::experiment::{Point, Results, parse_experiment, run_all, summarise};
use burnin::generate::{Bandit, Garnet};
use burnin::learn::{LearnRng, Learner, Mvp, Setting};
use burnin::solve::{Policy, evaluate, solve};
use burnin::{Mdp, write_model};
use ndarray::Array3;
use rand::SeedableRng;

/// An experiment file around `model` with the given learners (JSON text).
fn experiment(model: &Mdp, episodes: u64, seeds: u64, learners: &str) -> String {
    format!(
        r#"{{"format": "burnin-experiment", "version": 1, "model": {}, "episodes": {episodes},
            "seeds": {seeds}, "seed": 7, "checkpoints": 40, "learners": {learners}}}"#,
        write_model(model)
    )
}

fn run(text: &str) -> Results {
    let exp = parse_experiment(text, None).expect("a valid experiment");
    let ctx = Point::new(exp);
    let records = run_all(&ctx);
    summarise(&ctx, records)
}

/// Auer, Cesa-Bianchi & Fischer (2002), Theorem 1: for UCB1 on K-armed
/// bandits with rewards in [0, 1], the expected regret after n plays is at
/// most 8·Σ_{i: μᵢ < μ*} (ln n)/Δᵢ + (1 + π²/3)·Σⱼ Δⱼ. Checked at every
/// checkpoint against the upper end of the 95% interval of the mean over 40
/// seeds.
#[test]
fn ucb1_regret_stays_under_the_auer_et_al_theorem_1_bound() {
    let means = [0.9, 0.8, 0.75, 0.5];
    let m = Bandit {
        arms: 0,
        means: means.to_vec(),
    }
    .generate(1)
    .unwrap();
    let r = run(&experiment(&m, 5000, 40, r#"[{"algorithm": "ucb1"}]"#));
    let best = 0.9f64;
    let gaps: Vec<f64> = means.iter().map(|m| best - m).collect();
    let l = &r.learners[0];
    for (c, &n) in l.checkpoints.iter().enumerate() {
        let ln_n = (n as f64).ln();
        let bound: f64 = gaps
            .iter()
            .filter(|&&d| d > 0.0)
            .map(|d| 8.0 * ln_n / d)
            .sum::<f64>()
            + (1.0 + std::f64::consts::PI.powi(2) / 3.0) * gaps.iter().sum::<f64>();
        assert!(
            l.regret_hi[c] <= bound,
            "n = {n}: regret up to {} above the bound {bound}",
            l.regret_hi[c]
        );
    }
    // And it learns: well below the linear regret of a uniform player.
    let uniform_regret = 5000.0 * gaps.iter().sum::<f64>() / 4.0;
    assert!(*l.regret_mean.last().unwrap() < 0.5 * uniform_regret);
}

/// Zhang, Chen, Lee & Du (2024), Algorithm 1: when the visit count of
/// (h, s, a) reaches 2^i, its estimates are rebuilt from samples
/// 2^(i−1)+1 … 2^i only; after n visits there have been ⌊log₂ n⌋ + 1 rebuilds.
#[test]
fn mvp_rebuilds_on_doubling_counts_from_the_latest_batch_only() {
    let set = Setting {
        states: 3,
        actions: 2,
        horizon: 2,
        episodes: 1000,
        delta: 0.1,
    };
    let mut mvp = Mvp::new(set, 1.0);
    let mut rng = LearnRng::seed_from_u64(1);
    mvp.begin_episode(&mut rng);
    for n in 1..=100u32 {
        // Sample n has reward n/1000 and goes to state n mod 3.
        mvp.observe(1, 2, 1, n as f64 / 1000.0, (n % 3) as usize, &mut rng);
        let want = n.ilog2() + 1;
        assert_eq!(mvp.rebuilds(1, 2, 1), want, "after {n} visits");
        let b = mvp.batch(1, 2, 1);
        // The latest completed batch: samples 2^(i−1)+1 … 2^i with 2^i ≤ n.
        let top = 1u32 << n.ilog2();
        let first = if top == 1 { 1 } else { top / 2 + 1 };
        let samples: Vec<u32> = (first..=top).collect();
        assert_eq!(
            b.size as usize,
            samples.len(),
            "batch size after {n} visits"
        );
        let mean = samples.iter().map(|&k| k as f64 / 1000.0).sum::<f64>() / samples.len() as f64;
        assert!((b.reward_mean - mean).abs() < 1e-12);
        let to0 = samples.iter().filter(|&&k| k % 3 == 0).count() as f64 / samples.len() as f64;
        let p0 = b.next.iter().find(|e| e.0 == 0).map_or(0.0, |e| e.1);
        assert!((p0 - to0).abs() < 1e-12);
    }
    // Other rows are untouched.
    assert_eq!(mvp.rebuilds(0, 2, 1), 0);
}

/// The uniform learner's policy never changes, so its expected regret is
/// exactly K·(V* − V^uniform) (derived by hand), with V^uniform from the
/// solver's independent ndarray evaluation of the stochastic policy.
#[test]
fn uniform_regret_is_k_times_the_value_gap() {
    let m = Garnet {
        states: 5,
        actions: 3,
        successors: 2,
        horizon: 4,
        time_dependent: true,
        bernoulli: true,
    }
    .generate(9)
    .unwrap();
    let k = 3000u64;
    let r = run(&experiment(&m, k, 2, r#"[{"algorithm": "uniform"}]"#));
    let (h, s, a) = (m.horizon(), m.n_states(), m.n_actions());
    let v = evaluate(
        &m,
        &Policy::Stochastic(Array3::from_elem((h, s, a), 1.0 / a as f64)),
    )
    .unwrap();
    let v_uniform = burnin::solve::start_value(&m, v.row(0).as_slice().unwrap());
    let want = k as f64 * (solve(&m).optimal_value - v_uniform);
    for x in &r.learners[0].final_regret {
        assert!((x - want).abs() <= 1e-9 * want, "{x} vs {want}");
    }
    assert!(
        (r.learners[0].slope.unwrap() - 1.0).abs() < 1e-9,
        "linear regret has slope 1"
    );
}

/// With tuned bonus scales every optimistic learner's regret is clearly
/// sublinear (log-log slope over the last decade well under 1), while the
/// uniform learner's is linear (slope 1). Sublinear regret is the defining
/// property of these algorithms (each paper's main theorem); the scales were
/// tuned on this model.
#[test]
fn optimistic_learners_are_sublinear_and_uniform_is_linear() {
    let m = Garnet {
        states: 4,
        actions: 2,
        successors: 2,
        horizon: 4,
        time_dependent: false,
        bernoulli: true,
    }
    .generate(3)
    .unwrap();
    let r = run(&experiment(
        &m,
        20000,
        3,
        r#"[{"algorithm": "mvp", "bonus_scale": 0.002},
            {"algorithm": "ucbvi-hoeffding", "bonus_scale": 0.01},
            {"algorithm": "ucbvi-bernstein", "bonus_scale": 0.05},
            {"algorithm": "q-ucb-hoeffding", "bonus_scale": 0.05},
            {"algorithm": "psrl"},
            {"algorithm": "uniform"}]"#,
    ));
    for l in &r.learners {
        let slope = l.slope.expect("positive regret");
        if l.algorithm == "uniform" {
            assert!((slope - 1.0).abs() < 1e-9, "uniform slope {slope}");
        } else {
            assert!(slope < 0.6, "{}: slope {slope}", l.label);
        }
    }
}

/// The χ² goodness-of-fit statistic of 200 000 next-state draws from a
/// 10-outcome row stays below the 0.1% critical value χ²₀.₉₉₉(9) = 27.877
/// (NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.4,
/// "Critical values of the chi-square distribution", from memory); and so do those
/// of Bernoulli and uniform reward draws binned in 5 (χ²₀.₉₉₉(4) = 18.467).
#[test]
fn sampler_passes_a_chi_square_goodness_of_fit_test() {
    use burnin::sample::{self, Sampler};
    let probs = [0.3, 0.2, 0.15, 0.1, 0.08, 0.07, 0.04, 0.03, 0.02, 0.01];
    let row: Vec<(u32, f64)> = probs
        .iter()
        .enumerate()
        .map(|(i, &p)| (i as u32, p))
        .collect();
    let m = burnin::Mdp::from_parts(burnin::MdpParts {
        name: "chi".into(),
        notes: None,
        horizon: 1,
        discount: None,
        states: (0..10).map(|i| format!("s{i}")).collect(),
        actions: vec!["a".into()],
        start: probs.to_vec(),
        stationary: true,
        steps: vec![burnin::StepParts {
            transitions: vec![row; 10],
            rewards: vec![burnin::Reward::Uniform(0.0, 1.0); 10],
        }],
        layout: None,
    })
    .unwrap();
    let sampler = Sampler::new(&m);
    let mut rng = LearnRng::seed_from_u64(42);
    let n = 200_000;
    let chi2 = |counts: &[u64], expected: &[f64]| -> f64 {
        counts
            .iter()
            .zip(expected)
            .map(|(&c, &e)| (c as f64 - e).powi(2) / e)
            .sum()
    };
    let mut next = [0u64; 10];
    let mut start = [0u64; 10];
    for _ in 0..n {
        next[sampler.next(&mut rng, 0, 3)] += 1;
        start[sampler.start(&mut rng)] += 1;
    }
    let expected: Vec<f64> = probs.iter().map(|p| p * n as f64).collect();
    assert!(
        chi2(&next, &expected) < 27.877,
        "next states χ² {}",
        chi2(&next, &expected)
    );
    assert!(
        chi2(&start, &expected) < 27.877,
        "start states χ² {}",
        chi2(&start, &expected)
    );
    let mut bins = [0u64; 5];
    for _ in 0..n {
        let x = sample::reward(&mut rng, &burnin::Reward::Uniform(0.0, 1.0));
        bins[((x * 5.0) as usize).min(4)] += 1;
    }
    assert!(chi2(&bins, &[n as f64 / 5.0; 5]) < 18.467);
    // Beta(2, 5): mean 2/7, variance αβ/((α+β)²(α+β+1)) = 10/392 (closed form).
    let xs: Vec<f64> = (0..n).map(|_| sample::beta(&mut rng, 2.0, 5.0)).collect();
    let mean = xs.iter().sum::<f64>() / n as f64;
    let var = xs.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1) as f64;
    // Standard errors: √(var/n) ≈ 3.6e-4 for the mean; 0.003 is over 8 of them.
    assert!((mean - 2.0 / 7.0).abs() < 0.003, "Beta mean {mean}");
    assert!((var - 10.0 / 392.0).abs() < 0.001, "Beta variance {var}");
}

#[test]
fn same_file_and_seed_give_identical_results() {
    let m = Garnet::default().generate(2).unwrap();
    let text = experiment(
        &m,
        500,
        3,
        r#"[{"algorithm": "mvp", "bonus_scale": 0.01}, {"algorithm": "psrl"},
            {"algorithm": "eps-greedy"}, {"algorithm": "q-ucb-hoeffding", "bonus_scale": 0.1}]"#,
    );
    let a = run(&text);
    let b = run(&text);
    assert_eq!(a, b);
    assert_eq!(a.to_json(), b.to_json());
    // Runs are independent: any order of the records gives the same summary.
    let ctx = Point::new(parse_experiment(&text, None).unwrap());
    let mut records = run_all(&ctx);
    records.reverse();
    assert_eq!(summarise(&ctx, records), a);
    let _ = Arc::clone(&ctx);
}

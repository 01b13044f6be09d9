//! Learners and the regret accounting, against published results.

mod common;

use common::learning::{
    Moment, Step, experiment, optimism_failures, play, run, setting_of, small_models,
};

use std::sync::Arc;

use burnin::experiment::{Point, parse_experiment, run_all, summarise};
use burnin::generate::{Bandit, Garnet};
use burnin::learn::{
    BERNSTEIN_C2, LearnRng, Learner, Mvp, MvpSamples, PolicyView, QUcb, Rlsvi, Setting,
};
use burnin::solve::{Policy, evaluate, solve};
use ndarray::Array3;
use rand::SeedableRng;

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
/// 2^(i−1)+1 … 2^i only; after n visits there have been ⌊log₂ n⌋ + 1
/// rebuilds. The first version (Remark 1 of the same paper) rebuilds at the
/// same counts from samples 1 … 2^i.
#[test]
fn mvp_rebuilds_on_doubling_counts_from_the_samples_of_its_version() {
    let set = Setting {
        states: 3,
        actions: 2,
        horizon: 2,
        episodes: 1000,
        delta: 0.1,
    };
    for version in [MvpSamples::LatestBatch, MvpSamples::All] {
        let mut mvp = Mvp::with_samples(set, 1.0, version);
        let mut rng = LearnRng::seed_from_u64(1);
        mvp.begin_episode(&mut rng);
        for n in 1..=100u32 {
            // Sample n has reward n/1000 and goes to state n mod 3.
            mvp.observe(1, 2, 1, n as f64 / 1000.0, (n % 3) as usize, &mut rng);
            let want = n.ilog2() + 1;
            assert_eq!(mvp.rebuilds(1, 2, 1), want, "{version:?} after {n} visits");
            let b = mvp.batch(1, 2, 1);
            // The latest rebuild, at 2^i ≤ n: samples 2^(i−1)+1 … 2^i, or 1 … 2^i.
            let top = 1u32 << n.ilog2();
            let first = match version {
                MvpSamples::LatestBatch if top > 1 => top / 2 + 1,
                _ => 1,
            };
            let samples: Vec<u32> = (first..=top).collect();
            assert_eq!(
                b.size as usize,
                samples.len(),
                "{version:?}: batch size after {n} visits"
            );
            let mean =
                samples.iter().map(|&k| k as f64 / 1000.0).sum::<f64>() / samples.len() as f64;
            assert!((b.reward_mean - mean).abs() < 1e-12);
            let to0 = samples.iter().filter(|&&k| k % 3 == 0).count() as f64 / samples.len() as f64;
            let p0 = b.next.iter().find(|e| e.0 == 0).map_or(0.0, |e| e.1);
            assert!((p0 - to0).abs() < 1e-12);
        }
        // Other rows are untouched.
        assert_eq!(mvp.rebuilds(0, 2, 1), 0);
    }
}

/// Remark 1 of arXiv:2307.13586: the first MVP differs from the later one
/// only in the samples a rebuild reads. On one seed the two are the same
/// run (the same plans, values and draws) until the first rebuild whose
/// samples differ: the first row to reach a count of 2, whose estimates are
/// sample 2 alone in the later version and samples 1–2 in the first (so
/// their sizes, 1 and 2, always differ). After it their plans part (at
/// scale 10⁻⁴, where the bonus leaves Q below H, so that a difference in the
/// estimates shows in Q).
#[test]
fn mvp_2021_and_2024_run_alike_until_a_rebuild_reads_different_samples() {
    use burnin::sample::{self, Sampler};
    let m = small_models().remove(0);
    let set = setting_of(&m, 200, 0.1);
    let mut later = Mvp::with_samples(set, 1e-4, MvpSamples::LatestBatch);
    let mut first = Mvp::with_samples(set, 1e-4, MvpSamples::All);
    let sampler = Sampler::new(&m);
    // One episode of `l`, its steps in order.
    let episode = |l: &mut Mvp, rng: &mut LearnRng| -> Vec<Step> {
        l.begin_episode(rng);
        let mut s = sampler.start(rng);
        let mut steps = Vec::new();
        for h in 0..m.horizon() {
            let a = l.act(h, s, rng);
            let row = s * m.n_actions() + a;
            let r = sample::reward(rng, m.step(h).reward(row));
            let next = sampler.next(rng, h, row);
            l.observe(h, s, a, r, next, rng);
            steps.push((h, s, a, r, next));
            s = next;
        }
        steps
    };
    let (states, actions) = (m.n_states(), m.n_actions());
    let rows: Vec<(usize, usize, usize)> = (0..m.horizon())
        .flat_map(|h| (0..states).flat_map(move |s| (0..actions).map(move |a| (h, s, a))))
        .collect();
    let same_plans = |l: &Mvp, f: &Mvp| {
        rows.iter()
            .all(|&(h, s, a)| l.planned_q(h, s, a) == f.planned_q(h, s, a))
            && l.policy_version() == f.policy_version()
    };
    let (mut r_later, mut r_first) = (LearnRng::seed_from_u64(5), LearnRng::seed_from_u64(5));
    let mut seen: Vec<Step> = Vec::new();
    let mut differs = None;
    for k in 0..200 {
        let steps = episode(&mut later, &mut r_later);
        assert_eq!(steps, episode(&mut first, &mut r_first), "episode {k}");
        assert_eq!(r_later, r_first, "draws after episode {k}");
        seen.extend(&steps);
        // The rows this episode brought to a count of 2, and their samples.
        for &(h, s, a) in &rows {
            let mine: Vec<&Step> = seen
                .iter()
                .filter(|x| (x.0, x.1, x.2) == (h, s, a))
                .collect();
            let (b_later, b_first) = (later.batch(h, s, a), first.batch(h, s, a));
            match mine.len() {
                0 | 1 => assert_eq!(b_later, b_first),
                2 => {
                    assert_eq!((b_later.size, b_first.size), (1, 2));
                    assert_eq!(b_later.reward_mean, mine[1].3);
                    assert_eq!(b_later.next, vec![(mine[1].4 as u32, 1.0)]);
                    assert_eq!(b_first.reward_mean, (mine[0].3 + mine[1].3) / 2.0);
                    differs = Some(k);
                }
                n => unreachable!("a count of {n} before any of 2"),
            }
        }
        if differs.is_some() {
            break;
        }
        assert!(same_plans(&later, &first), "plans after episode {k}");
    }
    let from = differs.expect("a row reached a count of 2");
    // After it, each plays on with its own draws; their plans part.
    for _ in from + 1..200 {
        episode(&mut later, &mut r_later);
        episode(&mut first, &mut r_first);
        if !same_plans(&later, &first) {
            return;
        }
    }
    panic!("the plans never parted after the rebuild of episode {from}");
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
/// tuned on this model. RLSVI is here too (Russo, NeurIPS 2019: Õ(√K)
/// regret, the rate [V2]): at the published variance its noise (standard
/// deviation √β_k from 23 at k = 1 to 42 at k = 20 000, against values at
/// most H = 4 here) keeps it exploring far beyond 20 000 episodes (slope
/// 0.93 measured), so it runs at noise scale 0.1 (slope 0.48 measured).
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
            {"algorithm": "rlsvi", "bonus_scale": 0.1},
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

/// Optimism, Q^k_h ≥ Q*_h for every k, h, s, a with probability 1 − δ,
/// on which each analysis rests (Jin et al. 2018: Lemma 4.3 for the
/// Hoeffding bonus and its counterpart in Appendix C for the Bernstein one;
/// Zhang, Chen, Lee & Du 2024 and Zhang, Ji & Du 2021 for MVP; the lemma
/// numbers from memory): at the start of each episode the learner's
/// V₁(s) is at least the solver's exact V*₁(s) at every state, in all but a
/// δ share of the (run, episode) checks. With the bonus scaled down the
/// same check fails often, so it can fail: at 0.01 for Q-learning; MVP's
/// constants are some 100× larger (c₁·√L ≈ 51·√28 ≈ 270 against c = 1), so
/// at 0.01 its plan is still optimistic here and it takes 10⁻⁴.
#[test]
fn optimistic_values_stay_above_the_exact_optimum() {
    const K: u64 = 3000;
    const DELTA: f64 = 0.1;
    for samples in [MvpSamples::LatestBatch, MvpSamples::All] {
        let share = |scale: f64| {
            optimism_failures(
                K,
                DELTA,
                |set| Mvp::with_samples(set, scale, samples),
                |l, s| l.value(0, s),
            )
        };
        let (published, scaled) = (share(1.0), share(1e-4));
        assert!(published <= DELTA, "MVP {samples:?}: {published}");
        assert!(scaled > 0.25, "MVP {samples:?} at 10⁻⁴: {scaled}");
    }
    for bernstein in [false, true] {
        let share = |scale: f64| {
            optimism_failures(
                K,
                DELTA,
                |set| QUcb::new(set, scale, bernstein),
                |l, s| l.value(0, s),
            )
        };
        let (published, scaled) = (share(1.0), share(0.01));
        assert!(
            published <= DELTA,
            "Q-learning, Bernstein {bernstein}: {published}"
        );
        assert!(
            scaled > 0.25,
            "Q-learning, Bernstein {bernstein}, at 0.01: {scaled}"
        );
    }
}

/// Jin, Allen-Zhu, Bubeck & Jordan (2018), Appendix C, Algorithm 2, worked
/// by hand on a two-state model with one action, H = 2, K = 1, δ = ½:
/// T = K·H = 2, ι = ln(S·A·T/δ) = ln 8, √(H⁷·S·A) = √(128·2) = 16, our
/// c₁ = c₂ = 1, and a bonus scale c = 1/10. Q and V start at H = 2.
///
/// Episode 1. (h=1, s₀) with r = ½ to s₁, where V₂(s₁) = 2: t = 1, α₁ = 1,
/// μ = 2, σ = 4, W₁ = 4 − 2² = 0; β₁ = min(√(2·2·ι) + 16ι, √(8ι)) = √(8ι)
/// (16ι > (√8 − 2)·√ι for ι ≥ 0.003); b₁ = β₁/2 = √(2ι); so
/// Q₁(s₀) = ½ + 2 + x with x = c·√(2ι), and V₁(s₀) = min(2, ·) = 2.
/// (h=2, s₁) with r = 1 (V₃ = 0): the same β₁ and b₁, so Q₂(s₁) = 1 + x and
/// V₂(s₁) = 1 + x.
///
/// Episode 2. (h=1, s₀) with r = ½ to s₁, now V₂(s₁) = 1 + x: t = 2,
/// α₂ = 3/4, W₂ = the variance of {2, 1 + x} = ((1 − x)/2)²;
/// β₂ = min(√((W₂ + 2)·ι) + 8ι, √(4ι)) = 2√ι; b₂ = (2√ι − ¼·√(8ι))/(3/2)
/// = (4 − √2)·√ι/3; Q₁(s₀) = ¼·(5/2 + x) + ¾·(½ + 1 + x + c·b₂)
/// = 7/4 + (1/10 + 3√2/40)·√ι. (h=2, s₁) with r = 0: W = 0, the same β₂
/// and b₂, Q₂(s₁) = ¼·(1 + x) + ¾·c·b₂ = ¼ + √ι/10.
///
/// The variance branch of the min binds only from t ≈ 373·ι on; so a second
/// learner sees (h=2, s₁) with r = 1 once (V₂(s₁) = 1 + x, as above) and then
/// (h=1, s₀) 2000 times, to s₁ and s₀ in turn (V₂(s₀) = 2, never updated):
/// at t = 2000, W = the variance of 1000 × {1 + x, 2} = ((1 − x)/2)², and
/// β = min(√((2/2000)·(W + 2)·ι) + 16ι/2000, √(8ι/2000)); at ι = ln 8
/// (x ≈ 0.204) that is 0.0836 against the cap 0.0912: the first branch.
#[test]
fn q_learning_bernstein_first_updates_are_the_hand_derived_ones() {
    let set = Setting {
        states: 2,
        actions: 1,
        horizon: 2,
        episodes: 1,
        delta: 0.5,
    };
    let iota = 8f64.ln();
    let ri = iota.sqrt();
    let x = 0.1 * (2.0 * iota).sqrt();
    let close = |a: f64, b: f64| (a - b).abs() < 1e-12 * b.abs().max(1.0);
    let mut q = QUcb::new(set, 0.1, true);
    let mut rng = LearnRng::seed_from_u64(3);
    q.begin_episode(&mut rng);
    q.observe(0, 0, 0, 0.5, 1, &mut rng);
    let (beta, b) = q.bernstein_bonus(0, 0, 0).unwrap();
    assert!(close(beta, (8.0 * iota).sqrt()) && close(b, (2.0 * iota).sqrt()));
    assert!(close(q.q(0, 0, 0), 2.5 + x));
    assert_eq!(q.value(0, 0), 2.0);
    q.observe(1, 1, 0, 1.0, 0, &mut rng);
    assert!(close(q.q(1, 1, 0), 1.0 + x));
    assert!(close(q.value(1, 1), 1.0 + x));
    q.end_episode(&mut rng);
    q.begin_episode(&mut rng);
    q.observe(0, 0, 0, 0.5, 1, &mut rng);
    let b2 = (4.0 - 2f64.sqrt()) * ri / 3.0;
    let (beta, b) = q.bernstein_bonus(0, 0, 0).unwrap();
    assert!(close(beta, 2.0 * ri) && close(b, b2), "β {beta}, b {b}");
    assert!(close(
        q.q(0, 0, 0),
        1.75 + (0.1 + 3.0 * 2f64.sqrt() / 40.0) * ri
    ));
    q.observe(1, 1, 0, 0.0, 1, &mut rng);
    assert!(close(q.q(1, 1, 0), 0.25 + ri / 10.0), "{}", q.q(1, 1, 0));
    assert!(close(q.value(1, 1), 0.25 + ri / 10.0));

    let mut q = QUcb::new(set, 0.1, true);
    q.begin_episode(&mut rng);
    q.observe(1, 1, 0, 1.0, 0, &mut rng);
    for t in 1..=2000 {
        q.observe(0, 0, 0, 0.5, t % 2, &mut rng);
    }
    let w = ((1.0 - x) / 2.0).powi(2);
    let variance_branch = (2.0 / 2000.0 * (w + 2.0) * iota).sqrt() + 16.0 * iota / 2000.0;
    let cap = (8.0 * iota / 2000.0).sqrt();
    assert!(variance_branch < cap);
    let (beta, _) = q.bernstein_bonus(0, 0, 0).unwrap();
    assert!(
        close(beta, variance_branch),
        "β {beta} vs {variance_branch}"
    );
}

/// Jin et al. (2018), Appendix C, Algorithm 2: β_t is a min whose second
/// branch is c₂·√(H³·ι/t), so it never exceeds that cap; and b_t is chosen
/// so that Σᵢ α_t^i·b_i = β_t/2 (B_t = (1 − α_t)·B_{t−1} + α_t·b_t, B_0 = 0;
/// derived by hand from the definitions), which here is also checked to
/// keep b_t ≥ 0 (derived by hand: t·W_t never decreases, see
/// `src/learn/qlearn.rs`). Along runs on the small random models, after
/// every update, with c₂ = 1 and ι = ln(S·A·T/δ) computed here.
#[test]
fn q_learning_bernstein_beta_stays_under_its_cap_and_telescopes() {
    const K: u64 = 20_000;
    // Besides the small models, one with S·A·H = 4, on which the variance
    // branch binds from about 5 000 visits on.
    let tiny = Garnet {
        states: 2,
        actions: 1,
        successors: 2,
        horizon: 2,
        time_dependent: true,
        bernoulli: true,
    }
    .generate(24)
    .unwrap();
    let mut below_cap = 0;
    for m in small_models().into_iter().chain([tiny]) {
        let set = setting_of(&m, K, 0.1);
        let hh = set.horizon as f64;
        let iota = (set.states as f64 * set.actions as f64 * (K as f64 * hh) / 0.1).ln();
        let mut learner = QUcb::new(set, 1.0, true);
        let mut visits = vec![0u32; set.rows()];
        let mut accumulated = vec![0.0f64; set.rows()];
        play(&m, &mut learner, K as usize, 8, |l, at| {
            let Moment::Saw((h, s, a, _, _)) = at else {
                return;
            };
            let row = set.row(h, s, a);
            visits[row] += 1;
            let t = visits[row] as f64;
            let alpha = (hh + 1.0) / (hh + t);
            let (beta, b) = l.bernstein_bonus(h, s, a).unwrap();
            let cap = BERNSTEIN_C2 * (hh.powi(3) * iota / t).sqrt();
            assert!(
                beta <= cap * (1.0 + 1e-12),
                "β {beta} above {cap} at t = {t}"
            );
            below_cap += (beta < cap) as u32;
            assert!(b >= -1e-12 * beta, "b_t = {b} < 0 at t = {t}");
            accumulated[row] = (1.0 - alpha) * accumulated[row] + alpha * b;
            assert!(
                (accumulated[row] - beta / 2.0).abs() <= 1e-9 * beta,
                "Σ α_t^i b_i = {} vs β_t/2 = {}",
                accumulated[row],
                beta / 2.0
            );
        });
    }
    assert!(below_cap > 0, "the variance branch binds somewhere");
}

/// α_t = (H + 1)/(H + t), the learning rate of both bonuses (Jin et al.
/// 2018, Algorithms 1 and 2), read back from Q: with the bonus off (scale
/// 0) the last step's update is Q ← (1 − α_t)·Q + α_t·r, so
/// α_t = (Q_t − Q_{t−1})/(r_t − Q_{t−1}). With H = 4 and rewards 1, 0, 1, 0, …: α₁ = 1, α₂ = 5/6,
/// α₃ = 5/7, α₁₀ = 5/14, α₁₀₀ = 5/104, and Q₁ = 1, Q₂ = 1/6,
/// Q₃ = (2/7)·(1/6) + 5/7 = 16/21 (derived by hand).
#[test]
fn q_learning_rate_is_h_plus_one_over_h_plus_t() {
    let set = Setting {
        states: 1,
        actions: 1,
        horizon: 4,
        episodes: 100,
        delta: 0.1,
    };
    let want = [
        (1, 1.0),
        (2, 5.0 / 6.0),
        (3, 5.0 / 7.0),
        (10, 5.0 / 14.0),
        (100, 5.0 / 104.0),
    ];
    for bernstein in [false, true] {
        let mut q = QUcb::new(set, 0.0, bernstein);
        let mut rng = LearnRng::seed_from_u64(1);
        q.begin_episode(&mut rng);
        let mut alphas = vec![f64::NAN];
        for t in 1..=100u32 {
            let before = q.q(3, 0, 0);
            let r = (t % 2) as f64;
            q.observe(3, 0, 0, r, 0, &mut rng);
            alphas.push((q.q(3, 0, 0) - before) / (r - before));
            if t == 3 {
                assert!((q.q(3, 0, 0) - 16.0 / 21.0).abs() < 1e-15);
            }
        }
        for (t, a) in want {
            assert!(
                (alphas[t] - a).abs() < 1e-12,
                "α_{t} = {} vs {a}",
                alphas[t]
            );
        }
    }
}

/// RLSVI with the noise scaled to 0 is least-squares value iteration, the
/// noise-free counterpart Osband, Van Roy & Wen (ICML 2016) set it against
/// (their abstract): in the tabular case each Q̃_h(s,a) is a ridge regression
/// with one-hot features, penalty 1, of the targets r + Ṽ_{h+1}(s′), i.e.
/// (XᵀX + I)⁻¹Xᵀy = Σ targets/(n + 1) (the ridge normal equations, Hastie,
/// Tibshirani & Friedman, *Elements of Statistical Learning*, 2nd ed., eq.
/// 3.44, from memory; XᵀX = diag(n) for one-hot features). So its plan is a
/// backward induction on r̃ = Σr/(n+1) and P̃(y) = n(y)/(n+1), computed here
/// from the same trajectories; an unvisited pair gets 0/(0+1) = 0 (derived by
/// hand). This is not ε-greedy's certainty equivalence, which divides by n.
/// Checked at the start of every episode: every Ṽ_h(s) equals the test's,
/// and the planned action attains the test's maximum.
#[test]
fn rlsvi_without_noise_is_backward_induction_on_the_regularised_model() {
    for m in small_models() {
        let (s_n, a_n, h_n) = (m.n_states(), m.n_actions(), m.horizon());
        let rows = h_n * s_n * a_n;
        let (mut n, mut r_sum) = (vec![0.0; rows], vec![0.0; rows]);
        let mut next = vec![0.0; rows * s_n];
        let mut learner = Rlsvi::new(setting_of(&m, 300, 0.1), 0.0);
        let mut checks = 0;
        play(&m, &mut learner, 300, 5, |l, at| match at {
            Moment::Saw((h, s, a, r, y)) => {
                let row = (h * s_n + s) * a_n + a;
                n[row] += 1.0;
                r_sum[row] += r;
                next[row * s_n + y] += 1.0;
            }
            Moment::Start => {
                let PolicyView::Greedy(policy) = l.policy() else {
                    panic!("RLSVI plays its greedy policy")
                };
                let mut v_next = vec![0.0; s_n];
                for h in (0..h_n).rev() {
                    let mut v = vec![0.0; s_n];
                    for s in 0..s_n {
                        let q: Vec<f64> = (0..a_n)
                            .map(|a| {
                                let row = (h * s_n + s) * a_n + a;
                                let pv: f64 =
                                    (0..s_n).map(|y| next[row * s_n + y] * v_next[y]).sum();
                                (r_sum[row] + pv) / (n[row] + 1.0)
                            })
                            .collect();
                        v[s] = q.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                        assert!(
                            (l.value(h, s) - v[s]).abs() < 1e-12,
                            "V_{h}({s}) = {} against {}",
                            l.value(h, s),
                            v[s]
                        );
                        let chosen = q[policy[h * s_n + s] as usize];
                        assert!((chosen - v[s]).abs() < 1e-12, "a greedy action");
                        checks += 1;
                    }
                    v_next = v;
                }
            }
        });
        assert_eq!(checks, 300 * h_n * s_n);
    }
}

/// The perturbation's first two moments (Russo, NeurIPS 2019: w ~ N(0,
/// β_k/(n+1)) with β_k = ½·S·H³·log(2HSAk); β_k from a secondary source
/// [V2], the variance recalled [R], docs/papers/rlsvi.md). On S = 3, A = 1,
/// H = 1 the value of state 0 is Q̃ = Σr/(n+1) + w, so over N = 20 000 fresh
/// learners, each fed n rewards of 0.5 in k − 1 episodes and planning
/// episode k, Q̃ − 0.5·n/(n+1) is a sample of w. Its mean is within 5
/// standard errors σ/√N of 0 and its sample variance within 5·√(2/(N−1))
/// (the standard deviation of a normal sample's variance relative to σ²;
/// Casella & Berger, *Statistical Inference*, 2nd ed., §5.3, from memory) of
/// β_k/(n+1). At (n, k) = (0, 1) this is the prior N(0, β₁) of an unvisited
/// pair, β₁ = 1.5·ln 6; at (3, 4), β₄/4 = 1.5·ln 24/4 (derived by hand).
#[test]
fn rlsvi_noise_has_mean_zero_and_variance_beta_over_n_plus_one() {
    let set = Setting {
        states: 3,
        actions: 1,
        horizon: 1,
        episodes: 10,
        delta: 0.1,
    };
    const N: usize = 20_000;
    let mut rng = LearnRng::seed_from_u64(17);
    for (n, k, variance) in [
        (0u32, 1u32, 1.5 * 6f64.ln()),
        (3, 4, 1.5 * 24f64.ln() / 4.0),
    ] {
        let mean_target = 0.5 * n as f64 / (n as f64 + 1.0);
        let w: Vec<f64> = (0..N)
            .map(|_| {
                let mut l = Rlsvi::new(set, 1.0);
                for episode in 1..k {
                    l.begin_episode(&mut rng);
                    if episode <= n {
                        l.observe(0, 0, 0, 0.5, 1, &mut rng);
                    }
                }
                l.begin_episode(&mut rng);
                l.value(0, 0) - mean_target
            })
            .collect();
        let mean = w.iter().sum::<f64>() / N as f64;
        let var = w.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (N - 1) as f64;
        assert!(
            mean.abs() < 5.0 * (variance / N as f64).sqrt(),
            "(n, k) = ({n}, {k}): mean {mean}"
        );
        assert!(
            (var / variance - 1.0).abs() < 5.0 * (2.0 / (N - 1) as f64).sqrt(),
            "(n, k) = ({n}, {k}): variance {var} against {variance}"
        );
    }
}

/// RLSVI's first updates without noise on a two-state model (S = 2, A = 2,
/// H = 2), worked out by hand from the regression Q̃ = (Σr + Σ n(y)·Ṽ(y))/(n+1)
/// (Osband, Van Roy & Wen 2016, the tabular case; the n + 1 recalled [R]).
/// Episode 1: no data, every Q̃ = 0. It then sees (h=1, s=0, a=0, r=1, next 1)
/// and (h=2, s=1, a=0, r=0.5, next 0). Episode 2: Q̃₂(1,0) = 0.5/2 = 1/4, so
/// Ṽ₂ = (0, 1/4); Q̃₁(0,0) = (1 + Ṽ₂(1))/2 = 5/8 > Q̃₁(0,1) = 0, so Ṽ₁(0) =
/// 5/8 with action 0, Ṽ₁(1) = 0. After the same two steps again (n = 2):
/// Q̃₂(1,0) = 1/3, Q̃₁(0,0) = (2 + 2·(1/3))/3 = 8/9. (With the plain
/// empirical mean, as ε-greedy plans, these would be 1/2 and 3/2.)
#[test]
fn rlsvi_first_updates_without_noise_are_the_hand_derived_ones() {
    let set = Setting {
        states: 2,
        actions: 2,
        horizon: 2,
        episodes: 3,
        delta: 0.1,
    };
    let mut l = Rlsvi::new(set, 0.0);
    let mut rng = LearnRng::seed_from_u64(2);
    l.begin_episode(&mut rng);
    for (h, s) in [(0, 0), (0, 1), (1, 0), (1, 1)] {
        assert_eq!(l.value(h, s), 0.0);
    }
    l.observe(0, 0, 0, 1.0, 1, &mut rng);
    l.observe(1, 1, 0, 0.5, 0, &mut rng);
    l.begin_episode(&mut rng);
    assert_eq!(l.value(1, 1), 0.25);
    assert_eq!(l.value(1, 0), 0.0);
    assert_eq!(l.value(0, 0), 0.625);
    assert_eq!(l.value(0, 1), 0.0);
    assert_eq!(l.act(0, 0, &mut rng), 0);
    l.observe(0, 0, 0, 1.0, 1, &mut rng);
    l.observe(1, 1, 0, 0.5, 0, &mut rng);
    l.begin_episode(&mut rng);
    assert!((l.value(1, 1) - 1.0 / 3.0).abs() < 1e-15);
    assert!((l.value(0, 0) - 8.0 / 9.0).abs() < 1e-15);
}

//! EULER (Zanette & Brunskill, ICML 2019, arXiv:1901.00210): its optimistic
//! and pessimistic values against the exact solver and exact policy
//! evaluation, its first updates worked by hand, its lower value along the
//! played policy, and its bound. The paper's full text was not reached
//! (docs/papers/euler.md); the rules checked are the recalled ones [R]
//! written in `src/learn/euler.rs`.

mod common;

use burnin::learn::{
    Algorithm, AlgorithmKind, Euler, LearnRng, Learner, PolicyView, Setting, euler_log_factor,
};
use burnin::solve::{Policy, evaluate};
use common::learning::{Moment, optimism_failures, play, setting_of, small_models};
use ndarray::Array2;
use rand::SeedableRng;

const K: u64 = 3000;
const DELTA: f64 = 0.1;

/// Over [`small_models`] × 3 seeds of [`K`] episodes at bonus scale `scale`:
/// the share of (run, episode) checks at which V̲₁(s) exceeds the exact value
/// V^{π_k}₁(s) of the policy about to be played at some state s, and the
/// number of (check, h, s) at which V̲_h(s) > V̄_h(s).
fn pessimism_failures(scale: f64) -> (f64, u64) {
    let (mut checks, mut failures, mut crossed) = (0u64, 0u64, 0u64);
    for m in small_models() {
        let (s_n, h_n) = (m.n_states(), m.horizon());
        for seed in 0..3 {
            let mut learner = Euler::new(setting_of(&m, K, DELTA), scale);
            play(&m, &mut learner, K as usize, seed, |l, at| {
                if at != Moment::Start {
                    return;
                }
                let PolicyView::Greedy(p) = l.policy() else {
                    panic!("EULER plays its greedy policy")
                };
                let p = Array2::from_shape_vec((h_n, s_n), p.to_vec()).unwrap();
                let v = evaluate(&m, &Policy::Deterministic(p)).unwrap();
                checks += 1;
                let above = (0..s_n).any(|s| l.lower_value(0, s) > v[[0, s]] + 1e-9);
                failures += above as u64;
                for h in 0..h_n {
                    for s in 0..s_n {
                        crossed += (l.lower_value(h, s) > l.upper_value(h, s)) as u64;
                    }
                }
            });
        }
    }
    (failures as f64 / checks as f64, crossed)
}

/// Optimism, V̄_{k,1}(s) ≥ V*₁(s) for every k and s with probability 1 − δ
/// (Zanette & Brunskill 2019, the optimism half of the value-bound
/// invariant V̲ ≤ V^{π_k} ≤ V* ≤ V̄ their analysis rests on [R],
/// docs/papers/euler.md): at the start of each episode V̄₁ is at least the
/// solver's exact V*₁ at every state in all but a δ share of the (run,
/// episode) checks. With the bonus scaled down the same check fails often,
/// so it can fail. Not at 0.01: the constant of the bonus's 1/n term,
/// 4J + B_p = (4/3)·H·L + H·√(2L), is 51–110 on these models (L ≈ 15–16), so
/// at 0.01 the bonus is still about 0.5/n to 1.1/n and only 29% of the
/// checks fail (measured); at 10⁻³ 81% do (measured; 0 at scale 1).
#[test]
fn upper_values_stay_above_the_exact_optimum() {
    let share = |scale: f64| {
        optimism_failures(
            K,
            DELTA,
            |set| Euler::new(set, scale),
            |l, s| l.upper_value(0, s),
        )
    };
    let (published, scaled) = (share(1.0), share(1e-3));
    assert!(published <= DELTA, "EULER at scale 1: {published}");
    assert!(scaled > 0.25, "EULER at 10⁻³: {scaled}");
}

/// Pessimism, V̲_{k,1}(s) ≤ V^{π_k}₁(s) for every k and s with probability
/// 1 − δ (Zanette & Brunskill 2019, the lower half of the same invariant
/// [R]): checked against the exact evaluation of the policy about to be
/// played (`burnin::solve::evaluate`), in all but a δ share of the (run,
/// episode) checks at scale 1 (0 measured), and failing in 36% of them
/// (measured) at 0.01, where the lower value is close to the empirical value
/// of a policy chosen for looking good on the same data. The lower value
/// never exceeds the upper one (derived by hand from the rules: by
/// induction on h, V̲_{h+1} ≤ V̄_{h+1} ≤ H − h and r̂ ≤ 1 give Q̲ ≤ Q̄, and
/// both values read the same action), at any scale.
#[test]
fn lower_values_stay_below_the_value_of_the_played_policy() {
    let (published, crossed) = pessimism_failures(1.0);
    assert!(published <= DELTA, "EULER at scale 1: {published}");
    assert_eq!(crossed, 0, "V̲ > V̄ at scale 1");
    let (scaled, crossed) = pessimism_failures(0.01);
    assert!(scaled > 0.25, "EULER at 0.01: {scaled}");
    assert_eq!(crossed, 0, "V̲ > V̄ at scale 0.01");
}

/// The rules of `src/learn/euler.rs` (docs/papers/euler.md, all [R]) worked
/// by hand on two states, one action, H = 2, K = 1, δ = ½, bonus scale
/// c = 1/100. T = K·H = 2, L = ln(4·S·A·H·T/δ) = ln(4·2·1·2·2·2) = ln 64;
/// J = H·L/3 = 2L/3, B_v = √(2L), B_p = 2√(2L), so 4J + B_p = 8L/3 + 2√(2L).
/// Steps are counted from 1 below (the code's h + 1); the clip at step t is
/// H − t + 1.
///
/// Episode 1: nothing seen, Q̄_1 = 2, Q̄_2 = 1, Q̲ = 0 everywhere. Played:
/// step 1 s₀ → s₁ with r = ½, step 2 s₁ → s₀ with r = 1.
///
/// Episode 2. Step 2, s₁: n = 1, r̂ = 1, V_3 = 0 (no variance, no gap),
/// b_r = 1 (n = 1), b_p = 8L/3 + 2√(2L); with x = c·(1 + 8L/3 + 2√(2L))
/// ≈ 0.1786: Q̄ = min(1, 1 + x) = 1, Q̲ = 1 − x. Step 2, s₀ unseen: Q̄ = 1,
/// Q̲ = 0. Step 1, s₀: n = 1, r̂ = ½, P̂ = δ_{s₁}: P̂V̄ = 1, Var = 0,
/// P̂V̲ = 1 − x, ‖V̄ − V̲‖_{2,P̂} = x; the bonus is c·(1 + √(2L)·x + 8L/3 +
/// 2√(2L)) = x·(1 + c√(2L)); Q̄ = 3/2 + x·(1 + c√(2L)) ≈ 1.684 (under the
/// clip 2), Q̲ = 3/2 − x − x·(1 + c√(2L)). Played: step 1 s₀ → s₀ with
/// r = 0, step 2 s₀ → s₁ with r = 0.
///
/// Episode 3. Step 2: s₁ as before (Q̄ = 1, Q̲ = 1 − x); s₀: n = 1, r̂ = 0:
/// Q̄ = min(1, x) = x, Q̲ = max(0, −x) = 0. So V̄_2 = (x, 1), V̲_2 = (0, 1 − x).
/// Step 1, s₀: n = 2, rewards ½ and 0: r̂ = ¼, sample variance
/// ((¼)² + (¼)²)/(2 − 1) = 1/8, b_r = √(2·(1/8)·L/2) + 7L/(3·1) = √(L/8) +
/// 7L/3; P̂ = ½ on each state: P̂V̄ = (1 + x)/2, Var_P̂(V̄) = ((1 − x)/2)²,
/// P̂V̲ = (1 − x)/2, the gap is x at both states so ‖V̄ − V̲‖_{2,P̂} = x;
/// b_p = √(2·((1 − x)/2)²·L/2) + √(2L)·x/√2 + (8L/3 + 2√(2L))/2
/// = (1 − x)·√L/2 + x·√L + 4L/3 + √(2L). With y = c·(b_r + b_p) ≈ 0.2006:
/// Q̄ = ¼ + (1 + x)/2 + y ≈ 1.040, Q̲ = ¼ + (1 − x)/2 − y ≈ 0.460.
/// Step 1, s₁ is still unseen: Q̄ = 2, Q̲ = 0.
#[test]
fn first_updates_are_the_hand_derived_ones() {
    let set = Setting {
        states: 2,
        actions: 1,
        horizon: 2,
        episodes: 1,
        delta: 0.5,
    };
    let l = 64f64.ln();
    assert!((euler_log_factor(&set) - l).abs() < 1e-15);
    let c = 0.01;
    let r2l = (2.0 * l).sqrt();
    let x = c * (1.0 + 8.0 * l / 3.0 + 2.0 * r2l);
    let close = |a: f64, b: f64| (a - b).abs() < 1e-12 * b.abs().max(1.0);
    let mut e = Euler::new(set, c);
    let mut rng = LearnRng::seed_from_u64(5);

    e.begin_episode(&mut rng);
    for s in 0..2 {
        assert_eq!((e.upper_value(0, s), e.upper_value(1, s)), (2.0, 1.0));
        assert_eq!((e.lower_value(0, s), e.lower_value(1, s)), (0.0, 0.0));
    }
    e.observe(0, 0, 0, 0.5, 1, &mut rng);
    e.observe(1, 1, 0, 1.0, 0, &mut rng);
    e.end_episode(&mut rng);

    e.begin_episode(&mut rng);
    assert_eq!(e.upper_value(1, 1), 1.0);
    assert!(close(e.lower_value(1, 1), 1.0 - x));
    assert_eq!((e.upper_value(1, 0), e.lower_value(1, 0)), (1.0, 0.0));
    let up = 1.5 + x * (1.0 + c * r2l);
    assert!(
        close(e.upper_value(0, 0), up),
        "{} vs {up}",
        e.upper_value(0, 0)
    );
    assert!(close(e.lower_value(0, 0), 1.5 - x - x * (1.0 + c * r2l)));
    assert_eq!((e.upper_value(0, 1), e.lower_value(0, 1)), (2.0, 0.0));
    e.observe(0, 0, 0, 0.0, 0, &mut rng);
    e.observe(1, 0, 0, 0.0, 1, &mut rng);
    e.end_episode(&mut rng);

    e.begin_episode(&mut rng);
    assert_eq!(e.upper_value(1, 1), 1.0);
    assert!(close(e.lower_value(1, 1), 1.0 - x));
    assert!(close(e.upper_value(1, 0), x) && e.lower_value(1, 0) == 0.0);
    let rl = l.sqrt();
    let b_r = (l / 8.0).sqrt() + 7.0 * l / 3.0;
    let b_p = (1.0 - x) * rl / 2.0 + x * rl + 4.0 * l / 3.0 + r2l;
    let y = c * (b_r + b_p);
    let (up, low) = (0.25 + (1.0 + x) / 2.0 + y, 0.25 + (1.0 - x) / 2.0 - y);
    assert!(
        close(e.upper_value(0, 0), up),
        "{} vs {up}",
        e.upper_value(0, 0)
    );
    assert!(
        close(e.lower_value(0, 0), low),
        "{} vs {low}",
        e.lower_value(0, 0)
    );
    assert!(up < 2.0 && low > 0.0, "neither clip binds");
    assert_eq!((e.upper_value(0, 1), e.lower_value(0, 1)), (2.0, 0.0));
    assert_eq!(e.model_updates(), 3);
}

/// The lower value follows the greedy policy of the upper one (Zanette &
/// Brunskill 2019 [R], docs/papers/euler.md): V̲_h(s) = Q̲_h(s, π_h(s)) for
/// the action π_h(s) about to be played, which attains max_a Q̄_h(s,a) =
/// V̄_h(s); V̲ is not max_a Q̲. Checked at every (h, s) at the start of every
/// episode on the small models (A = 2 and 3) at scale 0.01, where the
/// values move; that max_a Q̲ is sometimes larger shows the check tells the
/// two apart.
#[test]
fn lower_values_follow_the_greedy_policy_of_the_upper_ones() {
    let mut differ = 0;
    for m in small_models() {
        let (s_n, a_n, h_n) = (m.n_states(), m.n_actions(), m.horizon());
        let mut learner = Euler::new(setting_of(&m, 300, DELTA), 0.01);
        play(&m, &mut learner, 300, 2, |l, at| {
            if at != Moment::Start {
                return;
            }
            let PolicyView::Greedy(p) = l.policy() else {
                panic!("EULER plays its greedy policy")
            };
            for h in 0..h_n {
                for s in 0..s_n {
                    let a = p[h * s_n + s] as usize;
                    let best = (0..a_n)
                        .map(|b| l.upper_q(h, s, b))
                        .fold(f64::NEG_INFINITY, f64::max);
                    assert_eq!(l.upper_q(h, s, a), best, "π is greedy on Q̄");
                    assert_eq!(l.upper_value(h, s), best);
                    assert_eq!(l.lower_value(h, s), l.lower_q(h, s, a));
                    let max_low = (0..a_n)
                        .map(|b| l.lower_q(h, s, b))
                        .fold(f64::NEG_INFINITY, f64::max);
                    differ += (max_low > l.lower_value(h, s)) as u32;
                }
            }
        });
    }
    assert!(differ > 0, "max_a Q̲ never differs from V̲");
}

/// Every Q̄ and Q̲ recomputed at the start of every episode from the test's
/// own counts of the trajectories, by the rules written in
/// `src/learn/euler.rs` (docs/papers/euler.md [R]) with dense arrays and
/// the sample variance of the rewards summed afresh, along the policy the
/// learner plays: on the small models at scale 0.01 (values unclipped) and
/// 1, where most rows visited at least twice exercise the n ≥ 2 branches.
#[test]
fn values_are_the_rules_on_the_observed_counts() {
    for scale in [0.01, 1.0] {
        for m in small_models() {
            let (s_n, a_n, h_n) = (m.n_states(), m.n_actions(), m.horizon());
            let set = setting_of(&m, 200, DELTA);
            let l = euler_log_factor(&set);
            let hh = h_n as f64;
            let rows = h_n * s_n * a_n;
            let mut rewards: Vec<Vec<f64>> = vec![Vec::new(); rows];
            let mut next = vec![0.0; rows * s_n];
            let mut learner = Euler::new(set, scale);
            play(&m, &mut learner, 200, 9, |e, at| match at {
                Moment::Saw((h, s, a, r, y)) => {
                    let row = (h * s_n + s) * a_n + a;
                    rewards[row].push(r);
                    next[row * s_n + y] += 1.0;
                }
                Moment::Start => {
                    let PolicyView::Greedy(p) = e.policy() else {
                        panic!("EULER plays its greedy policy")
                    };
                    let (mut up, mut low) = (vec![0.0; s_n], vec![0.0; s_n]);
                    for h in (0..h_n).rev() {
                        let (mut up_h, mut low_h) = (vec![0.0; s_n], vec![0.0; s_n]);
                        for s in 0..s_n {
                            for a in 0..a_n {
                                let row = (h * s_n + s) * a_n + a;
                                let rs = &rewards[row];
                                let n = rs.len() as f64;
                                let (qu, ql) = if rs.is_empty() {
                                    ((h_n - h) as f64, 0.0)
                                } else {
                                    let mean = rs.iter().sum::<f64>() / n;
                                    let b_r = if rs.len() == 1 {
                                        1.0
                                    } else {
                                        let v = rs.iter().map(|r| (r - mean).powi(2)).sum::<f64>()
                                            / (n - 1.0);
                                        (2.0 * v * l / n).sqrt() + 7.0 * l / (3.0 * (n - 1.0))
                                    };
                                    let p: Vec<f64> =
                                        (0..s_n).map(|y| next[row * s_n + y] / n).collect();
                                    let pu: f64 = (0..s_n).map(|y| p[y] * up[y]).sum();
                                    let pl: f64 = (0..s_n).map(|y| p[y] * low[y]).sum();
                                    let var: f64 =
                                        (0..s_n).map(|y| p[y] * (up[y] - pu).powi(2)).sum();
                                    let gap: f64 = (0..s_n)
                                        .map(|y| p[y] * (up[y] - low[y]).powi(2))
                                        .sum::<f64>()
                                        .sqrt();
                                    let b_v = (2.0 * l).sqrt();
                                    let b_p = (2.0 * var * l / n).sqrt()
                                        + b_v * gap / n.sqrt()
                                        + (4.0 * hh * l / 3.0 + hh * b_v) / n;
                                    let bonus = scale * (b_r + b_p);
                                    (
                                        (mean + pu + bonus).min((h_n - h) as f64),
                                        (mean + pl - bonus).max(0.0),
                                    )
                                };
                                let tol = 1e-9 * qu.abs().max(1.0);
                                assert!(
                                    (e.upper_q(h, s, a) - qu).abs() < tol,
                                    "Q̄_{h}({s},{a}) = {} against {qu}",
                                    e.upper_q(h, s, a)
                                );
                                assert!(
                                    (e.lower_q(h, s, a) - ql).abs() < tol,
                                    "Q̲_{h}({s},{a}) = {} against {ql}",
                                    e.lower_q(h, s, a)
                                );
                            }
                            let a = p[h * s_n + s] as usize;
                            up_h[s] = e.upper_q(h, s, a);
                            low_h[s] = e.lower_q(h, s, a);
                        }
                        up = up_h;
                        low = low_h;
                    }
                }
            });
        }
    }
}

/// The bound: Zanette & Brunskill (2019), main theorem as recalled [R]:
/// Õ(min{√(ℚ*·S·A·T), √(𝒢²·S·A·K)} + √S·S·A·H²·(√S + √H)) for a stationary
/// MDP, T = K·H, drawn at 𝒢 = H and read with S → S·H (the one rule of
/// `src/theory.rs`). Evaluated here from the stationary form with S·H in
/// place of S: on S = 3, A = 2, H = 4 the leading term is √(H²·(S·H)·A·K)
/// = √(384·K) and the lower-order one √12·12·2·16·(√12 + 2) (derived by
/// hand), capped at H·K; the burn-in (lower-order term)²/(S·A·H³) =
/// S²·A·H⁵·(√S + 1)² = 18 432·(1 + √3)². Table 1 of arXiv:2307.13586 prints
/// the burn-in S²·A·H³·(√S + √H) without the square its own lower-order term
/// gives; the note says so. Scaled, the bound does not apply.
#[test]
fn bound_is_the_stationary_theorem_read_with_s_times_h() {
    let set = Setting {
        states: 3,
        actions: 2,
        horizon: 4,
        episodes: 1000,
        delta: 0.05,
    };
    let ks = [1u64, 10_000, 1_000_000, 100_000_000];
    let (s, a, h) = (3.0f64, 2.0f64, 4.0f64);
    let sh = s * h;
    let published = |s: f64, k: f64| {
        (h * h * s * a * k).sqrt() + s.sqrt() * s * a * h * h * (s.sqrt() + h.sqrt())
    };
    let b = Algorithm::with(AlgorithmKind::Euler, 1.0)
        .bound(&set, &ks)
        .expect("a published bound");
    for (i, &k) in ks.iter().enumerate() {
        let k = k as f64;
        let want = published(sh, k).min(h * k);
        assert!(
            (b.values[i] - want).abs() <= 1e-9 * want,
            "at K = {k}: {} against {want}",
            b.values[i]
        );
    }
    let lower = 12f64.sqrt() * 12.0 * 2.0 * 16.0 * (12f64.sqrt() + 2.0);
    assert!((b.values[3] - ((384.0f64 * 1e8).sqrt() + lower)).abs() < 1e-6);
    let burn_in = 18_432.0 * (1.0 + 3f64.sqrt()).powi(2);
    assert!((b.burn_in.unwrap() - burn_in).abs() < 1e-9 * burn_in);
    assert!(
        (b.burn_in.unwrap() - lower * lower / (s * a * h.powi(3))).abs() < 1e-9 * burn_in,
        "the burn-in is where √(S·A·H³·K) overtakes the lower-order term"
    );
    assert!(b.applies);
    assert!(b.formula.contains("S^{3/2}·A·H⁴"), "{}", b.formula);
    assert!(b.note.contains("(√S+√H)²"), "{}", b.note);
    let scaled = Algorithm::with(AlgorithmKind::Euler, 0.5)
        .bound(&set, &ks)
        .unwrap();
    assert!(!scaled.applies && scaled.note.contains("scaled"));
    assert_eq!(scaled.values, b.values);
}

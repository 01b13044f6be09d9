//! OPSRL (Tiapkin, Belomestny, Calandriello, Moulines, Munos, Naumov,
//! Rowland, Valko & Ménard, NeurIPS 2022, arXiv:2209.14414): optimism
//! against the exact solver, the reduction to the posterior-mean planner when
//! the Dirichlet concentrates, the Dirichlet's moments, hand-derived first
//! updates, the cost of unvisited rows, and the bound. The paper's full text
//! was not reached (docs/papers/opsrl.md); the rules tested are those of
//! `src/learn/opsrl.rs`, each marked there.

mod common;

use common::learning::{Moment, optimism_failures, play, setting_of, small_models};

use burnin::learn::{
    Algorithm, AlgorithmKind, LearnRng, Learner, Opsrl, OpsrlParams, PolicyView, Setting,
    opsrl_dirichlet, opsrl_samples,
};
use rand::{RngCore, SeedableRng};

/// Optimism, V̄₁ ≥ V*₁ with probability 1 − δ, on which the analysis rests:
/// with J draws each optimistic with probability at least p, all J miss with
/// probability (1 − p)^J ≤ δ/(2SAHK) per row and episode (the union bound
/// behind J's formula, [R], docs/papers/opsrl.md). At the start of each
/// episode the learner's V̄₁(s) is at least the solver's exact V*₁(s) at
/// every state, in all but a δ share of the (run, episode) checks on the
/// small models. It can fail:
/// - with one draw (J = 1) and the published κ, n₀: the share rises above
///   δ (the maximum over J is what makes posterior sampling optimistic;
///   measured 0.149, against 0 with J = 167…172 on these models);
/// - with one draw from the uninflated posterior (J = 1, κ = n₀ = 1: PSRL
///   with an optimistic prior), far above (measured 0.544);
/// - with `bonus_scale` 0.001 (κ and n₀ × 0.001; measured 0.543). At 0.01
///   it still holds in all but 5% of the checks (measured 0.051), because
///   the posterior's spread goes as √(c·κ), not c: at c = 0.01 it is
///   √(0.28) ≈ 0.53 of the plain posterior's, and the largest of some 170
///   draws is still about 2.5 of those spreads above the mean — about the
///   width of a Bernstein bonus; at 0.001 it is 0.17 of it, and optimism
///   fails often.
#[test]
fn optimism_holds_in_all_but_a_delta_share_and_fails_without_its_ingredients() {
    const K: u64 = 3000;
    const DELTA: f64 = 0.1;
    let share =
        |build: &dyn Fn(Setting) -> Opsrl| optimism_failures(K, DELTA, build, |l, s| l.value(0, s));
    let published = share(&|set| Opsrl::new(set, 1.0));
    assert!(published <= DELTA, "published constants: {published}");
    let one_draw = share(&|set| {
        Opsrl::with_params(
            set,
            OpsrlParams {
                samples: 1,
                ..OpsrlParams::scaled(&set, 1.0)
            },
        )
    });
    assert!(one_draw > DELTA, "J = 1: {one_draw}");
    let plain = share(&|set| {
        Opsrl::with_params(
            set,
            OpsrlParams {
                samples: 1,
                kappa: 1.0,
                prior: 1.0,
            },
        )
    });
    assert!(plain > 0.25, "J = 1, κ = n₀ = 1: {plain}");
    let scaled = share(&|set| Opsrl::new(set, 0.001));
    assert!(scaled > 0.25, "bonus scale 0.001: {scaled}");
}

/// The reduction: when the Dirichlet concentrates, OPSRL is the posterior-
/// mean planner, the empirical model with n₀ pseudo-transitions to the
/// optimistic state (optimistic initialisation that fades as 1/n):
///
///   Q_h(s,a) = (Σ r + Σ_{s′} n(s′)·V_{h+1}(s′) + n₀·(H − h + 1)) / (n + n₀),
///
/// H − h + 1 for an unvisited row. A Dirichlet(α/κ) has mean α/α₀ whatever
/// κ, and variance αᵢ(α₀ − αᵢ)/(α₀²(α₀/κ + 1)) (Johnson, Kotz & Balakrishnan,
/// *Continuous Multivariate Distributions*, Vol. 1, 2nd ed., 2000, ch. 49;
/// Bishop, *PRML*, 2006, eqs. 2.273–2.275), which goes to 0 as κ → 0: at
/// κ = 10⁻¹⁴ each weight is within about 10⁻⁷ of its mean, so every one of
/// the J draws, and their maximum, is the mean backup to within 10⁻⁵ (J
/// large instead would not do: the maximum of many draws tends to the
/// largest outcome, H − h + 1, not to the mean). The small models have
/// Bernoulli rewards, so the reward bit is the reward itself. Checked at
/// the start of every episode, every V_h(s) and the planned action.
#[test]
fn a_concentrated_posterior_is_the_posterior_mean_planner() {
    const N0: f64 = 1.5;
    for m in small_models() {
        let (s_n, a_n, h_n) = (m.n_states(), m.n_actions(), m.horizon());
        let rows = h_n * s_n * a_n;
        let (mut n, mut r_sum) = (vec![0.0; rows], vec![0.0; rows]);
        let mut next = vec![0.0; rows * s_n];
        let set = setting_of(&m, 300, 0.1);
        let params = OpsrlParams {
            samples: 20,
            kappa: 1e-14,
            prior: N0,
        };
        let mut learner = Opsrl::with_params(set, params);
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
                    panic!("OPSRL plays its greedy policy")
                };
                let mut v_next = vec![0.0; s_n];
                for h in (0..h_n).rev() {
                    let top = (h_n - h) as f64;
                    let mut v = vec![0.0; s_n];
                    for s in 0..s_n {
                        let q: Vec<f64> = (0..a_n)
                            .map(|a| {
                                let row = (h * s_n + s) * a_n + a;
                                let pv: f64 =
                                    (0..s_n).map(|y| next[row * s_n + y] * v_next[y]).sum();
                                (r_sum[row] + pv + N0 * top) / (n[row] + N0)
                            })
                            .collect();
                        v[s] = q.iter().copied().fold(f64::NEG_INFINITY, f64::max);
                        assert!(
                            (l.value(h, s) - v[s]).abs() < 1e-5,
                            "V_{h}({s}) = {} against {}",
                            l.value(h, s),
                            v[s]
                        );
                        let chosen = q[policy[h * s_n + s] as usize];
                        assert!((chosen - v[s]).abs() < 1e-5, "a greedy action");
                        checks += 1;
                    }
                    v_next = v;
                }
            }
        });
        assert_eq!(checks, 300 * h_n * s_n);
    }
}

/// The Dirichlet draws have the Dirichlet's moments (Johnson, Kotz &
/// Balakrishnan, *Continuous Multivariate Distributions*, Vol. 1, 2nd ed.,
/// 2000, ch. 49; Bishop, *PRML*, 2006, §2.2.1, eqs. 2.273–2.275): with
/// α₀ = Σα, E[wᵢ] = αᵢ/α₀, Var[wᵢ] = αᵢ(α₀ − αᵢ)/(α₀²(α₀ + 1)) and
/// Cov[wᵢ, wⱼ] = −αᵢαⱼ/(α₀²(α₀ + 1)). Over N = 200 000 draws with shapes
/// below, at and above 1 (0.036 is one visit at the published κ ≈ 27.8),
/// each sample mean of wᵢ, wᵢ² and wᵢwⱼ is within 5 standard errors of its
/// expectation; as the weights lie in [0, 1], the standard error of the
/// mean of wᵢ² (or wᵢwⱼ) is at most √(E[wᵢ²]/N) (since wᵢ⁴ ≤ wᵢ²; derived
/// by hand).
#[test]
fn dirichlet_draws_have_the_dirichlet_moments() {
    const N: usize = 200_000;
    let alpha = [1.0, 0.036, 1.5, 6.0];
    let a0: f64 = alpha.iter().sum();
    let mut rng = LearnRng::seed_from_u64(31);
    let (mut m1, mut m2) = ([0.0; 4], [0.0; 4]);
    let mut cross = 0.0;
    let mut w = [0.0; 4];
    for _ in 0..N {
        assert!(opsrl_dirichlet(&mut rng, &alpha, &mut w));
        for i in 0..4 {
            m1[i] += w[i];
            m2[i] += w[i] * w[i];
        }
        cross += w[0] * w[2];
    }
    let n = N as f64;
    for i in 0..4 {
        let mean = alpha[i] / a0;
        let var = alpha[i] * (a0 - alpha[i]) / (a0 * a0 * (a0 + 1.0));
        let (got1, got2) = (m1[i] / n, m2[i] / n);
        assert!(
            (got1 - mean).abs() < 5.0 * (var / n).sqrt(),
            "E[w{i}] = {got1} against {mean}"
        );
        let second = var + mean * mean;
        assert!(
            (got2 - second).abs() < 5.0 * (second / n).sqrt(),
            "E[w{i}²] = {got2} against {second}"
        );
    }
    let want = alpha[0] * alpha[2] / (a0 * a0) - alpha[0] * alpha[2] / (a0 * a0 * (a0 + 1.0));
    let got = cross / n;
    assert!(
        (got - want).abs() < 5.0 * (want / n).sqrt(),
        "E[w0·w2] = {got} against {want}"
    );
}

/// The learner draws from Dirichlet(counts/κ, n₀/κ on s₀): on H = 1 with one
/// draw (J = 1), κ = 2, n₀ = 1, after 3 visits with reward 1 and 5 with
/// reward 0, V̄₁ = w(s₀) + w(reward-1 cell), which by the Dirichlet's
/// aggregation property (Johnson, Kotz & Balakrishnan 2000, ch. 49) is
/// Beta(1/2 + 3/2, 5/2) = Beta(2, 5/2): mean 4/9, variance
/// 2·(5/2)/((9/2)²·(11/2)) = 40/891 (derived by hand; without the division
/// by κ it would be Beta(4, 5), the same mean and variance 20/810). Over
/// N = 20 000 episodes (a fresh draw each), the sample mean is within 5
/// standard errors and the sample mean of V̄² within 5·√(E[V̄²]/N).
#[test]
fn the_learners_draw_is_the_inflated_posterior() {
    const N: usize = 20_000;
    let set = Setting {
        states: 2,
        actions: 1,
        horizon: 1,
        episodes: N as u64,
        delta: 0.1,
    };
    let params = OpsrlParams {
        samples: 1,
        kappa: 2.0,
        prior: 1.0,
    };
    let mut l = Opsrl::with_params(set, params);
    let mut rng = LearnRng::seed_from_u64(8);
    for i in 0..8 {
        let (r, y) = if i < 3 { (1.0, 0) } else { (0.0, 1) };
        l.observe(0, 0, 0, r, y, &mut rng);
    }
    let (mut m1, mut m2) = (0.0, 0.0);
    for _ in 0..N {
        l.begin_episode(&mut rng);
        let v = l.value(0, 0);
        m1 += v;
        m2 += v * v;
    }
    let n = N as f64;
    let (mean, var) = (4.0 / 9.0, 40.0 / 891.0);
    assert!((m1 / n - mean).abs() < 5.0 * (var / n).sqrt(), "{}", m1 / n);
    let second = var + mean * mean;
    assert!(
        (m2 / n - second).abs() < 5.0 * (second / n).sqrt(),
        "{}",
        m2 / n
    );
}

/// First updates on a two-state model (S = 2, A = 1, H = 2), worked by hand
/// from the rules of `src/learn/opsrl.rs`: s₀'s value is H − h + 1 (2 at
/// step 1, 1 at step 2), a real outcome's b + V̄_{h+1}(s′).
///
/// At the published constants (random draws), where the values are
/// deterministic:
/// - episode 1, nothing seen: V̄₁ = (2, 2), V̄₂ = (1, 1), all mass on s₀;
/// - after (h=1, s=0, r=1 → s=1) and (h=2, s=1, r=1 → s=0), every outcome
///   seen is maximal (1 + V̄₂(1) = 2 at step 1, 1 + 0 = 1 at step 2): the
///   values stay (2, 2) and (1, 1) exactly;
/// - after (h=2, s=1, r=0 → s=0) as well, row (2, 1) has outcomes 1 (s₀
///   and the reward-1 cell) and 0: V̄₂(1) lies in (0, 1), and row (1, 0)'s
///   outcomes 2 (s₀) and 1 + V̄₂(1) put V̄₁(0) in [1 + V̄₂(1), 2]; the
///   unvisited rows keep V̄₂(0) = 1 and V̄₁(1) = 2. The upper ends are
///   reached in floating point: here κ = 2·ln 240 ≈ 11, so the 0-outcome's
///   parameter is 1/κ ≈ 0.09, and its Gamma variate is below 10⁻¹⁷ (and
///   vanishes beside s₀'s) in about 3% of the draws, so in most episodes one
///   of the J = 67 draws is exactly 1 (derived by hand from the Gamma boost
///   G·U^(1/a)); so the test asks for ≤ at the top, and that V̄₂(1) < 1 in
///   some of the 50 episodes.
///
/// With the posterior concentrated (κ = 10⁻¹⁴, n₀ = 1: the posterior mean,
/// see the reduction test), a second learner sees (h=1, s=0, r=1 → s=1) and
/// (h=2, s=1, r=0 → s=0) once per episode:
/// - episode 2: Q₂(1) = (0 + n₀·1)/(1 + n₀) = 1/2, Q₁(0) = ((1 + 1/2) +
///   n₀·2)/(1 + n₀) = 7/4;
/// - episode 3 (n = 2): Q₂(1) = (0 + 0 + 1)/3 = 1/3, Q₁(0) = (2·(1 + 1/3) +
///   2)/3 = 14/9.
#[test]
fn first_updates_are_the_hand_derived_ones() {
    let set = Setting {
        states: 2,
        actions: 1,
        horizon: 2,
        episodes: 3,
        delta: 0.1,
    };
    let mut rng = LearnRng::seed_from_u64(2);
    let mut l = Opsrl::new(set, 1.0);
    l.begin_episode(&mut rng);
    let values = |l: &Opsrl| [l.value(0, 0), l.value(0, 1), l.value(1, 0), l.value(1, 1)];
    assert_eq!(values(&l), [2.0, 2.0, 1.0, 1.0]);
    l.observe(0, 0, 0, 1.0, 1, &mut rng);
    l.observe(1, 1, 0, 1.0, 0, &mut rng);
    l.begin_episode(&mut rng);
    assert_eq!(values(&l), [2.0, 2.0, 1.0, 1.0]);
    l.observe(1, 1, 0, 0.0, 0, &mut rng);
    let mut below = 0;
    for _ in 0..50 {
        l.begin_episode(&mut rng);
        let v2 = l.value(1, 1);
        assert!(0.0 < v2 && v2 <= 1.0, "V̄₂(1) = {v2}");
        below += u32::from(v2 < 1.0);
        let v1 = l.value(0, 0);
        assert!(1.0 + v2 <= v1 && v1 <= 2.0, "V̄₁(0) = {v1}, V̄₂(1) = {v2}");
        assert_eq!((l.value(1, 0), l.value(0, 1)), (1.0, 2.0));
    }
    assert!(below > 0);

    let concentrated = OpsrlParams {
        samples: 5,
        kappa: 1e-14,
        prior: 1.0,
    };
    let mut l = Opsrl::with_params(set, concentrated);
    l.begin_episode(&mut rng);
    assert_eq!(values(&l), [2.0, 2.0, 1.0, 1.0]);
    let close = |a: f64, b: f64| (a - b).abs() < 1e-6;
    for want in [(7.0 / 4.0, 0.5), (14.0 / 9.0, 1.0 / 3.0)] {
        l.observe(0, 0, 0, 1.0, 1, &mut rng);
        l.observe(1, 1, 0, 0.0, 0, &mut rng);
        l.begin_episode(&mut rng);
        assert!(close(l.value(1, 1), want.1), "V̄₂(1) = {}", l.value(1, 1));
        assert!(close(l.value(0, 0), want.0), "V̄₁(0) = {}", l.value(0, 0));
        assert_eq!((l.value(1, 0), l.value(0, 1)), (1.0, 2.0));
    }
}

/// Unvisited rows cost nothing: all their mass is on s₀, so their value is
/// H − h + 1 without a draw (and so is a row whose every outcome seen is
/// maximal). With one action (no tie-breaks either), a plan before any
/// visit, and one after a visit whose outcome is maximal, leave the
/// generator untouched — at S = 500, A = 1, H = 50, K = 1000, δ = 0.1, where
/// J = ⌈12.099·ln(5·10⁸)⌉ = 243.
#[test]
fn unvisited_rows_draw_nothing() {
    let set = Setting {
        states: 500,
        actions: 1,
        horizon: 50,
        episodes: 1000,
        delta: 0.1,
    };
    assert_eq!(opsrl_samples(&set), 243);
    let mut l = Opsrl::new(set, 1.0);
    let mut rng = LearnRng::seed_from_u64(5);
    let mut twin = rng.clone();
    l.begin_episode(&mut rng);
    assert_eq!(l.value(0, 3), 50.0);
    assert_eq!(l.value(49, 3), 1.0);
    // The reward bit is drawn at every observation, whatever the reward.
    l.observe(49, 3, 0, 1.0, 7, &mut rng);
    twin.next_u64();
    l.begin_episode(&mut rng);
    assert_eq!(rng.next_u64(), twin.next_u64());
    // A reward 0 makes the row's outcomes unequal: now it draws.
    l.observe(49, 3, 0, 0.0, 7, &mut rng);
    twin.next_u64();
    l.begin_episode(&mut rng);
    assert_ne!(rng.next_u64(), twin.next_u64());
    // (Its value is still 1 to within 10⁻¹⁶: with one visit at κ ≈ 40 the
    // outcome's weight is below 10⁻¹⁷ in over a third of the draws, and
    // the largest of J = 243 draws is one of those.)
    assert!(l.value(49, 3) > 1.0 - 1e-15);
}

/// The bound: Tiapkin et al. (2022), Õ(√(H³·S·A·T)) with probability 1 − δ
/// [V: the abstract], T = episodes (our K), for step-dependent transitions —
/// our setting, drawn as published (src/theory.rs). Derived by hand for
/// S = 3, A = 2, H = 4: √(384·K), capped at H·K: 4 at K = 1, √(3.84·10⁶)
/// at K = 10⁴, √(3.84·10⁸) at K = 10⁶. The lower-order term was not read:
/// no burn-in is drawn, and the note says it is unknown. At scale 1 it
/// applies; at another scale it does not.
#[test]
fn bound_is_the_abstracts_rate_without_a_burn_in() {
    let set = Setting {
        states: 3,
        actions: 2,
        horizon: 4,
        episodes: 1000,
        delta: 0.05,
    };
    let ks = [1, 10_000, 1_000_000];
    let b = Algorithm::with(AlgorithmKind::Opsrl, 1.0)
        .bound(&set, &ks)
        .expect("a published bound");
    assert_eq!(b.values[0], 4.0, "capped at H·K for K = 1");
    assert!((b.values[1] - 3.84e6f64.sqrt()).abs() < 1e-9);
    assert!((b.values[2] - 3.84e8f64.sqrt()).abs() < 1e-6);
    assert_eq!(b.burn_in, None);
    assert!(b.applies);
    assert!(b.formula.contains("H³") && b.formula.contains("not read"));
    assert!(b.note.contains("lower-order term"), "{}", b.note);
    assert!(b.source.contains("2209.14414"), "{}", b.source);
    let scaled = Algorithm::with(AlgorithmKind::Opsrl, 0.5)
        .bound(&set, &ks)
        .unwrap();
    assert!(!scaled.applies);
    assert!(scaled.note.contains("scaled by 0.5"), "{}", scaled.note);
}

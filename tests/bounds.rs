//! The published bounds drawn beside the curves: each in the form that
//! covers our learners (statistics per step, so every stationary theorem is
//! read with S → S·H), and marked as not applying when the bonus is scaled.

use burnin::learn::{Algorithm, AlgorithmKind, MvpSamples, Setting};

fn setting() -> Setting {
    Setting {
        states: 3,
        actions: 2,
        horizon: 4,
        episodes: 1000,
        delta: 0.05,
    }
}

const KS: [u64; 3] = [1, 10_000, 1_000_000];

fn bound(kind: AlgorithmKind, scale: f64) -> burnin::theory::Bound {
    Algorithm::with(kind, scale)
        .bound(&setting(), &KS)
        .expect("a published bound")
}

/// PSRL: Osband, Russo & Van Roy (2013), Theorem 1, τ·S·√(A·T) with τ = H,
/// T = K·H, and S → S·H: √(S²·A·H⁵·K), capped at H·K (derived by hand:
/// S = 3, A = 2, H = 4 gives √(18 432·K)).
#[test]
fn psrl_bound_is_in_the_per_step_form() {
    let b = bound(AlgorithmKind::Psrl, 1.0);
    assert_eq!(b.values[0], 4.0, "capped at H·K for K = 1");
    assert!((b.values[1] - (18_432.0f64 * 1e4).sqrt()).abs() < 1e-9);
    assert!((b.values[2] - (18_432.0f64 * 1e6).sqrt()).abs() < 1e-6);
    assert!(b.formula.contains("H⁵"), "{}", b.formula);
    // Theorem 1 bounds the Bayesian regret (expected over the prior the
    // model is drawn from), not the regret on one fixed model.
    assert!(!b.applies);
    assert!(b.note.contains("Bayesian"), "{}", b.note);
}

/// One rule for every bound stated for a stationary MDP (src/theory.rs):
/// the published formula read on the layered MDP of S·H states, S → S·H in
/// every term, T = K·H. Each published form is written here from its
/// source (log factors dropped) and evaluated with S·H in place of S; the
/// drawn curve must equal it at every K (capped at H·K).
/// - Azar, Osband & Munos, ICML 2017: Theorem 1 (Hoeffding) H·√(S·A·T) +
///   H²·S²·A; Theorem 2 (Bernstein) √(H·S·A·T) + H²·S²·A (from memory).
/// - Osband, Russo & Van Roy, NeurIPS 2013, Theorem 1: τ·S·√(A·T), τ = H.
#[test]
fn every_stationary_bound_is_translated_by_one_rule() {
    let set = setting();
    let (s, a, h) = (3.0f64, 2.0f64, 4.0f64);
    let sh = s * h;
    type Published = fn(f64, f64, f64, f64) -> f64;
    let published: [(AlgorithmKind, Published); 3] = [
        (AlgorithmKind::UcbviHoeffding, |s, a, h, t| {
            h * (s * a * t).sqrt() + h * h * s * s * a
        }),
        (AlgorithmKind::UcbviBernstein, |s, a, h, t| {
            (h * s * a * t).sqrt() + h * h * s * s * a
        }),
        (AlgorithmKind::Psrl, |s, a, h, t| h * s * (a * t).sqrt()),
    ];
    for (kind, f) in published {
        let b = Algorithm::with(kind, 1.0).bound(&set, &KS).unwrap();
        for (i, &k) in KS.iter().enumerate() {
            let k = k as f64;
            let want = f(sh, a, h, k * h).min(h * k);
            assert!(
                (b.values[i] - want).abs() <= 1e-9 * want,
                "{kind:?} at K = {k}: {} against {want}",
                b.values[i]
            );
        }
    }
    // Bernstein's burn-in from the same translation: (S²·A·H⁴)²/(S·A·H³)
    // = S³·A·H⁵ = 27·2·1024 = 55 296 (derived by hand); Table 1 of
    // arXiv:2307.13586 prints S³·A·H³, and the note says so.
    let b = bound(AlgorithmKind::UcbviBernstein, 1.0);
    assert_eq!(b.burn_in, Some(55_296.0));
    assert!(b.note.contains("Table 1"), "{}", b.note);
}

/// UCBVI-Hoeffding: Azar et al. (2017), Theorem 1, H·√(S·A·T) + H²·S²·A
/// with S → S·H: √(S·A·H⁴·K) + S²·A·H⁴, the √K term dominating from
/// K = S³·A·H⁴ (derived by hand: 27·2·256 = 13 824; lower term 9·2·256 = 4 608).
#[test]
fn ucbvi_hoeffding_terms_use_the_same_translation() {
    let b = bound(AlgorithmKind::UcbviHoeffding, 1.0);
    assert_eq!(b.burn_in, Some(13_824.0));
    let k = 1e6f64;
    let want = (3.0 * 2.0 * 256.0 * k).sqrt() + 4_608.0;
    assert!(
        (b.values[2] - want).abs() < 1e-6,
        "{} vs {want}",
        b.values[2]
    );
}

/// A bonus scale other than 1 leaves the theorem's hypotheses: the bound
/// is still drawn (for reference) but marked as not applying, with the
/// reason (common practice: the theorems are proved for the stated bonus).
#[test]
fn a_scaled_bonus_marks_the_bound_as_not_applying() {
    for kind in [
        AlgorithmKind::Mvp,
        AlgorithmKind::Mvp2021,
        AlgorithmKind::UcbviHoeffding,
        AlgorithmKind::UcbviBernstein,
        AlgorithmKind::QUcbHoeffding,
        AlgorithmKind::QUcbBernstein,
        AlgorithmKind::Rlsvi,
    ] {
        assert!(bound(kind, 1.0).applies, "{kind:?} at scale 1");
        let b = bound(kind, 0.05);
        assert!(!b.applies, "{kind:?} at scale 0.05");
        assert!(b.note.contains("scaled by 0.05"), "{}", b.note);
    }
    // PSRL's prior is not a bonus: scaling it does not change the note.
    assert!(bound(AlgorithmKind::Psrl, 2.0).note.contains("Bayesian"));
}

/// Results files written before `applies` existed read as applying.
#[test]
fn an_older_bound_without_applies_reads_as_applying() {
    let b: burnin::theory::Bound = serde_json::from_str(
        r#"{"source": "s", "formula": "f", "logs_dropped": "none", "burn_in": null, "values": [1.0]}"#,
    )
    .unwrap();
    assert!(b.applies);
    assert_eq!(b.note, "");
}

/// Where MVP's published constants let go: a row's bonus (Zhang et al.
/// 2024, Algorithm 1: c₁·√(Var·L/m) + c₂·√(σ²·L/m) + c₃·H·L/m with c₁ =
/// 460/9, c₂ = 2√2, c₃ = 544/9) is below H whatever the data once its
/// latest batch has m samples with b(m) < H at the largest variances.
/// Derived by hand for S = A = H = 2, K = 10⁷, δ = 0.05: L = ln(6.4·10¹⁸) =
/// 43.30, b(32 768) = 2.07 ≥ 2, b(65 536) = 1.43 < 2, so n* = 131 072 visits
/// and, spread evenly over the S·A = 4 pairs of a step, K* = 524 288.
#[test]
fn mvp_marks_where_its_bonus_falls_below_h() {
    let set = Setting {
        states: 2,
        actions: 2,
        horizon: 2,
        episodes: 10_000_000,
        delta: 0.05,
    };
    assert!((burnin::learn::mvp_log_factor(&set) - 43.302_829_664).abs() < 1e-8);
    assert!((burnin::learn::mvp_largest_bonus(&set, 32_768.0) - 2.069_176_338).abs() < 1e-8);
    // The first MVP reads all 2^i samples at the rebuild at count 2^i, so
    // the 65 536 samples of b(65 536) < 2 are read from 65 536 visits on:
    // K* = 4·65 536 = 262 144.
    for (kind, samples, n, k) in [
        (
            AlgorithmKind::Mvp,
            MvpSamples::LatestBatch,
            131_072.0,
            524_288.0,
        ),
        (AlgorithmKind::Mvp2021, MvpSamples::All, 65_536.0, 262_144.0),
    ] {
        assert_eq!(
            burnin::learn::mvp_visits_for_bonus_below_h(&set, samples),
            n
        );
        let b = Algorithm::new(kind).bound(&set, &[1, 10]).unwrap();
        assert_eq!(b.bonus_below_h, Some(k), "{kind:?}");
    }
    // Not for a scaled bonus, nor for other learners.
    assert_eq!(
        Algorithm::with(AlgorithmKind::Mvp, 0.1)
            .bound(&set, &[1])
            .unwrap()
            .bonus_below_h,
        None
    );
    assert_eq!(
        bound(AlgorithmKind::UcbviBernstein, 1.0).bonus_below_h,
        None
    );
}

/// The first MVP by the one rule (src/theory.rs): Zhang, Ji & Du (2021)
/// state √(S·A·K) + S²·A for a total reward at most 1 and a stationary
/// kernel (abstract); values × H and S → S·H give √(S·A·H³·K) + S²·A·H³,
/// minimax from K ≥ S³·A·H³ (derived by hand for S = 3, A = 2, H = 4:
/// lower term 9·2·64 = 1 152, burn-in 27·2·64 = 3 456, and at K = 10⁴
/// √(3·2·64·10⁴) + 1 152). Table 1 of arXiv:2307.13586 prints S²·A·H²,
/// which the note says.
#[test]
fn mvp_2021_bound_follows_the_one_rule() {
    let b = bound(AlgorithmKind::Mvp2021, 1.0);
    assert_eq!(b.burn_in, Some(3_456.0));
    assert_eq!(b.values[0], 4.0, "capped at H·K for K = 1");
    let want = (3.0f64 * 2.0 * 64.0 * 1e4).sqrt() + 1_152.0;
    assert!(
        (b.values[1] - want).abs() < 1e-9,
        "{} vs {want}",
        b.values[1]
    );
    assert!(b.formula.contains("S²·A·H³"), "{}", b.formula);
    assert!(
        b.note.contains("Table 1") && b.note.contains("S²·A·H²"),
        "{}",
        b.note
    );
}

/// Q-learning with the Bernstein bonus: Jin et al. (2018), Theorem 2,
/// √(H³·S·A·T) + √(H⁹·S³·A³) with T = K·H, log factors dropped:
/// √(S·A·H⁴·K) + √(S³·A³·H⁹), the √K term dominating from K = S²·A²·H⁵
/// (derived by hand for S = 3, A = 2, H = 4: burn-in 9·4·1024 = 36 864,
/// lower term √(27·8·4⁹) = √56 623 104, and at K = 10⁶ √(6·256·10⁶) plus it).
#[test]
fn q_ucb_bernstein_bound_is_theorem_2() {
    let b = bound(AlgorithmKind::QUcbBernstein, 1.0);
    assert_eq!(b.burn_in, Some(36_864.0));
    let want = (6.0f64 * 256.0 * 1e6).sqrt() + 56_623_104f64.sqrt();
    assert!(
        (b.values[2] - want).abs() < 1e-6,
        "{} vs {want}",
        b.values[2]
    );
    assert_eq!(b.values[0], 4.0, "capped at H·K for K = 1");
    assert!(b.source.contains("Theorem 2"), "{}", b.source);
}

/// RLSVI: Russo (NeurIPS 2019), Õ(H³·S^{3/2}·√(A·K)) (the rate from a
/// secondary source [V2], docs/papers/rlsvi.md), for time-inhomogeneous
/// transitions and per-step rewards in [0, 1] — our setting, so drawn as
/// published, no S → S·H — a worst-case bound on every fixed model, with no
/// lower-order term (no burn-in). Derived by hand for S = 3, A = 2, H = 4:
/// 64·√27·√2·√K = 64·√54·√K ≈ 470.3·√K, capped at H·K: 4 at K = 1, 40 000
/// at K = 10⁴ (470.3·100 > 40 000), 64 000·√54 at K = 10⁶.
#[test]
fn rlsvi_bound_is_russos_as_published() {
    let b = bound(AlgorithmKind::Rlsvi, 1.0);
    assert_eq!(b.values[0], 4.0, "capped at H·K for K = 1");
    assert_eq!(b.values[1], 40_000.0, "capped at H·K for K = 10⁴");
    let want = 64_000.0 * 54f64.sqrt();
    assert!(
        (b.values[2] - want).abs() < 1e-6,
        "{} vs {want}",
        b.values[2]
    );
    assert_eq!(b.burn_in, None);
    assert!(b.applies, "a worst-case bound at the published variance");
    assert!(b.source.contains("Russo"), "{}", b.source);
}

//! Published regret bounds and burn-in thresholds, to draw beside measured
//! regret.
//!
//! Every bound is reported as its order: constants and logarithmic factors
//! dropped (each entry says which log power the source carries), so a curve
//! shows the shape of the guarantee, not a number the algorithm must beat.
//!
//! # One rule for the setting (December 2026)
//! Our setting is time-inhomogeneous (transitions and rewards per step h),
//! rewards in [0, 1] per step, K episodes, T = K·H steps. A bound proved
//! for that setting is drawn as published. A bound proved for a *stationary*
//! MDP is read on the layered MDP whose states are the S·H pairs (step,
//! state): every learner here keeps its statistics per step, so it *is* the
//! stationary algorithm run on that layered MDP, and the theorem applies to
//! it with S → S·H in every term, H and A unchanged — a translation that is
//! itself a theorem, not a guess. A bound proved for a total reward at most
//! 1 per episode is multiplied by H (our values reach H; dividing our
//! rewards by H puts a model in that setting). Table 1 of Zhang, Chen, Lee & Du
//! (arXiv:2307.13586) translates some rows otherwise (it lists UCBVI's
//! lower-order term as S²·A·H³ where S → S·H gives S²·A·H⁴); a bound's note
//! says so where it differs. Burn-in thresholds are derived by hand from the
//! drawn bound: the K at which its √K term overtakes the lower-order one.
//! A Bayesian-regret bound (PSRL's) bounds the regret averaged over a prior,
//! not the regret on one fixed model: it is drawn, marked as not applying.
//!
//! # References
//! - Z. Zhang, Y. Chen, J. D. Lee and S. S. Du, "Settling the Sample
//!   Complexity of Online Reinforcement Learning", COLT 2024, arXiv:2307.13586.
//! - M. G. Azar, I. Osband and R. Munos, ICML 2017, arXiv:1703.05449.
//! - Z. Zhang, X. Ji and S. S. Du, COLT 2021, arXiv:2009.13503.
//! - A. Zanette and E. Brunskill, ICML 2019, arXiv:1901.00210.
//! - C. Dann, L. Li, W. Wei and E. Brunskill, ICML 2019, arXiv:1811.03056.
//! - C. Jin, Z. Allen-Zhu, S. Bubeck and M. I. Jordan, NeurIPS 2018, arXiv:1807.03765.
//! - G. Li, L. Shi, Y. Chen, Y. Gu and Y. Chi, NeurIPS 2021, arXiv:2110.04645.
//! - Z. Zhang, Y. Zhou and X. Ji, NeurIPS 2020, arXiv:2004.10019.
//! - I. Osband, D. Russo and B. Van Roy, NeurIPS 2013, arXiv:1306.0940.
//! - D. Russo, NeurIPS 2019, arXiv:1906.02870.
//! - D. Tiapkin, D. Belomestny, D. Calandriello, É. Moulines, R. Munos, A. Naumov,
//!   M. Rowland, M. Valko and P. Ménard, NeurIPS 2022, arXiv:2209.14414.
//! - P. Auer, N. Cesa-Bianchi and P. Fischer, *Machine Learning* 47, 2002.
//! - O. D. Domingues, P. Ménard, E. Kaufmann and M. Valko, ALT 2021, arXiv:2010.03531.

use serde::{Deserialize, Serialize};

use crate::learn::{MvpSamples, Setting};

/// A published regret bound, as an order in K.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Bound {
    /// Where it is published.
    pub source: String,
    /// The bound in words, e.g. "√(S·A·H³·K) + S²·A·H³".
    pub formula: String,
    /// Log factors the source carries and the curve leaves out.
    pub logs_dropped: String,
    /// K from which the √K term dominates (None: no lower-order term).
    pub burn_in: Option<f64>,
    /// min(H·K, leading + lower) at each checkpoint.
    pub values: Vec<f64>,
    /// Whether the bound covers the learner as it ran (false when its bonus
    /// is scaled: the theorems hold for the published constants only).
    #[serde(default = "applies_by_default")]
    pub applies: bool,
    /// Why it does not apply, when it does not.
    #[serde(default)]
    pub note: String,
    /// MVP (both versions) only: the episode by which every (h, s, a)
    /// would have the visits after which its bonus is below H whatever the
    /// data, were visits spread evenly over the S·A pairs of each step
    /// (S·A·n*, n* of `learn::mvp::visits_for_bonus_below_h`): where, with
    /// the published constants, the curve can first bend.
    #[serde(default)]
    pub bonus_below_h: Option<f64>,
}

/// The start of the note of a bound on the Bayesian regret ([`psrl`]).
const BAYESIAN_NOTE: &str = "a Bayesian-regret bound";

impl Bound {
    /// Why the bound does not apply, in a legend's few words: "Bayesian
    /// regret" for a bound on the regret averaged over a prior, otherwise
    /// "bonus scaled" (the learner's constants are not the published ones).
    pub fn why_not(&self) -> &'static str {
        if self.note.starts_with(BAYESIAN_NOTE) {
            "Bayesian regret"
        } else {
            "bonus scaled"
        }
    }
}

fn applies_by_default() -> bool {
    true
}

/// S, A, H of a setting as numbers.
fn sah(set: &Setting) -> (f64, f64, f64) {
    (set.states as f64, set.actions as f64, set.horizon as f64)
}

fn curve(
    set: &Setting,
    ks: &[u64],
    leading: impl Fn(f64) -> f64,
    lower: impl Fn(f64) -> f64,
) -> Vec<f64> {
    let h = set.horizon as f64;
    ks.iter()
        .map(|&k| {
            let k = k as f64;
            (leading(k) + lower(k)).min(h * k)
        })
        .collect()
}

fn bound(source: &str, formula: &str, logs: &str, burn_in: Option<f64>, values: Vec<f64>) -> Bound {
    Bound {
        source: source.into(),
        formula: formula.into(),
        logs_dropped: logs.into(),
        burn_in,
        values,
        applies: true,
        note: String::new(),
        bonus_below_h: None,
    }
}

/// √(S·A·H³·K): the minimax rate (lower bound shape and MVP's bound).
pub fn minimax(set: &Setting, k: f64) -> f64 {
    let (s, a, h) = sah(set);
    (s * a * h * h * h * k).sqrt()
}

/// A bound √(S·A·H³·K) + `lower`, with its burn-in: the K from which the √K
/// term overtakes the constant one, lower²/(S·A·H³).
fn minimax_plus(
    set: &Setting,
    ks: &[u64],
    source: &str,
    formula: &str,
    logs: &str,
    lower: f64,
) -> Bound {
    let (s, a, h) = sah(set);
    bound(
        source,
        formula,
        logs,
        Some(lower * lower / (s * a * h * h * h)),
        curve(set, ks, |k| minimax(set, k), |_| lower),
    )
}

/// The lower-bound shape min(√(S·A·H³·K), H·K) of Domingues et al. (2021).
pub fn lower_bound(set: &Setting, ks: &[u64]) -> Bound {
    bound(
        "Domingues, Ménard, Kaufmann & Valko, ALT 2021 (Theorem 9, as we recall it)",
        "Ω(min{√(S·A·H³·K), H·K})",
        "none",
        None,
        curve(set, ks, |k| minimax(set, k), |_| 0.0),
    )
}

/// MVP: Zhang, Chen, Lee & Du (2024), Theorem 1; with the point where its
/// bonus can first fall below H marked (derived from the bonus formula of
/// their Algorithm 1, see `src/learn/mvp.rs`).
pub fn mvp(set: &Setting, ks: &[u64]) -> Bound {
    let mut b = bound(
        "Zhang, Chen, Lee & Du, COLT 2024, arXiv:2307.13586, Theorem 1",
        "min{√(S·A·H³·K), H·K}",
        "log⁵(S·A·H·K/δ) inside the root",
        None,
        curve(set, ks, |k| minimax(set, k), |_| 0.0),
    );
    mark_bonus_below_h(&mut b, set, MvpSamples::LatestBatch);
    b
}

/// Marks on `b` the episode by which MVP's bonus is below H whatever the
/// data (see [`Bound::bonus_below_h`]).
fn mark_bonus_below_h(b: &mut Bound, set: &Setting, samples: MvpSamples) {
    let n = crate::learn::mvp_visits_for_bonus_below_h(set, samples);
    b.bonus_below_h = Some(set.states as f64 * set.actions as f64 * n);
}

/// The first MVP (Zhang, Ji & Du 2021): the paper states Õ(√(S·A·K) + S²·A)
/// for a stationary kernel and a total reward at most 1 (its abstract; the
/// theorem itself not read). By the one rule (module doc): values scaled by
/// H, and S → S·H on the layered MDP: H·√(S·H·A·K) + H·(S·H)²·A =
/// √(S·A·H³·K) + S²·A·H³, the √K term overtaking from K = (S²·A·H³)² /
/// (S·A·H³) = S³·A·H³ (derived by hand). Table 1 of arXiv:2307.13586 prints
/// the lower-order term as S²·A·H² (burn-in S³·A·H, PAC S·A·H³/ε² +
/// S²·A·H²/ε): a factor H below, which the bound's note says.
pub fn mvp_2021(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let mut b = minimax_plus(
        set,
        ks,
        "Zhang, Ji & Du, COLT 2021, arXiv:2009.13503 (abstract), values × H and S → S·H",
        "√(S·A·H³·K) + S²·A·H³",
        "polylog(S·A·H·K) factors",
        s * s * a * h * h * h,
    );
    b.note = "Table 1 of arXiv:2307.13586 lists the lower-order term as S²·A·H² (burn-in S³·A·H), a factor H below the stationary bound read with values × H and S → S·H".into();
    mark_bonus_below_h(&mut b, set, MvpSamples::All);
    b
}

/// UCBVI with the Hoeffding bonus: Azar et al. (2017), Theorem 1, stated
/// for a stationary MDP as H·√(S·A·T) + H²·S²·A (T = K·H, log factors
/// dropped; from memory). Our learner keeps statistics per step, so it is
/// the stationary algorithm on the S·H states (step, state): with S → S·H,
/// as for every learner here, the leading term is √(S·A·H⁴·K) and the
/// lower-order one H²·(S·H)²·A = S²·A·H⁴; the √K term overtakes it from
/// K = (S²·A·H⁴)² / (S·A·H⁴) = S³·A·H⁴.
pub fn ucbvi_hoeffding(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let lower = s * s * a * h.powi(4);
    bound(
        "Azar, Osband & Munos, ICML 2017, Theorem 1, with S → S·H (from memory)",
        "√(S·A·H⁴·K) + S²·A·H⁴",
        "L = ln(S·A·H·K/δ)",
        Some(lower * lower / (s * a * h.powi(4))),
        curve(set, ks, |k| (s * a * h.powi(4) * k).sqrt(), |_| lower),
    )
}

/// UCBVI with the Bernstein bonus: Azar et al. (2017), Theorem 2, stated
/// for a stationary MDP as √(H·S·A·T) + H²·S²·A (T = K·H, log factors
/// dropped; from memory). With S → S·H (module doc): √(S·A·H³·K) +
/// S²·A·H⁴, the √K term overtaking from K = (S²·A·H⁴)² / (S·A·H³) =
/// S³·A·H⁵. Table 1 of arXiv:2307.13586 lists the lower-order term as
/// S²·A·H³ (burn-in S³·A·H³): a factor H below this translation.
pub fn ucbvi_bernstein(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let mut b = minimax_plus(
        set,
        ks,
        "Azar, Osband & Munos, ICML 2017, Theorem 2, with S → S·H (from memory)",
        "√(S·A·H³·K) + S²·A·H⁴",
        "L = ln(S·A·H·K/δ)",
        s * s * a * h.powi(4),
    );
    b.note = "Table 1 of arXiv:2307.13586 lists the lower-order term as S²·A·H³ (burn-in S³·A·H³), a factor H below the stationary theorem read with S → S·H".into();
    b
}

/// EULER: Zanette & Brunskill (2019), the main regret theorem (numbered
/// Theorem 1 as we recall it [R]; docs/papers/euler.md: the full text was
/// not reached, the statement is recalled and only its shape — a leading
/// term driven by the variance of the next-state value — is in the abstract
/// [V]): for a stationary MDP with rewards in [0, 1] and the total reward of
/// an episode at most 𝒢, Õ(min{√(ℚ*·S·A·T), √(𝒢²·S·A·K)} plus
/// √S·S·A·H²·(√S+√H)) with T = K·H [R]. Drawn is its worst case 𝒢 = H
/// (which the min never exceeds; the ℚ* branch depends on the model):
/// √(H²·S·A·K) plus S^{3/2}·A·H²·(√S+√H). By the one rule (module doc),
/// S → S·H: √(S·A·H³·K) plus (S·H)^{3/2}·A·H²·(√(S·H)+√H), that is
/// √(S·A·H³·K) plus S^{3/2}·A·H⁴·(√S+1); the √K term overtakes from
/// K = (S^{3/2}·A·H⁴·(√S+1))²/(S·A·H³) = S²·A·H⁵·(√S+1)² (derived by
/// hand). Table 1 of arXiv:2307.13586 lists the lower-order term as
/// S^{3/2}·A·H³·(√S+√H) [V2] and prints its burn-in as S²·A·H³·(√S+√H),
/// which lacks the square that its own lower-order term gives,
/// S²·A·H³·(√S+√H)²; the note says both.
pub fn euler(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let mut b = minimax_plus(
        set,
        ks,
        "Zanette & Brunskill, ICML 2019, arXiv:1901.00210, main theorem with 𝒢 = H (recalled, full text not read), with S → S·H",
        "√(S·A·H³·K) + S^{3/2}·A·H⁴·(√S+1)",
        "polylog(S·A·H·K/δ) factors",
        s * s.sqrt() * a * h.powi(4) * (s.sqrt() + 1.0),
    );
    b.note = "Table 1 of arXiv:2307.13586 lists the lower-order term as S^{3/2}·A·H³·(√S+√H), below the stationary theorem read with S → S·H, and prints its burn-in as S²·A·H³·(√S+√H), which lacks a square: from that lower-order term the burn-in is S²·A·H³·(√S+√H)²; drawn here, the burn-in S²·A·H⁵·(√S+1)² of the translated term".into();
    b
}

/// ORLC: Dann, Li, Wei & Brunskill (2019), the tabular regret bound
/// (Theorem 3 as we recall its number [R]): Õ(√(S·A·H²·T) + S²·A·H³) for
/// every T, with T the number of *episodes*, a stationary kernel and rewards
/// in [0, 1] per step [V: docs/papers/orlc.md; the log factors inside Õ not
/// read]. By the one rule (module doc), S → S·H on the layered MDP:
/// √(S·H·A·H²·K) + (S·H)²·A·H³ = √(S·A·H³·K) + S²·A·H⁵, the √K term
/// overtaking from K = (S²·A·H⁵)²/(S·A·H³) = S³·A·H⁷ (derived by hand).
/// Table 1 of arXiv:2307.13586 lists the lower-order term as S²·A·H⁴
/// (burn-in S³·A·H⁵, PAC S·A·H³/ε² + S²·A·H⁴/ε): the paper's stationary
/// S²·A·H³ times H, where the rule's S² → (S·H)² gives a further H; the
/// note says so, as for UCBVI-Bernstein.
pub fn orlc(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let mut b = minimax_plus(
        set,
        ks,
        "Dann, Li, Wei & Brunskill, ICML 2019, arXiv:1811.03056, tabular regret bound (Theorem 3 as recalled), with S → S·H",
        "√(S·A·H³·K) + S²·A·H⁵",
        "polylog(S·A·H·K/δ) factors (not read)",
        s * s * a * h.powi(5),
    );
    b.note = "Table 1 of arXiv:2307.13586 lists the lower-order term as S²·A·H⁴ (burn-in S³·A·H⁵), a factor H below the stationary theorem √(S·A·H²·T) + S²·A·H³ (T episodes) read with S → S·H".into();
    b
}

/// Optimistic Q-learning with the Hoeffding bonus: Jin et al. (2018), Theorem 1.
pub fn q_ucb_hoeffding(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    bound(
        "Jin, Allen-Zhu, Bubeck & Jordan, NeurIPS 2018, Theorem 1",
        "√(H⁴·S·A·T) = √(S·A·H⁵·K)",
        "ι = ln(S·A·T/δ) inside the root",
        None,
        curve(set, ks, |k| (s * a * h.powi(5) * k).sqrt(), |_| 0.0),
    )
}

/// Optimistic Q-learning with the Bernstein bonus: Jin et al. (2018),
/// Theorem 2, O(√(H³·S·A·T·ι) + √(H⁹·S³·A³)·ι²) with T = K·H, stated for
/// time-dependent transitions and per-step rewards in [0, 1] (our setting,
/// no translation): √(S·A·H⁴·K) + H⁴·⁵·S¹·⁵·A¹·⁵. The √K term overtakes the
/// lower-order one from K = H⁹·S³·A³/(S·A·H⁴) = S²·A²·H⁵ (derived by hand).
/// The theorem holds for large enough absolute constants c₁, c₂; at
/// `bonus_scale` 1 it is drawn for ours (c₁ = c₂ = 1, `src/learn/qlearn.rs`),
/// as Theorem 1 is for the Hoeffding variant's c = 1.
pub fn q_ucb_bernstein(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let lower = (h.powi(9) * (s * a).powi(3)).sqrt();
    bound(
        "Jin, Allen-Zhu, Bubeck & Jordan, NeurIPS 2018, Theorem 2",
        "√(H³·S·A·T) + √(H⁹·S³·A³) = √(S·A·H⁴·K) + √(S³·A³·H⁹)",
        "ι = ln(S·A·T/δ) inside the first root, ι² on the second term",
        Some(s * s * a * a * h.powi(5)),
        curve(set, ks, |k| (s * a * h.powi(4) * k).sqrt(), |_| lower),
    )
}

/// UCB-Advantage: Zhang, Zhou & Ji (2020), the main theorem (Theorem 1 as
/// we recall it [R]): O(√(H²·S·A·T·ι) + H⁸·S²·A^{3/2}·T^{1/4}) with high
/// probability, for time-inhomogeneous transitions and per-step rewards in
/// [0, 1] [R: the setting is inferred from the abstract's claim of matching
/// the lower bound, docs/papers/ucb-advantage.md] — our setting, drawn as
/// published. Only the √(H²·S·A·T) rate is read [V: abstract]; the second
/// term and the log powers are recalled [R]. With T = K·H:
/// √(S·A·H³·K) + S²·A^{3/2}·H^{33/4}·K^{1/4} (H⁸·H^{1/4} = H^{33/4}), which
/// is Table 1's row of arXiv:2307.13586 [V] term for term. The √K term
/// overtakes the K^{1/4} one when K^{1/4} = S^{3/2}·A·H^{27/4}, i.e. from
/// K = S⁶·A⁴·H²⁷, Table 1's burn-in (derived by hand). The theorem holds for
/// a large enough c₄ in the reference threshold; at `bonus_scale` 1 it is
/// drawn for ours (c₄ = 1, `src/learn/ucb_advantage.rs`), as the Q-learning
/// bounds are for their c = 1.
pub fn ucb_advantage(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let fourth_root = |x: f64| x.sqrt().sqrt();
    let lower = s * s * a * a.sqrt() * h.powi(8) * fourth_root(h);
    bound(
        "Zhang, Zhou & Ji, NeurIPS 2020, arXiv:2004.10019, Theorem 1 (as recalled; the abstract gives the √(H²·S·A·T) rate)",
        "√(H²·S·A·T) + H⁸·S²·A^{3/2}·T^{1/4} = √(S·A·H³·K) + S²·A^{3/2}·H^{33/4}·K^{1/4}",
        "ι = ln(S·A·T/δ) inside the first root, polylog factors on the second term",
        Some(s.powi(6) * a.powi(4) * h.powi(27)),
        curve(set, ks, |k| minimax(set, k), |k| lower * fourth_root(k)),
    )
}

/// Q-EarlySettled-Advantage: Li, Shi, Chen, Gu & Chi (2021), the main
/// theorem (recalled as Theorem 1 [R]; the full text was not read, see
/// `src/learn/early_settled.rs`): with probability 1 − δ, regret
/// √(S·A·H²·T) + S·A·H⁶ up to log factors, T = K·H, for time-inhomogeneous
/// transitions and per-step rewards in [0, 1] — our setting, so drawn as
/// published (no S → S·H): √(S·A·H³·K) + S·A·H⁶, the √K term overtaking
/// from K = (S·A·H⁶)²/(S·A·H³) = S·A·H⁹ (derived by hand). That is Table 1
/// of arXiv:2307.13586's row [V there] (lower-order S·A·H⁶, minimax from
/// K ≥ S·A·H⁹), and of the order S·A·poly(H) the abstract promises for the
/// burn-in [V]. The theorem holds for a large enough c_b; at `bonus_scale`
/// 1 it is drawn for ours (c_b = 1), as for Q-learning's constants.
pub fn q_early_settled(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    minimax_plus(
        set,
        ks,
        "Li, Shi, Chen, Gu & Chi, NeurIPS 2021, arXiv:2110.04645, main theorem as recalled; Table 1 of arXiv:2307.13586",
        "√(S·A·H²·T) + S·A·H⁶ = √(S·A·H³·K) + S·A·H⁶",
        "polylog(S·A·T/δ) factors (powers not read)",
        s * a * h.powi(6),
    )
}

/// PSRL: Osband, Russo & Van Roy (2013), Theorem 1: Bayesian regret
/// O(τ·S·√(A·T·log(S·A·T))) for episodes of length τ = H and T = K·H steps,
/// stated for a time-homogeneous MDP. Our learner keeps a posterior per step
/// h, so it is PSRL on the S·H states (step, state): with S → S·H (module
/// doc), τ·(S·H)·√(A·T) = √(S²·A·H⁵·K) — a factor H above the published
/// τ·S·√(A·T), which is the price of the per-step posterior. The theorem
/// bounds the regret *averaged over the prior* the model is drawn from, not
/// the regret on one fixed model, so it is marked as not applying.
pub fn psrl(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    let mut b = bound(
        "Osband, Russo & Van Roy, NeurIPS 2013, Theorem 1 (Bayesian regret), with S → S·H",
        "H·(S·H)·√(A·T) = √(S²·A·H⁵·K)",
        "√(log(S·A·T)) factor",
        None,
        curve(set, ks, |k| (s * s * a * h.powi(5) * k).sqrt(), |_| 0.0),
    );
    b.applies = false;
    b.note = format!(
        "{BAYESIAN_NOTE}: it bounds the regret averaged over the prior, not the regret on this fixed model"
    );
    b
}

/// OPSRL: Tiapkin et al. (2022), the main theorem (recalled as Theorem 1
/// [R]): with probability at least 1 − δ the regret is Õ(√(H³·S·A·T)) [V:
/// the abstract], T the number of episodes (our K), for step-dependent
/// transitions and per-step rewards in [0, 1] — our setting, so by the one
/// rule (module doc) it is drawn as published, no S → S·H: √(S·A·H³·K), the
/// minimax rate. The theorem's lower-order term (independent of K,
/// polynomial in S, A, H) was not read (docs/papers/opsrl.md): the curve
/// leaves it out and no burn-in is drawn — `burn_in` None here means "not
/// known", not "none", which the note says; nothing is invented for it.
/// OPSRL is not a row of Table 1 of arXiv:2307.13586. It covers the
/// published constants only: at a bonus scale other than 1 the catalogue
/// marks it as not applying.
pub fn opsrl(set: &Setting, ks: &[u64]) -> Bound {
    let mut b = bound(
        "Tiapkin, Belomestny, Calandriello, Moulines, Munos, Naumov, Rowland, Valko & Ménard, NeurIPS 2022, arXiv:2209.14414 (abstract; the theorem itself not read)",
        "√(H³·S·A·K) + (a lower-order term, not read)",
        "polylog(S·A·H·K/δ) factors",
        None,
        curve(set, ks, |k| minimax(set, k), |_| 0.0),
    );
    b.note = "the lower-order term of the theorem was not read: the curve is its leading term only, and no burn-in is known (none is drawn)".into();
    b
}

/// RLSVI, tabular: Russo (2019), the main theorem (numbered Theorem 1 as we
/// recall it [R]): with β_k = ½·S·H³·log(2HSAk), for every tabular MDP the
/// regret is Õ(H³·S^{3/2}·√(A·K)) [V2: the rate and β_k from the
/// sciencestack.ai summary; the statement itself and its log factors not
/// read]; with T = K·H this is H^{5/2}·S^{3/2}·√(A·T) (arithmetic). The
/// setting is ours [R]: period-indexed (time-inhomogeneous) transitions and
/// rewards in [0, 1] per step, K episodes, so by the one rule (module doc) it
/// is drawn as published, no S → S·H. It is a worst-case (frequentist)
/// bound: it holds on every fixed MDP, not averaged over a prior as PSRL's
/// is; we recall it as bounding the regret in expectation over the
/// algorithm's noise [R] (docs/papers/rlsvi.md), not with probability 1 − δ.
/// No lower-order term, so no burn-in. It covers the published variance
/// only: at a noise scale other than 1 the catalogue marks it as not
/// applying.
pub fn rlsvi(set: &Setting, ks: &[u64]) -> Bound {
    let (s, a, h) = sah(set);
    bound(
        "Russo, NeurIPS 2019, arXiv:1906.02870, main theorem (as summarised; statement not read)",
        "H³·S^{3/2}·√(A·K)",
        "polylog(S·A·H·K) factors",
        None,
        curve(
            set,
            ks,
            |k| h * h * h * s * s.sqrt() * (a * k).sqrt(),
            |_| 0.0,
        ),
    )
}

/// UCB1: Auer, Cesa-Bianchi & Fischer (2002), in its gap-free form.
pub fn ucb1(set: &Setting, ks: &[u64]) -> Bound {
    let (_, a, _) = sah(set);
    bound(
        "Auer, Cesa-Bianchi & Fischer, Machine Learning 2002 (gap-free form √(A·K·ln K), common practice)",
        "√(A·K)",
        "√(ln K)",
        None,
        curve(set, ks, |k| (a * k).sqrt(), |_| 0.0),
    )
}

/// Order of the episodes an ε-accurate policy needs: S·A·H³/ε² (the PAC
/// bound of arXiv:2307.13586, log factors dropped).
pub fn pac_episodes(set: &Setting, epsilon: f64) -> f64 {
    let (s, a, h) = sah(set);
    // Bounded: no results file carries an infinite number (#35).
    (s * a * h * h * h / (epsilon * epsilon)).min(f64::MAX)
}

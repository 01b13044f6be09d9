//! Published regret bounds and burn-in thresholds, to draw beside measured
//! regret.
//!
//! Every bound is reported as its order: constants and logarithmic factors
//! dropped (each entry says which log power the source carries), so a curve
//! shows the shape of the guarantee, not a number the algorithm must beat.
//! The rates are for the time-inhomogeneous setting with rewards in [0, 1]
//! (values at most H), as collected in Table 1 of Zhang, Chen, Lee & Du
//! (arXiv:2307.13586); entries other than MVP's are as we recall that table,
//! from memory, and the burn-in thresholds are derived from them by hand
//! (the K at which the √K term overtakes the lower-order one).
//!
//! # References
//! - Z. Zhang, Y. Chen, J. D. Lee and S. S. Du, "Settling the Sample
//!   Complexity of Online Reinforcement Learning", COLT 2024, arXiv:2307.13586.
//! - M. G. Azar, I. Osband and R. Munos, ICML 2017, arXiv:1703.05449.
//! - C. Jin, Z. Allen-Zhu, S. Bubeck and M. I. Jordan, NeurIPS 2018, arXiv:1807.03765.
//! - I. Osband, D. Russo and B. Van Roy, NeurIPS 2013, arXiv:1306.0940.
//! - P. Auer, N. Cesa-Bianchi and P. Fischer, *Machine Learning* 47, 2002.
//! - O. D. Domingues, P. Ménard, E. Kaufmann and M. Valko, ALT 2021, arXiv:2010.03531.

use serde::{Deserialize, Serialize};

/// The problem sizes a bound depends on.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Sizes {
    pub s: f64,
    pub a: f64,
    pub h: f64,
    pub delta: f64,
}

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
}

fn curve(
    z: Sizes,
    ks: &[u64],
    leading: impl Fn(f64) -> f64,
    lower: impl Fn(f64) -> f64,
) -> Vec<f64> {
    ks.iter()
        .map(|&k| {
            let k = k as f64;
            (leading(k) + lower(k)).min(z.h * k)
        })
        .collect()
}

/// √(S·A·H³·K): the minimax rate (lower bound shape and MVP's bound).
pub fn minimax(z: Sizes, k: f64) -> f64 {
    (z.s * z.a * z.h * z.h * z.h * k).sqrt()
}

/// The lower-bound shape min(√(S·A·H³·K), H·K) of Domingues et al. (2021).
pub fn lower_bound(z: Sizes, ks: &[u64]) -> Bound {
    Bound {
        source: "Domingues, Ménard, Kaufmann & Valko, ALT 2021 (Theorem 9, as we recall it)".into(),
        formula: "Ω(min{√(S·A·H³·K), H·K})".into(),
        logs_dropped: "none".into(),
        burn_in: None,
        values: curve(z, ks, |k| minimax(z, k), |_| 0.0),
    }
}

/// The published bound of a learner, by its algorithm key.
pub fn bound(key: &str, z: Sizes, ks: &[u64]) -> Option<Bound> {
    let (s, a, h) = (z.s, z.a, z.h);
    let b =
        |source: &str, formula: &str, logs: &str, burn_in: Option<f64>, values: Vec<f64>| Bound {
            source: source.into(),
            formula: formula.into(),
            logs_dropped: logs.into(),
            burn_in,
            values,
        };
    Some(match key {
        "mvp" => b(
            "Zhang, Chen, Lee & Du, COLT 2024, arXiv:2307.13586, Theorem 1",
            "min{√(S·A·H³·K), H·K}",
            "log⁵(S·A·H·K/δ) inside the root",
            None,
            curve(z, ks, |k| minimax(z, k), |_| 0.0),
        ),
        "ucbvi-hoeffding" => {
            // Azar et al. (2017), Theorem 1, in the time-inhomogeneous form:
            // √(S·A·H⁴·K) for the Hoeffding bonus (T = K·H; an extra √H over
            // the Bernstein bonus), lower order S²·A·H³ (from memory).
            let lower = s * s * a * h * h * h;
            b(
                "Azar, Osband & Munos, ICML 2017, Theorem 1 (time-inhomogeneous form, from memory)",
                "√(S·A·H⁴·K) + S²·A·H³",
                "L = ln(S·A·H·K/δ)",
                Some(lower * lower / (s * a * h.powi(4))),
                curve(z, ks, |k| (s * a * h.powi(4) * k).sqrt(), |_| lower),
            )
        }
        "ucbvi-bernstein" => {
            // Table 1 of arXiv:2307.13586 lists UCBVI at √(S·A·H³·K) + S²·A·H³
            // with burn-in S³·A·H³ (from memory).
            let lower = s * s * a * h * h * h;
            b(
                "Azar, Osband & Munos, ICML 2017, Theorem 2; Table 1 of arXiv:2307.13586 (from memory)",
                "√(S·A·H³·K) + S²·A·H³",
                "L = ln(S·A·H·K/δ)",
                Some(lower * lower / (s * a * h * h * h)),
                curve(z, ks, |k| minimax(z, k), |_| lower),
            )
        }
        "q-ucb-hoeffding" => b(
            "Jin, Allen-Zhu, Bubeck & Jordan, NeurIPS 2018, Theorem 1",
            "√(H⁴·S·A·T) = √(S·A·H⁵·K)",
            "ι = ln(S·A·T/δ) inside the root",
            None,
            curve(z, ks, |k| (s * a * h.powi(5) * k).sqrt(), |_| 0.0),
        ),
        "psrl" => b(
            "Osband, Russo & Van Roy, NeurIPS 2013, Theorem 1 (Bayesian regret)",
            "H·S·√(A·T) = √(S²·A·H³·K)",
            "√(log(S·A·T)) factor",
            None,
            curve(z, ks, |k| (s * s * a * h * h * h * k).sqrt(), |_| 0.0),
        ),
        "ucb1" => b(
            "Auer, Cesa-Bianchi & Fischer, Machine Learning 2002 (gap-free form √(A·K·ln K), common practice)",
            "√(A·K)",
            "√(ln K)",
            None,
            curve(z, ks, |k| (a * k).sqrt(), |_| 0.0),
        ),
        _ => return None,
    })
}

/// Order of the episodes an ε-accurate policy needs: S·A·H³/ε² (the PAC
/// bound of arXiv:2307.13586, log factors dropped).
pub fn pac_episodes(z: Sizes, epsilon: f64) -> f64 {
    z.s * z.a * z.h * z.h * z.h / (epsilon * epsilon)
}

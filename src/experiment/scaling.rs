//! Scaling readings of a sweep: how each learner's burn-in and its regret
//! at K grow with the size the sweep changes (S, A, H or K), beside the
//! growth its published bound predicts.
//!
//! The exponent is the least-squares slope of ln y on ln x over the sweep's
//! points (a power law y ∝ x^b read on log–log axes; common practice), where
//! x is the one of S, A, H, K that varies from point to point (a sweep
//! over the lower-bound family's depth changes S alone) — or, when several
//! do and the swept parameter is itself a size (the lower-bound family's
//! `actions` changes A and S), the swept value, and the reading says
//! which. A sweep that changes no size (δ, a bonus scale, a slip
//! probability) has no scaling reading. A point where the learner's mean curve did
//! not settle by K has no burn-in: it is left out of the burn-in fit and
//! counted, and with fewer than two settled points there is no fit — the
//! reading says "did not settle by K at 5 of 6 points" instead of fitting
//! noise.
//!
//! Intervals: the seeds of every point are resampled with replacement
//! (Efron & Tibshirani, An Introduction to the Bootstrap, 1993, ch. 13),
//! each point's resampled mean curve read as the point estimate is
//! ([`super::readings`]), and the exponent fitted again; the 95% interval
//! is the 2.5% and 97.5% percentiles of the refits, given when at least
//! 95% of them had two settled points (none otherwise, and none when the
//! results do not keep each seed's curve).
//!
//! The published exponent is the same least-squares slope through the
//! bound's own burn-in (the K from which its √K term dominates) and its
//! value at K, as the catalogue computes them for each point — so it is
//! the order the theory predicts on exactly these instances.

use serde::{Deserialize, Serialize};

use super::readings::{BOOTSTRAP_RESAMPLES, burn_in, linear_at_end};
use super::results::{Results, number_text};
use crate::stats::ls_slope;

/// What a sweep's exponents are measured in, and the value of it at each
/// point.
pub fn variable(parameter: &str, values: &[f64], points: &[Results]) -> Option<(String, Vec<f64>)> {
    let sizes: [(&str, Vec<f64>); 4] = [
        ("S", points.iter().map(|p| p.states as f64).collect()),
        ("A", points.iter().map(|p| p.actions as f64).collect()),
        ("H", points.iter().map(|p| p.horizon as f64).collect()),
        ("K", points.iter().map(|p| p.episodes as f64).collect()),
    ];
    let varies = |xs: &[f64]| xs.iter().any(|&x| x != xs[0]);
    let moving: Vec<&(&str, Vec<f64>)> = sizes.iter().filter(|(_, xs)| varies(xs)).collect();
    // Several sizes moving together (the lower-bound family's actions
    // change A and S): the exponent is read in the swept size itself. Any
    // other parameter (δ, a bonus scale, a slip probability) is no size.
    let size = ["states", "actions", "horizon", "episodes"]
        .contains(&parameter.trim_start_matches("generator."));
    let (name, xs) = match moving.as_slice() {
        [(name, xs)] => (name.to_string(), xs.clone()),
        _ if size => (parameter.to_string(), values.to_vec()),
        _ => return None,
    };
    let usable = xs.len() >= 2 && varies(&xs) && xs.iter().all(|&x| x > 0.0 && x.is_finite());
    usable.then_some((name, xs))
}

/// One learner's scaling reading over a sweep.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Scaling {
    /// Exponent b of burn-in ∝ x^b over the points that settled (None with
    /// fewer than two).
    pub burn_in_exponent: Option<f64>,
    /// Its 95% bootstrap interval over seeds.
    pub burn_in_exponent_interval: Option<(f64, f64)>,
    /// Points whose mean curve settled by K (the fit's points).
    pub settled_points: u64,
    /// Points in all.
    pub points: u64,
    /// Exponent of regret at K in x (points with positive regret).
    pub regret_exponent: Option<f64>,
    pub regret_exponent_interval: Option<(f64, f64)>,
    /// The exponent of the published bound's burn-in on these points (None:
    /// the bound has no lower-order term, or the learner no bound).
    pub published_burn_in_exponent: Option<f64>,
    /// The exponent of the published bound's value at K on these points.
    pub published_regret_exponent: Option<f64>,
    /// Whether the published bound applies to the learner as it ran (false
    /// with a scaled bonus).
    pub published_applies: bool,
    /// The learner has a published bound without a lower-order term (MVP):
    /// its theory predicts no burn-in at all.
    pub published_no_burn_in: bool,
    /// The published bound at K is the trivial H·K at every point (its
    /// lower-order term is larger there): it predicts nothing about how
    /// regret at K grows.
    #[serde(default)]
    pub published_regret_trivial: bool,
}

/// The least-squares exponent of y on x, over the pairs where both are
/// positive and finite, with at least two distinct x.
pub fn exponent(x: &[f64], y: &[f64]) -> Option<f64> {
    let (lx, ly): (Vec<f64>, Vec<f64>) = x
        .iter()
        .zip(y)
        .filter(|(a, b)| **a > 0.0 && **b > 0.0 && a.is_finite() && b.is_finite())
        .map(|(a, b)| (libm::log(*a), libm::log(*b)))
        .unzip();
    if lx.len() < 2 || lx.iter().all(|&v| v == lx[0]) {
        return None;
    }
    let b = ls_slope(&lx, &ly);
    b.is_finite().then_some(b)
}

/// The scaling reading of learner `li` over `points` at sizes `x`.
pub fn read(points: &[Results], li: usize, x: &[f64], seed: u64) -> Scaling {
    let ls: Vec<_> = points.iter().map(|p| &p.learners[li]).collect();
    let burn: Vec<f64> = ls
        .iter()
        .map(|l| l.burn_in.map_or(f64::NAN, |b| b as f64))
        .collect();
    let regret: Vec<f64> = ls
        .iter()
        .map(|l| *l.regret_mean.last().unwrap_or(&f64::NAN))
        .collect();
    let settled = burn.iter().filter(|b| b.is_finite()).count();
    let bounds: Option<Vec<_>> = ls.iter().map(|l| l.bound.as_ref()).collect();
    let trivial = bounds.as_ref().is_some_and(|bs| {
        bs.iter().zip(points).all(|(b, p)| {
            let hk = p.horizon as f64 * p.episodes as f64;
            b.values.last().is_some_and(|&v| v >= hk * (1.0 - 1e-12))
        })
    });
    let (pub_burn, pub_regret, applies, no_burn_in) = match &bounds {
        Some(bs) => {
            let burn_ins: Option<Vec<f64>> = bs.iter().map(|b| b.burn_in).collect();
            let at_k: Vec<f64> = bs
                .iter()
                .map(|b| *b.values.last().unwrap_or(&f64::NAN))
                .collect();
            (
                burn_ins.as_ref().and_then(|v| exponent(x, v)),
                exponent(x, &at_k),
                bs.iter().all(|b| b.applies),
                bs.iter().all(|b| b.burn_in.is_none()),
            )
        }
        None => (None, None, false, false),
    };
    let (burn_iv, regret_iv) = bootstrap(points, li, x, seed);
    Scaling {
        burn_in_exponent: exponent(x, &burn),
        burn_in_exponent_interval: burn_iv,
        settled_points: settled as u64,
        points: points.len() as u64,
        regret_exponent: exponent(x, &regret),
        regret_exponent_interval: regret_iv,
        published_burn_in_exponent: pub_burn,
        published_regret_exponent: pub_regret,
        published_applies: applies,
        published_no_burn_in: no_burn_in,
        published_regret_trivial: trivial,
    }
}

type Interval = Option<(f64, f64)>;

/// Bootstrap intervals of both exponents (see the module doc) from the
/// results' per-seed curves.
fn bootstrap(points: &[Results], li: usize, x: &[f64], seed: u64) -> (Interval, Interval) {
    let curves: Vec<(&[u64], &[Vec<f64>])> = points
        .iter()
        .map(|p| {
            let l = &p.learners[li];
            (l.checkpoints.as_slice(), l.regret_by_seed.as_slice())
        })
        .collect();
    exponent_intervals(&curves, x, seed)
}

/// The 95% bootstrap intervals of the burn-in exponent and of the
/// regret-at-K exponent of curves `points[i] = (checkpoints, runs[seed][c])`
/// at sizes `x[i]`; None where a point has fewer than two seeds or fewer
/// than 95% of the refits exist. Draws come from ChaCha8 seeded with `seed`.
pub fn exponent_intervals(
    points: &[(&[u64], &[Vec<f64>])],
    x: &[f64],
    seed: u64,
) -> (Interval, Interval) {
    use rand::{Rng, SeedableRng};
    if points.iter().any(|(_, runs)| runs.len() < 2) {
        return (None, None);
    }
    let linear: Vec<Vec<bool>> = points
        .iter()
        .map(|(ks, runs)| runs.iter().map(|r| linear_at_end(ks, r)).collect())
        .collect();
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
    let (mut burn_fits, mut regret_fits) = (Vec::new(), Vec::new());
    for _ in 0..BOOTSTRAP_RESAMPLES {
        let mut burn = Vec::with_capacity(points.len());
        let mut regret = Vec::with_capacity(points.len());
        for (pi, (ks, runs)) in points.iter().enumerate() {
            let n = runs.len();
            let mut sum = vec![0.0; ks.len()];
            let mut any_linear = false;
            for _ in 0..n {
                let j = rng.random_range(0..n as u32) as usize;
                any_linear |= linear[pi][j];
                sum.iter_mut().zip(&runs[j]).for_each(|(s, v)| *s += v);
            }
            sum.iter_mut().for_each(|s| *s /= n as f64);
            let b = if any_linear { None } else { burn_in(ks, &sum) };
            burn.push(b.map_or(f64::NAN, |b| b as f64));
            regret.push(*sum.last().unwrap_or(&f64::NAN));
        }
        if let Some(b) = exponent(x, &burn) {
            burn_fits.push(b);
        }
        if let Some(b) = exponent(x, &regret) {
            regret_fits.push(b);
        }
    }
    let interval = |mut fits: Vec<f64>| {
        // At least 95% of the refits must exist for the percentiles to
        // mean what they say.
        if (fits.len() as f64) < 0.95 * BOOTSTRAP_RESAMPLES as f64 {
            return None;
        }
        fits.sort_by(f64::total_cmp);
        let q = |p: f64| fits[((p * fits.len() as f64) as usize).min(fits.len() - 1)];
        Some((q(0.025), q(0.975)))
    };
    (interval(burn_fits), interval(regret_fits))
}

impl Scaling {
    /// The reading in words, e.g. "burn-in ∝ S^2.1 [1.7, 2.6] over 5 of 6
    /// points (did not settle by K at 1); published S^3".
    pub fn burn_in_text(&self, x: &str) -> String {
        let measured = match self.burn_in_exponent {
            Some(b) if self.settled_points >= 2 => {
                let mut t = format!("burn-in ∝ {x}^{}", exponent_text(b));
                if let Some((lo, hi)) = self.burn_in_exponent_interval {
                    t.push_str(&format!(" [{}, {}]", exponent_text(lo), exponent_text(hi)));
                }
                if self.settled_points < self.points {
                    t.push_str(&format!(
                        " over {} of {} points (did not settle by K at {})",
                        self.settled_points,
                        self.points,
                        self.points - self.settled_points
                    ));
                }
                t
            }
            _ => format!(
                "did not settle by K at {} of {} points",
                self.points - self.settled_points,
                self.points
            ),
        };
        format!("{measured}; published {}", self.published_burn_in_text(x))
    }

    /// The published order of the burn-in, in words.
    pub fn published_burn_in_text(&self, x: &str) -> String {
        let order = if self.published_no_burn_in {
            "none (no lower-order term)".to_string()
        } else {
            match self.published_burn_in_exponent {
                Some(b) => format!("{x}^{}", exponent_text(b)),
                None if self.published_regret_exponent.is_none() => "no bound".to_string(),
                None => "none given".to_string(),
            }
        };
        if self.published_applies || self.published_burn_in_exponent.is_none() {
            order
        } else {
            format!("{order} (does not apply)")
        }
    }

    /// The regret reading in words, e.g. "regret at K ∝ S^0.52 [0.4, 0.6];
    /// published S^0.5".
    pub fn regret_text(&self, x: &str) -> String {
        let mut t = match self.regret_exponent {
            Some(b) => format!("regret at K ∝ {x}^{}", exponent_text(b)),
            None => "regret at K: no fit".to_string(),
        };
        if let (Some(_), Some((lo, hi))) = (self.regret_exponent, self.regret_exponent_interval) {
            t.push_str(&format!(" [{}, {}]", exponent_text(lo), exponent_text(hi)));
        }
        if self.published_regret_trivial {
            t.push_str("; published: the trivial H·K at every point");
        } else if let Some(b) = self.published_regret_exponent {
            t.push_str(&format!("; published {x}^{}", exponent_text(b)));
            if !self.published_applies {
                t.push_str(" (does not apply)");
            }
        }
        t
    }
}

/// An exponent as printed: two decimals, no trailing zeros ("2", "0.5",
/// "2.13").
pub fn exponent_text(b: f64) -> String {
    if !b.is_finite() {
        return number_text(b);
    }
    let t = format!("{:.2}", b);
    let t = t.trim_end_matches('0').trim_end_matches('.');
    if t == "-0" { "0".into() } else { t.into() }
}

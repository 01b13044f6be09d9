//! Readings of cumulative regret curves: the tail slope and the burn-in,
//! with bootstrap intervals over seeds.
//!
//! Every reading takes a curve as its values at the checkpoints and reads
//! it on a fixed grid of episodes, 10^(j/16), interpolating ln R in ln k
//! between the checkpoints around each grid point by a monotone cubic (the
//! *interpolation rule*, [`grid_points`]), so what it says does not depend
//! on how densely the run recorded its curve.

use crate::stats::ls_slope;

/// The fitted tail slope at or below which a curve counts as settled into
/// its √K regime (see [`BurnIn`]): ½ with room for the noise of a few
/// seeds, and above the slope 0 of a learner whose regret stops growing.
pub const SETTLED_SLOPE: f64 = 0.6;

/// The least part of the run, in decades, that must lie after the fitted
/// break for the curve to count as settled: a quarter decade (k to
/// k·10^¼ ≈ 1.78·k). A break closer to K than that is not yet evidence of
/// a second regime.
pub const SETTLED_SPAN_DECADES: f64 = 0.25;

/// The curve is read at k = 10^(j/16) (and at K itself).
pub const GRID_PER_DECADE: f64 = 16.0;

/// The break is first searched on a grid this fine (per decade), then
/// refined by golden-section search between that grid's neighbours.
const BREAK_SEARCH_PER_DECADE: f64 = 64.0;

/// Resamples of the seeds for the bootstrap intervals (fewer when seeds ×
/// checkpoints is large, so that the bootstrap costs at most about
/// [`BOOTSTRAP_BUDGET`] additions; none below 20).
pub const BOOTSTRAP_RESAMPLES: usize = 200;
const BOOTSTRAP_BUDGET: f64 = 2e7;

/// The curve on the reading grid: (ln k, ln R) at every grid point
/// 10^(j/16) ≤ K and at K that lies between two checkpoints with positive
/// regret (or on one), ln R interpolated in ln k by the monotone cubic
/// Hermite interpolant of Fritsch & Carlson ("Monotone piecewise cubic
/// interpolation", SIAM J. Numer. Anal. 17, 1980), with the tangents of
/// Fritsch & Butland (a weighted harmonic mean of the neighbouring secants,
/// as in F. N. Fritsch and J. Butland, "A method for constructing local
/// monotone piecewise cubic interpolants", SIAM J. Sci. Stat. Comput. 5,
/// 1984). Cumulative regret never falls, so the interpolant never falls
/// either; unlike straight chords it follows a bend between two sparse
/// checkpoints, so the reading moves little with the recording density.
fn grid_points(ks: &[u64], regret: &[f64]) -> (Vec<f64>, Vec<f64>) {
    let (px, py): (Vec<f64>, Vec<f64>) = ks
        .iter()
        .zip(regret)
        .skip_while(|(_, r)| **r <= 0.0)
        .map(|(&k, &r)| (libm::log(k as f64), libm::log(r.max(f64::MIN_POSITIVE))))
        .unzip();
    let Some(&k_max) = ks.last() else {
        return (Vec::new(), Vec::new());
    };
    if px.is_empty() {
        return (Vec::new(), Vec::new());
    }
    let n = px.len();
    let secant: Vec<f64> = (1..n)
        .map(|i| (py[i] - py[i - 1]) / (px[i] - px[i - 1]))
        .collect();
    let tangent: Vec<f64> = (0..n)
        .map(|i| {
            if n == 1 {
                0.0
            } else if i == 0 {
                secant[0]
            } else if i == n - 1 {
                secant[n - 2]
            } else {
                let (d0, d1) = (secant[i - 1], secant[i]);
                if d0 * d1 <= 0.0 {
                    0.0
                } else {
                    let (h0, h1) = (px[i] - px[i - 1], px[i + 1] - px[i]);
                    let (w0, w1) = (2.0 * h1 + h0, h1 + 2.0 * h0);
                    (w0 + w1) / (w0 / d0 + w1 / d1)
                }
            }
        })
        .collect();
    let value = |x: f64| -> Option<f64> {
        let i = px.partition_point(|&c| c < x);
        if i < n && px[i] == x {
            return Some(py[i]);
        }
        if i == 0 || i >= n {
            return None;
        }
        let (x0, x1) = (px[i - 1], px[i]);
        let h = x1 - x0;
        let t = (x - x0) / h;
        let (t2, t3) = (t * t, t * t * t);
        Some(
            (2.0 * t3 - 3.0 * t2 + 1.0) * py[i - 1]
                + (t3 - 2.0 * t2 + t) * h * tangent[i - 1]
                + (-2.0 * t3 + 3.0 * t2) * py[i]
                + (t3 - t2) * h * tangent[i],
        )
    };
    let k_max = k_max as f64;
    let mut grid: Vec<f64> = (0..)
        .map(|j| libm::pow(10.0, j as f64 / GRID_PER_DECADE))
        .take_while(|g| *g < k_max * (1.0 - 1e-12))
        .collect();
    grid.push(k_max);
    grid.iter()
        .filter_map(|&g| {
            let x = libm::log(g);
            value(x).map(|y| (x, y))
        })
        .collect::<Vec<_>>()
        .into_iter()
        .unzip()
}

/// A two-regime fit of a curve on log–log axes.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct BurnIn {
    /// The fitted break, ln k₀.
    pub ln_break: f64,
    /// The fitted slope after the break (in [0, 1]).
    pub tail_slope: f64,
    /// Whether the curve has settled: its tail slope is at most
    /// [`SETTLED_SLOPE`] and at least [`SETTLED_SPAN_DECADES`] of the run
    /// lie after the break. A curve with no regret at all has settled at 1.
    pub settled: bool,
}

impl BurnIn {
    /// The burn-in, k₀ rounded to a whole episode (at least 1), when the
    /// curve has settled.
    pub fn episodes(&self) -> Option<u64> {
        self.settled
            .then(|| (libm::round(libm::exp(self.ln_break)) as u64).max(1))
    }
}

/// Least squares of y − min(x, x₀) = a + β·(x − x₀)₊ for a fixed break x₀,
/// with β projected onto [0, 1] (β = 1, a straight line of slope 1, when no
/// point lies past the break): (sum of squared residuals, β).
fn fit_at(x: &[f64], y: &[f64], x0: f64) -> (f64, f64) {
    let n = x.len() as f64;
    let z = |xi: f64| (xi - x0).max(0.0);
    let u = |xi: f64, yi: f64| yi - xi.min(x0);
    let (mut zbar, mut ubar) = (0.0, 0.0);
    for (&xi, &yi) in x.iter().zip(y) {
        zbar += z(xi);
        ubar += u(xi, yi);
    }
    zbar /= n;
    ubar /= n;
    let (mut szz, mut szu) = (0.0, 0.0);
    for (&xi, &yi) in x.iter().zip(y) {
        let (dz, du) = (z(xi) - zbar, u(xi, yi) - ubar);
        szz += dz * dz;
        szu += dz * du;
    }
    let beta = if szz > 1e-300 {
        (szu / szz).clamp(0.0, 1.0)
    } else {
        1.0
    };
    let a = ubar - beta * zbar;
    let sse = x
        .iter()
        .zip(y)
        .map(|(&xi, &yi)| {
            let e = u(xi, yi) - a - beta * z(xi);
            e * e
        })
        .sum();
    (sse, beta)
}

/// The two-regime fit of a cumulative regret curve (see [`BurnIn`]); None
/// when the curve has a single positive point on the grid.
///
/// The model, on log–log axes with x = ln k and y = ln R read on the grid
/// (module doc): y = a + x for x ≤ x₀ (regret growing linearly: every
/// episode costs about the same) and y = a + x₀ + β·(x − x₀) after the
/// break x₀, the tail slope β ∈ [0, 1] free (½ in the √K regime, 0 when
/// regret stops growing). For each x₀ the fit is linear least squares in
/// (a, β); the break minimises the sum of squares over x₀ ∈ [first point,
/// K], searched on a grid of 64 per decade and refined by golden-section
/// search between the best grid point's neighbours, so the break moves
/// continuously with the data instead of jumping between windows. A tie
/// goes to the earliest break.
///
/// Our own definition: a continuous two-phase ("broken-stick") regression
/// with its join point estimated by least squares, as in D. J. Hudson,
/// "Fitting segmented curves whose join points have to be estimated", JASA
/// 61 (1966) — here with the first phase's slope fixed at 1; the papers
/// define burn-in through their bounds, not through data.
pub fn two_regime_fit(ks: &[u64], regret: &[f64]) -> Option<BurnIn> {
    let (x, y) = grid_points(ks, regret);
    fit_grid(&x, &y)
}

/// [`two_regime_fit`] of a curve already read on the grid.
fn fit_grid(x: &[f64], y: &[f64]) -> Option<BurnIn> {
    if x.len() < 2 {
        return None;
    }
    let (lo, hi) = (x[0], x[x.len() - 1]);
    let step = std::f64::consts::LN_10 / BREAK_SEARCH_PER_DECADE;
    let n = ((hi - lo) / step).ceil() as usize;
    let at = |i: usize| (lo + i as f64 * step).min(hi);
    let mut best = (f64::INFINITY, 0usize);
    for i in 0..=n {
        let (sse, _) = fit_at(x, y, at(i));
        if sse < best.0 {
            best = (sse, i);
        }
    }
    // Golden-section search on the neighbours' interval.
    let (mut a, mut b) = (at(best.1.saturating_sub(1)), at((best.1 + 1).min(n)));
    let g = (libm::sqrt(5.0) - 1.0) / 2.0;
    let sse = |x0: f64| fit_at(x, y, x0).0;
    let (mut c, mut d) = (b - g * (b - a), a + g * (b - a));
    let (mut fc, mut fd) = (sse(c), sse(d));
    for _ in 0..40 {
        if fc <= fd {
            (b, d, fd) = (d, c, fc);
            c = b - g * (b - a);
            fc = sse(c);
        } else {
            (a, c, fc) = (c, d, fd);
            d = a + g * (b - a);
            fd = sse(d);
        }
    }
    let refined = (a + b) / 2.0;
    let x0 = if sse(refined) <= best.0 {
        refined
    } else {
        at(best.1)
    };
    let (_, beta) = fit_at(x, y, x0);
    let span = SETTLED_SPAN_DECADES * std::f64::consts::LN_10;
    Some(BurnIn {
        ln_break: x0,
        tail_slope: beta,
        settled: beta <= SETTLED_SLOPE && x0 <= hi - span * (1.0 - 1e-12),
    })
}

/// Burn-in of a cumulative regret curve: the break of its two-regime fit
/// ([`two_regime_fit`]) when the curve has settled, else None; 1 for a
/// curve with no regret at all (optimal from the first episode), or whose
/// only regret is paid in the first episode.
pub fn burn_in(ks: &[u64], regret: &[f64]) -> Option<u64> {
    let (x, y) = grid_points(ks, regret);
    burn_in_of(ks, regret, &x, &y)
}

/// [`burn_in`] of a curve whose grid points (x, y) are already read. A
/// curve too short to fit has settled when it never grows after its first
/// positive value (no regret at all, or regret only before the last point).
fn burn_in_of(ks: &[u64], regret: &[f64], x: &[f64], y: &[f64]) -> Option<u64> {
    match fit_grid(x, y) {
        Some(fit) => fit.episodes(),
        None => {
            (y.is_empty() || ks.len() > 1 && regret.windows(2).all(|w| w[1] <= w[0])).then_some(1)
        }
    }
}

/// The least local slope, over the last quarter decade of a curve, that
/// counts as still growing linearly at K (see [`linear_at_end`]).
pub const LINEAR_SLOPE: f64 = 0.9;

/// Whether a curve is still growing (nearly) linearly at K: the least-squares
/// slope of its grid points (module doc) in the last quarter decade
/// [K·10^(−¼), K] is at least [`LINEAR_SLOPE`]. A seed that has stopped
/// learning pays the same regret every episode, so this slope tends to 1.
pub fn linear_at_end(ks: &[u64], regret: &[f64]) -> bool {
    let (x, y) = grid_points(ks, regret);
    linear_of(&x, &y)
}

/// [`linear_at_end`] of a curve already read on the grid.
fn linear_of(x: &[f64], y: &[f64]) -> bool {
    let Some(&end) = x.last() else {
        return false;
    };
    let from = end - SETTLED_SPAN_DECADES * std::f64::consts::LN_10 * (1.0 + 1e-12);
    let i = x.partition_point(|&v| v < from);
    x.len() - i >= 2 && ls_slope(&x[i..], &y[i..]) >= LINEAR_SLOPE
}

/// Least-squares slope over the last decade of checkpoints (k ≥ K/10) with
/// positive regret.
pub fn tail_slope(ks: &[u64], regret: &[f64]) -> Option<f64> {
    let k_max = *ks.last()? as f64;
    let (x, y): (Vec<f64>, Vec<f64>) = ks
        .iter()
        .zip(regret)
        .filter(|(k, r)| **k as f64 >= k_max / 10.0 && **r > 0.0)
        .map(|(&k, &r)| (libm::log(k as f64), libm::log(r)))
        .unzip();
    if x.len() < 2 {
        return None;
    }
    let s = ls_slope(&x, &y);
    s.is_finite().then_some(s)
}

/// The burn-in of a learner's runs, read from every seed.
#[derive(Debug, Clone, PartialEq)]
pub struct SeedsReading {
    /// The burn-in of the mean curve: None unless the mean curve settled
    /// *and no seed is still growing linearly at K* ([`linear_at_end`]: such
    /// a seed makes the mean grow linearly in the end, however small its
    /// share now).
    pub burn_in: Option<u64>,
    /// Each seed's own burn-in (None: that seed did not settle by K).
    pub by_seed: Vec<Option<u64>>,
    /// How many seeds are still growing linearly at K.
    pub seeds_linear: usize,
    /// The 95% percentile-bootstrap interval of `burn_in` (inner None: not
    /// settled); None with fewer than two seeds or a bootstrap too large.
    pub interval: Option<(Option<u64>, Option<u64>)>,
    /// The 95% percentile-bootstrap interval of the mean curve's tail slope
    /// ([`tail_slope`]); None with fewer than two seeds.
    pub slope_interval: Option<(f64, f64)>,
}

impl SeedsReading {
    /// How many seeds settled.
    pub fn seeds_settled(&self) -> usize {
        self.by_seed.iter().filter(|b| b.is_some()).count()
    }
}

/// Reads the burn-in of runs `runs[seed][checkpoint]` with their mean curve
/// `mean`, and the bootstrap intervals of it and of the tail slope: the
/// seeds resampled with replacement (Efron & Tibshirani, An Introduction to
/// the Bootstrap, Chapman & Hall 1993, ch. 13), each resample's mean curve
/// read as the point value is (a resample that does not settle counts as
/// later than any episode, so `hi` is None when 2.5% or more of them do not
/// settle). Draws come from ChaCha8 seeded with `seed`, so the intervals are
/// the same everywhere.
pub fn read_seeds(ks: &[u64], runs: &[&[f64]], mean: &[f64], seed: u64) -> SeedsReading {
    // Each seed read on the grid once, for its burn-in and its end.
    let (by_seed, linear): (Vec<Option<u64>>, Vec<bool>) = runs
        .iter()
        .map(|r| {
            let (x, y) = grid_points(ks, r);
            (burn_in_of(ks, r, &x, &y), linear_of(&x, &y))
        })
        .unzip();
    let point = if linear.contains(&true) {
        None
    } else {
        burn_in(ks, mean)
    };
    let (interval, slope_interval) = bootstrap(ks, runs, &linear, seed).unzip();
    SeedsReading {
        burn_in: point,
        by_seed,
        seeds_linear: linear.iter().filter(|&&l| l).count(),
        interval,
        slope_interval: slope_interval.flatten(),
    }
}

/// The burn-in interval of [`read_seeds`] alone.
pub fn burn_in_interval(
    ks: &[u64],
    runs: &[&[f64]],
    seed: u64,
) -> Option<(Option<u64>, Option<u64>)> {
    let linear: Vec<bool> = runs.iter().map(|r| linear_at_end(ks, r)).collect();
    bootstrap(ks, runs, &linear, seed).map(|(b, _)| b)
}

type Intervals = ((Option<u64>, Option<u64>), Option<(f64, f64)>);

fn bootstrap(ks: &[u64], runs: &[&[f64]], linear: &[bool], seed: u64) -> Option<Intervals> {
    use rand::{Rng, SeedableRng};
    let n = runs.len();
    let resamples =
        BOOTSTRAP_RESAMPLES.min((BOOTSTRAP_BUDGET / (n.max(1) * ks.len().max(1)) as f64) as usize);
    if n < 2 || resamples < 20 {
        return None;
    }
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(seed);
    let mut found = Vec::with_capacity(resamples);
    let mut slopes = Vec::with_capacity(resamples);
    for _ in 0..resamples {
        let mut sum = vec![0.0; ks.len()];
        let mut any_linear = false;
        for _ in 0..n {
            let j = rng.random_range(0..n as u32) as usize;
            any_linear |= linear[j];
            sum.iter_mut().zip(runs[j]).for_each(|(s, x)| *s += x);
        }
        sum.iter_mut().for_each(|s| *s /= n as f64);
        let b = if any_linear { None } else { burn_in(ks, &sum) };
        found.push(b.unwrap_or(u64::MAX));
        if let Some(s) = tail_slope(ks, &sum) {
            slopes.push(s);
        }
    }
    found.sort_unstable();
    let q = |p: f64| found[((p * resamples as f64) as usize).min(resamples - 1)];
    let some = |x: u64| (x != u64::MAX).then_some(x);
    slopes.sort_by(f64::total_cmp);
    let slope = (slopes.len() == resamples).then(|| {
        let q = |p: f64| slopes[((p * resamples as f64) as usize).min(resamples - 1)];
        (q(0.025), q(0.975))
    });
    Some(((some(q(0.025)), some(q(0.975))), slope))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::experiment::checkpoints;

    fn kinked(k0: f64, ks: &[u64]) -> Vec<f64> {
        ks.iter()
            .map(|&k| {
                let k = k as f64;
                if k <= k0 { k } else { k0 * (k / k0).sqrt() }
            })
            .collect()
    }

    #[test]
    fn the_fit_recovers_a_planted_break_exactly() {
        // derived by hand: R = k to k₀ = 1000, then 1000·√(k/1000) is the
        // model itself with a = 0, β = ½, so the sum of squares is 0 at the
        // break. On a recording that holds every grid point 10^(j/16) the
        // fit is exact.
        let mut grid: Vec<u64> = (0..=80)
            .map(|j| libm::round(libm::pow(10.0, j as f64 / 16.0)) as u64)
            .collect();
        grid.dedup();
        let fit = two_regime_fit(&grid, &kinked(1000.0, &grid)).unwrap();
        assert!(
            (libm::exp(fit.ln_break) / 1000.0 - 1.0).abs() < 1e-6,
            "{fit:?}"
        );
        // Recorded at 64 checkpoints alone, the curve is read between them
        // by the interpolant, which rounds the kink off a little.
        let ks = checkpoints(100_000, 64);
        let fit = two_regime_fit(&ks, &kinked(1000.0, &ks)).unwrap();
        assert!(
            (libm::exp(fit.ln_break) / 1000.0 - 1.0).abs() < 0.01,
            "{fit:?}"
        );
        assert!((fit.tail_slope - 0.5).abs() < 1e-3, "{fit:?}");
        assert!(fit.settled);
    }

    #[test]
    fn flat_and_linear_curves() {
        let ks = checkpoints(10_000, 64);
        // No regret at all: settled from the first episode.
        assert_eq!(burn_in(&ks, &vec![0.0; ks.len()]), Some(1));
        // Regret paid in the first episode only.
        assert_eq!(burn_in(&ks, &vec![0.7; ks.len()]), Some(1));
        // Linear regret never settles.
        let lin: Vec<f64> = ks.iter().map(|&k| 0.2 * k as f64).collect();
        assert_eq!(burn_in(&ks, &lin), None);
    }
}

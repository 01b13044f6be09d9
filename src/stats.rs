//! Summary statistics across seeds: means, Student-t intervals, least-squares
//! slopes.
//!
//! Transcendental functions go through `libm` so results are bit-identical
//! natively and in wasm.

/// Arithmetic mean (NaN for an empty slice).
pub fn mean(xs: &[f64]) -> f64 {
    let n = xs.len() as f64;
    let m = xs.iter().sum::<f64>() / n;
    if m.is_finite() || xs.iter().any(|x| !x.is_finite()) {
        return m;
    }
    // The sum overflowed (values near the largest double): summed scaled
    // down instead, which only such values need (#35).
    xs.iter().map(|x| x / n).sum()
}

/// Sample standard deviation with n − 1 in the denominator (0 for n < 2).
pub fn sample_sd(xs: &[f64]) -> f64 {
    let n = xs.len();
    if n < 2 {
        return 0.0;
    }
    let m = mean(xs);
    let ss: f64 = xs.iter().map(|x| (x - m) * (x - m)).sum();
    let sd = (ss / (n - 1) as f64).sqrt();
    if sd.is_finite() || !m.is_finite() || xs.iter().any(|x| !x.is_finite()) {
        return sd;
    }
    // The squares overflowed (deviations beyond 10¹⁵⁴): computed on values
    // scaled by the largest deviation, which only such values need (#35).
    let big = xs.iter().map(|x| (x - m).abs()).fold(0.0, f64::max);
    if big.is_infinite() {
        return f64::INFINITY;
    }
    let ss: f64 = xs.iter().map(|x| (x - m) / big).map(|d| d * d).sum();
    big * (ss / (n - 1) as f64).sqrt()
}

/// ln Γ(x) for x > 0.
fn ln_gamma(x: f64) -> f64 {
    libm::lgamma(x)
}

/// Continued fraction for the regularised incomplete beta function
/// (modified Lentz's method).
///
/// # References
/// - W. H. Press, S. A. Teukolsky, W. T. Vetterling and B. P. Flannery,
///   *Numerical Recipes*, 3rd ed., Cambridge University Press, 2007, §6.4.
fn beta_cf(a: f64, b: f64, x: f64) -> f64 {
    const TINY: f64 = 1e-300;
    const EPS: f64 = 1e-15;
    let (qab, qap, qam) = (a + b, a + 1.0, a - 1.0);
    let mut c = 1.0;
    let mut d = 1.0 - qab * x / qap;
    if d.abs() < TINY {
        d = TINY;
    }
    d = 1.0 / d;
    let mut h = d;
    for m in 1..=300 {
        let m = m as f64;
        let m2 = 2.0 * m;
        // The even and odd terms of the fraction, each one Lentz step.
        let even = m * (b - m) * x / ((qam + m2) * (a + m2));
        h *= lentz_step(even, &mut c, &mut d);
        let odd = -(a + m) * (qab + m) * x / ((a + m2) * (qap + m2));
        let del = lentz_step(odd, &mut c, &mut d);
        h *= del;
        if (del - 1.0).abs() < EPS {
            break;
        }
    }
    h
}

/// One step of modified Lentz's method for the coefficient `aa`: updates
/// the running C and D and returns the factor C·D for the fraction.
fn lentz_step(aa: f64, c: &mut f64, d: &mut f64) -> f64 {
    const TINY: f64 = 1e-300;
    *d = 1.0 + aa * *d;
    if d.abs() < TINY {
        *d = TINY;
    }
    *c = 1.0 + aa / *c;
    if c.abs() < TINY {
        *c = TINY;
    }
    *d = 1.0 / *d;
    *c * *d
}

/// Regularised incomplete beta function I_x(a, b).
pub fn inc_beta(a: f64, b: f64, x: f64) -> f64 {
    if x <= 0.0 {
        return 0.0;
    }
    if x >= 1.0 {
        return 1.0;
    }
    let ln_front =
        ln_gamma(a + b) - ln_gamma(a) - ln_gamma(b) + a * libm::log(x) + b * libm::log(1.0 - x);
    let front = libm::exp(ln_front);
    if x < (a + 1.0) / (a + b + 2.0) {
        front * beta_cf(a, b, x) / a
    } else {
        1.0 - front * beta_cf(b, a, 1.0 - x) / b
    }
}

/// CDF of Student's t distribution with `df` degrees of freedom:
/// P(T ≤ t) = 1 − ½·I_{df/(df+t²)}(df/2, ½) for t ≥ 0.
pub fn t_cdf(t: f64, df: f64) -> f64 {
    let x = df / (df + t * t);
    let tail = 0.5 * inc_beta(0.5 * df, 0.5, x);
    if t >= 0.0 { 1.0 - tail } else { tail }
}

/// The quantile t_{p, df}: the t with P(T ≤ t) = p, for 0.5 ≤ p < 1, by
/// bisection on [`t_cdf`] (to about 1e-12).
pub fn t_quantile(p: f64, df: f64) -> f64 {
    assert!((0.5..1.0).contains(&p) && df > 0.0);
    let (mut lo, mut hi) = (0.0, 1.0);
    while t_cdf(hi, df) < p {
        hi *= 2.0;
    }
    for _ in 0..200 {
        let mid = 0.5 * (lo + hi);
        if t_cdf(mid, df) < p {
            lo = mid;
        } else {
            hi = mid;
        }
        if hi - lo < 1e-12 {
            break;
        }
    }
    0.5 * (lo + hi)
}

/// A 95% interval for the mean of `xs`: mean ± t_{0.975, n−1}·sd/√n; the
/// point itself when n < 2.
pub fn interval95(xs: &[f64]) -> (f64, f64) {
    let n = xs.len();
    let m = mean(xs);
    if n < 2 {
        return (m, m);
    }
    let half = t_quantile(0.975, (n - 1) as f64) * sample_sd(xs) / (n as f64).sqrt();
    let (lo, hi) = (m - half, m + half);
    if m.is_finite() && !half.is_nan() && !(lo.is_finite() && hi.is_finite()) {
        // Ends beyond the largest double: bounded there, so no file
        // carries an infinite number (#35).
        return (lo.max(f64::MIN), hi.min(f64::MAX));
    }
    (lo, hi)
}

/// A paired comparison of two samples: the mean of the differences
/// aᵢ − bᵢ and its 95% Student-t interval (n − 1 degrees of freedom), as
/// in Student's paired test (Student, "The probable error of a mean",
/// Biometrika 6(1), 1908).
#[derive(Debug, Clone, Copy, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct Paired {
    /// Number of pairs.
    pub n: usize,
    pub mean: f64,
    /// The interval (NaN in memory and null in a file when n < 2: no
    /// interval exists).
    #[serde(with = "nan_as_null")]
    pub lo: f64,
    #[serde(with = "nan_as_null")]
    pub hi: f64,
}

/// A number that may not exist: NaN in memory, null in a file.
mod nan_as_null {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer>(x: &f64, s: S) -> Result<S::Ok, S::Error> {
        match x.is_nan() {
            true => s.serialize_none(),
            false => s.serialize_f64(*x),
        }
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<f64, D::Error> {
        Ok(Option::<f64>::deserialize(d)?.unwrap_or(f64::NAN))
    }
}

/// Pairs `a[i]` with `b[i]` (the shorter length counts).
pub fn paired95(a: &[f64], b: &[f64]) -> Paired {
    let d: Vec<f64> = a.iter().zip(b).map(|(x, y)| x - y).collect();
    let (lo, hi) = if d.len() < 2 {
        (f64::NAN, f64::NAN)
    } else {
        interval95(&d)
    };
    Paired {
        n: d.len(),
        mean: mean(&d),
        lo,
        hi,
    }
}

/// The two-sided p-value of Student's paired t-test that the mean of the
/// differences `d` is 0: 2·P(T ≥ |t|) with t = mean/(sd/√n) and n − 1
/// degrees of freedom (Student 1908). None with fewer than two pairs; 1
/// when every difference is 0, 0 when they are all equal and not 0.
pub fn paired_p_value(d: &[f64]) -> Option<f64> {
    let n = d.len();
    if n < 2 {
        return None;
    }
    let (m, sd) = (mean(d), sample_sd(d));
    if sd == 0.0 {
        return Some(if m == 0.0 { 1.0 } else { 0.0 });
    }
    let t = m / (sd / (n as f64).sqrt());
    Some((2.0 * (1.0 - t_cdf(t.abs(), (n - 1) as f64))).clamp(0.0, 1.0))
}

/// Holm's step-down adjustment of p-values for m simultaneous tests (S.
/// Holm, "A simple sequentially rejective multiple test procedure",
/// Scandinavian Journal of Statistics 6(2), 1979): with the p-values sorted
/// p₍₁₎ ≤ … ≤ p₍ₘ₎, the adjusted p₍ᵢ₎ is max over j ≤ i of min(1,
/// (m − j + 1)·p₍ⱼ₎); rejecting where the adjusted value is ≤ α keeps the
/// family-wise error rate at α. Returned in the input's order.
pub fn holm(p: &[f64]) -> Vec<f64> {
    let m = p.len();
    let mut order: Vec<usize> = (0..m).collect();
    order.sort_by(|&i, &j| p[i].total_cmp(&p[j]));
    let mut out = vec![0.0; m];
    let mut running: f64 = 0.0;
    for (rank, &i) in order.iter().enumerate() {
        running = running.max(((m - rank) as f64 * p[i]).min(1.0));
        out[i] = running;
    }
    out
}

/// Least-squares slope of y against x (NaN with fewer than two distinct x).
pub fn ls_slope(x: &[f64], y: &[f64]) -> f64 {
    let n = x.len() as f64;
    let mx = x.iter().sum::<f64>() / n;
    let my = y.iter().sum::<f64>() / n;
    let mut sxy = 0.0;
    let mut sxx = 0.0;
    for (a, b) in x.iter().zip(y) {
        sxy += (a - mx) * (b - my);
        sxx += (a - mx) * (a - mx);
    }
    if sxx == 0.0 { f64::NAN } else { sxy / sxx }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Student's paired interval on the sleep data of Cushny & Peebles
    /// (J. Physiology 32, 1905), the example of Student (1908): extra hours
    /// of sleep under two drugs for ten patients. Reference values from
    /// scipy.stats.ttest_rel(b, a).confidence_interval(0.95) (SciPy 1.x):
    /// mean 1.58, interval [0.7001142367230175, 2.459885763276983].
    #[test]
    fn paired_interval_matches_scipy_on_the_sleep_data() {
        let a = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
        let b = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
        let p = paired95(&b, &a);
        assert_eq!(p.n, 10);
        assert!((p.mean - 1.58).abs() < 1e-12, "{p:?}");
        assert!((p.lo - 0.700_114_236_723_017_5).abs() < 1e-9, "{p:?}");
        assert!((p.hi - 2.459_885_763_276_983).abs() < 1e-9, "{p:?}");
        // One pair has no interval (NaN, written as null), never lo = hi = mean.
        let one = paired95(&[2.0], &[0.5]);
        assert_eq!((one.n, one.mean), (1, 1.5));
        assert!(one.lo.is_nan() && one.hi.is_nan());
        let text = serde_json::to_string(&one).unwrap();
        assert_eq!(text, r#"{"n":1,"mean":1.5,"lo":null,"hi":null}"#);
        let back: Paired = serde_json::from_str(&text).unwrap();
        assert!(back.lo.is_nan() && back.n == 1);
    }

    /// The paired t-test's two-sided p-value on the same sleep data:
    /// scipy.stats.ttest_rel(b, a).pvalue (SciPy 1.17.1) =
    /// 0.002832890197384273 (R's documented example `t.test(extra ~ group,
    /// data = sleep, paired = TRUE)` prints p-value = 0.002833).
    #[test]
    fn paired_p_value_matches_scipy_on_the_sleep_data() {
        let a = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
        let b = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
        let d: Vec<f64> = b.iter().zip(a).map(|(x, y)| x - y).collect();
        let p = paired_p_value(&d).unwrap();
        assert!((p - 0.002_832_890_197_384_273).abs() < 1e-9, "{p}");
        assert_eq!(paired_p_value(&[1.0]), None);
        assert_eq!(paired_p_value(&[0.0, 0.0, 0.0]), Some(1.0));
    }

    /// Holm's adjustment against statsmodels 0.15.0,
    /// `multipletests([0.01, 0.04, 0.03, 0.005, 0.5, 0.04], method="holm")[1]`
    /// = [0.05, 0.12, 0.12, 0.03, 0.5, 0.12]; ties and the running maximum
    /// included.
    #[test]
    fn holm_matches_statsmodels() {
        let got = holm(&[0.01, 0.04, 0.03, 0.005, 0.5, 0.04]);
        let want = [0.05, 0.12, 0.12, 0.03, 0.5, 0.12];
        for (g, w) in got.iter().zip(want) {
            assert!((g - w).abs() < 1e-12, "{got:?}");
        }
        assert_eq!(holm(&[]), Vec::<f64>::new());
        assert_eq!(holm(&[0.7, 0.9]), vec![1.0, 1.0]);
    }

    /// Two-sided 95% critical values t_{0.975, df} of Student's t, from the
    /// NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.6.7.2
    /// ("Critical values of the Student's t distribution"), to three decimals;
    /// the values are quoted from memory of that standard table (they agree
    /// with every printed t table).
    #[test]
    fn t_quantiles_match_the_published_table() {
        let table = [
            (1.0, 12.706),
            (2.0, 4.303),
            (3.0, 3.182),
            (4.0, 2.776),
            (5.0, 2.571),
            (7.0, 2.365),
            (10.0, 2.228),
            (15.0, 2.131),
            (20.0, 2.086),
            (30.0, 2.042),
            (60.0, 2.000),
            (100.0, 1.984),
        ];
        for (df, want) in table {
            let got = t_quantile(0.975, df);
            assert!((got - want).abs() < 6e-4, "df {df}: {got} vs {want}");
        }
        // The same table's 0.95 column (one-sided 5%).
        for (df, want) in [(1.0, 6.314), (5.0, 2.015), (10.0, 1.812), (30.0, 1.697)] {
            assert!((t_quantile(0.95, df) - want).abs() < 6e-4);
        }
    }

    #[test]
    fn t_with_one_degree_of_freedom_is_cauchy() {
        // Cauchy CDF: ½ + arctan(t)/π (closed form).
        for t in [0.3, 1.0, 2.5, 10.0] {
            let want = 0.5 + libm::atan(t) / std::f64::consts::PI;
            assert!((t_cdf(t, 1.0) - want).abs() < 1e-12);
        }
    }

    /// #35: values near the largest double overflowed the sum and the
    /// squares, giving infinite intervals. The sample {1, 2, 3} scaled by
    /// 10³⁰⁰ has mean 2·10³⁰⁰ and sd 10³⁰⁰ (derived by hand); the interval's
    /// ends are bounded at the largest double.
    #[test]
    fn huge_values_keep_finite_means_and_intervals() {
        let xs = [1e300, 2e300, 3e300];
        assert_eq!(mean(&xs), 2e300);
        assert!((sample_sd(&xs) / 1e300 - 1.0).abs() < 1e-12);
        let big = [1.7e308, 1.7e308, -1.7e308];
        assert!(mean(&big).is_finite());
        assert!(sample_sd(&[1e300, 1e300, -1e300]).is_finite());
        let (lo, hi) = interval95(&big);
        assert!(lo.is_finite() && hi.is_finite() && lo < hi);
        // Ordinary values take the ordinary path, bit for bit.
        let small = [0.1, 0.2, 0.7];
        assert_eq!(mean(&small), (0.1 + 0.2 + 0.7) / 3.0);
    }

    #[test]
    fn slope_of_a_power_law_in_log_log_is_its_exponent() {
        // derived by hand: y = 3·x^0.5 ⇒ ln y = ln 3 + 0.5 ln x
        let x: Vec<f64> = (1..20).map(|i| libm::log(i as f64 * 10.0)).collect();
        let y: Vec<f64> = x.iter().map(|lx| libm::log(3.0) + 0.5 * lx).collect();
        assert!((ls_slope(&x, &y) - 0.5).abs() < 1e-12);
    }
}

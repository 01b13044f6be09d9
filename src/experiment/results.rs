//! Results format v1 (`"format": "burnin-results"`): summaries across seeds,
//! the published bounds beside them, JSON and CSV.

use serde::{Deserialize, Serialize};

use super::readings::{read_seeds, tail_slope};
use super::{Point, RunRecord};
use crate::model::Problems;
use crate::stats::{Paired, holm, interval95, mean, paired_p_value, paired95};
use crate::theory::{self, Bound};

pub const RESULTS_FORMAT: &str = "burnin-results";
pub const RESULTS_VERSION: u64 = 1;

/// What the runs say about ε-optimal policies, for one ε.
///
/// A policy is ε-optimal when its expected regret V* − V^π is at most ε.
/// The PAC-style readings are `first_optimal` (the first episode whose
/// policy is ε-optimal: the sample complexity of finding one, the quantity
/// the PAC order bounds — Zhang, Chen, Lee & Du, COLT 2024,
/// arXiv:2307.13586) and `optimal_share` (the share of episodes whose policy
/// was ε-optimal; its complement counts the ε-mistakes of Dann, Lattimore &
/// Brunskill, "Unifying PAC and Regret", NeurIPS 2017). `episodes` is a
/// different reading: when the learner *settled* within ε for good.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EpsResult {
    pub epsilon: f64,
    /// Per seed: the first episode after which every episode's expected
    /// regret stays at or below ε (0: from the start); null when the last
    /// episode was still above ε.
    pub episodes: Vec<Option<u64>>,
    /// Per seed: the first episode whose policy was ε-optimal; null if none.
    #[serde(default)]
    pub first_optimal: Vec<Option<u64>>,
    /// Per seed: the share of the K episodes whose policy was ε-optimal.
    #[serde(default)]
    pub optimal_share: Vec<f64>,
    /// S·A·H³/ε², the order of the PAC bound on `first_optimal`.
    pub pac_order: f64,
    /// ε ≥ V*₁(ρ): every policy is ε-optimal (regret never exceeds V* with
    /// rewards in [0, 1]), so these readings say nothing about learning.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub trivial: bool,
}

/// One (h, s, a) cell of a regret decomposition: 0-based indices, the mean
/// regret paid there, and its share of the learner's regret at K.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Cell {
    pub step: usize,
    pub state: usize,
    pub action: usize,
    pub regret: f64,
    pub share: f64,
}

impl LearnerResult {
    /// The burn-in as every table prints it: the value with its bootstrap
    /// interval ("1773 [1200, 2400]"; "not settled" for a side that did not
    /// settle), then, when not every seed settled on its own, how many did
    /// and how many still grow linearly at K ("not settled: 1 of 8 seeds
    /// still linear at K, 6 of 8 settled").
    pub fn burn_in_text(&self) -> String {
        let k = |x: Option<u64>| x.map_or("not settled".to_string(), |x| x.to_string());
        let mut text = match (self.burn_in, self.burn_in_interval) {
            (None, None | Some((None, None))) => "not settled".to_string(),
            (b, Some((lo, hi))) => format!("{} [{}, {}]", k(b), k(lo), k(hi)),
            (b, None) => k(b),
        };
        let n = self.burn_in_by_seed.len();
        let settled = self.burn_in_by_seed.iter().flatten().count();
        let linear = self.seeds_linear_at_k.unwrap_or(0) as usize;
        if linear > 0 && n == 1 {
            text.push_str(": still linear at K");
        } else if linear > 0 {
            text.push_str(&format!(": {linear} of {n} seeds still linear at K"));
            if settled > 0 {
                text.push_str(&format!(", {settled} of {n} settled"));
            }
        } else if n > 1 && settled < n {
            text.push_str(&format!(" ({settled} of {n} seeds settled)"));
        }
        text
    }

    /// The tail slope with its bootstrap interval, to the digits the
    /// interval supports: "0.52 [0.49, 0.55]" (see [`slope_digits`]).
    pub fn slope_text(&self) -> String {
        let Some(s) = self.slope else {
            return "—".into();
        };
        match self.slope_interval {
            Some((lo, hi)) => {
                let d = slope_digits(hi - lo);
                format!("{s:.d$} [{lo:.d$}, {hi:.d$}]")
            }
            None => format!("{s:.3}"),
        }
    }

    /// The `n` cells where most regret was paid, largest first (ties by
    /// position); cells with no regret are left out.
    pub fn top_cells(&self, n: usize) -> Vec<Cell> {
        let total = self.regret_mean.last().copied().unwrap_or(0.0);
        let mut cells: Vec<Cell> = self
            .regret_by_cell
            .iter()
            .enumerate()
            .flat_map(|(h, hs)| {
                hs.iter().enumerate().flat_map(move |(s, c)| {
                    c.iter().enumerate().map(move |(a, &x)| Cell {
                        step: h,
                        state: s,
                        action: a,
                        regret: x,
                        share: if total > 0.0 { x / total } else { 0.0 },
                    })
                })
            })
            .filter(|c| c.regret > 0.0)
            .collect();
        cells.sort_by(|a, b| b.regret.total_cmp(&a.regret));
        cells.truncate(n);
        cells
    }
}

/// Decimals a slope is printed with when its interval is `width` wide: the
/// first decimal place at which the interval's width shows, plus one (width
/// 0.06 → 3 places: 0.523 [0.494, 0.552]; width 0.4 → 2), between 1 and 4.
/// Common practice (one more digit than the uncertainty's leading digit).
pub fn slope_digits(width: f64) -> usize {
    if width.is_nan() || width <= 0.0 {
        return 3;
    }
    let lead = -libm::floor(libm::log10(width));
    (lead + 1.0).clamp(1.0, 4.0) as usize
}

/// The median of whole numbers: the middle one, or for an even count the
/// mean of the middle two (the textbook definition); None when empty.
pub fn median_of(xs: &[u64]) -> Option<f64> {
    let mut v = xs.to_vec();
    v.sort_unstable();
    let n = v.len();
    match n {
        0 => None,
        _ if n % 2 == 1 => Some(v[n / 2] as f64),
        _ => Some((v[n / 2 - 1] as f64 + v[n / 2] as f64) / 2.0),
    }
}

/// The median of per-seed episode numbers as the tables print it ("1250",
/// "1250.5" for an even count), or in how many seeds none came ("not in 2
/// of 8").
pub fn median_text(xs: &[Option<u64>]) -> String {
    let got: Vec<u64> = xs.iter().flatten().copied().collect();
    if got.len() < xs.len() {
        return format!("not in {} of {}", xs.len() - got.len(), xs.len());
    }
    median_of(&got).map_or("—".into(), |m| m.to_string())
}

/// A number as every table, verdict and read-out prints it (one rule for
/// the CLI and the page; `short` in www/format.js is the same rule for the
/// numbers the page formats itself): from 10⁶ up, three decimals of
/// scientific notation; from 100, one decimal; from 1, three; below 1,
/// three significant digits; a minus sign as "−".
pub fn number_text(x: f64) -> String {
    if !x.is_finite() {
        return if x.is_nan() {
            "NaN".into()
        } else if x > 0.0 {
            "Infinity".into()
        } else {
            "−Infinity".into()
        };
    }
    let a = x.abs();
    let text = if a >= 1e6 {
        let e = libm::floor(libm::log10(a)) as i32;
        let m = x / libm::pow(10.0, e as f64);
        // Rounding the mantissa can carry into the next power of ten.
        let (m, e) = if (libm::round(m.abs() * 1000.0) / 1000.0) >= 10.0 {
            (m / 10.0, e + 1)
        } else {
            (m, e)
        };
        format!("{m:.3}e+{e}")
    } else if a >= 100.0 {
        format!("{x:.1}")
    } else if a >= 1.0 {
        format!("{x:.3}")
    } else if a == 0.0 {
        "0.00".into()
    } else if a < 1e-6 {
        format!("{x:.2e}")
    } else {
        let lead = libm::floor(libm::log10(a)) as i32;
        let decimals = (2 - lead).max(0) as usize;
        format!("{x:.decimals$}")
    };
    text.replacen('-', "−", 1)
}

/// A regret interval as the tables print it: "[lo, hi]", "[0 (clipped),
/// hi]" where the Student-t interval reached below 0 (it is symmetric about
/// the mean, so it did exactly when 2·mean − hi < 0), "n/a (one seed)".
pub fn interval_text(mean: f64, lo: f64, hi: f64) -> String {
    if lo.is_nan() || hi.is_nan() {
        "n/a (one seed)".into()
    } else if 2.0 * mean - hi < 0.0 {
        format!("[0 (clipped), {}]", number_text(hi))
    } else {
        format!("[{}, {}]", number_text(lo), number_text(hi))
    }
}

/// Interval bounds that may not exist: NaN in memory (one seed gives no
/// interval) and null in the file, never a number standing in for one.
pub(crate) mod no_interval_as_null {
    use serde::{Deserialize, Deserializer, Serializer};

    pub fn serialize<S: Serializer>(v: &[f64], s: S) -> Result<S::Ok, S::Error> {
        s.collect_seq(v.iter().map(|x| (!x.is_nan()).then_some(*x)))
    }

    pub fn deserialize<'de, D: Deserializer<'de>>(d: D) -> Result<Vec<f64>, D::Error> {
        let v: Vec<Option<f64>> = Deserialize::deserialize(d)?;
        Ok(v.into_iter().map(|x| x.unwrap_or(f64::NAN)).collect())
    }
}

/// Most per-seed curve values a learner's results carry (seeds ×
/// checkpoints): 100 000, so a results file stays a few megabytes.
pub const MAX_SEED_CURVE_VALUES: usize = 100_000;

/// One learner's summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LearnerResult {
    pub label: String,
    /// The algorithm's key, or `"guest"` for a guest learner.
    pub algorithm: String,
    /// A guest learner's name.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub guest: Option<String>,
    pub checkpoints: Vec<u64>,
    /// Mean cumulative expected regret across seeds at each checkpoint.
    pub regret_mean: Vec<f64>,
    /// 95% Student-t interval of that mean, its lower end clipped at 0
    /// (regret is never negative; the interval is symmetric, so it was
    /// clipped exactly where 2·mean − hi < 0); null with one seed.
    #[serde(with = "no_interval_as_null")]
    pub regret_lo: Vec<f64>,
    #[serde(with = "no_interval_as_null")]
    pub regret_hi: Vec<f64>,
    /// Mean expected regret of the checkpoint's own episode.
    pub episode_regret_mean: Vec<f64>,
    /// Mean cumulative realised return up to each checkpoint (the sum of
    /// the rewards actually drawn; `return_mean` in files written before
    /// December 2026, which still read).
    #[serde(alias = "return_mean")]
    pub cumulative_return_mean: Vec<f64>,
    /// Mean over seeds of the certificate the learner gave for the
    /// checkpoint's own episode (an upper bound on that episode's regret,
    /// claimed with probability 1 − δ; ORLC's, Dann et al. 2019); empty for
    /// learners that give none.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub certificate_mean: Vec<f64>,
    pub final_regret: Vec<f64>,
    /// Each seed's cumulative regret at every checkpoint, `[seed][checkpoint]`
    /// (empty when seeds × checkpoints exceeds [`MAX_SEED_CURVE_VALUES`], and
    /// in files written before it was added).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub regret_by_seed: Vec<Vec<f64>>,
    pub model_updates: Vec<u64>,
    pub run_seeds: Vec<u64>,
    /// Least-squares slope of ln(mean regret) on ln k over the last decade
    /// of checkpoints (k ≥ K/10).
    pub slope: Option<f64>,
    /// Its 95% bootstrap interval over seeds, `[lo, hi]`; null with one seed
    /// (and in files written before it was added).
    #[serde(default)]
    pub slope_interval: Option<(f64, f64)>,
    /// Burn-in of the mean curve: null unless it and every seed's curve
    /// settled (see [`super::read_seeds`]).
    pub burn_in: Option<u64>,
    /// Its 95% bootstrap interval over seeds, `[lo, hi]` (null inside: not
    /// settled within K); null with one seed.
    #[serde(default)]
    pub burn_in_interval: Option<(Option<u64>, Option<u64>)>,
    /// Each seed's own burn-in (null: that seed had not settled by K); empty
    /// in files written before it was added.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub burn_in_by_seed: Vec<Option<u64>>,
    /// How many seeds were still growing linearly at K (any one keeps
    /// `burn_in` null); null in files written before it was added.
    #[serde(default)]
    pub seeds_linear_at_k: Option<u64>,
    pub episodes_to_eps: Vec<EpsResult>,
    /// Mean visits of each (h, s) per run, `[h][s]`.
    pub visits: Vec<Vec<f64>>,
    /// Where the regret was paid, mean over seeds: Σ over episodes of
    /// d_h^π(s,a)·Δ_h(s,a), `[h][s][a]`; it sums to the mean regret at K.
    /// Empty (and absent from the file) unless the experiment has
    /// `"decompose": true`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub regret_by_cell: Vec<Vec<Vec<f64>>>,
    /// `regret_by_cell` summed over actions, `[h][s]`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub regret_by_step_state: Vec<Vec<f64>>,
    /// `regret_by_cell` summed over steps and actions, `[s]`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub regret_by_state: Vec<f64>,
    /// The learner's published regret bound, as an order.
    pub bound: Option<Bound>,
}

/// The results of an experiment.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Results {
    pub format: String,
    pub version: u64,
    /// The build that computed them ([`crate::BUILD`]); empty in files from
    /// builds before December 2026.
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub build: String,
    pub name: String,
    pub model_name: String,
    pub states: usize,
    pub actions: usize,
    pub horizon: usize,
    pub optimal_value: f64,
    /// The model's state and action labels (for the decomposition's tables;
    /// empty in files written before they were added).
    #[serde(default)]
    pub state_labels: Vec<String>,
    #[serde(default)]
    pub action_labels: Vec<String>,
    pub episodes: u64,
    pub seeds: u64,
    pub seed: u64,
    pub delta: f64,
    /// The minimax lower-bound shape at the checkpoints.
    pub lower_bound: Bound,
    pub learners: Vec<LearnerResult>,
    /// Whether the runs used common random numbers (the experiment's
    /// `shared_draws`); false in files written before it was added.
    #[serde(default, skip_serializing_if = "std::ops::Not::not")]
    pub shared_draws: bool,
    /// Paired comparisons of learners (see [`compare`]); absent in files
    /// written before they were added.
    #[serde(default)]
    pub comparisons: Vec<Comparison>,
    /// Guest learners that failed, left out of `learners`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub failed: Vec<super::RunFault>,
}

/// With at most this many learners every pair is compared; with more, each
/// learner against the first.
pub const MAX_ALL_PAIRS: usize = 10;

/// Learner `a` against learner `b`, paired by seed index (run j of `a` with
/// run j of `b`; the runs are independent, so each pair's difference is an
/// independent draw and Student's paired interval applies).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Comparison {
    pub a: String,
    pub b: String,
    /// Mean over seeds of regret(a) − regret(b) at each checkpoint, with its
    /// 95% paired interval.
    pub difference_mean: Vec<f64>,
    /// (null with one seed: no interval exists)
    #[serde(with = "no_interval_as_null")]
    pub difference_lo: Vec<f64>,
    #[serde(with = "no_interval_as_null")]
    pub difference_hi: Vec<f64>,
    /// The same at K.
    pub at_k: Paired,
    /// One line that says it: "A below B at K = …, 95% paired interval […]",
    /// with the p-values when more than one comparison was made.
    pub verdict: String,
    /// Two-sided p-value of the paired t-test at K (null with one seed, and
    /// in files written before it was added).
    #[serde(default)]
    pub p_value: Option<f64>,
    /// That p-value adjusted by Holm's procedure over all the comparisons
    /// of the results ([`crate::stats::holm`]).
    #[serde(default)]
    pub p_holm: Option<f64>,
}

/// A p-value as the verdict prints it: three decimals, or two significant
/// digits below 0.001.
fn p_text(p: f64) -> String {
    if p < 0.001 {
        format!("{p:.1e}")
    } else {
        format!("{p:.3}")
    }
}

/// The verdict line of a comparison at K, followed, when `of` > 1
/// comparisons were made, by its p-value and the Holm-adjusted one.
pub fn verdict_of(
    a: &str,
    b: &str,
    k: u64,
    p: &Paired,
    pv: Option<(f64, f64)>,
    of: usize,
) -> String {
    let mut v = verdict(a, b, k, p);
    if let (Some((raw, adjusted)), true) = (pv, of > 1) {
        v.push_str(&format!(
            "; p = {}, Holm-adjusted over {of} comparisons p = {}",
            p_text(raw),
            p_text(adjusted)
        ));
    }
    v
}

/// The verdict line of a comparison at K.
pub fn verdict(a: &str, b: &str, k: u64, p: &Paired) -> String {
    let interval = format!(
        "95% paired interval [{}, {}]",
        number_text(p.lo),
        number_text(p.hi)
    );
    if p.n < 2 {
        format!("{a} against {b} at K = {k}: n/a (one seed)")
    } else if p.hi < 0.0 {
        format!(
            "{a} below {b} at K = {k}: regret {} lower, {interval}",
            number_text(-p.mean)
        )
    } else if p.lo > 0.0 {
        format!(
            "{a} above {b} at K = {k}: regret {} higher, {interval}",
            number_text(p.mean)
        )
    } else {
        format!("{a} and {b} not told apart at K = {k}: {interval} holds 0")
    }
}

/// The paired comparisons of the runs `runs[learner]` (each sorted by seed
/// index): every pair when there are at most [`MAX_ALL_PAIRS`] learners,
/// otherwise each against the first.
fn compare(labels: &[&str], runs: &[Vec<&RunRecord>], episodes: u64) -> Vec<Comparison> {
    let n = labels.len();
    let pairs: Vec<(usize, usize)> = if n <= MAX_ALL_PAIRS {
        (0..n)
            .flat_map(|i| (i + 1..n).map(move |j| (i, j)))
            .collect()
    } else {
        (1..n).map(|j| (0, j)).collect()
    };
    let mut out: Vec<Comparison> = pairs
        .into_iter()
        .map(|(i, j)| {
            let col =
                |l: usize, c: usize| runs[l].iter().map(|r| r.regret[c]).collect::<Vec<f64>>();
            let cps = runs[i].first().map_or(0, |r| r.regret.len());
            let curve: Vec<Paired> = (0..cps).map(|c| paired95(&col(i, c), &col(j, c))).collect();
            let at_k = *curve.last().expect("at least one checkpoint");
            let d: Vec<f64> = col(i, cps - 1)
                .iter()
                .zip(col(j, cps - 1))
                .map(|(x, y)| x - y)
                .collect();
            Comparison {
                a: labels[i].to_owned(),
                b: labels[j].to_owned(),
                difference_mean: curve.iter().map(|p| p.mean).collect(),
                difference_lo: curve.iter().map(|p| p.lo).collect(),
                difference_hi: curve.iter().map(|p| p.hi).collect(),
                verdict: String::new(),
                at_k,
                p_value: paired_p_value(&d),
                p_holm: None,
            }
        })
        .collect();
    let raw: Vec<f64> = out.iter().filter_map(|c| c.p_value).collect();
    if raw.len() == out.len() {
        for (c, adjusted) in out.iter_mut().zip(holm(&raw)) {
            c.p_holm = Some(adjusted);
        }
    }
    let of = out.len();
    for c in &mut out {
        let pv = c.p_value.zip(c.p_holm);
        c.verdict = verdict_of(&c.a, &c.b, episodes, &c.at_k, pv, of);
    }
    out
}

/// Summarises finished runs (any order) into results.
pub fn summarise(ctx: &Point, mut records: Vec<RunRecord>) -> Results {
    records.sort_by_key(|r| (r.learner, r.seed_index));
    let exp = &ctx.exp;
    let m = &exp.model;
    let ks = &ctx.checkpoints;
    let set = exp.setting();
    let column = |runs: &[&RunRecord], c: usize, f: fn(&RunRecord) -> &Vec<f64>| -> Vec<f64> {
        runs.iter().map(|r| f(r)[c]).collect()
    };
    let by_learner: Vec<Vec<&RunRecord>> = (0..exp.learners.len())
        .map(|li| records.iter().filter(|r| r.learner == li).collect())
        .collect();
    let labels: Vec<&str> = exp.learners.iter().map(|l| l.label.as_str()).collect();
    let learners = exp
        .learners
        .iter()
        .enumerate()
        .map(|(li, spec)| {
            let runs: Vec<&RunRecord> = by_learner[li].clone();
            let n = ks.len();
            let (mut mean_r, mut lo, mut hi, mut ep, mut ret) = (
                Vec::with_capacity(n),
                Vec::with_capacity(n),
                Vec::with_capacity(n),
                Vec::with_capacity(n),
                Vec::with_capacity(n),
            );
            for c in 0..n {
                let xs = column(&runs, c, |r| &r.regret);
                let (l, h) = if xs.len() < 2 {
                    (f64::NAN, f64::NAN)
                } else {
                    let (l, h) = interval95(&xs);
                    (l.max(0.0), h)
                };
                mean_r.push(mean(&xs));
                lo.push(l);
                hi.push(h);
                ep.push(mean(&column(&runs, c, |r| &r.episode_regret)));
                ret.push(mean(&column(&runs, c, |r| &r.returns)));
            }
            let episodes_to_eps = exp
                .eps_targets
                .iter()
                .enumerate()
                .map(|(e, &eps)| EpsResult {
                    epsilon: eps,
                    episodes: runs
                        .iter()
                        .map(|r| (r.last_above[e] < exp.episodes).then_some(r.last_above[e]))
                        .collect(),
                    first_optimal: runs
                        .iter()
                        .map(|r| r.first_within.get(e).copied().filter(|&k| k > 0))
                        .collect(),
                    optimal_share: runs
                        .iter()
                        .map(|r| {
                            r.within
                                .get(e)
                                .map_or(0.0, |&n| n as f64 / exp.episodes as f64)
                        })
                        .collect(),
                    pac_order: theory::pac_episodes(&set, eps),
                    trivial: eps >= ctx.optimal_value,
                })
                .collect();
            let (hh, ss) = (m.horizon(), m.n_states());
            let visits = (0..hh)
                .map(|h| {
                    (0..ss)
                        .map(|s| {
                            runs.iter()
                                .map(|r| r.visits[h * ss + s] as f64)
                                .sum::<f64>()
                                / runs.len() as f64
                        })
                        .collect()
                })
                .collect();
            let aa = m.n_actions();
            let n_runs = runs.len() as f64;
            let regret_by_cell: Vec<Vec<Vec<f64>>> = (0..if exp.decompose { hh } else { 0 })
                .map(|h| {
                    (0..ss)
                        .map(|s| {
                            (0..aa)
                                .map(|a| {
                                    let i = (h * ss + s) * aa + a;
                                    runs.iter()
                                        .map(|r| r.regret_cells.get(i).copied().unwrap_or(0.0))
                                        .sum::<f64>()
                                        / n_runs
                                })
                                .collect()
                        })
                        .collect()
                })
                .collect();
            let regret_by_step_state: Vec<Vec<f64>> = regret_by_cell
                .iter()
                .map(|hs| hs.iter().map(|cell| cell.iter().sum()).collect())
                .collect();
            let regret_by_state = (0..if exp.decompose { ss } else { 0 })
                .map(|s| regret_by_step_state.iter().map(|hs| hs[s]).sum())
                .collect();
            let reading = read_seeds(
                ks,
                &runs.iter().map(|r| r.regret.as_slice()).collect::<Vec<_>>(),
                &mean_r,
                super::run_seed(exp.seed, li, u64::MAX),
            );
            LearnerResult {
                regret_by_cell,
                regret_by_step_state,
                regret_by_state,
                label: spec.label.clone(),
                algorithm: spec.kind_key().to_owned(),
                guest: spec.guest().map(str::to_owned),
                checkpoints: ks.clone(),
                slope: tail_slope(ks, &mean_r),
                slope_interval: reading.slope_interval,
                burn_in: reading.burn_in,
                burn_in_interval: reading.interval,
                seeds_linear_at_k: Some(reading.seeds_linear as u64),
                burn_in_by_seed: reading.by_seed,
                regret_mean: mean_r,
                regret_lo: lo,
                regret_hi: hi,
                episode_regret_mean: ep,
                cumulative_return_mean: ret,
                certificate_mean: if runs.iter().all(|r| r.certificate.len() == n) {
                    (0..n)
                        .map(|c| mean(&column(&runs, c, |r| &r.certificate)))
                        .collect()
                } else {
                    Vec::new()
                },
                final_regret: runs.iter().map(|r| *r.regret.last().unwrap()).collect(),
                regret_by_seed: if runs.len() * ks.len() <= MAX_SEED_CURVE_VALUES {
                    runs.iter().map(|r| r.regret.clone()).collect()
                } else {
                    Vec::new()
                },
                model_updates: runs.iter().map(|r| r.model_updates).collect(),
                run_seeds: runs.iter().map(|r| r.seed).collect(),
                episodes_to_eps,
                visits,
                bound: spec.builtin().and_then(|a| a.bound(&set, ks)),
            }
        })
        .collect();
    Results {
        format: RESULTS_FORMAT.into(),
        build: crate::BUILD.into(),
        version: RESULTS_VERSION,
        name: exp.name.clone(),
        model_name: m.name().to_owned(),
        states: m.n_states(),
        actions: m.n_actions(),
        horizon: m.horizon(),
        optimal_value: ctx.optimal_value,
        state_labels: m.states().to_vec(),
        action_labels: m.actions().to_vec(),
        episodes: exp.episodes,
        seeds: exp.seeds,
        seed: exp.seed,
        delta: exp.delta,
        lower_bound: theory::lower_bound(&set, ks),
        comparisons: compare(&labels, &by_learner, exp.episodes),
        shared_draws: exp.shared_draws,
        learners,
        failed: Vec::new(),
    }
}

impl Results {
    /// The results as JSON (format v1).
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).expect("results hold no non-finite numbers") + "\n"
    }

    /// Every seed's curve, one row per (learner, seed, checkpoint):
    /// cumulative regret of that run.
    pub fn seeds_csv(&self) -> String {
        let mut o = String::from("learner,algorithm,seed_index,run_seed,episode,regret\n");
        for l in &self.learners {
            for (j, curve) in l.regret_by_seed.iter().enumerate() {
                for (k, x) in l.checkpoints.iter().zip(curve) {
                    o.push_str(&format!(
                        "{},{},{j},{},{k},{x}\n",
                        csv_field(&l.label),
                        l.algorithm,
                        l.run_seeds[j]
                    ));
                }
            }
        }
        o
    }

    /// The summary table, one row per learner: regret at K with its
    /// interval, slope, burn-in with its interval, mean model updates, and
    /// per ε target the median first ε-optimal episode (empty where not all
    /// seeds reached one) and the mean share of ε-optimal episodes.
    pub fn summary_csv(&self) -> String {
        let mut o = String::from(
            "learner,algorithm,regret_at_k,regret_lo,regret_hi,slope,slope_lo,slope_hi,burn_in,burn_in_lo,burn_in_hi,seeds,seeds_settled,seeds_linear_at_k,model_updates_mean,bound_at_k,bound_applies",
        );
        let targets = self
            .learners
            .iter()
            .map(|l| l.episodes_to_eps.len())
            .max()
            .unwrap_or(0);
        for i in 1..=targets {
            o.push_str(&format!(
                ",eps_{i},first_optimal_median_{i},optimal_share_mean_{i}"
            ));
        }
        o.push('\n');
        let opt = |x: Option<u64>| x.map_or(String::new(), |x| x.to_string());
        let one_seed = self.seeds < 2;
        for l in &self.learners {
            let k = l.regret_mean.len() - 1;
            let (blo, bhi) = l.burn_in_interval.unwrap_or((None, None));
            let (slo, shi) = l
                .slope_interval
                .map_or((String::new(), String::new()), |(a, b)| {
                    (a.to_string(), b.to_string())
                });
            let (rlo, rhi) = if one_seed {
                (String::new(), String::new())
            } else {
                (l.regret_lo[k].to_string(), l.regret_hi[k].to_string())
            };
            let updates =
                l.model_updates.iter().sum::<u64>() as f64 / l.model_updates.len().max(1) as f64;
            let (settled, linear) = if l.burn_in_by_seed.is_empty() {
                (String::new(), String::new())
            } else {
                (
                    l.burn_in_by_seed.iter().flatten().count().to_string(),
                    opt(l.seeds_linear_at_k),
                )
            };
            let (bound, applies) = l
                .bound
                .as_ref()
                .map_or((String::new(), String::new()), |b| {
                    (b.values[k].to_string(), b.applies.to_string())
                });
            o.push_str(&format!(
                "{},{},{},{rlo},{rhi},{},{slo},{shi},{},{},{},{},{settled},{linear},{updates},{bound},{applies}",
                csv_field(&l.label),
                l.algorithm,
                l.regret_mean[k],
                l.slope.map_or(String::new(), |s| s.to_string()),
                opt(l.burn_in),
                opt(blo),
                opt(bhi),
                l.run_seeds.len(),
            ));
            for e in &l.episodes_to_eps {
                let firsts: Vec<u64> = e.first_optimal.iter().filter_map(|x| *x).collect();
                let median = (firsts.len() == e.first_optimal.len())
                    .then(|| median_of(&firsts))
                    .flatten();
                let share =
                    e.optimal_share.iter().sum::<f64>() / e.optimal_share.len().max(1) as f64;
                o.push_str(&format!(
                    ",{},{},{share}",
                    e.epsilon,
                    median.map_or(String::new(), |m| m.to_string())
                ));
            }
            o.push('\n');
        }
        o
    }

    /// Where each learner's regret was paid, one row per (learner, h, s, a)
    /// with h 1-based as shown to people: mean regret over seeds and its
    /// share of the learner's regret at K.
    pub fn cells_csv(&self) -> String {
        let mut o = String::from(
            "learner,algorithm,step,state,action,state_label,action_label,regret,share\n",
        );
        for l in &self.learners {
            let total = l.regret_mean.last().copied().unwrap_or(0.0);
            for (h, hs) in l.regret_by_cell.iter().enumerate() {
                for (s, cell) in hs.iter().enumerate() {
                    for (a, &x) in cell.iter().enumerate() {
                        let label =
                            |v: &[String], i: usize| csv_field(v.get(i).map_or("", String::as_str));
                        o.push_str(&format!(
                            "{},{},{},{s},{a},{},{},{x},{}\n",
                            csv_field(&l.label),
                            l.algorithm,
                            h + 1,
                            label(&self.state_labels, s),
                            label(&self.action_labels, a),
                            if total > 0.0 { x / total } else { 0.0 },
                        ));
                    }
                }
            }
        }
        o
    }

    /// One row per (learner, checkpoint).
    pub fn to_csv(&self) -> String {
        let mut o = String::from(
            "learner,algorithm,episode,regret_mean,regret_lo,regret_hi,episode_regret_mean,cumulative_return_mean,bound,bound_applies,lower_bound,certificate_mean\n",
        );
        let one_seed = self.seeds < 2;
        let iv = |x: f64| {
            if one_seed {
                String::new()
            } else {
                x.to_string()
            }
        };
        for l in &self.learners {
            let applies = l
                .bound
                .as_ref()
                .map_or(String::new(), |b| b.applies.to_string());
            for (c, k) in l.checkpoints.iter().enumerate() {
                let bound = l
                    .bound
                    .as_ref()
                    .map(|b| b.values[c].to_string())
                    .unwrap_or_default();
                let certificate = l
                    .certificate_mean
                    .get(c)
                    .map(f64::to_string)
                    .unwrap_or_default();
                o.push_str(&format!(
                    "{},{},{k},{},{},{},{},{},{bound},{applies},{},{certificate}\n",
                    csv_field(&l.label),
                    l.algorithm,
                    l.regret_mean[c],
                    iv(l.regret_lo[c]),
                    iv(l.regret_hi[c]),
                    l.episode_regret_mean[c],
                    l.cumulative_return_mean[c],
                    self.lower_bound.values[c],
                ));
            }
        }
        o
    }
}

/// The `format` of sweep results.
pub const SWEEP_FORMAT: &str = "burnin-sweep";

/// One learner across the values of a sweep.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SweepLearner {
    pub label: String,
    pub algorithm: String,
    /// Mean regret at K for each value, with its 95% interval.
    pub regret_mean: Vec<f64>,
    #[serde(with = "no_interval_as_null")]
    pub regret_lo: Vec<f64>,
    #[serde(with = "no_interval_as_null")]
    pub regret_hi: Vec<f64>,
    pub slope: Vec<Option<f64>>,
    pub burn_in: Vec<Option<u64>>,
    /// How burn-in and regret at K grow with the sweep's size
    /// ([`super::scaling`]); absent when the sweep changes no size that can
    /// be read on log axes.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub scaling: Option<super::scaling::Scaling>,
}

/// Results of a sweep: regret at K against the swept parameter, and the
/// full results of every point.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SweepResults {
    pub format: String,
    pub version: u64,
    /// As [`Results::build`].
    #[serde(default, skip_serializing_if = "String::is_empty")]
    pub build: String,
    pub name: String,
    pub parameter: String,
    pub values: Vec<f64>,
    pub learners: Vec<SweepLearner>,
    /// What the learners' scaling exponents are in ("S", "A", "H", "K" or
    /// the swept parameter) and its value at each point.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub scaling_in: Option<String>,
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub scaling_x: Vec<f64>,
    pub points: Vec<Results>,
    /// Guest learners that failed, left out of `learners`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub failed: Vec<super::RunFault>,
}

impl SweepResults {
    /// Collects the results of every point of a sweep over `parameter`.
    pub fn new(name: &str, parameter: &str, values: &[f64], points: Vec<Results>) -> SweepResults {
        let scale = super::scaling::variable(parameter, values, &points);
        let learners = points[0]
            .learners
            .iter()
            .enumerate()
            .map(|(li, l)| {
                let at_k = |f: fn(&LearnerResult) -> f64| -> Vec<f64> {
                    points.iter().map(|p| f(&p.learners[li])).collect()
                };
                SweepLearner {
                    label: l.label.clone(),
                    algorithm: l.algorithm.clone(),
                    regret_mean: at_k(|l| *l.regret_mean.last().unwrap()),
                    regret_lo: at_k(|l| *l.regret_lo.last().unwrap()),
                    regret_hi: at_k(|l| *l.regret_hi.last().unwrap()),
                    slope: points.iter().map(|p| p.learners[li].slope).collect(),
                    burn_in: points.iter().map(|p| p.learners[li].burn_in).collect(),
                    scaling: scale.as_ref().map(|(_, x)| {
                        super::scaling::read(
                            &points,
                            li,
                            x,
                            super::run_seed(points[0].seed, li, u64::MAX - 1),
                        )
                    }),
                }
            })
            .collect();
        SweepResults {
            format: SWEEP_FORMAT.into(),
            build: crate::BUILD.into(),
            version: RESULTS_VERSION,
            name: name.to_owned(),
            parameter: parameter.to_owned(),
            values: values.to_vec(),
            learners,
            scaling_x: scale.as_ref().map(|(_, x)| x.clone()).unwrap_or_default(),
            scaling_in: scale.map(|(name, _)| name),
            points,
            failed: Vec::new(),
        }
    }

    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).expect("results hold no non-finite numbers") + "\n"
    }

    /// One row per (learner, value): regret at K and its interval.
    pub fn to_csv(&self) -> String {
        let mut o = format!(
            "learner,algorithm,{},regret_mean,regret_lo,regret_hi\n",
            self.parameter
        );
        for l in &self.learners {
            for (i, v) in self.values.iter().enumerate() {
                let iv = |x: f64| {
                    if x.is_nan() {
                        String::new()
                    } else {
                        x.to_string()
                    }
                };
                o.push_str(&format!(
                    "{},{},{v},{},{},{}\n",
                    csv_field(&l.label),
                    l.algorithm,
                    l.regret_mean[i],
                    iv(l.regret_lo[i]),
                    iv(l.regret_hi[i])
                ));
            }
        }
        o
    }
}

/// Reads a results file (`burnin-results` or `burnin-sweep`, version 1),
/// for showing it again: the header is checked first, then the whole
/// structure.
pub fn parse_results(text: &str) -> Result<super::Output, Problems> {
    // A file that is not JSON at all (cut short, empty, a byte-order mark,
    // NaN) is told where the JSON breaks, as `run` tells it, not that its
    // format field is wrong (#35).
    serde_json::from_str::<serde::de::IgnoredAny>(text)
        .map_err(|e| Problems::single("", crate::format::lax::syntax_problem(&e)))?;
    let format = crate::format::identify(text);
    // Only the version is read here (the rest is skipped, not stored).
    #[derive(Deserialize)]
    struct Header {
        version: Option<f64>,
    }
    let version = serde_json::from_str::<Header>(text)
        .ok()
        .and_then(|h| h.version);
    let want = |f: &str| format.as_deref() == Some(f);
    if !want(RESULTS_FORMAT) && !want(SWEEP_FORMAT) {
        return Err(Problems::single(
            "format",
            format!("expected {RESULTS_FORMAT:?} or {SWEEP_FORMAT:?}"),
        ));
    }
    if version != Some(RESULTS_VERSION as f64) {
        return Err(Problems::single(
            "version",
            format!(
                "version {} is not supported; this build reads version {RESULTS_VERSION}",
                version.map_or("(missing)".to_string(), |v| v.to_string())
            ),
        ));
    }
    let incomplete = |e: serde_json::Error| {
        Problems::single("", format!("these results are incomplete or damaged ({e})"))
    };
    let out = if want(RESULTS_FORMAT) {
        super::Output::Single(serde_json::from_str(text).map_err(incomplete)?)
    } else {
        super::Output::Sweep(serde_json::from_str(text).map_err(incomplete)?)
    };
    let empty = match &out {
        super::Output::Single(r) => {
            r.learners.is_empty() || r.learners.iter().any(|l| l.checkpoints.is_empty())
        }
        super::Output::Sweep(s) => s.learners.is_empty() || s.points.is_empty(),
    };
    if empty {
        return Err(Problems::single(
            "learners",
            "these results hold no learner curves",
        ));
    }
    let mut p = Problems::default();
    match &out {
        super::Output::Single(r) => check_results(r, "", &mut p),
        super::Output::Sweep(s) => check_sweep(s, &mut p),
    }
    p.into_result()?;
    Ok(out)
}

/// Checks the sizes and shapes of results read from a file, so that no
/// writer or chart indexes past a list and nothing grows past the limits
/// of the files Burnin writes (docs/formats.md, "Results").
fn check_results(r: &Results, at: &str, problems: &mut Problems) {
    use super::spec::{MAX_CHECKPOINTS, MAX_EPISODES, MAX_EPS_TARGETS, MAX_LEARNERS, MAX_SEEDS};
    use crate::model::limits::{
        MAX_ACTIONS, MAX_CELLS, MAX_HORIZON, MAX_LABEL_CHARS, MAX_NAME_CHARS, MAX_STATES,
    };
    let p = std::cell::RefCell::new(problems);
    let path = |tail: &str| {
        if at.is_empty() {
            tail.to_owned()
        } else {
            format!("{at}.{tail}")
        }
    };
    let len = |tail: &str, found: usize, want: usize| {
        if found != want {
            p.borrow_mut()
                .push(path(tail), format!("expected {want} values, found {found}"));
        }
    };
    let (h, s, a, k) = (r.horizon, r.states, r.actions, r.episodes);
    if r.learners.len() > MAX_LEARNERS {
        p.borrow_mut().push(
            path("learners"),
            format!("more than {MAX_LEARNERS} learners"),
        );
        return;
    }
    let sizes_ok = (1..=MAX_STATES).contains(&s)
        && (1..=MAX_ACTIONS).contains(&a)
        && (1..=MAX_HORIZON).contains(&h)
        && h * s * a <= MAX_CELLS
        && (1..=MAX_EPISODES).contains(&k)
        && (1..=MAX_SEEDS).contains(&r.seeds);
    if !sizes_ok {
        p.borrow_mut().push(
            path("states"),
            format!(
                "S = {s}, A = {a}, H = {h}, K = {k} and {} seeds are not within the limits of an experiment",
                r.seeds
            ),
        );
        return;
    }
    let n = r.seeds as usize;
    let mut texts: Vec<(String, &str, usize)> = vec![
        (path("name"), r.name.as_str(), MAX_NAME_CHARS),
        (path("model_name"), r.model_name.as_str(), MAX_NAME_CHARS),
    ];
    for (i, x) in r.state_labels.iter().enumerate() {
        texts.push((path(&format!("state_labels[{i}]")), x, MAX_LABEL_CHARS));
    }
    for (i, x) in r.action_labels.iter().enumerate() {
        texts.push((path(&format!("action_labels[{i}]")), x, MAX_LABEL_CHARS));
    }
    if !r.state_labels.is_empty() {
        len("state_labels", r.state_labels.len(), s);
    }
    if !r.action_labels.is_empty() {
        len("action_labels", r.action_labels.len(), a);
    }
    let c0 = r.learners.first().map_or(0, |l| l.checkpoints.len());
    let e0 = r.learners.first().map_or(0, |l| l.episodes_to_eps.len());
    len("lower_bound.values", r.lower_bound.values.len(), c0);
    if e0 > MAX_EPS_TARGETS {
        len("learners[0].episodes_to_eps", e0, MAX_EPS_TARGETS);
    }
    for (i, l) in r.learners.iter().enumerate() {
        let lp = |f: &str| format!("learners[{i}].{f}");
        texts.push((path(&lp("label")), l.label.as_str(), MAX_LABEL_CHARS));
        let c = l.checkpoints.len();
        if c > MAX_CHECKPOINTS as usize + 1
            || l.checkpoints.windows(2).any(|w| w[0] >= w[1])
            || l.checkpoints.last() != Some(&k)
        {
            p.borrow_mut().push(
                path(&lp("checkpoints")),
                format!(
                    "expected at most {} increasing episodes ending at K = {k}",
                    MAX_CHECKPOINTS + 1
                ),
            );
            continue;
        }
        len(&lp("checkpoints"), c, c0);
        for (f, v) in [
            ("regret_mean", &l.regret_mean),
            ("regret_lo", &l.regret_lo),
            ("regret_hi", &l.regret_hi),
            ("episode_regret_mean", &l.episode_regret_mean),
            ("cumulative_return_mean", &l.cumulative_return_mean),
        ] {
            len(&lp(f), v.len(), c);
        }
        if !l.certificate_mean.is_empty() {
            len(&lp("certificate_mean"), l.certificate_mean.len(), c);
        }
        len(&lp("final_regret"), l.final_regret.len(), n);
        len(&lp("model_updates"), l.model_updates.len(), n);
        len(&lp("run_seeds"), l.run_seeds.len(), n);
        if !l.burn_in_by_seed.is_empty() {
            len(&lp("burn_in_by_seed"), l.burn_in_by_seed.len(), n);
        }
        if !l.regret_by_seed.is_empty() {
            len(&lp("regret_by_seed"), l.regret_by_seed.len(), n);
            for (j, xs) in l.regret_by_seed.iter().enumerate() {
                len(&lp(&format!("regret_by_seed[{j}]")), xs.len(), c);
            }
        }
        if let Some(b) = &l.bound {
            len(&lp("bound.values"), b.values.len(), c);
        }
        len(&lp("episodes_to_eps"), l.episodes_to_eps.len(), e0);
        for (j, e) in l.episodes_to_eps.iter().take(MAX_EPS_TARGETS).enumerate() {
            let ep = |f: &str| lp(&format!("episodes_to_eps[{j}].{f}"));
            len(&ep("episodes"), e.episodes.len(), n);
            if !e.first_optimal.is_empty() {
                len(&ep("first_optimal"), e.first_optimal.len(), n);
            }
            if !e.optimal_share.is_empty() {
                len(&ep("optimal_share"), e.optimal_share.len(), n);
            }
        }
        let grids: [(&str, &Vec<Vec<f64>>, bool); 2] = [
            ("visits", &l.visits, true),
            ("regret_by_step_state", &l.regret_by_step_state, false),
        ];
        for (f, g, required) in grids {
            if g.is_empty() && !required {
                continue;
            }
            len(&lp(f), g.len(), h);
            for (t, row) in g.iter().enumerate().take(h) {
                len(&lp(&format!("{f}[{t}]")), row.len(), s);
            }
        }
        if !l.regret_by_state.is_empty() {
            len(&lp("regret_by_state"), l.regret_by_state.len(), s);
        }
        if !l.regret_by_cell.is_empty() {
            len(&lp("regret_by_cell"), l.regret_by_cell.len(), h);
            for (t, rows) in l.regret_by_cell.iter().enumerate().take(h) {
                len(&lp(&format!("regret_by_cell[{t}]")), rows.len(), s);
                for (x, row) in rows.iter().enumerate().take(s) {
                    len(&lp(&format!("regret_by_cell[{t}][{x}]")), row.len(), a);
                }
            }
        }
    }
    if r.comparisons.len() > MAX_LEARNERS * MAX_LEARNERS {
        p.borrow_mut().push(
            path("comparisons"),
            "more comparisons than pairs of learners",
        );
        return;
    }
    for (i, cmp) in r.comparisons.iter().enumerate() {
        let cp = |f: &str| path(&format!("comparisons[{i}].{f}"));
        for (f, v) in [
            ("difference_mean", &cmp.difference_mean),
            ("difference_lo", &cmp.difference_lo),
            ("difference_hi", &cmp.difference_hi),
        ] {
            len(&cp(f), v.len(), c0);
        }
        for (f, label) in [("a", &cmp.a), ("b", &cmp.b)] {
            if !r.learners.iter().any(|l| &l.label == label) {
                p.borrow_mut()
                    .push(cp(f), "names no learner of these results");
            }
        }
    }
    for (tp, text, max) in texts {
        if text.chars().count() > max {
            p.borrow_mut()
                .push(tp, format!("longer than {max} characters"));
        }
    }
}

/// [`check_results`] for a sweep: its points, and its learners' columns,
/// one value per point.
fn check_sweep(r: &SweepResults, p: &mut Problems) {
    use super::spec::{MAX_LEARNERS, MAX_SWEEP_VALUES};
    let v = r.values.len();
    if v == 0 || v > MAX_SWEEP_VALUES || r.points.len() != v {
        p.push(
            "values",
            format!("expected 1 to {MAX_SWEEP_VALUES} values, one per point of `points`"),
        );
        return;
    }
    if r.learners.len() > MAX_LEARNERS {
        p.push("learners", format!("more than {MAX_LEARNERS} learners"));
        return;
    }
    // The format's limits on texts, as for one point's results (#35):
    // a sweep's own name, parameter and learner labels were never checked.
    use crate::model::limits::{MAX_LABEL_CHARS, MAX_NAME_CHARS};
    let mut texts: Vec<(String, &str, usize)> = vec![
        ("name".into(), r.name.as_str(), MAX_NAME_CHARS),
        ("parameter".into(), r.parameter.as_str(), MAX_NAME_CHARS),
    ];
    if let Some(x) = &r.scaling_in {
        texts.push(("scaling_in".into(), x.as_str(), MAX_NAME_CHARS));
    }
    for (i, l) in r.learners.iter().enumerate() {
        texts.push((
            format!("learners[{i}].label"),
            l.label.as_str(),
            MAX_LABEL_CHARS,
        ));
        texts.push((
            format!("learners[{i}].algorithm"),
            l.algorithm.as_str(),
            MAX_LABEL_CHARS,
        ));
    }
    for (at, text, max) in texts {
        if text.chars().count() > max {
            p.push(at, format!("longer than {max} characters"));
        }
    }
    for (i, l) in r.learners.iter().enumerate() {
        for (f, n) in [
            ("regret_mean", l.regret_mean.len()),
            ("regret_lo", l.regret_lo.len()),
            ("regret_hi", l.regret_hi.len()),
            ("slope", l.slope.len()),
            ("burn_in", l.burn_in.len()),
        ] {
            if n != v {
                p.push(
                    format!("learners[{i}].{f}"),
                    format!("expected {v} values, found {n}"),
                );
            }
        }
    }
    if r.scaling_in.is_some() && r.scaling_x.len() != v {
        p.push(
            "scaling_x",
            format!("expected {v} values, found {}", r.scaling_x.len()),
        );
    }
    for (i, pt) in r.points.iter().enumerate() {
        check_results(pt, &format!("points[{i}]"), p);
    }
}

/// A CSV field, quoted when it must be (RFC 4180).
pub fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_owned()
    }
}

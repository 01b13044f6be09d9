//! Results format v1 (`"format": "burnin-results"`): summaries across seeds,
//! the published bounds beside them, JSON and CSV.

use serde::{Deserialize, Serialize};

use super::{Point, RunRecord};
use crate::model::Problems;
use crate::stats::{Paired, interval95, ls_slope, mean, paired95};
use crate::theory::{self, Bound};

pub const RESULTS_FORMAT: &str = "burnin-results";
pub const RESULTS_VERSION: u64 = 1;

/// The local log-log slope at or below which regret counts as settled into
/// its √K regime (burn-in; see [`burn_in`]).
pub const SETTLED_SLOPE: f64 = 0.6;

/// The empirical sample complexity for one ε.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct EpsResult {
    pub epsilon: f64,
    /// Per seed: the first episode after which every episode's expected
    /// regret stays at or below ε (0: from the start); null when the last
    /// episode was still above ε.
    pub episodes: Vec<Option<u64>>,
    /// S·A·H³/ε², the order of the PAC bound.
    pub pac_order: f64,
}

/// One learner's summary.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct LearnerResult {
    pub label: String,
    pub algorithm: String,
    pub checkpoints: Vec<u64>,
    /// Mean cumulative expected regret across seeds at each checkpoint.
    pub regret_mean: Vec<f64>,
    /// 95% Student-t interval of that mean.
    pub regret_lo: Vec<f64>,
    pub regret_hi: Vec<f64>,
    /// Mean expected regret of the checkpoint's own episode.
    pub episode_regret_mean: Vec<f64>,
    /// Mean cumulative realised return.
    pub return_mean: Vec<f64>,
    pub final_regret: Vec<f64>,
    pub model_updates: Vec<u64>,
    pub run_seeds: Vec<u64>,
    /// Least-squares slope of ln(mean regret) on ln k over the last decade
    /// of checkpoints (k ≥ K/10).
    pub slope: Option<f64>,
    /// The first checkpoint after which the local slope stays ≤ 0.6.
    pub burn_in: Option<u64>,
    pub episodes_to_eps: Vec<EpsResult>,
    /// Mean visits of each (h, s) per run, `[h][s]`.
    pub visits: Vec<Vec<f64>>,
    /// The learner's published regret bound, as an order.
    pub bound: Option<Bound>,
}

/// The results of an experiment.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Results {
    pub format: String,
    pub version: u64,
    pub name: String,
    pub model_name: String,
    pub states: usize,
    pub actions: usize,
    pub horizon: usize,
    pub optimal_value: f64,
    pub episodes: u64,
    pub seeds: u64,
    pub seed: u64,
    pub delta: f64,
    /// The minimax lower-bound shape at the checkpoints.
    pub lower_bound: Bound,
    pub learners: Vec<LearnerResult>,
    /// Paired comparisons of learners (see [`compare`]); absent in files
    /// written before they were added.
    #[serde(default)]
    pub comparisons: Vec<Comparison>,
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
    pub difference_lo: Vec<f64>,
    pub difference_hi: Vec<f64>,
    /// The same at K.
    pub at_k: Paired,
    /// One line that says it: "A below B at K = …, 95% paired interval […]".
    pub verdict: String,
}

/// The verdict line of a comparison at K.
pub fn verdict(a: &str, b: &str, k: u64, p: &Paired) -> String {
    let interval = format!("95% paired interval [{:.4}, {:.4}]", p.lo, p.hi);
    if p.n < 2 {
        format!("{a} against {b} at K = {k}: n/a (one seed)")
    } else if p.hi < 0.0 {
        format!(
            "{a} below {b} at K = {k}: regret {:.4} lower, {interval}",
            -p.mean
        )
    } else if p.lo > 0.0 {
        format!(
            "{a} above {b} at K = {k}: regret {:.4} higher, {interval}",
            p.mean
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
    pairs
        .into_iter()
        .map(|(i, j)| {
            let at = |c: usize| {
                let col = |l: usize| runs[l].iter().map(|r| r.regret[c]).collect::<Vec<f64>>();
                paired95(&col(i), &col(j))
            };
            let cps = runs[i].first().map_or(0, |r| r.regret.len());
            let curve: Vec<Paired> = (0..cps).map(at).collect();
            let at_k = *curve.last().expect("at least one checkpoint");
            Comparison {
                a: labels[i].to_owned(),
                b: labels[j].to_owned(),
                difference_mean: curve.iter().map(|p| p.mean).collect(),
                difference_lo: curve.iter().map(|p| p.lo).collect(),
                difference_hi: curve.iter().map(|p| p.hi).collect(),
                verdict: verdict(labels[i], labels[j], episodes, &at_k),
                at_k,
            }
        })
        .collect()
}

/// The first checkpoint k_j such that every local slope
/// (ln R_{i+1} − ln R_i)/(ln k_{i+1} − ln k_i) for i ≥ j is ≤ [`SETTLED_SLOPE`],
/// over the checkpoints where the mean regret R is positive; None when the
/// last segment is steeper or fewer than two such checkpoints exist.
///
/// Our operational definition (the papers define burn-in through their
/// bounds, not through data).
pub fn burn_in(ks: &[u64], regret: &[f64]) -> Option<u64> {
    let pts: Vec<(f64, f64, u64)> = ks
        .iter()
        .zip(regret)
        .filter(|(_, r)| **r > 0.0)
        .map(|(&k, &r)| (libm::log(k as f64), libm::log(r), k))
        .collect();
    if pts.len() < 2 {
        return None;
    }
    let mut start = None;
    for w in pts.windows(2).rev() {
        let slope = (w[1].1 - w[0].1) / (w[1].0 - w[0].0);
        if slope <= SETTLED_SLOPE {
            start = Some(w[0].2);
        } else {
            break;
        }
    }
    start
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
                let (l, h) = interval95(&xs);
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
                    pac_order: theory::pac_episodes(&set, eps),
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
            LearnerResult {
                label: spec.label.clone(),
                algorithm: spec.algorithm.key().to_owned(),
                checkpoints: ks.clone(),
                slope: tail_slope(ks, &mean_r),
                burn_in: burn_in(ks, &mean_r),
                regret_mean: mean_r,
                regret_lo: lo,
                regret_hi: hi,
                episode_regret_mean: ep,
                return_mean: ret,
                final_regret: runs.iter().map(|r| *r.regret.last().unwrap()).collect(),
                model_updates: runs.iter().map(|r| r.model_updates).collect(),
                run_seeds: runs.iter().map(|r| r.seed).collect(),
                episodes_to_eps,
                visits,
                bound: spec.algorithm.bound(&set, ks),
            }
        })
        .collect();
    Results {
        format: RESULTS_FORMAT.into(),
        version: RESULTS_VERSION,
        name: exp.name.clone(),
        model_name: m.name().to_owned(),
        states: m.n_states(),
        actions: m.n_actions(),
        horizon: m.horizon(),
        optimal_value: ctx.optimal_value,
        episodes: exp.episodes,
        seeds: exp.seeds,
        seed: exp.seed,
        delta: exp.delta,
        lower_bound: theory::lower_bound(&set, ks),
        comparisons: compare(&labels, &by_learner, exp.episodes),
        learners,
    }
}

impl Results {
    /// The results as JSON (format v1).
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).expect("results hold no non-finite numbers") + "\n"
    }

    /// One row per (learner, checkpoint).
    pub fn to_csv(&self) -> String {
        let mut o = String::from(
            "learner,algorithm,episode,regret_mean,regret_lo,regret_hi,episode_regret_mean,return_mean,bound,lower_bound\n",
        );
        for l in &self.learners {
            for (c, k) in l.checkpoints.iter().enumerate() {
                let bound = l
                    .bound
                    .as_ref()
                    .map(|b| b.values[c].to_string())
                    .unwrap_or_default();
                o.push_str(&format!(
                    "{},{},{k},{},{},{},{},{},{bound},{}\n",
                    csv_field(&l.label),
                    l.algorithm,
                    l.regret_mean[c],
                    l.regret_lo[c],
                    l.regret_hi[c],
                    l.episode_regret_mean[c],
                    l.return_mean[c],
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
    pub regret_lo: Vec<f64>,
    pub regret_hi: Vec<f64>,
    pub slope: Vec<Option<f64>>,
    pub burn_in: Vec<Option<u64>>,
}

/// Results of a sweep: regret at K against the swept parameter, and the
/// full results of every point.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct SweepResults {
    pub format: String,
    pub version: u64,
    pub name: String,
    pub parameter: String,
    pub values: Vec<f64>,
    pub learners: Vec<SweepLearner>,
    pub points: Vec<Results>,
}

impl SweepResults {
    /// Collects the results of every point of a sweep over `parameter`.
    pub fn new(name: &str, parameter: &str, values: &[f64], points: Vec<Results>) -> SweepResults {
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
                }
            })
            .collect();
        SweepResults {
            format: SWEEP_FORMAT.into(),
            version: RESULTS_VERSION,
            name: name.to_owned(),
            parameter: parameter.to_owned(),
            values: values.to_vec(),
            learners,
            points,
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
                o.push_str(&format!(
                    "{},{},{v},{},{},{}\n",
                    csv_field(&l.label),
                    l.algorithm,
                    l.regret_mean[i],
                    l.regret_lo[i],
                    l.regret_hi[i]
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
    let format = crate::format::identify(text);
    let version = serde_json::from_str::<serde_json::Value>(text)
        .ok()
        .and_then(|v| v.get("version").and_then(serde_json::Value::as_f64));
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
    Ok(out)
}

/// A CSV field, quoted when it must be (RFC 4180).
pub fn csv_field(s: &str) -> String {
    if s.contains([',', '"', '\n', '\r']) {
        format!("\"{}\"", s.replace('"', "\"\""))
    } else {
        s.to_owned()
    }
}

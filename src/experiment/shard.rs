//! Shards: one slice of an experiment's runs, written to a file, so a large
//! experiment can run as an array job (Slurm job arrays, Kubernetes Indexed
//! Jobs) and be merged into exactly what one run gives.
//!
//! Shard i of n holds every n-th (point, run) job starting at job i. A shard
//! file carries the experiment's text and its model's text, so merging needs
//! nothing but the shard files.

use std::sync::Arc;

use serde::{Deserialize, Serialize};

use super::{Output, Point, RunFault, RunRecord, assemble_without, parse_experiment, shard_jobs};
use crate::model::Problems;

pub const SHARD_FORMAT: &str = "burnin-shard";
pub const SHARD_VERSION: u64 = 1;

/// One shard's runs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ShardFile {
    pub format: String,
    pub version: u64,
    /// 1-based shard number, as on the command line.
    pub shard: usize,
    pub of: usize,
    /// The experiment file's text, as given.
    pub experiment: String,
    /// The text of the model `model_path` named (null for an inline model or a generator).
    pub model: Option<String>,
    /// (point, record) for every run of the shard.
    pub records: Vec<(usize, RunRecord)>,
    /// Guest learners that failed in this shard (the page's pool; the CLI
    /// stops instead). Their runs are missing from `records`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub faults: Vec<RunFault>,
}

impl ShardFile {
    /// Shard `index` (0-based) of `count`: the experiment file's text, the
    /// model file's text when `model_path` named one, and the finished runs.
    pub fn new(
        index: usize,
        count: usize,
        experiment: String,
        model: Option<String>,
        records: Vec<(usize, RunRecord)>,
    ) -> ShardFile {
        ShardFile {
            format: SHARD_FORMAT.into(),
            version: SHARD_VERSION,
            shard: index + 1,
            of: count,
            experiment,
            model,
            records,
            faults: Vec::new(),
        }
    }

    pub fn to_json(&self) -> String {
        serde_json::to_string(self).expect("records hold no non-finite numbers") + "\n"
    }
}

/// Merges shard files into the experiment's output, checking that they are
/// the n shards of one experiment, each exactly once. `name(i)` labels shard
/// file i in messages.
pub fn merge(shards: &[ShardFile], name: &dyn Fn(usize) -> String) -> Result<Output, Problems> {
    let mut p = Problems::default();
    let Some(first) = shards.first() else {
        return Err(Problems::single("", "no shard files given"));
    };
    for (i, s) in shards.iter().enumerate() {
        if s.format != SHARD_FORMAT || s.version != SHARD_VERSION {
            p.push(
                name(i),
                format!("not a {SHARD_FORMAT} version {SHARD_VERSION} file"),
            );
        } else if s.experiment != first.experiment || s.model != first.model {
            p.push(
                name(i),
                format!("is a shard of another experiment than {}", name(0)),
            );
        } else if s.of != first.of {
            p.push(
                name(i),
                format!(
                    "is shard {} of {}, but {} is of {}",
                    s.shard,
                    s.of,
                    name(0),
                    first.of
                ),
            );
        }
    }
    std::mem::take(&mut p).into_result()?;
    let n = first.of;
    let mut seen = vec![None; n];
    for (i, s) in shards.iter().enumerate() {
        match seen.get(s.shard.wrapping_sub(1)) {
            None => p.push(
                name(i),
                format!("shard number {} is outside 1..={n}", s.shard),
            ),
            Some(Some(j)) => p.push(
                name(i),
                format!("shard {} was already given as {}", s.shard, name(*j)),
            ),
            Some(None) => seen[s.shard - 1] = Some(i),
        }
    }
    let missing: Vec<String> = (1..=n)
        .filter(|k| seen[k - 1].is_none())
        .map(|k| k.to_string())
        .collect();
    if !missing.is_empty() {
        p.push(
            "",
            format!(
                "missing shard{} {} of {n}",
                if missing.len() == 1 { "" } else { "s" },
                missing.join(", ")
            ),
        );
    }
    std::mem::take(&mut p).into_result()?;
    let model = first.model.clone();
    let loader = move |_: &str| {
        model
            .clone()
            .ok_or_else(|| "the shard holds no model file".to_string())
    };
    let exp = parse_experiment(&first.experiment, Some(&loader))?;
    let points: Vec<Arc<Point>> = exp.points().into_iter().map(Point::new).collect();
    let mut records: Vec<Vec<RunRecord>> = vec![Vec::new(); points.len()];
    let faults: Vec<RunFault> = shards.iter().flat_map(|s| s.faults.clone()).collect();
    let failed = |li: usize| faults.iter().any(|f| f.learner == li);
    for (k, s) in shards.iter().enumerate() {
        // A failed learner's runs are left out wherever they ran.
        let want = shard_jobs(&points, s.shard - 1, n)
            .iter()
            .filter(|&&(pt, i)| !failed(i / points[pt].exp.seeds as usize))
            .count();
        let kept: Vec<&(usize, RunRecord)> = s
            .records
            .iter()
            .filter(|(_, r)| !failed(r.learner))
            .collect();
        if kept.len() != want {
            p.push(
                name(k),
                format!("holds {} runs, expected {want}", kept.len()),
            );
        }
        for (point, r) in kept {
            match records.get_mut(*point) {
                Some(v) => v.push(r.clone()),
                None => p.push(
                    name(k),
                    format!("names sweep point {point}, which does not exist"),
                ),
            }
        }
    }
    std::mem::take(&mut p).into_result()?;
    Ok(assemble_without(&exp, &points, records, faults))
}

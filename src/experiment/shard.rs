//! Shards: one slice of an experiment's runs, written to a file, so a large
//! experiment can run as an array job (Slurm job arrays, Kubernetes Indexed
//! Jobs) and be merged into exactly what one run gives.
//!
//! Shard i of n holds every n-th (point, run) job starting at job i. A shard
//! file carries the experiment's text and its model's text, so merging needs
//! nothing but the shard files, and what proves the shards belong together:
//! the digest of those texts, the writing build's draw-stream identity
//! ([`super::draw_stream`]), its number and count, and the run number of
//! every record. [`merge`] checks all of it, and every record against the
//! experiment, before it summarises anything.

use std::collections::HashMap;
use std::sync::Arc;

use serde::{Deserialize, Deserializer, Serialize};

use super::{
    Output, Point, RunFault, RunRecord, assemble_without, draw_stream, job_number,
    parse_experiment, shard_jobs,
};
use crate::format::digest::hex_digest;
use crate::model::Problems;

pub const SHARD_FORMAT: &str = "burnin-shard";
pub const SHARD_VERSION: u64 = 2;
/// Most shards one experiment may be split into (and never more than it has runs).
pub const MAX_SHARDS: usize = 100_000;
/// Missing runs listed per shard before the rest are counted.
const MISSING_LISTED: usize = 5;

/// One shard's runs.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ShardFile {
    pub format: String,
    pub version: u64,
    /// 1-based shard number, as on the command line.
    pub shard: usize,
    pub of: usize,
    /// [`text_digest`] of `experiment` and `model`.
    #[serde(default)]
    pub digest: String,
    /// The draw-stream identity of the build that ran the shard.
    #[serde(default)]
    pub draws: String,
    /// The experiment file's text, as given.
    pub experiment: String,
    /// The text of the model `model_path` named (null for an inline model or a generator).
    pub model: Option<String>,
    /// The run number ([`super::all_jobs`] order) of each record, in order.
    #[serde(default)]
    pub runs: Vec<usize>,
    /// (point, record) for every run of the shard.
    #[serde(deserialize_with = "numbered_records")]
    pub records: Vec<(usize, RunRecord)>,
    /// Guest learners that failed in this shard (the page's pool; the CLI
    /// stops instead). Their runs are missing from `records`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub faults: Vec<RunFault>,
}

/// The digest a shard carries of its experiment's and model's texts.
pub fn text_digest(experiment: &str, model: Option<&str>) -> String {
    let (has, text) = match model {
        Some(m) => (b"model".as_slice(), m),
        None => (b"no model".as_slice(), ""),
    };
    hex_digest(&[experiment.as_bytes(), has, text.as_bytes()])
}

/// Reads `records`, saying which record a problem is in.
fn numbered_records<'de, D: Deserializer<'de>>(d: D) -> Result<Vec<(usize, RunRecord)>, D::Error> {
    struct Records;
    impl<'de> serde::de::Visitor<'de> for Records {
        type Value = Vec<(usize, RunRecord)>;
        fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
            f.write_str("a list of [sweep point, run record] pairs")
        }
        fn visit_seq<S: serde::de::SeqAccess<'de>>(
            self,
            mut seq: S,
        ) -> Result<Self::Value, S::Error> {
            let mut out = Vec::new();
            loop {
                match seq.next_element::<(usize, RunRecord)>() {
                    Ok(Some(r)) => out.push(r),
                    Ok(None) => return Ok(out),
                    Err(e) => {
                        // serde_json adds the position once more outside.
                        let e = e.to_string();
                        let e = e.split(" at line ").next().unwrap_or(&e);
                        return Err(serde::de::Error::custom(format!(
                            "records[{}]: {e}",
                            out.len()
                        )));
                    }
                }
            }
        }
    }
    d.deserialize_seq(Records)
}

impl ShardFile {
    /// Shard `index` (0-based) of `count`: the experiment file's text, the
    /// model file's text when `model_path` named one, and the finished runs
    /// of `points` (the experiment's).
    pub fn new(
        index: usize,
        count: usize,
        experiment: String,
        model: Option<String>,
        points: &[Arc<Point>],
        records: Vec<(usize, RunRecord)>,
    ) -> ShardFile {
        let runs = records
            .iter()
            .map(|(p, r)| {
                job_number(points, *p, r.learner, r.seed_index).expect("records of these points")
            })
            .collect();
        ShardFile {
            format: SHARD_FORMAT.into(),
            version: SHARD_VERSION,
            shard: index + 1,
            of: count,
            digest: text_digest(&experiment, model.as_deref()),
            draws: draw_stream().to_string(),
            experiment,
            model,
            runs,
            records,
            faults: Vec::new(),
        }
    }

    pub fn to_json(&self) -> String {
        serde_json::to_string(self).expect("records hold no non-finite numbers") + "\n"
    }
}

/// Merges shard files into the experiment's output, checking that they are
/// the n shards of one experiment, each exactly once, written by a build
/// that draws as this one does, and that every record is a run of the
/// experiment with the shape the experiment gives it. `name(i)` labels
/// shard file i in messages.
pub fn merge(shards: &[ShardFile], name: &dyn Fn(usize) -> String) -> Result<Output, Problems> {
    let mut p = Problems::default();
    let Some(first) = shards.first() else {
        return Err(Problems::single("", "no shard files given"));
    };
    for (i, s) in shards.iter().enumerate() {
        if s.format != SHARD_FORMAT {
            p.push(name(i), format!("not a {SHARD_FORMAT} file"));
        } else if s.version < SHARD_VERSION {
            p.push(
                name(i),
                format!(
                    "is a {SHARD_FORMAT} version {} file, written by an older build that did not record what proves its shards belong together; run the shards again with this build",
                    s.version
                ),
            );
        } else if s.version != SHARD_VERSION {
            p.push(
                name(i),
                format!(
                    "is a {SHARD_FORMAT} version {} file; this build reads version {SHARD_VERSION}",
                    s.version
                ),
            );
        } else if s.digest != text_digest(&s.experiment, s.model.as_deref()) {
            p.push(
                name(i),
                "its experiment or model text does not match the digest written with it (edited after the shard was written?)",
            );
        } else if s.draws != draw_stream() {
            p.push(
                name(i),
                format!(
                    "was written by a build that draws different numbers (draw stream {}, this build's is {}); run every shard with one build",
                    s.draws,
                    draw_stream()
                ),
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
        } else if s.runs.len() != s.records.len() {
            p.push(
                name(i),
                format!(
                    "lists {} run numbers for {} records",
                    s.runs.len(),
                    s.records.len()
                ),
            );
        }
    }
    std::mem::take(&mut p).into_result()?;
    // Checked before anything of size `of` is allocated (a shard beyond the
    // experiment's runs holds none, and is still one of the n).
    if first.of == 0 || first.of > MAX_SHARDS {
        return Err(Problems::single(
            name(0),
            format!(
                "says it is one of {} shards; an experiment is split into 1 to {MAX_SHARDS}",
                first.of
            ),
        ));
    }
    let model = first.model.clone();
    let loader = move |_: &str| {
        model
            .clone()
            .ok_or_else(|| "the shard holds no model file".to_string())
    };
    let exp = parse_experiment(&first.experiment, Some(&loader))?;
    let points: Vec<Arc<Point>> = exp.points().into_iter().map(Point::new).collect();
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
    let learners = &exp.learners;
    let faults: Vec<RunFault> = shards.iter().flat_map(|s| s.faults.clone()).collect();
    for (k, s) in shards.iter().enumerate() {
        for (j, f) in s.faults.iter().enumerate() {
            if learners.get(f.learner).is_none_or(|l| l.guest().is_none()) {
                p.push(
                    format!("{}: faults[{j}]", name(k)),
                    format!(
                        "names learner {}, which is not a guest learner of the experiment",
                        f.learner
                    ),
                );
            }
        }
    }
    std::mem::take(&mut p).into_result()?;
    let failed = |li: usize| faults.iter().any(|f| f.learner == li);
    let mut records: Vec<Vec<RunRecord>> = vec![Vec::new(); points.len()];
    // Run number → where it was given.
    let mut given: HashMap<usize, (usize, usize)> = HashMap::new();
    for (k, s) in shards.iter().enumerate() {
        let problems_before = p.count();
        for (j, (point, r)) in s.records.iter().enumerate() {
            let at = format!("{}: records[{j}]", name(k));
            let job = match check_record(&points, s, j, *point, r) {
                Ok(job) => job,
                Err(m) => {
                    p.push(at, m);
                    continue;
                }
            };
            if let Some(&(k0, j0)) = given.get(&job) {
                p.push(
                    at,
                    format!("run {job} was already given in {}: records[{j0}]", name(k0)),
                );
                continue;
            }
            given.insert(job, (k, j));
            // A failed learner's runs are left out wherever they ran.
            if !failed(r.learner) {
                records[*point].push(r.clone());
            }
        }
        if p.count() > problems_before {
            // A bad record is not also reported as a missing run.
            continue;
        }
        let lacking: Vec<(usize, usize)> = shard_jobs(&points, s.shard - 1, n)
            .into_iter()
            .filter(|&(pt, i)| !failed(i / points[pt].exp.seeds as usize))
            .filter(|&(pt, i)| {
                let seeds = points[pt].exp.seeds as usize;
                let job = job_number(&points, pt, i / seeds, (i % seeds) as u64);
                job.is_some_and(|job| given.get(&job).is_none_or(|&(k0, _)| k0 != k))
            })
            .collect();
        for &(pt, i) in lacking.iter().take(MISSING_LISTED) {
            let seeds = points[pt].exp.seeds as usize;
            let (li, si) = (i / seeds, i % seeds);
            let sweep = if points.len() > 1 {
                format!("sweep point {pt}, ")
            } else {
                String::new()
            };
            p.push(
                name(k),
                format!(
                    "lacks the run of {sweep}learner {li} ({:?}), seed index {si}",
                    learners[li].label
                ),
            );
        }
        if lacking.len() > MISSING_LISTED {
            p.push(
                name(k),
                format!(
                    "lacks {} more runs of shard {}",
                    lacking.len() - MISSING_LISTED,
                    s.shard
                ),
            );
        }
    }
    std::mem::take(&mut p).into_result()?;
    Ok(assemble_without(&exp, &points, records, faults))
}

/// Checks record `j` of shard `s` (at sweep point `point`) against the
/// experiment: a run that exists, belongs to this shard and is listed as
/// such, with its seed, and curves and counts of the experiment's shape.
/// Returns its run number.
fn check_record(
    points: &[Arc<Point>],
    s: &ShardFile,
    j: usize,
    point: usize,
    r: &RunRecord,
) -> Result<usize, String> {
    let Some(ctx) = points.get(point) else {
        return Err(format!(
            "names sweep point {point}, but the experiment has {}",
            points.len()
        ));
    };
    let e = &ctx.exp;
    let job = job_number(points, point, r.learner, r.seed_index).ok_or_else(|| {
        format!(
            "names learner {} with seed index {}, but the experiment has {} learners and {} seeds",
            r.learner,
            r.seed_index,
            e.learners.len(),
            e.seeds
        )
    })?;
    if job % s.of != s.shard - 1 {
        return Err(format!(
            "holds run {job}, which belongs to shard {} of {}, not {}",
            job % s.of + 1,
            s.of,
            s.shard
        ));
    }
    if s.runs[j] != job {
        return Err(format!(
            "holds run {job}, but the shard lists it as run {}",
            s.runs[j]
        ));
    }
    let want_seed = e.run_seed_of(r.learner, r.seed_index);
    if r.seed != want_seed {
        return Err(format!(
            "has seed {}, but the experiment gives that run seed {want_seed}",
            r.seed
        ));
    }
    let m = &e.model;
    let (h, sn, an) = (m.horizon(), m.n_states(), m.n_actions());
    let c = ctx.checkpoints.len();
    let t = e.eps_targets.len();
    let cells = if e.decompose { h * sn * an } else { 0 };
    let shapes: [(&str, usize, usize); 8] = [
        ("regret", r.regret.len(), c),
        ("episode_regret", r.episode_regret.len(), c),
        ("returns", r.returns.len(), c),
        ("last_above", r.last_above.len(), t),
        ("first_within", r.first_within.len(), t),
        ("within", r.within.len(), t),
        ("visits", r.visits.len(), h * sn),
        ("regret_cells", r.regret_cells.len(), cells),
    ];
    if !r.certificate.is_empty() && r.certificate.len() != c {
        return Err(format!(
            "certificate has {} values; the experiment gives it {c} (or none)",
            r.certificate.len()
        ));
    }
    for (field, len, want) in shapes {
        if len != want {
            return Err(format!(
                "{field} has {len} values; the experiment gives it {want}"
            ));
        }
    }
    // Forged values would summarise to infinities (#35): every number of a
    // record is finite and within the model format's ±1e300.
    let most = crate::model::limits::MAX_MAGNITUDE;
    for (field, xs) in [
        ("regret", &r.regret),
        ("episode_regret", &r.episode_regret),
        ("returns", &r.returns),
        ("certificate", &r.certificate),
        ("regret_cells", &r.regret_cells),
    ] {
        if let Some((i, x)) = xs
            .iter()
            .enumerate()
            .find(|(_, x)| !(x.is_finite() && x.abs() <= most))
        {
            return Err(format!(
                "{field}[{i}] is {x:e}, not a finite number within ±{most:e}"
            ));
        }
    }
    let k = e.episodes;
    for (field, xs) in [
        ("last_above", &r.last_above),
        ("first_within", &r.first_within),
        ("within", &r.within),
    ] {
        if let Some(x) = xs.iter().find(|&&x| x > k) {
            return Err(format!("{field} holds {x}, more than the {k} episodes"));
        }
    }
    // Every episode visits one state at each step.
    for step in 0..h {
        let sum: u128 = r.visits[step * sn..(step + 1) * sn]
            .iter()
            .map(|&v| v as u128)
            .sum();
        if sum != k as u128 {
            return Err(format!(
                "visits at step {} add up to {sum}, not to the {k} episodes",
                step + 1
            ));
        }
    }
    Ok(job)
}

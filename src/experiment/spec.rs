//! Experiment format v1 (`"format": "burnin-experiment"`): reading and checks.

use serde_json::value::RawValue;

use crate::format::lax::{Lax, List, Reader, syntax_problem};
use crate::format::{check_header, lax_object};
use crate::generate::{GENERATORS, GenParam, GeneratorInfo, GeneratorSpec};
use crate::learn::{self, Algorithm, AlgorithmKind, ParamInfo, Setting};
use crate::model::json::parse_model;
use crate::model::limits::MAX_NAME_CHARS;
use crate::model::{Mdp, Problems};
use serde_json::Value;

pub const EXPERIMENT_FORMAT: &str = "burnin-experiment";
pub const EXPERIMENT_VERSION: u64 = 1;

/// Most episodes per run.
pub const MAX_EPISODES: u64 = 1_000_000_000;
/// Seeds per learner when a file gives none: enough for a Student-t interval
/// to mean something (common practice; one seed gives no interval at all).
pub const DEFAULT_SEEDS: u64 = 8;
/// Most seeds per learner.
pub const MAX_SEEDS: u64 = 10_000;
/// Most learners per experiment.
pub const MAX_LEARNERS: usize = 64;
/// Most ε targets of an experiment.
pub const MAX_EPS_TARGETS: usize = 16;
/// The smallest ε target: S·A·H³/ε² stays finite for every model within
/// the cell limits.
pub const MIN_EPS_TARGET: f64 = 1e-100;
/// Longest `model_path`, in characters.
pub const MAX_PATH_CHARS: usize = 4096;
/// Most checkpoints per curve.
pub const MAX_CHECKPOINTS: u64 = 2_000;
/// Largest seed (seeds travel as JSON numbers, exact up to 2^53).
pub const MAX_SEED: u64 = 1 << 53;

/// One learner of an experiment: what it runs and a unique label.
#[derive(Debug, Clone, PartialEq)]
pub struct LearnerSpec {
    pub label: String,
    pub source: Source,
}

/// What a learner of an experiment runs.
#[derive(Debug, Clone, PartialEq)]
pub enum Source {
    /// A built-in algorithm of the catalogue.
    Builtin(Algorithm),
    /// A guest learner (`learn::guest`) by the name a front end knows it by:
    /// a file names a guest, never a command or code.
    Guest(String),
}

/// Longest guest name.
pub const MAX_GUEST_NAME: usize = 64;

/// Whether `name` can name a guest learner: 1 … 64 of A–Z, a–z, 0–9, `_`,
/// `-`, `.` (so it survives a command line's `NAME=CMD` unquoted).
pub fn valid_guest_name(name: &str) -> bool {
    !name.is_empty()
        && name.len() <= MAX_GUEST_NAME
        && name
            .bytes()
            .all(|b| b.is_ascii_alphanumeric() || matches!(b, b'_' | b'-' | b'.'))
}

impl LearnerSpec {
    /// The built-in algorithm, if it is one.
    pub fn builtin(&self) -> Option<&Algorithm> {
        match &self.source {
            Source::Builtin(a) => Some(a),
            Source::Guest(_) => None,
        }
    }

    /// The guest's name, if it is one.
    pub fn guest(&self) -> Option<&str> {
        match &self.source {
            Source::Builtin(_) => None,
            Source::Guest(g) => Some(g),
        }
    }

    /// The key results and tables show: the algorithm's, or `"guest"`.
    pub fn kind_key(&self) -> &'static str {
        self.builtin().map_or("guest", Algorithm::key)
    }

    /// The label a learner gets when its file gives none.
    pub fn default_label(&self) -> String {
        match &self.source {
            Source::Builtin(a) => a.default_label(),
            Source::Guest(g) => g.clone(),
        }
    }
}

/// What a sweep varies.
#[derive(Debug, Clone, Copy)]
pub enum SweepParameter {
    /// The experiment's δ.
    Delta,
    /// This parameter of every learner whose algorithm takes it
    /// (`bonus_scale`, `epsilon`, `prior`).
    Learner(&'static ParamInfo),
    /// A numeric parameter of the experiment's generator, by name.
    Generator(&'static GenParam),
}

impl SweepParameter {
    /// The key as results name it: `delta`, the learner parameter's key, or
    /// the generator parameter's name (`generator.NAME` where a learner
    /// parameter has the same name).
    pub fn key(self) -> String {
        match self {
            SweepParameter::Delta => "delta".into(),
            SweepParameter::Learner(p) => p.key.into(),
            SweepParameter::Generator(p) if learner_param(p.name).is_some() => {
                format!("generator.{}", p.name)
            }
            SweepParameter::Generator(p) => p.name.into(),
        }
    }
}

impl PartialEq for SweepParameter {
    fn eq(&self, other: &Self) -> bool {
        self.key() == other.key()
    }
}

/// The learner parameter with this key, from the algorithm catalogue.
fn learner_param(key: &str) -> Option<&'static ParamInfo> {
    learn::ALGORITHMS
        .iter()
        .filter_map(|a| a.param)
        .find(|p| p.key == key)
}

/// The sweep keys that need no generator: `delta`, then each learner
/// parameter's key once, in catalogue order.
pub fn experiment_sweep_keys() -> Vec<&'static str> {
    let mut keys = vec!["delta"];
    for p in learn::ALGORITHMS.iter().filter_map(|a| a.param) {
        if !keys.contains(&p.key) {
            keys.push(p.key);
        }
    }
    keys
}

/// Every sweepable key: delta, the learner parameters, and the numeric
/// parameters of `generator` (of any generator when None).
fn sweep_keys(generator: Option<&GeneratorSpec>) -> String {
    let mut keys: Vec<String> = experiment_sweep_keys()
        .into_iter()
        .map(String::from)
        .collect();
    let infos: Vec<&GeneratorInfo> = match generator {
        Some(g) => vec![g.info()],
        None => GENERATORS.iter().collect(),
    };
    for p in infos.iter().flat_map(|i| i.params.iter()) {
        let k = SweepParameter::Generator(p).key();
        if p.sweepable() && !keys.contains(&k) {
            keys.push(k);
        }
    }
    keys.join(", ")
}

/// One parameter varied over a list of values; every value is a whole
/// experiment of its own.
#[derive(Debug, Clone, PartialEq)]
pub struct Sweep {
    pub parameter: SweepParameter,
    pub values: Vec<f64>,
    /// For a learner parameter: the labels of the learners it applies to
    /// (None: every learner that takes it).
    pub learners: Option<Vec<String>>,
}

/// Most values in a sweep.
pub const MAX_SWEEP_VALUES: usize = 100;

/// A checked experiment, ready to run.
#[derive(Debug, Clone, PartialEq)]
pub struct Experiment {
    pub name: String,
    pub model: Mdp,
    /// The generator the model came from, when the file gave one.
    pub generator: Option<GeneratorSpec>,
    /// A parameter to vary (see [`Experiment::points`]).
    pub sweep: Option<Sweep>,
    /// Whether `eps_targets` are the defaults (H/10, H/20), recomputed when a
    /// sweep changes H.
    pub eps_default: bool,
    /// K, episodes per run.
    pub episodes: u64,
    /// Runs per learner.
    pub seeds: u64,
    /// Base seed; run seeds derive from it (see [`super::run_seed`]).
    pub seed: u64,
    /// δ given to confidence-based learners.
    pub delta: f64,
    /// Requested number of log-spaced checkpoints.
    pub checkpoints: u64,
    /// Whether runs record where their regret is paid (`RegretCells`): off
    /// by default, since it costs a forward pass per policy change (1.7–2.3×
    /// the run time of learners that change policy often; BENCHMARKS.md).
    pub decompose: bool,
    /// Common random numbers: seed index j gives every learner the same
    /// environment draws (start states, rewards and transitions, from a
    /// stream of their own per (episode, step)) and the same stream for the
    /// learner's own randomness, so paired differences cancel the
    /// environment's noise (see [`super::shared_seeds`]). Off by default:
    /// each run then draws from its own generator, as before.
    pub shared_draws: bool,
    /// The ε of the empirical sample complexity (default H/10 and H/20).
    pub eps_targets: Vec<f64>,
    pub learners: Vec<LearnerSpec>,
}

/// An experiment as a front end shows its set-up: every value explicit,
/// the model as its canonical text, the generator as a generator object.
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ExperimentSummary {
    pub name: String,
    pub episodes: u64,
    pub seeds: u64,
    pub seed: u64,
    pub delta: f64,
    pub checkpoints: u64,
    pub decompose: bool,
    pub shared_draws: bool,
    pub learners: Vec<LearnerSummary>,
    /// `{"parameter": key, "values": […]}`, when the experiment sweeps.
    pub sweep: Option<serde_json::Value>,
    pub generator: Option<serde_json::Value>,
    /// The model file's text (canonical layout).
    pub model: String,
}

/// One learner of an [`ExperimentSummary`].
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct LearnerSummary {
    pub label: String,
    /// Whether the label is the algorithm's default one.
    pub default_label: bool,
    /// The algorithm's key, or `"guest"`.
    pub algorithm: &'static str,
    /// The parameter's value, for an algorithm that takes one.
    pub param: Option<f64>,
    /// A guest learner's name.
    pub guest: Option<String>,
}

impl Experiment {
    /// What to tell the user before running an experiment whose intervals
    /// cannot be computed (fewer than two seeds per learner).
    pub fn seed_warning(&self) -> Option<String> {
        (self.seeds < 2).then(|| {
            format!(
                "{} seed per learner gives no 95% interval; the results show \"n/a (one seed)\" for it (give \"seeds\": {DEFAULT_SEEDS} or more to compare learners)",
                self.seeds
            )
        })
    }

    /// The set-up as a front end shows it.
    pub fn summary(&self) -> ExperimentSummary {
        ExperimentSummary {
            name: self.name.clone(),
            episodes: self.episodes,
            seeds: self.seeds,
            seed: self.seed,
            delta: self.delta,
            checkpoints: self.checkpoints,
            decompose: self.decompose,
            shared_draws: self.shared_draws,
            learners: self
                .learners
                .iter()
                .map(|l| LearnerSummary {
                    default_label: l.label == l.default_label(),
                    label: l.label.clone(),
                    algorithm: l.kind_key(),
                    param: l.builtin().and_then(|a| a.info().param.map(|_| a.param)),
                    guest: l.guest().map(str::to_owned),
                })
                .collect(),
            sweep: self
                .sweep
                .as_ref()
                .map(|s| serde_json::json!({"parameter": s.parameter.key(), "values": s.values, "learners": s.learners})),
            generator: self.generator.as_ref().map(GeneratorSpec::to_json),
            model: crate::write_model(&self.model),
        }
    }

    /// The seed of the run of learner `learner`, seed index `seed`: the one
    /// its learner's own randomness is drawn from (and a guest is told),
    /// [`super::run_seed`], or with shared draws the one all learners share,
    /// [`super::shared_seeds`]. Runs and the shard checks both ask here.
    pub fn run_seed_of(&self, learner: usize, seed: u64) -> u64 {
        if self.shared_draws {
            super::shared_seeds(self.seed, seed).0
        } else {
            super::run_seed(self.seed, learner, seed)
        }
    }

    /// What the learners are told.
    pub fn setting(&self) -> Setting {
        Setting {
            states: self.model.n_states(),
            actions: self.model.n_actions(),
            horizon: self.model.horizon(),
            episodes: self.episodes,
            delta: self.delta,
        }
    }
}

lax_object! {
    struct RawExperiment {
        format: Lax<String>,
        version: Lax<f64>,
        name: Lax<String>,
        model: Box<RawValue>,
        model_path: Lax<String>,
        generator: crate::format::Bounded,
        episodes: Lax<f64>,
        seeds: Lax<f64>,
        seed: Lax<f64>,
        delta: Lax<f64>,
        checkpoints: Lax<f64>,
        decompose: Lax<bool>,
        shared_draws: Lax<bool>,
        eps_targets: Lax<List<Lax<f64>, MAX_EPS_TARGETS>>,
        learners: Lax<List<Lax<RawLearner>, MAX_LEARNERS>>,
        sweep: crate::format::Bounded,
    }
}

lax_object! {
    struct RawLearner {
        algorithm: Lax<String>,
        guest: Lax<String>,
        label: Lax<String>,
        bonus_scale: Lax<f64>,
        epsilon: Lax<f64>,
        prior: Lax<f64>,
    }
}

/// Resolves an experiment's `model_path` (as written in the file) to the
/// model file's text, or a message saying why it cannot be read.
pub type ModelLoader<'a> = &'a dyn Fn(&str) -> Result<String, String>;

/// Whether learners can run on `m`: undiscounted, and every reward supported
/// in [0, 1].
pub fn check_learnable(m: &Mdp) -> Result<(), Problems> {
    let mut p = Problems::default();
    if m.discount() < 1.0 {
        p.push(
            "discount",
            format!(
                "learners work in the undiscounted episodic setting; remove the discount or set it to 1 (found {})",
                m.discount()
            ),
        );
    }
    let a_n = m.n_actions();
    for (i, st) in m.step_tables().iter().enumerate() {
        for row in 0..m.n_states() * a_n {
            let (lo, hi) = st.reward(row).support();
            if lo < 0.0 || hi > 1.0 {
                p.push(
                    format!("steps[{i}].rewards[{}][{}]", row / a_n, row % a_n),
                    format!(
                        "learners need every reward in [0, 1]; this one ranges over [{lo}, {hi}]"
                    ),
                );
            }
        }
    }
    p.into_result()
}

fn whole_in(
    r: &mut Reader,
    path: &str,
    v: Option<Lax<f64>>,
    default: Option<u64>,
    lo: u64,
    hi: u64,
) -> Option<u64> {
    let Some(v) = v else {
        if default.is_none() {
            r.problems.push(
                path,
                format!("missing; expected a whole number in {lo}..={hi}"),
            );
        }
        return default;
    };
    let x = r.take(path, v, &format!("a whole number in {lo}..={hi}"))?;
    if x.fract() == 0.0 && x >= lo as f64 && x <= hi as f64 {
        Some(x as u64)
    } else {
        r.problems.push(
            path,
            format!("expected a whole number in {lo}..={hi}, found {x}"),
        );
        None
    }
}

/// An optional number at `path` with a default and a range check.
fn number(
    r: &mut Reader,
    path: &str,
    v: Option<Lax<f64>>,
    default: f64,
    ok: impl Fn(f64) -> bool,
    want: &str,
) -> Option<f64> {
    let Some(v) = v else { return Some(default) };
    let x = r.take(path, v, "a number")?;
    if ok(x) {
        Some(x)
    } else {
        r.problems.push(path, format!("expected {want}, found {x}"));
        None
    }
}

fn learner(r: &mut Reader, path: &str, raw: RawLearner) -> Option<LearnerSpec> {
    raw.fields.finish(path, RawLearner::FIELDS, r.problems);
    if let Some(g) = raw.guest {
        return guest_learner(
            r,
            path,
            raw.algorithm.is_some(),
            g,
            raw.label,
            &[
                ("bonus_scale", raw.bonus_scale.is_some()),
                ("epsilon", raw.epsilon.is_some()),
                ("prior", raw.prior.is_some()),
            ],
        );
    }
    let key = r.require(
        &format!("{path}.algorithm"),
        raw.algorithm,
        &format!("one of {}", learn::keys()),
    )?;
    let Some(kind) = AlgorithmKind::from_key(&key) else {
        r.problems.push(
            format!("{path}.algorithm"),
            format!(
                "unknown algorithm {key:?}; known ones are {}",
                learn::keys()
            ),
        );
        return None;
    };
    let info = kind.info();
    // Every parameter key any algorithm takes, with the value given.
    let given = [
        ("bonus_scale", raw.bonus_scale),
        ("epsilon", raw.epsilon),
        ("prior", raw.prior),
    ];
    let mut value = None;
    for (name, v) in given {
        let Some(v) = v else { continue };
        match info.param {
            Some(p) if p.key == name => value = Some((p, v)),
            _ => r
                .problems
                .push(format!("{path}.{name}"), format!("{key} takes no {name}")),
        }
    }
    let mut algorithm = Algorithm::new(kind);
    if let Some((p, v)) = value {
        let at = format!("{path}.{}", p.key);
        let x = r.take(&at, v, "a number")?;
        if let Err(msg) = p.check(x) {
            r.problems.push(at, msg);
            return None;
        }
        algorithm.param = x;
    }
    let source = Source::Builtin(algorithm);
    let label = learner_label(r, path, raw.label, &source)?;
    Some(LearnerSpec { label, source })
}

/// A learner `{"guest": NAME}`: a name only, with no parameters.
fn guest_learner(
    r: &mut Reader,
    path: &str,
    has_algorithm: bool,
    name: Lax<String>,
    label: Option<Lax<String>>,
    params: &[(&str, bool)],
) -> Option<LearnerSpec> {
    let at = format!("{path}.guest");
    let name = r.take(&at, name, "a guest learner's name")?;
    if has_algorithm {
        r.problems.push(
            format!("{path}.algorithm"),
            "a learner has either \"algorithm\" (a built-in) or \"guest\" (your own), not both",
        );
    }
    for (key, given) in params {
        if *given {
            r.problems.push(
                format!("{path}.{key}"),
                format!("a guest learner takes no {key}; its parameters are its own business"),
            );
        }
    }
    if !valid_guest_name(&name) {
        r.problems.push(
            at,
            format!(
                "expected a name of 1 to {MAX_GUEST_NAME} letters, digits, '_', '-' or '.', found {name:?}"
            ),
        );
        return None;
    }
    let source = Source::Guest(name);
    let label = learner_label(r, path, label, &source)?;
    Some(LearnerSpec { label, source })
}

/// A learner's label: the one given, or its default; non-blank, ≤ 200 characters.
fn learner_label(
    r: &mut Reader,
    path: &str,
    label: Option<Lax<String>>,
    source: &Source,
) -> Option<String> {
    let label = match label {
        Some(l) => r.take(&format!("{path}.label"), l, "a string")?,
        None => LearnerSpec {
            label: String::new(),
            source: source.clone(),
        }
        .default_label(),
    };
    if label.trim().is_empty() || label.chars().count() > 200 {
        r.problems.push(
            format!("{path}.label"),
            "expected a non-blank label of at most 200 characters",
        );
        return None;
    }
    Some(label)
}

/// Reads and checks an experiment file. `load` resolves `model_path`; the
/// page passes None (it has no files to read) and needs the model inline.
pub fn parse_experiment(text: &str, load: Option<ModelLoader>) -> Result<Experiment, Problems> {
    if text.len() > crate::model::limits::MAX_FILE_BYTES {
        return Err(Problems::single(
            "",
            format!(
                "file is over the limit of {} bytes",
                crate::model::limits::MAX_FILE_BYTES
            ),
        ));
    }
    let raw: Lax<RawExperiment> =
        serde_json::from_str(text).map_err(|e| Problems::single("", syntax_problem(&e)))?;
    let mut problems = Problems::default();
    let exp = convert(
        raw,
        &mut Reader {
            problems: &mut problems,
        },
        load,
    );
    match exp {
        Some(e) if problems.is_empty() => Ok(e),
        _ => Err(problems),
    }
}

fn model_of(
    r: &mut Reader,
    inline: Option<Box<RawValue>>,
    path: Option<Lax<String>>,
    generator: Option<&GeneratorSpec>,
    load: Option<ModelLoader>,
) -> Option<Mdp> {
    let given = inline.is_some() as u8 + path.is_some() as u8 + generator.is_some() as u8;
    if given > 1 {
        r.problems.push(
            "model",
            "give one of \"model\", \"model_path\" and \"generator\", not several",
        );
        return None;
    }
    if let Some(g) = generator {
        let m = match g.generate("generator") {
            Ok(m) => m,
            Err(p) => {
                r.problems.nest("", &p);
                return None;
            }
        };
        if let Err(p) = check_learnable(&m) {
            r.problems.nest("generator", &p);
            return None;
        }
        return Some(m);
    }
    let (text, prefix) = match (inline, path) {
        (None, None) => {
            r.problems.push(
                "model",
                "missing; expected an inline burnin-model object, a \"generator\" (or \"model_path\" in the CLI)",
            );
            return None;
        }
        (Some(raw), None) => (raw.get().to_owned(), "model".to_owned()),
        (Some(_), Some(_)) => unreachable!("counted above"),
        (None, Some(p)) => {
            let p = r.text("model_path", p, MAX_PATH_CHARS)?;
            let Some(load) = load else {
                r.problems.push(
                    "model_path",
                    "model files cannot be read here; put the model inline as \"model\"",
                );
                return None;
            };
            match load(&p) {
                Ok(t) => (t, format!("model_path ({p})")),
                Err(msg) => {
                    r.problems.push("model_path", msg);
                    return None;
                }
            }
        }
    };
    let m = match parse_model(&text) {
        Ok(m) => m,
        Err(p) => {
            r.problems.nest(&prefix, &p);
            return None;
        }
    };
    if let Err(p) = check_learnable(&m) {
        r.problems.nest(&prefix, &p);
        return None;
    }
    Some(m)
}

fn convert(
    raw: Lax<RawExperiment>,
    r: &mut Reader,
    load: Option<ModelLoader>,
) -> Option<Experiment> {
    let e = r.take("", raw, "a JSON object (a burnin-experiment file)")?;
    if !check_header(
        r,
        e.format,
        e.version,
        EXPERIMENT_FORMAT,
        EXPERIMENT_VERSION,
    ) {
        return None;
    }
    e.fields.finish("", RawExperiment::FIELDS, r.problems);
    // The generator and the sweep are read whole, within bounds; a key
    // given twice or a list over its bound stops the read of either.
    let mut whole = |at: &str, b: Option<crate::format::Bounded>| -> Result<Option<Value>, ()> {
        match b {
            None => Ok(None),
            Some(b) if b.problems.is_empty() => Ok(Some(b.value)),
            Some(b) => {
                r.problems.nest(at, &b.problems);
                Err(())
            }
        }
    };
    let (generator_value, sweep_value) = (whole("generator", e.generator), whole("sweep", e.sweep));
    let (Ok(generator_value), Ok(sweep_value)) = (generator_value, sweep_value) else {
        return None;
    };
    let name = match e.name {
        Some(n) => r.text("name", n, MAX_NAME_CHARS),
        None => Some(String::new()),
    };
    let generator = match &generator_value {
        None => None,
        Some(v) => match GeneratorSpec::from_json(v, "generator") {
            Ok(g) => Some(g),
            Err(p) => {
                r.problems.nest("", &p);
                return None;
            }
        },
    };
    let model = model_of(r, e.model, e.model_path, generator.as_ref(), load);
    let sweep = sweep_value
        .as_ref()
        .and_then(|v| sweep_of(r, v, generator.as_ref()));
    let episodes = whole_in(r, "episodes", e.episodes, None, 1, MAX_EPISODES);
    let seeds = whole_in(r, "seeds", e.seeds, Some(DEFAULT_SEEDS), 1, MAX_SEEDS);
    let seed = whole_in(r, "seed", e.seed, Some(1), 0, MAX_SEED);
    let delta = number(
        r,
        "delta",
        e.delta,
        0.05,
        |d| d > 0.0 && d < 1.0,
        "0 < delta < 1",
    );
    let checkpoints = whole_in(
        r,
        "checkpoints",
        e.checkpoints,
        Some(64),
        2,
        MAX_CHECKPOINTS,
    );
    let decompose = match e.decompose {
        None => Some(false),
        Some(v) => r.take("decompose", v, "true or false"),
    };
    let shared_draws = match e.shared_draws {
        None => Some(false),
        Some(v) => r.take("shared_draws", v, "true or false"),
    };
    let eps_targets = match e.eps_targets {
        None => Some(None),
        Some(v) => r
            .list("eps_targets", v, "an array of numbers > 0", "targets")
            .map(|list| {
                let mut out = Vec::with_capacity(list.len());
                for (i, x) in list.into_iter().enumerate() {
                    let p = format!("eps_targets[{i}]");
                    if let Some(x) = r.take(&p, x, "a number") {
                        if x.is_finite() && x >= MIN_EPS_TARGET {
                            out.push(x);
                        } else if x > 0.0 && x.is_finite() {
                            // The PAC order S·A·H³/ε² would overflow (#35).
                            r.problems.push(
                                p,
                                format!("expected a number ≥ {MIN_EPS_TARGET:e} (the PAC order S·A·H³/ε² must be a finite number), found {x:e}"),
                            );
                        } else {
                            r.problems
                                .push(p, format!("expected a number > 0, found {x}"));
                        }
                    }
                }
                Some(out)
            }),
    };
    let learners = r.require("learners", e.learners, "an array of learners")?;
    if learners.len == 0 || learners.len > MAX_LEARNERS {
        r.problems.push(
            "learners",
            format!(
                "expected 1 to {MAX_LEARNERS} learners, found {}",
                learners.len
            ),
        );
        return None;
    }
    let learners = learners.items;
    let mut specs: Vec<LearnerSpec> = Vec::new();
    for (i, l) in learners.into_iter().enumerate() {
        let path = format!("learners[{i}]");
        let Some(raw) = r.take(&path, l, "an object with \"algorithm\" or \"guest\"") else {
            continue;
        };
        let Some(spec) = learner(r, &path, raw) else {
            continue;
        };
        if specs.iter().any(|s| s.label == spec.label) {
            r.problems.push(
                format!("{path}.label"),
                format!(
                    "duplicate label {:?}; give each learner its own \"label\"",
                    spec.label
                ),
            );
        }
        if let Some(m) = &model {
            let set = Setting {
                states: m.n_states(),
                actions: m.n_actions(),
                horizon: m.horizon(),
                episodes: 1,
                delta: 0.5,
            };
            if let Some(Err(msg)) = spec.builtin().map(|a| a.check_setting(&set)) {
                r.problems.push(format!("{path}.algorithm"), msg);
            }
        }
        specs.push(spec);
    }
    let model = model?;
    let hh = model.horizon() as f64;
    let eps_targets = eps_targets?;
    let exp = Experiment {
        name: name?,
        eps_default: eps_targets.is_none(),
        eps_targets: eps_targets.unwrap_or_else(|| vec![hh / 10.0, hh / 20.0]),
        model,
        generator,
        sweep: None,
        episodes: episodes?,
        seeds: seeds?,
        seed: seed?,
        delta: delta?,
        checkpoints: checkpoints?,
        decompose: decompose?,
        shared_draws: shared_draws?,
        learners: specs,
    };
    if sweep_value.is_some() {
        let mut sweep = sweep?;
        // Indices become labels (a label may itself start with '#').
        if let Some(chosen) = &mut sweep.learners {
            let raw = raw_sweep_learners(sweep_value.as_ref());
            for (i, c) in chosen.iter_mut().enumerate() {
                if let Some(k) = raw.get(i).and_then(serde_json::Value::as_u64) {
                    match exp.learners.get(k as usize) {
                        Some(l) => *c = l.label.clone(),
                        None => r.problems.push(
                            format!("sweep.learners[{i}]"),
                            format!(
                                "there is no learner {k} (learners are 0 … {})",
                                exp.learners.len() - 1
                            ),
                        ),
                    }
                }
            }
            if !r.problems.is_empty() {
                return None;
            }
        }
        if let Some(chosen) = &sweep.learners {
            let SweepParameter::Learner(p) = sweep.parameter else {
                r.problems.push(
                    "sweep.learners",
                    "only a learner parameter's sweep is applied to chosen learners",
                );
                return None;
            };
            for (i, label) in chosen.iter().enumerate() {
                match exp.learners.iter().find(|l| &l.label == label) {
                    None => r.problems.push(
                        format!("sweep.learners[{i}]"),
                        format!("no learner is labelled {label:?}"),
                    ),
                    Some(l)
                        if l.builtin()
                            .and_then(|a| a.with_param(p.key, p.default))
                            .is_none() =>
                    {
                        r.problems.push(
                            format!("sweep.learners[{i}]"),
                            format!("{label:?} takes no {}", p.key),
                        )
                    }
                    Some(_) => {}
                }
            }
            if !r.problems.is_empty() {
                return None;
            }
        }
        // Every point must be runnable before anything runs.
        for (i, &x) in sweep.values.iter().enumerate() {
            if let Err(p) = exp.point(&sweep, x) {
                r.problems.nest(&format!("sweep.values[{i}]"), &p);
            }
        }
        return Some(Experiment {
            sweep: Some(sweep),
            ..exp
        });
    }
    Some(exp)
}

/// A number as a JSON file writes it, in its shortest form ("1e300", not
/// 301 digits; "4", not "4.0"), to quote a file's value back (#35).
fn as_written(x: f64) -> String {
    let t = serde_json::Number::from_f64(x).map_or_else(|| x.to_string(), |n| n.to_string());
    let t = t.replace("e+", "e");
    t.strip_suffix(".0").map(str::to_string).unwrap_or(t)
}

fn sweep_of(
    r: &mut Reader,
    v: &serde_json::Value,
    generator: Option<&GeneratorSpec>,
) -> Option<Sweep> {
    use serde_json::Value;
    let Some(map) = v.as_object() else {
        r.problems.push(
            "sweep",
            "expected an object {\"parameter\": …, \"values\": […]}",
        );
        return None;
    };
    for k in map.keys() {
        if k != "parameter" && k != "values" && k != "learners" {
            r.problems.push(
                format!("sweep.{k}"),
                "unknown field; known fields here are parameter, values, learners",
            );
        }
    }
    let learners = match map.get("learners") {
        None => None,
        Some(Value::Array(xs)) if !xs.is_empty() && xs.len() <= MAX_LEARNERS => {
            let mut out = Vec::with_capacity(xs.len());
            for (i, x) in xs.iter().enumerate() {
                match (x.as_str(), x.as_u64()) {
                    (Some(l), _) => out.push(l.to_owned()),
                    // An index into "learners", kept as "#i" until the
                    // learners are read.
                    (_, Some(k)) => out.push(format!("#{k}")),
                    _ => r.problems.push(
                        format!("sweep.learners[{i}]"),
                        format!(
                            "expected a learner's label or its index in \"learners\", found {x}"
                        ),
                    ),
                }
            }
            Some(out)
        }
        Some(_) => {
            r.problems.push(
                "sweep.learners",
                format!("expected a list of 1 to {MAX_LEARNERS} learners' labels"),
            );
            return None;
        }
    };
    let Some(Value::String(key)) = map.get("parameter") else {
        r.problems.push(
            "sweep.parameter",
            format!("expected one of {}", sweep_keys(generator)),
        );
        return None;
    };
    let parameter = sweep_parameter(r, key, generator)?;
    let values: Vec<f64> = match map.get("values") {
        Some(Value::Array(xs)) if !xs.is_empty() && xs.len() <= MAX_SWEEP_VALUES => {
            let mut out = Vec::with_capacity(xs.len());
            for (i, x) in xs.iter().enumerate() {
                match x.as_f64() {
                    Some(x) => out.push(x),
                    None => r.problems.push(
                        format!("sweep.values[{i}]"),
                        format!("expected a number, found {x}"),
                    ),
                }
            }
            out
        }
        _ => {
            r.problems.push(
                "sweep.values",
                format!("expected an array of 1 to {MAX_SWEEP_VALUES} numbers"),
            );
            return None;
        }
    };
    Some(Sweep {
        parameter,
        values,
        learners,
    })
}

/// The raw `sweep.learners` list, for resolving indices.
fn raw_sweep_learners(sweep: Option<&serde_json::Value>) -> Vec<serde_json::Value> {
    sweep
        .and_then(|v| v.get("learners"))
        .and_then(|v| v.as_array())
        .cloned()
        .unwrap_or_default()
}

/// Resolves a sweep's `parameter`: `delta`, a learner parameter, a numeric
/// parameter of the experiment's generator, or `generator.NAME`.
fn sweep_parameter(
    r: &mut Reader,
    key: &str,
    generator: Option<&GeneratorSpec>,
) -> Option<SweepParameter> {
    let at = "sweep.parameter";
    let (name, explicit) = match key.strip_prefix("generator.") {
        Some(rest) => (rest, true),
        None => (key, false),
    };
    if !explicit {
        if key == "delta" {
            return Some(SweepParameter::Delta);
        }
        if let Some(p) = learner_param(key) {
            return Some(SweepParameter::Learner(p));
        }
    }
    let any_generator_has = GENERATORS
        .iter()
        .flat_map(|g| g.params.iter())
        .any(|p| p.name == name && p.sweepable());
    let Some(g) = generator else {
        let msg = if any_generator_has {
            format!("sweeping {name} needs a \"generator\" instead of a fixed model")
        } else {
            format!(
                "unknown parameter {key:?}; known ones are {}",
                sweep_keys(None)
            )
        };
        r.problems.push(at, msg);
        return None;
    };
    match g
        .info()
        .params
        .iter()
        .find(|p| p.name == name && p.sweepable())
    {
        Some(p) => Some(SweepParameter::Generator(p)),
        None => {
            r.problems.push(
                at,
                format!(
                    "unknown parameter {key:?}; known ones here are {}",
                    sweep_keys(Some(g))
                ),
            );
            None
        }
    }
}

impl Experiment {
    /// The experiment with the sweep's parameter set to `x` (no sweep of
    /// its own).
    pub fn point(&self, sweep: &Sweep, x: f64) -> Result<Experiment, Problems> {
        let parameter = sweep.parameter;
        let mut e = Experiment {
            sweep: None,
            ..self.clone()
        };
        let bad = |msg: String| Err(Problems::single("", msg));
        match parameter {
            SweepParameter::Generator(p) => {
                let g = self.generator.as_ref().expect("checked when read");
                let Some(g) = g.with(p.name, x) else {
                    return bad(format!(
                        "expected a whole number for {}, found {}",
                        p.name,
                        as_written(x)
                    ));
                };
                e.model = g.generate("generator")?;
                check_learnable(&e.model)?;
                e.generator = Some(g);
                if e.eps_default {
                    let hh = e.model.horizon() as f64;
                    e.eps_targets = vec![hh / 10.0, hh / 20.0];
                }
                let set = e.setting();
                for (i, l) in e.learners.iter().enumerate() {
                    if let Some(Err(msg)) = l.builtin().map(|a| a.check_setting(&set)) {
                        return Err(Problems::single(format!("learners[{i}]"), msg));
                    }
                }
            }
            SweepParameter::Learner(p) => {
                if let Err(msg) = p.check(x) {
                    return bad(msg);
                }
                for l in &mut e.learners {
                    let chosen = sweep.learners.as_ref().is_none_or(|c| c.contains(&l.label));
                    if !chosen {
                        continue;
                    }
                    if let Source::Builtin(alg) = &mut l.source
                        && let Some(a) = alg.with_param(p.key, x)
                    {
                        // A default label names the value it was given,
                        // which the sweep replaces: it says so instead.
                        if l.label == alg.default_label() {
                            l.label = format!("{} ({} swept)", alg.key(), p.name);
                        }
                        *alg = a;
                    }
                }
                // Two learners relabelled alike are told apart by number.
                for i in 1..e.learners.len() {
                    let mut n = 1;
                    let base = e.learners[i].label.clone();
                    while e.learners[..i]
                        .iter()
                        .any(|l| l.label == e.learners[i].label)
                    {
                        n += 1;
                        e.learners[i].label = format!("{base} #{n}");
                    }
                }
            }
            SweepParameter::Delta => {
                if !(x > 0.0 && x < 1.0) {
                    return bad(format!("expected 0 < delta < 1, found {x}"));
                }
                e.delta = x;
            }
        }
        Ok(e)
    }

    /// The experiments a sweep runs, one per value (just this one without a sweep).
    pub fn points(&self) -> Vec<Experiment> {
        match &self.sweep {
            None => vec![self.clone()],
            Some(s) => s
                .values
                .iter()
                .map(|&x| {
                    self.point(s, x)
                        .expect("every point was checked when the experiment was read")
                })
                .collect(),
        }
    }
}

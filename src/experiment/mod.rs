//! Regret experiments: seeds × learners × episodes on one model, with the
//! exact expected regret of every episode.
//!
//! The regret of episode k is V*₁(ρ) − V^{πₖ}₁(ρ), with πₖ the policy the
//! learner follows in that episode, evaluated exactly on the true model (a
//! stochastic policy by its exact mixture), and cached while the learner's
//! policy version is unchanged.
//!
//! A run is one (learner, seed) pair; runs are independent, so they can be
//! done in any order or in parallel with identical results. [`Run::advance`]
//! steps a run a few episodes at a time, for a worker that must stay
//! responsive.

mod draws;
mod estimate;
mod readings;
mod results;
mod runner;
pub mod scaling;
mod shard;
mod spec;
mod table;

pub use draws::draw_stream;
pub use estimate::{
    Calibration, Estimate, LearnerCost, TimedRun, bytes_words, calibrate, calibrate_keeping,
    calibration_run, duration_words, estimate,
};
pub use runner::{
    BEFORE_RUNNING, Budget, CALIBRATION_WAIT, Clock, Limits, Pool, Runner, SAY_ESTIMATE_SECONDS,
    Stopped, WHILE_RUNNING, Watch,
};
pub use shard::{MAX_SHARDS, SHARD_FORMAT, SHARD_VERSION, ShardFile, merge, text_digest};

pub use readings::{
    BOOTSTRAP_RESAMPLES, BurnIn, GRID_PER_DECADE, LINEAR_SLOPE, SETTLED_SLOPE,
    SETTLED_SPAN_DECADES, SeedsReading, burn_in, burn_in_interval, linear_at_end, read_seeds,
    tail_slope, two_regime_fit,
};
pub use results::{
    Cell, Comparison, EpsResult, LearnerResult, MAX_ALL_PAIRS, MAX_SEED_CURVE_VALUES,
    RESULTS_FORMAT, RESULTS_VERSION, Results, SWEEP_FORMAT, SweepLearner, SweepResults, csv_field,
    interval_text, median_of, median_text, number_text, parse_results, slope_digits, summarise,
    verdict,
};
pub use spec::{
    DEFAULT_SEEDS, EXPERIMENT_FORMAT, EXPERIMENT_VERSION, Experiment, ExperimentSummary,
    LearnerSpec, LearnerSummary, MAX_CHECKPOINTS, MAX_EPISODES, MAX_EPS_TARGETS, MAX_GUEST_NAME,
    MAX_LEARNERS, MAX_PATH_CHARS, MAX_SEED, MAX_SEEDS, MAX_SWEEP_VALUES, ModelLoader, Source,
    Sweep, SweepParameter, check_learnable, experiment_sweep_keys, parse_experiment,
    valid_guest_name,
};
pub use table::{
    CAVEAT, Column, ColumnKind, ComparisonTable, LATEX_LABEL, Section, TableExport, TableFormat,
    comparison_table, latex_formula, latex_text, md_escape, table_exports,
};

use std::sync::Arc;

use rand::SeedableRng;

use crate::learn::{AnyLearner, GuestIntro, GuestLearner, Guests, LearnRng, Learner, PolicyView};
use crate::sample::{self, Sampler};
use crate::solve::{Evaluator, RegretCells, solve};

/// SplitMix64's output function (Steele, Lea & Flood, "Fast splittable
/// pseudorandom number generators", OOPSLA 2014).
fn splitmix(mut z: u64) -> u64 {
    z = z.wrapping_add(0x9E37_79B9_7F4A_7C15);
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    z ^ (z >> 31)
}

/// The seed of run (learner i, seed j) of an experiment with base seed
/// `base`: 53 bits, so that it travels exactly as a JSON number (JavaScript
/// reads integers exactly only up to 2^53).
pub fn run_seed(base: u64, learner: usize, seed: u64) -> u64 {
    splitmix(splitmix(base ^ splitmix(seed)) ^ (learner as u64).wrapping_mul(0xD1B5_4A32_D192_ED03))
        & ((1 << 53) - 1)
}

/// Seeds of runs with common random numbers (an experiment's
/// `shared_draws`): every learner's run j gets the learner seed
/// `shared_seeds(base, j).0` for its own randomness (53 bits, as
/// [`run_seed`]) and the environment base `.1`. The environment is then a
/// table of outcomes drawn in advance, as in the "stack of rewards" model of
/// a bandit (T. Lattimore and C. Szepesvári, Bandit Algorithms, Cambridge
/// University Press 2020, section 4.6): the n-th visit of (h, s, a) draws
/// its reward and next state from a generator of its own, seeded by
/// [`draw_seed`]`(env, cell, n)`, and episode k's start state from one
/// seeded by `draw_seed(env, H·S·A, k)`. Two learners that have taken
/// action a in state s at step h n times have seen the same n outcomes
/// there, whenever they took them — so their estimates agree where their
/// experience does — and two identical learners make the same run (common
/// random numbers: P. Glasserman and D. D. Yao, "Some guidelines and
/// guarantees for common random numbers", Management Science 38(6), 1992).
pub fn shared_seeds(base: u64, seed: u64) -> (u64, u64) {
    let mixed = splitmix(base ^ splitmix(seed));
    let learner = splitmix(mixed ^ 0x5EED_5EED_0000_0001) & ((1 << 53) - 1);
    let env = splitmix(mixed ^ 0x5EED_5EED_0000_0002);
    (learner, env)
}

/// The seed of the generator that draws the `n`-th outcome (0-based) of
/// `cell` — (h·S + s)·A + a, or H·S·A for start states — from an
/// environment base of [`shared_seeds`].
pub fn draw_seed(env: u64, cell: u64, n: u64) -> u64 {
    splitmix(splitmix(env ^ splitmix(cell)) ^ n)
}

/// The largest seed [`fresh_seed`] gives (nine digits: easy to read out and
/// type back).
pub const FRESH_SEED_MAX: u64 = 999_999_999;

/// A base seed in 1..=[`FRESH_SEED_MAX`] from 64 random bits that a front
/// end drew from the system's entropy (`burnin run --new-seed`, the page's
/// "New seed"): the core itself never draws an unseeded number.
pub fn fresh_seed(bits: u64) -> u64 {
    1 + bits % FRESH_SEED_MAX
}

/// Relative tolerance below which an episode's regret counts as zero.
pub const REGRET_TOLERANCE: f64 = 1e-12;

/// The regret V*₁(ρ) − V^π₁(ρ) of one episode, with |regret| at or below
/// [`REGRET_TOLERANCE`]·|V*| taken as exactly 0, both ways: the two values
/// come from different sums (backward induction and exact evaluation) and
/// differ in their last bits even for an optimal policy. A difference beyond
/// the tolerance is kept as it is, whatever its sign.
pub fn episode_regret(optimal_value: f64, value: f64) -> f64 {
    let r = optimal_value - value;
    if r.abs() <= REGRET_TOLERANCE * optimal_value.abs() {
        0.0
    } else {
        r
    }
}

/// About `n` log-spaced episode numbers in 1..=K: round(K^(i/(n−1))),
/// deduplicated, always including 1 and K.
pub fn checkpoints(k: u64, n: u64) -> Vec<u64> {
    let mut out: Vec<u64> = (0..n)
        .map(|i| libm::round(libm::pow(k as f64, i as f64 / (n - 1) as f64)) as u64)
        .map(|x| x.clamp(1, k))
        .collect();
    out.push(k);
    out.sort_unstable();
    out.dedup();
    out
}

/// One point of an experiment (the whole experiment, or one value of its
/// sweep): what all its runs share.
pub struct Point {
    pub exp: Experiment,
    pub sampler: Sampler,
    /// V*₁(ρ).
    pub optimal_value: f64,
    pub checkpoints: Vec<u64>,
    /// The gaps Δ_h(s,a), `[(h·S + s)·A + a]`, for the regret decomposition
    /// (empty unless the experiment asks for it).
    pub gaps: Vec<f64>,
    /// Starts the experiment's guest learners (None: it has none, or they
    /// cannot run here).
    pub guests: Option<Guests>,
}

impl std::fmt::Debug for Point {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.debug_struct("Point")
            .field("exp", &self.exp)
            .field("optimal_value", &self.optimal_value)
            .field("checkpoints", &self.checkpoints)
            .field("guests", &self.guests.is_some())
            .finish_non_exhaustive()
    }
}

impl Point {
    pub fn new(exp: Experiment) -> Arc<Point> {
        Self::with_guests(exp, None)
    }

    /// A point whose guest learners `guests` starts.
    pub fn with_guests(exp: Experiment, guests: Option<Guests>) -> Arc<Point> {
        let sol = solve(&exp.model);
        Arc::new(Point {
            sampler: Sampler::new(&exp.model),
            checkpoints: checkpoints(exp.episodes, exp.checkpoints),
            optimal_value: sol.optimal_value,
            gaps: if exp.decompose {
                sol.gaps().into_raw_vec_and_offset().0
            } else {
                Vec::new()
            },
            exp,
            guests,
        })
    }

    /// Every point of `exp` (one per sweep value).
    pub fn all(exp: &Experiment, guests: Option<&Guests>) -> Vec<Arc<Point>> {
        exp.points()
            .into_iter()
            .map(|e| Point::with_guests(e, guests.cloned()))
            .collect()
    }

    /// Number of runs: learners × seeds, numbered learner-major.
    pub fn runs(&self) -> usize {
        self.exp.learners.len() * self.exp.seeds as usize
    }

    /// Total episodes over all runs.
    pub fn total_episodes(&self) -> u64 {
        self.runs() as u64 * self.exp.episodes
    }
}

/// The record of one finished run.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RunRecord {
    pub learner: usize,
    pub seed_index: u64,
    pub seed: u64,
    /// Cumulative expected regret at each checkpoint.
    pub regret: Vec<f64>,
    /// Expected regret of the checkpoint's own episode.
    pub episode_regret: Vec<f64>,
    /// Cumulative realised return at each checkpoint.
    pub returns: Vec<f64>,
    /// The learner's certificate for the checkpoint's own episode, weighed
    /// by the start distribution ([`Learner::certificate`]); empty for
    /// learners that give none.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub certificate: Vec<f64>,
    pub model_updates: u64,
    /// For each ε target: the last episode whose expected regret exceeded ε
    /// (0 if none did).
    pub last_above: Vec<u64>,
    /// For each ε target: the first episode whose policy was ε-optimal
    /// (expected regret ≤ ε), 0 if none was.
    #[serde(default)]
    pub first_within: Vec<u64>,
    /// For each ε target: how many episodes' policies were ε-optimal.
    #[serde(default)]
    pub within: Vec<u64>,
    /// Visits of each (h, s), `[h·S + s]`.
    pub visits: Vec<u64>,
    /// Where the run's regret was paid: Σ over its episodes of
    /// d_h^π(s,a)·Δ_h(s,a), `[(h·S + s)·A + a]` (it sums to the run's final
    /// regret; `RegretCells`). Empty unless the experiment has `decompose`.
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub regret_cells: Vec<f64>,
}

/// Why a run stopped early: its guest learner failed.
#[derive(Debug, Clone, PartialEq, serde::Serialize, serde::Deserialize)]
pub struct RunFault {
    /// The learner's index in the experiment and its label.
    pub learner: usize,
    pub label: String,
    pub seed_index: u64,
    /// The episode the learner was to decide for (1-based).
    pub episode: u64,
    pub message: String,
}

impl std::fmt::Display for RunFault {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "learner {:?}, seed {}, episode {}: {}",
            self.label, self.seed_index, self.episode, self.message
        )
    }
}

/// One (learner, seed) run in progress.
pub struct Run {
    learner: AnyLearner,
    state: RunState,
}

/// Everything of a run but its learner.
struct RunState {
    ctx: Arc<Point>,
    rng: LearnRng,
    /// With shared draws, the environment base of [`shared_seeds`] and the
    /// visits so far of each (h, s, a) (the environment then draws from
    /// generators of its own, not from `rng`).
    env: Option<(u64, Vec<u64>)>,
    eval: Evaluator,
    done: u64,
    cum_regret: f64,
    cum_return: f64,
    cached: Option<(u64, f64)>,
    next_cp: usize,
    record: RunRecord,
    cells: RegretCells,
    /// The current policy's regret by cell (its non-zero cells), and how
    /// many episodes used it since it was last added to
    /// `record.regret_cells`.
    policy_cells: Vec<(u32, f64)>,
    policy_episodes: u64,
}

impl Run {
    /// Starts run number `index` (learner-major: learner = index / seeds).
    pub fn new(ctx: Arc<Point>, index: usize) -> Run {
        let seeds = ctx.exp.seeds as usize;
        let (li, si) = (index / seeds, (index % seeds) as u64);
        let seed = ctx.exp.run_seed_of(li, si);
        let env = ctx.exp.shared_draws.then(|| {
            let m = &ctx.exp.model;
            let cells = m.horizon() * m.n_states() * m.n_actions();
            (shared_seeds(ctx.exp.seed, si).1, vec![0; cells])
        });
        let spec = &ctx.exp.learners[li];
        let m = &ctx.exp.model;
        let learner = match &spec.source {
            Source::Builtin(a) => a
                .build(&ctx.exp.setting())
                .expect("learners were checked against the model when the experiment was read"),
            Source::Guest(name) => {
                let intro = GuestIntro {
                    setting: ctx.exp.setting(),
                    seed,
                    state_labels: m.states().to_vec(),
                    action_labels: m.actions().to_vec(),
                    label: spec.label.clone(),
                    seed_index: si,
                };
                let host = ctx.guests.clone().unwrap_or_else(|| Arc::new(NoGuests));
                AnyLearner::Guest(Box::new(GuestLearner::new(name, host, intro)))
            }
        };
        let record = RunRecord {
            learner: li,
            seed_index: si,
            seed,
            regret: Vec::with_capacity(ctx.checkpoints.len()),
            episode_regret: Vec::with_capacity(ctx.checkpoints.len()),
            returns: Vec::with_capacity(ctx.checkpoints.len()),
            certificate: Vec::new(),
            model_updates: 0,
            last_above: vec![0; ctx.exp.eps_targets.len()],
            first_within: vec![0; ctx.exp.eps_targets.len()],
            within: vec![0; ctx.exp.eps_targets.len()],
            visits: vec![0; m.horizon() * m.n_states()],
            regret_cells: if ctx.exp.decompose {
                vec![0.0; m.horizon() * m.n_states() * m.n_actions()]
            } else {
                Vec::new()
            },
        };
        Run {
            learner,
            state: RunState {
                eval: Evaluator::new(m),
                rng: LearnRng::seed_from_u64(seed),
                env,
                done: 0,
                cum_regret: 0.0,
                cum_return: 0.0,
                cached: None,
                next_cp: 0,
                record,
                cells: RegretCells::new(m),
                policy_cells: Vec::new(),
                policy_episodes: 0,
                ctx,
            },
        }
    }

    /// Episodes finished so far.
    pub fn episodes_done(&self) -> u64 {
        self.state.done
    }

    /// Runs up to `max` more episodes; true when the run is complete. A
    /// guest learner's failure stops the run for good.
    pub fn advance(&mut self, max: u64) -> Result<bool, RunFault> {
        let state = &mut self.state;
        crate::learn::with_learner!(&mut self.learner, l => state.advance(l, max))
    }

    /// Which learner (index in the experiment) and seed index this run is.
    pub fn identity(&self) -> (usize, u64) {
        (self.state.record.learner, self.state.record.seed_index)
    }

    /// The record of the finished run.
    pub fn finish(self) -> RunRecord {
        let mut state = self.state;
        assert_eq!(state.done, state.ctx.exp.episodes, "the run is complete");
        state.flush_cells();
        state.record.model_updates = self.learner.model_updates();
        state.record
    }
}

impl RunState {
    /// [`Run::advance`] for one kind of learner (compiled once per kind).
    fn advance<L: Learner>(&mut self, learner: &mut L, max: u64) -> Result<bool, RunFault> {
        let ctx = Arc::clone(&self.ctx);
        let m = &ctx.exp.model;
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let k_total = ctx.exp.episodes;
        let end = (self.done + max).min(k_total);
        while self.done < end {
            learner.begin_episode(&mut self.rng);
            if let Some(message) = learner.fault() {
                let li = self.record.learner;
                return Err(RunFault {
                    learner: li,
                    label: ctx.exp.learners[li].label.clone(),
                    seed_index: self.record.seed_index,
                    episode: self.done + 1,
                    message,
                });
            }
            let version = learner.policy_version();
            let regret = match self.cached {
                Some((v, r)) if v == version => r,
                _ => {
                    let value = match learner.policy() {
                        PolicyView::Greedy(p) => self.eval.value(m, Some(p), 0.0),
                        PolicyView::Mixed { greedy, epsilon } => {
                            self.eval.value(m, Some(greedy), epsilon)
                        }
                        PolicyView::Uniform => self.eval.value(m, None, 0.0),
                        PolicyView::Table(p) => self.eval.table(m, p),
                    };
                    let r = episode_regret(ctx.optimal_value, value);
                    self.cached = Some((version, r));
                    self.flush_cells();
                    if ctx.exp.decompose {
                        self.place_regret(learner.policy(), r);
                    }
                    r
                }
            };
            self.policy_episodes += 1;
            if ctx.checkpoints.get(self.next_cp) == Some(&(self.done + 1))
                && let Some(c) = certificate(learner, m.start())
            {
                self.record.certificate.push(c);
            }
            let cells = (h_n * s_n * a_n) as u64;
            let mut s = match &self.env {
                Some((e, _)) => {
                    let mut g = LearnRng::seed_from_u64(draw_seed(*e, cells, self.done));
                    ctx.sampler.start(&mut g)
                }
                None => ctx.sampler.start(&mut self.rng),
            };
            let mut ret = 0.0;
            for h in 0..h_n {
                let a = learner.act(h, s, &mut self.rng);
                debug_assert!(a < a_n);
                let row = s * a_n + a;
                let (r, next) = match &mut self.env {
                    Some((e, visits)) => {
                        let cell = h * s_n * a_n + row;
                        let n = visits[cell];
                        visits[cell] += 1;
                        let mut g = LearnRng::seed_from_u64(draw_seed(*e, cell as u64, n));
                        (
                            sample::reward(&mut g, m.step(h).reward(row)),
                            ctx.sampler.next(&mut g, h, row),
                        )
                    }
                    None => (
                        sample::reward(&mut self.rng, m.step(h).reward(row)),
                        ctx.sampler.next(&mut self.rng, h, row),
                    ),
                };
                learner.observe(h, s, a, r, next, &mut self.rng);
                self.record.visits[h * s_n + s] += 1;
                ret += r;
                s = next;
            }
            learner.end_episode(&mut self.rng);
            self.done += 1;
            self.cum_regret += regret;
            self.cum_return += ret;
            for (e, &eps) in ctx.exp.eps_targets.iter().enumerate() {
                let rec = &mut self.record;
                if regret > eps {
                    rec.last_above[e] = self.done;
                } else {
                    rec.within[e] += 1;
                    if rec.first_within[e] == 0 {
                        rec.first_within[e] = self.done;
                    }
                }
            }
            if ctx.checkpoints.get(self.next_cp) == Some(&self.done) {
                self.record.regret.push(self.cum_regret);
                self.record.episode_regret.push(regret);
                self.record.returns.push(self.cum_return);
                self.next_cp += 1;
            }
        }
        Ok(self.done == k_total)
    }
}

/// Σ_s μ(s)·ε(s): a learner's certificate for the coming episode weighed by
/// the start distribution μ, as the episode's regret is; None when the
/// learner gives none.
fn certificate<L: Learner>(learner: &L, start: &[f64]) -> Option<f64> {
    let mut total = 0.0;
    for (s, &p) in start.iter().enumerate() {
        if p > 0.0 {
            total += p * learner.certificate(s)?;
        }
    }
    Some(total)
}

impl RunState {
    /// The cells of a new policy whose episode regret is `r`.
    fn place_regret(&mut self, view: PolicyView<'_>, r: f64) {
        if r == 0.0 {
            // Zero as the curves count it: nothing to place.
            self.policy_cells.clear();
            return;
        }
        let ctx = Arc::clone(&self.ctx);
        let m = &ctx.exp.model;
        let s_n = m.n_states();
        self.cells.fill(
            m,
            &ctx.gaps,
            |h, s, row| policy_row(&view, s_n, h, s, row),
            &mut self.policy_cells,
        );
    }

    /// Adds the current policy's cells, once per episode that used it, to
    /// the run's totals.
    fn flush_cells(&mut self) {
        let n = self.policy_episodes as f64;
        if n > 0.0 {
            for &(i, c) in &self.policy_cells {
                self.record.regret_cells[i as usize] += n * c;
            }
        }
        self.policy_episodes = 0;
    }
}

/// π_h(·|s) of a policy view: the action of a deterministic choice, or None
/// with the distribution in `row`.
fn policy_row(
    view: &PolicyView<'_>,
    s_n: usize,
    h: usize,
    s: usize,
    row: &mut [f64],
) -> Option<usize> {
    let a_n = row.len();
    match *view {
        PolicyView::Greedy(p) => return Some(p[h * s_n + s] as usize),
        PolicyView::Mixed { greedy, epsilon } => {
            row.fill(epsilon / a_n as f64);
            row[greedy[h * s_n + s] as usize] += 1.0 - epsilon;
        }
        PolicyView::Uniform => row.fill(1.0 / a_n as f64),
        PolicyView::Table(p) => row.copy_from_slice(&p[(h * s_n + s) * a_n..][..a_n]),
    }
    None
}

/// The host of a point built without one: every guest fails to start.
struct NoGuests;

impl crate::learn::GuestHost for NoGuests {
    fn start(&self, name: &str, _: &GuestIntro) -> Result<Box<dyn crate::learn::Guest>, String> {
        Err(format!(
            "no guest learner {name:?} was given to this run (load it, or name its command)"
        ))
    }
}

/// Runs every run one after another (the CLI runs them on threads; the
/// results are the same).
pub fn run_all(ctx: &Arc<Point>) -> Vec<RunRecord> {
    try_run_all(ctx).expect("built-in learners never fail")
}

/// [`run_all`], stopping at the first guest learner's failure.
pub fn try_run_all(ctx: &Arc<Point>) -> Result<Vec<RunRecord>, RunFault> {
    (0..ctx.runs())
        .map(|i| {
            let mut r = Run::new(Arc::clone(ctx), i);
            r.advance(u64::MAX)?;
            Ok(r.finish())
        })
        .collect()
}

/// What an experiment produces: results, or sweep results for a sweep.
#[derive(Debug, Clone, PartialEq)]
#[allow(
    clippy::large_enum_variant,
    reason = "one value per experiment; boxing buys nothing"
)]
pub enum Output {
    Single(Results),
    Sweep(SweepResults),
}

/// What the tables print of one learner's readings at one point (the
/// CLI's table and the page's, from one rule: [`LearnerResult::slope_text`],
/// [`LearnerResult::burn_in_text`]).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ReadingTexts {
    pub label: String,
    /// Mean regret at K and its interval ([`number_text`], [`interval_text`]).
    pub regret: String,
    pub regret_interval: String,
    pub slope: String,
    pub burn_in: String,
    /// Per ε target: the median first ε-optimal episode and the median
    /// episode after which it stayed within ε ([`median_text`]).
    pub first_optimal: Vec<String>,
    pub settled_within: Vec<String>,
}

/// A sweep's scaling reading of one learner in words
/// ([`scaling::Scaling::burn_in_text`], [`scaling::Scaling::regret_text`]).
#[derive(Debug, Clone, PartialEq, serde::Serialize)]
pub struct ScalingTexts {
    pub label: String,
    /// What the exponents are in ("S", "A", "H", "K" or the parameter).
    pub variable: String,
    pub burn_in: String,
    pub regret: String,
}

impl Output {
    /// Each learner's scaling reading in words (empty unless a sweep with
    /// scaling readings).
    pub fn scaling_texts(&self) -> Vec<ScalingTexts> {
        let Output::Sweep(s) = self else {
            return Vec::new();
        };
        let Some(x) = &s.scaling_in else {
            return Vec::new();
        };
        s.learners
            .iter()
            .filter_map(|l| {
                let sc = l.scaling.as_ref()?;
                Some(ScalingTexts {
                    label: l.label.clone(),
                    variable: x.clone(),
                    burn_in: sc.burn_in_text(x),
                    regret: sc.regret_text(x),
                })
            })
            .collect()
    }

    /// The reading texts of every learner, per point (one point when the
    /// experiment has no sweep).
    pub fn reading_texts(&self) -> Vec<Vec<ReadingTexts>> {
        let point = |r: &Results| {
            r.learners
                .iter()
                .map(|l| ReadingTexts {
                    label: l.label.clone(),
                    regret: number_text(*l.regret_mean.last().expect("a checkpoint")),
                    regret_interval: interval_text(
                        *l.regret_mean.last().expect("a checkpoint"),
                        *l.regret_lo.last().expect("a checkpoint"),
                        *l.regret_hi.last().expect("a checkpoint"),
                    ),
                    slope: l.slope_text(),
                    burn_in: l.burn_in_text(),
                    first_optimal: l
                        .episodes_to_eps
                        .iter()
                        .map(|e| median_text(&e.first_optimal))
                        .collect(),
                    settled_within: l
                        .episodes_to_eps
                        .iter()
                        .map(|e| median_text(&e.episodes))
                        .collect(),
                })
                .collect()
        };
        match self {
            Output::Single(r) => vec![point(r)],
            Output::Sweep(s) => s.points.iter().map(point).collect(),
        }
    }

    pub fn to_json(&self) -> String {
        match self {
            Output::Single(r) => r.to_json(),
            Output::Sweep(r) => r.to_json(),
        }
    }
    pub fn to_csv(&self) -> String {
        match self {
            Output::Single(r) => r.to_csv(),
            Output::Sweep(r) => r.to_csv(),
        }
    }
    /// Every seed's regret curve (`Results::seeds_csv`).
    pub fn seeds_csv(&self) -> String {
        self.per_point(Results::seeds_csv)
    }

    /// The summary table, a row per learner (`Results::summary_csv`).
    pub fn summary_csv(&self) -> String {
        self.per_point(Results::summary_csv)
    }

    /// Where regret was paid, by (learner, h, s, a) (`Results::cells_csv`).
    pub fn cells_csv(&self) -> String {
        self.per_point(Results::cells_csv)
    }

    /// A table of one point's results; for a sweep, every point's rows with
    /// the swept value in front.
    fn per_point(&self, table: fn(&Results) -> String) -> String {
        match self {
            Output::Single(r) => table(r),
            Output::Sweep(r) => prefixed_csv(&r.parameter, &r.values, r.points.iter().map(table)),
        }
    }
}

/// One CSV from one table per sweep point: the header once, with the swept
/// parameter in front, and each point's rows with its value.
fn prefixed_csv(parameter: &str, values: &[f64], tables: impl Iterator<Item = String>) -> String {
    let mut o = String::new();
    for (i, (t, v)) in tables.zip(values).enumerate() {
        for (j, line) in t.lines().enumerate() {
            if j == 0 {
                if i == 0 {
                    o.push_str(&format!("{parameter},{line}\n"));
                }
                continue;
            }
            o.push_str(&format!("{v},{line}\n"));
        }
    }
    o
}

/// Summarises the records of every point (records\[p\] for points\[p\]).
pub fn assemble(exp: &Experiment, points: &[Arc<Point>], records: Vec<Vec<RunRecord>>) -> Output {
    assemble_without(exp, points, records, Vec::new())
}

/// [`assemble`] without the learners named in `faults` (their records are
/// dropped, the others renumbered); the faults are listed in the output.
pub fn assemble_without(
    exp: &Experiment,
    points: &[Arc<Point>],
    mut records: Vec<Vec<RunRecord>>,
    mut faults: Vec<RunFault>,
) -> Output {
    faults.sort_by_key(|f| (f.learner, f.seed_index));
    let failed: Vec<usize> = {
        let mut v: Vec<usize> = faults.iter().map(|f| f.learner).collect();
        v.dedup();
        v
    };
    let mut owned: Vec<Arc<Point>>;
    let points = if failed.is_empty() {
        points
    } else {
        let keep = |li: usize| !failed.contains(&li);
        let renumber = |li: usize| li - failed.iter().filter(|&&f| f < li).count();
        for rs in &mut records {
            rs.retain(|r| keep(r.learner));
            for r in rs.iter_mut() {
                r.learner = renumber(r.learner);
            }
        }
        owned = Vec::with_capacity(points.len());
        for p in points {
            let mut e = p.exp.clone();
            e.learners = (0..e.learners.len())
                .filter(|&li| keep(li))
                .map(|li| e.learners[li].clone())
                .collect();
            owned.push(Point::with_guests(e, None));
        }
        &owned[..]
    };
    let mut summaries: Vec<Results> = points
        .iter()
        .zip(records)
        .map(|(c, r)| summarise(c, r))
        .collect();
    match &exp.sweep {
        None => {
            let mut r = summaries.remove(0);
            r.failed = faults;
            Output::Single(r)
        }
        Some(s) => {
            let mut r = SweepResults::new(&exp.name, &s.parameter.key(), &s.values, summaries);
            r.failed = faults;
            Output::Sweep(r)
        }
    }
}

/// Every run of an experiment (all sweep points), stepped one after another
/// in chunks: what a single worker does.
pub struct RunQueue {
    exp: Experiment,
    points: Vec<Arc<Point>>,
    /// (point, run index) in order.
    jobs: Vec<(usize, usize)>,
    next: usize,
    current: Option<(usize, Run)>,
    records: Vec<Vec<RunRecord>>,
    /// Guest learners' failures; a failed learner's other runs are skipped.
    faults: Vec<RunFault>,
    done: u64,
    total: u64,
}

/// Every (point, run) of an experiment, in a fixed order.
pub fn all_jobs(points: &[Arc<Point>]) -> Vec<(usize, usize)> {
    points
        .iter()
        .enumerate()
        .flat_map(|(p, c)| (0..c.runs()).map(move |i| (p, i)))
        .collect()
}

/// The number of run (point, learner, seed index) in [`all_jobs`]' order, or
/// None when no such run exists.
pub fn job_number(points: &[Arc<Point>], point: usize, learner: usize, seed: u64) -> Option<usize> {
    let p = points.get(point)?;
    let seeds = p.exp.seeds;
    if learner >= p.exp.learners.len() || seed >= seeds {
        return None;
    }
    let before: usize = points[..point].iter().map(|c| c.runs()).sum();
    Some(before + learner * seeds as usize + seed as usize)
}

/// The jobs of shard `index` (0-based) of `count`: every count-th job.
pub fn shard_jobs(points: &[Arc<Point>], index: usize, count: usize) -> Vec<(usize, usize)> {
    all_jobs(points)
        .into_iter()
        .enumerate()
        .filter(|(j, _)| j % count == index)
        .map(|(_, job)| job)
        .collect()
}

impl RunQueue {
    pub fn new(exp: Experiment) -> RunQueue {
        Self::shard(exp, 0, 1)
    }

    /// Only shard `index` (0-based) of `count` of the runs.
    pub fn shard(exp: Experiment, index: usize, count: usize) -> RunQueue {
        Self::shard_with_guests(exp, index, count, None)
    }

    /// A shard whose guest learners `guests` starts.
    pub fn shard_with_guests(
        exp: Experiment,
        index: usize,
        count: usize,
        guests: Option<Guests>,
    ) -> RunQueue {
        let points = Point::all(&exp, guests.as_ref());
        let jobs = shard_jobs(&points, index, count);
        Self::planned(exp, points, jobs)
    }

    /// The queue of `jobs` ((point, run) pairs) of `exp`'s `points`.
    fn planned(exp: Experiment, points: Vec<Arc<Point>>, jobs: Vec<(usize, usize)>) -> RunQueue {
        let total = jobs.iter().map(|&(p, _)| points[p].exp.episodes).sum();
        RunQueue {
            records: vec![Vec::new(); points.len()],
            faults: Vec::new(),
            exp,
            points,
            jobs,
            next: 0,
            current: None,
            done: 0,
            total,
        }
    }

    /// Runs up to `max` more episodes in total; true when every run is done.
    pub fn advance(&mut self, max: u64) -> bool {
        self.step(max, false)
    }

    /// [`RunQueue::advance`], but never past the end of the run in
    /// progress, so that [`RunQueue::current`] before the call names the
    /// only run it touches (the page's watchdog for guest learners).
    pub fn advance_one_run(&mut self, max: u64) -> bool {
        self.step(max, true)
    }

    fn step(&mut self, mut max: u64, one_run: bool) -> bool {
        while max > 0 {
            if self.current.is_none() {
                let Some(&(p, i)) = self.jobs.get(self.next) else {
                    return true;
                };
                self.next += 1;
                let seeds = self.points[p].exp.seeds as usize;
                if self.faults.iter().any(|f| f.learner == i / seeds) {
                    self.done += self.points[p].exp.episodes;
                    continue;
                }
                self.current = Some((p, Run::new(Arc::clone(&self.points[p]), i)));
            }
            let (p, run) = self.current.as_mut().expect("set above");
            let before = run.episodes_done();
            let result = run.advance(max);
            let step = run.episodes_done() - before;
            self.done += step;
            max -= step.min(max);
            let finished = match result {
                Ok(f) => f,
                Err(fault) => {
                    // The rest of this run counts as done: progress stays honest.
                    self.done += self.points[*p].exp.episodes - run.episodes_done();
                    self.faults.push(fault);
                    self.current = None;
                    if one_run {
                        break;
                    }
                    continue;
                }
            };
            if finished {
                let (p, run) = (*p, self.current.take().expect("set above").1);
                self.records[p].push(run.finish());
                if one_run {
                    break;
                }
            }
        }
        self.is_done()
    }

    pub fn is_done(&self) -> bool {
        self.current.is_none() && self.next >= self.jobs.len()
    }

    pub fn episodes_done(&self) -> u64 {
        self.done
    }

    pub fn total_episodes(&self) -> u64 {
        self.total
    }

    pub fn experiment(&self) -> &Experiment {
        &self.exp
    }

    /// The results (once [`RunQueue::is_done`], and for an unsharded
    /// batch), without the learners that failed.
    pub fn output(&self) -> Output {
        assert!(self.is_done(), "every run has finished");
        assemble_without(
            &self.exp,
            &self.points,
            self.records.clone(),
            self.faults.clone(),
        )
    }

    /// The guest learners' failures so far.
    pub fn faults(&self) -> &[RunFault] {
        &self.faults
    }

    /// Records a failure seen outside the core (a guest that never
    /// answered): the run in progress of that learner is dropped and its
    /// other runs are skipped.
    pub fn fail(&mut self, fault: RunFault) {
        if let Some((p, run)) = &self.current
            && run.identity().0 == fault.learner
        {
            self.done += self.points[*p].exp.episodes - run.episodes_done();
            self.current = None;
        }
        self.faults.push(fault);
    }

    /// Records that `learner`'s run of seed `seed_index` gave no answer for
    /// `seconds` after `episodes_done` episodes, and so its worker was
    /// stopped (the page's watchdog): as [`RunQueue::fail`].
    pub fn gave_no_answer(
        &mut self,
        learner: usize,
        seed_index: u64,
        episodes_done: u64,
        seconds: f64,
    ) {
        let Some(spec) = self.exp.learners.get(learner) else {
            return;
        };
        let fault = RunFault {
            learner,
            label: spec.label.clone(),
            seed_index,
            episode: episodes_done + 1,
            message: format!("gave no answer within {seconds:.0} s; its worker was stopped"),
        };
        self.fail(fault);
    }

    /// The run in progress, or else the next one to start: (learner index,
    /// seed index, episodes done); None when every run is done.
    pub fn current(&self) -> Option<(usize, u64, u64)> {
        if let Some((_, r)) = &self.current {
            let (l, s) = r.identity();
            return Some((l, s, r.episodes_done()));
        }
        self.jobs[self.next.min(self.jobs.len())..]
            .iter()
            .map(|&(p, i)| {
                let seeds = self.points[p].exp.seeds as usize;
                (i / seeds, (i % seeds) as u64)
            })
            .find(|(l, _)| !self.faults.iter().any(|f| f.learner == *l))
            .map(|(l, s)| (l, s, 0))
    }

    /// The experiment's points (one per sweep value).
    pub fn points(&self) -> &[Arc<Point>] {
        &self.points
    }

    /// The finished runs as (point, record) pairs, for a shard file.
    pub fn records(&self) -> Vec<(usize, RunRecord)> {
        self.records
            .iter()
            .enumerate()
            .flat_map(|(p, rs)| rs.iter().map(move |r| (p, r.clone())))
            .collect()
    }
}

//! Reference workloads for the benchmark command, the same natively and in
//! wasm. The front end passes the clock (`now`, seconds); the core never
//! reads one itself.
//!
//! Workloads (issue "Speed and scale"):
//! - solve: a random sparse model with S = 2000, A = 8, H = 50, 10 successors,
//!   a fresh table per step (8 million entries), by backward induction;
//!   beside it a plain pass over arrays of the same size as the solver reads
//!   (the machine's streaming rate for this layout);
//! - learn: each learner on a random model with S = 20, A = 4, H = 20 and 5
//!   successors, one seed, K episodes (100 000 by default);
//! - floor: the cheapest episode loop on the same model (a fixed policy,
//!   reward and next-state draws, visit counts), episodes per second;
//! - replan: MVP's model updates and time at K = 10³ … 10⁶;
//! - research (alone, on request): each learner on S = 500, A = 10, H = 50
//!   with 10 successors per row, episodes per second.

use serde::Serialize;

use std::sync::Arc;

use crate::experiment::{Experiment, LearnerSpec, Point, Run, RunRecord, Source};
use crate::generate::Garnet;
use crate::learn::{ALGORITHMS, Algorithm, AlgorithmKind};
use crate::solve::solve;

/// One measured figure.
#[derive(Debug, Clone, Serialize)]
pub struct Figure {
    pub name: String,
    pub unit: String,
    /// Best (highest rate) of the repetitions.
    pub best: f64,
    /// Median of the repetitions.
    pub median: f64,
    pub repetitions: usize,
    /// A checksum of what was computed (equal natively and in wasm), or for
    /// the replanning figures the seconds taken.
    pub note: String,
}

fn figure(name: &str, unit: &str, mut rates: Vec<f64>, note: String) -> Figure {
    rates.sort_by(f64::total_cmp);
    Figure {
        name: name.into(),
        unit: unit.into(),
        best: *rates.last().unwrap(),
        median: rates[rates.len() / 2],
        repetitions: rates.len(),
        note,
    }
}

/// A random sparse model of the benchmarks, Bernoulli rewards, seed 1.
fn garnet(
    states: usize,
    actions: usize,
    successors: usize,
    horizon: usize,
    time_dependent: bool,
) -> crate::Mdp {
    Garnet {
        states,
        actions,
        successors,
        horizon,
        time_dependent,
        bernoulli: true,
    }
    .generate(1)
    .expect("valid parameters")
}

/// The solver workload's model.
pub fn solve_model() -> crate::Mdp {
    garnet(2000, 8, 10, 50, true)
}

/// Solver throughput (entries/s), the streaming rate (bytes/s) of a plain
/// pass over arrays of the same size and types as the solver reads, and
/// their ratio (solver bytes/s over streaming bytes/s), measured pair by pair
/// with the two interleaved so that the machine's drift affects both alike.
pub fn solve_figures(now: &dyn Fn() -> f64, reps: usize) -> Vec<Figure> {
    let m = solve_model();
    let entries = m.entries() as f64;
    let (mut solve_rates, mut stream_rates, mut ratios) = (Vec::new(), Vec::new(), Vec::new());
    let (mut value, mut sum) = (0.0, 0.0);
    for _ in 0..reps {
        let t = now();
        value = solve(&m).optimal_value;
        let solve_rate = entries / (now() - t);
        // The pass reads every next index (u32) and probability (f64) once,
        // as the solver does, and sums them.
        let t = now();
        let mut acc = 0.0;
        let mut idx = 0u64;
        for st in m.step_tables() {
            let (_, next, prob) = st.csr();
            for (&n, &p) in next.iter().zip(prob) {
                acc += p;
                idx = idx.wrapping_add(n as u64);
            }
        }
        sum = acc + idx as f64;
        let stream_rate = entries * 12.0 / (now() - t);
        solve_rates.push(solve_rate);
        stream_rates.push(stream_rate);
        ratios.push(solve_rate * 12.0 / stream_rate);
    }
    vec![
        figure(
            "solve S=2000 A=8 H=50 b=10",
            "entries/s",
            solve_rates,
            format!("{value:.12e}"),
        ),
        figure(
            "plain pass over the same arrays",
            "bytes/s",
            stream_rates,
            format!("{sum:.6e}"),
        ),
        figure(
            "solver share of the streaming rate",
            "ratio",
            ratios,
            String::new(),
        ),
    ]
}

/// Episodes per call when the workloads run, as the page's worker runs
/// experiments: in short slices. (A wasm engine swaps in its optimised code
/// for a function between calls, never during one, so a single call lasting
/// the whole run would be timed mostly in baseline code, unlike the page.)
const CHUNK: u64 = 1024;

/// Repetitions of one learning workload: at most this many …
const LEARN_REPS: usize = 5;
/// … and none started after this many seconds of them.
const LEARN_SECONDS: f64 = 4.0;

/// Every run of `ctx`, one after another, each advanced `CHUNK` episodes per call.
fn run_in_chunks(ctx: &Arc<Point>) -> Vec<RunRecord> {
    (0..ctx.runs())
        .map(|i| {
            let mut r = Run::new(Arc::clone(ctx), i);
            while !r.advance(CHUNK).expect("built-in learners never fail") {}
            r.finish()
        })
        .collect()
}

/// The learning workload's experiment: one learner, one seed, K episodes.
pub fn learn_experiment(algorithm: Algorithm, episodes: u64) -> Experiment {
    let model = garnet(20, 4, 5, 20, false);
    Experiment {
        name: "bench".into(),
        model,
        generator: None,
        sweep: None,
        eps_default: true,
        eps_targets: vec![2.0, 1.0],
        episodes,
        seeds: 1,
        seed: 1,
        delta: 0.05,
        checkpoints: 64,
        decompose: false,
        shared_draws: false,
        learners: vec![LearnerSpec {
            label: algorithm.key().into(),
            source: Source::Builtin(algorithm),
        }],
    }
}

/// The learners benchmarked: every algorithm of the catalogue that runs on
/// an MDP, at its default parameter.
pub fn bench_learners() -> Vec<Algorithm> {
    ALGORITHMS
        .iter()
        .filter(|i| !i.bandit_only)
        .map(|i| Algorithm::new(i.kind))
        .collect()
}

/// The learning workload's K for OPSRL: its plan draws J Dirichlet vectors
/// per visited row every episode (J ≈ 170 here), so its episodes grow
/// costlier with the data and K = 10⁵ would take hours.
pub const OPSRL_LEARN_EPISODES: u64 = 200;

/// The learning workload's K for learner `a` when the others run `episodes`.
pub fn learn_episodes(a: Algorithm, episodes: u64) -> u64 {
    if a.kind == AlgorithmKind::Opsrl {
        episodes.min(OPSRL_LEARN_EPISODES)
    } else {
        episodes
    }
}

/// Episodes per second of each learner on the learning workload.
pub fn learn_figures(now: &dyn Fn() -> f64, episodes: u64, only: Option<&str>) -> Vec<Figure> {
    bench_learners()
        .into_iter()
        .filter(|a| only.is_none_or(|k| a.key() == k))
        .map(|a| {
            let episodes = learn_episodes(a, episodes);
            let ctx = Point::new(learn_experiment(a, episodes));
            // Repeated while the repetitions so far took under LEARN_SECONDS
            // (at most LEARN_REPS): a shared machine's noise moves single
            // runs by a quarter, and the ratios compare best against best.
            let (mut rates, mut spent, mut regret) = (Vec::new(), 0.0, 0.0);
            while rates.is_empty() || (spent < LEARN_SECONDS && rates.len() < LEARN_REPS) {
                let t = now();
                let records = run_in_chunks(&ctx);
                let secs = now() - t;
                spent += secs;
                rates.push(episodes as f64 / secs);
                regret = *records[0].regret.last().unwrap();
            }
            figure(
                &format!("learn {} S=20 A=4 H=20 K={episodes}", a.key()),
                "episodes/s",
                rates,
                format!("{regret:.12e}"),
            )
        })
        .collect()
}

/// The name `Selection::only` takes for the floor workload alone.
pub const FLOOR: &str = "floor";

/// The floor of an episode loop on the learning workload's model: the
/// least any run does per step (a fixed policy, the reward draw, the
/// next-state draw from the alias tables, the visit count and the return)
/// and nothing else: no learner, no policy evaluation, no regret. Every
/// learner's cost per step is measured against it. Returns episodes per
/// second (of H steps, as the learners' figures) and a checksum of the
/// returns and visits.
pub fn floor_figures(now: &dyn Fn() -> f64, episodes: u64) -> Vec<Figure> {
    use crate::learn::LearnRng;
    use crate::sample::{Sampler, reward};
    use rand::SeedableRng;
    let m = learn_experiment(Algorithm::new(AlgorithmKind::Uniform), episodes).model;
    let sampler = Sampler::new(&m);
    let (s_n, a_n, h_n) = (m.n_states(), m.n_actions(), m.horizon());
    // A fixed policy that still visits every action, read from a table as
    // a learner's greedy policy is.
    let policy: Vec<u32> = (0..h_n * s_n)
        .map(|i| ((i / s_n + i % s_n) % a_n) as u32)
        .collect();
    let (mut rates, mut spent, mut check) = (Vec::new(), 0.0, 0.0);
    while rates.is_empty() || (spent < LEARN_SECONDS && rates.len() < LEARN_REPS) {
        let mut rng = LearnRng::seed_from_u64(1);
        let mut visits = vec![0u64; h_n * s_n];
        let mut total = 0.0;
        let t = now();
        for _ in 0..episodes {
            let mut s = sampler.start(&mut rng);
            for h in 0..h_n {
                let a = policy[h * s_n + s] as usize;
                let row = s * a_n + a;
                total += reward(&mut rng, m.step(h).reward(row));
                visits[h * s_n + s] += 1;
                s = sampler.next(&mut rng, h, row);
            }
        }
        let secs = now() - t;
        spent += secs;
        rates.push(episodes as f64 / secs);
        let spread: u64 = visits
            .iter()
            .enumerate()
            .map(|(i, &v)| v * (i as u64 + 1))
            .sum();
        check = total + spread as f64;
    }
    vec![figure(
        &format!("floor S=20 A=4 H=20 K={episodes}"),
        "episodes/s",
        rates,
        format!("{check:.12e}"),
    )]
}

/// The research-scale workload's model: S = 500, A = 10, H = 50, 10
/// successors per row, a fresh table per step (2.5 million entries),
/// Bernoulli rewards (`burnin generate random --states 500 --actions 10
/// --successors 10 --horizon 50 --time-dependent --seed 1` writes it).
pub fn research_model() -> crate::Mdp {
    garnet(500, 10, 10, 50, true)
}

/// Episodes of each research-scale run …
pub const RESEARCH_EPISODES: u64 = 1000;
/// … cut after this many seconds (the rate is over the episodes done by
/// then); a learner whose run takes less than [`RESEARCH_MIN_SECONDS`] runs
/// again (a fresh run, the same seed), at most [`LEARN_REPS`] times, and
/// its best run counts.
pub const RESEARCH_SECONDS: f64 = 15.0;
pub const RESEARCH_MIN_SECONDS: f64 = 2.0;

/// Episodes per second of each learner (one seed, set-up excluded: the
/// sampler's tables and V*) on the research-scale model, over its first
/// [`RESEARCH_EPISODES`] episodes or the episodes done in
/// [`RESEARCH_SECONDS`], whichever comes first; the note says how many.
pub fn research_figures(now: &dyn Fn() -> f64, only: Option<&str>) -> Vec<Figure> {
    bench_learners()
        .into_iter()
        .filter(|a| only.is_none_or(|k| a.key() == k))
        .map(|a| {
            let mut exp = learn_experiment(a, RESEARCH_EPISODES);
            exp.model = research_model();
            exp.eps_targets = vec![5.0, 2.5];
            let ctx = Point::new(exp);
            let (mut rates, mut spent, mut note) = (Vec::new(), 0.0, String::new());
            while rates.is_empty() || (spent < RESEARCH_MIN_SECONDS && rates.len() < LEARN_REPS) {
                let mut r = Run::new(Arc::clone(&ctx), 0);
                let t = now();
                let mut secs;
                loop {
                    let finished = r.advance(1).expect("built-in learners never fail");
                    secs = now() - t;
                    if finished || secs > RESEARCH_SECONDS {
                        break;
                    }
                }
                spent += secs;
                let done = r.episodes_done();
                rates.push(done as f64 / secs);
                note = format!("{done} of {RESEARCH_EPISODES} episodes a run");
            }
            figure(
                &format!("research {} S=500 A=10 H=50 b=10", a.key()),
                "episodes/s",
                rates,
                note,
            )
        })
        .collect()
}

/// MVP's model updates and seconds at K = 10³ … 10^max_exp on the learning workload.
pub fn replan_figures(now: &dyn Fn() -> f64, max_exp: u32) -> Vec<Figure> {
    (3..=max_exp)
        .map(|e| {
            let k = 10u64.pow(e);
            let ctx = Point::new(learn_experiment(Algorithm::new(AlgorithmKind::Mvp), k));
            let t = now();
            let records = run_in_chunks(&ctx);
            let secs = now() - t;
            figure(
                &format!("mvp replans at K={k}"),
                "model updates",
                vec![records[0].model_updates as f64],
                format!("{secs:.3} s"),
            )
        })
        .collect()
}

/// Which workloads a benchmark run does.
#[derive(Debug, Clone, Copy)]
pub struct Selection<'a> {
    /// Smaller workloads (K = 10 000, replanning to 10⁵, two solver repetitions).
    pub quick: bool,
    /// Only this learner's learning workload (an algorithm key), or only
    /// the floor ([`FLOOR`]).
    pub only: Option<&'a str>,
    /// No learning workloads.
    pub no_learners: bool,
    /// Only the research-scale workload (with `only`, one learner's).
    pub research: bool,
}

/// Runs the selected workloads and returns the report both front ends
/// print: `{"target", "figures", "peak_memory_bytes",
/// "peak_memory_after_solve_bytes"}`, with `memory` read after the solver
/// workload and at the end (the front end knows how to measure it).
pub fn report(
    target: &str,
    now: &dyn Fn() -> f64,
    memory: &dyn Fn() -> Option<u64>,
    sel: Selection,
) -> String {
    let (k, max_exp, reps) = if sel.quick {
        (10_000, 5, 2)
    } else {
        (100_000, 6, 5)
    };
    let mut figures = Vec::new();
    if sel.research {
        figures.extend(research_figures(now, sel.only));
        return serde_json::to_string_pretty(&serde_json::json!({
            "target": target,
            "figures": figures,
            "peak_memory_bytes": memory(),
        }))
        .expect("plain values");
    }
    if sel.only.is_none() {
        figures.extend(solve_figures(now, reps));
    }
    let after_solve = memory();
    if !sel.no_learners {
        if sel.only.is_none_or(|k| k == FLOOR) {
            figures.extend(floor_figures(now, k));
        }
        figures.extend(learn_figures(now, k, sel.only));
    }
    if sel.only.is_none() {
        figures.extend(replan_figures(now, max_exp));
    }
    serde_json::to_string_pretty(&serde_json::json!({
        "target": target,
        "figures": figures,
        "peak_memory_bytes": memory(),
        "peak_memory_after_solve_bytes": after_solve,
    }))
    .expect("plain values")
}

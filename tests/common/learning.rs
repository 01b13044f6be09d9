//! Helpers of the learner tests: playing a learner on a model with the
//! runner's draws, the small random models of the optimism checks, and the
//! share of checks at which a learner's value falls below the exact V*.

use burnin::experiment::{Point, Results, parse_experiment, run_all, summarise};
use burnin::generate::Garnet;
use burnin::learn::{LearnRng, Learner, Setting};
use burnin::solve::solve;
use burnin::{Mdp, write_model};
use rand::SeedableRng;

/// An experiment file around `model` with the given learners (JSON text).
pub fn experiment(model: &Mdp, episodes: u64, seeds: u64, learners: &str) -> String {
    format!(
        r#"{{"format": "burnin-experiment", "version": 1, "model": {}, "episodes": {episodes},
            "seeds": {seeds}, "seed": 7, "checkpoints": 40, "learners": {learners}}}"#,
        write_model(model)
    )
}

pub fn run(text: &str) -> Results {
    let exp = parse_experiment(text, None).expect("a valid experiment");
    let ctx = Point::new(exp);
    let records = run_all(&ctx);
    summarise(&ctx, records)
}

/// When [`play`] calls its check.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Moment {
    /// After `begin_episode`, before the episode is played.
    Start,
    /// After `observe(h, s, a, r, next)`.
    Saw(Step),
}

/// One observed step: h, s, a, r, next.
pub type Step = (usize, usize, usize, f64, usize);

/// Plays `learner` on `m` for `episodes` episodes (the runner's draws: the
/// start state, then per step the action, the reward and the next state,
/// from one seeded generator) and calls `check(learner, moment)` at the
/// start of each episode and after each step.
pub fn play<L: Learner>(
    m: &Mdp,
    learner: &mut L,
    episodes: usize,
    seed: u64,
    mut check: impl FnMut(&L, Moment),
) {
    use burnin::sample::{self, Sampler};
    let sampler = Sampler::new(m);
    let mut rng = LearnRng::seed_from_u64(seed);
    for _ in 0..episodes {
        learner.begin_episode(&mut rng);
        check(learner, Moment::Start);
        let mut s = sampler.start(&mut rng);
        for h in 0..m.horizon() {
            let a = learner.act(h, s, &mut rng);
            let row = s * m.n_actions() + a;
            let r = sample::reward(&mut rng, m.step(h).reward(row));
            let next = sampler.next(&mut rng, h, row);
            learner.observe(h, s, a, r, next, &mut rng);
            check(learner, Moment::Saw((h, s, a, r, next)));
            s = next;
        }
        learner.end_episode(&mut rng);
    }
}

/// The small random models of the optimism checks (Garnet, time-dependent,
/// Bernoulli rewards).
pub fn small_models() -> Vec<Mdp> {
    [(3, 2, 3, 21), (4, 2, 2, 22), (2, 3, 4, 23)]
        .iter()
        .map(|&(states, actions, horizon, seed)| {
            Garnet {
                states,
                actions,
                successors: 2,
                horizon,
                time_dependent: true,
                bernoulli: true,
            }
            .generate(seed)
            .unwrap()
        })
        .collect()
}

pub fn setting_of(m: &Mdp, episodes: u64, delta: f64) -> Setting {
    Setting {
        states: m.n_states(),
        actions: m.n_actions(),
        horizon: m.horizon(),
        episodes,
        delta,
    }
}

/// The share of (run, episode) checks at which a learner's value at step 1,
/// `value(learner, s)`, is below the exact V*₁(s) of the solver at some
/// state s, over [`small_models`] × 3 seeds of `episodes` episodes.
pub fn optimism_failures<L: Learner>(
    episodes: u64,
    delta: f64,
    build: impl Fn(Setting) -> L,
    value: impl Fn(&L, usize) -> f64,
) -> f64 {
    let (mut checks, mut failures) = (0u64, 0u64);
    for m in small_models() {
        let v_star = solve(&m).v;
        for seed in 0..3 {
            let mut learner = build(setting_of(&m, episodes, delta));
            play(&m, &mut learner, episodes as usize, seed, |l, at| {
                if at != Moment::Start {
                    return;
                }
                checks += 1;
                let below = (0..m.n_states()).any(|s| value(l, s) < v_star[[0, s]] - 1e-9);
                failures += below as u64;
            });
        }
    }
    failures as f64 / checks as f64
}

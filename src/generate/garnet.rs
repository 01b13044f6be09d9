//! Random sparse ("Garnet-style") models.

use rand::Rng;
use rand_chacha::ChaCha8Rng;

use super::catalog::{GenParam, Values};
use super::{ParamError, Sizes, finish, labels, need_range, point_start, rng};
use crate::model::limits::{MAX_ACTIONS, MAX_HORIZON, MAX_STATES};
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static STATES: GenParam = GenParam::whole("states", 10, 1, MAX_STATES, "S, the number of states");
static ACTIONS: GenParam =
    GenParam::whole("actions", 3, 1, MAX_ACTIONS, "A, the number of actions");
static SUCCESSORS: GenParam = GenParam::whole(
    "successors",
    3,
    1,
    MAX_STATES,
    "next states per (state, action), drawn without replacement (at most S)",
);
static HORIZON: GenParam = GenParam::whole("horizon", 10, 1, MAX_HORIZON, "H, steps per episode");
static TIME_DEPENDENT: GenParam =
    GenParam::flag("time_dependent", "draw a fresh table for every step");
static FIXED_REWARDS: GenParam = GenParam::flag(
    "fixed_rewards",
    "fixed rewards (the mean) instead of Bernoulli ones",
);

pub(super) static PARAMS: &[&GenParam] = &[
    &STATES,
    &ACTIONS,
    &SUCCESSORS,
    &HORIZON,
    &TIME_DEPENDENT,
    &FIXED_REWARDS,
];

/// Random sparse ("Garnet-style") models.
///
/// For every (step table, s, a): `successors` distinct next states drawn
/// uniformly without replacement (Floyd's algorithm), with probabilities the
/// spacings of `successors − 1` sorted uniform points on [0, 1]; the mean
/// reward of each (s, a) is uniform on [0, 1], as a Bernoulli reward or a
/// fixed one. The start state is state 0. `time_dependent` draws a fresh
/// table for every step.
///
/// # References
/// - T. W. Archibald, K. I. M. McKinnon and L. C. Thomas, "On the generation
///   of Markov decision processes", *Journal of the Operational Research
///   Society* 46(3), 1995, 354–361.
#[derive(Debug, Clone, PartialEq)]
pub struct Garnet {
    pub states: usize,
    pub actions: usize,
    pub successors: usize,
    pub horizon: usize,
    pub time_dependent: bool,
    /// Bernoulli rewards (true) or fixed ones (false).
    pub bernoulli: bool,
}

impl Default for Garnet {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("random").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> Garnet {
    Garnet {
        states: v.whole("states"),
        actions: v.whole("actions"),
        successors: v.whole("successors"),
        horizon: v.whole("horizon"),
        time_dependent: v.flag("time_dependent"),
        bernoulli: !v.flag("fixed_rewards"),
    }
}

pub(super) fn build(v: &Values, seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate(seed)
}

/// Floyd's algorithm: `k` distinct values from 0..n, in draw order.
fn distinct(rng: &mut ChaCha8Rng, n: usize, k: usize) -> Vec<u32> {
    let mut chosen: Vec<u32> = Vec::with_capacity(k);
    for j in (n - k)..n {
        let t = rng.random_range(0..=j as u32);
        if chosen.contains(&t) {
            chosen.push(j as u32);
        } else {
            chosen.push(t);
        }
    }
    chosen
}

/// Spacings of k−1 sorted uniform points on [0, 1]: a uniform point of the simplex.
fn spacings(rng: &mut ChaCha8Rng, k: usize) -> Vec<f64> {
    let mut cuts: Vec<f64> = (0..k - 1).map(|_| rng.random::<f64>()).collect();
    cuts.sort_by(f64::total_cmp);
    let mut out = Vec::with_capacity(k);
    let mut prev = 0.0;
    for c in cuts {
        out.push(c - prev);
        prev = c;
    }
    out.push(1.0 - prev);
    out
}

impl Garnet {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        STATES.check(self.states as f64)?;
        ACTIONS.check(self.actions as f64)?;
        HORIZON.check(self.horizon as f64)?;
        need_range("successors", self.successors, 1, self.states)?;
        let tables = if self.time_dependent { self.horizon } else { 1 };
        let cells = self.states * self.actions;
        let (s, a, h, b) = (self.states, self.actions, self.horizon, self.successors);
        let sizes = |per_row: usize| Sizes {
            states: s as u128,
            actions: a as u128,
            horizon: h as u128,
            tables: tables as u128,
            per_row: per_row as u128,
        };
        sizes(1).check("states")?;
        sizes(b).check("successors")?;
        let mut rng = rng(seed);
        let steps = (0..tables)
            .map(|_| {
                let mut transitions = Vec::with_capacity(cells);
                let mut rewards = Vec::with_capacity(cells);
                for _ in 0..cells {
                    let next = distinct(&mut rng, self.states, self.successors);
                    let probs = spacings(&mut rng, self.successors);
                    transitions.push(next.into_iter().zip(probs).collect());
                    let mean: f64 = rng.random();
                    rewards.push(if self.bernoulli {
                        Reward::Bernoulli(mean)
                    } else {
                        Reward::Fixed(mean)
                    });
                }
                StepParts {
                    transitions,
                    rewards,
                }
            })
            .collect();
        finish(
            MdpParts {
                name: format!(
                    "Random sparse S={} A={} b={} H={}",
                    self.states, self.actions, self.successors, self.horizon
                ),
                notes: Some(format!(
                    "Garnet-style random model (Archibald, McKinnon & Thomas 1995), seed {seed}{}.",
                    if self.time_dependent {
                        ", a fresh table per step"
                    } else {
                        ""
                    }
                )),
                horizon: self.horizon,
                discount: None,
                states: labels("s", self.states),
                actions: labels("a", self.actions),
                start: point_start(self.states, 0),
                stationary: !self.time_dependent,
                steps,
                layout: None,
            },
            "states",
        )
    }
}

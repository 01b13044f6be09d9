//! A Bernoulli multi-armed bandit.

use rand::Rng;

use super::catalog::{GenParam, Values};
use super::{ParamError, finish, labels, need_range, rng};
use crate::model::limits::MAX_ACTIONS;
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static ARMS: GenParam = GenParam::whole(
    "arms",
    5,
    1,
    MAX_ACTIONS,
    "number of arms, with means drawn from the seed",
);
static MEANS: GenParam = GenParam::numbers(
    "means",
    0.0,
    1.0,
    "the arms' means, comma-separated (overrides arms)",
);

pub(super) static PARAMS: &[&GenParam] = &[&ARMS, &MEANS];

/// A Bernoulli multi-armed bandit as an MDP with S = 1 and H = 1: arm i pays
/// 1 with probability `means[i]`; with no means given, `arms` means are drawn
/// uniformly on [0, 1] from the seed.
#[derive(Debug, Clone, PartialEq)]
pub struct Bandit {
    pub arms: usize,
    pub means: Vec<f64>,
}

impl Default for Bandit {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("bandit").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> Bandit {
    Bandit {
        arms: v.whole("arms"),
        means: v.numbers("means"),
    }
}

pub(super) fn build(v: &Values, seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate(seed)
}

impl Bandit {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        let means = if self.means.is_empty() {
            ARMS.check(self.arms as f64)?;
            let mut rng = rng(seed);
            (0..self.arms).map(|_| rng.random::<f64>()).collect()
        } else {
            need_range(
                "arms",
                self.means.len(),
                1,
                crate::model::limits::MAX_ACTIONS,
            )?;
            for &m in &self.means {
                MEANS.check(m)?;
            }
            self.means.clone()
        };
        let k = means.len();
        finish(
            MdpParts {
                name: format!("Bernoulli bandit, {k} arms"),
                notes: Some("A multi-armed bandit: one state, one step.".into()),
                horizon: 1,
                discount: None,
                states: vec!["pull".into()],
                actions: labels("arm ", k),
                start: vec![1.0],
                stationary: true,
                steps: vec![StepParts {
                    transitions: vec![vec![(0, 1.0)]; k],
                    rewards: means.into_iter().map(Reward::Bernoulli).collect(),
                }],
                layout: None,
            },
            "arms",
        )
    }
}

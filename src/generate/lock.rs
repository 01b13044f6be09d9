//! A combination lock.

use super::catalog::{GenParam, Values};
use super::{ParamError, Sizes, finish, index, labels, point_start, rng};
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static HORIZON: GenParam = GenParam::whole(
    "horizon",
    6,
    1,
    2_000,
    "H, the number of dials to get right",
);
static ACTIONS: GenParam = GenParam::whole("actions", 2, 2, 100, "A, keys to try at each dial");
static TIME_DEPENDENT: GenParam = GenParam::flag(
    "time_dependent",
    "two states and one table per step instead of one dial state per step",
);

pub(super) static PARAMS: &[&GenParam] = &[&HORIZON, &ACTIONS, &TIME_DEPENDENT];

/// A combination lock of length H with `actions` actions: at each step one
/// action (drawn from the seed) is right; a wrong one drops the learner into
/// an absorbing zero-reward state. Only the right action at the last step
/// pays 1. Stationary form: states "dial 1" … "dial H" and "jammed", each
/// dial with its own right action. Time-dependent form (`time_dependent`):
/// two states, "open" and "jammed", and a step table per step.
///
/// A common-practice hard-exploration test (no single source): a uniform
/// explorer opens it with probability A^(−H).
#[derive(Debug, Clone, PartialEq)]
pub struct Lock {
    pub horizon: usize,
    pub actions: usize,
    pub time_dependent: bool,
}

impl Default for Lock {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("lock").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> Lock {
    Lock {
        horizon: v.whole("horizon"),
        actions: v.whole("actions"),
        time_dependent: v.flag("time_dependent"),
    }
}

pub(super) fn build(v: &Values, seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate(seed)
}

impl Lock {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        HORIZON.check(self.horizon as f64)?;
        ACTIONS.check(self.actions as f64)?;
        let (h, a) = (self.horizon, self.actions);
        let (states, tables) = if self.time_dependent {
            (2, h)
        } else {
            (h + 1, 1)
        };
        Sizes {
            states: states as u128,
            actions: a as u128,
            horizon: h as u128,
            tables: tables as u128,
            per_row: 1,
        }
        .check("horizon")?;
        let mut rng = rng(seed);
        let code: Vec<usize> = (0..h).map(|_| index(&mut rng, a)).collect();
        let pay = |right: bool, last: bool| Reward::Fixed(if right && last { 1.0 } else { 0.0 });
        let (states, steps, stationary) = if self.time_dependent {
            // States: 0 = open, 1 = jammed.
            let steps = (0..h)
                .map(|step| {
                    let mut transitions = Vec::new();
                    let mut rewards = Vec::new();
                    for s in 0..2 {
                        for act in 0..a {
                            let right = s == 0 && act == code[step];
                            transitions.push(vec![(if right { 0 } else { 1 }, 1.0)]);
                            rewards.push(pay(right, step == h - 1));
                        }
                    }
                    StepParts {
                        transitions,
                        rewards,
                    }
                })
                .collect();
            (vec!["open".to_string(), "jammed".to_string()], steps, false)
        } else {
            let jam = h as u32;
            let mut transitions = Vec::new();
            let mut rewards = Vec::new();
            for s in 0..=h {
                let right_action = code.get(s).copied();
                for act in 0..a {
                    let right = right_action == Some(act);
                    let next = if right {
                        (s + 1).min(h - 1) as u32
                    } else {
                        jam
                    };
                    transitions.push(vec![(next, 1.0)]);
                    rewards.push(pay(right, s == h - 1));
                }
            }
            let mut states: Vec<String> = (1..=h).map(|i| format!("dial {i}")).collect();
            states.push("jammed".into());
            (
                states,
                vec![StepParts {
                    transitions,
                    rewards,
                }],
                true,
            )
        };
        let n = states.len();
        let layout = if stationary {
            let mut l: Vec<[f64; 2]> = (0..h).map(|i| [i as f64, 1.0]).collect();
            l.push([(h as f64 - 1.0) / 2.0, 0.0]);
            Some(l)
        } else {
            Some(vec![[0.0, 1.0], [0.0, 0.0]])
        };
        finish(
            MdpParts {
                name: format!("Combination lock H={h} A={a}"),
                notes: Some(format!(
                    "One right action per step (seed {seed}); a wrong one jams the lock for good."
                )),
                horizon: h,
                discount: None,
                states,
                actions: labels("key ", a),
                start: point_start(n, 0),
                stationary,
                steps,
                layout,
            },
            "horizon",
        )
    }
}

//! The river chain: the RiverSwim construction of Strehl & Littman (2008),
//! a published test problem kept as such (cited like Garnet and the
//! lower-bound family) and used in no demo and no default.

use super::catalog::{GenParam, Values};
use super::{ParamError, Sizes, add, bad, finish, point_start};
use crate::model::limits::MAX_HORIZON;
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static STATES: GenParam = GenParam::whole("states", 6, 2, 10_000, "S, the length of the chain");
static HORIZON: GenParam = GenParam::whole("horizon", 20, 1, MAX_HORIZON, "H, steps per episode");
static P_FORWARD: GenParam = GenParam::number(
    "p_forward",
    0.3,
    0.0,
    1.0,
    "probability that swimming moves one state upstream",
);
static P_BACK: GenParam = GenParam::number(
    "p_back",
    0.1,
    0.0,
    1.0,
    "probability that swimming is pushed one state back",
);
static SMALL_REWARD: GenParam = GenParam::number(
    "small_reward",
    0.005,
    0.0,
    1.0,
    "reward for drifting at the left bank",
);
static BIG_REWARD: GenParam = GenParam::number(
    "big_reward",
    1.0,
    0.0,
    1.0,
    "reward for swimming at the far end",
);

pub(super) static PARAMS: &[&GenParam] = &[
    &STATES,
    &HORIZON,
    &P_FORWARD,
    &P_BACK,
    &SMALL_REWARD,
    &BIG_REWARD,
];

/// The river chain, Strehl & Littman's RiverSwim (a published construction,
/// not ours), with `states` states: action 0 ("with the current")
/// moves one state left for sure; action 1 ("against the current") moves right
/// with probability `p_forward`, left with `p_back`, else stays (at the left
/// end it stays instead of moving left; at the right end it stays instead of
/// moving right). Taking action 0 in the leftmost state pays `small_reward`;
/// taking action 1 in the rightmost state pays `big_reward` (both fixed).
/// Start: the leftmost state.
///
/// # References
/// - A. L. Strehl and M. L. Littman, "An analysis of model-based Interval
///   Estimation for Markov Decision Processes", *Journal of Computer and
///   System Sciences* 74(8), 2008, 1309–1331.
///
/// The defaults (6 states, 0.3 forward, 0.1 back) are the chain as we recall
/// it from that paper, from memory and not checked against it; the rewards
/// are rescaled into [0, 1] (0.005 and 1). All are parameters.
#[derive(Debug, Clone, PartialEq)]
pub struct RiverChain {
    pub states: usize,
    pub horizon: usize,
    pub p_forward: f64,
    pub p_back: f64,
    pub small_reward: f64,
    pub big_reward: f64,
}

impl Default for RiverChain {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("river").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> RiverChain {
    RiverChain {
        states: v.whole("states"),
        horizon: v.whole("horizon"),
        p_forward: v.number("p_forward"),
        p_back: v.number("p_back"),
        small_reward: v.number("small_reward"),
        big_reward: v.number("big_reward"),
    }
}

pub(super) fn build(v: &Values, _seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate()
}

impl RiverChain {
    pub fn generate(&self) -> Result<Mdp, ParamError> {
        STATES.check(self.states as f64)?;
        HORIZON.check(self.horizon as f64)?;
        P_FORWARD.check(self.p_forward)?;
        P_BACK.check(self.p_back)?;
        if self.p_forward + self.p_back > 1.0 {
            return Err(bad("p_back", "p_forward + p_back must be at most 1"));
        }
        SMALL_REWARD.check(self.small_reward)?;
        BIG_REWARD.check(self.big_reward)?;
        let n = self.states;
        Sizes {
            states: n as u128,
            actions: 2,
            horizon: self.horizon as u128,
            tables: 1,
            per_row: 3,
        }
        .check("horizon")?;
        let mut transitions = Vec::with_capacity(2 * n);
        let mut rewards = Vec::with_capacity(2 * n);
        for s in 0..n {
            transitions.push(vec![(s.saturating_sub(1) as u32, 1.0)]);
            rewards.push(Reward::Fixed(if s == 0 { self.small_reward } else { 0.0 }));
            let mut row = Vec::new();
            add(&mut row, (s + 1).min(n - 1), self.p_forward);
            add(&mut row, s.saturating_sub(1), self.p_back);
            add(&mut row, s, 1.0 - self.p_forward - self.p_back);
            transitions.push(row);
            rewards.push(Reward::Fixed(if s == n - 1 {
                self.big_reward
            } else {
                0.0
            }));
        }
        finish(
            MdpParts {
            name: format!("River chain S={} H={}", n, self.horizon),
            notes: Some(
                "The RiverSwim chain of Strehl & Littman (JCSS 2008), a published construction: a small sure reward at the left bank, a large one upstream.".into(),
            ),
            horizon: self.horizon,
            discount: None,
            states: (0..n).map(|i| format!("bank {i}")).collect(),
            actions: vec!["drift".into(), "swim".into()],
            start: point_start(n, 0),
            stationary: true,
            steps: vec![StepParts {
                transitions,
                rewards,
            }],
            layout: Some((0..n).map(|i| [i as f64, 0.0]).collect()),
            },
            "horizon",
        )
    }
}

//! A grid with slip.

use super::catalog::{GenParam, Values};
use super::{ParamError, add, bad, finish, point_start};
use crate::model::limits::MAX_HORIZON;
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static WIDTH: GenParam = GenParam::whole("width", 4, 1, 300, "cells from west to east");
static HEIGHT: GenParam = GenParam::whole("height", 4, 1, 300, "cells from south to north");
static SLIP: GenParam = GenParam::number(
    "slip",
    0.1,
    0.0,
    1.0,
    "probability of slipping sideways (half to each side)",
);
static HORIZON: GenParam = GenParam::whole("horizon", 12, 1, MAX_HORIZON, "H, steps per episode");
static GOAL_REWARD: GenParam = GenParam::number(
    "goal_reward",
    1.0,
    0.0,
    1.0,
    "mean reward at the goal (Bernoulli when below 1)",
);

pub(super) static PARAMS: &[&GenParam] = &[&WIDTH, &HEIGHT, &SLIP, &HORIZON, &GOAL_REWARD];

/// A `width`×`height` grid; actions north, east, south, west. The intended
/// move happens with probability 1 − `slip`; each of the two perpendicular
/// moves with `slip`/2; a move into the edge stays put. The far corner
/// (width−1, height−1) is absorbing and pays 1 (Bernoulli(`goal_reward`)
/// when `goal_reward` < 1) for every action taken there; all else pays 0.
/// Start: corner (0, 0). States are numbered row by row.
///
/// A common-practice exploration test (slippery gridworlds appear throughout
/// the literature; no single source).
#[derive(Debug, Clone, PartialEq)]
pub struct Grid {
    pub width: usize,
    pub height: usize,
    pub slip: f64,
    pub horizon: usize,
    pub goal_reward: f64,
}

impl Default for Grid {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("grid").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> Grid {
    Grid {
        width: v.whole("width"),
        height: v.whole("height"),
        slip: v.number("slip"),
        horizon: v.whole("horizon"),
        goal_reward: v.number("goal_reward"),
    }
}

pub(super) fn build(v: &Values, _seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate()
}

impl Grid {
    pub fn generate(&self) -> Result<Mdp, ParamError> {
        WIDTH.check(self.width as f64)?;
        HEIGHT.check(self.height as f64)?;
        if self.width * self.height < 2 {
            return Err(bad("width", "the grid needs at least two cells"));
        }
        HORIZON.check(self.horizon as f64)?;
        SLIP.check(self.slip)?;
        GOAL_REWARD.check(self.goal_reward)?;
        let (w, hgt) = (self.width, self.height);
        let n = w * hgt;
        let goal = n - 1;
        // (dx, dy) for north, east, south, west; y grows northwards.
        const MOVES: [(i64, i64); 4] = [(0, 1), (1, 0), (0, -1), (-1, 0)];
        let target = |s: usize, m: usize| -> usize {
            let (x, y) = ((s % w) as i64, (s / w) as i64);
            let (nx, ny) = (x + MOVES[m].0, y + MOVES[m].1);
            if nx < 0 || ny < 0 || nx >= w as i64 || ny >= hgt as i64 {
                s
            } else {
                ny as usize * w + nx as usize
            }
        };
        let goal_pay = if self.goal_reward >= 1.0 {
            Reward::Fixed(1.0)
        } else {
            Reward::Bernoulli(self.goal_reward)
        };
        let mut transitions = Vec::with_capacity(4 * n);
        let mut rewards = Vec::with_capacity(4 * n);
        for s in 0..n {
            for m in 0..4 {
                if s == goal {
                    transitions.push(vec![(s as u32, 1.0)]);
                    rewards.push(goal_pay);
                    continue;
                }
                let mut row = Vec::new();
                add(&mut row, target(s, m), 1.0 - self.slip);
                add(&mut row, target(s, (m + 1) % 4), self.slip / 2.0);
                add(&mut row, target(s, (m + 3) % 4), self.slip / 2.0);
                transitions.push(row);
                rewards.push(Reward::Fixed(0.0));
            }
        }
        Ok(finish(MdpParts {
            name: format!("Slippery grid {}×{} H={}", w, hgt, self.horizon),
            notes: Some(format!(
                "Grid with slip {}; the far corner pays for every step spent there.",
                self.slip
            )),
            horizon: self.horizon,
            discount: None,
            states: (0..n).map(|s| format!("({},{})", s % w, s / w)).collect(),
            actions: vec!["north".into(), "east".into(), "south".into(), "west".into()],
            start: point_start(n, 0),
            stationary: true,
            steps: vec![StepParts {
                transitions,
                rewards,
            }],
            layout: Some((0..n).map(|s| [(s % w) as f64, (s / w) as f64]).collect()),
        }))
    }
}

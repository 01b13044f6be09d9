//! The drift grid: a rectangle of cells with slip and one paying goal cell.

use super::catalog::{GenParam, Values};
use super::{ParamError, Sizes, add, bad, finish, need_range, point_start};
use crate::model::limits::MAX_HORIZON;
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static WIDTH: GenParam = GenParam::whole("width", 5, 1, 300, "cells from west to east");
static HEIGHT: GenParam = GenParam::whole("height", 3, 1, 300, "cells from south to north");
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

static GOAL_COLUMN: GenParam = GenParam::optional_whole(
    "goal_column",
    0,
    299,
    "column of the goal, 0-based from the west (default: one in from the east edge)",
);
static GOAL_ROW: GenParam = GenParam::optional_whole(
    "goal_row",
    0,
    299,
    "row of the goal, 0-based from the south (default: the northern row)",
);

pub(super) static PARAMS: &[&GenParam] = &[
    &WIDTH,
    &HEIGHT,
    &SLIP,
    &HORIZON,
    &GOAL_REWARD,
    &GOAL_COLUMN,
    &GOAL_ROW,
];

/// A `width`×`height` grid whose moves drift: actions north, east, south,
/// west; the intended move happens with probability 1 − `slip`, each of the
/// two perpendicular moves with `slip`/2; a move into the edge stays put.
/// The goal cell (`goal_column`, `goal_row`; by default one in from the east
/// edge on the northern row, so not a corner once the grid is 3 or more
/// wide) is absorbing and pays 1 (Bernoulli(`goal_reward`) when
/// `goal_reward` < 1) for every action taken there; all else pays 0. Start:
/// cell (0, 0), which the goal may not be. States are numbered row by row.
///
/// A common-practice exploration test (slippery gridworlds appear throughout
/// the literature; no single source).
#[derive(Debug, Clone, PartialEq)]
pub struct DriftGrid {
    pub width: usize,
    pub height: usize,
    pub slip: f64,
    pub horizon: usize,
    pub goal_reward: f64,
    /// The goal's column (None: width − 2, or 0 in a grid one cell wide).
    pub goal_column: Option<usize>,
    /// The goal's row (None: height − 1).
    pub goal_row: Option<usize>,
}

impl Default for DriftGrid {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("drift-grid").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> DriftGrid {
    DriftGrid {
        width: v.whole("width"),
        height: v.whole("height"),
        slip: v.number("slip"),
        horizon: v.whole("horizon"),
        goal_reward: v.number("goal_reward"),
        goal_column: v.optional_whole("goal_column"),
        goal_row: v.optional_whole("goal_row"),
    }
}

pub(super) fn build(v: &Values, _seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate()
}

impl DriftGrid {
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
        Sizes {
            states: n as u128,
            actions: 4,
            horizon: self.horizon as u128,
            tables: 1,
            per_row: 3,
        }
        .check("horizon")?;
        let gx = self.goal_column.unwrap_or(w.saturating_sub(2));
        let gy = self.goal_row.unwrap_or(hgt - 1);
        need_range("goal_column", gx, 0, w - 1)?;
        need_range("goal_row", gy, 0, hgt - 1)?;
        let goal = gy * w + gx;
        if goal == 0 {
            return Err(bad(
                "goal_column",
                "the goal cannot be the start cell (0,0); give another goal_column or goal_row",
            ));
        }
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
        finish(
            MdpParts {
                name: format!("Drift grid {}×{} H={}", w, hgt, self.horizon),
                notes: Some(format!(
                    "Moves drift sideways with probability {}; the goal cell ({gx},{gy}) pays for every step spent there.",
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
            },
            "horizon",
        )
    }
}

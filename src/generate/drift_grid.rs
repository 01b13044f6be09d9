//! The drift grid: a board of cells with slip, a start inside it and one paying goal cell.

use super::catalog::{GenParam, Values};
use super::{ParamError, Sizes, add, bad, finish, need_range, point_start};
use crate::model::limits::MAX_HORIZON;
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static WIDTH: GenParam = GenParam::whole("width", 7, 1, 300, "columns, c0 … c(width−1)");
static HEIGHT: GenParam = GenParam::whole("height", 4, 1, 300, "rows, r0 … r(height−1)");
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
    "column of the goal, 0-based (default: the start's column mirrored through the board's centre)",
);
static GOAL_ROW: GenParam = GenParam::optional_whole(
    "goal_row",
    0,
    299,
    "row of the goal, 0-based (default: the start's row mirrored through the board's centre)",
);
static START_COLUMN: GenParam = GenParam::optional_whole(
    "start_column",
    0,
    299,
    "column of the start cell, 0-based (default: a quarter of the way in, ⌊width/4⌋)",
);
static START_ROW: GenParam = GenParam::optional_whole(
    "start_row",
    0,
    299,
    "row of the start cell, 0-based (default: half-way, ⌊height/2⌋)",
);

pub(super) static PARAMS: &[&GenParam] = &[
    &WIDTH,
    &HEIGHT,
    &SLIP,
    &HORIZON,
    &GOAL_REWARD,
    &START_COLUMN,
    &START_ROW,
    &GOAL_COLUMN,
    &GOAL_ROW,
];

/// A `width`×`height` board of cells labelled `c{column}r{row}` (0-based)
/// whose moves drift: actions `c+1`, `r+1`, `c-1`, `r-1` (one column or row
/// up or down); the intended move happens with probability 1 − `slip`, each
/// of the two perpendicular moves with `slip`/2; a move off the board stays
/// put. The start cell is (`start_column`, `start_row`), by default
/// (⌊width/4⌋, ⌊height/2⌋); the goal cell is (`goal_column`, `goal_row`), by
/// default the start mirrored through the board's centre, (width − 1 − start
/// column, height − 1 − start row), or the last cell (width − 1, height − 1)
/// when that mirror is the start itself. With the default 7×4 board the start
/// is c1r2 and the goal c5r1, neither on an edge. The goal is absorbing and
/// pays 1 (Bernoulli(`goal_reward`) when `goal_reward` < 1) for every action
/// taken there; all else pays 0. The goal may not be the start. States are
/// numbered row by row (state = row · width + column).
///
/// A common-practice exploration test (boards with slip appear throughout
/// the literature; no single source). The defaults are our own.
#[derive(Debug, Clone, PartialEq)]
pub struct DriftGrid {
    pub width: usize,
    pub height: usize,
    pub slip: f64,
    pub horizon: usize,
    pub goal_reward: f64,
    /// The goal's column (None: the start's mirrored, see above).
    pub goal_column: Option<usize>,
    /// The goal's row (None: the start's mirrored, see above).
    pub goal_row: Option<usize>,
    /// The start's column (None: ⌊width/4⌋).
    pub start_column: Option<usize>,
    /// The start's row (None: ⌊height/2⌋).
    pub start_row: Option<usize>,
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
        start_column: v.optional_whole("start_column"),
        start_row: v.optional_whole("start_row"),
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
        let sx = self.start_column.unwrap_or(w / 4);
        let sy = self.start_row.unwrap_or(hgt / 2);
        need_range("start_column", sx, 0, w - 1)?;
        need_range("start_row", sy, 0, hgt - 1)?;
        let (mut gx, mut gy) = (w - 1 - sx, hgt - 1 - sy);
        if (gx, gy) == (sx, sy) {
            (gx, gy) = (w - 1, hgt - 1);
        }
        let gx = self.goal_column.unwrap_or(gx);
        let gy = self.goal_row.unwrap_or(gy);
        need_range("goal_column", gx, 0, w - 1)?;
        need_range("goal_row", gy, 0, hgt - 1)?;
        let (start, goal) = (sy * w + sx, gy * w + gx);
        if goal == start {
            return Err(bad(
                "goal_column",
                format!(
                    "the goal cannot be the start cell c{sx}r{sy}; give another goal_column or goal_row"
                ),
            ));
        }
        // (dx, dy) for c+1, r+1, c-1, r-1: a quarter turn apart, so the two
        // neighbours of a move in this list are its perpendicular ones.
        const MOVES: [(i64, i64); 4] = [(1, 0), (0, 1), (-1, 0), (0, -1)];
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
                    "Moves drift sideways with probability {}; from c{sx}r{sy}, the goal cell c{gx}r{gy} pays for every step spent there.",
                    self.slip
                )),
                horizon: self.horizon,
                discount: None,
                states: (0..n).map(|s| format!("c{}r{}", s % w, s / w)).collect(),
                actions: vec!["c+1".into(), "r+1".into(), "c-1".into(), "r-1".into()],
                start: point_start(n, start),
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

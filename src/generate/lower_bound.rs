//! The hard instances of the minimax lower bound.

use super::catalog::{GenParam, Values};
use super::{ParamError, Sizes, bad, finish, index, labels, need_range, point_start, rng};
use crate::model::limits::MAX_HORIZON;
use crate::model::{Mdp, MdpParts, Reward, StepParts};

static ACTIONS: GenParam = GenParam::whole("actions", 2, 2, 50, "A, children of each tree node");
static DEPTH: GenParam = GenParam::whole(
    "depth",
    2,
    1,
    12,
    "depth of the action tree (actions^depth leaves)",
);
static HORIZON: GenParam = GenParam::whole(
    "horizon",
    10,
    1,
    MAX_HORIZON,
    "H, steps per episode (at least wait_until + depth + 3)",
);
static WAIT_UNTIL: GenParam = GenParam::whole(
    "wait_until",
    3,
    0,
    5_000,
    "last step (0-based) at which the waiting state may still wait",
);
static EPSILON: GenParam = GenParam::number(
    "epsilon",
    0.2,
    0.0,
    0.5,
    "extra probability of the good state at the perturbed triple",
)
.open_below();
static SPECIAL_STEP: GenParam = GenParam::optional_whole(
    "special_step",
    0,
    MAX_HORIZON,
    "perturbed step, 1-based (default: drawn from the seed)",
);
static SPECIAL_LEAF: GenParam = GenParam::optional_whole(
    "special_leaf",
    0,
    50_000,
    "perturbed leaf, 0-based (default: drawn from the seed)",
);
static SPECIAL_ACTION: GenParam = GenParam::optional_whole(
    "special_action",
    0,
    50,
    "perturbed action, 0-based (default: drawn from the seed)",
);

pub(super) static PARAMS: &[&GenParam] = &[
    &ACTIONS,
    &DEPTH,
    &HORIZON,
    &WAIT_UNTIL,
    &EPSILON,
    &SPECIAL_STEP,
    &SPECIAL_LEAF,
    &SPECIAL_ACTION,
];

/// The hard-instance family behind the minimax lower bound of Domingues,
/// Ménard, Kaufmann and Valko: a waiting state, the root of a full A-ary tree
/// of depth `depth` (A^depth leaves), a good and a bad absorbing state.
///
/// Steps are 0-based here. In the waiting state action 0 waits (until step
/// `wait_until`; from then on every action leaves) and every other action
/// moves to the root. In the tree, action i moves to child i. From a leaf,
/// every action moves to the good state with probability ½ and to the bad
/// state otherwise, except the one perturbed (step `special_step`, leaf
/// `special_leaf`, action `special_action`), which reaches the good state
/// with probability ½ + `epsilon`. Leaves are reached at steps
/// `depth`+1 ..= `wait_until`+`depth`+1, so the good state is reached at
/// step `wait_until`+`depth`+2 at the latest; it pays 1 from that step on
/// (every path collects the same number of rewarded steps); nothing else pays. The perturbed triple is drawn from
/// the seed unless given.
///
/// # References
/// - O. D. Domingues, P. Ménard, E. Kaufmann and M. Valko, "Episodic
///   Reinforcement Learning in Finite MDPs: Minimax Lower Bounds Revisited",
///   ALT 2021, PMLR 132, arXiv:2010.03531.
///
/// Built from our reading of the construction, from memory; the step offsets
/// are ours and not checked against the paper.
#[derive(Debug, Clone, PartialEq)]
pub struct LowerBound {
    pub actions: usize,
    pub depth: usize,
    pub horizon: usize,
    pub wait_until: usize,
    pub epsilon: f64,
    pub special_step: Option<usize>,
    pub special_leaf: Option<usize>,
    pub special_action: Option<usize>,
}

impl Default for LowerBound {
    fn default() -> Self {
        build_from(&Values::defaults(
            super::catalog::info("lower-bound").expect("listed"),
        ))
    }
}

fn build_from(v: &Values) -> LowerBound {
    LowerBound {
        actions: v.whole("actions"),
        depth: v.whole("depth"),
        horizon: v.whole("horizon"),
        wait_until: v.whole("wait_until"),
        epsilon: v.number("epsilon"),
        special_step: v.optional_whole("special_step"),
        special_leaf: v.optional_whole("special_leaf"),
        special_action: v.optional_whole("special_action"),
    }
}

pub(super) fn build(v: &Values, seed: u64) -> Result<Mdp, ParamError> {
    build_from(v).generate(seed)
}

impl LowerBound {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        ACTIONS.check(self.actions as f64)?;
        DEPTH.check(self.depth as f64)?;
        let a = self.actions;
        let leaves = a
            .checked_pow(self.depth as u32)
            .filter(|&l| l <= 50_000)
            .ok_or_else(|| bad("depth", "actions^depth leaves is over 50000"))?;
        WAIT_UNTIL.check(self.wait_until as f64)?;
        let first_leaf_step = self.depth + 1; // earliest step at which a leaf is reached
        let last_leaf_step = self.wait_until + self.depth + 1; // latest (forced)
        need_range(
            "horizon",
            self.horizon,
            last_leaf_step + 2,
            crate::model::limits::MAX_HORIZON,
        )?;
        EPSILON.check(self.epsilon)?;
        let mut rng = rng(seed);
        let span = last_leaf_step - first_leaf_step + 1;
        let h_star = match self.special_step {
            Some(h) => {
                need_range("special_step", h, first_leaf_step + 1, last_leaf_step + 1)?;
                h - 1
            }
            None => first_leaf_step + index(&mut rng, span),
        };
        let l_star = match self.special_leaf {
            Some(l) => {
                need_range("special_leaf", l, 0, leaves - 1)?;
                l
            }
            None => index(&mut rng, leaves),
        };
        let a_star = match self.special_action {
            Some(x) => {
                need_range("special_action", x, 0, a - 1)?;
                x
            }
            None => index(&mut rng, a),
        };
        // Numbering: 0 wait, 1.. tree nodes (root 1, breadth first), then good, bad.
        let tree_nodes = (a.pow(self.depth as u32 + 1) - 1) / (a - 1);
        let first_leaf = 1 + tree_nodes - leaves;
        let good = 1 + tree_nodes;
        let bad_s = good + 1;
        let n = bad_s + 1;
        let h = self.horizon;
        Sizes {
            states: n as u128,
            actions: a as u128,
            horizon: h as u128,
            tables: h as u128,
            per_row: 2,
        }
        .check("horizon")?;
        // The latest arrival in the good state is at step last_leaf_step + 1.
        let reward_from = last_leaf_step + 1;
        let steps = (0..h)
            .map(|step| {
                let mut transitions = Vec::with_capacity(n * a);
                let mut rewards = Vec::with_capacity(n * a);
                for s in 0..n {
                    for act in 0..a {
                        let row: Vec<(u32, f64)> = if s == 0 {
                            if act == 0 && step < self.wait_until {
                                vec![(0, 1.0)]
                            } else {
                                vec![(1, 1.0)]
                            }
                        } else if s < first_leaf {
                            // Node k (0-based in the tree) has children a·k+1+i.
                            let k = s - 1;
                            vec![((1 + a * k + 1 + act) as u32, 1.0)]
                        } else if s < good {
                            let leaf = s - first_leaf;
                            let p = 0.5
                                + if (step, leaf, act) == (h_star, l_star, a_star) {
                                    self.epsilon
                                } else {
                                    0.0
                                };
                            vec![(good as u32, p), (bad_s as u32, 1.0 - p)]
                        } else {
                            vec![(s as u32, 1.0)]
                        };
                        transitions.push(row);
                        let pay = s == good && step >= reward_from;
                        rewards.push(Reward::Fixed(if pay { 1.0 } else { 0.0 }));
                    }
                }
                StepParts {
                    transitions,
                    rewards,
                }
            })
            .collect();
        let mut states = vec!["wait".to_string(), "root".to_string()];
        for node in 1..tree_nodes {
            states.push(if node + 1 >= first_leaf {
                format!("leaf {}", node + 1 - first_leaf)
            } else {
                format!("node {node}")
            });
        }
        states.push("good".into());
        states.push("bad".into());
        finish(
            MdpParts {
                name: format!("Lower-bound instance A={a} depth={} H={h}", self.depth),
                notes: Some(format!(
                    "Hard instance after Domingues et al. (ALT 2021); perturbed step {} leaf {l_star} action {a_star}, ε = {}.",
                    h_star + 1,
                    self.epsilon
                )),
                horizon: h,
                discount: None,
                states,
                actions: labels("a", a),
                start: point_start(n, 0),
                stationary: false,
                steps,
                layout: None,
            },
            "horizon",
        )
    }
}

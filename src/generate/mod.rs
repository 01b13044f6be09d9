//! Seeded model generators. Each takes its parameters and a seed, checks the
//! parameters (a [`ParamError`] names the offending one), and returns a valid
//! [`Mdp`] built through [`Mdp::from_parts`].
//!
//! **Invariant:** every draw comes from a `ChaCha8Rng` seeded with the given
//! seed, drawing only `u32`, `u64` and `f64` values, so a seed gives the same
//! model on every platform (native and wasm32 alike).

pub mod spec;

pub use spec::{GeneratorSpec, KINDS};

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

use crate::model::{Mdp, MdpParts, Reward, StepParts};

/// A generator parameter out of its range.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ParamError {
    /// The parameter's name (as the CLI option and the page's field call it).
    pub param: &'static str,
    pub message: String,
}

impl std::fmt::Display for ParamError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.param, self.message)
    }
}

impl std::error::Error for ParamError {}

fn bad(param: &'static str, message: impl Into<String>) -> ParamError {
    ParamError {
        param,
        message: message.into(),
    }
}

fn need_range(param: &'static str, v: usize, lo: usize, hi: usize) -> Result<(), ParamError> {
    if v < lo || v > hi {
        Err(bad(param, format!("{v} is outside {lo}..={hi}")))
    } else {
        Ok(())
    }
}

fn need_prob(param: &'static str, p: f64) -> Result<(), ParamError> {
    if (0.0..=1.0).contains(&p) {
        Ok(())
    } else {
        Err(bad(param, format!("{p} is not a probability in [0, 1]")))
    }
}

fn finish(parts: MdpParts) -> Mdp {
    Mdp::from_parts(parts).expect("generators build valid models")
}

fn rng(seed: u64) -> ChaCha8Rng {
    ChaCha8Rng::seed_from_u64(seed)
}

/// A uniform index in 0..n drawn as a u32 (portable across pointer widths).
fn index(rng: &mut ChaCha8Rng, n: usize) -> usize {
    rng.random_range(0..n as u32) as usize
}

fn labels(prefix: &str, n: usize) -> Vec<String> {
    (0..n).map(|i| format!("{prefix}{i}")).collect()
}

fn point_start(s: usize, at: usize) -> Vec<f64> {
    let mut v = vec![0.0; s];
    v[at] = 1.0;
    v
}

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
        Garnet {
            states: 10,
            actions: 3,
            successors: 3,
            horizon: 10,
            time_dependent: false,
            bernoulli: true,
        }
    }
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
        use crate::model::limits::*;
        need_range("states", self.states, 1, MAX_STATES)?;
        need_range("actions", self.actions, 1, MAX_ACTIONS)?;
        need_range("horizon", self.horizon, 1, MAX_HORIZON)?;
        need_range("successors", self.successors, 1, self.states)?;
        let tables = if self.time_dependent { self.horizon } else { 1 };
        let cells = self.states * self.actions;
        let (s, a, h, b) = (self.states, self.actions, self.horizon, self.successors);
        if cells as u128 * h as u128 > MAX_CELLS as u128 {
            return Err(bad(
                "states",
                format!(
                    "S·A·H = {s}·{a}·{h} = {} is over the limit of {MAX_CELLS} (step, state, action) cells",
                    cells as u128 * h as u128
                ),
            ));
        }
        if cells as u128 * tables as u128 * b as u128 > MAX_ENTRIES as u128 {
            return Err(bad(
                "successors",
                format!(
                    "{} transition entries is over the limit of {MAX_ENTRIES}",
                    cells as u128 * tables as u128 * b as u128
                ),
            ));
        }
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
        Ok(finish(MdpParts {
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
        }))
    }
}

/// A river-swim-style chain of `states` states: action 0 ("with the current")
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
pub struct RiverSwim {
    pub states: usize,
    pub horizon: usize,
    pub p_forward: f64,
    pub p_back: f64,
    pub small_reward: f64,
    pub big_reward: f64,
}

impl Default for RiverSwim {
    fn default() -> Self {
        RiverSwim {
            states: 6,
            horizon: 20,
            p_forward: 0.3,
            p_back: 0.1,
            small_reward: 0.005,
            big_reward: 1.0,
        }
    }
}

/// Adds `p` to the entry for `to`, keeping each next state once. Sums are
/// rounded to 15 significant digits so that 0.9 + 0.05 is written as 0.95.
fn add(row: &mut Vec<(u32, f64)>, to: usize, p: f64) {
    if p <= 0.0 {
        return;
    }
    let tidy = |x: f64| format!("{x:.14e}").parse::<f64>().unwrap_or(x);
    match row.iter_mut().find(|e| e.0 == to as u32) {
        Some(e) => e.1 = tidy(e.1 + p),
        None => row.push((to as u32, tidy(p))),
    }
}

impl RiverSwim {
    pub fn generate(&self) -> Result<Mdp, ParamError> {
        need_range("states", self.states, 2, 10_000)?;
        need_range(
            "horizon",
            self.horizon,
            1,
            crate::model::limits::MAX_HORIZON,
        )?;
        need_prob("p_forward", self.p_forward)?;
        need_prob("p_back", self.p_back)?;
        if self.p_forward + self.p_back > 1.0 {
            return Err(bad("p_back", "p_forward + p_back must be at most 1"));
        }
        need_prob("small_reward", self.small_reward)?;
        need_prob("big_reward", self.big_reward)?;
        let n = self.states;
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
        Ok(finish(MdpParts {
            name: format!("River chain S={} H={}", n, self.horizon),
            notes: Some(
                "River-swim-style chain (after Strehl & Littman 2008): a small sure reward at the left bank, a large one upstream.".into(),
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
        }))
    }
}

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
        Grid {
            width: 4,
            height: 4,
            slip: 0.1,
            horizon: 12,
            goal_reward: 1.0,
        }
    }
}

impl Grid {
    pub fn generate(&self) -> Result<Mdp, ParamError> {
        need_range("width", self.width, 1, 300)?;
        need_range("height", self.height, 1, 300)?;
        if self.width * self.height < 2 {
            return Err(bad("width", "the grid needs at least two cells"));
        }
        need_range(
            "horizon",
            self.horizon,
            1,
            crate::model::limits::MAX_HORIZON,
        )?;
        need_prob("slip", self.slip)?;
        need_prob("goal_reward", self.goal_reward)?;
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
        Lock {
            horizon: 6,
            actions: 2,
            time_dependent: false,
        }
    }
}

impl Lock {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        need_range("horizon", self.horizon, 1, 2_000)?;
        need_range("actions", self.actions, 2, 100)?;
        let (h, a) = (self.horizon, self.actions);
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
        Ok(finish(MdpParts {
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
        }))
    }
}

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
        LowerBound {
            actions: 2,
            depth: 2,
            horizon: 10,
            wait_until: 3,
            epsilon: 0.2,
            special_step: None,
            special_leaf: None,
            special_action: None,
        }
    }
}

impl LowerBound {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        need_range("actions", self.actions, 2, 50)?;
        need_range("depth", self.depth, 1, 12)?;
        let a = self.actions;
        let leaves = a
            .checked_pow(self.depth as u32)
            .filter(|&l| l <= 50_000)
            .ok_or_else(|| bad("depth", "actions^depth leaves is over 50000"))?;
        need_range("wait_until", self.wait_until, 0, 5_000)?;
        let first_leaf_step = self.depth + 1; // earliest step at which a leaf is reached
        let last_leaf_step = self.wait_until + self.depth + 1; // latest (forced)
        need_range(
            "horizon",
            self.horizon,
            last_leaf_step + 2,
            crate::model::limits::MAX_HORIZON,
        )?;
        if !(self.epsilon > 0.0 && self.epsilon <= 0.5) {
            return Err(bad(
                "epsilon",
                format!("{} is outside (0, 0.5]", self.epsilon),
            ));
        }
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
        Ok(finish(MdpParts {
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
        }))
    }
}

/// A Bernoulli multi-armed bandit as an MDP with S = 1 and H = 1: arm i pays
/// 1 with probability `means[i]`; with no means given, `arms` means are drawn
/// uniformly on [0, 1] from the seed.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct Bandit {
    pub arms: usize,
    pub means: Vec<f64>,
}

impl Bandit {
    pub fn generate(&self, seed: u64) -> Result<Mdp, ParamError> {
        let means = if self.means.is_empty() {
            need_range("arms", self.arms, 1, crate::model::limits::MAX_ACTIONS)?;
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
                need_prob("means", m)?;
            }
            self.means.clone()
        };
        let k = means.len();
        Ok(finish(MdpParts {
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
        }))
    }
}

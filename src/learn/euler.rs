//! EULER: optimistic and pessimistic value iteration on the empirical model
//! with empirical-Bernstein bonuses, replanned before every episode; the
//! upper values drive the policy, the lower values (along that policy) keep
//! the transition bonus honest where the variance of the upper values
//! stands in for the unknown variance of V*.
//!
//! The paper's full text was NOT reached (docs/papers/euler.md says what was
//! read: the abstract and the opening of the introduction). Everything below
//! is implemented from the reading notes and /work/shared/TABLE1.md. Marks
//! as in `src/theory.rs` and `docs/papers/`: **[V]** read in the paper,
//! **[V2]** read only in a secondary source (named), **[R]** recalled or
//! inferred, not verified. What the abstract establishes [V]: upper and lower
//! value-function bounds, no prior knowledge of the environment, a regret
//! driven by the variance of the next-state value function; all the rules
//! and constants below are [R].
//!
//! In episode k, for h = H, …, 1 (0-indexed in the code) and every (s, a) of
//! step h, with n = n_k(h,s,a) ≥ 1 the visits in episodes 1 … k − 1, r̂ and
//! P̂ the empirical mean reward and next-state distribution of those visits,
//! c = `bonus_scale` (1 = the published constants):
//!
//! ```text
//! L    = ln(4·S·A·H·T/δ),  T = K·H                                       [R; ·H ours, below]
//! B_v  = √(2L),  B_p = H·√(2L),  J = H·L/3                               [R]
//! b_r  = √(2·V̂ar_R·L/n) + 7L/(3(n−1))        if n ≥ 2                    [R, Maurer–Pontil form]
//!      = 1                                    if n = 1                    [ours, below]
//! b_p  = √(2·Var_P̂(V̄_{h+1})·L/n) + B_v·‖V̄_{h+1} − V̲_{h+1}‖_{2,P̂}/√n + (4J + B_p)/n   [R]
//! Q̄_h(s,a) = min( H − h + 1,  r̂ + P̂·V̄_{h+1} + c·(b_r + b_p) )          [R; clip ours, below]
//! Q̲_h(s,a) = max( 0,          r̂ + P̂·V̲_{h+1} − c·(b_r + b_p) )          [R]
//! n = 0:  Q̄_h(s,a) = H − h + 1,  Q̲_h(s,a) = 0                            [R]
//! π_h(s) = argmax_a Q̄_h(s,a)   (ties uniformly at random)                [tie-break ours]
//! V̄_h(s) = Q̄_h(s, π_h(s)),  V̲_h(s) = Q̲_h(s, π_h(s)),  V̄_{H+1} = V̲_{H+1} = 0   [R]
//! ```
//!
//! with V̂ar_R the sample variance of the n observed rewards (divisor n − 1),
//! Var_P̂(V) = Σ P̂(y)V(y)² − (Σ P̂(y)V(y))² and ‖V‖_{2,P̂} = √(Σ P̂(y)V(y)²);
//! h counts steps from 1 here (so H − h + 1 steps remain). The lower value
//! follows the greedy policy of the upper one [R]: V̲ is a pessimistic
//! evaluation of the policy about to be played, not a max over actions of
//! Q̲. The analysis claims, with probability 1 − δ, V̲_h ≤ V^{π_k}_h ≤ V*_h ≤
//! V̄_h for all k, h, s [R] (tests/learner_euler.rs measures both sides).
//!
//! The choices, each marked:
//! - **Per-step statistics and L [ours, derived].** The paper is stationary
//!   [R]; like every learner here this one counts per (h, s, a), which is
//!   the stationary algorithm on the layered MDP of the S·H pairs (step,
//!   state). Its union bound then runs over S·A·H tuples instead of S·A
//!   pairs, so the paper's L = ln(4·S·A·T/δ) [R] becomes ln(4·(S·H)·A·T/δ):
//!   S → S·H, the rule `src/theory.rs` applies to the bound.
//! - **The reward bonus at n = 1 [ours].** 7L/(3(n − 1)) and the sample
//!   variance are undefined at n = 1; we fall back to b_r = 1, the range of
//!   a reward (a one-sample confidence interval for a mean in [0, 1] can say
//!   no more). The variance's divisor n − 1 is Maurer & Pontil's sample
//!   variance, the form whose bound has the 7L/(3(n − 1)) term [R].
//! - **The upper clip H − h + 1 [ours].** Per-step rewards are in [0, 1], so
//!   no value from step h on exceeds the H − h + 1 remaining steps; the notes
//!   leave H or H − h + 1 open [R]. The unvisited Q̄ is the same clip.
//! - **The constants keep H [R].** B_p and J carry the value range H of the
//!   paper, not the remaining H − h + 1.
//! - **Tie-breaking [ours]:** uniformly at random with the run's generator
//!   (`argmax_random`, one draw per tied state), as every planning learner
//!   here; the lower value reads the action actually drawn.
//! - **Rewards** are estimated from the data (empirical mean and variance),
//!   as the transitions are.
//! - `bonus_scale` c multiplies b_r + b_p in both Q̄ and Q̲ (ours; 1 = the
//!   published constants): it leaves the unvisited values and the clips.
//! - No certificate is exposed: the gap V̄₁ − V̲₁ bounds the coming policy's
//!   suboptimality on the same event, but EULER states no certificate
//!   theorem [R], so [`Learner::certificate`] stays `None`.
//!
//! Every row is recomputed every episode (Q̄ and Q̲ read V̄ and V̲ at the
//! successors, so the stale-row shortcut of `Plan::replan_stale` would have
//! to follow both): O(H·S·A + observed successors) per plan, and O(S·A·H)
//! memory beyond the sparse counts.
//!
//! # References
//! - A. Zanette and E. Brunskill, "Tighter Problem-Dependent Regret Bounds in
//!   Reinforcement Learning without Domain Knowledge using Value Function
//!   Bounds", ICML 2019, PMLR 97:7304–7312, arXiv:1901.00210 (abstract [V];
//!   the algorithm box, its bonuses and constants, from the appendix as
//!   recalled [R]; the algorithm's and theorem's numbers not read).
//! - A. Maurer and M. Pontil, "Empirical Bernstein Bounds and Sample
//!   Variance Penalization", COLT 2009, arXiv:0907.3740 (the empirical
//!   Bernstein inequality √(2·V_n·ln(2/δ)/n) + 7·ln(2/δ)/(3(n − 1)), Theorem 4
//!   as recalled [R]).
//! - Z. Zhang, Y. Chen, J. D. Lee and S. S. Du, arXiv:2307.13586, Table 1
//!   (EULER's row [V2]).

use super::two_sided::TwoSided;
use super::{LearnRng, Learner, PolicyView, RowCounts, Setting};

pub struct Euler {
    set: Setting,
    scale: f64,
    l: f64,
    counts: Vec<RowCounts>,
    /// Q̄, Q̲, V̄, V̲ and the greedy policy as last planned (every value 0
    /// before the first plan).
    plan: TwoSided,
}

/// L = ln(4·S·A·H·T/δ), T = K·H: the paper's ln(4·S·A·T/δ) [R] with S → S·H
/// (a union over the S·A·H tuples of per-step statistics).
pub fn log_factor(set: &Setting) -> f64 {
    let (s, a, h) = (set.states as f64, set.actions as f64, set.horizon as f64);
    libm::log(4.0 * s * a * h * set.steps() / set.delta)
}

/// The reward bonus b_r of a row with `c` visits (c.n ≥ 1), unscaled:
/// √(2·V̂ar_R·L/n) + 7L/(3(n − 1)) with the sample variance (divisor n − 1),
/// and 1 (the reward range) at n = 1.
fn reward_bonus(c: &RowCounts, l: f64) -> f64 {
    if c.n < 2 {
        return 1.0;
    }
    let n = c.n as f64;
    let mean = c.r_sum / n;
    let var = ((c.r2_sum - n * mean * mean) / (n - 1.0)).max(0.0);
    (2.0 * var * l / n).sqrt() + 7.0 * l / (3.0 * (n - 1.0))
}

impl Euler {
    pub fn new(set: Setting, bonus_scale: f64) -> Euler {
        Euler {
            set,
            scale: bonus_scale,
            l: log_factor(&set),
            counts: vec![RowCounts::default(); set.rows()],
            plan: TwoSided::new(set, false),
        }
    }

    /// V̄_h(s) as last planned (0 at h = H and before the first plan).
    pub fn upper_value(&self, h: usize, s: usize) -> f64 {
        self.plan.upper_value(h, s)
    }

    /// V̲_h(s) as last planned (0 at h = H and before the first plan).
    pub fn lower_value(&self, h: usize, s: usize) -> f64 {
        self.plan.lower_value(h, s)
    }

    /// Q̄_h(s,a) as last planned.
    pub fn upper_q(&self, h: usize, s: usize, a: usize) -> f64 {
        self.plan.upper_q(h, s, a)
    }

    /// Q̲_h(s,a) as last planned.
    pub fn lower_q(&self, h: usize, s: usize, a: usize) -> f64 {
        self.plan.lower_q(h, s, a)
    }
}

/// Q̄ and Q̲ of a row of step h with counts `c`, from V̄_{h+1} (`up`) and
/// V̲_{h+1} (`low`); L is [`log_factor`], `scale` the bonus scale.
fn row_values(
    set: &Setting,
    h: usize,
    c: &RowCounts,
    l: f64,
    scale: f64,
    up: &[f64],
    low: &[f64],
) -> (f64, f64) {
    let hh = set.horizon as f64;
    let clip = (set.horizon - h) as f64;
    if c.n == 0 {
        return (clip, 0.0);
    }
    let (mut m_up, mut m2_up, mut m_low, mut gap2) = (0.0, 0.0, 0.0, 0.0);
    for &(y, k) in &c.next {
        let (u, w, k) = (up[y as usize], low[y as usize], k as f64);
        m_up += k * u;
        m2_up += k * u * u;
        m_low += k * w;
        gap2 += k * (u - w) * (u - w);
    }
    let n = c.n as f64;
    let (pv_up, pv_low) = (m_up / n, m_low / n);
    let var = (m2_up / n - pv_up * pv_up).max(0.0);
    let gap = (gap2 / n).sqrt();
    // B_v = √(2L), B_p = H·√(2L), J = H·L/3.
    let b_v = (2.0 * l).sqrt();
    let (b_p, j) = (hh * b_v, hh * l / 3.0);
    let transition = (2.0 * var * l / n).sqrt() + b_v * gap / n.sqrt() + (4.0 * j + b_p) / n;
    let bonus = scale * (reward_bonus(c, l) + transition);
    let r = c.mean_reward();
    ((r + pv_up + bonus).min(clip), (r + pv_low - bonus).max(0.0))
}

impl Learner for Euler {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        let (set, l, scale, counts) = (self.set, self.l, self.scale, &self.counts);
        self.plan.replan(rng, |h, s, a, up, low| {
            row_values(&set, h, &counts[set.row(h, s, a)], l, scale, up, low)
        });
    }

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Greedy(self.plan.policy())
    }

    fn policy_version(&self) -> u64 {
        self.plan.version()
    }

    fn act(&mut self, h: usize, s: usize, _rng: &mut LearnRng) -> usize {
        self.plan.action(h, s)
    }

    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, _rng: &mut LearnRng) {
        self.counts[self.set.row(h, s, a)].add(r, next);
    }

    fn model_updates(&self) -> u64 {
        self.plan.updates()
    }
}

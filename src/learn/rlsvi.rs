//! RLSVI, tabular: randomised least-squares value iteration with Gaussian
//! perturbations. Before each episode it solves, by backward induction, a
//! randomly perturbed regression of its data, and follows the greedy policy
//! of the perturbed values; the noise, not a bonus, drives exploration.
//!
//! Neither paper's full text was reached (docs/papers/rlsvi.md says what was
//! read). Marks as in `src/theory.rs` and `docs/papers/`: **[V2]** read only
//! in a secondary source (the sciencestack.ai summary of arXiv:1906.02870),
//! **[R]** recalled or inferred, not verified against the paper.
//!
//! In episode k = 1, 2, …, for h = H, …, 1 and every (s, a) of step h, with
//! n = n_k(h,s,a) the visits in episodes 1 … k − 1, Σr their rewards and
//! n(s′) their next states:
//!
//! ```text
//! β_k        = ½ · S · H³ · ln(2·H·S·A·k)                              [V2]
//! Q̃_h(s,a)   = ( Σr + Σ_{s′} n(s′)·Ṽ_{h+1}(s′) ) / (n + 1) + c·w,
//!              w ~ N(0, β_k / (n + 1)), fresh per (h, s, a) and episode  [R]
//! Ṽ_h(s)     = max_a Q̃_h(s,a),   Ṽ_{H+1} ≡ 0,   no clipping             [R]
//! ```
//!
//! and acts greedily on Q̃ (ties broken uniformly at random, one draw per
//! tied state, as every planning learner here). c is `bonus_scale`, a
//! multiplier of the noise's standard deviation (ours; 1 = the published
//! variance, 0 leaves the planner on the unperturbed regression).
//!
//! The choices, each marked:
//! - **Regression with one pseudo-observation [R].** The division by n + 1
//!   (not n) is ridge-regularised least squares with penalty 1 — Bayesian
//!   linear regression with a N(0, β_k) prior on each tabular parameter and
//!   noise variance β_k, whose posterior has exactly this mean and the
//!   variance β_k/(n + 1) above (Osband, Van Roy & Wen 2016, the tabular case
//!   of their Bayesian regression, with σ² = β_k and λσ² = 1). The mean and
//!   the variance come from the same posterior, so we take both.
//! - **Unvisited pairs [R]:** n = 0 gives Q̃ = w ~ N(0, β_k): the prior, mean
//!   0 and variance β_k, with no special case in the code.
//! - **No clipping [R]:** the analysed algorithm does not clip Ṽ to [0, H]
//!   (docs/papers/rlsvi.md; later variants do); we follow it, so values can
//!   be negative or far above H while the noise (standard deviation up to
//!   about H^{3/2}·√S) dominates.
//! - **Noise on the whole target [R]:** adding w to the reward before the
//!   backup or to Q̃ after it is the same draw.
//! - Rewards are estimated from the data, as the transitions are.
//!
//! Statistics are kept per step h (time-inhomogeneous: the data of period h
//! only ever estimate period h's reward and transitions), as Russo's setting
//! has them [R] and as every learner here does.
//!
//! The Gaussian draws are the core's own (`sample::normal`, a ziggurat with
//! `libm` tables) and β_k is computed with `libm::log`, so native and wasm
//! runs agree bit for bit.
//!
//! # References
//! - I. Osband, B. Van Roy and Z. Wen, "Generalization and Exploration via
//!   Randomized Value Functions", ICML 2016, PMLR 48:2377–2386,
//!   arXiv:1402.0635 (RLSVI; the tabular case as Bayesian linear regression
//!   with one-hot features [R]).
//! - D. Russo, "Worst-Case Regret Bounds for Exploration via Randomized
//!   Value Functions", NeurIPS 2019, pp. 14433–14443, arXiv:1906.02870
//!   (tabular RLSVI with β_k = ½·S·H³·log(2HSAk) [V2]; the algorithm box,
//!   its equation numbers and the variance β_k/(n + 1) not read [R]).

use super::{LearnRng, Learner, Plan, PolicyView, RowCounts, Setting};
use crate::sample::normal;

pub struct Rlsvi {
    set: Setting,
    scale: f64,
    counts: Vec<RowCounts>,
    /// Episodes begun so far (k of the episode being planned).
    episode: u64,
    plan: Plan,
}

/// β_k = ½·S·H³·ln(2·H·S·A·k), the variance scale of episode k (Russo 2019,
/// [V2]).
pub fn beta(set: &Setting, k: u64) -> f64 {
    let (s, a, h) = (set.states as f64, set.actions as f64, set.horizon as f64);
    0.5 * s * h * h * h * libm::log(2.0 * h * s * a * k as f64)
}

impl Rlsvi {
    /// RLSVI with the noise's standard deviation multiplied by `noise_scale`
    /// (1 = the published variance β_k/(n + 1)).
    pub fn new(set: Setting, noise_scale: f64) -> Rlsvi {
        Rlsvi {
            set,
            scale: noise_scale,
            counts: vec![RowCounts::default(); set.rows()],
            episode: 0,
            plan: Plan::new(&set),
        }
    }

    /// Ṽ_h(s) as last planned (0 at h = H and before the first plan).
    pub fn value(&self, h: usize, s: usize) -> f64 {
        self.plan.value(h, s)
    }
}

impl Learner for Rlsvi {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        self.episode += 1;
        let set = self.set;
        let sd = self.scale * beta(&set, self.episode).sqrt();
        let counts = &self.counts;
        // Every row gets a fresh draw each episode: the whole plan is
        // recomputed (no stale-row shortcut applies).
        self.plan.replan(&set, rng, |h, s, a, v_next, draw| {
            let c = &counts[set.row(h, s, a)];
            let mut target = c.r_sum;
            for &(y, m) in &c.next {
                target += m as f64 * v_next[y as usize];
            }
            let n1 = c.n as f64 + 1.0;
            target / n1 + sd / n1.sqrt() * normal(draw)
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

//! Optimistic Q-learning (Q-learning with UCB), with the Hoeffding bonus or
//! the Bernstein bonus: one learner, the bonus its only difference.
//!
//! Q_h(s,a) starts at H. After the t-th visit of (h, s, a), seeing reward r
//! and next state s':
//!
//! ```text
//! α_t = (H + 1)/(H + t),   ι = ln(S·A·T/δ),  T = K·H
//! Q_h(s,a) ← (1 − α_t)·Q_h(s,a) + α_t·( r + V_{h+1}(s') + c·b_t )
//! V_h(s)   = min( H, max_a Q_h(s,a) ),   V_{H} = 0
//! ```
//!
//! with c the `bonus_scale` (1 = our reading of the published constants,
//! below) and b_t:
//!
//! ```text
//! Hoeffding:  b_t = √(H³·ι/t)
//! Bernstein:  μ ← μ + V_{h+1}(s'),  σ ← σ + V_{h+1}(s')²,  W_t = σ/t − (μ/t)²
//!             β_t = min( c₁·( √((H/t)·(W_t + H)·ι) + √(H⁷·S·A)·ι/t ),  c₂·√(H³·ι/t) ),  β₀ = 0
//!             b_t = ( β_t − (1 − α_t)·β_{t−1} ) / (2·α_t)
//! ```
//!
//! where μ, σ sum the values V_{h+1}(s') of the row's visits as they were at
//! each visit (so W_t is their empirical variance). The paper leaves c (the
//! Hoeffding constant) and c₁, c₂ (the Bernstein ones) unspecified absolute
//! constants; we take c = c₁ = c₂ = 1 (our choice) at `bonus_scale` 1.
//!
//! The Bernstein b_t is chosen so that the bonus the updates accumulate,
//! Σᵢ α_t^i·b_i with α_t^i = α_i·Π_{j=i+1..t}(1 − α_j), is exactly β_t/2
//! (by induction: α_1 = 1, and B_t = (1 − α_t)·B_{t−1} + α_t·b_t). As
//! written, b_t would be negative when β_t < (1 − α_t)·β_{t−1}; we follow
//! the paper literally and would keep such a b_t, since the telescoping
//! needs it. It does not happen: t·W_t ≥ (t−1)·W_{t−1} (the sum of squared
//! deviations from the mean only grows), so each branch of the min shrinks
//! by a factor at least (t−1)/t ≥ 1 − α_t from one visit to the next, and
//! so does β (derived by hand; a test checks b_t ≥ 0 along runs).
//!
//! The learner acts greedily on Q; since step h is visited once per
//! episode, the policy of an episode is the greedy policy at its start (kept
//! as a table, its ties broken at random when an entry changes).
//! `model_updates` counts the episodes whose policy differs from the one
//! before (the first included).
//!
//! # References
//! - C. Jin, Z. Allen-Zhu, S. Bubeck and M. I. Jordan, "Is Q-learning
//!   Provably Efficient?", NeurIPS 2018, arXiv:1807.03765: Algorithm 1
//!   (Hoeffding) and Algorithm 2 of Appendix C (Bernstein).

use super::greedy::GreedyTable;
use super::{LearnRng, Learner, PolicyView, Setting, argmax_random};

/// c₁ of the Bernstein β_t: an absolute constant the paper does not give (our choice).
pub const BERNSTEIN_C1: f64 = 1.0;
/// c₂ of the Bernstein β_t, the cap's constant (our choice, as c₁).
pub const BERNSTEIN_C2: f64 = 1.0;

/// α_t = (H + 1)/(H + t), the learning rate of the t-th visit of a row.
#[inline]
pub fn learning_rate(horizon: usize, t: u32) -> f64 {
    let hh = horizon as f64;
    (hh + 1.0) / (hh + t as f64)
}

/// The Bernstein bonus's running sums, per row.
struct Bernstein {
    /// μ: the sum of V_{h+1}(s') over the row's visits.
    sum: Vec<f64>,
    /// σ: the sum of V_{h+1}(s')².
    sum_sq: Vec<f64>,
    /// β of the row's latest visit (β₀ = 0).
    beta: Vec<f64>,
    /// b_t of the row's latest visit, unscaled.
    bonus: Vec<f64>,
    /// √(H⁷·S·A)·ι, the numerator of β's lower-order term.
    lower: f64,
}

pub struct QUcb {
    set: Setting,
    scale: f64,
    iota: f64,
    q: Vec<f64>,
    n: Vec<u32>,
    v: Vec<f64>,
    /// The Bernstein bonus's statistics (None: the Hoeffding bonus).
    bernstein: Option<Bernstein>,
    /// π, its version and the episodes whose policy changed.
    greedy: GreedyTable,
}

impl QUcb {
    /// Q-learning with the Hoeffding bonus (`bernstein` false, Jin et al.'s
    /// Algorithm 1) or the Bernstein bonus (their Algorithm 2).
    pub fn new(set: Setting, bonus_scale: f64, bernstein: bool) -> QUcb {
        let hh = set.horizon as f64;
        let mut v = vec![hh; (set.horizon + 1) * set.states];
        v[set.horizon * set.states..]
            .iter_mut()
            .for_each(|x| *x = 0.0);
        let (s, a) = (set.states as f64, set.actions as f64);
        let iota = libm::log(s * a * set.steps() / set.delta);
        QUcb {
            set,
            scale: bonus_scale,
            iota,
            q: vec![hh; set.rows()],
            n: vec![0; set.rows()],
            v,
            bernstein: bernstein.then(|| Bernstein {
                sum: vec![0.0; set.rows()],
                sum_sq: vec![0.0; set.rows()],
                beta: vec![0.0; set.rows()],
                bonus: vec![0.0; set.rows()],
                lower: (hh.powi(7) * s * a).sqrt() * iota,
            }),
            greedy: GreedyTable::new(&set),
        }
    }

    /// Q_h(s,a) as it stands.
    pub fn q(&self, h: usize, s: usize, a: usize) -> f64 {
        self.q[self.set.row(h, s, a)]
    }

    /// V_h(s) = min(H, max_a Q_h(s,a)) as it stands (0 at h = H).
    pub fn value(&self, h: usize, s: usize) -> f64 {
        self.v[h * self.set.states + s]
    }

    /// The Bernstein β_t and b_t of the latest visit of (h, s, a), unscaled
    /// (0 before the first visit; None with the Hoeffding bonus).
    pub fn bernstein_bonus(&self, h: usize, s: usize, a: usize) -> Option<(f64, f64)> {
        let row = self.set.row(h, s, a);
        self.bernstein.as_ref().map(|b| (b.beta[row], b.bonus[row]))
    }

    fn regreedy(&mut self, h: usize, s: usize, rng: &mut LearnRng) {
        let a_n = self.set.actions;
        let base = self.set.row(h, s, 0);
        let best = argmax_random(&self.q[base..base + a_n], rng);
        self.greedy.set(h, s, best);
        let hh = self.set.horizon as f64;
        self.v[h * self.set.states + s] = self.q[base + best].min(hh);
    }
}

impl Learner for QUcb {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        if !self.greedy.initialised() {
            for h in 0..self.set.horizon {
                for s in 0..self.set.states {
                    self.regreedy(h, s, rng);
                }
            }
        }
        self.greedy.begin_episode();
    }

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Greedy(self.greedy.policy())
    }

    fn policy_version(&self) -> u64 {
        self.greedy.version()
    }

    fn act(&mut self, h: usize, s: usize, _rng: &mut LearnRng) -> usize {
        self.greedy.action(h, s)
    }

    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, rng: &mut LearnRng) {
        let row = self.set.row(h, s, a);
        self.n[row] += 1;
        let t = self.n[row] as f64;
        let hh = self.set.horizon as f64;
        let alpha = learning_rate(self.set.horizon, self.n[row]);
        let v_next = self.v[(h + 1) * self.set.states + next];
        // √(H³·ι/t): the Hoeffding bonus, and the cap of the Bernstein β_t.
        let hoeffding = (hh * hh * hh * self.iota / t).sqrt();
        let bonus = match &mut self.bernstein {
            None => hoeffding,
            Some(b) => {
                b.sum[row] += v_next;
                b.sum_sq[row] += v_next * v_next;
                let mean = b.sum[row] / t;
                let w = b.sum_sq[row] / t - mean * mean;
                let beta = (BERNSTEIN_C1 * ((hh / t * (w + hh) * self.iota).sqrt() + b.lower / t))
                    .min(BERNSTEIN_C2 * hoeffding);
                let bt = (beta - (1.0 - alpha) * b.beta[row]) / (2.0 * alpha);
                b.beta[row] = beta;
                b.bonus[row] = bt;
                bt
            }
        };
        let target = r + v_next + self.scale * bonus;
        self.q[row] = (1.0 - alpha) * self.q[row] + alpha * target;
        self.regreedy(h, s, rng);
    }

    fn model_updates(&self) -> u64 {
        self.greedy.updates()
    }
}

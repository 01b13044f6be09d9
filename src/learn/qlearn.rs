//! Optimistic Q-learning with the Hoeffding bonus (Q-learning with UCB-H).
//!
//! Q_h(s,a) starts at H. After the t-th visit of (h, s, a), seeing reward r
//! and next state s':
//!
//! ```text
//! α_t = (H + 1)/(H + t),   b_t = c·√(H³·ι/t),   ι = ln(S·A·T/δ),  T = K·H
//! Q_h(s,a) ← (1 − α_t)·Q_h(s,a) + α_t·( r + V_{h+1}(s') + b_t )
//! V_h(s)   = min( H, max_a Q_h(s,a) ),   V_{H} = 0
//! ```
//!
//! The paper leaves c an unspecified absolute constant; we take c = 1 at
//! `bonus_scale` 1. The learner acts greedily on Q; since step h is visited
//! once per episode, the policy of an episode is the greedy policy at its
//! start (kept as a table, its ties broken at random when an entry changes).
//! `model_updates` counts the episodes whose policy differs from the one
//! before (the first included).
//!
//! # References
//! - C. Jin, Z. Allen-Zhu, S. Bubeck and M. I. Jordan, "Is Q-learning
//!   Provably Efficient?", NeurIPS 2018, arXiv:1807.03765, Algorithm 1.

use super::{LearnRng, Learner, PolicyView, Setting, argmax_random};

pub struct QUcbHoeffding {
    set: Setting,
    scale: f64,
    iota: f64,
    q: Vec<f64>,
    n: Vec<u32>,
    v: Vec<f64>,
    greedy: Vec<u32>,
    version: u64,
    seen_version: Option<u64>,
    updates: u64,
    initialised: bool,
}

impl QUcbHoeffding {
    pub fn new(set: Setting, bonus_scale: f64) -> QUcbHoeffding {
        let hh = set.horizon as f64;
        let mut v = vec![hh; (set.horizon + 1) * set.states];
        v[set.horizon * set.states..]
            .iter_mut()
            .for_each(|x| *x = 0.0);
        QUcbHoeffding {
            set,
            scale: bonus_scale,
            iota: libm::log(set.states as f64 * set.actions as f64 * set.steps() / set.delta),
            q: vec![hh; set.rows()],
            n: vec![0; set.rows()],
            v,
            greedy: vec![0; set.horizon * set.states],
            version: 0,
            seen_version: None,
            updates: 0,
            initialised: false,
        }
    }

    fn regreedy(&mut self, h: usize, s: usize, rng: &mut LearnRng) {
        let a_n = self.set.actions;
        let base = self.set.row(h, s, 0);
        let best = argmax_random(&self.q[base..base + a_n], rng);
        let slot = &mut self.greedy[h * self.set.states + s];
        if *slot != best as u32 {
            *slot = best as u32;
            self.version += 1;
        }
        let hh = self.set.horizon as f64;
        self.v[h * self.set.states + s] = self.q[base + best].min(hh);
    }
}

impl Learner for QUcbHoeffding {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        if !self.initialised {
            self.initialised = true;
            for h in 0..self.set.horizon {
                for s in 0..self.set.states {
                    self.regreedy(h, s, rng);
                }
            }
            self.version += 1;
        }
        if self.seen_version != Some(self.version) {
            self.seen_version = Some(self.version);
            self.updates += 1;
        }
    }

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Greedy(&self.greedy)
    }

    fn policy_version(&self) -> u64 {
        self.version
    }

    fn act(&mut self, h: usize, s: usize, _rng: &mut LearnRng) -> usize {
        self.greedy[h * self.set.states + s] as usize
    }

    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, rng: &mut LearnRng) {
        let row = self.set.row(h, s, a);
        self.n[row] += 1;
        let t = self.n[row] as f64;
        let hh = self.set.horizon as f64;
        let alpha = (hh + 1.0) / (hh + t);
        let bonus = self.scale * (hh * hh * hh * self.iota / t).sqrt();
        let target = r + self.v[(h + 1) * self.set.states + next] + bonus;
        self.q[row] = (1.0 - alpha) * self.q[row] + alpha * target;
        self.regreedy(h, s, rng);
    }

    fn model_updates(&self) -> u64 {
        self.updates
    }
}

//! Baselines: ε-greedy on the empirical model, and uniformly random actions.
//!
//! ε-greedy replans every episode by backward induction on the empirical
//! model (mean rewards r̂ and transitions P̂ of the visits so far; a pair
//! never visited is worth 0), then in each step takes a uniformly random
//! action with probability ε and the greedy one otherwise. Both are common
//! practice baselines with no single source.

use rand::Rng;

use super::{LearnRng, Learner, Plan, PolicyView, RowCounts, Setting, StaleRows};

pub struct EpsGreedy {
    set: Setting,
    epsilon: f64,
    counts: Vec<RowCounts>,
    plan: Plan,
    /// Rows whose inputs changed since the last plan.
    pub(super) stale: StaleRows,
}

impl EpsGreedy {
    pub fn new(set: Setting, epsilon: f64) -> EpsGreedy {
        EpsGreedy {
            set,
            epsilon,
            counts: vec![RowCounts::default(); set.rows()],
            plan: Plan::new(&set),
            stale: StaleRows::new(&set),
        }
    }
}

impl Learner for EpsGreedy {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        let set = self.set;
        let counts = &self.counts;
        self.plan
            .replan_stale(&set, rng, &mut self.stale, |h, s, a, v_next| {
                let c = &counts[set.row(h, s, a)];
                if c.n == 0 {
                    0.0
                } else {
                    c.mean_reward() + c.mean(v_next)
                }
            });
    }

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Mixed {
            greedy: self.plan.policy(),
            epsilon: self.epsilon,
        }
    }

    fn policy_version(&self) -> u64 {
        self.plan.version()
    }

    fn act(&mut self, h: usize, s: usize, rng: &mut LearnRng) -> usize {
        if rng.random::<f64>() < self.epsilon {
            rng.random_range(0..self.set.actions as u32) as usize
        } else {
            self.plan.action(h, s)
        }
    }

    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, _rng: &mut LearnRng) {
        let row = self.set.row(h, s, a);
        self.stale.count(&mut self.counts[row], h, s, a, r, next);
    }

    fn model_updates(&self) -> u64 {
        self.plan.updates()
    }
}

pub struct Uniform {
    actions: u32,
}

impl Uniform {
    pub fn new(actions: usize) -> Uniform {
        Uniform {
            actions: actions as u32,
        }
    }
}

impl Learner for Uniform {
    fn begin_episode(&mut self, _rng: &mut LearnRng) {}

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Uniform
    }

    fn policy_version(&self) -> u64 {
        0
    }

    fn act(&mut self, _h: usize, _s: usize, rng: &mut LearnRng) -> usize {
        rng.random_range(0..self.actions) as usize
    }

    fn observe(&mut self, _: usize, _: usize, _: usize, _: f64, _: usize, _: &mut LearnRng) {}

    fn model_updates(&self) -> u64 {
        0
    }
}

//! UCB1 for multi-armed bandits (models with S = 1 and H = 1).
//!
//! Play each arm once (in index order); then the arm maximising
//!
//! ```text
//! x̄_j + c·√(2·ln n / n_j)
//! ```
//!
//! with x̄_j the mean reward of arm j, n_j its plays, n the total plays and c
//! the `bonus_scale` (1 = the published index). Ties at random.
//!
//! # References
//! - P. Auer, N. Cesa-Bianchi and P. Fischer, "Finite-time Analysis of the
//!   Multiarmed Bandit Problem", *Machine Learning* 47, 2002, 235–256
//!   (Figure 1, UCB1).

use super::{LearnRng, Learner, PolicyView, argmax_random};

pub struct Ucb1 {
    scale: f64,
    plays: Vec<u32>,
    sums: Vec<f64>,
    total: u32,
    index: Vec<f64>,
    choice: [u32; 1],
    version: u64,
    updates: u64,
}

impl Ucb1 {
    pub fn new(arms: usize, bonus_scale: f64) -> Ucb1 {
        Ucb1 {
            scale: bonus_scale,
            plays: vec![0; arms],
            sums: vec![0.0; arms],
            total: 0,
            index: vec![0.0; arms],
            choice: [u32::MAX],
            version: 0,
            updates: 0,
        }
    }
}

impl Learner for Ucb1 {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        let pick = match self.plays.iter().position(|&n| n == 0) {
            Some(j) => j,
            None => {
                let ln_n = libm::log(self.total as f64);
                for (j, x) in self.index.iter_mut().enumerate() {
                    let n = self.plays[j] as f64;
                    *x = self.sums[j] / n + self.scale * (2.0 * ln_n / n).sqrt();
                }
                argmax_random(&self.index, rng)
            }
        } as u32;
        self.updates += 1;
        if self.choice[0] != pick {
            self.choice[0] = pick;
            self.version += 1;
        }
    }

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Greedy(&self.choice)
    }

    fn policy_version(&self) -> u64 {
        self.version
    }

    fn act(&mut self, _h: usize, _s: usize, _rng: &mut LearnRng) -> usize {
        self.choice[0] as usize
    }

    fn observe(
        &mut self,
        _h: usize,
        _s: usize,
        a: usize,
        r: f64,
        _next: usize,
        _rng: &mut LearnRng,
    ) {
        self.plays[a] += 1;
        self.sums[a] += r;
        self.total += 1;
    }

    fn model_updates(&self) -> u64 {
        self.updates
    }
}

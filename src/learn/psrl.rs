//! PSRL: posterior sampling for reinforcement learning. Before each episode
//! it draws a model from the posterior and follows that model's optimal
//! policy.
//!
//! Priors (ours; the paper leaves them to the user):
//! - transitions: each P_h(·|s,a) has a Dirichlet(α₀, …, α₀) prior over all S
//!   next states, α₀ = `prior` (default 1, the uniform prior on the simplex);
//!   the posterior is Dirichlet(α₀ + counts);
//! - rewards: a Beta(1, 1) prior on the mean of each (h, s, a); an observed
//!   reward r ∈ [0, 1] counts as a success with probability r (the Bernoulli
//!   trick of Agrawal & Goyal 2012, which keeps Beta conjugate for rewards in
//!   [0, 1]).
//!
//! # References
//! - I. Osband, D. Russo and B. Van Roy, "(More) Efficient Reinforcement
//!   Learning via Posterior Sampling", NeurIPS 2013, arXiv:1306.0940.
//! - S. Agrawal and N. Goyal, "Analysis of Thompson Sampling for the
//!   Multi-armed Bandit Problem", COLT 2012, arXiv:1111.1797.

use rand::Rng;

use super::{LearnRng, Learner, Plan, PolicyView, Setting};
use crate::sample::{Exponential, beta, gamma};

pub struct Psrl {
    set: Setting,
    prior: f64,
    /// Next states seen from each row with their counts, sparse (in order of
    /// first sight): memory grows with what was visited, not with S².
    counts: Vec<Vec<(u32, u32)>>,
    /// One row's counts made dense while its posterior is drawn, then
    /// cleared again (all zero between draws).
    dense: Vec<u32>,
    successes: Vec<f64>,
    trials: Vec<f64>,
    plan: Plan,
}

impl Psrl {
    pub fn new(set: Setting, prior: f64) -> Psrl {
        Psrl {
            set,
            prior,
            counts: vec![Vec::new(); set.rows()],
            dense: vec![0; set.states],
            successes: vec![0.0; set.rows()],
            trials: vec![0.0; set.rows()],
            plan: Plan::new(&set),
        }
    }
}

impl Learner for Psrl {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        let set = self.set;
        let (counts, successes, trials, prior) =
            (&self.counts, &self.successes, &self.trials, self.prior);
        let dense = &mut self.dense;
        let (exp, unit) = (Exponential::new(), prior == 1.0);
        // The sampled model is drawn row by row as the planner needs it; the
        // planner's own tie-breaking draws interleave with these, in a fixed order.
        self.plan.replan(&set, rng, |h, s, a, v_next, draw| {
            let row = set.row(h, s, a);
            // The same draws, in the same order (every next state, 0..S), as
            // with dense counts.
            for &(next, k) in &counts[row] {
                dense[next as usize] = k;
            }
            // Σ w and Σ w·V in one pass, each summed in the order of the
            // next states as two passes would. With the uniform prior an
            // unseen next state's weight is Gamma(1) = Exp(1), drawn inline.
            let (mut total, mut pv) = (0.0, 0.0);
            for (&k, x) in dense.iter().zip(v_next) {
                let w = if unit && k == 0 {
                    exp.draw(draw)
                } else {
                    gamma(draw, prior + k as f64)
                };
                total += w;
                pv += w * x;
            }
            for &(next, _) in &counts[row] {
                dense[next as usize] = 0;
            }
            let r = beta(
                draw,
                1.0 + successes[row],
                1.0 + trials[row] - successes[row],
            );
            r + if total > 0.0 { pv / total } else { 0.0 }
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

    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, rng: &mut LearnRng) {
        let row = self.set.row(h, s, a);
        let seen = &mut self.counts[row];
        match seen.iter_mut().find(|e| e.0 == next as u32) {
            Some(e) => e.1 += 1,
            None => seen.push((next as u32, 1)),
        }
        self.trials[row] += 1.0;
        // A count, not a branch: whether the draw succeeds is a coin flip.
        self.successes[row] += f64::from(u8::from(rng.random::<f64>() < r));
    }

    fn model_updates(&self) -> u64 {
        self.plan.updates()
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// The posterior's counts grow with what was visited, not with S² per
    /// (h, a) (#11, class 3): at S = 100 000 the dense table asked for
    /// 40 GB before the first episode; now it holds the one pair seen.
    #[test]
    fn counts_are_kept_sparse() {
        use rand::SeedableRng;
        let set = Setting {
            states: 100_000,
            actions: 1,
            horizon: 1,
            episodes: 10,
            delta: 0.1,
        };
        let mut p = Psrl::new(set, 1.0);
        let mut rng = LearnRng::seed_from_u64(1);
        p.observe(0, 7, 0, 1.0, 99_999, &mut rng);
        p.observe(0, 7, 0, 0.0, 99_999, &mut rng);
        assert_eq!(p.counts[7], [(99_999, 2)]);
        assert_eq!(p.counts.iter().map(Vec::len).sum::<usize>(), 1);
        assert_eq!(p.trials[7], 2.0);
    }
}

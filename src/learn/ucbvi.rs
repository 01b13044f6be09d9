//! UCBVI: optimistic value iteration on the empirical model, replanned every
//! episode.
//!
//! With n = N_h(s,a) ≥ 1 visits, empirical reward r̂ and transitions P̂:
//!
//! ```text
//! Q_h(s,a) = min( Q_h^prev(s,a), H, r̂ + P̂·V_{h+1} + b ),   Q_h(s,a) = H when n = 0
//! Hoeffding:  b = c · 7·H·L·√(1/n)
//! Bernstein:  b = c · ( √(8·L·Var_P̂(V_{h+1})/n) + 14·H·L/(3n)
//!                       + √(8·Σ_y P̂(y)·min(100²·H³·S²·A·L²/N'_{h+1}(y), H²) / n) )
//! L = ln(5·S·A·T/δ),  T = K·H
//! ```
//!
//! where c is `bonus_scale` (1 = the published constants), N'_{h+1}(y) the
//! visits to state y at step h+1 (the min is H² when y was never visited
//! there, and the last term is 0 at the last step), and Q^prev the previous
//! episode's value, which makes Q non-increasing as in the paper. Rewards are
//! estimated by their empirical mean (the paper takes them known).
//!
//! # References
//! - M. G. Azar, I. Osband and R. Munos, "Minimax Regret Bounds for
//!   Reinforcement Learning", ICML 2017, PMLR 70, arXiv:1703.05449
//!   (Algorithm 1; bonus_1 and bonus_2). The Bernstein–Freedman bonus is
//!   written here as we recall it from the paper, from memory.

use super::{LearnRng, Learner, Plan, PolicyView, RowCounts, Setting, StaleRows};

pub struct Ucbvi {
    set: Setting,
    scale: f64,
    bernstein: bool,
    l: f64,
    counts: Vec<RowCounts>,
    /// 7·H·L·√(1/n) of each row, kept up to date as it is visited
    /// (Hoeffding only).
    hoeffding: Vec<f64>,
    /// N'_h(y): visits to state y at step h, `[h·S + y]` (Bernstein only).
    state_visits: Vec<u32>,
    /// (h − 1, s) of each visit of s at a step h > 0 since the last plan
    /// (Bernstein only): the rows of step h − 1 leading to s are stale. Kept
    /// for the plan to mark, once per state, rather than marked at every
    /// visit (the marks are the same; marking twice is marking once).
    visited: Vec<(usize, usize)>,
    q_prev: Vec<f64>,
    plan: Plan,
    /// Rows whose inputs changed since the last plan.
    pub(super) stale: StaleRows,
}

impl Ucbvi {
    pub fn new(set: Setting, bonus_scale: f64, bernstein: bool) -> Ucbvi {
        let l = libm::log(5.0 * set.states as f64 * set.actions as f64 * set.steps() / set.delta);
        Ucbvi {
            set,
            scale: bonus_scale,
            bernstein,
            l,
            counts: vec![RowCounts::default(); set.rows()],
            hoeffding: vec![0.0; set.rows()],
            state_visits: vec![0; set.horizon * set.states],
            visited: Vec::new(),
            q_prev: vec![set.horizon as f64; set.rows()],
            plan: Plan::new(&set),
            stale: StaleRows::new(&set),
        }
    }
}

impl Learner for Ucbvi {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        for (h, s) in self.visited.drain(..) {
            self.stale.mark_users(h, s);
        }
        let set = self.set;
        let hh = set.horizon as f64;
        let (s_f, a_f, l) = (set.states as f64, set.actions as f64, self.l);
        let cap = 100.0 * 100.0 * hh * hh * hh * s_f * s_f * a_f * l * l;
        let (counts, q_prev, visits, hoeffding) = (
            &self.counts,
            &mut self.q_prev,
            &self.state_visits,
            &self.hoeffding,
        );
        let (scale, bernstein) = (self.scale, self.bernstein);
        // Only rows whose counts, successor values or (Bernstein) successor
        // visit counts changed are recomputed; the rest keep their Q, which
        // is what recomputing them would give (see `StaleRows`).
        self.plan
            .replan_stale(&set, rng, &mut self.stale, |h, s, a, v_next| {
                let row = set.row(h, s, a);
                let c = &counts[row];
                if c.n == 0 {
                    return q_prev[row];
                }
                let n = c.n as f64;
                let (pv, var) = c.mean_var(v_next);
                let bonus = if bernstein {
                    let correction = if h + 1 < set.horizon {
                        let base = (h + 1) * set.states;
                        let e: f64 = c
                            .next
                            .iter()
                            .map(|&(y, k)| {
                                let nv = visits[base + y as usize];
                                let t = if nv == 0 {
                                    hh * hh
                                } else {
                                    (cap / nv as f64).min(hh * hh)
                                };
                                k as f64 / n * t
                            })
                            .sum();
                        (8.0 * e / n).sqrt()
                    } else {
                        0.0
                    };
                    (8.0 * l * var / n).sqrt() + 14.0 * hh * l / (3.0 * n) + correction
                } else {
                    hoeffding[row]
                };
                let q = (c.mean_reward() + pv + scale * bonus)
                    .min(hh)
                    .min(q_prev[row]);
                q_prev[row] = q;
                q
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
        let row = self.set.row(h, s, a);
        self.stale.count(&mut self.counts[row], h, s, a, r, next);
        if self.bernstein {
            self.state_visits[h * self.set.states + s] += 1;
            // The Bernstein bonus of the rows of step h − 1 that lead to s
            // reads this count: they are marked stale at the next plan.
            if h > 0 {
                self.visited.push((h - 1, s));
            }
        } else {
            let n = self.counts[row].n as f64;
            self.hoeffding[row] = 7.0 * self.set.horizon as f64 * self.l * (1.0 / n).sqrt();
        }
    }

    fn model_updates(&self) -> u64 {
        self.plan.updates()
    }
}

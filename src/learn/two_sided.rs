//! Upper and lower values planned together by backward induction, the lower
//! one read along the upper one's greedy policy: the plan EULER and ORLC
//! share (each gives its own rows' values; this holds the tables, the
//! greedy policy and its version).

use super::{LearnRng, Setting, argmax_random};

pub struct TwoSided {
    set: Setting,
    /// Q̄ and Q̲ of every row as last planned.
    q_up: Vec<f64>,
    q_low: Vec<f64>,
    /// V̄ and V̲, `[h·S + s]`, (H + 1)·S entries, row H zero.
    v_up: Vec<f64>,
    v_low: Vec<f64>,
    /// π_h(s), `[h·S + s]`: the upper values' greedy action.
    policy: Vec<u32>,
    version: u64,
    updates: u64,
}

impl TwoSided {
    /// The tables before the first plan: every value 0, or (`optimistic`)
    /// the upper ones at H − h, the most any policy collects from step h on
    /// (so that a gap read before the first plan is the whole range).
    pub fn new(set: Setting, optimistic: bool) -> TwoSided {
        let (s_n, a_n, h_n) = (set.states, set.actions, set.horizon);
        let mut v_up = vec![0.0; (h_n + 1) * s_n];
        let mut q_up = vec![0.0; set.rows()];
        if optimistic {
            for h in 0..h_n {
                v_up[h * s_n..(h + 1) * s_n].fill((h_n - h) as f64);
                q_up[h * s_n * a_n..(h + 1) * s_n * a_n].fill((h_n - h) as f64);
            }
        }
        TwoSided {
            set,
            q_up,
            q_low: vec![0.0; set.rows()],
            v_up,
            v_low: vec![0.0; (h_n + 1) * s_n],
            policy: vec![u32::MAX; h_n * s_n],
            version: 0,
            updates: 0,
        }
    }

    /// One backward induction: `row(h, s, a, up_next, low_next)` gives
    /// (Q̄, Q̲) of row (h, s, a) from V̄_{h+1} and V̲_{h+1} (S entries each);
    /// π_h(s) is the upper values' argmax (ties at random, one draw per
    /// state), V̄_h(s) = Q̄_h(s, π_h(s)) and V̲_h(s) = Q̲_h(s, π_h(s)). The
    /// version changes when the policy does.
    pub fn replan(
        &mut self,
        rng: &mut LearnRng,
        mut row: impl FnMut(usize, usize, usize, &[f64], &[f64]) -> (f64, f64),
    ) {
        let set = self.set;
        let (s_n, a_n) = (set.states, set.actions);
        let mut changed = false;
        for h in (0..set.horizon).rev() {
            let (up_now, up_next) = self.v_up.split_at_mut((h + 1) * s_n);
            let (low_now, low_next) = self.v_low.split_at_mut((h + 1) * s_n);
            let (up_next, low_next) = (&up_next[..s_n], &low_next[..s_n]);
            for s in 0..s_n {
                let first = set.row(h, s, 0);
                for a in 0..a_n {
                    let (up, low) = row(h, s, a, up_next, low_next);
                    self.q_up[first + a] = up;
                    self.q_low[first + a] = low;
                }
                let best = argmax_random(&self.q_up[first..first + a_n], rng);
                let i = h * s_n + s;
                up_now[i] = self.q_up[first + best];
                low_now[i] = self.q_low[first + best];
                changed |= self.policy[i] != best as u32;
                self.policy[i] = best as u32;
            }
        }
        if changed {
            self.version += 1;
        }
        self.updates += 1;
    }

    /// V̄_h(s) as last planned.
    pub fn upper_value(&self, h: usize, s: usize) -> f64 {
        self.v_up[h * self.set.states + s]
    }

    /// V̲_h(s) as last planned: Q̲ at the upper values' greedy action.
    pub fn lower_value(&self, h: usize, s: usize) -> f64 {
        self.v_low[h * self.set.states + s]
    }

    /// Q̄_h(s,a) as last planned.
    pub fn upper_q(&self, h: usize, s: usize, a: usize) -> f64 {
        self.q_up[self.set.row(h, s, a)]
    }

    /// Q̲_h(s,a) as last planned.
    pub fn lower_q(&self, h: usize, s: usize, a: usize) -> f64 {
        self.q_low[self.set.row(h, s, a)]
    }

    /// π_h(s), `[h·S + s]`.
    pub fn policy(&self) -> &[u32] {
        &self.policy
    }

    /// The action π_h(s).
    pub fn action(&self, h: usize, s: usize) -> usize {
        self.policy[h * self.set.states + s] as usize
    }

    /// Changes whenever the policy does.
    pub fn version(&self) -> u64 {
        self.version
    }

    /// Plans made so far.
    pub fn updates(&self) -> u64 {
        self.updates
    }
}

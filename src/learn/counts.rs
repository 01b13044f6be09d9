//! Empirical statistics of one (h, s, a), shared by the model-based learners.

/// Empirical statistics of one (h, s, a): visits, reward sums, and the next
/// states seen with their counts (sparse, in order of first sight).
#[derive(Debug, Clone, Default, PartialEq)]
pub struct RowCounts {
    pub n: u32,
    pub r_sum: f64,
    pub r2_sum: f64,
    pub next: Vec<(u32, u32)>,
}

impl RowCounts {
    /// Counts one visit; true when `next` is a successor not seen before.
    #[inline]
    pub fn add(&mut self, r: f64, next: usize) -> bool {
        self.n += 1;
        self.r_sum += r;
        self.r2_sum += r * r;
        let next = next as u32;
        match self.next.iter_mut().find(|e| e.0 == next) {
            Some(e) => {
                e.1 += 1;
                false
            }
            None => {
                self.next.push((next, 1));
                true
            }
        }
    }

    /// Empirical mean reward r̂ (0 when unvisited).
    #[inline]
    pub fn mean_reward(&self) -> f64 {
        if self.n == 0 {
            0.0
        } else {
            self.r_sum / self.n as f64
        }
    }

    /// Empirical second moment of the reward (0 when unvisited).
    #[inline]
    pub fn second_moment(&self) -> f64 {
        if self.n == 0 {
            0.0
        } else {
            self.r2_sum / self.n as f64
        }
    }

    /// (P̂·V, Var_P̂(V)) over the empirical next-state distribution (sums
    /// of counts, divided by n once).
    #[inline]
    pub fn mean_var(&self, v: &[f64]) -> (f64, f64) {
        let (mut m1, mut m2) = (0.0, 0.0);
        for &(s, c) in &self.next {
            let x = v[s as usize];
            let c = c as f64;
            m1 += c * x;
            m2 += c * x * x;
        }
        let inv = 1.0 / self.n as f64;
        let (m1, m2) = (m1 * inv, m2 * inv);
        (m1, (m2 - m1 * m1).max(0.0))
    }

    /// P̂·V.
    #[inline]
    pub fn mean(&self, v: &[f64]) -> f64 {
        let mut acc = 0.0;
        for &(s, c) in &self.next {
            acc += c as f64 * v[s as usize];
        }
        acc / self.n as f64
    }
}

//! Exact solution of a finite-horizon MDP by backward induction, and exact
//! evaluation of deterministic and stochastic policies.
//!
//! With steps h = 0..H−1 and V_H ≡ 0:
//!
//! ```text
//! Q_h(s,a) = r̄_h(s,a) + γ · Σ_{s'} P_h(s'|s,a) · V_{h+1}(s')
//! V_h(s)   = max_a Q_h(s,a)
//! Δ_h(s,a) = V_h(s) − Q_h(s,a)          (the gap, ≥ 0)
//! ```
//!
//! where r̄ is the mean reward and γ the discount (1 unless the file gives
//! one). The optimal value of the model is Σ_s ρ(s)·V_0(s) for the start
//! distribution ρ.
//!
//! **Ties:** the optimal policy takes, in each (h, s), the lowest-indexed
//! action whose Q value is within [`TIE_TOLERANCE`]·max(1, |V_h(s)|) of the
//! maximum, so values that are equal in exact arithmetic but differ in the
//! last bits of floating point still pick the same action on every platform.
//!
//! # References
//! - M. L. Puterman, *Markov Decision Processes: Discrete Stochastic Dynamic
//!   Programming*, Wiley, 1994, §4.5 (the backward induction algorithm).
//! - R. S. Sutton and A. G. Barto, *Reinforcement Learning: An Introduction*,
//!   2nd ed., MIT Press, 2018, §4.1 (iterative policy evaluation).

use ndarray::{Array2, Array3};

use crate::model::Mdp;

/// Relative tolerance within which two Q values count as tied.
pub const TIE_TOLERANCE: f64 = 1e-12;

/// The exact solution of a model.
#[derive(Debug, Clone, PartialEq)]
pub struct Solution {
    /// V*_h(s), shape (H+1, S); row H is zero.
    pub v: Array2<f64>,
    /// Q*_h(s,a), shape (H, S, A).
    pub q: Array3<f64>,
    /// An optimal policy π*_h(s), shape (H, S); ties as described in the module docs.
    pub policy: Array2<u32>,
    /// Σ_s ρ(s)·V*_0(s).
    pub optimal_value: f64,
}

impl Solution {
    /// Gaps Δ_h(s,a) = V*_h(s) − Q*_h(s,a), shape (H, S, A).
    pub fn gaps(&self) -> Array3<f64> {
        let (h, s, a) = self.q.dim();
        Array3::from_shape_fn((h, s, a), |(hi, si, ai)| {
            (self.v[[hi, si]] - self.q[[hi, si, ai]]).max(0.0)
        })
    }

    /// The smallest positive gap over all (h, s, a), if any action is suboptimal
    /// by more than the tie tolerance.
    pub fn min_positive_gap(&self) -> Option<f64> {
        self.gaps()
            .iter()
            .copied()
            .filter(|&d| d > TIE_TOLERANCE)
            .min_by(f64::total_cmp)
    }
}

/// Σ_{s'} P(s'|row)·V(s') over one sparse row.
#[inline]
fn expect(next: &[u32], prob: &[f64], v: &[f64]) -> f64 {
    let mut acc = 0.0;
    for (&n, &p) in next.iter().zip(prob) {
        acc += p * v[n as usize];
    }
    acc
}

/// Solves `m` exactly by backward induction.
pub fn solve(m: &Mdp) -> Solution {
    let (h_max, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
    let gamma = m.discount();
    let mut v = Array2::<f64>::zeros((h_max + 1, s_n));
    let mut q = Array3::<f64>::zeros((h_max, s_n, a_n));
    let mut policy = Array2::<u32>::zeros((h_max, s_n));
    for h in (0..h_max).rev() {
        let step = m.step(h);
        let (mut done, rest) = v.view_mut().split_at(ndarray::Axis(0), h + 1);
        let vnext = rest.row(0);
        let vnext = vnext.as_slice().expect("rows are contiguous");
        let mut vrow = done.row_mut(h);
        let mut qh = q.index_axis_mut(ndarray::Axis(0), h);
        let qh = qh.as_slice_mut().expect("contiguous");
        let r = step.mean_rewards();
        for s in 0..s_n {
            let mut best = f64::NEG_INFINITY;
            for a in 0..a_n {
                let row = s * a_n + a;
                let (next, prob) = step.row(row);
                let x = r[row] + gamma * expect(next, prob, vnext);
                qh[row] = x;
                if x > best {
                    best = x;
                }
            }
            vrow[s] = best;
            let tol = TIE_TOLERANCE * best.abs().max(1.0);
            let pick = (0..a_n)
                .find(|&a| qh[s * a_n + a] >= best - tol)
                .expect("the maximum is attained");
            policy[[h, s]] = pick as u32;
        }
    }
    let optimal_value = start_value(m, v.row(0).as_slice().expect("contiguous"));
    Solution {
        v,
        q,
        policy,
        optimal_value,
    }
}

/// Σ_s ρ(s)·V(s).
pub fn start_value(m: &Mdp, v0: &[f64]) -> f64 {
    m.start().iter().zip(v0).map(|(p, v)| p * v).sum()
}

/// A policy to evaluate.
#[derive(Debug, Clone, PartialEq)]
pub enum Policy {
    /// π_h(s) ∈ 0..A, shape (H, S).
    Deterministic(Array2<u32>),
    /// π_h(a|s), shape (H, S, A); each (h, s) a distribution over actions.
    Stochastic(Array3<f64>),
}

/// A policy whose shape or entries do not fit the model.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum PolicyError {
    /// The array has the wrong dimensions.
    Shape {
        expected: Vec<usize>,
        found: Vec<usize>,
    },
    /// An action index ≥ A at (h, s).
    Action { h: usize, s: usize, action: u32 },
    /// Probabilities at (h, s) are negative, not finite, or do not sum to 1.
    Distribution { h: usize, s: usize, sum: f64 },
}

impl std::fmt::Display for PolicyError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            PolicyError::Shape { expected, found } => {
                write!(f, "policy has shape {found:?}, expected {expected:?}")
            }
            PolicyError::Action { h, s, action } => write!(
                f,
                "policy at step {} state {s}: action index {action} is out of range",
                h + 1
            ),
            PolicyError::Distribution { h, s, sum } => write!(
                f,
                "policy at step {} state {s}: action probabilities must be ≥ 0 and sum to 1 (sum {sum})",
                h + 1
            ),
        }
    }
}

impl std::error::Error for PolicyError {}

/// Exact values V^π_h(s) of `policy` on `m`, shape (H+1, S), row H zero:
///
/// ```text
/// V^π_h(s) = Σ_a π_h(a|s) · ( r̄_h(s,a) + γ · Σ_{s'} P_h(s'|s,a) · V^π_{h+1}(s') )
/// ```
pub fn evaluate(m: &Mdp, policy: &Policy) -> Result<Array2<f64>, PolicyError> {
    let (h_max, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
    check_policy(policy, h_max, s_n, a_n)?;
    let gamma = m.discount();
    let mut v = Array2::<f64>::zeros((h_max + 1, s_n));
    for h in (0..h_max).rev() {
        let step = m.step(h);
        let r = step.mean_rewards();
        for s in 0..s_n {
            let q = |a: usize| {
                let row = s * a_n + a;
                let (next, prob) = step.row(row);
                let mut acc = 0.0;
                for (&n, &p) in next.iter().zip(prob) {
                    acc += p * v[[h + 1, n as usize]];
                }
                r[row] + gamma * acc
            };
            let x = match policy {
                Policy::Deterministic(p) => q(p[[h, s]] as usize),
                Policy::Stochastic(p) => {
                    // A row accepted within the tolerance is the
                    // distribution it is scaled to (as model rows are), so
                    // an optimal policy is worth V* exactly.
                    let sum: f64 = (0..a_n).map(|a| p[[h, s, a]]).sum();
                    let exact = (sum - 1.0).abs() <= crate::model::check::SUM_EXACT;
                    let scale = if exact { 1.0 } else { sum };
                    (0..a_n)
                        .filter(|&a| p[[h, s, a]] > 0.0)
                        .map(|a| p[[h, s, a]] / scale * q(a))
                        .sum()
                }
            };
            v[[h, s]] = x;
        }
    }
    Ok(v)
}

fn check_policy(policy: &Policy, h: usize, s: usize, a: usize) -> Result<(), PolicyError> {
    match policy {
        Policy::Deterministic(p) => {
            if p.dim() != (h, s) {
                return Err(PolicyError::Shape {
                    expected: vec![h, s],
                    found: p.shape().to_vec(),
                });
            }
            for ((hi, si), &x) in p.indexed_iter() {
                if x as usize >= a {
                    return Err(PolicyError::Action {
                        h: hi,
                        s: si,
                        action: x,
                    });
                }
            }
        }
        Policy::Stochastic(p) => {
            if p.dim() != (h, s, a) {
                return Err(PolicyError::Shape {
                    expected: vec![h, s, a],
                    found: p.shape().to_vec(),
                });
            }
            for hi in 0..h {
                for si in 0..s {
                    let row = p.slice(ndarray::s![hi, si, ..]);
                    let ok = row.iter().all(|&x| x.is_finite() && x >= 0.0);
                    let sum: f64 = row.sum();
                    if !ok || (sum - 1.0).abs() > crate::model::check::SUM_TOLERANCE {
                        return Err(PolicyError::Distribution { h: hi, s: si, sum });
                    }
                }
            }
        }
    }
    Ok(())
}

/// The solution as a JSON object: `optimal_value`, `v` [H][S], `q` [H][S][A],
/// `policy` [H][S] (action indices), `gaps` [H][S][A], with the model's
/// `states` and `actions` labels. Steps are 0-based array positions.
pub fn solution_json(m: &Mdp, sol: &Solution) -> String {
    use crate::model::json::{num, string};
    let (h_max, s_n, a_n) = sol.q.dim();
    let join = |xs: Vec<String>| format!("[{}]", xs.join(", "));
    let labels = |ls: &[String]| join(ls.iter().map(|l| string(l)).collect());
    let v = join(
        (0..h_max)
            .map(|h| join((0..s_n).map(|s| num(sol.v[[h, s]])).collect()))
            .collect(),
    );
    let cube = |arr: &Array3<f64>| {
        join(
            (0..h_max)
                .map(|h| {
                    join(
                        (0..s_n)
                            .map(|s| join((0..a_n).map(|a| num(arr[[h, s, a]])).collect()))
                            .collect(),
                    )
                })
                .collect(),
        )
    };
    let policy = join(
        (0..h_max)
            .map(|h| join((0..s_n).map(|s| sol.policy[[h, s]].to_string()).collect()))
            .collect(),
    );
    format!(
        "{{\n  \"optimal_value\": {},\n  \"horizon\": {h_max},\n  \"states\": {},\n  \"actions\": {},\n  \"v\": {v},\n  \"q\": {},\n  \"policy\": {policy},\n  \"gaps\": {}\n}}\n",
        num(sol.optimal_value),
        labels(m.states()),
        labels(m.actions()),
        cube(&sol.q),
        cube(&sol.gaps()),
    )
}

/// Exact start values Σ_s ρ(s)·V^π_0(s) of the policies learners follow,
/// with reusable buffers (no allocation per call).
///
/// A learner's next policy may differ from its last in a few states (ε-greedy's
/// do: a tenth of the states recomputed on the learning workload; MVP's,
/// UCBVI's and Q-learning's there change at 95–99% of them), so the values
/// of the last policy that follows a greedy table (with or without ε) are
/// kept, V_h for every step, and a new one is evaluated from them: step h is recomputed only where the greedy action changed,
/// or wholly when some V_{h+1} changed. Every recomputed value is the same
/// arithmetic on the same inputs as a full backward induction, and every
/// kept one is a value such a pass would recompute from unchanged inputs,
/// so the result is bit for bit the full pass's.
#[derive(Debug, Clone)]
pub struct Evaluator {
    v: Vec<f64>,
    v_next: Vec<f64>,
    /// V_h(s) of the last greedy policy evaluated, `[h·S + s]`, h ≤ H (V_H = 0).
    values: Vec<f64>,
    /// That policy's greedy table and its ε (`None` before the first).
    last: Option<(Vec<u32>, f64)>,
    /// States recomputed and states a full pass would compute, since made.
    work: (u64, u64),
}

impl Evaluator {
    pub fn new(m: &Mdp) -> Evaluator {
        Evaluator {
            v: vec![0.0; m.n_states()],
            v_next: vec![0.0; m.n_states()],
            values: vec![0.0; (m.horizon() + 1) * m.n_states()],
            last: None,
            work: (0, 0),
        }
    }

    /// The value of the policy that takes `greedy[h·S + s]` with probability
    /// 1 − ε and a uniformly random action with probability ε (ε = 0:
    /// deterministic; `greedy` = None: uniform, ε ignored).
    pub fn value(&mut self, m: &Mdp, greedy: Option<&[u32]>, epsilon: f64) -> f64 {
        match greedy {
            Some(g) => self.greedy(m, g, epsilon),
            None => {
                let w_each = 1.0 / m.n_actions() as f64;
                self.backward(m, |_, _, q| mixture(q, None, 0.0, w_each))
            }
        }
    }

    /// (states recomputed, states a full backward pass would have computed)
    /// over every greedy evaluation so far: what keeping the last policy's
    /// values saves.
    pub fn work(&self) -> (u64, u64) {
        self.work
    }

    /// V^π of any Markov policy, `probs[(h·S + s)·A + a]` = π_h(a|s); an
    /// action of probability 0 is skipped.
    pub fn table(&mut self, m: &Mdp, probs: &[f64]) -> f64 {
        let (s_n, a_n) = (m.n_states(), m.n_actions());
        self.backward(m, |h, s, q| {
            let row = &probs[(h * s_n + s) * a_n..][..a_n];
            let mut acc = 0.0;
            for (a, &p) in row.iter().enumerate() {
                if p != 0.0 {
                    acc += p * q.of(a);
                }
            }
            acc
        })
    }

    /// V^π of the policy that follows `g` with probability 1 − ε, from the
    /// values of the last such policy where they still hold.
    fn greedy(&mut self, m: &Mdp, g: &[u32], epsilon: f64) -> f64 {
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let gamma = m.discount();
        let (w_greedy, w_each) = (1.0 - epsilon, epsilon / a_n as f64);
        let last = match self.last.take() {
            // The same ε: the kept values are this family's.
            Some((last, e)) if e.to_bits() == epsilon.to_bits() => Some(last),
            _ => None,
        };
        let mut below_moved = last.is_none();
        for h in (0..h_n).rev() {
            let step = m.step(h);
            let (offsets, next, prob) = step.csr();
            let (now, later) = self.values.split_at_mut((h + 1) * s_n);
            let q = RowValues {
                rewards: step.mean_rewards(),
                offsets,
                next,
                prob,
                v_next: &later[..s_n],
                gamma,
                actions: a_n,
                base: 0,
            };
            let v_h = &mut now[h * s_n..];
            let g_h = &g[h * s_n..(h + 1) * s_n];
            let mut moved = false;
            let mut done = 0;
            for (s, (x, &a)) in v_h.iter_mut().zip(g_h).enumerate() {
                if below_moved || last.as_ref().is_none_or(|l| l[h * s_n + s] != a) {
                    let q = RowValues { base: s * a_n, ..q };
                    let y = if epsilon == 0.0 {
                        q.of(a as usize)
                    } else {
                        mixture(&q, Some(a as usize), w_greedy, w_each)
                    };
                    moved |= y.to_bits() != x.to_bits();
                    *x = y;
                    done += 1;
                }
            }
            self.work.0 += done;
            below_moved = moved;
        }
        self.work.1 += (h_n * s_n) as u64;
        let mut kept = last.unwrap_or_default();
        kept.clear();
        kept.extend_from_slice(g);
        self.last = Some((kept, epsilon));
        start_value(m, &self.values[..s_n])
    }

    /// Backward induction of a policy's value: V_h(s) = `value_of(h, s, q)`,
    /// where `q.of(a)` is r̄_h(s,a) + γ·Σ_{s'} P_h(s'|s,a)·V_{h+1}(s').
    /// Returns Σ_s ρ(s)·V_0(s).
    #[inline]
    fn backward(
        &mut self,
        m: &Mdp,
        mut value_of: impl FnMut(usize, usize, &RowValues) -> f64,
    ) -> f64 {
        let a_n = m.n_actions();
        let gamma = m.discount();
        self.v_next.fill(0.0);
        for h in (0..m.horizon()).rev() {
            let step = m.step(h);
            let (offsets, next, prob) = step.csr();
            let mut q = RowValues {
                rewards: step.mean_rewards(),
                offsets,
                next,
                prob,
                v_next: &self.v_next,
                gamma,
                actions: a_n,
                base: 0,
            };
            for (s, x) in self.v.iter_mut().enumerate() {
                q.base = s * a_n;
                *x = value_of(h, s, &q);
            }
            std::mem::swap(&mut self.v, &mut self.v_next);
        }
        start_value(m, &self.v_next)
    }
}

/// The value of the mixture that takes action `greedy` with weight
/// `w_greedy` and each action with weight `w_each`: every action's Q once.
#[inline]
fn mixture(q: &RowValues, greedy: Option<usize>, w_greedy: f64, w_each: f64) -> f64 {
    let mut acc = 0.0;
    let mut q_greedy = 0.0;
    for a in 0..q.actions() {
        let qa = q.of(a);
        acc += w_each * qa;
        if Some(a) == greedy {
            q_greedy = qa;
        }
    }
    if greedy.is_some() && w_greedy > 0.0 {
        acc += w_greedy * q_greedy;
    }
    acc
}

/// The action values of one state at one step, from the next step's values.
/// It holds the step's CSR slices rather than calling `Step::row` per row:
/// that reloads them through the `Step` each time, 2–3% more instructions
/// on the regret evaluation of every episode (measured with callgrind).
/// Where a policy's regret is paid: the finite-horizon performance-difference
/// identity V*₁(ρ) − V^π₁(ρ) = Σ_h Σ_{s,a} d_h^π(s,a)·Δ_h(s,a), with d_h^π the
/// policy's occupancy of (s, a) at step h (a forward pass from ρ) and Δ the
/// solver's gaps (Kakade & Langford, "Approximately Optimal Approximate
/// Reinforcement Learning", ICML 2002, Lemma 6.1, in its finite-horizon
/// form). Undiscounted, as learners are.
pub struct RegretCells {
    d: Vec<f64>,
    d_next: Vec<f64>,
    row: Vec<f64>,
}

impl RegretCells {
    pub fn new(m: &Mdp) -> RegretCells {
        RegretCells {
            d: vec![0.0; m.n_states()],
            d_next: vec![0.0; m.n_states()],
            row: vec![0.0; m.n_actions()],
        }
    }

    /// Puts every non-zero d_h^π(s,a)·Δ_h(s,a) into `out` as `(cell, value)`
    /// with cell = (h·S + s)·A + a, and returns their sum. `policy(h, s,
    /// row)` returns `Some(a)` for a deterministic choice, or fills `row`
    /// with π_h(·|s) and returns None; `gaps` is [`Solution::gaps`]
    /// flattened. (Sparse: a policy reaches few cells, and most of those it
    /// reaches have no gap.)
    pub fn fill(
        &mut self,
        m: &Mdp,
        gaps: &[f64],
        mut policy: impl FnMut(usize, usize, &mut [f64]) -> Option<usize>,
        out: &mut Vec<(u32, f64)>,
    ) -> f64 {
        let (s_n, a_n) = (m.n_states(), m.n_actions());
        self.d.copy_from_slice(m.start());
        out.clear();
        let mut total = 0.0;
        for h in 0..m.horizon() {
            let step = m.step(h);
            let (offsets, next, prob) = step.csr();
            self.d_next.fill(0.0);
            for s in 0..s_n {
                let ds = self.d[s];
                if ds == 0.0 {
                    continue;
                }
                let mut visit = |a: usize, mass: f64, d_next: &mut [f64]| {
                    let cell = (h * s_n + s) * a_n + a;
                    let c = mass * gaps[cell];
                    if c != 0.0 {
                        out.push((cell as u32, c));
                        total += c;
                    }
                    let r = s * a_n + a;
                    let (lo, hi) = (offsets[r] as usize, offsets[r + 1] as usize);
                    for (&n, &q) in next[lo..hi].iter().zip(&prob[lo..hi]) {
                        d_next[n as usize] += mass * q;
                    }
                };
                match policy(h, s, &mut self.row) {
                    Some(a) => visit(a, ds, &mut self.d_next),
                    None => {
                        for (a, &p) in self.row.iter().enumerate() {
                            if p != 0.0 {
                                visit(a, ds * p, &mut self.d_next);
                            }
                        }
                    }
                }
            }
            std::mem::swap(&mut self.d, &mut self.d_next);
        }
        total
    }
}

struct RowValues<'a> {
    rewards: &'a [f64],
    offsets: &'a [u32],
    next: &'a [u32],
    prob: &'a [f64],
    v_next: &'a [f64],
    gamma: f64,
    /// A, the rows of a state.
    actions: usize,
    /// The state's first row, s·A.
    base: usize,
}

impl RowValues<'_> {
    /// A.
    #[inline]
    fn actions(&self) -> usize {
        self.actions
    }

    /// Q(s, a) = r̄(s,a) + γ·P(·|s,a)·V_{h+1}.
    #[inline]
    fn of(&self, a: usize) -> f64 {
        let row = self.base + a;
        let (lo, hi) = (self.offsets[row] as usize, self.offsets[row + 1] as usize);
        self.rewards[row] + self.gamma * expect(&self.next[lo..hi], &self.prob[lo..hi], self.v_next)
    }
}

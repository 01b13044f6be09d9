//! The finite-horizon tabular MDP: its validated in-memory form and how it is built.
//!
//! An [`Mdp`] can only be made by [`Mdp::from_parts`] (which generators call)
//! or by [`crate::model::json::parse_model`] (which files go through); both run
//! the same checks, so every `Mdp` in the program is valid and later code
//! (solver, learners) cannot fail on it.
//!
//! Steps are numbered h = 0..H−1 in code and shown to people as 1..H.

pub mod check;
pub mod json;
pub mod limits;

pub use crate::format::{Problem, Problems};

use check::Checker;

/// The reward distribution of one (step, state, action).
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Reward {
    /// Always this value.
    Fixed(f64),
    /// 1 with probability p, else 0.
    Bernoulli(f64),
    /// Uniform on [lo, hi].
    Uniform(f64, f64),
    /// Beta(α, β) on [0, 1].
    Beta(f64, f64),
}

impl Reward {
    /// Expected reward.
    pub fn mean(&self) -> f64 {
        match *self {
            Reward::Fixed(r) => r,
            Reward::Bernoulli(p) => p,
            Reward::Uniform(lo, hi) => 0.5 * (lo + hi),
            Reward::Beta(a, b) => a / (a + b),
        }
    }

    /// Smallest and largest value the reward can take.
    pub fn support(&self) -> (f64, f64) {
        match *self {
            Reward::Fixed(r) => (r, r),
            Reward::Bernoulli(_) => (0.0, 1.0),
            Reward::Uniform(lo, hi) => (lo, hi),
            Reward::Beta(_, _) => (0.0, 1.0),
        }
    }
}

/// The plain data of a model, as generators produce it; turned into an
/// [`Mdp`] by [`Mdp::from_parts`], which checks it.
#[derive(Debug, Clone, PartialEq)]
pub struct MdpParts {
    pub name: String,
    pub notes: Option<String>,
    pub horizon: usize,
    /// `None` when the file gave no discount (then γ = 1).
    pub discount: Option<f64>,
    pub states: Vec<String>,
    pub actions: Vec<String>,
    pub start: Vec<f64>,
    /// True: one step table used at every step; false: exactly H tables.
    pub stationary: bool,
    pub steps: Vec<StepParts>,
    /// Node positions for the graph view, one per state.
    pub layout: Option<Vec<[f64; 2]>>,
}

/// One step's tables, indexed by `s·A + a`.
#[derive(Debug, Clone, PartialEq)]
pub struct StepParts {
    /// Sparse rows: `(next_state, probability)` in the file's order.
    pub transitions: Vec<Vec<(u32, f64)>>,
    pub rewards: Vec<Reward>,
}

/// One step's transition kernel in compressed sparse rows and its rewards.
#[derive(Debug, Clone, PartialEq)]
pub struct Step {
    /// Row r = s·A + a occupies `next[offsets[r]..offsets[r+1]]`.
    offsets: Vec<u32>,
    next: Vec<u32>,
    prob: Vec<f64>,
    rewards: Vec<Reward>,
    mean_reward: Vec<f64>,
}

impl Step {
    /// Next states and their probabilities for row `r = s·A + a`.
    #[inline]
    pub fn row(&self, r: usize) -> (&[u32], &[f64]) {
        let lo = self.offsets[r] as usize;
        let hi = self.offsets[r + 1] as usize;
        (&self.next[lo..hi], &self.prob[lo..hi])
    }

    /// Reward distribution of row `r`.
    #[inline]
    pub fn reward(&self, r: usize) -> &Reward {
        &self.rewards[r]
    }

    /// Expected rewards, indexed by row.
    #[inline]
    pub fn mean_rewards(&self) -> &[f64] {
        &self.mean_reward
    }

    /// The whole CSR arrays (offsets, next states, probabilities).
    #[inline]
    pub fn csr(&self) -> (&[u32], &[u32], &[f64]) {
        (&self.offsets, &self.next, &self.prob)
    }

    /// Number of stored transition entries.
    pub fn entries(&self) -> usize {
        self.next.len()
    }
}

/// A validated finite-horizon tabular MDP.
#[derive(Debug, Clone, PartialEq)]
pub struct Mdp {
    name: String,
    notes: Option<String>,
    horizon: usize,
    discount: Option<f64>,
    states: Vec<String>,
    actions: Vec<String>,
    start: Vec<f64>,
    stationary: bool,
    steps: Vec<Step>,
    layout: Option<Vec<[f64; 2]>>,
}

impl Mdp {
    /// Checks `parts` and builds the model, or returns every problem found.
    pub fn from_parts(parts: MdpParts) -> Result<Mdp, Problems> {
        let mut c = Checker::default();
        c.check_parts(&parts);
        c.into_problems().into_result()?;
        Ok(Self::build_unchecked(parts))
    }

    /// Builds the CSR tables; `parts` must already have passed the checks.
    fn build_unchecked(parts: MdpParts) -> Mdp {
        let steps = parts
            .steps
            .into_iter()
            .map(|sp| {
                let mut offsets = Vec::with_capacity(sp.transitions.len() + 1);
                let total: usize = sp.transitions.iter().map(Vec::len).sum();
                let mut next = Vec::with_capacity(total);
                let mut prob = Vec::with_capacity(total);
                offsets.push(0u32);
                for mut row in sp.transitions {
                    check::normalise(&mut row, |e| &mut e.1);
                    for (n, p) in row {
                        next.push(n);
                        prob.push(p);
                    }
                    offsets.push(next.len() as u32);
                }
                let mean_reward = sp.rewards.iter().map(Reward::mean).collect();
                Step {
                    offsets,
                    next,
                    prob,
                    rewards: sp.rewards,
                    mean_reward,
                }
            })
            .collect();
        let mut start = parts.start;
        check::normalise(&mut start, |p| p);
        Mdp {
            name: parts.name,
            notes: parts.notes,
            horizon: parts.horizon,
            discount: parts.discount,
            states: parts.states,
            actions: parts.actions,
            start,
            stationary: parts.stationary,
            steps,
            layout: parts.layout,
        }
    }

    /// The plain data again (what [`json::write_model`] writes).
    pub fn to_parts(&self) -> MdpParts {
        let a = self.n_actions();
        MdpParts {
            name: self.name.clone(),
            notes: self.notes.clone(),
            horizon: self.horizon,
            discount: self.discount,
            states: self.states.clone(),
            actions: self.actions.clone(),
            start: self.start.clone(),
            stationary: self.stationary,
            steps: self
                .steps
                .iter()
                .map(|st| StepParts {
                    transitions: (0..self.n_states() * a)
                        .map(|r| {
                            let (n, p) = st.row(r);
                            n.iter().copied().zip(p.iter().copied()).collect()
                        })
                        .collect(),
                    rewards: st.rewards.clone(),
                })
                .collect(),
            layout: self.layout.clone(),
        }
    }

    pub fn name(&self) -> &str {
        &self.name
    }
    pub fn notes(&self) -> Option<&str> {
        self.notes.as_deref()
    }
    /// Horizon H.
    pub fn horizon(&self) -> usize {
        self.horizon
    }
    /// Discount γ (1 when the file gave none).
    pub fn discount(&self) -> f64 {
        self.discount.unwrap_or(1.0)
    }
    /// The discount exactly as the file gave it.
    pub fn discount_given(&self) -> Option<f64> {
        self.discount
    }
    /// Number of states S.
    pub fn n_states(&self) -> usize {
        self.states.len()
    }
    /// Number of actions A.
    pub fn n_actions(&self) -> usize {
        self.actions.len()
    }
    pub fn states(&self) -> &[String] {
        &self.states
    }
    pub fn actions(&self) -> &[String] {
        &self.actions
    }
    /// Initial-state distribution ρ.
    pub fn start(&self) -> &[f64] {
        &self.start
    }
    /// True when one table serves every step.
    pub fn is_stationary(&self) -> bool {
        self.stationary
    }
    /// The tables used at step h (0-based).
    #[inline]
    pub fn step(&self, h: usize) -> &Step {
        if self.stationary {
            &self.steps[0]
        } else {
            &self.steps[h]
        }
    }
    /// The distinct step tables (1 if stationary, else H).
    pub fn step_tables(&self) -> &[Step] {
        &self.steps
    }
    pub fn layout(&self) -> Option<&[[f64; 2]]> {
        self.layout.as_deref()
    }
    /// Replaces the node positions (one per state).
    pub fn set_layout(&mut self, layout: Option<Vec<[f64; 2]>>) -> Result<(), Problems> {
        if let Some(l) = &layout {
            let mut c = Checker::default();
            c.check_layout(l, self.n_states());
            c.into_problems().into_result()?;
        }
        self.layout = layout;
        Ok(())
    }
    /// Total stored transition entries over all step tables.
    pub fn entries(&self) -> usize {
        self.steps.iter().map(Step::entries).sum()
    }
    /// Smallest and largest reward any (h, s, a) can produce.
    pub fn reward_range(&self) -> (f64, f64) {
        let mut lo = f64::INFINITY;
        let mut hi = f64::NEG_INFINITY;
        for st in &self.steps {
            for r in &st.rewards {
                let (a, b) = r.support();
                lo = lo.min(a);
                hi = hi.max(b);
            }
        }
        (lo, hi)
    }
}

//! Online learners for finite-horizon tabular MDPs.
//!
//! A learner sees only S, A, H, the number of episodes K and the confidence
//! δ, and then its own trajectories. Every learner counts per step h (the
//! time-dependent setting), even on a stationary model. Ties in an argmax are
//! broken uniformly at random with the run's seeded generator.
//!
//! The runner asks each learner for the policy it will follow in the coming
//! episode ([`Learner::policy`]) and evaluates it exactly on the true model;
//! [`Learner::policy_version`] changes whenever that policy changes, so the
//! evaluation is cached while it does not.

mod bandit;
mod baseline;
mod mvp;
mod psrl;
mod qlearn;
mod ucbvi;

pub use bandit::Ucb1;
pub use baseline::{EpsGreedy, Uniform};
pub use mvp::Mvp;
pub use psrl::Psrl;
pub use qlearn::QUcbHoeffding;
pub use ucbvi::Ucbvi;

use rand::Rng;

/// The generator every run (learner and simulator) draws from: Xoshiro256++,
/// seeded through SplitMix64 by `seed_from_u64` (Blackman & Vigna, "Scrambled
/// Linear Pseudorandom Number Generators", ACM TOMS 47(4), 2021).
pub type LearnRng = rand_xoshiro::Xoshiro256PlusPlus;

/// What a learner is told about its problem.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Setting {
    pub states: usize,
    pub actions: usize,
    pub horizon: usize,
    /// K, the number of episodes the run will last.
    pub episodes: u64,
    /// δ, the failure probability of confidence-based learners.
    pub delta: f64,
}

impl Setting {
    /// Index of the row (h, s, a) in per-step tables.
    #[inline]
    pub fn row(&self, h: usize, s: usize, a: usize) -> usize {
        (h * self.states + s) * self.actions + a
    }
    /// Number of (h, s, a) rows.
    pub fn rows(&self) -> usize {
        self.horizon * self.states * self.actions
    }
    /// T = K·H, the total number of steps.
    pub fn steps(&self) -> f64 {
        self.episodes as f64 * self.horizon as f64
    }
}

/// The policy a learner follows in the coming episode, as the runner
/// evaluates it.
#[derive(Debug, Clone, Copy)]
pub enum PolicyView<'a> {
    /// A deterministic policy, `[h·S + s]` → action.
    Greedy(&'a [u32]),
    /// With probability ε a uniformly random action, else the greedy one.
    Mixed { greedy: &'a [u32], epsilon: f64 },
    /// Every action with probability 1/A.
    Uniform,
}

/// An online learner.
pub trait Learner: Send {
    /// Called before each episode; plans if the learner plans now.
    fn begin_episode(&mut self, rng: &mut LearnRng);
    /// The policy of the coming episode (valid after `begin_episode`).
    fn policy(&self) -> PolicyView<'_>;
    /// Changes whenever [`Learner::policy`] changes.
    fn policy_version(&self) -> u64;
    /// The action in state `s` at step `h`.
    fn act(&mut self, h: usize, s: usize, rng: &mut LearnRng) -> usize;
    /// One observed transition.
    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, rng: &mut LearnRng);
    /// Called after each episode.
    fn end_episode(&mut self, _rng: &mut LearnRng) {}
    /// How often the plan was recomputed (the initial plan included).
    fn model_updates(&self) -> u64;
}

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
    #[inline]
    pub fn add(&mut self, r: f64, next: usize) {
        self.n += 1;
        self.r_sum += r;
        self.r2_sum += r * r;
        let next = next as u32;
        match self.next.iter_mut().find(|e| e.0 == next) {
            Some(e) => e.1 += 1,
            None => self.next.push((next, 1)),
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

/// The maximiser of `q`, ties broken uniformly at random (reservoir
/// sampling over the tied actions; draws only when a tie occurs).
#[inline]
pub fn argmax_random(q: &[f64], rng: &mut LearnRng) -> usize {
    let mut best = f64::NEG_INFINITY;
    let mut pick = 0;
    let mut ties = 0u32;
    for (a, &x) in q.iter().enumerate() {
        if x > best {
            best = x;
            pick = a;
            ties = 1;
        } else if x == best {
            ties += 1;
            if rng.random_range(0..ties) == 0 {
                pick = a;
            }
        }
    }
    pick
}

/// Backward induction over a learner's own estimates. `q_of(h, s, a, v_next,
/// rng)` returns Q_h(s,a) given V_{h+1} (drawing from `rng` if it samples); `v` ((H+1)·S) and `policy` (H·S) are
/// filled, V_h(s) = max_a Q_h(s,a), the greedy action chosen with random
/// ties. Returns whether any action of `policy` changed.
fn plan(
    set: &Setting,
    v: &mut [f64],
    policy: &mut [u32],
    rng: &mut LearnRng,
    mut q_of: impl FnMut(usize, usize, usize, &[f64], &mut LearnRng) -> f64,
) -> bool {
    let (s_n, a_n, h_n) = (set.states, set.actions, set.horizon);
    let mut q = vec![0.0; a_n];
    let mut changed = false;
    v[h_n * s_n..].iter_mut().for_each(|x| *x = 0.0);
    for h in (0..h_n).rev() {
        let (now, next) = v.split_at_mut((h + 1) * s_n);
        let v_next = &next[..s_n];
        let v_now = &mut now[h * s_n..];
        for s in 0..s_n {
            for a in 0..a_n {
                q[a] = q_of(h, s, a, v_next, rng);
            }
            let best = argmax_random(&q, rng);
            v_now[s] = q[best];
            let slot = &mut policy[h * s_n + s];
            if *slot != best as u32 {
                *slot = best as u32;
                changed = true;
            }
        }
    }
    changed
}

/// A planning learner's current plan: its values, its greedy policy, how
/// often it was recomputed, and a version that changes with the policy.
#[derive(Debug, Clone)]
pub struct Plan {
    states: usize,
    v: Vec<f64>,
    policy: Vec<u32>,
    version: u64,
    updates: u64,
}

impl Plan {
    pub fn new(set: &Setting) -> Plan {
        Plan {
            states: set.states,
            v: vec![0.0; (set.horizon + 1) * set.states],
            policy: vec![u32::MAX; set.horizon * set.states],
            version: 0,
            updates: 0,
        }
    }

    /// Recomputes the plan by backward induction ([`plan`]), counting the
    /// update and changing the version if any action changed.
    pub fn replan(
        &mut self,
        set: &Setting,
        rng: &mut LearnRng,
        q_of: impl FnMut(usize, usize, usize, &[f64], &mut LearnRng) -> f64,
    ) {
        if plan(set, &mut self.v, &mut self.policy, rng, q_of) {
            self.version += 1;
        }
        self.updates += 1;
    }

    /// The planned action in state `s` at step `h`.
    #[inline]
    pub fn action(&self, h: usize, s: usize) -> usize {
        self.policy[h * self.states + s] as usize
    }

    pub fn policy(&self) -> &[u32] {
        &self.policy
    }

    pub fn version(&self) -> u64 {
        self.version
    }

    pub fn updates(&self) -> u64 {
        self.updates
    }
}

/// The published algorithm a learner implements, with its parameters.
#[derive(Debug, Clone, PartialEq)]
pub enum Algorithm {
    /// MVP with doubling batches (Zhang, Chen, Lee & Du 2024).
    Mvp { bonus_scale: f64 },
    /// UCBVI with the Hoeffding bonus (Azar, Osband & Munos 2017).
    UcbviHoeffding { bonus_scale: f64 },
    /// UCBVI with the Bernstein–Freedman bonus (Azar, Osband & Munos 2017).
    UcbviBernstein { bonus_scale: f64 },
    /// Optimistic Q-learning with the Hoeffding bonus (Jin et al. 2018).
    QUcbHoeffding { bonus_scale: f64 },
    /// Posterior sampling (Osband, Russo & Van Roy 2013).
    Psrl { prior: f64 },
    /// UCB1 for bandits (Auer, Cesa-Bianchi & Fischer 2002).
    Ucb1 { bonus_scale: f64 },
    /// Greedy on the empirical model, random with probability ε.
    EpsGreedy { epsilon: f64 },
    /// Uniformly random actions.
    Uniform,
}

impl Algorithm {
    /// The name used in files (`"algorithm"`).
    pub fn key(&self) -> &'static str {
        match self {
            Algorithm::Mvp { .. } => "mvp",
            Algorithm::UcbviHoeffding { .. } => "ucbvi-hoeffding",
            Algorithm::UcbviBernstein { .. } => "ucbvi-bernstein",
            Algorithm::QUcbHoeffding { .. } => "q-ucb-hoeffding",
            Algorithm::Psrl { .. } => "psrl",
            Algorithm::Ucb1 { .. } => "ucb1",
            Algorithm::EpsGreedy { .. } => "eps-greedy",
            Algorithm::Uniform => "uniform",
        }
    }

    /// Every algorithm key, in the order the docs list them.
    pub const KEYS: &'static [&'static str] = &[
        "mvp",
        "ucbvi-hoeffding",
        "ucbvi-bernstein",
        "q-ucb-hoeffding",
        "psrl",
        "ucb1",
        "eps-greedy",
        "uniform",
    ];

    /// A default label: the key and its non-default parameter.
    pub fn default_label(&self) -> String {
        match *self {
            Algorithm::Mvp { bonus_scale: b }
            | Algorithm::UcbviHoeffding { bonus_scale: b }
            | Algorithm::UcbviBernstein { bonus_scale: b }
            | Algorithm::QUcbHoeffding { bonus_scale: b }
            | Algorithm::Ucb1 { bonus_scale: b }
                if b != 1.0 =>
            {
                format!("{} ×{}", self.key(), b)
            }
            Algorithm::EpsGreedy { epsilon } => format!("eps-greedy ε={epsilon}"),
            Algorithm::Psrl { prior } if prior != 1.0 => format!("psrl prior {prior}"),
            _ => self.key().to_string(),
        }
    }

    /// The same algorithm with its bonus scale set to `b` (unchanged if it has none).
    pub fn with_bonus_scale(&self, b: f64) -> Algorithm {
        match self {
            Algorithm::Mvp { .. } => Algorithm::Mvp { bonus_scale: b },
            Algorithm::UcbviHoeffding { .. } => Algorithm::UcbviHoeffding { bonus_scale: b },
            Algorithm::UcbviBernstein { .. } => Algorithm::UcbviBernstein { bonus_scale: b },
            Algorithm::QUcbHoeffding { .. } => Algorithm::QUcbHoeffding { bonus_scale: b },
            Algorithm::Ucb1 { .. } => Algorithm::Ucb1 { bonus_scale: b },
            other => other.clone(),
        }
    }

    /// Why this algorithm cannot run in `set`, if it cannot.
    pub fn check_setting(&self, set: &Setting) -> Result<(), String> {
        match self {
            Algorithm::Ucb1 { .. } if set.states != 1 || set.horizon != 1 => Err(format!(
                "ucb1 is for bandits (S = 1, H = 1); this model has S = {}, H = {}",
                set.states, set.horizon
            )),
            _ => Ok(()),
        }
    }

    /// Builds the learner, or says why it cannot run in this setting.
    pub fn build(&self, set: &Setting) -> Result<Box<dyn Learner>, String> {
        self.check_setting(set)?;
        Ok(match *self {
            Algorithm::Mvp { bonus_scale } => Box::new(Mvp::new(*set, bonus_scale)),
            Algorithm::UcbviHoeffding { bonus_scale } => {
                Box::new(Ucbvi::new(*set, bonus_scale, false))
            }
            Algorithm::UcbviBernstein { bonus_scale } => {
                Box::new(Ucbvi::new(*set, bonus_scale, true))
            }
            Algorithm::QUcbHoeffding { bonus_scale } => {
                Box::new(QUcbHoeffding::new(*set, bonus_scale))
            }
            Algorithm::Psrl { prior } => Box::new(Psrl::new(*set, prior)),
            Algorithm::Ucb1 { bonus_scale } => Box::new(Ucb1::new(set.actions, bonus_scale)),
            Algorithm::EpsGreedy { epsilon } => Box::new(EpsGreedy::new(*set, epsilon)),
            Algorithm::Uniform => Box::new(Uniform::new(set.actions)),
        })
    }
}

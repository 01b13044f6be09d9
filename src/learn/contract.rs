//! The learner contract: what a learner is told ([`Setting`]), what it
//! gives back before each episode ([`PolicyView`]), and the calls the runner
//! makes ([`Learner`]). A learner sees only S, A, H, K, δ and its own
//! trajectories, never the model.

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
    /// Any Markov policy: `[(h·S + s)·A + a]` → probability of action a.
    Table(&'a [f64]),
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
    /// Why the learner cannot go on, once, after the call that failed (a
    /// guest learner's error; built-in learners never fail).
    fn fault(&mut self) -> Option<String> {
        None
    }
    /// A certificate for the coming episode (valid after `begin_episode`):
    /// an upper bound, claimed with probability 1 − δ, on the suboptimality
    /// V*₁(s) − V^π₁(s) of [`Learner::policy`] from start state `s`. Only
    /// learners whose analysis proves one give it (ORLC's optimality
    /// certificate, Dann, Li, Wei & Brunskill 2019); the runner weighs it by
    /// the true start distribution, as it does the regret.
    fn certificate(&self, _s: usize) -> Option<f64> {
        None
    }
}

impl<L: Learner + ?Sized> Learner for Box<L> {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        (**self).begin_episode(rng)
    }
    fn policy(&self) -> PolicyView<'_> {
        (**self).policy()
    }
    fn policy_version(&self) -> u64 {
        (**self).policy_version()
    }
    fn act(&mut self, h: usize, s: usize, rng: &mut LearnRng) -> usize {
        (**self).act(h, s, rng)
    }
    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, rng: &mut LearnRng) {
        (**self).observe(h, s, a, r, next, rng)
    }
    fn end_episode(&mut self, rng: &mut LearnRng) {
        (**self).end_episode(rng)
    }
    fn model_updates(&self) -> u64 {
        (**self).model_updates()
    }
    fn fault(&mut self) -> Option<String> {
        (**self).fault()
    }
    fn certificate(&self, s: usize) -> Option<f64> {
        (**self).certificate(s)
    }
}

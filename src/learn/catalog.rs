//! The catalogue of built-in algorithms: the one place that says, for each,
//! its key in files, its display name, its parameter (with default, range and
//! meaning), its published source, where it can run and which published bound
//! belongs to it. The experiment reader, the default labels, the sweeps, the
//! theory bounds, the benchmarks, the CLI and the page (through the worker)
//! are all built from [`ALGORITHMS`].
//!
//! Adding a learner: its own file in `src/learn/`, one [`AlgorithmKind`]
//! variant, one [`AlgorithmInfo`] entry below, and one arm in
//! [`Algorithm::build`] and [`AnyLearner`].

use serde::Serialize;

use super::{
    EpsGreedy, Euler, LearnRng, Learner, Mvp, MvpSamples, Opsrl, Orlc, PolicyView, Psrl,
    QEarlySettled, QUcb, Rlsvi, Setting, Ucb1, UcbAdvantage, Ucbvi, Uniform,
};
use crate::theory::{self, Bound};

/// Which built-in algorithm.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum AlgorithmKind {
    Mvp,
    Mvp2021,
    UcbviHoeffding,
    UcbviBernstein,
    Euler,
    Orlc,
    QUcbHoeffding,
    QUcbBernstein,
    UcbAdvantage,
    QEarlySettled,
    Psrl,
    Opsrl,
    Rlsvi,
    Ucb1,
    EpsGreedy,
    Uniform,
}

/// An algorithm's one numeric parameter.
#[derive(Debug, Serialize)]
pub struct ParamInfo {
    /// The key in files and sweeps (`"bonus_scale"`).
    pub key: &'static str,
    /// How people call it (`"bonus scale"`).
    pub name: &'static str,
    pub default: f64,
    /// Smallest value allowed (excluded when `min_open`).
    pub min: f64,
    pub min_open: bool,
    /// Largest value allowed (None: no upper bound).
    pub max: Option<f64>,
    /// What the parameter does, in a sentence.
    pub help: &'static str,
    /// The allowed range in words, as messages say it ("a bonus scale > 0").
    pub want: &'static str,
    /// How a default label writes the value: the key, this, the value.
    #[serde(skip)]
    label: &'static str,
    /// The default label shows the value even at its default.
    #[serde(skip)]
    label_always: bool,
}

impl ParamInfo {
    /// Whether `x` is in the parameter's range.
    pub fn allows(&self, x: f64) -> bool {
        let above = if self.min_open {
            x > self.min
        } else {
            x >= self.min
        };
        x.is_finite() && above && self.max.is_none_or(|m| x <= m)
    }

    /// `Ok` or "expected {want}, found {x}".
    pub fn check(&self, x: f64) -> Result<(), String> {
        if self.allows(x) {
            Ok(())
        } else {
            Err(format!("expected {}, found {x}", self.want))
        }
    }
}

/// One built-in algorithm, as every front end shows it.
#[derive(Debug, Serialize)]
pub struct AlgorithmInfo {
    #[serde(skip)]
    pub kind: AlgorithmKind,
    /// The key in files (`"algorithm"`).
    pub key: &'static str,
    /// The display name.
    pub name: &'static str,
    pub param: Option<&'static ParamInfo>,
    /// Where it is published (or "common practice").
    pub reference: &'static str,
    /// Runs only on bandits (S = 1, H = 1).
    pub bandit_only: bool,
    /// Whether a published regret bound is drawn beside it.
    pub has_bound: bool,
    /// Its published regret bound as an order, when it has one.
    #[serde(skip)]
    pub bound: Option<fn(&Setting, &[u64]) -> Bound>,
}

const BONUS_HELP: &str =
    "multiplies the exploration bonus; 1 is the published constant, below 1 explores less";

static BONUS: ParamInfo = ParamInfo {
    key: "bonus_scale",
    name: "bonus scale",
    default: 1.0,
    min: 0.0,
    min_open: true,
    max: None,
    help: BONUS_HELP,
    want: "a bonus scale > 0",
    label: " ×",
    label_always: false,
};

static EPSILON: ParamInfo = ParamInfo {
    key: "epsilon",
    name: "ε",
    default: 0.1,
    min: 0.0,
    min_open: false,
    max: Some(1.0),
    help: "probability of a uniformly random action at each step",
    want: "a probability ε in [0, 1]",
    label: " ε=",
    label_always: true,
};

static PRIOR: ParamInfo = ParamInfo {
    key: "prior",
    name: "prior",
    default: 1.0,
    min: 0.0,
    min_open: true,
    // S·α₀ stays finite (the posterior draw normalises S Gamma variates).
    max: Some(1e100),
    help: "α₀ of the Dirichlet prior on each transition row; 1 is uniform on the simplex",
    want: "a prior 0 < α₀ ≤ 1e100",
    label: " prior ",
    label_always: false,
};

/// Every built-in algorithm, in the order the docs and the page list them.
pub static ALGORITHMS: &[AlgorithmInfo] = &[
    AlgorithmInfo {
        kind: AlgorithmKind::Mvp,
        key: "mvp",
        name: "MVP (doubling batches)",
        param: Some(&BONUS),
        reference: "Zhang, Chen, Lee & Du, Settling the Sample Complexity of Online Reinforcement Learning, COLT 2024, arXiv:2307.13586",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::mvp),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Mvp2021,
        key: "mvp-2021",
        name: "MVP (2021)",
        param: Some(&BONUS),
        reference: "Zhang, Ji & Du, Is Reinforcement Learning More Difficult Than Bandits? A Near-optimal Algorithm Escaping the Curse of Horizon, COLT 2021, arXiv:2009.13503 (as Remark 1 of arXiv:2307.13586 describes it)",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::mvp_2021),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::UcbviHoeffding,
        key: "ucbvi-hoeffding",
        name: "UCBVI, Hoeffding bonus",
        param: Some(&BONUS),
        reference: "Azar, Osband & Munos, Minimax Regret Bounds for Reinforcement Learning, ICML 2017, arXiv:1703.05449",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::ucbvi_hoeffding),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::UcbviBernstein,
        key: "ucbvi-bernstein",
        name: "UCBVI, Bernstein bonus",
        param: Some(&BONUS),
        reference: "Azar, Osband & Munos, Minimax Regret Bounds for Reinforcement Learning, ICML 2017, arXiv:1703.05449",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::ucbvi_bernstein),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Euler,
        key: "euler",
        name: "EULER (upper and lower value bounds)",
        param: Some(&BONUS),
        reference: "Zanette & Brunskill, Tighter Problem-Dependent Regret Bounds in Reinforcement Learning without Domain Knowledge using Value Function Bounds, ICML 2019, arXiv:1901.00210 (bonuses as recalled, full text not read)",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::euler),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Orlc,
        key: "orlc",
        name: "ORLC (policy certificates)",
        param: Some(&BONUS),
        reference: "Dann, Li, Wei & Brunskill, Policy Certificates: Towards Accountable Reinforcement Learning, ICML 2019, arXiv:1811.03056",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::orlc),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::QUcbHoeffding,
        key: "q-ucb-hoeffding",
        name: "Q-learning, UCB-Hoeffding",
        param: Some(&BONUS),
        reference: "Jin, Allen-Zhu, Bubeck & Jordan, Is Q-learning Provably Efficient?, NeurIPS 2018, arXiv:1807.03765",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::q_ucb_hoeffding),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::QUcbBernstein,
        key: "q-ucb-bernstein",
        name: "Q-learning, UCB-Bernstein",
        param: Some(&BONUS),
        reference: "Jin, Allen-Zhu, Bubeck & Jordan, Is Q-learning Provably Efficient?, NeurIPS 2018, arXiv:1807.03765, Appendix C",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::q_ucb_bernstein),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::UcbAdvantage,
        key: "ucb-advantage",
        name: "UCB-Advantage",
        param: Some(&BONUS),
        reference: "Zhang, Zhou & Ji, Almost Optimal Model-Free Reinforcement Learning via Reference-Advantage Decomposition, NeurIPS 2020, arXiv:2004.10019 (Algorithm 1 as recalled, not read)",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::ucb_advantage),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::QEarlySettled,
        key: "q-early-settled",
        name: "Q-EarlySettled-Advantage",
        param: Some(&BONUS),
        reference: "Li, Shi, Chen, Gu & Chi, Breaking the Sample Complexity Barrier to Regret-Optimal Model-Free Reinforcement Learning, NeurIPS 2021, arXiv:2110.04645 (Algorithm 1 as recalled: full text not read)",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::q_early_settled),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Psrl,
        key: "psrl",
        name: "PSRL (posterior sampling)",
        param: Some(&PRIOR),
        reference: "Osband, Russo & Van Roy, (More) Efficient Reinforcement Learning via Posterior Sampling, NeurIPS 2013, arXiv:1306.0940",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::psrl),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Opsrl,
        key: "opsrl",
        name: "OPSRL (optimistic posterior sampling)",
        param: Some(&BONUS),
        reference: "Tiapkin, Belomestny, Calandriello, Moulines, Munos, Naumov, Rowland, Valko & Ménard, Optimistic Posterior Sampling for Reinforcement Learning with Few Samples and Tight Guarantees, NeurIPS 2022, arXiv:2209.14414 (abstract read; the algorithm's constants recalled)",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::opsrl),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Rlsvi,
        key: "rlsvi",
        name: "RLSVI (randomised value functions)",
        param: Some(&BONUS),
        reference: "Osband, Van Roy & Wen, Generalization and Exploration via Randomized Value Functions, ICML 2016, arXiv:1402.0635; tabular form and noise variance of Russo, Worst-Case Regret Bounds for Exploration via Randomized Value Functions, NeurIPS 2019, arXiv:1906.02870",
        bandit_only: false,
        has_bound: true,
        bound: Some(theory::rlsvi),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Ucb1,
        key: "ucb1",
        name: "UCB1 (bandits only)",
        param: Some(&BONUS),
        reference: "Auer, Cesa-Bianchi & Fischer, Finite-time Analysis of the Multiarmed Bandit Problem, Machine Learning 47, 2002",
        bandit_only: true,
        has_bound: true,
        bound: Some(theory::ucb1),
    },
    AlgorithmInfo {
        kind: AlgorithmKind::EpsGreedy,
        key: "eps-greedy",
        name: "ε-greedy (empirical model)",
        param: Some(&EPSILON),
        reference: "common practice (no single source)",
        bandit_only: false,
        has_bound: false,
        bound: None,
    },
    AlgorithmInfo {
        kind: AlgorithmKind::Uniform,
        key: "uniform",
        name: "Uniform random",
        param: None,
        reference: "common practice (no single source)",
        bandit_only: false,
        has_bound: false,
        bound: None,
    },
];

impl AlgorithmKind {
    /// This algorithm's catalogue entry.
    pub fn info(self) -> &'static AlgorithmInfo {
        ALGORITHMS
            .iter()
            .find(|i| i.kind == self)
            .expect("every kind has a catalogue entry")
    }

    /// The algorithm of a file key.
    pub fn from_key(key: &str) -> Option<AlgorithmKind> {
        ALGORITHMS.iter().find(|i| i.key == key).map(|i| i.kind)
    }
}

/// Every algorithm key, comma-separated, as messages list them.
pub fn keys() -> String {
    ALGORITHMS
        .iter()
        .map(|i| i.key)
        .collect::<Vec<_>>()
        .join(", ")
}

/// A built-in algorithm with its parameter's value.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Algorithm {
    pub kind: AlgorithmKind,
    /// The parameter's value (0 for an algorithm without one).
    pub param: f64,
}

impl Algorithm {
    /// The algorithm with its parameter at the catalogue's default.
    pub fn new(kind: AlgorithmKind) -> Algorithm {
        Algorithm {
            kind,
            param: kind.info().param.map_or(0.0, |p| p.default),
        }
    }

    /// The algorithm with parameter `x` (unchecked; see [`ParamInfo::check`]).
    pub fn with(kind: AlgorithmKind, x: f64) -> Algorithm {
        Algorithm { kind, param: x }
    }

    pub fn info(&self) -> &'static AlgorithmInfo {
        self.kind.info()
    }

    /// The name used in files (`"algorithm"`).
    pub fn key(&self) -> &'static str {
        self.info().key
    }

    /// A default label: the key, and the parameter where it is not the
    /// default (ε always).
    pub fn default_label(&self) -> String {
        let info = self.info();
        match info.param {
            Some(p) if p.label_always || self.param != p.default => {
                // Extreme values are written with an exponent, so a
                // default label always fits the label limit.
                let value = crate::format::readable(self.param);
                format!("{}{}{value}", info.key, p.label)
            }
            _ => info.key.to_string(),
        }
    }

    /// The same algorithm with parameter `key` set to `x`, when it takes one.
    pub fn with_param(&self, key: &str, x: f64) -> Option<Algorithm> {
        (self.info().param?.key == key).then_some(Algorithm {
            kind: self.kind,
            param: x,
        })
    }

    /// Why this algorithm cannot run in `set`, if it cannot.
    pub fn check_setting(&self, set: &Setting) -> Result<(), String> {
        if self.info().bandit_only && (set.states != 1 || set.horizon != 1) {
            return Err(format!(
                "{} is for bandits (S = 1, H = 1); this model has S = {}, H = {}",
                self.key(),
                set.states,
                set.horizon
            ));
        }
        Ok(())
    }

    /// Its published regret bound at the checkpoints `ks`, if it has one;
    /// marked as not applying when its bonus is scaled (the theorems hold
    /// for the published constants, scale 1, only).
    pub fn bound(&self, set: &Setting, ks: &[u64]) -> Option<Bound> {
        let mut b = self.info().bound.map(|b| b(set, ks))?;
        let scaled =
            self.info().param.is_some_and(|p| std::ptr::eq(p, &BONUS)) && self.param != 1.0;
        if scaled {
            b.applies = false;
            b.bonus_below_h = None;
            b.note = format!(
                "does not apply: the bonus is scaled by {} (the bound holds for the published constants, scale 1)",
                self.param
            );
        }
        Some(b)
    }

    /// Builds the learner, or says why it cannot run in this setting.
    pub fn build(&self, set: &Setting) -> Result<AnyLearner, String> {
        self.check_setting(set)?;
        let (set, x) = (*set, self.param);
        Ok(match self.kind {
            AlgorithmKind::Mvp => AnyLearner::Mvp(Mvp::new(set, x)),
            AlgorithmKind::Mvp2021 => AnyLearner::Mvp(Mvp::with_samples(set, x, MvpSamples::All)),
            AlgorithmKind::UcbviHoeffding => AnyLearner::Ucbvi(Ucbvi::new(set, x, false)),
            AlgorithmKind::UcbviBernstein => AnyLearner::Ucbvi(Ucbvi::new(set, x, true)),
            AlgorithmKind::Euler => AnyLearner::Euler(Euler::new(set, x)),
            AlgorithmKind::Orlc => AnyLearner::Orlc(Orlc::new(set, x)),
            AlgorithmKind::QUcbHoeffding => AnyLearner::QUcb(QUcb::new(set, x, false)),
            AlgorithmKind::QUcbBernstein => AnyLearner::QUcb(QUcb::new(set, x, true)),
            AlgorithmKind::UcbAdvantage => AnyLearner::UcbAdvantage(UcbAdvantage::new(set, x)),
            AlgorithmKind::QEarlySettled => AnyLearner::QEarlySettled(QEarlySettled::new(set, x)),
            AlgorithmKind::Psrl => AnyLearner::Psrl(Psrl::new(set, x)),
            AlgorithmKind::Opsrl => AnyLearner::Opsrl(Opsrl::new(set, x)),
            AlgorithmKind::Rlsvi => AnyLearner::Rlsvi(Rlsvi::new(set, x)),
            AlgorithmKind::Ucb1 => AnyLearner::Ucb1(Ucb1::new(set.actions, x)),
            AlgorithmKind::EpsGreedy => AnyLearner::EpsGreedy(EpsGreedy::new(set, x)),
            AlgorithmKind::Uniform => AnyLearner::Uniform(Uniform::new(set.actions)),
        })
    }
}

/// Any learner, by value: the runner matches on it once per call and runs a
/// loop compiled for that learner (static calls the compiler can inline),
/// instead of two dynamic calls per step.
pub enum AnyLearner {
    Mvp(Mvp),
    Ucbvi(Ucbvi),
    Euler(Euler),
    Orlc(Orlc),
    QUcb(QUcb),
    UcbAdvantage(UcbAdvantage),
    QEarlySettled(QEarlySettled),
    Psrl(Psrl),
    Opsrl(Opsrl),
    Rlsvi(Rlsvi),
    Ucb1(Ucb1),
    EpsGreedy(EpsGreedy),
    Uniform(Uniform),
    /// A user's learner (`learn::guest`), boxed: it is larger than the rest
    /// and its cost is in the guest, not in this call.
    Guest(Box<super::GuestLearner>),
}

/// `with_learner!(any, l => expr)`: evaluates `expr` with `l` bound to the
/// concrete learner inside `any` (a `&mut AnyLearner` or `&AnyLearner`).
#[macro_export]
#[doc(hidden)]
macro_rules! with_learner {
    ($any:expr, $l:ident => $body:expr) => {
        match $any {
            $crate::learn::AnyLearner::Mvp($l) => $body,
            $crate::learn::AnyLearner::Ucbvi($l) => $body,
            $crate::learn::AnyLearner::Euler($l) => $body,
            $crate::learn::AnyLearner::Orlc($l) => $body,
            $crate::learn::AnyLearner::QUcb($l) => $body,
            $crate::learn::AnyLearner::UcbAdvantage($l) => $body,
            $crate::learn::AnyLearner::QEarlySettled($l) => $body,
            $crate::learn::AnyLearner::Psrl($l) => $body,
            $crate::learn::AnyLearner::Opsrl($l) => $body,
            $crate::learn::AnyLearner::Rlsvi($l) => $body,
            $crate::learn::AnyLearner::Ucb1($l) => $body,
            $crate::learn::AnyLearner::EpsGreedy($l) => $body,
            $crate::learn::AnyLearner::Uniform($l) => $body,
            $crate::learn::AnyLearner::Guest($l) => $body,
        }
    };
}
pub use with_learner;

impl Learner for AnyLearner {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        with_learner!(self, l => l.begin_episode(rng))
    }
    fn policy(&self) -> PolicyView<'_> {
        with_learner!(self, l => l.policy())
    }
    fn policy_version(&self) -> u64 {
        with_learner!(self, l => l.policy_version())
    }
    fn act(&mut self, h: usize, s: usize, rng: &mut LearnRng) -> usize {
        with_learner!(self, l => l.act(h, s, rng))
    }
    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, rng: &mut LearnRng) {
        with_learner!(self, l => l.observe(h, s, a, r, next, rng))
    }
    fn end_episode(&mut self, rng: &mut LearnRng) {
        with_learner!(self, l => l.end_episode(rng))
    }
    fn model_updates(&self) -> u64 {
        with_learner!(self, l => l.model_updates())
    }
    fn fault(&mut self) -> Option<String> {
        with_learner!(self, l => l.fault())
    }
    fn certificate(&self, s: usize) -> Option<f64> {
        with_learner!(self, l => l.certificate(s))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every kind has exactly one entry and keys are unique (the catalogue
    /// is the one home of these facts).
    #[test]
    fn every_kind_has_one_entry_with_a_unique_key() {
        for (i, a) in ALGORITHMS.iter().enumerate() {
            assert_eq!(a.kind.info().key, a.key);
            assert_eq!(AlgorithmKind::from_key(a.key), Some(a.kind));
            assert!(
                ALGORITHMS[..i]
                    .iter()
                    .all(|b| b.key != a.key && b.kind != a.kind)
            );
            assert_eq!(a.has_bound, a.bound.is_some(), "{}", a.key);
            if let Some(p) = a.param {
                assert!(p.allows(p.default), "{}: default in range", a.key);
            }
        }
    }
}

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
//!
//! Where things are: the contract in `contract.rs`, shared statistics in
//! `counts.rs`, planning in `plan.rs`, the catalogue of algorithms in
//! `catalog.rs`, and one file per algorithm.

mod bandit;
mod baseline;
mod catalog;
mod contract;
mod counts;
mod early_settled;
mod euler;
mod greedy;
mod guest;
mod mvp;
mod opsrl;
mod orlc;
mod plan;
mod psrl;
mod qlearn;
mod rlsvi;
mod two_sided;
mod ucb_advantage;
mod ucbvi;

pub use bandit::Ucb1;
pub use baseline::{EpsGreedy, Uniform};
pub use catalog::{
    ALGORITHMS, Algorithm, AlgorithmInfo, AlgorithmKind, AnyLearner, ParamInfo, keys, with_learner,
};
pub use contract::{LearnRng, Learner, PolicyView, Setting};
pub use counts::RowCounts;
pub use early_settled::{
    EARLY_SETTLED_CB, EarlySettledRow, EarlySettledState, QEarlySettled, SETTLE_GAP,
};
pub use euler::{Euler, log_factor as euler_log_factor};
pub use guest::{
    Batch, Decision, GUEST_PROTOCOL, GUEST_VERSION, Guest, GuestHost, GuestIntro, GuestLearner,
    GuestPolicy, GuestStep, Guests, MAX_BATCH, MAX_BATCH_STEPS, MAX_STEP_TEXT, ROW_SUM_TOLERANCE,
    max_batch, repeated_key,
};
pub use mvp::{
    FrozenStats, Mvp, MvpSamples, largest_bonus as mvp_largest_bonus, log_factor as mvp_log_factor,
    visits_for_bonus_below_h as mvp_visits_for_bonus_below_h,
};
pub use opsrl::{
    Opsrl, OpsrlParams, dirichlet as opsrl_dirichlet, log_term as opsrl_log_term,
    optimistic_probability as opsrl_optimistic_probability, samples as opsrl_samples,
};
pub use orlc::{Orlc, delta_prime as orlc_delta_prime, phi as orlc_phi};
pub use plan::{Plan, StaleRows, argmax_random};
pub use psrl::Psrl;
pub use qlearn::{BERNSTEIN_C1, BERNSTEIN_C2, QUcb, learning_rate};
pub use rlsvi::{Rlsvi, beta as rlsvi_beta};
pub use ucb_advantage::{
    REFERENCE_C4, UcbAdvantage, log_factor as ucb_advantage_log_factor, next_stage_length,
    reference_threshold,
};
pub use ucbvi::Ucbvi;

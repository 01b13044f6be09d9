//! Burnin's core: finite-horizon tabular MDPs, their exact solution, model
//! generators, and (in later modules) learners and regret experiments.
//!
//! **Invariant:** nothing in the core touches JS types, the file system, the
//! clock, threads or an unseeded random generator; every random draw comes
//! from a generator passed in by the caller.

pub mod bench;
pub mod experiment;
pub mod generate;
pub mod lax;
pub mod learn;
pub mod model;
pub mod sample;
pub mod solve;
pub mod stats;
pub mod theory;

#[cfg(target_arch = "wasm32")]
pub mod wasm;

pub use model::json::{parse_model, write_model};
pub use model::{Mdp, MdpParts, Problem, Problems, Reward, StepParts};

//! Burnin's core: finite-horizon tabular MDPs (`model`), their exact solution
//! (`solve`), seeded generators (`generate`), online learners and their
//! catalogue (`learn`), regret experiments with exact expected regret, their
//! summaries and shards (`experiment`), statistics and published bounds
//! (`stats`, `theory`), charts of results (`chart`), the file-format plumbing (`format`) and the reference
//! benchmarks (`bench`). The CLI (`src/bin/burnin/`) and the wasm bindings
//! (`wasm`, for the page) are front ends over it; `native` is the native
//! front ends' clock and threads for the runner.
//!
//! **Invariant:** nothing in the core touches JS types, the file system, the
//! clock, threads or an unseeded random generator; every random draw comes
//! from a generator passed in by the caller.

pub mod bench;
pub mod catalogue;
pub mod chart;
pub mod experiment;
pub mod format;
pub mod generate;
pub mod learn;
pub mod model;
pub mod sample;
pub mod solve;
pub mod stats;
pub mod theory;

#[cfg(not(target_arch = "wasm32"))]
pub mod native;
#[cfg(target_arch = "wasm32")]
pub mod wasm;

/// This build: the crate's version and a short digest of the core's
/// source (build.rs), as `burnin --version`, the page and results files
/// show it: two people comparing numbers can see whether they ran the same
/// build.
pub const BUILD: &str = concat!(env!("CARGO_PKG_VERSION"), "+", env!("BURNIN_CORE_DIGEST"));

pub use model::json::{parse_model, write_model};
pub use model::{Mdp, MdpParts, Problem, Problems, Reward, StepParts};

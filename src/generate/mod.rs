//! Seeded model generators. Each takes its parameters and a seed, checks the
//! parameters (a [`ParamError`] names the offending one), and returns a valid
//! [`Mdp`] built through [`Mdp::from_parts`].
//!
//! **Invariant:** every draw comes from a `ChaCha8Rng` seeded with the given
//! seed, drawing only `u32`, `u64` and `f64` values, so a seed gives the same
//! model on every platform (native and wasm32 alike).
//!
//! One file per generator; the catalogue of them all (parameters, defaults,
//! ranges, help, sources) is `catalog.rs`.

mod bandit;
pub mod catalog;
mod drift_grid;
mod garnet;
mod lock;
mod lower_bound;
mod river;

pub use bandit::Bandit;
pub use catalog::{
    GENERATORS, GenParam, GeneratorInfo, GeneratorSpec, ParamKind, ParamValue, Values, kinds,
};
pub use drift_grid::DriftGrid;
pub use garnet::Garnet;
pub use lock::Lock;
pub use lower_bound::LowerBound;
pub use river::RiverChain;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

use crate::model::{Mdp, MdpParts};

/// A generator parameter out of its range.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ParamError {
    /// The parameter's name (as the CLI option and the page's field call it).
    pub param: &'static str,
    pub message: String,
}

impl std::fmt::Display for ParamError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "{}: {}", self.param, self.message)
    }
}

impl std::error::Error for ParamError {}

fn bad(param: &'static str, message: impl Into<String>) -> ParamError {
    ParamError {
        param,
        message: message.into(),
    }
}

fn need_range(param: &'static str, v: usize, lo: usize, hi: usize) -> Result<(), ParamError> {
    if v < lo || v > hi {
        Err(bad(param, format!("{v} is outside {lo}..={hi}")))
    } else {
        Ok(())
    }
}

/// The sizes of the model a generator is about to build, checked against the
/// model limits ([`crate::model::limits`]) before anything proportional to
/// them is allocated. `tables` is 1 for a time-homogeneous model and H
/// otherwise; `per_row` bounds the next states of one (state, action) row.
/// A size over a limit is blamed on `blame`, the parameter that drives it.
struct Sizes {
    states: u128,
    actions: u128,
    horizon: u128,
    tables: u128,
    per_row: u128,
}

impl Sizes {
    fn check(&self, blame: &'static str) -> Result<(), ParamError> {
        use crate::model::limits::{MAX_ACTIONS, MAX_CELLS, MAX_ENTRIES, MAX_HORIZON, MAX_STATES};
        let (s, a, h) = (self.states, self.actions, self.horizon);
        let over = |what: String| Err(bad(blame, what));
        if s > MAX_STATES as u128 {
            return over(format!(
                "the model would have {s} states, over the limit of {MAX_STATES}"
            ));
        }
        if a > MAX_ACTIONS as u128 {
            return over(format!(
                "the model would have {a} actions, over the limit of {MAX_ACTIONS}"
            ));
        }
        if h > MAX_HORIZON as u128 {
            return over(format!(
                "the horizon would be {h}, over the limit of {MAX_HORIZON}"
            ));
        }
        let cells = h * s * a;
        if cells > MAX_CELLS as u128 {
            return over(format!(
                "H·S·A = {h}·{s}·{a} = {cells} is over the limit of {MAX_CELLS} (step, state, action) cells"
            ));
        }
        let entries = self.tables * s * a * self.per_row;
        if entries > MAX_ENTRIES as u128 {
            return over(format!(
                "up to {entries} transition entries is over the limit of {MAX_ENTRIES}"
            ));
        }
        Ok(())
    }
}

/// The model from checked parts. A generator checks its [`Sizes`] first, so
/// this fails only on a generator's bug; it is reported, never a panic.
fn finish(parts: MdpParts, blame: &'static str) -> Result<Mdp, ParamError> {
    Mdp::from_parts(parts).map_err(|p| {
        bad(
            blame,
            format!("the generated model is invalid (a bug in the generator): {p}"),
        )
    })
}

fn rng(seed: u64) -> ChaCha8Rng {
    ChaCha8Rng::seed_from_u64(seed)
}

/// A uniform index in 0..n drawn as a u32 (portable across pointer widths).
fn index(rng: &mut ChaCha8Rng, n: usize) -> usize {
    rng.random_range(0..n as u32) as usize
}

fn labels(prefix: &str, n: usize) -> Vec<String> {
    (0..n).map(|i| format!("{prefix}{i}")).collect()
}

fn point_start(s: usize, at: usize) -> Vec<f64> {
    let mut v = vec![0.0; s];
    v[at] = 1.0;
    v
}

/// Adds `p` to the entry for `to`, keeping each next state once. Sums are
/// rounded to 15 significant digits so that 0.9 + 0.05 is written as 0.95.
fn add(row: &mut Vec<(u32, f64)>, to: usize, p: f64) {
    if p <= 0.0 {
        return;
    }
    let tidy = |x: f64| format!("{x:.14e}").parse::<f64>().unwrap_or(x);
    match row.iter_mut().find(|e| e.0 == to as u32) {
        Some(e) => e.1 = tidy(e.1 + p),
        None => row.push((to as u32, tidy(p))),
    }
}

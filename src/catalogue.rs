//! Everything a front end lists, from its one home: the algorithms
//! ([`crate::learn::ALGORITHMS`]), the generators
//! ([`crate::generate::GENERATORS`]) and the file limits. The page receives
//! this through the worker and builds its learner table, generator form and
//! sweep list from it.

use serde::Serialize;

use crate::generate::{GENERATORS, GeneratorInfo};
use crate::learn::{ALGORITHMS, AlgorithmInfo};

/// The catalogues and limits, as one value.
#[derive(Debug, Serialize)]
pub struct Catalogue {
    pub algorithms: &'static [AlgorithmInfo],
    pub generators: &'static [GeneratorInfo],
    /// Largest file any reader takes, in bytes.
    pub max_file_bytes: usize,
    /// Keys a sweep takes besides a generator's numeric parameters.
    pub sweep_keys: Vec<&'static str>,
    /// What each number a front end shows means ([`GLOSSARY`]).
    pub glossary: &'static [Term],
    /// This build ([`crate::BUILD`]), as `burnin --version` prints it.
    pub build: &'static str,
    /// The series colours (`#rrggbb`, [`crate::chart::colours::SERIES`]):
    /// the page's transition graph colours actions with them.
    pub palette: Vec<String>,
}

/// One entry of the glossary: the key a front end finds it by, how the
/// number is named where it is shown, and what it means.
#[derive(Debug, Serialize)]
pub struct Term {
    pub key: &'static str,
    pub name: &'static str,
    pub meaning: &'static str,
}

/// What the numbers on the page and in the CLI's tables mean: one home for
/// every definition the front ends print.
pub const GLOSSARY: &[Term] = &[
    Term {
        key: "optimal_value",
        name: "optimal value",
        meaning: "V*₁(ρ): the expected total reward of an optimal policy over one episode of H steps, from the start distribution ρ, computed exactly by backward induction.",
    },
    Term {
        key: "regret",
        name: "regret at K",
        meaning: "The sum over episodes k = 1…K of V*₁(ρ) − V^πₖ₁(ρ), each learner's policy πₖ of episode k evaluated exactly on the true model (not a sampled return); the mean over seeds.",
    },
    Term {
        key: "interval",
        name: "95% interval",
        meaning: "Student's t interval of the mean over seeds (needs two seeds or more).",
    },
    Term {
        key: "slope",
        name: "slope",
        meaning: "Least squares of ln regret on ln k over the last decade of episodes: 1 while regret grows linearly, ½ in the √K regime.",
    },
    Term {
        key: "burn_in",
        name: "burn-in",
        meaning: "Where the mean curve bends from linear growth into its √K regime: the break k₀ of a two-regime least-squares fit on log-log axes (slope 1 up to k₀, a fitted tail slope after it), read on the fixed grid 10^(j/16) so the recording density does not move it. Settled when the tail slope is ≤ 0.6 and at least a quarter decade of the run lies after k₀, and no seed still grows linearly at K (local slope ≥ 0.9 over its last quarter decade); with a bootstrap interval over seeds. 1 for a learner that pays no regret after its first episode; \"not settled\" otherwise.",
    },
    Term {
        key: "model_updates",
        name: "model updates",
        meaning: "How often the learner's policy was recomputed (changed, for a guest learner), mean over seeds.",
    },
    Term {
        key: "first_optimal",
        name: "first ε-optimal episode",
        meaning: "The first episode whose policy's regret was ≤ ε (median over seeds), beside the PAC order S·A·H³/ε² that bounds it.",
    },
    Term {
        key: "optimal_share",
        name: "share ε-optimal",
        meaning: "The share of episodes whose policy's regret was ≤ ε.",
    },
    Term {
        key: "settled",
        name: "settled within ε after",
        meaning: "The episode after which every policy stayed within ε of optimal (median over seeds).",
    },
    Term {
        key: "bound",
        name: "published bound",
        meaning: "The learner's published regret bound as an order (constants and log factors dropped), min(H·K, ·); drawn sparser where it does not apply because the bonus is scaled.",
    },
    Term {
        key: "lower_bound",
        name: "lower-bound shape",
        meaning: "√(S·A·H³·K), the shape of the minimax lower bound no learner can beat on every model (constants dropped).",
    },
    Term {
        key: "scaling",
        name: "scaling in a size",
        meaning: "How a learner's burn-in and its regret at K grow with the size a sweep changes (S, A, H or K): the exponent b of a power law y ∝ x^b, the least-squares slope of ln y on ln x over the sweep's points, with a 95% bootstrap interval over seeds; points where the learner did not settle by K are left out of the burn-in fit and counted. After \"published\": the same slope through the learner's published bound on the same instances (its burn-in: the K from which its √K term dominates), \"does not apply\" where the bonus is scaled.",
    },
    Term {
        key: "regret_cells",
        name: "where regret is paid",
        meaning: "Each episode's regret split exactly over (step, state, action) as occupancy × gap (the performance-difference identity), summed over episodes; the cells sum to the regret.",
    },
];

/// The meaning of the glossary entry `key` (the front ends' only source).
pub fn meaning(key: &str) -> &'static str {
    GLOSSARY
        .iter()
        .find(|t| t.key == key)
        .map(|t| t.meaning)
        .unwrap_or_else(|| panic!("no glossary entry {key:?}"))
}

/// The catalogue of this build.
pub fn catalogue() -> Catalogue {
    Catalogue {
        algorithms: ALGORITHMS,
        generators: GENERATORS,
        max_file_bytes: crate::model::limits::MAX_FILE_BYTES,
        sweep_keys: crate::experiment::experiment_sweep_keys(),
        glossary: GLOSSARY,
        build: crate::BUILD,
        palette: crate::chart::colours::SERIES
            .iter()
            .map(|c| c.hex())
            .collect(),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Keys are unique, and the definitions quote the constants the code
    /// uses (a definition that drifted from the code would mislead).
    #[test]
    fn the_glossary_has_unique_keys_and_matches_the_constants() {
        for (i, t) in GLOSSARY.iter().enumerate() {
            assert!(GLOSSARY[..i].iter().all(|u| u.key != t.key), "{}", t.key);
        }
        let settled = crate::experiment::SETTLED_SLOPE;
        assert!(meaning("burn_in").contains(&format!("≤ {settled}")));
        let linear = crate::experiment::LINEAR_SLOPE;
        assert!(meaning("burn_in").contains(&format!("≥ {linear}")));
        assert_eq!(crate::experiment::SETTLED_SPAN_DECADES, 0.25);
        assert_eq!(crate::experiment::GRID_PER_DECADE, 16.0);
        assert!(meaning("burn_in").contains("quarter decade"));
        assert!(meaning("burn_in").contains("10^(j/16)"));
    }
}

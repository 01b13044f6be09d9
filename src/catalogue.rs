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
}

/// The catalogue of this build.
pub fn catalogue() -> Catalogue {
    Catalogue {
        algorithms: ALGORITHMS,
        generators: GENERATORS,
        max_file_bytes: crate::model::limits::MAX_FILE_BYTES,
        sweep_keys: crate::experiment::experiment_sweep_keys(),
    }
}

//! The build's draw-stream identity: a digest of the numbers this build
//! draws and computes on a fixed probe, so that shards written by builds
//! that would give different numbers for the same file and seed are never
//! merged as one experiment.
//!
//! The probe runs every built-in learner for a few episodes on two small
//! generated models (a time-dependent random MDP and a bandit, for the
//! bandit-only learners) with the regret decomposition on, and digests the
//! records' JSON. Anything that changes a draw or a learner's arithmetic —
//! the samplers, the seed derivation, a generator, a learner's update —
//! changes it; a change that leaves every number as it was does not.

use std::sync::OnceLock;

use super::{Point, parse_experiment, try_run_all};
use crate::format::digest::hex_digest;
use crate::learn::ALGORITHMS;

/// The probe's experiments: (generator object, whether bandit-only learners join).
const PROBES: [(&str, bool); 2] = [
    (
        r#"{"kind": "random", "states": 4, "actions": 2, "successors": 2, "horizon": 3, "time_dependent": true, "seed": 11}"#,
        false,
    ),
    (r#"{"kind": "bandit", "arms": 3, "seed": 5}"#, true),
];

/// This build's draw-stream identity (16 hex digits), computed once.
pub fn draw_stream() -> &'static str {
    static ID: OnceLock<String> = OnceLock::new();
    ID.get_or_init(|| {
        let mut texts = Vec::new();
        for (generator, bandit) in PROBES {
            let learners: Vec<String> = ALGORITHMS
                .iter()
                .filter(|a| bandit || !a.bandit_only)
                .map(|a| format!(r#"{{"algorithm": "{}"}}"#, a.key))
                .collect();
            let text = format!(
                r#"{{"format": "burnin-experiment", "version": 1, "name": "draw-stream probe",
                    "generator": {generator}, "episodes": 24, "seeds": 2, "seed": 9,
                    "checkpoints": 4, "decompose": true, "learners": [{}]}}"#,
                learners.join(", ")
            );
            let exp = parse_experiment(&text, None).expect("the probe is a valid experiment");
            let records = try_run_all(&Point::new(exp)).expect("built-in learners never fail");
            texts.push(serde_json::to_string(&records).expect("finite records"));
        }
        hex_digest(&texts.iter().map(|t| t.as_bytes()).collect::<Vec<_>>())
    })
}

#[cfg(test)]
mod tests {
    /// The identity is stable within a build and looks like a digest.
    #[test]
    fn is_sixteen_hex_digits_and_stable() {
        let a = super::draw_stream();
        assert_eq!(a.len(), 16);
        assert!(a.chars().all(|c| c.is_ascii_hexdigit()));
        assert_eq!(a, super::draw_stream());
    }
}

//! Helpers shared by the integration tests.
#![allow(dead_code)]

pub mod learning;

use burnin::{Mdp, MdpParts, Reward, StepParts};
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

/// Absolute tolerance for values computed two different ways in exact
/// arithmetic terms (backward induction vs. an LP, say).
pub const VALUE_TOL: f64 = 1e-8;

/// A random model of a varied shape for property and agreement tests: S in
/// 1..=6, A in 1..=3, H in 1..=6, 1..=S successors per row, fixed rewards in
/// [lo, 1], stationary or not, sometimes a discount below 1.
pub fn random_model(seed: u64, reward_lo: f64) -> Mdp {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let s = rng.random_range(1..=6u32) as usize;
    let a = rng.random_range(1..=3u32) as usize;
    let h = rng.random_range(1..=6u32) as usize;
    let stationary = rng.random_bool(0.5);
    let discount = if rng.random_bool(0.25) {
        Some(rng.random_range(0.5..1.0))
    } else {
        None
    };
    let tables = if stationary { 1 } else { h };
    let steps = (0..tables)
        .map(|_| {
            let mut transitions = Vec::new();
            let mut rewards = Vec::new();
            for _ in 0..s * a {
                let k = rng.random_range(1..=s as u32) as usize;
                let mut next: Vec<u32> = (0..s as u32).collect();
                for i in 0..k {
                    let j = rng.random_range(i as u32..s as u32) as usize;
                    next.swap(i, j);
                }
                let w: Vec<f64> = (0..k).map(|_| rng.random::<f64>() + 0.01).collect();
                let total: f64 = w.iter().sum();
                let mut row: Vec<(u32, f64)> = next[..k]
                    .iter()
                    .zip(&w)
                    .map(|(&n, &x)| (n, x / total))
                    .collect();
                // Make the sum exact up to rounding.
                let sum: f64 = row.iter().map(|e| e.1).sum();
                row[0].1 += 1.0 - sum;
                transitions.push(row);
                rewards.push(Reward::Fixed(rng.random_range(reward_lo..=1.0)));
            }
            StepParts {
                transitions,
                rewards,
            }
        })
        .collect();
    let mut start: Vec<f64> = (0..s).map(|_| rng.random::<f64>()).collect();
    let total: f64 = start.iter().sum();
    start.iter_mut().for_each(|p| *p /= total);
    Mdp::from_parts(MdpParts {
        name: format!("random {seed}"),
        notes: None,
        horizon: h,
        discount,
        states: (0..s).map(|i| format!("s{i}")).collect(),
        actions: (0..a).map(|i| format!("a{i}")).collect(),
        start,
        stationary,
        steps,
        layout: None,
    })
    .expect("the random test model is valid")
}

/// The repository's demo model files (`demo-models/*.json` but the index).
pub fn demo_files() -> Vec<std::path::PathBuf> {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-models");
    let mut v: Vec<_> = std::fs::read_dir(dir)
        .expect("demo-models/ exists")
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "json") && !p.ends_with("index.json"))
        .collect();
    v.sort();
    v
}

/// A scratch folder for one test, removed when dropped.
pub struct Scratch(pub std::path::PathBuf);

impl Scratch {
    pub fn new(tag: &str) -> Scratch {
        let p = std::env::temp_dir().join(format!("burnin-test-{tag}-{}", std::process::id()));
        let _ = std::fs::remove_dir_all(&p);
        std::fs::create_dir_all(&p).unwrap();
        Scratch(p)
    }
    /// Writes `text` to `name` in the folder; its path.
    pub fn file(&self, name: &str, text: &str) -> std::path::PathBuf {
        let p = self.0.join(name);
        std::fs::write(&p, text).unwrap();
        p
    }

    /// Copies the demo model `demo` (a file of demo-models/) into the
    /// folder as `name`, for an experiment's `model_path`; its path.
    pub fn demo(&self, demo: &str, name: &str) -> std::path::PathBuf {
        let from = std::path::Path::new(env!("CARGO_MANIFEST_DIR"))
            .join("demo-models")
            .join(demo);
        let to = self.0.join(name);
        std::fs::copy(&from, &to).unwrap();
        to
    }
}

/// A path as a command-line argument.
pub fn p(path: &std::path::Path) -> &str {
    path.to_str().unwrap()
}

impl Drop for Scratch {
    fn drop(&mut self) {
        let _ = std::fs::remove_dir_all(&self.0);
    }
}

/// What a run of the `burnin` binary gave.
pub struct Run {
    pub code: i32,
    pub stdout: String,
    pub stderr: String,
}

/// Runs the `burnin` binary with `args` in the repository's folder, with an
/// empty standard input.
pub fn burnin(args: &[&str]) -> Run {
    let out = std::process::Command::new(env!("CARGO_BIN_EXE_burnin"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .stdin(std::process::Stdio::null())
        .output()
        .expect("the binary runs");
    Run {
        code: out.status.code().expect("exited, not killed by a signal"),
        stdout: String::from_utf8(out.stdout).unwrap(),
        stderr: String::from_utf8(out.stderr).unwrap(),
    }
}

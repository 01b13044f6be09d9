//! A learner of your own, measured by Burnin with exact regret beside the
//! built-ins: `cargo run --release --example own_learner`.
//!
//! The learner here is explore-then-commit, a common-practice baseline with
//! no single source: for the first `explore` episodes it plays every action
//! with probability 1/A; then it commits, for good, to the greedy policy of
//! the empirical model (backward induction on the mean rewards and
//! transition frequencies it saw; a pair never tried is worth 0). It talks
//! to Burnin through the guest contract (`burnin::learn::Guest`): one
//! decision per batch, the batch's trajectories with the next request.

use std::sync::Arc;

use burnin::experiment::{Output, Point, assemble_without, parse_experiment, try_run_all};
use burnin::learn::{Batch, Decision, Guest, GuestIntro, GuestPolicy, Guests, Setting};

struct ExploreThenCommit {
    set: Setting,
    explore: u64,
    /// Per (h, s, a): visits, reward sum, and next-state counts (dense: the
    /// example's models are small).
    visits: Vec<f64>,
    reward: Vec<f64>,
    next: Vec<f64>,
    committed: bool,
}

impl ExploreThenCommit {
    fn new(set: Setting, explore: u64) -> Self {
        let rows = set.rows();
        ExploreThenCommit {
            set,
            explore,
            visits: vec![0.0; rows],
            reward: vec![0.0; rows],
            next: vec![0.0; rows * set.states],
            committed: false,
        }
    }

    /// The greedy policy of the empirical model, by backward induction.
    fn greedy(&self) -> Vec<u32> {
        let Setting {
            states: s_n,
            actions: a_n,
            horizon: h_n,
            ..
        } = self.set;
        let mut v_next = vec![0.0; s_n];
        let mut policy = vec![0u32; h_n * s_n];
        for h in (0..h_n).rev() {
            let mut v = vec![0.0; s_n];
            for s in 0..s_n {
                let mut best = (f64::NEG_INFINITY, 0);
                for a in 0..a_n {
                    let row = self.set.row(h, s, a);
                    let n = self.visits[row];
                    let q = if n == 0.0 {
                        0.0
                    } else {
                        let succ = &self.next[row * s_n..(row + 1) * s_n];
                        (self.reward[row]
                            + succ.iter().zip(&v_next).map(|(c, v)| c * v).sum::<f64>())
                            / n
                    };
                    if q > best.0 {
                        best = (q, a);
                    }
                }
                v[s] = best.0;
                policy[h * s_n + s] = best.1 as u32;
            }
            v_next = v;
        }
        policy
    }
}

impl Guest for ExploreThenCommit {
    fn decide(&mut self, batch: Batch<'_>) -> Result<Decision, String> {
        for (i, st) in batch.steps.iter().enumerate() {
            let row = self
                .set
                .row(i % batch.horizon, st.state as usize, st.action as usize);
            self.visits[row] += 1.0;
            self.reward[row] += st.reward;
            self.next[row * self.set.states + st.next as usize] += 1.0;
        }
        if batch.done == 0 {
            // Explore: one decision for the whole exploration phase.
            let a_n = self.set.actions;
            let rows = self.set.horizon * self.set.states;
            let uniform = vec![1.0 / a_n as f64; rows * a_n];
            return Ok(Decision::new(
                GuestPolicy::Probabilities(uniform),
                self.explore,
            ));
        }
        if !self.committed {
            self.committed = true;
            return Ok(Decision::new(GuestPolicy::Actions(self.greedy()), 1 << 20));
        }
        Ok(Decision::keep(1 << 20))
    }
}

fn main() {
    let experiment = r#"{
        "format": "burnin-experiment", "version": 1,
        "name": "explore-then-commit on the tide pool",
        "model_path": "tide-pool-forager.json",
        "episodes": 20000, "seeds": 8,
        "learners": [
            {"guest": "etc", "label": "explore-then-commit (500)"},
            {"algorithm": "mvp"},
            {"algorithm": "ucbvi-hoeffding", "bonus_scale": 0.1}
        ]
    }"#;
    let dir = concat!(env!("CARGO_MANIFEST_DIR"), "/demo-models/");
    let load = |p: &str| std::fs::read_to_string(format!("{dir}{p}")).map_err(|e| e.to_string());
    let exp = parse_experiment(experiment, Some(&load))
        .unwrap_or_else(|p| panic!("{}", p.lines().join("\n")));
    // The host: starts a guest for each run by the name the file gives.
    let host: Guests = Arc::new(
        |name: &str, intro: &GuestIntro| -> Result<Box<dyn Guest>, String> {
            match name {
                "etc" => Ok(Box::new(ExploreThenCommit::new(intro.setting, 500))),
                _ => Err(format!("no guest {name:?} here")),
            }
        },
    );
    let point = Point::with_guests(exp.clone(), Some(host));
    let records = try_run_all(&point).unwrap_or_else(|f| panic!("{f}"));
    let Output::Single(results) = assemble_without(&exp, &[point], vec![records], Vec::new())
    else {
        unreachable!("no sweep")
    };
    println!(
        "{} (V* = {:.4}), K = {}:",
        results.model_name, results.optimal_value, results.episodes
    );
    for l in &results.learners {
        let k = l.regret_mean.len() - 1;
        println!(
            "  {:<28} regret {:>9.2}  95% [{:.2}, {:.2}]",
            l.label, l.regret_mean[k], l.regret_lo[k], l.regret_hi[k]
        );
    }
}

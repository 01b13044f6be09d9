//! Where regret is paid: the exact decomposition of a policy's regret by
//! (step, state, action), V*₁(ρ) − V^π₁(ρ) = Σ_h Σ_{s,a} d_h^π(s,a)·Δ_h(s,a)
//! (the finite-horizon performance-difference identity; Kakade & Langford,
//! ICML 2002, Lemma 6.1), checked against the exact policy evaluation and
//! through whole experiments.

mod common;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use serde_json::json;

use burnin::experiment::{Point, Results, assemble, parse_experiment, run_all};
use burnin::solve::{Evaluator, RegretCells, solve};
use burnin::{Mdp, MdpParts};

/// The model with its discount removed (learners and the identity are
/// undiscounted).
fn undiscounted(m: Mdp) -> Mdp {
    let parts = m.to_parts();
    Mdp::from_parts(MdpParts {
        discount: None,
        ..parts
    })
    .unwrap()
}

/// The sparse cells as a dense array; each cell at most once.
fn dense(pairs: &[(u32, f64)], out: &mut [f64]) {
    out.fill(0.0);
    for &(i, c) in pairs {
        assert_eq!(out[i as usize], 0.0, "cell {i} given twice");
        out[i as usize] = c;
    }
}

fn models() -> Vec<Mdp> {
    let mut v: Vec<Mdp> = common::demo_files()
        .iter()
        .map(|f| burnin::parse_model(&std::fs::read_to_string(f).unwrap()).unwrap())
        .collect();
    v.extend((0..40).map(|seed| undiscounted(common::random_model(seed, 0.0))));
    v
}

/// The identity, for random deterministic and random stochastic policies on
/// every demo model and on 40 random models: the cells sum to the exact
/// regret to 1e-9 of V* (both sides are exact up to rounding).
#[test]
fn the_cells_sum_to_the_exact_regret_for_any_policy() {
    let mut rng = ChaCha8Rng::seed_from_u64(11);
    for m in models() {
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let sol = solve(&m);
        let gaps = sol.gaps().into_raw_vec_and_offset().0;
        let mut eval = Evaluator::new(&m);
        let mut cells = RegretCells::new(&m);
        let mut pairs = Vec::new();
        let mut out = vec![0.0; h_n * s_n * a_n];
        for trial in 0..6 {
            let tol = 1e-9 * sol.optimal_value.abs().max(1.0);
            if trial % 2 == 0 {
                let p: Vec<u32> = (0..h_n * s_n)
                    .map(|_| rng.random_range(0..a_n as u32))
                    .collect();
                let regret = sol.optimal_value - eval.value(&m, Some(&p), 0.0);
                let sum = cells.fill(
                    &m,
                    &gaps,
                    |h, s, _| Some(p[h * s_n + s] as usize),
                    &mut pairs,
                );
                dense(&pairs, &mut out);
                assert!(
                    (sum - regret).abs() <= tol,
                    "{}: deterministic {sum} vs {regret}",
                    m.name()
                );
                assert!((out.iter().sum::<f64>() - sum).abs() <= tol);
                assert!(
                    out.iter().all(|&c| c >= 0.0),
                    "every cell is a mass times a gap ≥ 0"
                );
            } else {
                let mut probs = vec![0.0; h_n * s_n * a_n];
                for row in probs.chunks_mut(a_n) {
                    let w: Vec<f64> = (0..a_n).map(|_| rng.random::<f64>()).collect();
                    let t: f64 = w.iter().sum();
                    row.iter_mut().zip(&w).for_each(|(x, y)| *x = y / t);
                }
                let regret = sol.optimal_value - eval.table(&m, &probs);
                let sum = cells.fill(
                    &m,
                    &gaps,
                    |h, s, row| {
                        row.copy_from_slice(&probs[(h * s_n + s) * a_n..][..a_n]);
                        None
                    },
                    &mut pairs,
                );
                dense(&pairs, &mut out);
                assert!(
                    (sum - regret).abs() <= tol,
                    "{}: stochastic {sum} vs {regret}",
                    m.name()
                );
            }
        }
    }
}

fn run(exp: serde_json::Value) -> Results {
    let e = parse_experiment(&exp.to_string(), None).unwrap();
    let p = Point::new(e.clone());
    let records = run_all(&p);
    for r in &records {
        // Per run: the cells hold exactly the run's regret at K.
        let total: f64 = r.regret_cells.iter().sum();
        let k = *r.regret.last().unwrap();
        assert!(
            (total - k).abs() <= 1e-9 * k.max(p.optimal_value),
            "run {} of learner {}: {total} vs {k}",
            r.seed_index,
            r.learner
        );
    }
    match assemble(&e, &[p], vec![records]) {
        burnin::experiment::Output::Single(r) => r,
        _ => unreachable!(),
    }
}

/// Through whole experiments on every demo model, every learner kind:
/// the mean cells sum to the mean regret at K, by cell, by (step, state) and
/// by state.
#[test]
fn experiments_place_all_their_regret_in_the_cells() {
    for f in common::demo_files() {
        let model: serde_json::Value =
            serde_json::from_str(&std::fs::read_to_string(&f).unwrap()).unwrap();
        let r = run(
            json!({"format": "burnin-experiment", "version": 1, "model": model, "episodes": 300, "seeds": 3, "decompose": true,
            "learners": [{"algorithm": "mvp", "bonus_scale": 0.01}, {"algorithm": "ucbvi-hoeffding", "bonus_scale": 0.05},
                         {"algorithm": "q-ucb-hoeffding", "bonus_scale": 0.05}, {"algorithm": "psrl"},
                         {"algorithm": "eps-greedy", "epsilon": 0.2}, {"algorithm": "uniform"}]}),
        );
        for l in &r.learners {
            let k = *l.regret_mean.last().unwrap();
            let tol = 1e-9 * k.max(r.optimal_value);
            let by_cell: f64 = l.regret_by_cell.iter().flatten().flatten().sum();
            let by_hs: f64 = l.regret_by_step_state.iter().flatten().sum();
            let by_s: f64 = l.regret_by_state.iter().sum();
            for (what, x) in [
                ("cell", by_cell),
                ("step and state", by_hs),
                ("state", by_s),
            ] {
                assert!(
                    (x - k).abs() <= tol,
                    "{} {}: by {what} {x} vs {k}",
                    r.model_name,
                    l.label
                );
            }
            let top = l.top_cells(3);
            assert!(top.windows(2).all(|w| w[0].regret >= w[1].regret));
        }
    }
}

/// Without `"decompose"`, nothing is recorded (the default: it costs time).
#[test]
fn the_decomposition_is_recorded_only_when_asked() {
    let model: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(&common::demo_files()[0]).unwrap()).unwrap();
    let e = parse_experiment(&json!({"format": "burnin-experiment", "version": 1, "model": model, "episodes": 50, "seeds": 2,
        "learners": [{"algorithm": "uniform"}]}).to_string(), None).unwrap();
    assert!(!e.decompose);
    let p = Point::new(e.clone());
    let records = run_all(&p);
    assert!(records.iter().all(|r| r.regret_cells.is_empty()));
    let burnin::experiment::Output::Single(r) = assemble(&e, &[p], vec![records]) else {
        unreachable!()
    };
    assert!(r.learners[0].regret_by_cell.is_empty() && r.learners[0].top_cells(3).is_empty());
    assert!(!r.to_json().contains("regret_by_cell"));
}

/// The model of the next two tests (see the first).
fn one_bad_cell() -> serde_json::Value {
    json!({"format": "burnin-model", "version": 1, "name": "one bad cell", "horizon": 2,
        "states": ["desk"], "actions": ["work", "slack"], "start": [1], "stationary": false,
        "steps": [{"transitions": [[[[0, 1]], [[0, 1]]]], "rewards": [[1, 0]]},
                  {"transitions": [[[[0, 1]], [[0, 1]]]], "rewards": [[1, 1]]}]})
}

/// One suboptimal cell, worked by hand: H = 2, one state, two actions; at
/// step 1 "slack" pays 0 and "work" pays 1, at step 2 both pay 1. Only
/// (step 1, "slack") has a gap (Δ = 1); the uniform learner takes it with
/// probability ½, so it pays ½ per episode, all of it in that cell: 50 over
/// K = 100. Every other learner's regret lands there too.
#[test]
fn one_suboptimal_cell_holds_all_the_regret() {
    let model = one_bad_cell();
    let r = run(
        json!({"format": "burnin-experiment", "version": 1, "model": model, "episodes": 100, "seeds": 2, "decompose": true,
        "learners": [{"algorithm": "uniform"}, {"algorithm": "eps-greedy", "epsilon": 0.5}, {"algorithm": "mvp"}]}),
    );
    let u = &r.learners[0];
    assert!(
        (u.regret_by_cell[0][0][1] - 50.0).abs() <= 1e-12 * 50.0,
        "{}",
        u.regret_by_cell[0][0][1]
    );
    for l in &r.learners {
        let k = *l.regret_mean.last().unwrap();
        assert!(k > 0.0, "{} pays something", l.label);
        let cells: Vec<f64> = l
            .regret_by_cell
            .iter()
            .flatten()
            .flatten()
            .copied()
            .collect();
        assert_eq!(
            cells.iter().filter(|&&c| c != 0.0).count(),
            1,
            "{}: {cells:?}",
            l.label
        );
        assert!(
            (l.regret_by_cell[0][0][1] - k).abs() <= 1e-12 * k,
            "{}",
            l.label
        );
        let top = l.top_cells(3);
        assert_eq!(
            (top.len(), top[0].step, top[0].state, top[0].action),
            (1, 0, 0, 1)
        );
        assert!((top[0].share - 1.0).abs() < 1e-12);
    }
}

/// The CLI lists the top cells in its table and writes them all with
/// `--cells-csv`; on the one-bad-cell model all the regret is in (step 1,
/// "desk", "slack").
#[test]
fn the_cli_shows_where_regret_is_paid() {
    let d = common::Scratch::new("cells");
    let model = one_bad_cell();
    let e = d.file(
        "e.json",
        &json!({"format": "burnin-experiment", "version": 1, "model": model, "episodes": 100,
        "seeds": 2, "decompose": true, "learners": [{"algorithm": "uniform"}]})
        .to_string(),
    );
    let csv = d.0.join("cells.csv");
    let out = common::burnin(&[
        "run",
        e.to_str().unwrap(),
        "--cells-csv",
        csv.to_str().unwrap(),
    ]);
    assert_eq!(out.code, 0, "{}", out.stderr);
    let table = out.stdout;
    assert!(table.contains("where the regret was paid"), "{table}");
    assert!(
        table.contains("uniform  h=1 \"desk\" \"slack\" 100.0%"),
        "{table}"
    );
    let text = std::fs::read_to_string(&csv).unwrap();
    let lines: Vec<&str> = text.lines().collect();
    assert_eq!(
        lines[0],
        "learner,algorithm,step,state,action,state_label,action_label,regret,share"
    );
    assert_eq!(lines.len(), 1 + 2 * 2, "a row per (step, action)");
    assert!(
        lines.contains(&"uniform,uniform,1,0,1,desk,slack,50,1"),
        "{text}"
    );
    assert!(
        lines.contains(&"uniform,uniform,2,0,1,desk,slack,0,0"),
        "{text}"
    );
}

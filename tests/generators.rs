//! Generators: valid, reproducible models with the structure their sources describe.

use burnin::generate::{Bandit, DriftGrid, Garnet, Lock, LowerBound, RiverChain};
use burnin::solve::{Policy, evaluate, solve};
use burnin::{Mdp, parse_model, write_model};
use ndarray::Array3;

/// A generated model reads back from its file unchanged.
fn round_trips(m: &Mdp) {
    let text = write_model(m);
    assert_eq!(&parse_model(&text).expect("generated file is valid"), m);
}

fn uniform_value(m: &Mdp) -> f64 {
    let (h, s, a) = (m.horizon(), m.n_states(), m.n_actions());
    let pi = Policy::Stochastic(Array3::from_elem((h, s, a), 1.0 / a as f64));
    let v = evaluate(m, &pi).unwrap();
    burnin::solve::start_value(m, v.row(0).as_slice().unwrap())
}

#[test]
fn garnet_rows_have_exactly_b_distinct_successors_and_are_reproducible() {
    let g = Garnet {
        states: 12,
        actions: 3,
        successors: 4,
        horizon: 5,
        time_dependent: true,
        bernoulli: true,
    };
    let m = g.generate(7).unwrap();
    assert_eq!(m.step_tables().len(), 5);
    for st in m.step_tables() {
        for r in 0..36 {
            let (next, prob) = st.row(r);
            assert_eq!(next.len(), 4);
            let mut n = next.to_vec();
            n.sort();
            n.dedup();
            assert_eq!(n.len(), 4, "successors are distinct");
            assert!((prob.iter().sum::<f64>() - 1.0).abs() < 1e-12);
        }
    }
    assert_eq!(g.generate(7).unwrap(), m, "same seed, same model");
    assert_ne!(g.generate(8).unwrap(), m, "another seed, another model");
    round_trips(&m);
}

/// Uniform spacings of b−1 points give each probability mean 1/b (the mean of
/// a flat Dirichlet(1, …, 1) coordinate; Archibald et al. 1995 draw the
/// probabilities this way). Checked on 40 000 rows: the standard error of
/// the mean is about 0.0014 for b = 4, so 0.01 is a wide margin.
#[test]
fn garnet_probabilities_are_flat_dirichlet_on_average() {
    let mut sums = [0.0f64; 4];
    let mut rows = 0;
    for seed in 0..100 {
        let m = Garnet {
            states: 50,
            actions: 8,
            successors: 4,
            horizon: 1,
            time_dependent: false,
            bernoulli: false,
        }
        .generate(seed)
        .unwrap();
        for r in 0..400 {
            let (_, p) = m.step(0).row(r);
            for k in 0..4 {
                sums[k] += p[k];
            }
            rows += 1;
        }
    }
    for s in sums {
        assert!(
            (s / rows as f64 - 0.25).abs() < 0.01,
            "mean {}",
            s / rows as f64
        );
    }
}

#[test]
fn garnet_refuses_more_successors_than_states() {
    let e = Garnet {
        states: 3,
        successors: 4,
        ..Garnet::default()
    }
    .generate(1)
    .unwrap_err();
    assert_eq!(e.to_string(), "successors: 4 is outside 1..=3");
}

#[test]
fn lock_pays_one_to_the_right_code_and_a_to_the_minus_h_to_a_guesser() {
    // Derived by hand: only the right action at every one of the H steps pays
    // 1, so V* = 1 and a uniform guesser succeeds with probability A^(−H).
    for td in [false, true] {
        let m = Lock {
            horizon: 5,
            actions: 3,
            time_dependent: td,
        }
        .generate(11)
        .unwrap();
        assert_eq!(solve(&m).optimal_value, 1.0);
        assert!((uniform_value(&m) - 3f64.powi(-5)).abs() < 1e-15);
        round_trips(&m);
    }
}

#[test]
fn drift_grid_without_slip_is_worth_the_steps_left_after_the_shortest_path() {
    // Derived by hand: from the start (a, b) the goal (x, y) is |x − a| +
    // |y − b| moves away; every step from arrival on pays 1. By default the
    // start is (⌊w/4⌋, ⌊h/2⌋) and the goal its mirror through the board's
    // centre, (w − 1 − a, h − 1 − b).
    let grid = |start: Option<(usize, usize)>, goal: Option<(usize, usize)>| DriftGrid {
        width: 4,
        height: 3,
        slip: 0.0,
        horizon: 12,
        goal_reward: 1.0,
        start_column: start.map(|s| s.0),
        start_row: start.map(|s| s.1),
        goal_column: goal.map(|g| g.0),
        goal_row: goal.map(|g| g.1),
    };
    // 4×3: start (1, 1), goal (2, 1), one move apart.
    let m = grid(None, None).generate().unwrap();
    assert_eq!(solve(&m).optimal_value, (12 - 1) as f64);
    assert_eq!(m.start()[4 + 1], 1.0);
    round_trips(&m);
    let corner = grid(None, Some((3, 0))).generate().unwrap();
    assert_eq!(solve(&corner).optimal_value, (12 - 3) as f64);
    let from_corner = grid(Some((0, 0)), Some((3, 2))).generate().unwrap();
    assert_eq!(solve(&from_corner).optimal_value, (12 - 5) as f64);
    // The default is 7 wide and 4 high: start c1r2 and goal c5r1, neither
    // on an edge, 4 + 1 moves apart; slip makes the goal later in
    // expectation.
    let d = DriftGrid::default();
    assert_eq!(
        (d.width, d.height, d.start_column, d.start_row),
        (7, 4, None, None)
    );
    assert_eq!((d.goal_column, d.goal_row), (None, None));
    let slippery = d.generate().unwrap();
    let labels = slippery.states();
    let start = slippery.start().iter().position(|&p| p == 1.0).unwrap();
    assert_eq!(labels[start], "c1r2");
    assert_eq!(labels[7 + 5], "c5r1");
    assert_eq!(slippery.actions(), ["c+1", "r+1", "c-1", "r-1"]);
    assert!(solve(&slippery).optimal_value < (12 - 5) as f64);
    let sure = DriftGrid { slip: 0.0, ..d }.generate().unwrap();
    assert_eq!(solve(&sure).optimal_value, (12 - 5) as f64);
    // A one-column board of odd height: the mirror of the middle cell is
    // itself, so the goal is the last cell, one move up.
    let column = DriftGrid {
        width: 1,
        height: 3,
        slip: 0.0,
        ..DriftGrid::default()
    };
    assert_eq!(solve(&column.generate().unwrap()).optimal_value, 11.0);
    // The goal may not be the start cell, nor outside the grid.
    let e = grid(None, Some((1, 1))).generate().unwrap_err();
    assert_eq!(e.param, "goal_column");
    assert!(e.message.contains("c1r1"), "{e}");
    assert_eq!(
        grid(None, Some((1, 3))).generate().unwrap_err().message,
        "3 is outside 0..=2"
    );
    assert_eq!(
        grid(Some((4, 0)), None).generate().unwrap_err().param,
        "start_column"
    );
}

#[test]
fn river_chain_with_a_sure_current_reaches_the_far_end() {
    // Derived by hand: with p_forward = 1 the far end is n−1 steps away and
    // pays big_reward at every later step.
    let m = RiverChain {
        states: 5,
        horizon: 10,
        p_forward: 1.0,
        p_back: 0.0,
        small_reward: 0.005,
        big_reward: 1.0,
    }
    .generate()
    .unwrap();
    assert_eq!(solve(&m).optimal_value, 6.0);
    let d = RiverChain::default().generate().unwrap();
    assert_eq!((d.n_states(), d.n_actions()), (6, 2));
    round_trips(&d);
}

/// The river chain is a published construction (Strehl & Littman 2008),
/// kept as a reference: cited in the catalogue like Garnet and the
/// lower-bound family, and in no demo, no ready experiment and no default
/// (the page's generator form opens on the catalogue's first entry).
#[test]
fn the_river_chain_is_cited_and_in_no_demo_or_default() {
    let river = burnin::generate::catalog::info("river").unwrap();
    assert!(
        river.source.contains("Strehl & Littman"),
        "{}",
        river.source
    );
    assert!(river.about.contains("Strehl & Littman"), "{}", river.about);
    assert_ne!(burnin::generate::GENERATORS[0].kind, "river");
    let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-models");
    let mut files = Vec::new();
    for dir in [root.clone(), root.join("experiments")] {
        for e in std::fs::read_dir(dir).unwrap() {
            let p = e.unwrap().path();
            if p.extension().is_some_and(|e| e == "json") {
                files.push(p);
            }
        }
    }
    assert!(files.len() >= 8, "{files:?}");
    for f in files {
        let text = std::fs::read_to_string(&f).unwrap();
        let v: serde_json::Value = serde_json::from_str(&text).unwrap();
        assert_ne!(v["generator"]["kind"], "river", "{}", f.display());
        assert!(
            !text.to_lowercase().contains("river"),
            "{} mentions a river",
            f.display()
        );
    }
}

#[test]
fn lower_bound_instance_has_the_papers_state_count_and_value() {
    let g = LowerBound {
        actions: 3,
        depth: 2,
        horizon: 12,
        wait_until: 2,
        epsilon: 0.1,
        special_step: None,
        special_leaf: None,
        special_action: None,
    };
    let m = g.generate(5).unwrap();
    // Domingues et al. (2021): waiting state, root and tree, good and bad
    // states: 3 + (A^(d+1) − 1)/(A − 1) − 1 + 1 = wait + tree nodes + 2.
    assert_eq!(m.n_states(), 1 + (27 - 1) / 2 + 2);
    // Derived by hand: rewarded steps run from wait_until+depth+2 = 6 to 11
    // (6 steps), and the best leaf action reaches the good state with
    // probability ½ + ε; every other one with ½.
    let v = solve(&m).optimal_value;
    assert!((v - 6.0 * 0.6).abs() < 1e-12, "V* = {v}");
    // A uniform learner hits the perturbed (leaf, action) with probability at
    // most 1/(9 leaves · 3 actions), so its value lies in (3, 3 + 6·0.1/27].
    let u = uniform_value(&m);
    assert!(
        u > 3.0 && u <= 3.0 + 6.0 * 0.1 / 27.0 + 1e-12,
        "uniform {u}"
    );
    round_trips(&m);
    let fixed = LowerBound {
        special_step: Some(4),
        special_leaf: Some(8),
        special_action: Some(2),
        ..g
    };
    assert!(
        fixed
            .generate(1)
            .unwrap()
            .notes()
            .unwrap()
            .contains("step 4 leaf 8 action 2")
    );
}

#[test]
fn bandit_is_one_state_one_step_worth_its_best_mean() {
    let m = Bandit {
        arms: 0,
        means: vec![0.2, 0.7, 0.4],
    }
    .generate(1)
    .unwrap();
    assert_eq!((m.n_states(), m.horizon(), m.n_actions()), (1, 1, 3));
    assert_eq!(solve(&m).optimal_value, 0.7);
    let drawn = Bandit {
        arms: 5,
        means: vec![],
    }
    .generate(2)
    .unwrap();
    assert_eq!(drawn.n_actions(), 5);
    round_trips(&drawn);
}

/// Every generator computes its model's sizes and checks them against the
/// model limits before building (docs/formats.md, "Limits"): at the top of
/// each whole parameter's range, alone and all at once, it gives a model
/// within the limits or an error naming one of its parameters — never a
/// panic, never gigabytes first. (Before this check, a 300×300 drift grid
/// with H = 10 000 panicked and a lower-bound tree with H = 10 000 asked for
/// 14 GB.)
#[test]
fn every_generator_checks_its_sizes_before_building() {
    use burnin::generate::{GENERATORS, GeneratorSpec, ParamKind, Values};
    use burnin::model::limits::{MAX_CELLS, MAX_ENTRIES};
    for info in GENERATORS {
        let base = GeneratorSpec {
            values: Values::defaults(info),
            seed: 3,
        };
        let wholes: Vec<_> = info
            .params
            .iter()
            .filter(|p| p.kind == ParamKind::Whole)
            .collect();
        let mut all = base.clone();
        let mut cases = Vec::new();
        for p in &wholes {
            cases.push((p.name.to_string(), base.with(p.name, p.max).unwrap()));
            all = all.with(p.name, p.max).unwrap();
        }
        cases.push(("every whole parameter".to_string(), all));
        for (what, spec) in cases {
            match spec.build() {
                Ok(m) => {
                    let (h, s, a) = (m.horizon(), m.n_states(), m.n_actions());
                    assert!(h * s * a <= MAX_CELLS, "{} at max {what}", info.kind);
                    assert!(m.entries() <= MAX_ENTRIES, "{} at max {what}", info.kind);
                }
                Err(e) => assert!(
                    info.params.iter().any(|p| p.name == e.param),
                    "{} at max {what}: {e} names no parameter of {}",
                    info.kind,
                    info.kind
                ),
            }
        }
    }
    // The parameter at fault is the one that drives the size.
    let grid = DriftGrid {
        width: 300,
        height: 300,
        horizon: 10_000,
        ..DriftGrid::default()
    };
    let e = grid.generate().unwrap_err();
    assert_eq!(e.param, "horizon");
    assert!(e.message.contains("10000·90000·4"), "{e}");
}

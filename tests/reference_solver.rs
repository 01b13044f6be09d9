//! The solver against worked examples from textbooks.

mod common;

use burnin::solve::{Policy, evaluate, solve};
use burnin::{Mdp, MdpParts, Reward, StepParts};
use ndarray::Array3;

/// Builds a stationary deterministic-or-stochastic model from closures.
fn model(
    states: usize,
    actions: usize,
    horizon: usize,
    row: impl Fn(usize, usize) -> (Vec<(u32, f64)>, f64),
) -> Mdp {
    let mut transitions = Vec::new();
    let mut rewards = Vec::new();
    for s in 0..states {
        for a in 0..actions {
            let (t, r) = row(s, a);
            transitions.push(t);
            rewards.push(Reward::Fixed(r));
        }
    }
    let mut start = vec![0.0; states];
    start[0] = 1.0;
    Mdp::from_parts(MdpParts {
        name: "reference".into(),
        notes: None,
        horizon,
        discount: None,
        states: (0..states).map(|i| format!("s{}", i + 1)).collect(),
        actions: (0..actions).map(|i| format!("a{}", i + 1)).collect(),
        start,
        stationary: true,
        steps: vec![StepParts {
            transitions,
            rewards,
        }],
        layout: None,
    })
    .expect("reference model is valid")
}

/// Sutton & Barto, *Reinforcement Learning: An Introduction*, 2nd ed. (2018),
/// Example 4.1 and Figure 4.1: the 4×4 gridworld, terminal corners, reward −1
/// per step, undiscounted, equiprobable random policy. Iterative policy
/// evaluation after k sweeps equals finite-horizon evaluation with H = k; as
/// k → ∞ the book gives the integer values below.
#[test]
fn sutton_barto_example_4_1_random_policy_values() {
    // Book cells 0..15 row by row; 0 and 15 are the terminal state.
    let terminal = |s: usize| s == 0 || s == 15;
    // up, down, right, left
    let moves: [(i64, i64); 4] = [(-1, 0), (1, 0), (0, 1), (0, -1)];
    let h = 3000;
    let m = model(16, 4, h, |s, a| {
        if terminal(s) {
            return (vec![(s as u32, 1.0)], 0.0);
        }
        let (r, c) = ((s / 4) as i64, (s % 4) as i64);
        let (nr, nc) = (r + moves[a].0, c + moves[a].1);
        let next = if (0..4).contains(&nr) && (0..4).contains(&nc) {
            (nr * 4 + nc) as usize
        } else {
            s
        };
        (vec![(next as u32, 1.0)], -1.0)
    });
    let pi = Policy::Stochastic(Array3::from_elem((h, 16, 4), 0.25));
    let v = evaluate(&m, &pi).unwrap();
    // Figure 4.1, k = ∞ (the book's integer values).
    let book: [f64; 16] = [
        0.0, -14.0, -20.0, -22.0, //
        -14.0, -18.0, -20.0, -20.0, //
        -20.0, -20.0, -18.0, -14.0, //
        -22.0, -20.0, -14.0, 0.0,
    ];
    for (s, want) in book.iter().enumerate() {
        let got = v[[0, s]];
        assert!(
            (got - want).abs() < 1e-6,
            "cell {s}: got {got}, book {want}"
        );
    }
    // The optimal policy reaches a terminal corner by the shortest path:
    // V* = −(Manhattan distance to the nearer corner) (derived by hand).
    let sol = solve(&m);
    for s in 0..16 {
        let (r, c) = ((s / 4) as f64, (s % 4) as f64);
        let d = (r + c).min(6.0 - r - c);
        assert!((sol.v[[0, s]] + d).abs() < 1e-12, "cell {s}");
    }
}

/// Puterman, *Markov Decision Processes* (1994), §3.1: the two-state example.
/// s1: a11 pays 5 and stays or moves to s2 with probability ½ each; a12 pays
/// 10 and moves to s2. s2: a21 pays −1 and stays. (Our format needs every
/// action in every state, so s2's second action copies a21.) Terminal reward 0.
///
/// Values by backward induction for N = 1..5 decisions remaining, derived by
/// hand from that model; they agree with the book's backward-induction table
/// as we recall it (from memory): u*(s1) = 10, 9.5, 8.75, 7.875, 6.9375 and
/// u*(s2) = −1 … −5, with a12 optimal only when one decision remains.
#[test]
fn puterman_two_state_example_by_backward_induction() {
    let rows = |s: usize, a: usize| match (s, a) {
        (0, 0) => (vec![(0, 0.5), (1, 0.5)], 5.0),
        (0, 1) => (vec![(1, 1.0)], 10.0),
        _ => (vec![(1, 1.0)], -1.0),
    };
    let expected = [(10.0, 1), (9.5, 0), (8.75, 0), (7.875, 0), (6.9375, 0)];
    for (n, &(u1, best)) in expected.iter().enumerate() {
        let horizon = n + 1;
        let sol = solve(&model(2, 2, horizon, rows));
        assert_eq!(
            sol.v[[0, 0]],
            u1,
            "u*(s1) with {horizon} decisions remaining"
        );
        assert_eq!(sol.v[[0, 1]], -(horizon as f64), "u*(s2), N = {horizon}");
        assert_eq!(sol.policy[[0, 0]], best, "decision in s1, N = {horizon}");
        assert_eq!(sol.optimal_value, u1);
    }
}

/// Rewards at the largest allowed magnitude (±1e300, `MAX_MAGNITUDE`) over
/// the longest horizon (10 000) solve to finite values and gaps (#11,
/// class 5: 1.7e308 overflowed to infinity and the solver panicked). By
/// hand (backward induction): staying on a1 pays 1e300 per step, so
/// V*_h = (H − h)·1e300, and a2 (−1e300) has gap 2e300 at every step.
/// Just above the bound the model is refused, naming the reward.
#[test]
fn rewards_at_the_magnitude_limit_solve_to_finite_values() {
    let h = 10_000;
    let m = model(1, 2, h, |_, a| {
        (vec![(0, 1.0)], if a == 0 { 1e300 } else { -1e300 })
    });
    let sol = solve(&m);
    let rel = |x: f64, want: f64| ((x - want) / want).abs();
    assert!(
        rel(sol.optimal_value, 1e304) < 1e-12,
        "{}",
        sol.optimal_value
    );
    for t in 0..h {
        let gap = sol.v[[t, 0]] - sol.q[[t, 0, 1]];
        assert!(rel(gap, 2e300) < 1e-9, "step {t}: gap {gap}");
    }
    let text = r#"{"format": "burnin-model", "version": 1, "horizon": 2, "states": ["s"],
        "actions": ["a"], "start": [1], "steps": [{"transitions": [[[[0, 1]]]], "rewards": [[1.7e308]]}]}"#;
    let p = burnin::parse_model(text).unwrap_err().lines();
    assert_eq!(
        p[0],
        "steps[0].rewards[0][0]: reward 1.7e308 is not a finite number within ±1e300"
    );
}

/// The exact evaluation that prices every episode keeps the last greedy
/// policy's values and recomputes only the steps a new policy's changes
/// reach. Whatever the sequence of policies (a few actions changed, all of
/// them, ε changed), every value is the bits of a fresh backward pass and
/// agrees with `evaluate` (checked against the textbook examples above) to
/// 1e-12 of its scale; a policy changed in one state at step h recomputes no
/// step above h.
#[test]
fn kept_values_give_the_full_pass_bit_for_bit() {
    use burnin::solve::Evaluator;
    use rand::{Rng, SeedableRng};
    let mut rng = rand_chacha::ChaCha8Rng::seed_from_u64(5);
    for seed in 0..20 {
        let m = common::random_model(seed, 0.0);
        let (h_n, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let mut kept = Evaluator::new(&m);
        let mut g: Vec<u32> = (0..h_n * s_n)
            .map(|_| rng.random_range(0..a_n as u32))
            .collect();
        let mut eps = 0.0;
        for trial in 0..30 {
            // The one step a trial changed, if it changed one action only.
            let mut only = None;
            match trial % 5 {
                // One action.
                0 | 1 => {
                    let i = rng.random_range(0..h_n * s_n);
                    g[i] = rng.random_range(0..a_n as u32);
                    only = Some(i / s_n);
                }
                // A few at one step.
                2 => {
                    let h = rng.random_range(0..h_n);
                    for s in 0..s_n {
                        if rng.random::<f64>() < 0.3 {
                            g[h * s_n + s] = rng.random_range(0..a_n as u32);
                        }
                    }
                }
                // All of them.
                3 => g
                    .iter_mut()
                    .for_each(|x| *x = rng.random_range(0..a_n as u32)),
                // Another ε.
                _ => eps = if eps == 0.0 { 0.1 } else { 0.0 },
            }
            let before = kept.work().0;
            let got = kept.value(&m, Some(&g), eps);
            let fresh = Evaluator::new(&m).value(&m, Some(&g), eps);
            assert_eq!(
                got.to_bits(),
                fresh.to_bits(),
                "model {seed}, trial {trial}"
            );
            // The same policy as an explicit table, through `evaluate`.
            let mut probs = ndarray::Array3::<f64>::from_elem((h_n, s_n, a_n), eps / a_n as f64);
            for h in 0..h_n {
                for s in 0..s_n {
                    probs[[h, s, g[h * s_n + s] as usize]] += 1.0 - eps;
                }
            }
            let v = evaluate(&m, &Policy::Stochastic(probs)).unwrap();
            let reference: f64 = m.start().iter().zip(v.row(0)).map(|(p, x)| p * x).sum();
            let scale = reference.abs().max(1.0);
            assert!(
                (got - reference).abs() <= 1e-12 * scale,
                "{got} vs {reference}"
            );
            if let (Some(h), true) = (only, trial > 0) {
                // Steps above h kept: at most (h + 1)·S states recomputed.
                let done = kept.work().0 - before;
                assert!(done <= ((h + 1) * s_n) as u64, "{done} at step {h}");
            }
        }
        let (done, full) = kept.work();
        assert!(
            done < full,
            "model {seed}: {done} of {full} states recomputed"
        );
    }
}

//! Properties every exact solution must have (common practice; each follows
//! from the Bellman optimality equations, e.g. Puterman 1994, Theorem 4.3.2),
//! checked on random models.

mod common;

use burnin::solve::{Policy, evaluate, solve};
use burnin::{parse_model, write_model};
use ndarray::{Array2, Array3};
use proptest::prelude::*;
use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;

const TOL: f64 = 1e-12;

fn random_policies(m: &burnin::Mdp, seed: u64) -> (Policy, Policy) {
    let mut rng = ChaCha8Rng::seed_from_u64(seed);
    let (h, s, a) = (m.horizon(), m.n_states(), m.n_actions());
    let det = Array2::from_shape_fn((h, s), |_| rng.random_range(0..a as u32));
    let mut sto = Array3::from_shape_fn((h, s, a), |_| rng.random::<f64>());
    for hi in 0..h {
        for si in 0..s {
            let total: f64 = (0..a).map(|ai| sto[[hi, si, ai]]).sum();
            for ai in 0..a {
                sto[[hi, si, ai]] /= total;
            }
        }
    }
    (Policy::Deterministic(det), Policy::Stochastic(sto))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    #[test]
    fn optimal_values_dominate_every_policy(seed in any::<u64>(), pseed in any::<u64>()) {
        let m = common::random_model(seed, -1.0);
        let sol = solve(&m);
        let (det, sto) = random_policies(&m, pseed);
        for pi in [det, sto] {
            let v = evaluate(&m, &pi).unwrap();
            for (x, y) in sol.v.iter().zip(v.iter()) {
                prop_assert!(*x >= *y - TOL, "V* {x} < V^π {y}");
            }
        }
        // The optimal policy attains V*, and its gaps are zero.
        let v_star = evaluate(&m, &Policy::Deterministic(sol.policy.clone())).unwrap();
        for (x, y) in sol.v.iter().zip(v_star.iter()) {
            prop_assert!((x - y).abs() <= TOL * x.abs().max(1.0));
        }
        let gaps = sol.gaps();
        for ((h, s, a), g) in gaps.indexed_iter() {
            prop_assert!(*g >= 0.0);
            if sol.policy[[h, s]] as usize == a {
                prop_assert!(*g <= TOL * sol.v[[h, s]].abs().max(1.0) * 2.0);
            }
        }
    }

    #[test]
    fn values_are_bounded_by_remaining_steps_times_largest_reward(seed in any::<u64>()) {
        let m = common::random_model(seed, -1.0);
        let sol = solve(&m);
        let (lo, hi) = m.reward_range();
        let rmax = lo.abs().max(hi.abs());
        for h in 0..=m.horizon() {
            for s in 0..m.n_states() {
                let bound = (m.horizon() - h) as f64 * rmax;
                prop_assert!(sol.v[[h, s]].abs() <= bound + TOL, "|V_{h}({s})| above (H−h)·r_max");
            }
        }
    }

    #[test]
    fn values_do_not_decrease_with_the_horizon_when_rewards_are_non_negative(seed in any::<u64>()) {
        let m = common::random_model(seed, 0.0);
        prop_assume!(m.is_stationary());
        let mut parts = m.to_parts();
        let short = solve(&m);
        parts.horizon += 1;
        let long = solve(&burnin::Mdp::from_parts(parts).unwrap());
        for s in 0..m.n_states() {
            prop_assert!(long.v[[0, s]] >= short.v[[0, s]] - TOL);
        }
    }

    #[test]
    fn writing_and_reading_a_model_gives_back_the_same_bits(seed in any::<u64>()) {
        let m = common::random_model(seed, -1.0);
        let text = write_model(&m);
        let back = parse_model(&text).unwrap();
        prop_assert_eq!(&back, &m);
        prop_assert_eq!(write_model(&back), text);
    }
}

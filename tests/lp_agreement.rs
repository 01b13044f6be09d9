//! Backward induction against the linear-programming formulation of a
//! finite-horizon MDP, solved by a general-purpose simplex solver (microlp).
//!
//! LP (Puterman 1994, §6.9 in its discounted form; the finite-horizon version
//! is common practice): minimise Σ_h Σ_s V_h(s) subject to
//! V_h(s) − γ Σ_{s'} P_h(s'|s,a) V_{h+1}(s') ≥ r̄_h(s,a) for all h, s, a, with
//! V_H ≡ 0. Its unique optimum is V*.

mod common;

use burnin::solve::solve;
use microlp::{ComparisonOp, OptimizationDirection, Problem};

#[test]
fn backward_induction_matches_the_lp_on_60_random_models() {
    for seed in 0..60 {
        let m = common::random_model(seed, -1.0);
        let (h, s_n, a_n) = (m.horizon(), m.n_states(), m.n_actions());
        let mut lp = Problem::new(OptimizationDirection::Minimize);
        let vars: Vec<Vec<_>> = (0..h)
            .map(|_| {
                (0..s_n)
                    .map(|_| lp.add_var(1.0, (f64::NEG_INFINITY, f64::INFINITY)))
                    .collect()
            })
            .collect();
        for hi in 0..h {
            let step = m.step(hi);
            for s in 0..s_n {
                for a in 0..a_n {
                    let row = s * a_n + a;
                    let (next, prob) = step.row(row);
                    let mut coefs = vec![(vars[hi][s], 1.0)];
                    if hi + 1 < h {
                        for (&n, &p) in next.iter().zip(prob) {
                            let c = -m.discount() * p;
                            match coefs
                                .iter_mut()
                                .find(|(v, _)| *v == vars[hi + 1][n as usize])
                            {
                                Some(e) => e.1 += c,
                                None => coefs.push((vars[hi + 1][n as usize], c)),
                            }
                        }
                    }
                    lp.add_constraint(&coefs, ComparisonOp::Ge, step.mean_rewards()[row]);
                }
            }
        }
        let lp_sol = lp
            .solve()
            .expect("the LP is feasible and bounded")
            .into_solution()
            .expect("no limit was set, so the solve is not interrupted");
        let bi = solve(&m);
        for hi in 0..h {
            for s in 0..s_n {
                let (x, y) = (lp_sol.var_value(vars[hi][s]), bi.v[[hi, s]]);
                assert!(
                    (x - y).abs() < common::VALUE_TOL,
                    "model {seed}: V_{hi}({s}) LP {x} vs backward induction {y}"
                );
            }
        }
    }
}

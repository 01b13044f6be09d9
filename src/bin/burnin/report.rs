//! The results as a table for a person: one row per learner (regret at K
//! with its interval, slope, updates, burn-in), the ε-optimal episodes,
//! where the regret was paid and the paired comparisons; for a sweep, regret
//! at K against the swept value. The texts of the readings are the core's.

use burnin::experiment::{Results, SweepResults, interval_text, median_text, number_text};

use crate::tables::column_width;

/// Width of a table's learner column: its longest label, at least "learner".
fn label_width<'a>(labels: impl Iterator<Item = &'a str>) -> usize {
    column_width(labels, "learner".len())
}

pub fn sweep_table(r: &SweepResults) -> String {
    use std::fmt::Write as _;
    let mut o = String::new();
    let _ = writeln!(o, "regret at K against {}", r.parameter);
    let lw = label_width(r.learners.iter().map(|l| l.label.as_str()));
    let _ = write!(o, "\n{:<lw$}", "learner");
    for v in &r.values {
        let _ = write!(o, "  {:>26}", format!("{} = {v}", r.parameter));
    }
    o.push('\n');
    for l in &r.learners {
        let _ = write!(o, "{:<lw$}", l.label);
        for i in 0..r.values.len() {
            let cell = format!(
                "{} {}",
                number_text(l.regret_mean[i]),
                interval_text(l.regret_mean[i], l.regret_lo[i], l.regret_hi[i])
            );
            let _ = write!(o, "  {cell:>26}");
        }
        o.push('\n');
    }
    // Every reading per point, as the one-point table prints it.
    let _ = writeln!(
        o,
        "\nslope [95% bootstrap] and burn-in [95% bootstrap] at each {}",
        r.parameter
    );
    let texts = burnin::experiment::Output::Sweep(r.clone()).reading_texts();
    for (v, point) in r.values.iter().zip(&texts) {
        let _ = writeln!(o, "{} = {v}", r.parameter);
        for t in point {
            let _ = writeln!(o, "  {:<lw$}  {:>22}  {}", t.label, t.slope, t.burn_in);
        }
    }
    if let Some(x) = &r.scaling_in {
        let _ = writeln!(
            o,
            "
scaling in {x} (least squares on log-log axes, [95% bootstrap]), beside the published order"
        );
        for l in &r.learners {
            if let Some(sc) = &l.scaling {
                let _ = writeln!(o, "  {:<lw$}  {}", l.label, sc.burn_in_text(x));
                let _ = writeln!(o, "  {:<lw$}  {}", "", sc.regret_text(x));
            }
        }
    }
    o
}

/// Cells listed per learner in the table's "where the regret was paid".
const TOP_CELLS: usize = 3;

pub fn results_table(r: &Results) -> String {
    use std::fmt::Write as _;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "{:?}: S={} A={} H={}, K={} episodes × {} seeds, V* = {:.6}",
        r.model_name, r.states, r.actions, r.horizon, r.episodes, r.seeds, r.optimal_value
    );
    let lw = label_width(r.learners.iter().map(|l| l.label.as_str()));
    let _ = writeln!(
        o,
        "\n{:<lw$}  {:>12}  {:>21}  {:>22}  {:>10}  burn-in [95% bootstrap]",
        "learner", "regret at K", "95% interval", "slope [95% bootstrap]", "updates"
    );
    for l in &r.learners {
        let last = l.regret_mean.len() - 1;
        let upd = burnin::stats::mean(
            &l.model_updates
                .iter()
                .map(|&x| x as f64)
                .collect::<Vec<_>>(),
        );
        let _ = writeln!(
            o,
            "{:<lw$}  {:>12}  {:>21}  {:>22}  {:>10.1}  {}",
            l.label,
            number_text(l.regret_mean[last]),
            interval_text(l.regret_mean[last], l.regret_lo[last], l.regret_hi[last]),
            l.slope_text(),
            upd,
            l.burn_in_text(),
        );
    }
    let _ = writeln!(
        o,
        "\nslope: {}\nburn-in: {}",
        burnin::catalogue::meaning("slope"),
        burnin::catalogue::meaning("burn_in")
    );
    for l in &r.learners {
        if let Some(k) = l.bound.as_ref().and_then(|b| b.bonus_below_h) {
            let _ = writeln!(
                o,
                "{}: with the published constants the bonus is below H whatever the data from about K = {k:.0} (visits spread evenly)",
                l.label
            );
        }
    }
    let eps = &r.learners[0].episodes_to_eps;
    if !eps.is_empty() {
        let _ = writeln!(
            o,
            "\nε-optimal policies (expected regret ≤ ε; medians over seeds; PAC order S·A·H³/ε², Zhang et al. 2024):"
        );
        let _ = writeln!(
            o,
            "{:<lw$}  {:>8}  {:>16}  {:>12}  {:>9}  {:>22}",
            "learner", "ε", "first ε-optimal", "PAC order", "share", "settled within ε after"
        );
        for l in &r.learners {
            for e in &l.episodes_to_eps {
                let share = burnin::stats::mean(&e.optimal_share);
                let _ = writeln!(
                    o,
                    "{:<lw$}  {:>8.4}  {:>16}  {:>12.4e}  {:>8.1}%  {:>22}",
                    l.label,
                    e.epsilon,
                    median_text(&e.first_optimal),
                    e.pac_order,
                    100.0 * share,
                    median_text(&e.episodes)
                );
            }
        }
        for e in r.learners[0].episodes_to_eps.iter().filter(|e| e.trivial) {
            let _ = writeln!(
                o,
                "ε = {}: at least V* = {}, so every policy is ε-optimal and these rows say nothing about learning",
                e.epsilon,
                number_text(r.optimal_value)
            );
        }
    }
    let decomposed = r.learners.iter().any(|l| !l.regret_by_cell.is_empty());
    if decomposed {
        let _ = writeln!(
            o,
            "\nwhere the regret was paid (d·Δ summed over episodes, mean over seeds; the {TOP_CELLS} largest (step, state, action) cells, share of regret at K):"
        );
    }
    for l in r.learners.iter().filter(|_| decomposed) {
        let cells = l.top_cells(TOP_CELLS);
        let name = |v: &[String], i: usize| v.get(i).map_or(i.to_string(), |x| format!("{x:?}"));
        let text: Vec<String> = cells
            .iter()
            .map(|c| {
                format!(
                    "h={} {} {} {:.1}%",
                    c.step + 1,
                    name(&r.state_labels, c.state),
                    name(&r.action_labels, c.action),
                    100.0 * c.share
                )
            })
            .collect();
        let _ = writeln!(
            o,
            "  {:<lw$}  {}",
            l.label,
            if text.is_empty() {
                "no regret".to_string()
            } else {
                text.join(" · ")
            }
        );
    }
    if !r.comparisons.is_empty() {
        let _ = writeln!(
            o,
            "\npaired comparisons at K (run j of one learner against run j of the other):"
        );
        for c in &r.comparisons {
            let _ = writeln!(o, "  {}", c.verdict);
        }
    }
    o
}

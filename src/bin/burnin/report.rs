//! The results as a table for a person: one row per learner (regret at K
//! with its interval, slope, updates, burn-in), the ε-optimal episodes,
//! where the regret was paid and the paired comparisons; for a sweep, regret
//! at K against the swept value. The texts of the readings are the core's.

use burnin::experiment::{Results, SweepResults};

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
            let cell = if r.points[0].seeds < 2 {
                format!("{:.2} n/a (one seed)", l.regret_mean[i])
            } else {
                format!(
                    "{:.2} [{:.2}, {:.2}]",
                    l.regret_mean[i], l.regret_lo[i], l.regret_hi[i]
                )
            };
            let _ = write!(o, "  {cell:>26}");
        }
        o.push('\n');
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
            "{:<lw$}  {:>12.3}  {:>21}  {:>22}  {:>10.1}  {}",
            l.label,
            l.regret_mean[last],
            if r.seeds < 2 {
                "n/a (one seed)".to_string()
            } else {
                format!("[{:.3}, {:.3}]", l.regret_lo[last], l.regret_hi[last])
            },
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

/// The median of per-seed episode numbers, or how many seeds never got there.
fn median_text(xs: &[Option<u64>]) -> String {
    let mut got: Vec<u64> = xs.iter().flatten().copied().collect();
    if got.len() < xs.len() {
        return format!("not in {} of {}", xs.len() - got.len(), xs.len());
    }
    got.sort_unstable();
    got.get(got.len() / 2).map_or("—".into(), |m| m.to_string())
}

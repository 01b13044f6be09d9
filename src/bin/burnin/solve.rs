//! `burnin solve`: the core's exact solution as a table or as JSON.

use std::path::PathBuf;

use burnin::Mdp;

use crate::files::{Failure, emit, load};
use crate::tables::{column_width, fixed6, terminal_safe};
use crate::validate::summary;

#[derive(clap::Args)]
pub struct Args {
    /// Model file (burnin-model v1), or - for standard input.
    pub file: PathBuf,
    /// Print the solution as JSON instead of a table.
    #[arg(long)]
    pub json: bool,
}

pub fn solve(a: &Args) -> Result<(), Failure> {
    let m = load(&a.file)?;
    let sol = burnin::solve::solve(&m);
    if a.json {
        return emit(&burnin::solve::solution_json(&m, &sol));
    }
    // Labels from the file are shown with escapes, as run and validate
    // show them, never sent raw to the terminal (#35).
    emit(&terminal_safe(&solution_table(&m, &sol)))
}

/// A readable table: one line per (step, state) with V*, the optimal action,
/// and Q* of every action.
fn solution_table(m: &Mdp, sol: &burnin::solve::Solution) -> String {
    use std::fmt::Write as _;
    let mut o = String::new();
    let _ = writeln!(o, "{}", summary(m).trim_start_matches("ok: "));
    let _ = writeln!(o, "optimal value  {}", fixed6(sol.optimal_value));
    if m.discount() < 1.0 {
        let _ = writeln!(o, "discount       {}", m.discount());
    }
    let sw = column_width(m.states().iter().map(String::as_str), 5);
    let aw = column_width(m.actions().iter().map(String::as_str), 10);
    let _ = write!(
        o,
        "\n{:>4}  {:<sw$}  {:>10}  {:<aw$}",
        "step", "state", "V*", "best action"
    );
    for a in m.actions() {
        let _ = write!(o, "  {:>10}", format!("Q*({})", a));
    }
    o.push('\n');
    for h in 0..m.horizon() {
        for (s, label) in m.states().iter().enumerate() {
            let best = &m.actions()[sol.policy[[h, s]] as usize];
            let _ = write!(
                o,
                "{:>4}  {:<sw$}  {:>10}  {:<aw$}",
                h + 1,
                label,
                fixed6(sol.v[[h, s]]),
                best
            );
            for a in 0..m.n_actions() {
                let _ = write!(o, "  {:>10}", fixed6(sol.q[[h, s, a]]));
            }
            o.push('\n');
        }
    }
    o
}

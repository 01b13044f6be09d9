//! `burnin`: the command-line front end. Glue only: arguments, files, exit
//! codes (0 ok, 1 invalid input, 2 usage or I/O error, 3 a guest learner
//! failed) and output formatting; all logic is in the library, shared with
//! the page, except starting guest learners' processes (`guest.rs`). One
//! module per command; `files.rs`, `outputs.rs`, `tables.rs`, `report.rs`, `progress.rs`
//! and `figure.rs` are what several commands share.

mod bench;
mod canon;
mod figure;
mod files;
mod generate;
mod guest;
mod guest_groups;
mod guest_process;
mod merge;
mod outputs;
mod plot;
mod progress;
mod report;
mod run;
mod solve;
mod table;
mod tables;
mod validate;

use std::io::Write;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

use files::Failure;

#[derive(Parser)]
#[command(
    name = "burnin",
    version = burnin::BUILD,
    about = "Models, exact solutions and regret experiments for finite-horizon tabular MDPs"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand)]
enum Command {
    /// Check a model file; print a one-line summary, or one line per problem.
    Validate(validate::Args),
    /// Solve a model exactly by backward induction: V*, Q*, an optimal policy, gaps.
    Solve(solve::Args),
    /// Run a regret experiment (burnin-experiment v1): every learner for K
    /// episodes over each seed.
    Run(run::Args),
    /// Time the reference workloads (solver, learners, MVP replanning) on this machine.
    Bench(bench::Args),
    /// Merge the shard files of one experiment into its results.
    Merge(merge::Args),
    /// Draw the chart of a results or sweep file as SVG or PNG (the page's
    /// chart: the same views, options and look).
    Plot(plot::Args),
    /// Write the comparison table of a results or sweep file (published
    /// bound and burn-in beside the measured regret, slope, burn-in and
    /// episodes to ε, per learner) as Markdown, LaTeX or CSV.
    Table(table::Args),
    /// Rewrite a model file in the canonical layout (fields in order, one
    /// transition row per line) on standard output.
    Canon(canon::Args),
    /// The old name of `canon`, kept for one release.
    #[command(hide = true)]
    Tidy(canon::Args),
    /// Write a generated model file to standard output.
    Generate(generate::Args),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let writes_to_file = match &cli.command {
        Command::Generate(g) => g.output.is_some(),
        Command::Table(t) => t.output.is_some(),
        _ => false,
    };
    let result = if writes_to_file {
        Ok(())
    } else {
        files::stdout_is_open()
    };
    let result = result.and_then(|()| dispatch(cli.command));
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(Failure::Invalid(lines)) => {
            let mut err = std::io::stderr().lock();
            for l in lines {
                let _ = writeln!(err, "{l}");
            }
            ExitCode::from(1)
        }
        Err(Failure::Io(msg)) => {
            let _ = writeln!(std::io::stderr(), "burnin: {msg}");
            ExitCode::from(2)
        }
        Err(Failure::Guest(msg)) => {
            let _ = writeln!(std::io::stderr(), "burnin: guest learner failed: {msg}");
            ExitCode::from(3)
        }
    }
}

/// Runs the subcommand.
fn dispatch(command: Command) -> Result<(), Failure> {
    match command {
        Command::Validate(a) => validate::validate(&a),
        Command::Solve(a) => solve::solve(&a),
        Command::Run(a) => run::run(&a),
        Command::Merge(a) => merge::merge(&a),
        Command::Bench(a) => bench::bench(&a),
        Command::Plot(a) => plot::plot(&a),
        Command::Table(a) => table::table(&a),
        Command::Canon(a) => canon::canon(&a),
        Command::Tidy(a) => canon::tidy(&a),
        Command::Generate(a) => generate::generate(a),
    }
}

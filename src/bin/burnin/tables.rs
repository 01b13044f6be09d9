//! The output of `run` and `merge`: the results on standard output (a
//! table or JSON), and the CSV tables and the figure they may also write.

use std::path::{Path, PathBuf};

use burnin::experiment::Output;

use crate::figure;
use crate::files::{Failure, emit};
use crate::outputs::{check_outputs, stage_output};
use crate::report::{results_table, sweep_table};

/// The CSV tables `run` and `merge` can write besides their output.
#[derive(clap::Args)]
pub struct TableArgs {
    /// Also write the curves as CSV to this file.
    #[arg(long, value_name = "FILE")]
    csv: Option<PathBuf>,
    /// Also write where the regret was paid, one row per (learner, step,
    /// state, action), as CSV to this file.
    #[arg(long, value_name = "FILE")]
    cells_csv: Option<PathBuf>,
    /// Also write every seed's regret curve as CSV to this file.
    #[arg(long, value_name = "FILE")]
    seeds_csv: Option<PathBuf>,
    /// Also draw the chart to this file (.svg or .png; see the Figure options).
    #[arg(long, value_name = "FILE")]
    figure: Option<PathBuf>,
    #[command(flatten)]
    look: figure::FigureArgs,
}

impl TableArgs {
    /// The figure's file and how to draw it.
    pub fn figure(&self) -> Option<(&Path, &figure::FigureArgs)> {
        self.figure.as_deref().map(|p| (p, &self.look))
    }

    /// Checks every output path before anything runs (`check_outputs`):
    /// none is an input, a folder, in a missing folder, or named twice.
    pub fn check_paths(&self, inputs: &[&Path]) -> Result<(), Failure> {
        if let Some((p, look)) = self.figure() {
            look.check(p)
                .map_err(|e| Failure::Io(format!("--figure: {e}")))?;
        }
        let outputs: Vec<(&str, &Path)> = [
            ("--csv", self.csv.as_deref()),
            ("--cells-csv", self.cells_csv.as_deref()),
            ("--seeds-csv", self.seeds_csv.as_deref()),
            ("--figure", self.figure.as_deref()),
        ]
        .into_iter()
        .filter_map(|(flag, p)| p.map(|p| (flag, p)))
        .collect();
        check_outputs(&outputs, inputs, "an input file")
    }

    /// Prints the results, then writes every table and the figure: the
    /// results go out first, and every table is written even when one
    /// output fails, so a failed output does not lose what was computed.
    pub fn finish(&self, out: &Output, json: bool) -> Result<(), Failure> {
        let printed = if json {
            emit(&out.to_json())
        } else {
            emit(&terminal_safe(&match out {
                Output::Single(r) => results_table(r),
                Output::Sweep(r) => sweep_table(r),
            }))
        };
        type Writer = fn(&Output) -> String;
        let writers: [(Option<&Path>, Writer); 3] = [
            (self.csv.as_deref(), Output::to_csv),
            (self.cells_csv.as_deref(), Output::cells_csv),
            (self.seeds_csv.as_deref(), Output::seeds_csv),
        ];
        // Every file is written under a temporary name first and all are
        // put in place together, so an interrupt leaves the old files as
        // they were, never a new table beside an old one.
        let mut failed = Vec::new();
        let mut staged = Vec::new();
        let mut written = Vec::new();
        for (path, write) in writers {
            if let Some(p) = path {
                match stage_output(p, write(out).as_bytes()) {
                    Ok(s) => staged.push((p, s)),
                    Err(e) => failed.push(e),
                }
            }
        }
        if let Some((p, look)) = self.figure() {
            match look.render(out, p).and_then(|b| stage_output(p, &b)) {
                Ok(s) => staged.push((p, s)),
                Err(e) => failed.push(format!("--figure: {e}")),
            }
        }
        for (p, s) in staged {
            match s.map_or(Ok(()), |s| s.commit()) {
                Ok(()) => written.push(p.display().to_string()),
                Err(e) => failed.push(e),
            }
        }
        match (printed, failed.is_empty()) {
            (Ok(()), true) => Ok(()),
            (Ok(()), false) => Err(Failure::Io(format!(
                "{} (the results were printed on standard output)",
                failed.join("; ")
            ))),
            (Err(Failure::Io(m)), _) => {
                failed.insert(0, m);
                if !written.is_empty() {
                    failed.push(format!("the tables were written to {}", written.join(", ")));
                }
                Err(Failure::Io(failed.join("; ")))
            }
            (Err(f), _) => Err(f),
        }
    }
}

/// A table for a terminal: control characters (from labels and names in
/// files) are shown as escapes, never sent to the terminal.
pub fn terminal_safe(text: &str) -> String {
    text.chars()
        .map(|c| {
            if c.is_control() && c != '\n' {
                format!("\\u{{{:x}}}", c as u32)
            } else {
                c.to_string()
            }
        })
        .collect()
}

/// Width of a table's column: its longest entry, at least `at_least`.
pub fn column_width<'a>(entries: impl Iterator<Item = &'a str>, at_least: usize) -> usize {
    entries
        .map(|l| l.chars().count())
        .max()
        .unwrap_or(0)
        .max(at_least)
}

/// A value with six decimals, or with an exponent when it is too large
/// for a table column (rewards may reach ±1e300).
pub fn fixed6(x: f64) -> String {
    if x.abs() < 1e9 {
        format!("{x:.6}")
    } else {
        format!("{x:.5e}")
    }
}

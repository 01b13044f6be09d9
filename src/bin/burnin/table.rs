//! `burnin table`: the comparison table of a results or sweep file as
//! Markdown, LaTeX or CSV. The table is the core's
//! (`burnin::experiment::comparison_table`), the same text the page's
//! "Comparison table" export downloads.

use std::path::PathBuf;

use burnin::experiment::{TableFormat, parse_results};

use crate::files::{Failure, emit, invalid_in, read_text};
use crate::outputs::{check_outputs, write_output};

#[derive(clap::Args)]
pub struct Args {
    /// Results file (burnin-results or burnin-sweep), or - for standard input.
    pub file: PathBuf,
    /// markdown (a GitHub pipe table), latex (a table float with booktabs
    /// rules) or csv. Default: what the --output file's extension names
    /// (.md, .tex, .csv), else markdown.
    #[arg(long, value_name = "FORMAT")]
    pub format: Option<String>,
    /// Write the table to this file instead of standard output.
    #[arg(long, short, value_name = "FILE")]
    pub output: Option<PathBuf>,
}

/// The format asked for, checked against the output file's extension.
fn format_of(a: &Args) -> Result<TableFormat, Failure> {
    let by_extension = a
        .output
        .as_deref()
        .and_then(|p| p.extension())
        .and_then(|e| e.to_str())
        .and_then(TableFormat::from_extension);
    let Some(key) = &a.format else {
        return Ok(by_extension.unwrap_or(TableFormat::Markdown));
    };
    let format = TableFormat::from_key(key).ok_or_else(|| {
        Failure::Io(format!(
            "--format {key}: expected one of {}",
            TableFormat::keys()
        ))
    })?;
    match (by_extension, &a.output) {
        (Some(e), Some(p)) if e != format => Err(Failure::Io(format!(
            "--output {}: the file's extension names {}, not {}; give it a .{} extension or leave out --format",
            p.display(),
            e.key(),
            format.key(),
            format.extension()
        ))),
        _ => Ok(format),
    }
}

pub fn table(a: &Args) -> Result<(), Failure> {
    let format = format_of(a)?;
    if let Some(output) = &a.output {
        check_outputs(&[("--output", output)], &[&a.file], "the results file")?;
    }
    let text = read_text(&a.file)?;
    let out = parse_results(&text).map_err(|p| invalid_in(&a.file, p))?;
    let table = out.table(format);
    match &a.output {
        Some(p) => write_output(p, table.as_bytes()).map_err(Failure::Io),
        None => emit(&table),
    }
}

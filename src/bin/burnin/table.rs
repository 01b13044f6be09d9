//! `burnin table`: the comparison table of a results or sweep file as
//! Markdown, LaTeX or CSV. The table is the core's
//! (`burnin::experiment::comparison_table`), the same text the page's
//! "Comparison table" export downloads.

use std::path::{Path, PathBuf};

use burnin::experiment::{TableFormat, parse_results};

use crate::files::{Failure, emit, invalid_in, read_text};

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

/// Refuses an output path that is the results file itself, a folder, or
/// in a folder that does not exist, before anything is read.
fn check_output(input: &Path, output: &Path) -> Result<(), Failure> {
    let at = |why: &str| Failure::Io(format!("--output {}: {why}", output.display()));
    if output.is_dir() {
        return Err(at("that is a folder; name a file"));
    }
    if let Some(folder) = output.parent()
        && !folder.as_os_str().is_empty()
        && !folder.is_dir()
    {
        return Err(at(&format!("there is no folder {}", folder.display())));
    }
    let same = std::fs::canonicalize(input)
        .is_ok_and(|i| std::fs::canonicalize(output).is_ok_and(|o| o == i));
    if same {
        return Err(at(
            "that is the results file, which the table would overwrite; choose another path",
        ));
    }
    Ok(())
}

pub fn table(a: &Args) -> Result<(), Failure> {
    let format = format_of(a)?;
    if let Some(output) = &a.output {
        check_output(&a.file, output)?;
    }
    let text = read_text(&a.file)?;
    let out = parse_results(&text).map_err(|p| invalid_in(&a.file, p))?;
    let table = out.table(format);
    match &a.output {
        Some(p) => std::fs::write(p, table)
            .map_err(|e| Failure::Io(format!("cannot write {}: {e}", p.display()))),
        None => emit(&table),
    }
}

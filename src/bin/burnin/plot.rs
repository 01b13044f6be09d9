//! `burnin plot`: the chart of a results or sweep file as SVG or PNG, drawn
//! by the core (the page's chart: the same views, options and look).

use std::path::PathBuf;

use crate::figure::FigureArgs;
use crate::files::{Failure, invalid_in, read_text};

#[derive(clap::Args)]
pub struct Args {
    /// Results file (burnin-results or burnin-sweep), or - for standard input.
    pub file: PathBuf,
    /// The figure file to write: .svg or .png.
    #[arg(long, short, value_name = "FILE")]
    pub output: PathBuf,
    #[command(flatten)]
    pub figure: FigureArgs,
}

pub fn plot(a: &Args) -> Result<(), Failure> {
    let (file, output, look) = (&a.file, &a.output, &a.figure);
    look.check(output).map_err(Failure::Io)?;
    if std::fs::canonicalize(file)
        .is_ok_and(|f| std::fs::canonicalize(output).is_ok_and(|o| o == f))
    {
        return Err(Failure::Io(format!(
            "--output {}: that is the results file, which the figure would overwrite; choose another path",
            output.display()
        )));
    }
    let text = read_text(file)?;
    let out = burnin::experiment::parse_results(&text).map_err(|p| invalid_in(file, p))?;
    let bytes = look.render(&out, output).map_err(Failure::Io)?;
    std::fs::write(output, bytes)
        .map_err(|e| Failure::Io(format!("cannot write {}: {e}", output.display())))
}

//! `burnin plot`: the chart of a results or sweep file as SVG or PNG, drawn
//! by the core (the page's chart: the same views, options and look).

use std::path::PathBuf;

use crate::figure::FigureArgs;
use crate::files::{Failure, invalid_in, read_text};
use crate::outputs::{check_outputs, write_output};

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
    check_outputs(&[("--output", output)], &[file], "the results file")?;
    let text = read_text(file)?;
    let out = burnin::experiment::parse_results(&text).map_err(|p| invalid_in(file, p))?;
    let bytes = look.render(&out, output).map_err(Failure::Io)?;
    write_output(output, &bytes).map_err(Failure::Io)
}

//! `burnin canon` (and `tidy`, its old name for one release): the model
//! file in the canonical layout (fields in order, one transition row per
//! line), on standard output.

use std::io::Write;
use std::path::PathBuf;

use crate::files::{Failure, emit, load};

#[derive(clap::Args)]
pub struct Args {
    /// Model file (burnin-model v1), or - for standard input.
    pub file: PathBuf,
}

pub fn canon(a: &Args) -> Result<(), Failure> {
    emit(&burnin::write_model(&load(&a.file)?))
}

/// The old name: a note on standard error, then `canon`.
pub fn tidy(a: &Args) -> Result<(), Failure> {
    let _ = writeln!(
        std::io::stderr(),
        "note: `burnin tidy` is now `burnin canon`; the old name goes in the next release"
    );
    canon(a)
}

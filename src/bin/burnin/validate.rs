//! `burnin validate`: a model file's one-line summary, or its problems.

use std::path::PathBuf;

use burnin::Mdp;

use crate::files::{Failure, emit, load};

#[derive(clap::Args)]
pub struct Args {
    /// Model file (burnin-model v1), or - for standard input.
    pub file: PathBuf,
}

pub fn validate(a: &Args) -> Result<(), Failure> {
    let m = load(&a.file)?;
    emit(&format!("{}\n", summary(&m)))
}

/// "ok: NAME: S=… A=… H=…, … step tables (…), … transition entries".
pub fn summary(m: &Mdp) -> String {
    let tables = m.step_tables().len();
    format!(
        "ok: {:?}: S={} A={} H={}, {} step table{} ({}), {} transition entries",
        m.name(),
        m.n_states(),
        m.n_actions(),
        m.horizon(),
        tables,
        if tables == 1 { "" } else { "s" },
        if m.is_stationary() {
            "stationary"
        } else {
            "time-dependent"
        },
        m.entries()
    )
}

//! `burnin merge`: the shard files of one experiment, checked and
//! summarised by the core into exactly what one run gives.

use std::path::PathBuf;

use crate::files::{Failure, invalid, read_text};
use crate::tables::TableArgs;

#[derive(clap::Args)]
pub struct Args {
    /// Shard files from `burnin run --shard I/N`, all N of them.
    #[arg(required = true)]
    pub files: Vec<PathBuf>,
    /// Print the results as JSON instead of a table.
    #[arg(long)]
    pub json: bool,
    #[command(flatten)]
    pub tables: TableArgs,
}

pub fn merge(a: &Args) -> Result<(), Failure> {
    let files = &a.files;
    a.tables
        .check_paths(&files.iter().map(PathBuf::as_path).collect::<Vec<_>>())?;
    let mut shards = Vec::with_capacity(files.len());
    for f in files {
        let text = read_text(f)?;
        let shard: burnin::experiment::ShardFile = serde_json::from_str(&text).map_err(|e| {
            Failure::Invalid(vec![format!("{}: not a shard file ({e})", f.display())])
        })?;
        shards.push(shard);
    }
    let name = |i: usize| files[i].display().to_string();
    let out = burnin::experiment::merge(&shards, &name).map_err(invalid)?;
    a.tables.finish(&out, a.json)
}

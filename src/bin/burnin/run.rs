//! `burnin run`: reads the experiment and its options, hands the core's
//! runner (`burnin::experiment::Runner`) this machine's clock and threads
//! (`burnin::native`), the free memory and the progress line, and prints what it gives back: the
//! results, a shard file, the estimate, or why it stopped. The estimate,
//! the budget's decisions and the schedule are the runner's.

use std::io::Write;
use std::path::{Path, PathBuf};
use std::sync::{Arc, Mutex};
use std::time::Duration;

use burnin::experiment::{Budget, Runner, Stopped, bytes_words, parse_experiment};

use burnin::native::Threads;

use crate::files::{Failure, emit, invalid, read_named_file, read_text};
use crate::guest;
use crate::progress::Progress;
use crate::tables::TableArgs;

#[derive(clap::Args)]
pub struct Args {
    /// Experiment file, or - for standard input.
    pub file: PathBuf,
    /// Print the results as JSON (burnin-results v1) instead of a table.
    #[arg(long)]
    pub json: bool,
    #[command(flatten)]
    pub tables: TableArgs,
    /// Runs in parallel (default: the machine's cores); results do not depend on it.
    #[arg(long, value_name = "N")]
    pub threads: Option<usize>,
    /// Run only shard I of N of the runs and print a shard file for `burnin merge`.
    #[arg(long, value_name = "I/N")]
    pub shard: Option<String>,
    /// Run with a fresh base seed drawn from the operating system's
    /// random source instead of the file's; the results carry it.
    #[arg(long, conflicts_with = "shard")]
    pub new_seed: bool,
    /// The command that starts the guest learner NAME (one process per
    /// run, through the shell); repeat for each guest the file names.
    #[arg(long = "learner", value_name = "NAME=CMD")]
    pub learners: Vec<String>,
    /// Seconds a guest learner may take to answer one message (and any
    /// other wait on it: to read a message, to end after closing its output).
    #[arg(long, value_name = "SECS", default_value_t = 30.0)]
    pub learner_timeout: f64,
    /// Print the run's estimated time and memory and stop, without running.
    #[arg(long, conflicts_with = "no_budget")]
    pub estimate: bool,
    /// Refuse a run estimated to take longer than this (minutes) or to
    /// need more memory than the machine has free.
    #[arg(long, value_name = "MINUTES", default_value_t = 60.0)]
    pub budget: f64,
    /// Run without estimating first (and so without a budget).
    #[arg(long)]
    pub no_budget: bool,
}

/// Parses "I/N" with 1 ≤ I ≤ N.
fn parse_shard(text: &str) -> Result<(usize, usize), Failure> {
    let bad = || {
        Failure::Io(format!(
            "--shard {text:?}: expected I/N with 1 ≤ I ≤ N, e.g. 2/8"
        ))
    };
    let (i, n) = text.split_once('/').ok_or_else(bad)?;
    let (i, n): (usize, usize) = (
        i.trim().parse().map_err(|_| bad())?,
        n.trim().parse().map_err(|_| bad())?,
    );
    if i == 0 || i > n {
        return Err(bad());
    }
    let most = burnin::experiment::MAX_SHARDS;
    if n > most {
        return Err(Failure::Io(format!(
            "--shard {text}: an experiment is split into 1 to {most} shards"
        )));
    }
    Ok((i, n))
}

/// Most runs in parallel (`--threads`): far more than any machine's cores,
/// far fewer than a system lets one process start.
const MAX_THREADS: usize = 1024;

/// Checks the options that need no file, before anything is read.
fn check_options(a: &Args) -> Result<(), Failure> {
    if !(a.estimate || a.no_budget || a.budget > 0.0 && a.budget.is_finite()) {
        return Err(Failure::Io(format!(
            "--budget: expected a number of minutes > 0, found {}",
            a.budget
        )));
    }
    if let Some(n) = a.threads
        && !(1..=MAX_THREADS).contains(&n)
    {
        // 100 000 threads panicked ("failed to spawn thread"; #35).
        return Err(Failure::Io(format!(
            "--threads {n}: expected 1 to {MAX_THREADS} runs in parallel"
        )));
    }
    if !(a.learner_timeout > 0.0 && a.learner_timeout <= 86_400.0) {
        return Err(Failure::Io(format!(
            "--learner-timeout: expected 0 < SECS ≤ 86400, found {}",
            a.learner_timeout
        )));
    }
    Ok(())
}

fn warn(text: &str) {
    let _ = writeln!(std::io::stderr(), "{text}");
}

pub fn run(a: &Args) -> Result<(), Failure> {
    let path = a.file.as_path();
    a.tables.check_paths(&[path])?;
    let shard = a.shard.as_deref().map(parse_shard).transpose()?;
    check_options(a)?;
    let host = guest::host(&a.learners, Duration::from_secs_f64(a.learner_timeout))
        .map_err(Failure::Io)?;
    let text = read_text(path)?;
    let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let model_text = Mutex::new(None::<String>);
    let model_file = Mutex::new(None::<PathBuf>);
    let loader = |rel: &str| -> Result<String, String> {
        *model_file.lock().expect("not poisoned") = Some(base.join(rel));
        // The same size limit as any file given on the command line, applied
        // while reading (a device file or a huge file is not read to the end).
        let t = read_named_file(&base.join(rel)).map_err(|f| match f {
            Failure::Io(m) | Failure::Guest(m) => m,
            Failure::Invalid(lines) => lines.join("; "),
        })?;
        *model_text.lock().expect("not poisoned") = Some(t.clone());
        Ok(t)
    };
    let mut exp = parse_experiment(&text, Some(&loader)).map_err(invalid)?;
    if let Some((_, look)) = a.tables.figure() {
        let labels: Vec<&str> = exp.learners.iter().map(|l| l.label.as_str()).collect();
        let opts = look.options().map_err(Failure::Io)?;
        burnin::chart::check_planned(&opts, exp.sweep.is_some(), &labels)
            .map_err(|e| Failure::Io(format!("--figure: {e}")))?;
    }
    if a.new_seed {
        let bits = getrandom::u64().map_err(|e| {
            Failure::Io(format!("--new-seed: the system gave no random bits ({e})"))
        })?;
        exp.seed = burnin::experiment::fresh_seed(bits);
        warn(&format!(
            "new seed {}: the results carry it as \"seed\"; give \"seed\": {} in the experiment to compute the same numbers again",
            exp.seed, exp.seed
        ));
    }
    if let Some(m) = model_file.lock().expect("not poisoned").as_deref() {
        // Checked before the run, not after it.
        a.tables.check_paths(&[m])?;
    }
    if let Some(w) = exp.seed_warning() {
        warn(&format!("warning: {w}"));
    }
    for (i, l) in exp.learners.iter().enumerate() {
        if let Some(g) = l.guest()
            && !host.commands.contains_key(g)
        {
            return Err(Failure::Io(format!(
                "learners[{i}] is the guest learner {g:?}; say what starts it with --learner {g}=CMD"
            )));
        }
    }
    for name in host.commands.keys() {
        if !exp.learners.iter().any(|l| l.guest() == Some(name)) {
            warn(&format!(
                "warning: --learner {name}: the experiment names no guest learner {name:?}"
            ));
        }
    }
    let guests: burnin::learn::Guests = Arc::new(host);
    let (index, count) = shard.map_or((0, 1), |(i, n)| (i - 1, n));
    let threads = a
        .threads
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, |n| n.get()));
    let runner = Runner::new(exp, Some(&guests), (index, count), threads);
    let clock = burnin::native::clock();
    if a.estimate {
        let e = runner.estimate(Arc::new(clock), &Threads);
        if a.json {
            return emit(&(serde_json::to_string_pretty(&e).expect("finite estimate") + "\n"));
        }
        return emit(&format!("estimate: {}\n", e.words()));
    }
    let budget = if a.no_budget {
        Budget::Unchecked
    } else {
        Budget::Within {
            seconds: 60.0 * a.budget,
            free_bytes: free_memory(),
        }
    };
    let progress = Progress::new(runner.total_episodes());
    let records = runner.run(&budget, &clock, &Threads, &progress);
    progress.clear();
    let records = records.map_err(|s| stopped(s, a.budget))?;
    if shard.is_some() {
        let model = model_text.into_inner().expect("not poisoned");
        return emit(&runner.shard_file(text, model, records).to_json());
    }
    a.tables.finish(&runner.output(records), a.json)
}

/// What the runner's reason to stop means here, with what the user can do.
fn stopped(s: Stopped, minutes: f64) -> Failure {
    match s {
        Stopped::OverTime { estimate, .. } => Failure::Io(format!(
            "this run is estimated to take {}, over the budget of {minutes} min; give a larger --budget, split it with --shard (docs/array-jobs.md), or --no-budget to run it anyway",
            estimate.words()
        )),
        Stopped::OverMemory { needed, free } => Failure::Io(format!(
            "this run is estimated to need {}, more than the {} of memory free; run it in shards (--shard) or with fewer seeds, or --no-budget to try anyway",
            bytes_words(needed),
            bytes_words(free)
        )),
        Stopped::Fault(f) => Failure::Guest(format!(
            "{f}\nno results were written; the other runs were stopped"
        )),
        Stopped::Cancelled { done, total } => {
            Failure::Io(format!("cancelled after {done} of {total} episodes"))
        }
    }
}

/// The memory free on this machine (what the system says is available for
/// use), in bytes, when it can tell.
fn free_memory() -> Option<f64> {
    let mut sys = sysinfo::System::new().ok()?;
    sys.refresh_memory();
    let free = sys.available_memory();
    (free > 0).then_some(free as f64)
}

//! `burnin`: the command-line front end. Glue only: arguments, files, exit
//! codes (0 ok, 1 invalid input, 2 usage or I/O error, 3 a guest learner
//! failed); all logic is in the library, shared with the page, except
//! starting guest learners' processes (`guest.rs`).

mod figure;
mod guest;

use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::{Parser, Subcommand};

use burnin::generate::{GENERATORS, GeneratorSpec, ParamError, ParamKind, ParamValue, Values};
use burnin::model::limits::MAX_FILE_BYTES;
use burnin::{Mdp, Problems};

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
    Validate {
        /// Model file (burnin-model v1), or - for standard input.
        file: PathBuf,
    },
    /// Solve a model exactly by backward induction: V*, Q*, an optimal policy, gaps.
    Solve {
        /// Model file (burnin-model v1), or - for standard input.
        file: PathBuf,
        /// Print the solution as JSON instead of a table.
        #[arg(long)]
        json: bool,
    },
    /// Run a regret experiment (burnin-experiment v1): every learner for K
    /// episodes over each seed.
    Run {
        /// Experiment file, or - for standard input.
        file: PathBuf,
        /// Print the results as JSON (burnin-results v1) instead of a table.
        #[arg(long)]
        json: bool,
        #[command(flatten)]
        tables: TableArgs,
        /// Runs in parallel (default: the machine's cores); results do not depend on it.
        #[arg(long, value_name = "N")]
        threads: Option<usize>,
        /// Run only shard I of N of the runs and print a shard file for `burnin merge`.
        #[arg(long, value_name = "I/N")]
        shard: Option<String>,
        /// Run with a fresh base seed drawn from the operating system's
        /// random source instead of the file's; the results carry it.
        #[arg(long, conflicts_with = "shard")]
        new_seed: bool,
        /// The command that starts the guest learner NAME (one process per
        /// run, through the shell); repeat for each guest the file names.
        #[arg(long = "learner", value_name = "NAME=CMD")]
        learners: Vec<String>,
        /// Seconds a guest learner may take to answer one message.
        #[arg(long, value_name = "SECS", default_value_t = 30.0)]
        learner_timeout: f64,
        /// Print the run's estimated time and memory and stop, without running.
        #[arg(long, conflicts_with = "no_budget")]
        estimate: bool,
        /// Refuse a run estimated to take longer than this (minutes) or to
        /// need more memory than the machine has free.
        #[arg(long, value_name = "MINUTES", default_value_t = 60.0)]
        budget: f64,
        /// Run without estimating first (and so without a budget).
        #[arg(long)]
        no_budget: bool,
    },
    /// Time the reference workloads (solver, learners, MVP replanning) on this machine.
    Bench {
        /// Smaller workloads (K = 10 000, replanning to 10⁵) for a quick look.
        #[arg(long)]
        quick: bool,
        /// Only this learner's learning workload (an algorithm key), or
        /// `floor`: the cheapest episode loop, the floor learners are measured against.
        #[arg(long, value_name = "ALGORITHM", conflicts_with = "no_learners")]
        only: Option<String>,
        /// The solver and replanning workloads, without the learners'.
        #[arg(long)]
        no_learners: bool,
        /// Only the research-scale workload: every learner (or --only's) on
        /// S=500, A=10, H=50 with 10 successors per row.
        #[arg(long, conflicts_with_all = ["quick", "no_learners"])]
        research: bool,
    },
    /// Merge the shard files of one experiment into its results.
    Merge {
        /// Shard files from `burnin run --shard I/N`, all N of them.
        #[arg(required = true)]
        files: Vec<PathBuf>,
        /// Print the results as JSON instead of a table.
        #[arg(long)]
        json: bool,
        #[command(flatten)]
        tables: TableArgs,
    },
    /// Draw the chart of a results or sweep file as SVG or PNG (the page's
    /// chart: the same views, options and look).
    Plot {
        /// Results file (burnin-results or burnin-sweep), or - for standard input.
        file: PathBuf,
        /// The figure file to write: .svg or .png.
        #[arg(long, short, value_name = "FILE")]
        output: PathBuf,
        #[command(flatten)]
        figure: figure::FigureArgs,
    },
    /// Rewrite a model file in the canonical layout (fields in order, one
    /// transition row per line) on standard output.
    Canon {
        /// Model file (burnin-model v1), or - for standard input.
        file: PathBuf,
    },
    /// The old name of `canon`, kept for one release.
    #[command(hide = true)]
    Tidy { file: PathBuf },
    /// Write a generated model file to standard output.
    Generate {
        #[command(subcommand)]
        kind: GeneratorArgs,
        /// Seed of the generator's random draws.
        #[arg(long, default_value_t = 1, global = true)]
        seed: u64,
        /// Write to this file instead of standard output.
        #[arg(long, short, global = true)]
        output: Option<PathBuf>,
    },
}

/// The CSV tables `run` and `merge` can write besides their output.
#[derive(clap::Args)]
struct TableArgs {
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
    fn tables(&self) -> Tables<'_> {
        Tables {
            csv: self.csv.as_deref(),
            cells: self.cells_csv.as_deref(),
            seeds: self.seeds_csv.as_deref(),
            figure: self.figure.as_deref().map(|p| (p, &self.look)),
        }
    }
}

/// `burnin generate KIND --param …`: one subcommand per generator of the
/// core's catalogue, one option per parameter (its name with dashes), with
/// the catalogue's defaults and help.
struct GeneratorArgs {
    values: Values,
}

fn option_name(param: &str) -> String {
    param.replace('_', "-")
}

impl clap::Subcommand for GeneratorArgs {
    fn augment_subcommands(mut cmd: clap::Command) -> clap::Command {
        use clap::{Arg, ArgAction, value_parser};
        for g in GENERATORS {
            let mut sub = clap::Command::new(g.kind).about(g.about);
            for (old, new) in burnin::generate::catalog::OLD_KINDS {
                if *new == g.kind {
                    sub = sub.alias(*old);
                }
            }
            for p in g.params {
                let arg = Arg::new(p.name).long(option_name(p.name)).help(p.help);
                let arg = match p.kind {
                    ParamKind::Whole => arg
                        .value_name("N")
                        .value_parser(value_parser!(u64))
                        .default_value((p.default as u64).to_string()),
                    ParamKind::Number => arg
                        .value_name("X")
                        .value_parser(value_parser!(f64))
                        .allow_negative_numbers(true)
                        .default_value(p.default.to_string()),
                    ParamKind::Flag => arg.action(ArgAction::SetTrue),
                    ParamKind::OptionalWhole => {
                        arg.value_name("N").value_parser(value_parser!(u64))
                    }
                    ParamKind::Numbers => arg
                        .value_name("X,…")
                        .value_parser(value_parser!(f64))
                        .allow_negative_numbers(true)
                        .value_delimiter(',')
                        .action(ArgAction::Append),
                };
                sub = sub.arg(arg);
            }
            cmd = cmd.subcommand(sub);
        }
        cmd.subcommand_required(true)
    }
    fn augment_subcommands_for_update(cmd: clap::Command) -> clap::Command {
        Self::augment_subcommands(cmd)
    }
    fn has_subcommand(name: &str) -> bool {
        burnin::generate::catalog::info(name).is_some()
    }
}

impl clap::FromArgMatches for GeneratorArgs {
    fn from_arg_matches(m: &clap::ArgMatches) -> Result<Self, clap::Error> {
        use clap::error::ErrorKind;
        let (name, sub) = m
            .subcommand()
            .ok_or_else(|| clap::Error::new(ErrorKind::MissingSubcommand))?;
        let info = burnin::generate::catalog::info(name)
            .ok_or_else(|| clap::Error::new(ErrorKind::InvalidSubcommand))?;
        let mut values = Values::defaults(info);
        for p in info.params {
            let v = match p.kind {
                ParamKind::Whole | ParamKind::OptionalWhole => {
                    sub.get_one::<u64>(p.name).map(|&x| ParamValue::Whole(x))
                }
                ParamKind::Number => sub.get_one::<f64>(p.name).map(|&x| ParamValue::Number(x)),
                ParamKind::Flag => Some(ParamValue::Flag(sub.get_flag(p.name))),
                ParamKind::Numbers => sub
                    .get_many::<f64>(p.name)
                    .map(|xs| ParamValue::Numbers(xs.copied().collect())),
            };
            if let Some(v) = v {
                values.set(p.name, v);
            }
        }
        Ok(GeneratorArgs { values })
    }
    fn update_from_arg_matches(&mut self, m: &clap::ArgMatches) -> Result<(), clap::Error> {
        *self = Self::from_arg_matches(m)?;
        Ok(())
    }
}

/// How a command failed, and so its exit code.
enum Failure {
    /// The input is invalid (exit 1); each line already says what and where.
    Invalid(Vec<String>),
    /// Usage or I/O (exit 2).
    Io(String),
    /// A guest learner failed (exit 3).
    Guest(String),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let writes_to_file = matches!(
        cli.command,
        Command::Generate {
            output: Some(_),
            ..
        }
    );
    let result = if writes_to_file {
        Ok(())
    } else {
        stdout_is_open()
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

/// Refuses to start when standard output is closed (`burnin run x.json >&-`),
/// rather than compute for hours and print into nothing with exit status 0.
///
/// Rust's runtime reopens a closed standard output on /dev/null before
/// `main`, read and write; a shell's `> /dev/null` opens it write-only. So
/// on Linux a standard output that is /dev/null opened for reading and
/// writing is taken as closed (read from /proc/self; elsewhere nothing is
/// checked).
fn stdout_is_open() -> Result<(), Failure> {
    let target = std::fs::read_link("/proc/self/fd/1");
    let flags = std::fs::read_to_string("/proc/self/fdinfo/1");
    let (Ok(target), Ok(flags)) = (target, flags) else {
        return Ok(());
    };
    let mode = flags
        .lines()
        .find_map(|l| l.strip_prefix("flags:"))
        .and_then(|f| u32::from_str_radix(f.trim(), 8).ok())
        .map(|f| f & 0o3);
    // O_ACCMODE = 0o3, O_RDWR = 0o2 (Linux).
    if target == Path::new("/dev/null") && mode == Some(0o2) {
        return Err(Failure::Io(
            "standard output is closed; nothing could be printed: send it to a file with > FILE"
                .into(),
        ));
    }
    Ok(())
}

/// Runs the subcommand.
fn dispatch(command: Command) -> Result<(), Failure> {
    match command {
        Command::Validate { file } => validate(&file),
        Command::Solve { file, json } => solve(&file, json),
        Command::Run {
            file,
            json,
            tables,
            threads,
            shard,
            new_seed,
            learners,
            learner_timeout,
            estimate,
            budget,
            no_budget,
        } => run(
            &file,
            &RunOptions {
                json,
                tables: tables.tables(),
                threads,
                shard: shard.as_deref(),
                new_seed,
                learners: &learners,
                learner_timeout,
                budget: if no_budget {
                    Budget::Unchecked
                } else if estimate {
                    Budget::EstimateOnly
                } else {
                    Budget::Minutes(budget)
                },
            },
        ),
        Command::Merge {
            files,
            json,
            tables,
        } => merge(&files, json, &tables.tables()),
        Command::Bench {
            quick,
            only,
            no_learners,
            research,
        } => bench(quick, only.as_deref(), no_learners, research),
        Command::Plot {
            file,
            output,
            figure,
        } => plot(&file, &output, &figure),
        Command::Canon { file } => canon(&file),
        Command::Tidy { file } => {
            let _ = writeln!(
                std::io::stderr(),
                "note: `burnin tidy` is now `burnin canon`; the old name goes in the next release"
            );
            canon(&file)
        }
        Command::Generate { kind, seed, output } => generate(kind, seed, output.as_deref()),
    }
}

/// Writes to stdout. A pipe closed before everything was written
/// (`burnin run x.json | head -1`) is an error: what was not written is lost.
fn emit(text: &str) -> Result<(), Failure> {
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())
        .and_then(|_| out.flush())
        .map_err(|e| {
            Failure::Io(format!(
                "cannot write to standard output ({e}); the output is incomplete"
            ))
        })
}

/// Reads a file (or stdin for "-") as text, refusing files over the size limit
/// before reading them whole.
fn read_text(path: &Path) -> Result<String, Failure> {
    let name = path.display();
    let mut bytes = Vec::new();
    let limit = MAX_FILE_BYTES as u64 + 1;
    let res = if path.as_os_str() == "-" {
        std::io::stdin().lock().take(limit).read_to_end(&mut bytes)
    } else {
        std::fs::File::open(path).and_then(|f| f.take(limit).read_to_end(&mut bytes))
    };
    res.map_err(|e| Failure::Io(format!("cannot read {name}: {e}")))?;
    if bytes.len() > MAX_FILE_BYTES {
        return Err(Failure::Invalid(vec![format!(
            "{name}: file is over the limit of {MAX_FILE_BYTES} bytes"
        )]));
    }
    String::from_utf8(bytes).map_err(|e| {
        Failure::Invalid(vec![format!(
            "{name}: not UTF-8 text (invalid byte at offset {})",
            e.utf8_error().valid_up_to()
        )])
    })
}

fn invalid(p: Problems) -> Failure {
    Failure::Invalid(p.lines())
}

fn load(path: &Path) -> Result<Mdp, Failure> {
    burnin::parse_model(&read_text(path)?).map_err(invalid)
}

fn summary(m: &Mdp) -> String {
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

/// The model file in the canonical layout, on standard output.
fn canon(path: &Path) -> Result<(), Failure> {
    emit(&burnin::write_model(&load(path)?))
}

fn validate(path: &Path) -> Result<(), Failure> {
    let m = load(path)?;
    emit(&format!("{}\n", summary(&m)))
}

fn solve(path: &Path, json: bool) -> Result<(), Failure> {
    let m = load(path)?;
    let sol = burnin::solve::solve(&m);
    if json {
        return emit(&burnin::solve::solution_json(&m, &sol));
    }
    emit(&solution_table(&m, &sol))
}

/// A readable table: one line per (step, state) with V*, the optimal action,
/// and Q* of every action.
fn solution_table(m: &Mdp, sol: &burnin::solve::Solution) -> String {
    use std::fmt::Write as _;
    let mut o = String::new();
    let _ = writeln!(o, "{}", summary(m).trim_start_matches("ok: "));
    let _ = writeln!(o, "optimal value  {}", fixed6(sol.optimal_value));
    if m.discount() < 1.0 {
        let _ = writeln!(o, "discount       {}", m.discount());
    }
    let sw = column_width(m.states().iter().map(String::as_str), 5);
    let aw = column_width(m.actions().iter().map(String::as_str), 10);
    let _ = write!(
        o,
        "\n{:>4}  {:<sw$}  {:>10}  {:<aw$}",
        "step", "state", "V*", "best action"
    );
    for a in m.actions() {
        let _ = write!(o, "  {:>10}", format!("Q*({})", a));
    }
    o.push('\n');
    for h in 0..m.horizon() {
        for (s, label) in m.states().iter().enumerate() {
            let best = &m.actions()[sol.policy[[h, s]] as usize];
            let _ = write!(
                o,
                "{:>4}  {:<sw$}  {:>10}  {:<aw$}",
                h + 1,
                label,
                fixed6(sol.v[[h, s]]),
                best
            );
            for a in 0..m.n_actions() {
                let _ = write!(o, "  {:>10}", fixed6(sol.q[[h, s, a]]));
            }
            o.push('\n');
        }
    }
    o
}

/// A generator's parameter error, named as the CLI option.
fn param_failure(e: ParamError) -> Failure {
    Failure::Invalid(vec![format!("--{}: {}", option_name(e.param), e.message)])
}

fn generate(args: GeneratorArgs, seed: u64, output: Option<&Path>) -> Result<(), Failure> {
    let spec = GeneratorSpec {
        values: args.values,
        seed,
    };
    let model = spec.build().map_err(param_failure)?;
    let text = burnin::write_model(&model);
    match output {
        Some(p) => std::fs::write(p, text)
            .map_err(|e| Failure::Io(format!("cannot write {}: {e}", p.display()))),
        None => emit(&text),
    }
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

fn run(path: &Path, o: &RunOptions) -> Result<(), Failure> {
    use burnin::experiment::{Point, Run, ShardFile, assemble, parse_experiment, shard_jobs};
    use std::sync::atomic::{AtomicBool, AtomicU64, AtomicUsize, Ordering};
    use std::sync::{Arc, Mutex};

    let (json, threads) = (o.json, o.threads);
    check_table_paths(&o.tables, &[path])?;
    let shard = o.shard.map(parse_shard).transpose()?;
    if let Budget::Minutes(m) = o.budget
        && !(m > 0.0 && m.is_finite())
    {
        return Err(Failure::Io(format!(
            "--budget: expected a number of minutes > 0, found {m}"
        )));
    }
    if !(o.learner_timeout > 0.0 && o.learner_timeout <= 86_400.0) {
        return Err(Failure::Io(format!(
            "--learner-timeout: expected 0 < SECS ≤ 86400, found {}",
            o.learner_timeout
        )));
    }
    let host = guest::host(
        o.learners,
        std::time::Duration::from_secs_f64(o.learner_timeout),
    )
    .map_err(Failure::Io)?;
    let text = read_text(path)?;
    let base = path.parent().map(Path::to_path_buf).unwrap_or_default();
    let model_text = Mutex::new(None::<String>);
    let model_file = Mutex::new(None::<PathBuf>);
    let loader = |rel: &str| -> Result<String, String> {
        *model_file.lock().expect("not poisoned") = Some(base.join(rel));
        // The same size limit as any file given on the command line, applied
        // while reading (a device file or a huge file is not read to the end).
        let t = read_text(&base.join(rel)).map_err(|f| match f {
            Failure::Io(m) | Failure::Guest(m) => m,
            Failure::Invalid(lines) => lines.join("; "),
        })?;
        *model_text.lock().expect("not poisoned") = Some(t.clone());
        Ok(t)
    };
    let mut exp = parse_experiment(&text, Some(&loader)).map_err(invalid)?;
    if let Some((_, look)) = o.tables.figure {
        let labels: Vec<&str> = exp.learners.iter().map(|l| l.label.as_str()).collect();
        let opts = look.options().map_err(Failure::Io)?;
        burnin::chart::check_planned(&opts, exp.sweep.is_some(), &labels)
            .map_err(|e| Failure::Io(format!("--figure: {e}")))?;
    }
    if o.new_seed {
        let bits = getrandom::u64().map_err(|e| {
            Failure::Io(format!("--new-seed: the system gave no random bits ({e})"))
        })?;
        exp.seed = burnin::experiment::fresh_seed(bits);
        let _ = writeln!(
            std::io::stderr(),
            "new seed {}: the results carry it as \"seed\"; give \"seed\": {} in the experiment to compute the same numbers again",
            exp.seed,
            exp.seed
        );
    }
    if let Some(m) = model_file.lock().expect("not poisoned").as_deref() {
        // Checked before the run, not after it.
        check_table_paths(&o.tables, &[m])?;
    }
    if let Some(w) = exp.seed_warning() {
        let _ = writeln!(std::io::stderr(), "warning: {w}");
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
            let _ = writeln!(
                std::io::stderr(),
                "warning: --learner {name}: the experiment names no guest learner {name:?}"
            );
        }
    }
    let guests: burnin::learn::Guests = Arc::new(host);
    // A sweep is one experiment per value; all their runs share one pool.
    let points = Point::all(&exp, Some(&guests));
    let (index, count) = shard.map_or((0, 1), |(i, n)| (i - 1, n));
    let jobs = shard_jobs(&points, index, count);
    let threads = threads
        .unwrap_or_else(|| std::thread::available_parallelism().map_or(1, |n| n.get()))
        .clamp(1, jobs.len().max(1));
    let over_budget = |e: &burnin::experiment::Estimate, m: f64| {
        Failure::Io(format!(
            "this run is estimated to take {}, over the budget of {m} min; give a larger --budget, split it with --shard (docs/array-jobs.md), or --no-budget to run it anyway",
            e.words()
        ))
    };
    if let Budget::EstimateOnly = o.budget {
        let e = estimate_jobs(&points, &jobs, threads);
        if o.json {
            return emit(&(serde_json::to_string_pretty(&e).expect("finite estimate") + "\n"));
        }
        return emit(&format!("estimate: {}\n", e.words()));
    }
    let budget = match o.budget {
        Budget::Minutes(m) => Some(m),
        _ => None,
    };
    if budget.is_some() {
        // Memory is counted from sizes, before anything runs.
        let unmeasured = burnin::experiment::Calibration {
            per_point: vec![Vec::new(); points.len()],
            learners: Vec::new(),
        };
        let e = burnin::experiment::estimate(&points, &jobs, &unmeasured, threads);
        if let Some(free) = free_memory().filter(|&free| e.bytes > free) {
            return Err(Failure::Io(format!(
                "this run is estimated to need {}, more than the {} of memory free; run it in shards (--shard) or with fewer seeds, or --no-budget to try anyway",
                burnin::experiment::bytes_words(e.bytes),
                burnin::experiment::bytes_words(free)
            )));
        }
    }
    // With a budget, the time is measured while the run starts: one thread
    // times each learner's first run (`calibrate_keeping`) while the others
    // take the rest, and the timed runs are then continued, not started
    // again; a run over the budget is stopped before anything is written.
    // The jobs calibration times are set aside for it.
    let reserved: Vec<bool> = jobs
        .iter()
        .map(|&(p, i)| {
            let e = &points[p].exp;
            let li = i / e.seeds as usize;
            budget.is_some()
                && e.learners[li].guest().is_none()
                && i == burnin::experiment::calibration_run(&points, li)
        })
        .collect();
    let calibrate = reserved.iter().any(|&r| r);
    let calibrating = AtomicBool::new(calibrate);
    let started = Mutex::new(Vec::<(usize, usize, Run)>::new());
    let refused = Mutex::new(None::<Failure>);
    let next = AtomicUsize::new(0);
    let done_episodes = AtomicU64::new(0);
    let records = Mutex::new(Vec::with_capacity(jobs.len()));
    let fault = Mutex::new(None);
    let stop = AtomicBool::new(false);
    let progress = Progress::new(jobs.iter().map(|&(p, _)| points[p].exp.episodes).sum());
    // The next run to work on: one calibration started or set aside, else
    // a job nobody has taken; None when there is none left (waiting while
    // calibration may still hand runs over).
    let take = || -> Option<(usize, usize, Run)> {
        loop {
            if let Some(r) = started.lock().expect("no thread panicked").pop() {
                return Some(r);
            }
            loop {
                let j = next.fetch_add(1, Ordering::Relaxed);
                let Some(&(p, i)) = jobs.get(j) else { break };
                if !reserved[j] {
                    return Some((j, p, Run::new(Arc::clone(&points[p]), i)));
                }
            }
            // No fresh job left: wait for the runs calibration hands over.
            if !calibrating.load(Ordering::Acquire) {
                return started.lock().expect("no thread panicked").pop();
            }
            if stop.load(Ordering::Relaxed) {
                return None;
            }
            std::thread::sleep(std::time::Duration::from_millis(1));
        }
    };
    let work = || {
        'jobs: while !stop.load(Ordering::Relaxed) {
            let Some((j, p, mut r)) = take() else { break };
            const CHUNK: u64 = 512;
            loop {
                let before = r.episodes_done();
                let finished = match r.advance(CHUNK) {
                    Ok(f) => f,
                    Err(f) => {
                        stop.store(true, Ordering::Relaxed);
                        fault.lock().expect("no thread panicked").get_or_insert(f);
                        break 'jobs;
                    }
                };
                let step = r.episodes_done() - before;
                progress.show(done_episodes.fetch_add(step, Ordering::Relaxed) + step);
                if finished {
                    break;
                }
                if stop.load(Ordering::Relaxed) {
                    break 'jobs;
                }
            }
            records
                .lock()
                .expect("no thread panicked")
                .push((j, p, r.finish()));
        }
    };
    let (tx, rx) = std::sync::mpsc::channel();
    let started_at = std::time::Instant::now();
    std::thread::scope(|scope| {
        if calibrate {
            scope.spawn(|| {
                let (cal, runs) = calibrate_timed(&points);
                let _ = tx.send(cal);
                let mut mine = Vec::new();
                let mut timed = runs;
                for (j, &(p, i)) in jobs.iter().enumerate() {
                    if !reserved[j] {
                        continue;
                    }
                    let run = match timed.iter().position(|(k, _)| *k == (p, i)) {
                        Some(at) => timed.swap_remove(at).1,
                        // Not reached before the deadline.
                        None => Run::new(Arc::clone(&points[p]), i),
                    };
                    let step = run.episodes_done();
                    progress.show(done_episodes.fetch_add(step, Ordering::Relaxed) + step);
                    mine.push((j, p, run));
                }
                started.lock().expect("no thread panicked").extend(mine);
                calibrating.store(false, Ordering::Release);
                work();
            });
        }
        for _ in 0..threads - usize::from(calibrate) {
            scope.spawn(work);
        }
        if calibrate {
            let e = match rx.recv_timeout(CALIBRATION_WAIT) {
                Ok(cal) => burnin::experiment::estimate(&points, &jobs, &cal, threads),
                Err(_) => {
                    slow_estimate(&points, &jobs, threads, started_at.elapsed().as_secs_f64())
                }
            };
            match budget {
                Some(m) if e.seconds > 60.0 * m => {
                    stop.store(true, Ordering::Relaxed);
                    *refused.lock().expect("no thread panicked") = Some(over_budget(&e, m));
                }
                _ if e.seconds >= 10.0 => {
                    progress.clear();
                    let _ = writeln!(std::io::stderr(), "estimate: {}", e.words());
                }
                _ => {}
            }
        }
    });
    progress.clear();
    if let Some(f) = refused.into_inner().expect("no thread panicked") {
        return Err(f);
    }
    if let Some(f) = fault.into_inner().expect("no thread panicked") {
        return Err(Failure::Guest(format!(
            "{f}\nno results were written; the other runs were stopped"
        )));
    }
    let mut records = records.into_inner().expect("no thread panicked");
    records.sort_by_key(|r| r.0);
    if let Some((i, n)) = shard {
        let file = ShardFile::new(
            i - 1,
            n,
            text,
            model_text.into_inner().expect("not poisoned"),
            &points,
            records.into_iter().map(|(_, p, r)| (p, r)).collect(),
        );
        return emit(&file.to_json());
    }
    let mut by_point = vec![Vec::new(); points.len()];
    for (_, p, r) in records {
        by_point[p].push(r);
    }
    finish_output(&assemble(&exp, &points, by_point), json, &o.tables)
}

/// `burnin run`'s options besides the file.
struct RunOptions<'a> {
    json: bool,
    tables: Tables<'a>,
    threads: Option<usize>,
    shard: Option<&'a str>,
    new_seed: bool,
    learners: &'a [String],
    learner_timeout: f64,
    budget: Budget,
}

/// What `run` does with its estimate.
#[derive(Clone, Copy)]
enum Budget {
    /// `--no-budget`: no estimate.
    Unchecked,
    /// `--estimate`: print it and stop.
    EstimateOnly,
    /// Refuse a run over this many minutes (or the free memory).
    Minutes(f64),
}

/// How long calibration may take before the estimate is made without
/// the learners it has not reached (at their nearest heavier point's cost).
const CALIBRATION_DEADLINE: std::time::Duration = std::time::Duration::from_secs(2);

/// How long the estimate waits for calibration: its deadline and a second
/// (one episode may outlast the deadline; the estimate then says "at least").
const CALIBRATION_WAIT: std::time::Duration = std::time::Duration::from_secs(3);

/// Times the learners (`calibrate_keeping`, at most ~[`CALIBRATION_DEADLINE`]
/// in all, a learner's first episode excepted), keeping the runs it timed.
fn calibrate_timed(
    points: &[std::sync::Arc<burnin::experiment::Point>],
) -> (
    burnin::experiment::Calibration,
    Vec<burnin::experiment::TimedRun>,
) {
    let pairs = points.len() * points[0].exp.learners.len();
    let per_run = (1.0 / pairs as f64).clamp(0.01, 0.1);
    let start = std::time::Instant::now();
    let now = || start.elapsed().as_secs_f64();
    let stop = || start.elapsed() > CALIBRATION_DEADLINE;
    burnin::experiment::calibrate_keeping(points, &now, per_run, &stop)
}

/// The estimate when one episode alone outlasted calibration's deadline:
/// every learner counted at `spent` seconds per episode, a lower bound for
/// the one being measured ("at least").
fn slow_estimate(
    points: &[std::sync::Arc<burnin::experiment::Point>],
    jobs: &[(usize, usize)],
    threads: usize,
    spent: f64,
) -> burnin::experiment::Estimate {
    let n = points[0].exp.learners.len();
    let cal = burnin::experiment::Calibration {
        per_point: vec![vec![Some(spent); n]; points.len()],
        learners: Vec::new(),
    };
    let mut e = burnin::experiment::estimate(points, jobs, &cal, threads);
    e.at_least = true;
    e
}

/// Measures the learners and estimates the `jobs` on `threads` threads
/// (`--estimate`: nothing else runs).
fn estimate_jobs(
    points: &[std::sync::Arc<burnin::experiment::Point>],
    jobs: &[(usize, usize)],
    threads: usize,
) -> burnin::experiment::Estimate {
    let (tx, rx) = std::sync::mpsc::channel();
    let pts = points.to_vec();
    let start = std::time::Instant::now();
    std::thread::spawn(move || {
        let _ = tx.send(calibrate_timed(&pts).0);
    });
    match rx.recv_timeout(CALIBRATION_WAIT) {
        Ok(cal) => burnin::experiment::estimate(points, jobs, &cal, threads),
        Err(_) => slow_estimate(points, jobs, threads, start.elapsed().as_secs_f64()),
    }
}

/// Free memory in bytes (Linux: MemAvailable), when it can be read.
fn free_memory() -> Option<f64> {
    let info = std::fs::read_to_string("/proc/meminfo").ok()?;
    let kb: f64 = info
        .lines()
        .find_map(|l| l.strip_prefix("MemAvailable:"))?
        .trim()
        .trim_end_matches("kB")
        .trim()
        .parse()
        .ok()?;
    Some(kb * 1024.0)
}

/// The CSV tables `run` and `merge` may write besides their output.
struct Tables<'a> {
    csv: Option<&'a Path>,
    cells: Option<&'a Path>,
    seeds: Option<&'a Path>,
    /// The figure's file and how to draw it.
    figure: Option<(&'a Path, &'a figure::FigureArgs)>,
}

fn finish_output(
    out: &burnin::experiment::Output,
    json: bool,
    tables: &Tables,
) -> Result<(), Failure> {
    use burnin::experiment::Output;
    // The results go out first, and every table is written even when
    // one output fails: a failed output must not lose what was computed.
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
        (tables.csv, Output::to_csv),
        (tables.cells, Output::cells_csv),
        (tables.seeds, Output::seeds_csv),
    ];
    let mut failed = Vec::new();
    let mut written = Vec::new();
    for (path, write) in writers {
        if let Some(p) = path {
            match std::fs::write(p, write(out)) {
                Ok(()) => written.push(p.display().to_string()),
                Err(e) => failed.push(format!("cannot write {}: {e}", p.display())),
            }
        }
    }
    if let Some((p, look)) = tables.figure {
        match look.write(out, p) {
            Ok(()) => written.push(p.display().to_string()),
            Err(e) => failed.push(format!("--figure: {e}")),
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

/// A table for a terminal: control characters (from labels and names in
/// files) are shown as escapes, never sent to the terminal.
fn terminal_safe(text: &str) -> String {
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

/// Refuses a table path that names one of the input files (it would be
/// overwritten with a CSV), before anything runs.
fn check_table_paths(tables: &Tables, inputs: &[&Path]) -> Result<(), Failure> {
    if let Some((p, look)) = tables.figure {
        look.check(p)
            .map_err(|e| Failure::Io(format!("--figure: {e}")))?;
    }
    for (flag, path) in [
        ("--csv", tables.csv),
        ("--cells-csv", tables.cells),
        ("--seeds-csv", tables.seeds),
        ("--figure", tables.figure.map(|f| f.0)),
    ] {
        let Some(p) = path else { continue };
        let Ok(out) = std::fs::canonicalize(p) else {
            continue;
        };
        for input in inputs {
            if std::fs::canonicalize(input).is_ok_and(|i| i == out) {
                return Err(Failure::Io(format!(
                    "{flag} {}: that is an input file, which this output would overwrite; choose another path",
                    p.display()
                )));
            }
        }
    }
    Ok(())
}

/// `burnin plot`: the chart of a results or sweep file.
fn plot(file: &Path, output: &Path, look: &figure::FigureArgs) -> Result<(), Failure> {
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
    let out = burnin::experiment::parse_results(&text).map_err(|p| {
        Failure::Invalid(
            p.lines()
                .into_iter()
                .map(|l| format!("{}: {l}", file.display()))
                .collect(),
        )
    })?;
    let bytes = look.render(&out, output).map_err(Failure::Io)?;
    std::fs::write(output, bytes)
        .map_err(|e| Failure::Io(format!("cannot write {}: {e}", output.display())))
}

fn merge(files: &[PathBuf], json: bool, tables: &Tables) -> Result<(), Failure> {
    check_table_paths(
        tables,
        &files.iter().map(PathBuf::as_path).collect::<Vec<_>>(),
    )?;
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
    finish_output(&out, json, tables)
}

/// Width of a table's column: its longest entry, at least `at_least`.
fn column_width<'a>(entries: impl Iterator<Item = &'a str>, at_least: usize) -> usize {
    entries
        .map(|l| l.chars().count())
        .max()
        .unwrap_or(0)
        .max(at_least)
}

/// Width of a table's learner column: its longest label, at least "learner".
fn label_width<'a>(labels: impl Iterator<Item = &'a str>) -> usize {
    column_width(labels, "learner".len())
}

fn sweep_table(r: &burnin::experiment::SweepResults) -> String {
    use std::fmt::Write as _;
    let mut o = String::new();
    let _ = writeln!(o, "regret at K against {}", r.parameter);
    let lw = label_width(r.learners.iter().map(|l| l.label.as_str()));
    let _ = write!(o, "\n{:<lw$}", "learner");
    for v in &r.values {
        let _ = write!(o, "  {:>26}", format!("{} = {v}", r.parameter));
    }
    o.push('\n');
    for l in &r.learners {
        let _ = write!(o, "{:<lw$}", l.label);
        for i in 0..r.values.len() {
            let cell = format!(
                "{} {}",
                burnin::experiment::number_text(l.regret_mean[i]),
                burnin::experiment::interval_text(l.regret_mean[i], l.regret_lo[i], l.regret_hi[i])
            );
            let _ = write!(o, "  {cell:>26}");
        }
        o.push('\n');
    }
    // Every reading per point, as the one-point table prints it.
    let _ = writeln!(
        o,
        "\nslope [95% bootstrap] and burn-in [95% bootstrap] at each {}",
        r.parameter
    );
    let texts = burnin::experiment::Output::Sweep(r.clone()).reading_texts();
    for (v, point) in r.values.iter().zip(&texts) {
        let _ = writeln!(o, "{} = {v}", r.parameter);
        for t in point {
            let _ = writeln!(o, "  {:<lw$}  {:>22}  {}", t.label, t.slope, t.burn_in);
        }
    }
    o
}

/// A progress line on stderr: a bar when stderr is a terminal, otherwise a
/// line at every tenth of the work.
struct Progress {
    total: u64,
    tty: bool,
    shown: std::sync::Mutex<(u64, std::time::Instant)>,
    start: std::time::Instant,
}

impl Progress {
    fn new(total: u64) -> Progress {
        use std::io::IsTerminal;
        let now = std::time::Instant::now();
        Progress {
            total: total.max(1),
            tty: std::io::stderr().is_terminal(),
            shown: std::sync::Mutex::new((0, now)),
            start: now,
        }
    }

    fn show(&self, done: u64) {
        let Ok(mut last) = self.shown.lock() else {
            return;
        };
        let tenth = done * 10 / self.total;
        let now = std::time::Instant::now();
        let due = if self.tty {
            now.duration_since(last.1).as_millis() >= 100 || done == self.total
        } else {
            tenth > last.0 * 10 / self.total
        };
        if !due {
            return;
        }
        *last = (done, now);
        let secs = now.duration_since(self.start).as_secs_f64().max(1e-9);
        let rate = done as f64 / secs;
        let left = (self.total - done) as f64 / rate.max(1e-9);
        let mut err = std::io::stderr().lock();
        if self.tty {
            // One line, rewritten in place: short enough never to wrap in an
            // 80-column terminal (a wrapped line would scroll as new lines),
            // and erased to its end before each rewrite.
            let width = 20;
            let fill = (done * width / self.total) as usize;
            let _ = write!(
                err,
                "\r\x1b[K[{}{}] {:>3}% {}/{} episodes, {}/s, {:.0} s left",
                "#".repeat(fill),
                ".".repeat(width as usize - fill),
                done * 100 / self.total,
                compact(done as f64),
                compact(self.total as f64),
                compact(rate),
                left
            );
        } else {
            let _ = writeln!(
                err,
                "{}% ({done}/{} episodes, {:.0}/s)",
                tenth * 10,
                self.total,
                rate
            );
        }
    }

    fn clear(&self) {
        if self.tty {
            let _ = write!(std::io::stderr(), "\r\x1b[K");
        }
    }
}

/// A value with six decimals, or with an exponent when it is too large
/// for a table column (rewards may reach ±1e300).
fn fixed6(x: f64) -> String {
    if x.abs() < 1e9 {
        format!("{x:.6}")
    } else {
        format!("{x:.5e}")
    }
}

/// A count in at most five characters: 999, 12.3k, 456k, 4.56M, 1.23G.
fn compact(x: f64) -> String {
    let (v, unit) = match x {
        x if x < 1e3 => return format!("{x:.0}"),
        x if x < 1e6 => (x / 1e3, "k"),
        x if x < 1e9 => (x / 1e6, "M"),
        x => (x / 1e9, "G"),
    };
    let digits = if v < 10.0 {
        2
    } else if v < 100.0 {
        1
    } else {
        0
    };
    format!("{v:.digits$}{unit}")
}

/// Cells listed per learner in the table's "where the regret was paid".
const TOP_CELLS: usize = 3;

fn results_table(r: &burnin::experiment::Results) -> String {
    use std::fmt::Write as _;
    let mut o = String::new();
    let _ = writeln!(
        o,
        "{:?}: S={} A={} H={}, K={} episodes × {} seeds, V* = {:.6}",
        r.model_name, r.states, r.actions, r.horizon, r.episodes, r.seeds, r.optimal_value
    );
    let lw = label_width(r.learners.iter().map(|l| l.label.as_str()));
    let _ = writeln!(
        o,
        "\n{:<lw$}  {:>12}  {:>21}  {:>22}  {:>10}  burn-in [95% bootstrap]",
        "learner", "regret at K", "95% interval", "slope [95% bootstrap]", "updates"
    );
    for l in &r.learners {
        let last = l.regret_mean.len() - 1;
        let upd = burnin::stats::mean(
            &l.model_updates
                .iter()
                .map(|&x| x as f64)
                .collect::<Vec<_>>(),
        );
        let _ = writeln!(
            o,
            "{:<lw$}  {:>12}  {:>21}  {:>22}  {:>10.1}  {}",
            l.label,
            burnin::experiment::number_text(l.regret_mean[last]),
            burnin::experiment::interval_text(
                l.regret_mean[last],
                l.regret_lo[last],
                l.regret_hi[last]
            ),
            l.slope_text(),
            upd,
            l.burn_in_text(),
        );
    }
    let _ = writeln!(
        o,
        "\nslope: {}\nburn-in: {}",
        burnin::catalogue::meaning("slope"),
        burnin::catalogue::meaning("burn_in")
    );
    for l in &r.learners {
        if let Some(k) = l.bound.as_ref().and_then(|b| b.bonus_below_h) {
            let _ = writeln!(
                o,
                "{}: with the published constants the bonus is below H whatever the data from about K = {k:.0} (visits spread evenly)",
                l.label
            );
        }
    }
    let eps = &r.learners[0].episodes_to_eps;
    if !eps.is_empty() {
        let _ = writeln!(
            o,
            "\nε-optimal policies (expected regret ≤ ε; medians over seeds; PAC order S·A·H³/ε², Zhang et al. 2024):"
        );
        let _ = writeln!(
            o,
            "{:<lw$}  {:>8}  {:>16}  {:>12}  {:>9}  {:>22}",
            "learner", "ε", "first ε-optimal", "PAC order", "share", "settled within ε after"
        );
        for l in &r.learners {
            for e in &l.episodes_to_eps {
                let share = burnin::stats::mean(&e.optimal_share);
                let _ = writeln!(
                    o,
                    "{:<lw$}  {:>8.4}  {:>16}  {:>12.4e}  {:>8.1}%  {:>22}",
                    l.label,
                    e.epsilon,
                    burnin::experiment::median_text(&e.first_optimal),
                    e.pac_order,
                    100.0 * share,
                    burnin::experiment::median_text(&e.episodes)
                );
            }
        }
        for e in r.learners[0].episodes_to_eps.iter().filter(|e| e.trivial) {
            let _ = writeln!(
                o,
                "ε = {}: at least V* = {}, so every policy is ε-optimal and these rows say nothing about learning",
                e.epsilon,
                burnin::experiment::number_text(r.optimal_value)
            );
        }
    }
    let decomposed = r.learners.iter().any(|l| !l.regret_by_cell.is_empty());
    if decomposed {
        let _ = writeln!(
            o,
            "\nwhere the regret was paid (d·Δ summed over episodes, mean over seeds; the {TOP_CELLS} largest (step, state, action) cells, share of regret at K):"
        );
    }
    for l in r.learners.iter().filter(|_| decomposed) {
        let cells = l.top_cells(TOP_CELLS);
        let name = |v: &[String], i: usize| v.get(i).map_or(i.to_string(), |x| format!("{x:?}"));
        let text: Vec<String> = cells
            .iter()
            .map(|c| {
                format!(
                    "h={} {} {} {:.1}%",
                    c.step + 1,
                    name(&r.state_labels, c.state),
                    name(&r.action_labels, c.action),
                    100.0 * c.share
                )
            })
            .collect();
        let _ = writeln!(
            o,
            "  {:<lw$}  {}",
            l.label,
            if text.is_empty() {
                "no regret".to_string()
            } else {
                text.join(" · ")
            }
        );
    }
    if !r.comparisons.is_empty() {
        let _ = writeln!(
            o,
            "\npaired comparisons at K (run j of one learner against run j of the other):"
        );
        for c in &r.comparisons {
            let _ = writeln!(o, "  {}", c.verdict);
        }
    }
    o
}

/// Peak resident memory of this process (Linux), in bytes.
fn peak_rss() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb * 1024)
}

fn bench(
    quick: bool,
    only: Option<&str>,
    no_learners: bool,
    research: bool,
) -> Result<(), Failure> {
    let start = std::time::Instant::now();
    let now = move || start.elapsed().as_secs_f64();
    let sel = burnin::bench::Selection {
        quick,
        only,
        no_learners,
        research,
    };
    emit(&(burnin::bench::report("native", &now, &peak_rss, sel) + "\n"))
}

#[cfg(test)]
mod tests {
    use super::compact;

    /// Counts in the progress line stay within five characters (derived by hand).
    #[test]
    fn compact_counts() {
        for (x, want) in [
            (0.0, "0"),
            (999.0, "999"),
            (1_234.0, "1.23k"),
            (56_780.0, "56.8k"),
            (560_000.0, "560k"),
            (4_560_000.0, "4.56M"),
            (1e9, "1.00G"),
        ] {
            assert_eq!(compact(x), want);
        }
    }
}

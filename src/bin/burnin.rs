//! `burnin`: the command-line front end. Glue only: arguments, files, exit
//! codes (0 ok, 1 invalid input, 2 usage or I/O error); all logic is in the
//! library, shared with the page.

use std::io::{Read, Write};
use std::path::{Path, PathBuf};
use std::process::ExitCode;

use clap::{Args, Parser, Subcommand};

use burnin::generate::{Bandit, Garnet, Grid, Lock, LowerBound, ParamError, RiverSwim};
use burnin::model::limits::MAX_FILE_BYTES;
use burnin::{Mdp, Problems};

#[derive(Parser)]
#[command(
    name = "burnin",
    version,
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
    /// Rewrite a model file in the canonical layout (fields in order, one
    /// transition row per line) on standard output.
    Tidy {
        /// Model file (burnin-model v1), or - for standard input.
        file: PathBuf,
    },
    /// Write a generated model file to standard output.
    Generate {
        #[command(subcommand)]
        kind: Kind,
        /// Seed of the generator's random draws.
        #[arg(long, default_value_t = 1, global = true)]
        seed: u64,
        /// Write to this file instead of standard output.
        #[arg(long, short, global = true)]
        output: Option<PathBuf>,
    },
}

#[derive(Subcommand)]
enum Kind {
    /// Random sparse model, Garnet-style (Archibald, McKinnon & Thomas 1995).
    Random(RandomArgs),
    /// River-swim-style chain (after Strehl & Littman 2008).
    River(RiverArgs),
    /// Grid with slip probability and a paying far corner.
    Grid(GridArgs),
    /// Combination lock: one right action per step, a wrong one jams it.
    Lock(LockArgs),
    /// Hard instance of the minimax lower bound (Domingues et al., ALT 2021).
    LowerBound(LowerBoundArgs),
    /// Bernoulli multi-armed bandit (S = 1, H = 1).
    Bandit(BanditArgs),
}

#[derive(Args)]
struct RandomArgs {
    #[arg(long, default_value_t = 10)]
    states: usize,
    #[arg(long, default_value_t = 3)]
    actions: usize,
    /// Next states per (state, action), drawn without replacement.
    #[arg(long, default_value_t = 3)]
    successors: usize,
    #[arg(long, default_value_t = 10)]
    horizon: usize,
    /// Draw a fresh table for every step.
    #[arg(long)]
    time_dependent: bool,
    /// Fixed rewards (the mean) instead of Bernoulli ones.
    #[arg(long)]
    fixed_rewards: bool,
}

#[derive(Args)]
struct RiverArgs {
    #[arg(long, default_value_t = 6)]
    states: usize,
    #[arg(long, default_value_t = 20)]
    horizon: usize,
    /// Probability that swimming moves one state upstream.
    #[arg(long, default_value_t = 0.3)]
    p_forward: f64,
    /// Probability that swimming is pushed one state back.
    #[arg(long, default_value_t = 0.1)]
    p_back: f64,
    /// Reward for drifting at the left bank.
    #[arg(long, default_value_t = 0.005)]
    small_reward: f64,
    /// Reward for swimming at the far end.
    #[arg(long, default_value_t = 1.0)]
    big_reward: f64,
}

#[derive(Args)]
struct GridArgs {
    #[arg(long, default_value_t = 4)]
    width: usize,
    #[arg(long, default_value_t = 4)]
    height: usize,
    /// Probability of slipping sideways (half to each side).
    #[arg(long, default_value_t = 0.1)]
    slip: f64,
    #[arg(long, default_value_t = 12)]
    horizon: usize,
    /// Mean reward at the goal (Bernoulli when below 1).
    #[arg(long, default_value_t = 1.0)]
    goal_reward: f64,
}

#[derive(Args)]
struct LockArgs {
    #[arg(long, default_value_t = 6)]
    horizon: usize,
    #[arg(long, default_value_t = 2)]
    actions: usize,
    /// Two states and one table per step instead of one dial state per step.
    #[arg(long)]
    time_dependent: bool,
}

#[derive(Args)]
struct LowerBoundArgs {
    #[arg(long, default_value_t = 2)]
    actions: usize,
    /// Depth of the action tree (actions^depth leaves).
    #[arg(long, default_value_t = 2)]
    depth: usize,
    #[arg(long, default_value_t = 10)]
    horizon: usize,
    /// Last step (0-based) at which the waiting state may still wait.
    #[arg(long, default_value_t = 3)]
    wait_until: usize,
    /// Extra probability of the good state at the perturbed triple.
    #[arg(long, default_value_t = 0.2)]
    epsilon: f64,
    /// Perturbed step, 1-based (default: drawn from the seed).
    #[arg(long)]
    special_step: Option<usize>,
    /// Perturbed leaf, 0-based (default: drawn from the seed).
    #[arg(long)]
    special_leaf: Option<usize>,
    /// Perturbed action, 0-based (default: drawn from the seed).
    #[arg(long)]
    special_action: Option<usize>,
}

#[derive(Args)]
struct BanditArgs {
    /// Number of arms, with means drawn from the seed.
    #[arg(long, default_value_t = 5)]
    arms: usize,
    /// Comma-separated arm means (overrides --arms).
    #[arg(long, value_delimiter = ',')]
    means: Vec<f64>,
}

/// How a command failed, and so its exit code.
enum Failure {
    /// The input is invalid (exit 1); each line already says what and where.
    Invalid(Vec<String>),
    /// Usage or I/O (exit 2).
    Io(String),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let result = match cli.command {
        Command::Validate { file } => validate(&file),
        Command::Solve { file, json } => solve(&file, json),
        Command::Tidy { file } => load(&file).and_then(|m| emit(&burnin::write_model(&m))),
        Command::Generate { kind, seed, output } => generate(kind, seed, output.as_deref()),
    };
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
    }
}

/// Writes to stdout; a closed pipe (`burnin solve m.json | head`) is not an error.
fn emit(text: &str) -> Result<(), Failure> {
    let mut out = std::io::stdout().lock();
    match out.write_all(text.as_bytes()).and_then(|_| out.flush()) {
        Ok(()) => Ok(()),
        Err(e) if e.kind() == std::io::ErrorKind::BrokenPipe => Ok(()),
        Err(e) => Err(Failure::Io(format!("cannot write output: {e}"))),
    }
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
    let _ = writeln!(o, "optimal value  {:.6}", sol.optimal_value);
    if m.discount() < 1.0 {
        let _ = writeln!(o, "discount       {}", m.discount());
    }
    let sw = m
        .states()
        .iter()
        .map(|s| s.chars().count())
        .max()
        .unwrap_or(5)
        .max(5);
    let aw = m
        .actions()
        .iter()
        .map(|s| s.chars().count())
        .max()
        .unwrap_or(6)
        .max(10);
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
                "{:>4}  {:<sw$}  {:>10.6}  {:<aw$}",
                h + 1,
                label,
                sol.v[[h, s]],
                best
            );
            for a in 0..m.n_actions() {
                let _ = write!(o, "  {:>10.6}", sol.q[[h, s, a]]);
            }
            o.push('\n');
        }
    }
    o
}

/// A generator's parameter error, named as the CLI option.
fn param_failure(e: ParamError) -> Failure {
    Failure::Invalid(vec![format!(
        "--{}: {}",
        e.param.replace('_', "-"),
        e.message
    )])
}

fn generate(kind: Kind, seed: u64, output: Option<&Path>) -> Result<(), Failure> {
    let model = match kind {
        Kind::Random(a) => Garnet {
            states: a.states,
            actions: a.actions,
            successors: a.successors,
            horizon: a.horizon,
            time_dependent: a.time_dependent,
            bernoulli: !a.fixed_rewards,
        }
        .generate(seed),
        Kind::River(a) => RiverSwim {
            states: a.states,
            horizon: a.horizon,
            p_forward: a.p_forward,
            p_back: a.p_back,
            small_reward: a.small_reward,
            big_reward: a.big_reward,
        }
        .generate(),
        Kind::Grid(a) => Grid {
            width: a.width,
            height: a.height,
            slip: a.slip,
            horizon: a.horizon,
            goal_reward: a.goal_reward,
        }
        .generate(),
        Kind::Lock(a) => Lock {
            horizon: a.horizon,
            actions: a.actions,
            time_dependent: a.time_dependent,
        }
        .generate(seed),
        Kind::LowerBound(a) => LowerBound {
            actions: a.actions,
            depth: a.depth,
            horizon: a.horizon,
            wait_until: a.wait_until,
            epsilon: a.epsilon,
            special_step: a.special_step,
            special_leaf: a.special_leaf,
            special_action: a.special_action,
        }
        .generate(seed),
        Kind::Bandit(a) => Bandit {
            arms: a.arms,
            means: a.means,
        }
        .generate(seed),
    }
    .map_err(param_failure)?;
    let text = burnin::write_model(&model);
    match output {
        Some(p) => std::fs::write(p, text)
            .map_err(|e| Failure::Io(format!("cannot write {}: {e}", p.display()))),
        None => emit(&text),
    }
}

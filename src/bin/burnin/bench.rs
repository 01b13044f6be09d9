//! `burnin bench`: the core's reference workloads, timed with this
//! machine's clock, with the process's peak memory.

use crate::files::{Failure, emit};

#[derive(clap::Args)]
pub struct Args {
    /// Smaller workloads (K = 10 000, replanning to 10⁵) for a quick look.
    #[arg(long)]
    pub quick: bool,
    /// Only this learner's learning workload (an algorithm key), or
    /// `floor`: the cheapest episode loop, the floor learners are measured against.
    #[arg(long, value_name = "ALGORITHM", conflicts_with = "no_learners")]
    pub only: Option<String>,
    /// The solver and replanning workloads, without the learners'.
    #[arg(long)]
    pub no_learners: bool,
    /// Only the research-scale workload: every learner (or --only's) on
    /// S=500, A=10, H=50 with 10 successors per row.
    #[arg(long, conflicts_with_all = ["quick", "no_learners"])]
    pub research: bool,
}

/// Peak resident memory of this process (Linux), in bytes. Read here, not
/// through sysinfo: sysinfo gives a process's current resident size, not
/// its peak (VmHWM), which is what the benchmarks report.
fn peak_rss() -> Option<u64> {
    let status = std::fs::read_to_string("/proc/self/status").ok()?;
    let line = status.lines().find(|l| l.starts_with("VmHWM:"))?;
    let kb: u64 = line.split_whitespace().nth(1)?.parse().ok()?;
    Some(kb * 1024)
}

pub fn bench(a: &Args) -> Result<(), Failure> {
    if let Some(k) = a.only.as_deref() {
        // An unknown key printed empty figures with exit 0 (#35).
        let keys: Vec<String> = burnin::bench::bench_learners()
            .iter()
            .map(|l| l.key().to_string())
            .chain([burnin::bench::FLOOR.to_string()])
            .collect();
        if !keys.iter().any(|x| x == k) {
            return Err(Failure::Io(format!(
                "--only {k:?}: expected a learner of the benchmarks or floor: {}",
                keys.join(", ")
            )));
        }
    }
    let start = std::time::Instant::now();
    let now = move || start.elapsed().as_secs_f64();
    let sel = burnin::bench::Selection {
        quick: a.quick,
        only: a.only.as_deref(),
        no_learners: a.no_learners,
        research: a.research,
    };
    emit(&(burnin::bench::report("native", &now, &peak_rss, sel) + "\n"))
}

//! `cargo xtask bench`: the reference workloads of `src/bench.rs` natively
//! (`burnin bench`) and in headless Chromium (`www/bench.html`), the numpy
//! peer (`benches/numpy_ucbvi.py`), and thread scaling; writes BENCHMARKS.md
//! with the date, the machine and every target's status. Each learner runs
//! in rounds that alternate native, wasm (and, for UCBVI, the numpy peer)
//! within seconds, driven by `tests/browser/bench.mjs`, and every ratio is
//! the median of its rounds' ratios: on a shared machine, speed drifts by a
//! quarter over minutes, more than the margins the targets leave.

use std::fmt::Write as _;
use std::process::Command;
use std::time::Instant;

use crate::{Result, browser_dir, build_wasm, cargo, chromium, output, root, step};

/// As `burnin::bench` (xtask has no dependency on the core).
const RESEARCH_EPISODES: u64 = 1000;
const RESEARCH_SECONDS: f64 = 15.0;
const RESEARCH_MIN_SECONDS: f64 = 2.0;

/// How many one-thread/two-thread pairs the thread-scaling row times.
const THREAD_PAIRS: usize = 7;

/// Rounds of the per-step split's profiles (PSRL's in the first only).
const SPLIT_ROUNDS: usize = 3;

/// A profiled run: ns per step, shares [planning, evaluation, learning,
/// simulating], samples, and its non-planning cost over its round's floor.
type Profiled = (f64, [f64; 4], u64, f64);

/// Finds a figure by the start of its name in `burnin bench` JSON: its
/// best and median values and its note.
fn figure(json: &str, name: &str) -> Option<(f64, f64, String)> {
    let report: serde_json::Value = serde_json::from_str(json).ok()?;
    let f = report["figures"]
        .as_array()?
        .iter()
        .find(|f| f["name"].as_str().is_some_and(|n| n.starts_with(name)))?;
    let note = f["note"].as_str().unwrap_or("").to_owned();
    Some((f["best"].as_f64()?, f["median"].as_f64()?, note))
}

/// A number at the top level of `burnin bench` JSON.
fn top_number(json: &str, key: &str) -> Option<f64> {
    let report: serde_json::Value = serde_json::from_str(json).ok()?;
    report[key].as_f64()
}

fn mark(ok: bool) -> &'static str {
    if ok { "met" } else { "**not met**" }
}

fn timed(cmd: &mut Command) -> Result<f64> {
    let t = Instant::now();
    let out = cmd
        .current_dir(root())
        .output()
        .map_err(|e| e.to_string())?;
    if !out.status.success() {
        return Err(format!(
            "{cmd:?} failed: {}",
            String::from_utf8_lossy(&out.stderr)
        ));
    }
    Ok(t.elapsed().as_secs_f64())
}

/// BENCHMARKS.md from this heading on is measured by hand and kept when the
/// rest is rewritten.
const KEPT_HEADING: &str = "## Measured by hand";

/// The workloads run in rounds on the learning workload's model, in the
/// order of the tables: the floor (`burnin bench --only floor`: the
/// cheapest episode loop) and every learner.
const LEARNERS: [&str; 15] = [
    "floor",
    "mvp",
    "mvp-2021",
    "ucbvi-hoeffding",
    "ucbvi-bernstein",
    "euler",
    "orlc",
    "q-ucb-hoeffding",
    "q-ucb-bernstein",
    "ucb-advantage",
    "q-early-settled",
    "psrl",
    "rlsvi",
    "eps-greedy",
    "uniform",
];

pub fn bench(quick: bool) -> Result<()> {
    let k: u64 = if quick { 10_000 } else { 100_000 };
    step("building the native binary (release)");
    crate::run(cargo().args(["build", "--release", "--bin", "burnin"]))?;
    let cli = crate::target_dir().join("release/burnin");
    let www = build_wasm()?;

    step("native workloads (solver, replanning)");
    let mut args = vec!["bench", "--no-learners"];
    if quick {
        args.push("--quick");
    }
    let native = output(Command::new(&cli).args(&args)).ok_or("burnin bench failed")?;

    let tmp = std::env::temp_dir().join(format!("burnin-bench-{}", std::process::id()));
    std::fs::create_dir_all(&tmp).map_err(|e| e.to_string())?;
    let model = tmp.join("learn-model.json");
    let text = output(Command::new(&cli).args([
        "generate",
        "random",
        "--states",
        "20",
        "--actions",
        "4",
        "--successors",
        "5",
        "--horizon",
        "20",
        "--seed",
        "1",
    ]))
    .ok_or("burnin generate failed")?;
    std::fs::write(&model, text).map_err(|e| e.to_string())?;
    if output(Command::new("python3").args(["-c", "import numpy"])).is_none() {
        step("installing numpy for the peer");
        crate::run(Command::new("python3").args(["-m", "pip", "install", "--quiet", "numpy"]))?;
    }
    let numpy_version =
        output(Command::new("python3").args(["-c", "import numpy; print(numpy.__version__)"]))
            .unwrap_or_default()
            .trim()
            .to_owned();

    step("wasm workloads in headless Chromium, learners in rounds with native and numpy runs");
    let chrome = chromium()?;
    let dir = browser_dir()?;
    let server =
        crate::serve::Server::start(www.clone(), 0).map_err(|e| format!("cannot listen: {e}"))?;
    let pairs_out = tmp.join("pairs.tsv");
    let guest_out = tmp.join("guest.tsv");
    let research_out = tmp.join("research.tsv");
    // The thread-scaling experiment, its model inline, for the page's pool.
    let pool_exp = tmp.join("pool.json");
    let pool_out = tmp.join("pool.tsv");
    std::fs::write(
        &pool_exp,
        format!(
            r#"{{"format": "burnin-experiment", "version": 1, "episodes": {}, "seeds": 8,
                "learners": [{{"algorithm": "ucbvi-hoeffding"}}], "model": {}}}"#,
            k / 5,
            std::fs::read_to_string(&model).map_err(|e| e.to_string())?
        ),
    )
    .map_err(|e| e.to_string())?;
    let mut node = Command::new("node");
    node.arg(dir.join("bench.mjs"))
        .env("BURNIN_URL", server.url())
        .env("BURNIN_CHROMIUM", &chrome)
        .env("BURNIN_CLI", &cli)
        .env("BURNIN_PAIRS", LEARNERS.join(","))
        .env("BURNIN_PAIRS_OUT", &pairs_out)
        .env("BURNIN_GUEST_MODEL", &model)
        .env("BURNIN_GUEST_OUT", &guest_out)
        .env("BURNIN_POOL_EXPERIMENT", &pool_exp)
        .env("BURNIN_POOL_PAIRS", THREAD_PAIRS.to_string())
        .env("BURNIN_POOL_OUT", &pool_out)
        .env("BURNIN_RESEARCH", LEARNERS[1..].join(","))
        .env("BURNIN_RESEARCH_OUT", &research_out)
        .env(
            "BURNIN_NUMPY",
            format!(
                "python3 {} {} {k}",
                root().join("benches/numpy_ucbvi.py").display(),
                model.display()
            ),
        );
    if quick {
        node.env("BURNIN_QUICK", "1");
    }
    let wasm = output(&mut node).ok_or("the browser benchmark failed")?;
    let rounds = std::fs::read_to_string(&pairs_out).map_err(|e| e.to_string())?;
    let research = std::fs::read_to_string(&research_out).map_err(|e| e.to_string())?;
    let pool = std::fs::read_to_string(&pool_out).map_err(|e| e.to_string())?;

    step("the numpy peer at research scale");
    let research_model = tmp.join("research-model.json");
    let text = output(Command::new(&cli).args([
        "generate",
        "random",
        "--states",
        "500",
        "--actions",
        "10",
        "--successors",
        "10",
        "--horizon",
        "50",
        "--time-dependent",
        "--seed",
        "1",
    ]))
    .ok_or("burnin generate failed")?;
    std::fs::write(&research_model, text).map_err(|e| e.to_string())?;
    let peer_k = if quick { 3 } else { 20 };
    let peer_json = output(
        Command::new("python3")
            .arg(root().join("benches/numpy_ucbvi.py"))
            .arg(&research_model)
            .arg(peer_k.to_string()),
    )
    .ok_or("the numpy peer failed at research scale")?;

    step("thread scaling (whole-process timings)");
    let exp = tmp.join("threads.json");
    std::fs::write(
        &exp,
        format!(
            r#"{{"format": "burnin-experiment", "version": 1, "model_path": "learn-model.json",
                "episodes": {}, "seeds": 8, "learners": [{{"algorithm": "ucbvi-hoeffding"}}]}}"#,
            k / 5
        ),
    )
    .map_err(|e| e.to_string())?;
    // Interleaved pairs, one thread then two; the speed-up is the median of
    // the pairs' ratios, so that a drift in the machine's speed moves both
    // sides of a ratio.
    let (mut one, mut two, mut ratios) = (Vec::new(), Vec::new(), Vec::new());
    for _ in 0..THREAD_PAIRS {
        let a = timed(
            Command::new(&cli)
                .args(["run", "--json", "--threads", "1"])
                .arg(&exp),
        )?;
        let b = timed(
            Command::new(&cli)
                .args(["run", "--json", "--threads", "2"])
                .arg(&exp),
        )?;
        one.push(a);
        two.push(b);
        ratios.push(a / b);
    }
    let median = |mut v: Vec<f64>| {
        v.sort_by(f64::total_cmp);
        v[v.len() / 2]
    };
    let (t1, t2) = (median(one), median(two));
    let speedup_range = (
        ratios.iter().copied().fold(f64::INFINITY, f64::min),
        ratios.iter().copied().fold(0.0, f64::max),
    );
    let speedup = median(ratios);

    step("guest learners as processes (whole-process timings)");
    let page_guest = std::fs::read_to_string(&guest_out).map_err(|e| e.to_string())?;
    let py = root().join("examples/uniform.py");
    let mut process_rates = Vec::new();
    for (what, learner, batch, episodes) in [
        (
            "built-in uniform learner, for reference",
            r#"{"algorithm": "uniform"}"#,
            0,
            k * 2,
        ),
        (
            "Python process, one message per episode (`examples/uniform.py`)",
            r#"{"guest": "trivial"}"#,
            1,
            k / 5,
        ),
        (
            "Python process, batches of 64 (`examples/uniform.py 64`)",
            r#"{"guest": "trivial"}"#,
            64,
            k * 2,
        ),
    ] {
        let exp = tmp.join(format!("guest-{batch}.json"));
        std::fs::write(
            &exp,
            format!(
                r#"{{"format": "burnin-experiment", "version": 1, "model_path": "learn-model.json",
                    "episodes": {episodes}, "seeds": 1, "learners": [{learner}]}}"#
            ),
        )
        .map_err(|e| e.to_string())?;
        let mut secs = Vec::new();
        for _ in 0..3 {
            let mut cmd = Command::new(&cli);
            cmd.args(["run", "--json"]).arg(&exp);
            if batch > 0 {
                cmd.arg("--learner")
                    .arg(format!("trivial=python3 {} {batch}", py.display()));
            }
            secs.push(timed(&mut cmd)?);
        }
        process_rates.push((what, batch, episodes, episodes as f64 / median(secs)));
    }
    let _ = std::fs::remove_dir_all(&tmp);

    step("writing BENCHMARKS.md");
    let date = output(Command::new("date").args(["-u", "+%Y-%m-%d %H:%M UTC"])).unwrap_or_default();
    let cpu = std::fs::read_to_string("/proc/cpuinfo")
        .ok()
        .and_then(|c| {
            c.lines()
                .find(|l| l.starts_with("model name"))
                .map(|l| l.split(':').nth(1).unwrap_or("").trim().to_owned())
        })
        .unwrap_or_else(|| "unknown".into());
    let cores = std::thread::available_parallelism().map_or(1, |n| n.get());
    let mem = std::fs::read_to_string("/proc/meminfo")
        .ok()
        .and_then(|m| {
            m.lines().next().map(|l| {
                l.split_whitespace()
                    .nth(1)
                    .unwrap_or("0")
                    .parse::<f64>()
                    .unwrap_or(0.0)
                    / 1048576.0
            })
        })
        .unwrap_or(0.0);
    let rustc = output(Command::new("rustc").arg("--version")).unwrap_or_default();
    let chrome_v = output(Command::new(&chrome).arg("--version")).unwrap_or_default();

    let mut md = String::new();
    let _ = writeln!(md, "# Benchmarks\n");
    let _ = writeln!(
        md,
        "Written by `cargo xtask bench{}` on {} — {cpu}, {cores} cores, {mem:.0} GiB; {}; {}; numpy {numpy_version}.\n",
        if quick { " --quick" } else { "" },
        date.trim(),
        rustc.trim(),
        chrome_v.trim()
    );
    let _ = writeln!(
        md,
        "Rates are the best of the repetitions (the median in brackets where there were several); the workloads are defined in `src/bench.rs`. Checksums equal in both columns mean native and wasm computed the same bits.\n"
    );
    let _ = writeln!(
        md,
        "## Solver\n\n| workload | native | wasm (Chromium) |\n|---|---|---|"
    );
    let sol = |j: &str, n: &str| {
        figure(j, n).map_or("?".into(), |f| format!("{:.3e} ({:.3e})", f.0, f.1))
    };
    let _ = writeln!(
        md,
        "| solve S=2000 A=8 H=50 b=10, 8 000 000 entries (entries/s) | {} | {} |",
        sol(&native, "solve"),
        sol(&wasm, "solve")
    );
    let _ = writeln!(
        md,
        "| plain pass over the same arrays (bytes/s) | {} | {} |",
        sol(&native, "plain"),
        sol(&wasm, "plain")
    );
    let mut targets = Vec::new();
    for (label, j) in [("native", &native), ("wasm", &wasm)] {
        // The median of the interleaved (solve, stream) pairs' ratios.
        if let Some(r) = figure(j, "solver share") {
            targets.push(format!(
                "| solver at ≥ 50% of the streaming rate ({label}; median of interleaved pairs) | {:.0}% | {} |",
                r.1 * 100.0,
                mark(r.1 >= 0.5)
            ));
        }
    }
    let _ = writeln!(
        md,
        "\n## Learning (S=20, A=4, H=20, 5 successors, one seed, K={k}; episodes/s)\n\nEach learner ran in rounds, a native run (`burnin bench --only`) then a wasm run in the same open page, so that both sides of a ratio are measured within seconds of each other; rates are the best of all rounds, the ratio is the median of the rounds' ratios (their range in brackets). The floor is the cheapest episode loop on the same model (a fixed policy, the reward and next-state draws, the visit counts: `floor_figures` in `src/bench.rs`); the cost per step is 1/(episodes/s × H) at the best native rate, and × floor is that cost over the floor's.\n\n| workload | rounds | native | wasm | native/wasm | ns per step (native) | × floor | checksum (native = wasm) |\n|---|---|---|---|---|---|---|---|"
    );
    let rows: Vec<Vec<&str>> = rounds
        .lines()
        .filter(|l| !l.is_empty())
        .map(|l| l.split('\t').collect())
        .collect();
    let num = |x: &str| x.parse::<f64>().unwrap_or(f64::NAN);
    let best = |v: &[f64]| v.iter().copied().fold(f64::NAN, f64::max);
    let median = |v: &[f64]| {
        let mut v = v.to_vec();
        v.sort_by(f64::total_cmp);
        v[v.len() / 2]
    };
    let range = |v: &[f64], digits: usize| {
        let (lo, hi) = (
            v.iter().copied().fold(f64::INFINITY, f64::min),
            v.iter().copied().fold(f64::NEG_INFINITY, f64::max),
        );
        if v.len() > 1 {
            format!(" ({lo:.digits$}–{hi:.digits$})")
        } else {
            String::new()
        }
    };
    let step_ns = |rate: f64| 1e9 / (rate * 20.0);
    let floor_ns = {
        let n: Vec<f64> = rows
            .iter()
            .filter(|r| r[0] == "floor")
            .map(|r| num(r[1]))
            .collect();
        step_ns(best(&n))
    };
    for key in LEARNERS {
        let mine: Vec<&Vec<&str>> = rows.iter().filter(|r| r[0] == key).collect();
        if mine.is_empty() {
            continue;
        }
        let n: Vec<f64> = mine.iter().map(|r| num(r[1])).collect();
        let w: Vec<f64> = mine.iter().map(|r| num(r[2])).collect();
        let ratios: Vec<f64> = n.iter().zip(&w).map(|(a, b)| a / b).collect();
        let ratio = median(&ratios);
        let equal = mine.iter().all(|r| r[3] == r[4]);
        let ns = step_ns(best(&n));
        let _ = writeln!(
            md,
            "| {key} | {} | {:.0} | {:.0} | {ratio:.2}{} | {ns:.1} | {:.2} | {} |",
            mine.len(),
            best(&n),
            best(&w),
            range(&ratios, 2),
            ns / floor_ns,
            if equal { "equal" } else { "**differs**" }
        );
        if key == "uniform" {
            targets.push(format!(
                "| uniform within 2× of the floor per step (native) | {:.2}× | {} |",
                ns / floor_ns,
                mark(ns <= 2.0 * floor_ns)
            ));
        }
        targets.push(format!(
            "| wasm within 1.5× of native: {key} | {ratio:.2}× | {} |",
            mark(ratio <= 1.5)
        ));
    }
    let peer: Vec<(f64, f64, f64)> = rows
        .iter()
        .filter(|r| r[0] == "ucbvi-hoeffding" && r.len() > 5)
        .map(|r| (num(r[1]), num(r[2]), num(r[5])))
        .collect();
    if !peer.is_empty() {
        let np: Vec<f64> = peer.iter().map(|p| p.2).collect();
        let over_native: Vec<f64> = peer.iter().map(|p| p.0 / p.2).collect();
        let over_wasm: Vec<f64> = peer.iter().map(|p| p.1 / p.2).collect();
        let (rn, rw) = (median(&over_native), median(&over_wasm));
        let _ = writeln!(
            md,
            "\n## Against a vectorised numpy UCBVI (same model, K = {k}, same exact regret accounting)\n\nThe peer ran once in each ucbvi-hoeffding round, right after that round's native and wasm runs; ratios are the medians of the rounds' ratios (their range in brackets).\n\n| | episodes/s (best) | × numpy |\n|---|---|---|\n| numpy peer (`benches/numpy_ucbvi.py`) | {:.0} | 1 |\n| Burnin native | {:.0} | {rn:.1}{} |\n| Burnin wasm | {:.0} | {rw:.1}{} |",
            best(&np),
            best(&peer.iter().map(|p| p.0).collect::<Vec<_>>()),
            range(&over_native, 1),
            best(&peer.iter().map(|p| p.1).collect::<Vec<_>>()),
            range(&over_wasm, 1)
        );
        targets.push(format!(
            "| ≥ 100× numpy natively | {rn:.1}× | {} |",
            mark(rn >= 100.0)
        ));
        targets.push(format!(
            "| ≥ 70× numpy in the browser | {rw:.1}× | {} |",
            mark(rw >= 70.0)
        ));
    }
    let _ = writeln!(
        md,
        "\n## MVP replanning\n\n| K | model updates | seconds (native) | seconds (wasm) |\n|---|---|---|---|"
    );
    for e in 3..=(if quick { 5 } else { 6 }) {
        let name = format!("mvp replans at K={}", 10u64.pow(e));
        if let (Some(n), Some(w)) = (figure(&native, &name), figure(&wasm, &name)) {
            let _ = writeln!(md, "| 10^{e} | {:.0} | {} | {} |", n.0, n.2, w.2);
        }
    }
    let _ = writeln!(
        md,
        "\n## Parallel seeds (CLI, 8 seeds of ucbvi-hoeffding, K={}; whole-process timings, {THREAD_PAIRS} interleaved pairs)\n\nEach pair ran the experiment on one thread and then on two; seconds are the medians, the speed-up the median of the pairs' ratios (their range in brackets). The run's estimate is made as a user's run makes it (`--budget` is on by default): one thread times each learner's first run while the other starts on the rest.\n\n| threads | seconds | speed-up |\n|---|---|---|\n| 1 | {t1:.2} | 1 |\n| 2 | {t2:.2} | {speedup:.2} ({:.2}–{:.2}) |",
        k / 5,
        speedup_range.0,
        speedup_range.1
    );
    targets.push(format!(
        "| ≥ 1.9× on 2 cores for 8 runs (CLI threads; median of pairs) | {speedup:.2}× | {} |",
        mark(speedup >= 1.9)
    ));
    // The page's pool on the same experiment: one worker, then two.
    let pool_pairs: Vec<(f64, f64)> = pool
        .lines()
        .filter_map(|l| {
            let mut f = l.split('\t').map(|x| x.parse::<f64>().ok());
            Some((f.next()??, f.next()??))
        })
        .collect();
    if pool_pairs.is_empty() {
        return Err("the page's pool was not timed".into());
    }
    let pool_one = median(&pool_pairs.iter().map(|p| p.0 / 1000.0).collect::<Vec<_>>());
    let pool_two = median(&pool_pairs.iter().map(|p| p.1 / 1000.0).collect::<Vec<_>>());
    let pool_ratios: Vec<f64> = pool_pairs.iter().map(|p| p.0 / p.1).collect();
    let pool_range = (
        pool_ratios.iter().copied().fold(f64::INFINITY, f64::min),
        pool_ratios.iter().copied().fold(0.0, f64::max),
    );
    let pool_speedup = median(&pool_ratios);
    let _ = writeln!(
        md,
        "\nThe page's worker pool on the same experiment (its model inline), timed in the bench page from the call of the page's own `runExperiment` to the merged results, one worker and then two, {} pairs after a warm-up run:\n\n| workers | seconds | speed-up |\n|---|---|---|\n| 1 | {pool_one:.2} | 1 |\n| 2 | {pool_two:.2} | {pool_speedup:.2} ({:.2}–{:.2}) |",
        pool_pairs.len(),
        pool_range.0,
        pool_range.1
    );
    targets.push(format!(
        "| the page's pool of 2 workers ≥ 1.8× over one (bench page; median of pairs) | {pool_speedup:.2}× | {} |",
        mark(pool_speedup >= 1.8)
    ));
    let mb = |j: &str, key: &str| {
        top_number(j, key).map_or("?".into(), |b| format!("{:.0} MiB", b / 1048576.0))
    };
    let _ = writeln!(
        md,
        "\n## Memory\n\n| | native (peak RSS) | wasm (heap) |\n|---|---|---|\n| after the solver workload | {} | {} |\n| at the end | {} | {} |",
        mb(&native, "peak_memory_after_solve_bytes"),
        mb(&wasm, "peak_memory_after_solve_bytes"),
        mb(&native, "peak_memory_bytes"),
        mb(&wasm, "peak_memory_bytes")
    );
    // Research scale: each learner in its own process and its own page.
    let _ = writeln!(
        md,
        "\n## Research scale (S=500, A=10, H=50, 10 successors per row, a table per step, one seed; episodes/s)\n\nEach learner ran its first {RESEARCH_EPISODES} episodes, or as many as it did in {RESEARCH_SECONDS} s, natively in a process of its own (`burnin bench --research --only KEY`) and then in a page of its own; a learner done in under {RESEARCH_MIN_SECONDS} s ran again, up to 5 runs, and its best run counts; set-up (the sampler's tables and V*) is not timed. Memory is the native process's peak RSS and the page's wasm heap.\n\n| learner | native | native peak RSS | wasm | wasm heap | native/wasm | episodes timed (native; wasm) |\n|---|---|---|---|---|---|---|"
    );
    for row in research.lines().filter(|l| !l.is_empty()) {
        let r: Vec<&str> = row.split('\t').collect();
        if r.len() < 7 {
            continue;
        }
        let mib = |x: &str| format!("{:.0} MiB", num(x) / 1048576.0);
        let _ = writeln!(
            md,
            "| {} | {:.1} | {} | {:.1} | {} | {:.2} | {}; {} |",
            r[0],
            num(r[1]),
            mib(r[2]),
            num(r[3]),
            mib(r[4]),
            num(r[1]) / num(r[3]),
            r[5],
            r[6]
        );
    }
    let peer_rate = top_number(&peer_json, "episodes_per_second").unwrap_or(f64::NAN);
    let _ = writeln!(
        md,
        "| numpy peer, UCBVI-Hoeffding (`benches/numpy_ucbvi.py`, K = {peer_k}) | {peer_rate:.1} | | | | | |"
    );
    // The guest contract's overhead: a trivial learner (plays uniformly,
    // keeps its policy) on the learning workload.
    let page_rows: Vec<(f64, f64)> = page_guest
        .lines()
        .filter_map(|l| l.split_once('\t'))
        .map(|(g, b)| (num(g), num(b)))
        .collect();
    let page_best = best(&page_rows.iter().map(|r| r.0).collect::<Vec<_>>());
    let page_builtin = best(&page_rows.iter().map(|r| r.1).collect::<Vec<_>>());
    let _ = writeln!(
        md,
        "\n## Guest learners (the learning workload's model, one seed; episodes/s)\n\nThe contract's overhead with a trivial guest that plays uniformly and keeps its policy. In the page, `examples/uniform.mjs` answers once per episode in a worker (best of {} rounds, each with the built-in uniform learner right after it); the processes are whole-process timings of `burnin run` (medians of 3, Python's start-up included).\n\n| guest | K | episodes/s |\n|---|---|---|\n| JS module in the page, one answer per episode | {} | {page_best:.0} |\n| built-in uniform learner in the page, for reference | {} | {page_builtin:.0} |",
        page_rows.len(),
        if quick { 20_000 } else { 200_000 },
        if quick { 20_000 } else { 200_000 },
    );
    for (what, _, episodes, rate) in &process_rates {
        let _ = writeln!(md, "| {what} | {episodes} | {rate:.0} |");
    }
    targets.push(format!(
        "| JS guest in the page ≥ 50 000 episodes/s | {page_best:.0} | {} |",
        mark(page_best >= 50_000.0)
    ));
    for (_, batch, _, rate) in &process_rates {
        let want = match batch {
            1 => 5_000.0,
            64 => 50_000.0,
            _ => continue,
        };
        targets.push(format!(
            "| Python guest, {} ≥ {want:.0} episodes/s | {rate:.0} | {} |",
            if *batch == 1 {
                "one message per episode,"
            } else {
                "batches of 64,"
            },
            mark(*rate >= want)
        ));
    }
    // The page's one download of code: the core (charts included) as wasm,
    // uncompressed as the server sends it without compression.
    let wasm_bytes = std::fs::metadata(www.join("pkg/burnin_bg.wasm"))
        .map_err(|e| format!("the wasm build: {e}"))?
        .len();
    targets.push(format!(
        "| wasm download under 1.5 MB uncompressed (`www/pkg/burnin_bg.wasm`) | {:.2} MB ({wasm_bytes} bytes) | {} |",
        wasm_bytes as f64 / 1e6,
        mark(wasm_bytes < 1_500_000)
    ));
    step_split(&mut md, &mut targets, quick)?;
    let _ = writeln!(
        md,
        "\n## Targets\n\n| target | measured | status |\n|---|---|---|"
    );
    for t in targets {
        let _ = writeln!(md, "{t}");
    }
    // Sections measured by hand (from their own heading on) are kept.
    let old = std::fs::read_to_string(root().join("BENCHMARKS.md")).unwrap_or_default();
    if let Some(i) = old.find(KEPT_HEADING) {
        md.push('\n');
        md.push_str(&old[i..]);
    }
    std::fs::write(root().join("BENCHMARKS.md"), md).map_err(|e| e.to_string())?;
    eprintln!("wrote BENCHMARKS.md");
    Ok(())
}

/// `cargo xtask bench --split`: the per-step split alone, printed.
pub fn split_only(quick: bool) -> Result<()> {
    let (mut md, mut targets) = (String::new(), Vec::new());
    step_split(&mut md, &mut targets, quick)?;
    println!("{md}");
    for t in targets {
        println!("{t}");
    }
    Ok(())
}

/// Where a step's time goes, from a sampling profile of each workload of
/// the learning table (`perf record` on the release build with debug
/// information, `perf script --inline`, split by `benches/step_split.py`):
/// a section of BENCHMARKS.md and a target row per learner (its own part
/// without planning within 2× of the floor). Without `perf` on the machine
/// the section says so and the targets are left out.
fn step_split(md: &mut String, targets: &mut Vec<String>, quick: bool) -> Result<()> {
    step("where a step's time goes (perf sampling profiles)");
    if output(Command::new("perf").arg("--version")).is_none() {
        let _ = writeln!(
            md,
            "\n## Where a step's time goes\n\nNot measured: this machine has no `perf`."
        );
        return Ok(());
    }
    let dir = crate::target_dir().join("profile");
    crate::run(
        cargo()
            .env("CARGO_PROFILE_RELEASE_DEBUG", "2")
            .args(["build", "--release", "--bin", "burnin", "--target-dir"])
            .arg(&dir),
    )?;
    let cli = dir.join("release/burnin");
    let tmp = std::env::temp_dir().join(format!("burnin-split-{}", std::process::id()));
    std::fs::create_dir_all(&tmp).map_err(|e| e.to_string())?;
    // One profiled run of `key`: its ns per step (of the profiled run),
    // its shares [planning, evaluation, learning, simulating], its samples.
    let profile = |key: &str| -> Result<(f64, [f64; 4], u64)> {
        let data = tmp.join(format!("{key}.data"));
        let mut record = Command::new("perf");
        record
            .args([
                "record",
                "-q",
                "-F",
                "4000",
                "-e",
                "cpu-clock",
                "--call-graph",
                "dwarf",
                "-o",
            ])
            .arg(&data)
            .arg(&cli)
            .args(["bench", "--only", key]);
        if quick {
            record.arg("--quick");
        }
        let json = output(&mut record).ok_or(format!("perf record of {key} failed"))?;
        let rate = figure(&json, if key == "floor" { "floor " } else { "learn " })
            .ok_or(format!("no figure in the profiled run of {key}"))?
            .0;
        let stacks = tmp.join(format!("{key}.txt"));
        let script = Command::new("perf")
            .args(["script", "--inline", "-F", "ip,sym", "-i"])
            .arg(&data)
            .current_dir(root())
            .output()
            .map_err(|e| e.to_string())?;
        std::fs::write(&stacks, &script.stdout).map_err(|e| e.to_string())?;
        let split = output(
            Command::new("python3")
                .arg(root().join("benches/step_split.py"))
                .arg(&stacks),
        )
        .ok_or(format!("step_split.py failed on {key}"))?;
        let _ = std::fs::remove_file(&data);
        let _ = std::fs::remove_file(&stacks);
        let v: serde_json::Value = serde_json::from_str(&split).map_err(|e| e.to_string())?;
        let share = |c: &str| v["share"][c].as_f64().unwrap_or(0.0);
        let ns = 1e9 / (rate * 20.0);
        // The floor's loop is not a run: all of it is simulating.
        Ok(if key == "floor" {
            (
                ns,
                [0.0, 0.0, 0.0, 1.0],
                v["samples_outside"].as_u64().unwrap_or(0),
            )
        } else {
            (
                ns,
                [
                    share("planning"),
                    share("evaluation"),
                    share("learning"),
                    share("simulating"),
                ],
                v["samples_in_run"].as_u64().unwrap_or(0),
            )
        })
    };
    // In rounds, the floor first in each, so that a learner's × floor
    // divides by the floor profiled moments before it (a drift in the
    // machine's speed moves both); PSRL's run is long and runs once.
    let mut runs: Vec<Vec<Profiled>> = vec![Vec::new(); LEARNERS.len()];
    for round in 0..SPLIT_ROUNDS {
        let floor = profile("floor")?;
        runs[0].push((floor.0, floor.1, floor.2, 1.0));
        for (i, key) in LEARNERS.iter().enumerate().skip(1) {
            if *key == "psrl" && round > 0 {
                continue;
            }
            let (ns, sh, samples) = profile(key)?;
            runs[i].push((ns, sh, samples, ns * (sh[2] + sh[3]) / floor.0));
        }
    }
    let _ = writeln!(
        md,
        "\n## Where a step's time goes (sampling profiles, {SPLIT_ROUNDS} rounds)\n\nEach workload of the learning table ran again under a sampling profiler (`perf record -F 4000 -e cpu-clock --call-graph dwarf` on the release build with debug information; `perf script --inline`), and `benches/step_split.py` put each sample in the first class whose functions are on its stack, inlined ones included: planning is the learner's `begin_episode` (replanning, posterior draws), evaluation Burnin's exact evaluation of each new policy for its regret, learning the learner's `act`, `observe` and `end_episode`, simulating the rest of the loop (the reward and next-state draws, the visit counts: what the floor does). ns per step is 10⁹ / (episodes/s × H) of the profiled run itself (the profiler slows a run); non-planning is learning plus simulating, the learner's own part without its planning and without the harness's evaluation, and × floor is that over the floor's profiled ns per step in the same round. The profiles ran in rounds, the floor first in each and PSRL (a long run) in the first only; a row is the round with the median × floor, the range over the rounds in brackets.\n\n| workload | samples | ns per step | planning | evaluation | learning | simulating | non-planning ns per step | × floor |\n|---|---|---|---|---|---|---|---|---|"
    );
    for (key, mut r) in LEARNERS.iter().zip(runs) {
        r.sort_by(|a, b| a.3.total_cmp(&b.3).then(a.0.total_cmp(&b.0)));
        let (ns, [plan, eval, learn, sim], samples, ratio) = r[r.len() / 2];
        let own = ns * (learn + sim);
        let pct = |x: f64| format!("{:.1}%", 100.0 * x);
        let range = if r.len() > 1 && *key != "floor" {
            format!(" ({:.2}–{:.2})", r[0].3, r[r.len() - 1].3)
        } else {
            String::new()
        };
        let _ = writeln!(
            md,
            "| {key} | {samples} | {ns:.1} | {} | {} | {} | {} | {own:.1} | {ratio:.2}{range} |",
            pct(plan),
            pct(eval),
            pct(learn),
            pct(sim),
        );
        if *key != "floor" {
            targets.push(format!(
                "| {key}: its own part of a step (non-planning) within 2× of the floor (profiled; median of rounds) | {ratio:.2}× | {} |",
                mark(ratio <= 2.0)
            ));
        }
    }
    Ok(())
}

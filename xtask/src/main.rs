//! Build, serve and test automation, written once and called by the README
//! and by `.ci/run`:
//!
//! - `cargo xtask serve [--port N]`: build the wasm core into `www/pkg`, copy
//!   the demo models into `www/demo-models`, and serve `www/` on 127.0.0.1.
//! - `cargo xtask test`: formatting, clippy, every cargo test, the Python
//!   package's build and pytest suite (`python/`), the wasm build, the headless-Chromium checks of the page, and the array-job
//!   recipe on a single-node Slurm.
//! - `cargo xtask python`: only the Python package's build and pytest.
//! - `cargo xtask wasm`: only the wasm build.
//! - `cargo xtask dist DIR`: the page as a static site for any host, which
//!   keeps working offline (`dist.rs`).
//! - `cargo xtask fuzz [SECONDS]`: each cargo-fuzz target for a bounded time
//!   (30 s by default; part of `test`).
//! - `cargo xtask bench --split [--quick]`: only the per-step split from
//!   sampling profiles, printed (BENCHMARKS.md is not touched).
//! - `cargo xtask bench [--quick]`: the reference workloads natively, in
//!   headless Chromium (wasm) and for the numpy peer; writes BENCHMARKS.md.
//!
//! Missing tools are installed when possible: the wasm32 target (rustup), the
//! wasm-bindgen CLI pinned to the crate's version (cargo install), Chromium
//! (apt-get, as root), the browser test's npm packages (npm ci), and a
//! virtualenv with maturin and pytest for the Python package (pip).

mod bench;
mod dist;
mod serve;

use std::path::{Path, PathBuf};
use std::process::{Command, ExitCode};

/// Must equal the `wasm-bindgen` pin in the root Cargo.toml (checked by a test below).
const WASM_BINDGEN_VERSION: &str = "0.2.130";
const WASM_TARGET: &str = "wasm32-unknown-unknown";

pub(crate) type Result<T> = std::result::Result<T, String>;

fn main() -> ExitCode {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let res = match args.first().map(String::as_str) {
        Some("serve") => serve_cmd(&args[1..]),
        Some("test") => test_cmd(),
        Some("wasm") => build_wasm().map(|_| ()),
        Some("python") => python_checks(),
        Some("dist") => dist::dist_cmd(&args[1..]),
        Some("bench") if args.iter().any(|a| a == "--split") => {
            bench::split_only(args.iter().any(|a| a == "--quick"))
        }
        Some("bench") => bench::bench(args.iter().any(|a| a == "--quick")),
        Some("fuzz") => match args.get(1).map(|s| s.parse::<u32>()) {
            None => fuzz(30),
            Some(Ok(n)) => fuzz(n),
            Some(Err(_)) => Err("usage: cargo xtask fuzz [SECONDS]".into()),
        },
        _ => {
            eprintln!(
                "usage: cargo xtask serve [--port N] | test | python | wasm | dist DIR | bench [--quick] [--split] | fuzz [SECONDS]"
            );
            return ExitCode::from(2);
        }
    };
    match res {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            eprintln!("xtask: {e}");
            ExitCode::FAILURE
        }
    }
}

pub(crate) fn root() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR"))
        .parent()
        .expect("xtask lives in the repository")
        .to_path_buf()
}

/// Cargo's build folder: `CARGO_TARGET_DIR` when set (relative to the
/// repository, as cargo reads it here), else `target/`.
pub(crate) fn target_dir() -> PathBuf {
    match std::env::var_os("CARGO_TARGET_DIR") {
        Some(d) if !d.is_empty() => root().join(d),
        _ => root().join("target"),
    }
}

pub(crate) fn step(title: &str) {
    eprintln!("\n== {title}");
}

/// Runs a command in the repository root, failing on a non-zero exit.
pub(crate) fn run(cmd: &mut Command) -> Result<()> {
    run_in(&root(), cmd)
}

/// Runs a command in `dir`, failing on a non-zero exit.
fn run_in(dir: &Path, cmd: &mut Command) -> Result<()> {
    let shown = format!("{cmd:?}");
    let status = cmd
        .current_dir(dir)
        .status()
        .map_err(|e| format!("cannot start {shown}: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!("{shown} failed ({status})"))
    }
}

pub(crate) fn output(cmd: &mut Command) -> Option<String> {
    let out = cmd.current_dir(root()).output().ok()?;
    out.status
        .success()
        .then(|| String::from_utf8_lossy(&out.stdout).into_owned())
}

pub(crate) fn cargo() -> Command {
    Command::new(std::env::var("CARGO").unwrap_or_else(|_| "cargo".into()))
}

fn ensure_wasm_tools() -> Result<()> {
    let targets = output(Command::new("rustup").args(["target", "list", "--installed"]));
    if targets.is_none_or(|t| !t.lines().any(|l| l.trim() == WASM_TARGET)) {
        step("installing the wasm32 target");
        run(Command::new("rustup").args(["target", "add", WASM_TARGET]))?;
    }
    let have = output(Command::new("wasm-bindgen").arg("--version"));
    if have.is_none_or(|v| v.trim() != format!("wasm-bindgen {WASM_BINDGEN_VERSION}")) {
        step(&format!(
            "installing wasm-bindgen-cli {WASM_BINDGEN_VERSION} (a few minutes)"
        ));
        // Without --locked: a locked dependency version is missing from the registry.
        run(cargo().args([
            "install",
            "wasm-bindgen-cli",
            "--version",
            WASM_BINDGEN_VERSION,
        ]))?;
    }
    Ok(())
}

/// Builds the core for wasm32 and generates the JS glue in `www/pkg`; copies
/// the demo models into `www/demo-models` and the example learner modules
/// into `www/examples`. Returns the `www` folder.
pub(crate) fn build_wasm() -> Result<PathBuf> {
    ensure_wasm_tools()?;
    step("building the wasm core");
    run(cargo().args(["build", "--lib", "--release", "--target", WASM_TARGET]))?;
    let wasm = target_dir().join(format!("{WASM_TARGET}/release/burnin.wasm"));
    let www = root().join("www");
    run(Command::new("wasm-bindgen")
        .args(["--target", "web", "--no-typescript", "--out-dir"])
        .arg(www.join("pkg"))
        .arg(&wasm))?;
    let demos = www.join("demo-models");
    let _ = std::fs::remove_dir_all(&demos);
    std::fs::create_dir_all(&demos).map_err(|e| e.to_string())?;
    // The models, and the demo experiments (the page opens those that hold
    // their model inline, listed under "experiments" in index.json).
    for sub in ["", "experiments"] {
        let (from, to) = (root().join("demo-models").join(sub), demos.join(sub));
        std::fs::create_dir_all(&to).map_err(|e| e.to_string())?;
        for e in std::fs::read_dir(&from).map_err(|e| e.to_string())? {
            let p = e.map_err(|e| e.to_string())?.path();
            if p.extension().is_some_and(|x| x == "json") {
                std::fs::copy(&p, to.join(p.file_name().unwrap())).map_err(|e| e.to_string())?;
            }
        }
    }
    // The example learner modules, for the page to offer as downloads.
    let ex = www.join("examples");
    let _ = std::fs::remove_dir_all(&ex);
    std::fs::create_dir_all(&ex).map_err(|e| e.to_string())?;
    for name in ["smallest.mjs", "uniform.mjs", "optimist.mjs"] {
        std::fs::copy(root().join("examples").join(name), ex.join(name))
            .map_err(|e| format!("examples/{name}: {e}"))?;
    }
    Ok(www)
}

fn serve_cmd(args: &[String]) -> Result<()> {
    let port: u16 = match args {
        [] => 8000,
        [flag, n] if flag == "--port" => n.parse().map_err(|_| format!("bad port {n:?}"))?,
        _ => return Err("usage: cargo xtask serve [--port N]".into()),
    };
    let www = build_wasm()?;
    let server = serve::Server::start(www, port).map_err(|e| format!("cannot listen: {e}"))?;
    eprintln!(
        "\nBurnin workbench: {}/  (a demo model opens; Ctrl-C stops)",
        server.url()
    );
    server.wait();
    Ok(())
}

fn test_cmd() -> Result<()> {
    step("cargo fmt --check");
    run(cargo().args(["fmt", "--all", "--check"]))?;
    step("cargo clippy");
    run(cargo().args([
        "clippy",
        "--workspace",
        "--all-targets",
        "--",
        "-D",
        "warnings",
    ]))?;
    step("cargo test");
    run(cargo().args(["test", "--workspace"]))?;
    python_checks()?;
    let www = build_wasm()?;
    step("browser checks (headless Chromium)");
    browser_checks(www)?;
    slurm_check()?;
    fuzz(30)
}

/// The Python packages the package's build and tests need, installed
/// into the virtualenv when missing (numpy is the package's one
/// dependency; SciPy and pandas are outside references of its tests,
/// nbclient, nbformat and ipykernel execute the example notebook).
const PYTHON_TOOLS: &[&str] = &[
    "maturin>=1.5,<2",
    "pytest",
    "numpy",
    "scipy",
    "pandas",
    "nbclient",
    "nbformat",
    "ipykernel",
];

/// The Python package (`python/`): built in place (maturin develop, the
/// dev profile) into a virtualenv under the build folder (`pyenv`, made
/// with `python3 -m venv` on first use, or `BURNIN_PYTHON -m venv`; as
/// root, Debian's python3-venv is installed when that fails; the tools
/// above installed by pip when missing), then its pytest suite, with the
/// CLI it compares against.
fn python_checks() -> Result<()> {
    step("Python package: maturin develop and pytest (python/)");
    let venv = target_dir().join("pyenv");
    let bin = venv.join(if cfg!(windows) { "Scripts" } else { "bin" });
    let python = bin.join(if cfg!(windows) {
        "python.exe"
    } else {
        "python"
    });
    if !python.exists() {
        let host = std::env::var("BURNIN_PYTHON").unwrap_or_else(|_| "python3".into());
        let made = run(Command::new(&host).args(["-m", "venv"]).arg(&venv));
        if made.is_err() {
            // Debian's python3 makes virtualenvs only with python3-venv.
            let _ = std::fs::remove_dir_all(&venv);
            let root_user = output(Command::new("id").arg("-u")).is_some_and(|u| u.trim() == "0");
            if !root_user {
                return made.map_err(|e| {
                    format!(
                        "{e}\n(on Debian: sudo apt-get install python3-venv; or set BURNIN_PYTHON)"
                    )
                });
            }
            step("installing python3-venv (apt-get)");
            run(Command::new("apt-get").arg("update"))?;
            run(Command::new("apt-get")
                .args(["install", "-y", "--no-install-recommends", "python3-venv"])
                .env("DEBIAN_FRONTEND", "noninteractive"))?;
            run(Command::new(&host).args(["-m", "venv"]).arg(&venv))?;
        }
    }
    let have =
        output(Command::new(&python).args(["-c", "import maturin, pytest, numpy, scipy, pandas"]));
    if have.is_none() {
        step("installing maturin, pytest and the tests' references into the virtualenv (pip)");
        run(Command::new(&python)
            .args(["-m", "pip", "install", "--quiet"])
            .args(PYTHON_TOOLS))?;
    }
    run(cargo().args(["build", "--bin", "burnin"]))?;
    run_in(
        &root().join("python"),
        Command::new(bin.join("maturin"))
            .args(["develop", "--quiet", "--profile", "dev"])
            .env("VIRTUAL_ENV", &venv),
    )?;
    run(Command::new(&python)
        .args(["-m", "pytest", "-q", "python/tests"])
        .env("BURNIN_CLI", target_dir().join("debug/burnin")))
}

/// The array-job recipe of docs/array-jobs.md on a real single-node Slurm
/// (tests/slurm/check.sh, which installs Slurm and MUNGE when missing and
/// stops every daemon it started). It needs root, as CI is; elsewhere it
/// says that it was skipped.
fn slurm_check() -> Result<()> {
    step("array-job recipe on a single-node Slurm (tests/slurm/check.sh)");
    let root_user = output(Command::new("id").arg("-u")).is_some_and(|u| u.trim() == "0");
    if !root_user {
        eprintln!("skipped: starting Slurm's daemons and installing them needs root");
        return Ok(());
    }
    run(cargo().args(["build", "--bin", "burnin"]))?;
    run(Command::new("bash")
        .arg(root().join("tests/slurm/check.sh"))
        .arg(target_dir().join("debug/burnin")))
}

/// Each fuzz target for `seconds`, on a fresh corpus grown from fuzz/seeds.
fn fuzz(seconds: u32) -> Result<()> {
    if output(cargo().args(["fuzz", "--version"])).is_none() {
        step("installing cargo-fuzz (a minute)");
        run(cargo().args(["install", "cargo-fuzz"]))?;
    }
    let dir = root().join("fuzz");
    for target in ["parse_model", "experiment_run"] {
        step(&format!("fuzzing {target} for {seconds} s"));
        let corpus = dir.join("corpus").join(target);
        let _ = std::fs::remove_dir_all(&corpus);
        std::fs::create_dir_all(&corpus).map_err(|e| e.to_string())?;
        run_in(
            &dir,
            cargo()
                // cargo-fuzz passes -Z flags; this lets the stable toolchain accept them.
                .env("RUSTC_BOOTSTRAP", "1")
                .args(["fuzz", "run", target])
                .arg(&corpus)
                .arg(dir.join("seeds").join(target))
                .args([
                    "--",
                    &format!("-max_total_time={seconds}"),
                    "-rss_limit_mb=2048",
                    "-print_final_stats=1",
                ]),
        )?;
    }
    Ok(())
}

pub(crate) fn chromium() -> Result<PathBuf> {
    if let Ok(p) = std::env::var("BURNIN_CHROMIUM") {
        return Ok(PathBuf::from(p));
    }
    let p = PathBuf::from("/usr/bin/chromium");
    if p.exists() {
        return Ok(p);
    }
    let root_user = output(Command::new("id").arg("-u")).is_some_and(|u| u.trim() == "0");
    if !root_user {
        return Err(
            "Chromium is missing: install Debian's `chromium` package (sudo apt-get install chromium) or set BURNIN_CHROMIUM".into(),
        );
    }
    step("installing Chromium (apt-get)");
    run(Command::new("apt-get").arg("update"))?;
    run(Command::new("apt-get")
        .args(["install", "-y", "--no-install-recommends", "chromium"])
        .env("DEBIAN_FRONTEND", "noninteractive"))?;
    Ok(p)
}

/// Installs the browser test's npm packages when missing; returns their folder.
pub(crate) fn browser_dir() -> Result<PathBuf> {
    let dir = root().join("tests/browser");
    if !dir.join("node_modules/playwright-core").exists() {
        step("installing the browser test's npm packages (npm ci)");
        run_in(
            &dir,
            Command::new("npm").args(["ci", "--no-audit", "--no-fund"]),
        )?;
    }
    Ok(dir)
}

/// The figures `burnin plot` draws of the ferry fixture's results for the
/// browser checks: file suffix and options (the page's controls set the
/// same way must export the same SVG).
const FIGURES: &[(&str, &[&str])] = &[
    ("chart", &[]),
    ("chart-log", &["--log", "--lower", "--bounds"]),
    ("chart-difference", &["--view", "difference"]),
];

fn browser_checks(www: PathBuf) -> Result<()> {
    let chrome = chromium()?;
    let dir = browser_dir()?;
    // Expected values come from the CLI, on the same files the page loads.
    run(cargo().args(["build", "--bin", "burnin"]))?;
    let cli = target_dir().join("debug/burnin");
    let mut expected = String::from("{");
    let demos = root().join("demo-models");
    let mut names: Vec<_> = std::fs::read_dir(&demos)
        .map_err(|e| e.to_string())?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "json") && !p.ends_with("index.json"))
        .collect();
    names.sort();
    for (i, p) in names.iter().enumerate() {
        let json = output(Command::new(&cli).args(["solve", "--json"]).arg(p))
            .ok_or_else(|| format!("burnin solve failed on {}", p.display()))?;
        let solution: serde_json::Value =
            serde_json::from_str(&json).map_err(|e| format!("burnin solve --json: {e}"))?;
        let value = solution["optimal_value"]
            .as_f64()
            .ok_or("no optimal_value in burnin solve --json")?;
        let name = p.file_name().unwrap().to_string_lossy();
        expected.push_str(&format!(
            "{}\"{name}\": {value}",
            if i == 0 { "" } else { ", " }
        ));
    }
    expected.push('}');
    // What `burnin run --json` prints for each fixture experiment, for the
    // page to be compared with.
    let out = dir.join("out");
    std::fs::create_dir_all(&out).map_err(|e| e.to_string())?;
    for e in std::fs::read_dir(dir.join("fixtures")).map_err(|e| e.to_string())? {
        let p = e.map_err(|e| e.to_string())?.path();
        let name = p.file_name().unwrap().to_string_lossy().into_owned();
        if !name.ends_with("-experiment.json") {
            continue;
        }
        let mut run = Command::new(&cli);
        run.args(["run", "--json"]).arg(&p);
        // A fixture naming a guest learner runs it as the page does, with
        // the example learner (here a Python process, there a JS module).
        if name.ends_with("-guest-experiment.json") {
            let py = root().join("examples/uniform.py");
            run.arg("--learner")
                .arg(format!("uniform=python3 {}", py.display()));
        }
        let json =
            output(&mut run).ok_or_else(|| format!("burnin run failed on {}", p.display()))?;
        let results = out.join(format!("{name}.results.json"));
        std::fs::write(&results, json).map_err(|e| e.to_string())?;
        // `burnin plot`'s figures of these results, for the page's SVG
        // export to be compared with byte for byte.
        let figures = if name == "ferry-experiment.json" {
            FIGURES
        } else {
            &[]
        };
        // `burnin table`'s comparison table in each format, for the page's
        // "Comparison table" download to be compared with.
        if name == "ferry-experiment.json" {
            for ext in ["md", "tex", "csv"] {
                let table = out.join(format!("{name}.table.{ext}"));
                output(
                    Command::new(&cli)
                        .arg("table")
                        .arg(&results)
                        .arg("--output")
                        .arg(&table),
                )
                .ok_or_else(|| format!("burnin table failed on {}", results.display()))?;
            }
        }
        // And as PNG, for the page's PNG export to be compared with pixel
        // by pixel (checks/charts.mjs).
        for (suffix, args) in figures {
            for ext in ["svg", "png"] {
                let file = out.join(format!("{name}.{suffix}.{ext}"));
                let mut plot = Command::new(&cli);
                plot.arg("plot")
                    .arg(&results)
                    .arg("--output")
                    .arg(&file)
                    .args(*args);
                output(&mut plot).ok_or_else(|| {
                    format!("burnin plot {args:?} failed on {}", results.display())
                })?;
            }
        }
    }
    // A results file written by an earlier build must still plot, in the
    // page as with `burnin plot`.
    let old = dir.join("fixtures/results-from-an-earlier-build.json");
    let svg = out.join("results-from-an-earlier-build.chart.svg");
    output(
        Command::new(&cli)
            .arg("plot")
            .arg(&old)
            .arg("--output")
            .arg(&svg),
    )
    .ok_or_else(|| format!("burnin plot failed on {}", old.display()))?;
    // The published site, at a sub-path of its own server, and a second
    // build to publish over it.
    let checks = target_dir().join("dist-check");
    let _ = std::fs::remove_dir_all(&checks);
    let site = checks.join("root/team/burnin");
    let next = checks.join("next");
    std::fs::create_dir_all(site.parent().unwrap()).map_err(|e| e.to_string())?;
    dist::write_dist(&www, &site, None)?;
    dist::write_dist(
        &www,
        &next,
        Some("a second publish of the same page, for the update check"),
    )?;
    let version = output(Command::new(&cli).arg("--version")).ok_or("burnin --version failed")?;
    let dist_server =
        serve::Server::start(checks.join("root"), 0).map_err(|e| format!("cannot listen: {e}"))?;
    let server = serve::Server::start(www, 0).map_err(|e| format!("cannot listen: {e}"))?;
    let status = Command::new("node")
        .arg(dir.join("check.mjs"))
        .env("BURNIN_URL", server.url())
        .env(
            "BURNIN_DIST_URL",
            format!("{}/team/burnin/", dist_server.url()),
        )
        .env("BURNIN_DIST_DIR", &site)
        .env("BURNIN_DIST_NEXT", &next)
        .env("BURNIN_VERSION", version.trim())
        .env("BURNIN_CHROMIUM", &chrome)
        .env("BURNIN_EXPECTED", expected)
        .env("BURNIN_OUT", &out)
        .current_dir(&dir)
        .status()
        .map_err(|e| format!("cannot start node: {e}"))?;
    if status.success() {
        Ok(())
    } else {
        Err(format!("browser checks failed ({status})"))
    }
}

#[cfg(test)]
mod tests {
    /// The CLI that generates the glue must match the crate that the wasm
    /// build links, or the page fails to load.
    #[test]
    fn wasm_bindgen_pin_matches_the_root_manifest() {
        let manifest = std::fs::read_to_string(super::root().join("Cargo.toml")).unwrap();
        let pin = format!("wasm-bindgen = \"={}\"", super::WASM_BINDGEN_VERSION);
        assert!(manifest.contains(&pin), "root Cargo.toml must pin {pin}");
    }
}

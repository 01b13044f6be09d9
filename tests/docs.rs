//! Docs that cannot drift: ARCHITECTURE.md names only paths that exist and
//! names every CLI subcommand and wasm export; docs/formats.md lists the
//! generators and algorithms exactly as the core's catalogues define them.

use std::path::{Path, PathBuf};
use std::process::Command;

fn root() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

fn read(rel: &str) -> String {
    std::fs::read_to_string(root().join(rel)).unwrap_or_else(|e| panic!("{rel}: {e}"))
}

/// The text between backticks, outside fenced code blocks.
fn code_spans(md: &str) -> Vec<String> {
    let mut out = Vec::new();
    let mut fenced = false;
    for line in md.lines() {
        if line.trim_start().starts_with("```") {
            fenced = !fenced;
            continue;
        }
        if fenced {
            continue;
        }
        let parts: Vec<&str> = line.split('`').collect();
        out.extend(parts.iter().skip(1).step_by(2).map(|s| s.to_string()));
    }
    out
}

/// Folders whose content the build writes (ARCHITECTURE.md says so); they
/// need not exist in a fresh checkout.
const BUILD_PRODUCTS: &[&str] = &["www/pkg/", "www/demo-models/", "tests/browser/out/"];

const EXTENSIONS: &[&str] = &[
    ".rs", ".js", ".mjs", ".md", ".json", ".toml", ".py", ".html", ".css", ".yaml",
];

/// Every file below `dir` (skipping build output and dependencies).
fn files(dir: &Path, out: &mut Vec<PathBuf>) {
    let Ok(entries) = std::fs::read_dir(dir) else {
        return;
    };
    for e in entries.flatten() {
        let p = e.path();
        let name = e.file_name().to_string_lossy().into_owned();
        if p.is_dir() {
            if !["target", "node_modules", ".git", "corpus", "artifacts"].contains(&name.as_str()) {
                files(&p, out);
            }
        } else {
            out.push(p);
        }
    }
}

/// Every path ARCHITECTURE.md names exists: a path with a folder relative to
/// the repository, a bare file name somewhere in it (common practice for a
/// code map; ARCHITECTURE.md names files of the section's folder bare).
#[test]
fn every_path_architecture_names_exists() {
    let md = read("ARCHITECTURE.md");
    let mut all = Vec::new();
    files(&root(), &mut all);
    let mut missing = Vec::new();
    for span in code_spans(&md) {
        let looks_like_path = !span.contains([' ', ':', '<', '*', '=', '(', '#', '|'])
            && (span.contains('/') || EXTENSIONS.iter().any(|x| span.ends_with(x)));
        if !looks_like_path || BUILD_PRODUCTS.iter().any(|b| span.starts_with(b)) {
            continue;
        }
        let found = if span.contains('/') {
            root().join(span.trim_end_matches('/')).exists()
        } else {
            all.iter()
                .any(|p| p.file_name().is_some_and(|n| n == span.as_str()))
        };
        if !found {
            missing.push(span);
        }
    }
    assert!(
        missing.is_empty(),
        "ARCHITECTURE.md names missing paths: {missing:?}"
    );
}

/// The subcommands `burnin --help` lists.
fn cli_commands() -> Vec<String> {
    let out = Command::new(env!("CARGO_BIN_EXE_burnin"))
        .arg("--help")
        .output()
        .unwrap();
    let help = String::from_utf8(out.stdout).unwrap();
    let commands: Vec<String> = help
        .lines()
        .skip_while(|l| !l.starts_with("Commands:"))
        .skip(1)
        .take_while(|l| l.starts_with("  "))
        .filter_map(|l| l.split_whitespace().next())
        .filter(|c| *c != "help")
        .map(str::to_string)
        .collect();
    assert!(commands.len() >= 8, "{help}");
    commands
}

/// Every subcommand `burnin --help` lists is named in ARCHITECTURE.md.
#[test]
fn architecture_names_every_cli_subcommand() {
    let commands = cli_commands();
    let spans = code_spans(&read("ARCHITECTURE.md"));
    for c in commands {
        assert!(spans.contains(&c), "ARCHITECTURE.md does not name `{c}`");
    }
}

/// The first fenced block of ARCHITECTURE.md: the data-flow diagram.
fn diagram() -> String {
    let md = read("ARCHITECTURE.md");
    md.split("```")
        .nth(1)
        .expect("a fenced diagram")
        .to_string()
}

/// The runner is on the data-flow diagram, and every front end runs
/// experiments through it: `burnin run` calls `Runner::run`, the page's
/// bindings plan, estimate and build each worker's lane through it, and no
/// front end calls the pieces the runner is made of (calibration, the
/// estimate's arithmetic, the shards' jobs) or decides on an estimate's
/// number or on shards itself.
#[test]
fn the_runner_is_on_the_diagram_and_every_front_end_runs_through_it() {
    let diagram = diagram();
    for name in [
        "Runner",
        "Runner::run",
        "planRun",
        "Runner::into_queue",
        "Estimate",
        "Budget",
        "Stopped",
        "Pool",
        "Clock",
        "Watch",
    ] {
        assert!(diagram.contains(name), "the diagram does not show {name}");
    }
    let runner = read("src/experiment/runner.rs");
    for item in [
        "pub trait Clock",
        "pub trait Pool",
        "pub trait Watch",
        "pub enum Budget",
        "pub enum Stopped",
        "pub fn run(",
        "pub fn lanes(",
        "pub fn into_queue(",
        "pub fn estimate_here(",
        "pub fn late_estimate(",
    ] {
        assert!(runner.contains(item), "runner.rs has no {item}");
    }
    let cli = read("src/bin/burnin/run.rs");
    for call in [
        "Runner::new(",
        ".run(&budget",
        ".estimate(",
        ".output(",
        ".shard_file(",
    ] {
        assert!(
            cli.contains(call),
            "burnin run does not call the runner's {call}"
        );
    }
    let wasm = read("src/wasm/mod.rs");
    for call in [
        "Runner::new(",
        "Runner::lanes(",
        ".estimate_here(",
        ".late_estimate(",
        ".into_queue()",
        ".allows(",
    ] {
        assert!(
            wasm.contains(call),
            "the page's bindings do not call the runner's {call}"
        );
    }
    let python = read("python/src/run.rs");
    for call in ["Runner::new(", ".run(&budget", ".output("] {
        assert!(
            python.contains(call),
            "the Python package does not call the runner's {call}"
        );
    }
    let mut front = vec![
        ("python/src/run.rs".to_string(), python),
        ("src/wasm/mod.rs".to_string(), wasm),
        ("src/native.rs".to_string(), read("src/native.rs")),
    ];
    for e in std::fs::read_dir(root().join("src/bin/burnin")).unwrap() {
        let p = e.unwrap().path();
        let rel = format!(
            "src/bin/burnin/{}",
            p.file_name().unwrap().to_string_lossy()
        );
        front.push((rel.clone(), read(&rel)));
    }
    for (file, text) in &front {
        for piece in [
            "calibrate(",
            "calibrate_keeping(",
            "calibration_run(",
            "experiment::estimate(",
            "shard_jobs(",
            "all_jobs(",
            "RunQueue::shard",
            "Calibration {",
        ] {
            assert!(
                !text.contains(piece),
                "{file} calls {piece}: that is the runner's"
            );
        }
    }
    for e in std::fs::read_dir(root().join("www")).unwrap() {
        let p = e.unwrap().path();
        if p.extension().is_none_or(|x| x != "js") {
            continue;
        }
        let text = std::fs::read_to_string(&p).unwrap();
        for decision in ["estimate.seconds", "of: workers", "shard: i,"] {
            assert!(
                !text.contains(decision),
                "{} decides for itself ({decision}): ask the core's runner",
                p.display()
            );
        }
    }
}

/// The CLI is glue: a module of its own for every subcommand `burnin
/// --help` lists, and no file of it over 300 lines.
#[test]
fn the_cli_is_a_module_per_command_and_no_file_is_long() {
    let commands = cli_commands();
    let dir = root().join("src/bin/burnin");
    for c in commands {
        assert!(
            dir.join(format!("{c}.rs")).exists(),
            "no module src/bin/burnin/{c}.rs"
        );
    }
    for e in std::fs::read_dir(&dir).unwrap() {
        let p = e.unwrap().path();
        let lines = std::fs::read_to_string(&p).unwrap().lines().count();
        assert!(lines <= 300, "{}: {lines} lines", p.display());
    }
}

/// The names the page can import from the wasm module: top-level items of
/// src/wasm/ marked `#[wasm_bindgen]`, under their JS name.
fn wasm_exports() -> Vec<String> {
    let src = read("src/wasm/mod.rs") + "\n" + &read("src/wasm/chart.rs");
    let lines: Vec<&str> = src.lines().collect();
    let mut out = Vec::new();
    for (i, l) in lines.iter().enumerate() {
        if !l.starts_with("#[wasm_bindgen") {
            continue;
        }
        if let Some(rest) = l.split("js_name = ").nth(1) {
            out.push(rest.trim_end_matches(")]").to_string());
            continue;
        }
        let item = lines[i + 1..]
            .iter()
            .find(|l| !l.starts_with("#["))
            .expect("an item after the attribute");
        let name = item
            .trim_start_matches("pub fn ")
            .trim_start_matches("pub struct ")
            .split(['(', ' ', '{'])
            .next()
            .unwrap();
        if !item.starts_with("impl") {
            out.push(name.to_string());
        }
    }
    out
}

#[test]
fn architecture_names_every_wasm_export() {
    let exports = wasm_exports();
    assert!(exports.len() >= 10, "{exports:?}");
    let spans = code_spans(&read("ARCHITECTURE.md"));
    for e in exports {
        assert!(
            spans.iter().any(|s| s == &e),
            "ARCHITECTURE.md does not name `{e}`"
        );
    }
}

/// The rows of the markdown table whose header starts with `header`.
fn table<'a>(md: &'a str, header: &str) -> Vec<Vec<&'a str>> {
    md.lines()
        .skip_while(|l| !l.starts_with(header))
        .skip(2)
        .take_while(|l| l.starts_with('|'))
        .map(|l| l.trim_matches('|').split('|').map(str::trim).collect())
        .collect()
}

/// docs/formats.md lists every generator with exactly its catalogue's
/// parameters, in catalogue order.
#[test]
fn formats_lists_the_generators_of_the_catalogue() {
    let md = read("docs/formats.md");
    let rows = table(&md, "| kind | parameters |");
    let kinds: Vec<String> = burnin::generate::GENERATORS
        .iter()
        .map(|g| format!("`{}`", g.kind))
        .collect();
    assert_eq!(rows.iter().map(|r| r[0]).collect::<Vec<_>>(), kinds);
    for (g, row) in burnin::generate::GENERATORS.iter().zip(&rows) {
        let params: Vec<String> = g.params.iter().map(|p| format!("`{}`", p.name)).collect();
        assert_eq!(row[1], params.join(", "), "{}", g.kind);
    }
}

/// docs/formats.md lists every algorithm with its parameter and default.
#[test]
fn formats_lists_the_algorithms_of_the_catalogue() {
    let md = read("docs/formats.md");
    let rows = table(&md, "| `algorithm` | parameters | source |");
    let keys: Vec<String> = burnin::learn::ALGORITHMS
        .iter()
        .map(|a| format!("`{}`", a.key))
        .collect();
    assert_eq!(rows.iter().map(|r| r[0]).collect::<Vec<_>>(), keys);
    for (a, row) in burnin::learn::ALGORITHMS.iter().zip(&rows) {
        match a.param {
            Some(p) => assert!(
                row[1].starts_with(&format!("`{}` ({})", p.key, p.default)),
                "{}: {}",
                a.key,
                row[1]
            ),
            None => assert_eq!(row[1], "—", "{}", a.key),
        }
    }
}

/// docs/formats.md's table of limits gives each constant's value as the
/// code has it, and names every limit constant of the core.
#[test]
fn formats_lists_every_limit_with_its_value() {
    use burnin::experiment as e;
    use burnin::model::limits as m;
    let md = read("docs/formats.md");
    let rows = table(&md, "| what | limit | constant |");
    let consts: [(&str, u64); 25] = [
        ("MAX_FILE_BYTES", m::MAX_FILE_BYTES as u64),
        ("MAX_STATES", m::MAX_STATES as u64),
        ("MAX_ACTIONS", m::MAX_ACTIONS as u64),
        ("MAX_HORIZON", m::MAX_HORIZON as u64),
        ("MAX_CELLS", m::MAX_CELLS as u64),
        ("MAX_ENTRIES", m::MAX_ENTRIES as u64),
        ("MAX_LABEL_CHARS", m::MAX_LABEL_CHARS as u64),
        ("MAX_NAME_CHARS", m::MAX_NAME_CHARS as u64),
        ("MAX_NOTES_CHARS", m::MAX_NOTES_CHARS as u64),
        ("MAX_PATH_CHARS", e::MAX_PATH_CHARS as u64),
        ("MAX_LEARNERS", e::MAX_LEARNERS as u64),
        ("MAX_GUEST_NAME", e::MAX_GUEST_NAME as u64),
        ("MAX_EPS_TARGETS", e::MAX_EPS_TARGETS as u64),
        ("MAX_EPISODES", e::MAX_EPISODES),
        ("MAX_SEEDS", e::MAX_SEEDS),
        ("MAX_CHECKPOINTS", e::MAX_CHECKPOINTS),
        ("MAX_SEED", e::MAX_SEED),
        ("MAX_SWEEP_VALUES", e::MAX_SWEEP_VALUES as u64),
        ("BOUNDED_ITEMS", burnin::format::BOUNDED_ITEMS as u64),
        ("MAX_SHARDS", e::MAX_SHARDS as u64),
        ("MAX_BATCH", burnin::learn::MAX_BATCH),
        ("MAX_BATCH_STEPS", burnin::learn::MAX_BATCH_STEPS),
        ("MAX_SEED_CURVE_VALUES", e::MAX_SEED_CURVE_VALUES as u64),
        ("MAX_REPORTED_PROBLEMS", m::MAX_REPORTED_PROBLEMS as u64),
        (
            "MAX_PROBLEM_CHARS",
            burnin::format::problems::MAX_PROBLEM_CHARS as u64,
        ),
    ];
    for (name, value) in consts {
        let row = rows
            .iter()
            .find(|r| r.get(2) == Some(&format!("`{name}`").as_str()))
            .unwrap_or_else(|| panic!("formats.md's limits table has no row for {name}"));
        let shown: String = row[1]
            .chars()
            .take_while(|c| c.is_ascii_digit() || *c == ' ')
            .filter(char::is_ascii_digit)
            .collect();
        assert_eq!(shown, value.to_string(), "{name}: {}", row[1]);
    }
    let magnitude = rows
        .iter()
        .find(|r| r.get(2) == Some(&"`MAX_MAGNITUDE`"))
        .expect("a row for MAX_MAGNITUDE");
    assert_eq!(magnitude[1], format!("{:e}", m::MAX_MAGNITUDE));
    assert_eq!(
        rows.len(),
        consts.len() + 2,
        "one row per constant, MAX_MAGNITUDE and the JSON depth"
    );
}

/// The example publishing workflow is YAML, and builds the site the way the
/// README says (`cargo xtask dist`) and publishes that folder.
#[test]
fn the_publishing_example_builds_the_site_with_xtask_dist() {
    let text = read("docs/publish-pages.example.yml");
    let v: serde_yaml::Value = serde_yaml::from_str(&text).expect("valid YAML");
    let steps = v["jobs"]["build"]["steps"]
        .as_sequence()
        .expect("build steps");
    let runs: Vec<&str> = steps.iter().filter_map(|s| s["run"].as_str()).collect();
    assert!(runs.contains(&"cargo xtask dist site"), "{runs:?}");
    assert!(
        steps.iter().any(|s| s["with"]["path"] == "site"),
        "publishes the folder it built"
    );
    assert!(read("README.md").contains("cargo xtask dist site/"));
}

/// xtask (which has no dependency on the core) restates the research-scale
/// workload's episode count and time cap for BENCHMARKS.md's words; they
/// must be the core's.
#[test]
fn the_bench_report_states_the_cores_research_workload() {
    let xtask = read("xtask/src/bench.rs");
    let find = |name: &str| -> String {
        let line = xtask
            .lines()
            .find(|l| l.starts_with(&format!("const {name}:")))
            .unwrap_or_else(|| panic!("{name} in xtask/src/bench.rs"));
        line.split('=')
            .nth(1)
            .unwrap()
            .trim()
            .trim_end_matches(';')
            .replace('_', "")
    };
    assert_eq!(
        find("RESEARCH_EPISODES").parse::<u64>().unwrap(),
        burnin::bench::RESEARCH_EPISODES
    );
    assert_eq!(
        find("RESEARCH_SECONDS").parse::<f64>().unwrap(),
        burnin::bench::RESEARCH_SECONDS
    );
}

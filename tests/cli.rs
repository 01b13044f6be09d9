//! The `burnin` binary: exit codes, messages and outputs, run as a user would.

mod common;

use serde_json::json;
use std::path::{Path, PathBuf};
use std::process::Command;

use common::{Scratch, burnin, p};

#[test]
fn every_demo_model_validates_and_solves() {
    let demos = common::demo_files();
    assert!(demos.len() >= 4, "at least four demo models");
    for f in demos {
        let v = burnin(&["validate", p(&f)]);
        assert_eq!(v.code, 0, "{}: {}", f.display(), v.stderr);
        assert!(v.stdout.starts_with("ok: "), "{}", v.stdout);
        let s = burnin(&["solve", "--json", p(&f)]);
        assert_eq!(s.code, 0);
        let j: serde_json::Value = serde_json::from_str(&s.stdout).unwrap();
        let m = burnin::parse_model(&std::fs::read_to_string(&f).unwrap()).unwrap();
        let sol = burnin::solve::solve(&m);
        assert_eq!(j["optimal_value"].as_f64().unwrap(), sol.optimal_value);
        assert_eq!(j["v"].as_array().unwrap().len(), m.horizon());
        assert_eq!(j["q"][0].as_array().unwrap().len(), m.n_states());
        assert_eq!(j["q"][0][0].as_array().unwrap().len(), m.n_actions());
        assert_eq!(j["policy"][0].as_array().unwrap().len(), m.n_states());
        assert!(
            m.notes().is_some_and(|n| !n.is_empty()),
            "demo models carry a description"
        );
        // Canonical layout: canon changes nothing.
        let t = burnin(&["canon", p(&f)]);
        assert_eq!(
            t.stdout,
            std::fs::read_to_string(&f).unwrap(),
            "{} is in the canonical layout",
            f.display()
        );
        // The old name still works for one release, and says it is old.
        let old = burnin(&["tidy", p(&f)]);
        assert_eq!(old.stdout, t.stdout);
        assert!(old.stderr.contains("`burnin tidy` is now `burnin canon`"));
    }
}

#[test]
fn the_demo_index_lists_every_demo_model_and_opens_one() {
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-models");
    let index: serde_json::Value =
        serde_json::from_str(&std::fs::read_to_string(dir.join("index.json")).unwrap()).unwrap();
    let mut listed: Vec<String> = index["models"]
        .as_array()
        .unwrap()
        .iter()
        .map(|v| v.as_str().unwrap().to_owned())
        .collect();
    assert!(listed.contains(&index["default"].as_str().unwrap().to_owned()));
    listed.sort();
    let mut files: Vec<String> = common::demo_files()
        .iter()
        .map(|p| p.file_name().unwrap().to_string_lossy().into_owned())
        .collect();
    files.sort();
    assert_eq!(listed, files);
    // The demo experiments the page offers hold their model inline (the
    // page reads no model_path) and read as they are.
    for f in index["experiments"].as_array().unwrap() {
        let text =
            std::fs::read_to_string(dir.join("experiments").join(f.as_str().unwrap())).unwrap();
        burnin::experiment::parse_experiment(&text, None).unwrap_or_else(|e| panic!("{f}: {e}"));
    }
}

#[test]
fn validate_prints_a_summary_line() {
    let demo = common::demo_files()
        .into_iter()
        .find(|f| f.ends_with("seed-trial.json"))
        .unwrap();
    let r = burnin(&["validate", p(&demo)]);
    assert_eq!(
        r.stdout,
        "ok: \"Seed trial\": S=1 A=6 H=1, 1 step table (stationary), 6 transition entries\n"
    );
}

#[test]
fn invalid_files_exit_1_with_one_line_per_problem() {
    let d = Scratch::new("invalid");
    let f = d.file(
        "bad.json",
        r#"{"format": "burnin-model", "version": 1, "horizon": 2,
            "states": ["a", "b"], "actions": ["x"], "start": [0.5, 0.4],
            "steps": [{"transitions": [[[[0, 0.97]]], [[[5, 1.0]]]], "rewards": [[0.5], [2]]}]}"#,
    );
    let r = burnin(&["validate", p(&f)]);
    assert_eq!(r.code, 1);
    assert_eq!(
        r.stderr,
        "start: probabilities sum to 0.9000, expected 1\n\
         steps[0].transitions[0][0]: probabilities sum to 0.9700, expected 1\n\
         steps[0].transitions[1][0][0][0]: state index 5 is out of range (S = 2, indices 0..1)\n"
    );
    assert_eq!(burnin(&["solve", p(&f)]).code, 1);
    let g = d.file("garbage.json", "\u{1}not json");
    let r = burnin(&["solve", "--json", p(&g)]);
    assert_eq!(r.code, 1);
    assert!(
        r.stderr.starts_with("not valid JSON: line 1, column 1:"),
        "{}",
        r.stderr
    );
    let bin = d.0.join("bytes.json");
    std::fs::write(&bin, [0xff, 0xfe, 0x00]).unwrap();
    let r = burnin(&["validate", p(&bin)]);
    assert_eq!(r.code, 1);
    assert!(r.stderr.contains("not UTF-8 text"), "{}", r.stderr);
}

#[test]
fn usage_and_unreadable_files_exit_2() {
    assert_eq!(burnin(&[]).code, 2);
    assert_eq!(burnin(&["solve"]).code, 2);
    assert_eq!(burnin(&["frobnicate"]).code, 2);
    let r = burnin(&["validate", "/nonexistent/model.json"]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr
            .starts_with("burnin: cannot read /nonexistent/model.json:")
    );
    assert_eq!(burnin(&["--help"]).code, 0);
}

#[test]
fn solve_prints_a_readable_table() {
    let demo = common::demo_files()
        .into_iter()
        .find(|f| f.ends_with("seed-trial.json"))
        .unwrap();
    let r = burnin(&["solve", p(&demo)]);
    assert_eq!(r.code, 0);
    let lines: Vec<&str> = r.stdout.lines().collect();
    assert_eq!(lines[1], "optimal value  0.550000");
    assert!(lines[3].contains("best action"));
    // One row: step 1, the single state, V* = 0.55, best arm fen millet.
    assert!(lines[4].starts_with("   1  plot"));
    assert!(lines[4].contains("0.550000  fen millet"));
}

/// Every generator of the catalogue gives the same model from `burnin
/// generate KIND` as from a file's generator object with the same
/// parameters, at the defaults and with each numeric parameter moved off its
/// default (the catalogue is the one home of names and defaults; derived
/// from its definition).
#[test]
fn every_generator_gives_the_same_model_from_the_cli_and_from_a_generator_object() {
    use burnin::generate::{GENERATORS, GeneratorSpec, ParamKind};
    for g in GENERATORS {
        let mut cases: Vec<(Vec<String>, serde_json::Value)> =
            vec![(vec![], json!({"kind": g.kind, "seed": 5}))];
        for p in g.params.iter().filter(|p| p.sweepable()) {
            // A value inside the parameter's own range, other than the default.
            let whole = matches!(p.kind, ParamKind::Whole | ParamKind::OptionalWhole);
            let x = match p.kind {
                _ if whole && p.default + 1.0 <= p.max => p.default + 1.0,
                _ if whole => p.default - 1.0,
                _ => (p.default + p.max) / 2.0,
            };
            let opt = format!("--{}", p.name.replace('_', "-"));
            let text = if whole {
                format!("{}", x as u64)
            } else {
                format!("{x}")
            };
            let mut obj = json!({"kind": g.kind, "seed": 5});
            obj[p.name] = if whole { json!(x as u64) } else { json!(x) };
            cases.push((vec![opt, text], obj));
        }
        for (args, obj) in cases {
            let spec = GeneratorSpec::from_json(&obj, "generator");
            let mut a: Vec<&str> = vec!["generate", g.kind];
            a.extend(args.iter().map(String::as_str));
            a.extend(["--seed", "5"]);
            let r = burnin(&a);
            match spec.and_then(|s| s.generate("generator")) {
                Ok(m) => {
                    assert_eq!(r.code, 0, "{a:?}: {}", r.stderr);
                    assert_eq!(r.stdout, burnin::write_model(&m), "{a:?}");
                }
                // A value the generator refuses with the others at their
                // defaults is refused by both.
                Err(_) => assert_eq!(r.code, 1, "{a:?}: {}", r.stdout),
            }
        }
    }
}

#[test]
fn generate_lists_its_kinds_and_every_kind_writes_a_valid_model() {
    let help = burnin(&["generate", "--help"]);
    assert_eq!(help.code, 0);
    for kind in [
        "random",
        "river",
        "drift-grid",
        "lock",
        "lower-bound",
        "bandit",
    ] {
        assert!(help.stdout.contains(kind), "help lists {kind}");
    }
    let d = Scratch::new("generate");
    let cases: &[&[&str]] = &[
        &[
            "random",
            "--states",
            "8",
            "--successors",
            "2",
            "--time-dependent",
        ],
        &["river", "--states", "4"],
        &[
            "drift-grid",
            "--width",
            "3",
            "--height",
            "2",
            "--slip",
            "0.2",
        ],
        &["lock", "--horizon", "4", "--time-dependent"],
        &["lower-bound", "--depth", "1", "--horizon", "8"],
        &["bandit", "--means", "0.1,0.9"],
    ];
    for args in cases {
        let out = d.0.join(format!("{}.json", args[0]));
        let mut a = vec!["generate"];
        a.extend_from_slice(args);
        a.extend_from_slice(&["--seed", "4", "--output", p(&out)]);
        let r = burnin(&a);
        assert_eq!(r.code, 0, "{args:?}: {}", r.stderr);
        assert_eq!(burnin(&["validate", p(&out)]).code, 0, "{args:?}");
        // Same seed, same file on stdout.
        let mut b = vec!["generate"];
        b.extend_from_slice(args);
        b.extend_from_slice(&["--seed", "4"]);
        assert_eq!(burnin(&b).stdout, std::fs::read_to_string(&out).unwrap());
    }
    let r = burnin(&["generate", "bandit", "--means", "0.1,0.9"]);
    assert_eq!(
        serde_json::from_str::<serde_json::Value>(&r.stdout).unwrap()["actions"],
        serde_json::json!(["arm 0", "arm 1"])
    );
}

#[test]
fn bad_generator_parameters_name_the_option() {
    let r = burnin(&["generate", "random", "--states", "3", "--successors", "5"]);
    assert_eq!(r.code, 1);
    assert_eq!(r.stderr, "--successors: 5 is outside 1..=3\n");
    let r = burnin(&["generate", "river", "--p-forward", "0.8", "--p-back", "0.5"]);
    assert_eq!(r.stderr, "--p-back: p_forward + p_back must be at most 1\n");
    assert_eq!(burnin(&["generate", "grid", "--width", "two"]).code, 2);
    // The drift grid's old name still works for one release.
    let old = burnin(&["generate", "grid", "--width", "3"]);
    assert_eq!(old.code, 0, "{}", old.stderr);
    assert_eq!(
        old.stdout,
        burnin(&["generate", "drift-grid", "--width", "3"]).stdout
    );
}

#[test]
fn standard_input_is_read_for_dash() {
    let demo = &common::demo_files()[0];
    let out = Command::new(env!("CARGO_BIN_EXE_burnin"))
        .args(["validate", "-"])
        .stdin(std::fs::File::open(demo).unwrap())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0));
}

/// No input, however broken, makes the reader panic: every prefix of a demo
/// file, and the file with each of many bytes replaced, reads to Ok or to
/// problems (common practice: truncation and byte-flip mutation).
#[test]
fn broken_files_never_panic() {
    let text = std::fs::read_to_string(
        common::demo_files()
            .into_iter()
            .find(|f| f.ends_with("night-ferry.json"))
            .unwrap(),
    )
    .unwrap();
    let bytes = text.as_bytes();
    for cut in 0..text.trim_end().len() {
        if let Ok(s) = std::str::from_utf8(&bytes[..cut]) {
            assert!(
                burnin::parse_model(s).is_err(),
                "a strict prefix is never a whole model"
            );
        }
    }
    let subs = [
        b'0', b'9', b'-', b'[', b']', b'{', b'}', b',', b'"', b'e', b'.', b' ',
    ];
    let mut changed = 0;
    for (i, _) in bytes.iter().enumerate().step_by(3) {
        for &c in &subs {
            let mut b = bytes.to_vec();
            b[i] = c;
            if let Ok(s) = std::str::from_utf8(&b) {
                let _ = burnin::parse_model(s).map(|m| burnin::solve::solve(&m));
                changed += 1;
            }
        }
    }
    assert!(changed > 10_000);
}

fn experiment_file(d: &Scratch, learners: &str, episodes: u64) -> PathBuf {
    d.demo("night-ferry.json", "night-ferry.json");
    d.file(
        "exp.json",
        &format!(
            r#"{{"format": "burnin-experiment", "version": 1, "model_path": "night-ferry.json",
                "episodes": {episodes}, "seeds": 3, "seed": 5, "learners": {learners}}}"#
        ),
    )
}

#[test]
fn run_gives_identical_results_for_any_thread_count() {
    let d = Scratch::new("run-threads");
    let f = experiment_file(
        &d,
        r#"[{"algorithm": "mvp", "bonus_scale": 0.01}, {"algorithm": "psrl"},
            {"algorithm": "q-ucb-hoeffding", "bonus_scale": 0.05}, {"algorithm": "uniform"}]"#,
        400,
    );
    let one = burnin(&["run", "--json", "--threads", "1", p(&f)]);
    assert_eq!(one.code, 0, "{}", one.stderr);
    let two = burnin(&["run", "--json", "--threads", "2", p(&f)]);
    assert_eq!(one.stdout, two.stdout);
    let again = burnin(&["run", "--json", p(&f)]);
    assert_eq!(one.stdout, again.stdout);
    let r: serde_json::Value = serde_json::from_str(&one.stdout).unwrap();
    assert_eq!(r["format"], "burnin-results");
    assert_eq!(r["learners"].as_array().unwrap().len(), 4);
    assert_eq!(
        r["learners"][0]["final_regret"].as_array().unwrap().len(),
        3
    );
    assert_eq!(
        *r["learners"][0]["checkpoints"]
            .as_array()
            .unwrap()
            .last()
            .unwrap(),
        400
    );
    // Progress went to stderr, never to stdout.
    assert!(
        one.stderr.contains("100% (4800/4800 episodes"),
        "{}",
        one.stderr
    );
}

#[test]
fn run_prints_a_table_and_writes_csv() {
    let d = Scratch::new("run-csv");
    let f = experiment_file(
        &d,
        r#"[{"algorithm": "uniform", "label": "coin, flips"}]"#,
        50,
    );
    let csv = d.0.join("out.csv");
    let r = burnin(&["run", "--csv", p(&csv), p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert!(r.stdout.contains("regret at K"));
    assert!(r.stdout.lines().any(|l| l.starts_with("coin, flips")));
    let text = std::fs::read_to_string(&csv).unwrap();
    let mut lines = text.lines();
    assert_eq!(
        lines.next().unwrap(),
        "learner,algorithm,episode,regret_mean,regret_lo,regret_hi,episode_regret_mean,cumulative_return_mean,bound,bound_applies,lower_bound,certificate_mean"
    );
    let first = lines.next().unwrap();
    assert!(first.starts_with("\"coin, flips\",uniform,1,"), "{first}");
    // Every seed's curve: the uniform learner's regret is the same exact
    // amount every episode, so each seed's row at K is K times episode 1's.
    let seeds = d.0.join("seeds.csv");
    let r = burnin(&["run", "--seeds-csv", p(&seeds), p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let text = std::fs::read_to_string(&seeds).unwrap();
    let rows: Vec<Vec<&str>> = text
        .lines()
        .skip(1)
        .map(|l| l.rsplitn(5, ',').collect())
        .collect();
    assert_eq!(
        text.lines().next().unwrap(),
        "learner,algorithm,seed_index,run_seed,episode,regret"
    );
    let per_seed = rows.len() / 3;
    assert_eq!(
        rows.len(),
        3 * per_seed,
        "three seeds, the same checkpoints"
    );
    let (r1, rk): (f64, f64) = (
        rows[0][0].parse().unwrap(),
        rows[per_seed - 1][0].parse().unwrap(),
    );
    assert_eq!(rows[per_seed - 1][1], "50");
    assert!((rk - 50.0 * r1).abs() <= 1e-9 * rk, "{r1} {rk}");
}

#[test]
fn run_reports_bad_experiments_with_exit_1() {
    let d = Scratch::new("run-bad");
    let f = experiment_file(&d, r#"[{"algorithm": "mvp", "bonus_scale": -1}]"#, 10);
    let r = burnin(&["run", p(&f)]);
    assert_eq!(r.code, 1);
    assert_eq!(
        r.stderr,
        "learners[0].bonus_scale: expected a bonus scale > 0, found -1\n"
    );
    let missing = d.file(
        "exp2.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "nope.json",
            "episodes": 10, "learners": [{"algorithm": "uniform"}]}"#,
    );
    let r = burnin(&["run", p(&missing)]);
    assert_eq!(r.code, 1);
    assert!(
        r.stderr.starts_with("model_path: cannot read "),
        "{}",
        r.stderr
    );
}

#[test]
fn run_sweeps_a_generator_parameter() {
    let d = Scratch::new("run-sweep");
    let f = d.file(
        "sweep.json",
        r#"{"format": "burnin-experiment", "version": 1,
            "generator": {"kind": "lock", "horizon": 3, "actions": 2, "seed": 2},
            "episodes": 200, "seeds": 2, "sweep": {"parameter": "horizon", "values": [2, 3, 4]},
            "learners": [{"algorithm": "uniform"}]}"#,
    );
    let r = burnin(&["run", "--json", p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let j: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    assert_eq!(j["format"], "burnin-sweep");
    assert_eq!(j["parameter"], "horizon");
    // derived by hand: a uniform guesser opens a lock of length H with
    // probability 2^(−H), so its regret over K episodes is K·(1 − 2^(−H)).
    let regret = j["learners"][0]["regret_mean"].as_array().unwrap();
    for (h, x) in [2, 3, 4].iter().zip(regret) {
        let want = 200.0 * (1.0 - 0.5f64.powi(*h));
        assert!((x.as_f64().unwrap() - want).abs() < 1e-9, "H = {h}");
    }
    let t = burnin(&["run", p(&f)]);
    assert!(
        t.stdout.starts_with("regret at K against horizon"),
        "{}",
        t.stdout
    );
}

/// An experiment run as N shards and merged gives exactly what one run gives
/// (the same bytes), for a sweep with a model named by path.
#[test]
fn merged_shards_equal_a_single_run() {
    let d = Scratch::new("shards");
    d.demo("night-ferry.json", "ferry.json");
    let f = d.file(
        "exp.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "ferry.json",
            "episodes": 200, "seeds": 3, "seed": 9,
            "sweep": {"parameter": "bonus_scale", "values": [0.01, 0.1]},
            "learners": [{"algorithm": "mvp"}, {"algorithm": "psrl"}, {"algorithm": "q-ucb-hoeffding"}]}"#,
    );
    let whole = burnin(&["run", "--json", p(&f)]);
    assert_eq!(whole.code, 0, "{}", whole.stderr);
    let mut shard_files = Vec::new();
    for i in 1..=4 {
        let r = burnin(&["run", "--shard", &format!("{i}/4"), "--threads", "1", p(&f)]);
        assert_eq!(r.code, 0, "{}", r.stderr);
        // Shards are portable: the model travels inside, not by path.
        shard_files.push(d.file(&format!("s{i}.json"), &r.stdout));
    }
    std::fs::remove_file(d.0.join("ferry.json")).unwrap();
    let mut args = vec!["merge", "--json"];
    // Any order.
    for s in shard_files.iter().rev() {
        args.push(p(s));
    }
    let merged = burnin(&args);
    assert_eq!(merged.code, 0, "{}", merged.stderr);
    assert_eq!(merged.stdout, whole.stdout);
    // With shared draws too: every record's seed is the shared one, and
    // the merge checks it against the same rule the runs used.
    d.demo("night-ferry.json", "ferry.json");
    let shared = d.file(
        "shared.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "ferry.json",
            "episodes": 200, "seeds": 3, "seed": 9, "shared_draws": true,
            "learners": [{"algorithm": "mvp", "bonus_scale": 0.01}, {"algorithm": "psrl"}]}"#,
    );
    let whole_shared = burnin(&["run", "--json", p(&shared)]);
    assert_eq!(whole_shared.code, 0, "{}", whole_shared.stderr);
    let parts: Vec<_> = (1..=2)
        .map(|i| {
            let r = burnin(&["run", "--shard", &format!("{i}/2"), p(&shared)]);
            assert_eq!(r.code, 0, "{}", r.stderr);
            d.file(&format!("shared{i}.json"), &r.stdout)
        })
        .collect();
    let merged = burnin(&["merge", "--json", p(&parts[0]), p(&parts[1])]);
    assert_eq!(merged.code, 0, "{}", merged.stderr);
    assert_eq!(merged.stdout, whole_shared.stdout);
    std::fs::remove_file(d.0.join("ferry.json")).unwrap();

    let r = burnin(&[
        "merge",
        p(&shard_files[0]),
        p(&shard_files[2]),
        p(&shard_files[3]),
    ]);
    assert_eq!(r.code, 1);
    assert_eq!(r.stderr, "missing shard 2 of 4\n");
    let r = burnin(&["merge", p(&shard_files[0]), p(&shard_files[0])]);
    assert!(
        r.stderr.contains("shard 1 was already given as"),
        "{}",
        r.stderr
    );
    assert_eq!(burnin(&["run", "--shard", "0/4", p(&f)]).code, 2);
    let other = d.file(
        "other.json",
        &burnin(&[
            "run",
            "--shard",
            "2/3",
            p(&experiment_file(&d, r#"[{"algorithm": "uniform"}]"#, 10)),
        ])
        .stdout,
    );
    let r = burnin(&["merge", p(&shard_files[0]), p(&other)]);
    assert!(
        r.stderr.contains("is a shard of another experiment"),
        "{}",
        r.stderr
    );
}

/// The bad-input corpus (tests/bad-inputs, written by make_corpus.py with the
/// expected lines by hand): every file exits 1 with exactly its expected
/// problem lines — `validate` for models, `run` for experiments, `merge`
/// for shards (tests/merge.rs edits real shards for the rest of class 1).
#[test]
fn every_bad_input_in_the_corpus_gets_its_message() {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/bad-inputs");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "json"))
        .collect();
    files.sort();
    assert!(
        files.len() >= 40,
        "at least 40 bad inputs, found {}",
        files.len()
    );
    for f in &files {
        let name = f.file_name().unwrap().to_str().unwrap();
        let cmd = if name.starts_with("experiment-") {
            "run"
        } else if name.starts_with("shard-") {
            "merge"
        } else {
            "validate"
        };
        // Relative to the working folder, as messages that name the file show it.
        let r = burnin(&[cmd, &format!("tests/bad-inputs/{name}")]);
        let want = std::fs::read_to_string(f.with_extension("expected")).unwrap();
        assert_eq!(r.code, 1, "{name}: exit code");
        assert_eq!(r.stderr, want, "{name}");
        assert!(r.stdout.is_empty(), "{name}: nothing on stdout");
    }
}

/// One seed is not an interval: the CLI warns before running, the table
/// says "n/a (one seed)" instead of a zero-width interval, and a file
/// without `seeds` runs the default eight (common practice: a Student-t
/// interval needs n ≥ 2; eight keep its t quantile, 2.365, near the normal's).
#[test]
fn one_seed_is_not_an_interval() {
    let d = Scratch::new("run-one-seed");
    d.demo("night-ferry.json", "night-ferry.json");
    let exp = |seeds: &str| {
        format!(
            r#"{{"format": "burnin-experiment", "version": 1, "model_path": "night-ferry.json",
                "episodes": 30, {seeds} "learners": [{{"algorithm": "uniform"}}]}}"#
        )
    };
    let one = d.file("one.json", &exp(r#""seeds": 1,"#));
    let r = burnin(&["run", p(&one)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert!(
        r.stderr
            .starts_with("warning: 1 seed per learner gives no 95% interval"),
        "{}",
        r.stderr
    );
    let row = r.stdout.lines().find(|l| l.starts_with("uniform")).unwrap();
    assert!(row.contains("n/a (one seed)"), "{row}");
    let default = d.file("default.json", &exp(""));
    let r = burnin(&["run", "--json", p(&default)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert!(!r.stderr.contains("warning"), "{}", r.stderr);
    let v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    assert_eq!(v["seeds"], 8);
    assert_eq!(
        v["learners"][0]["final_regret"].as_array().unwrap().len(),
        8
    );
}

/// The table ends with one verdict line per compared pair, the core's
/// (results.rs `verdict`), and the JSON carries the comparisons.
#[test]
fn run_prints_a_paired_verdict_per_pair() {
    let d = Scratch::new("run-compare");
    let f = experiment_file(
        &d,
        r#"[{"algorithm": "uniform"}, {"algorithm": "eps-greedy", "epsilon": 0.2}]"#,
        200,
    );
    let r = burnin(&["run", p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let j = burnin(&["run", "--json", p(&f)]);
    let v: serde_json::Value = serde_json::from_str(&j.stdout).unwrap();
    let verdict = v["comparisons"][0]["verdict"].as_str().unwrap();
    assert!(verdict.starts_with("uniform "), "{verdict}");
    assert!(
        r.stdout.contains("paired comparisons at K")
            && r.stdout.contains(&format!("  {verdict}\n")),
        "{}",
        r.stdout
    );
}

/// Output safety (#11): a table that cannot be written does not lose the
/// results; a table path that is the experiment file is refused before
/// anything runs; control characters in labels never reach the terminal.
#[test]
fn outputs_fail_safely() {
    let d = Scratch::new("output-safety");
    let f = experiment_file(
        &d,
        r#"[{"algorithm": "uniform", "label": "\u001b[31mred"}]"#,
        20,
    );
    // A directory cannot be written as a file: refused before running (#35).
    let r = burnin(&["run", "--csv", p(&d.0), p(&f)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(r.stdout.is_empty(), "nothing ran: {}", r.stdout);
    assert!(r.stderr.contains("that is a folder"), "{}", r.stderr);
    let r = burnin(&["run", p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    // Escapes, not terminal control sequences.
    assert!(!r.stdout.contains('\u{1b}'), "no raw escape character");
    assert!(r.stdout.contains("\\u{1b}[31mred"), "{}", r.stdout);
    // The experiment file as a table path: refused, the file untouched.
    let before = std::fs::read_to_string(&f).unwrap();
    let r = burnin(&["run", "--seeds-csv", p(&f), p(&f)]);
    assert_eq!(r.code, 2);
    assert!(
        r.stderr.contains("--seeds-csv") && r.stderr.contains("is an input file"),
        "{}",
        r.stderr
    );
    assert!(r.stdout.is_empty());
    assert_eq!(std::fs::read_to_string(&f).unwrap(), before);
    // The model file the experiment names, too.
    let model = d.0.join("night-ferry.json");
    let before = std::fs::read_to_string(&model).unwrap();
    let r = burnin(&["run", "--csv", p(&model), p(&f)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(
        r.stderr.contains("--csv") && r.stderr.contains("is an input file"),
        "{}",
        r.stderr
    );
    assert_eq!(std::fs::read_to_string(&model).unwrap(), before);
}

/// A closed standard output is an error, not a silent success (#11,
/// class 9): `>&-` is refused before anything runs, and a pipe closed
/// before the output was written exits 2 saying the output is incomplete,
/// while the CSV tables asked for are still written. A redirection to
/// /dev/null is what the user asked for, and succeeds.
#[cfg(target_os = "linux")]
#[test]
fn a_closed_standard_output_is_an_error() {
    let d = Scratch::new("closed-stdout");
    let f = experiment_file(
        &d,
        r#"[{"algorithm": "uniform"}, {"algorithm": "mvp"}]"#,
        40,
    );
    let bin = env!("CARGO_BIN_EXE_burnin");
    let sh = |script: &str| {
        let out = Command::new("bash").arg("-c").arg(script).output().unwrap();
        (
            String::from_utf8_lossy(&out.stdout).into_owned(),
            String::from_utf8_lossy(&out.stderr).into_owned(),
        )
    };
    let (out, err) = sh(&format!("{bin} run {} >&-; echo \"exit $?\"", p(&f)));
    assert_eq!(out, "exit 2\n", "{err}");
    assert!(err.contains("standard output is closed"), "{err}");
    let (out, err) = sh(&format!(
        "{bin} run {} > /dev/null; echo \"exit $?\"",
        p(&f)
    ));
    assert_eq!(out, "exit 0\n", "{err}");
    // A reader that is gone before the output is written (the writer
    // starts half a second after the reader has closed its end, so a busy
    // machine cannot let the output slip into the pipe first).
    let csv = d.0.join("curves.csv");
    let (out, err) = sh(&format!(
        "(sleep 0.5; exec {bin} run --json --csv {} {}) | (exec 0<&-); echo \"exit ${{PIPESTATUS[0]}}\"",
        p(&csv),
        p(&f)
    ));
    assert_eq!(out, "exit 2\n", "{err}");
    assert!(err.contains("cannot write to standard output"), "{err}");
    assert!(err.contains("the tables were written to"), "{err}");
    assert!(
        std::fs::read_to_string(&csv)
            .unwrap()
            .starts_with("learner,algorithm,")
    );
}

/// A model_path is read under the same size limit as any file (#11): a
/// device that never ends is refused, not read until memory runs out.
#[cfg(target_os = "linux")]
#[test]
fn model_path_reads_are_bounded() {
    let d = Scratch::new("model-path-limit");
    let f = d.file(
        "e.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "/dev/zero", "episodes": 10, "learners": [{"algorithm": "uniform"}]}"#,
    );
    let r = burnin(&["run", p(&f)]);
    assert_eq!(r.code, 1, "{}", r.stderr);
    // Refused before reading at all, as not a regular file (#35).
    assert!(
        r.stderr
            .contains("model_path: /dev/zero: not a regular file; name a model file"),
        "{}",
        r.stderr
    );
}

/// `burnin --version` names the build as results files record it (#16): the
/// crate's version and a digest of the core's source.
#[test]
fn the_version_names_the_build_that_results_record() {
    let r = burnin(&["--version"]);
    assert_eq!(r.code, 0);
    let build = r.stdout.trim().strip_prefix("burnin ").unwrap().to_owned();
    let (version, digest) = build.split_once('+').expect("VERSION+DIGEST");
    assert_eq!(version, env!("CARGO_PKG_VERSION"));
    assert!(
        digest.len() == 8 && digest.chars().all(|c| c.is_ascii_hexdigit()),
        "{digest}"
    );
    assert_eq!(build, burnin::BUILD);
    let d = Scratch::new("build-id");
    let f = experiment_file(&d, r#"[{"algorithm": "uniform"}]"#, 10);
    let out = burnin(&["run", "--json", p(&f)]);
    let v: serde_json::Value = serde_json::from_str(&out.stdout).unwrap();
    assert_eq!(v["build"], build.as_str());
}

/// `burnin run` times each learner's first run while its other threads
/// start on the rest, and continues the timed runs rather than starting
/// them again: the results (every learner, seed and sweep point, 1 and 2
/// threads) are the bytes of a run that skips the estimate (`--no-budget`),
/// the build stamp aside. Same file and seed, same numbers: the project's
/// reproducibility rule.
#[test]
fn timing_a_run_before_it_goes_on_changes_none_of_its_numbers() {
    let d = Scratch::new("calibrated");
    let f = d.file(
        "sweep.json",
        r#"{"format": "burnin-experiment", "version": 1, "episodes": 3000, "seeds": 3, "seed": 9,
            "generator": {"kind": "random", "states": 6, "actions": 3, "successors": 3, "horizon": 5},
            "sweep": {"parameter": "states", "values": [4, 8]},
            "learners": [{"algorithm": "mvp"}, {"algorithm": "ucbvi-hoeffding"}, {"algorithm": "q-ucb-hoeffding"}]}"#,
    );
    let strip = |s: &str| -> serde_json::Value {
        let mut v: serde_json::Value = serde_json::from_str(s).unwrap();
        v["build"] = serde_json::Value::Null;
        v
    };
    let plain = burnin(&["run", "--json", "--no-budget", "--threads", "1", p(&f)]);
    assert_eq!(plain.code, 0, "{}", plain.stderr);
    let plain = strip(&plain.stdout);
    for threads in ["1", "2"] {
        let r = burnin(&[
            "run",
            "--json",
            "--budget",
            "60",
            "--threads",
            threads,
            p(&f),
        ]);
        assert_eq!(r.code, 0, "{}", r.stderr);
        assert_eq!(strip(&r.stdout), plain, "{threads} threads");
    }
}

/// `burnin table` (#31): the comparison table of a results file as
/// Markdown (the default), LaTeX or CSV — the core's text, so the page's
/// export is the same — to standard output or a file, whose extension
/// names the format when `--format` is not given; an unknown format, a
/// missing file, a file that is not results, an output that is the
/// results file, and an extension naming another format are refused.
#[test]
fn table_writes_the_comparison_table_in_three_formats() {
    let d = Scratch::new("table");
    let f = experiment_file(
        &d,
        r#"[{"algorithm": "ucbvi-bernstein"}, {"algorithm": "uniform", "label": "coin & 50%"}]"#,
        200,
    );
    let r = burnin(&["run", "--json", p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let results = d.file("results.json", &r.stdout);
    let out = burnin::experiment::parse_results(&r.stdout).unwrap();
    use burnin::experiment::TableFormat;
    // The default is Markdown; every format is the core's text.
    let md = burnin(&["table", p(&results)]);
    assert_eq!(md.code, 0, "{}", md.stderr);
    assert_eq!(md.stdout, out.table(TableFormat::Markdown));
    assert!(
        md.stdout
            .starts_with("| learner | algorithm | published bound |")
    );
    for format in TableFormat::ALL {
        let t = burnin(&["table", "--format", format.key(), p(&results)]);
        assert_eq!(t.code, 0, "{}", t.stderr);
        assert_eq!(t.stdout, out.table(format), "{}", format.key());
    }
    let tex = out.table(TableFormat::Latex);
    assert!(tex.contains("\\toprule") && tex.contains("coin \\& 50\\%"));
    let csv = out.table(TableFormat::Csv);
    assert!(
        csv.lines()
            .nth(2)
            .unwrap()
            .starts_with("coin & 50%,Uniform random,")
    );
    // To a file: its extension names the format.
    let file = d.0.join("table.tex");
    let w = burnin(&["table", p(&results), "-o", p(&file)]);
    assert_eq!((w.code, w.stdout.as_str()), (0, ""), "{}", w.stderr);
    assert_eq!(std::fs::read_to_string(&file).unwrap(), tex);
    let file = d.0.join("table.txt");
    let w = burnin(&[
        "table",
        "--format",
        "csv",
        p(&results),
        "--output",
        p(&file),
    ]);
    assert_eq!(w.code, 0, "{}", w.stderr);
    assert_eq!(std::fs::read_to_string(&file).unwrap(), csv);
    // Refusals: what and where, exit 2 for usage and I/O, 1 for a file
    // that is not results; the results file is never overwritten.
    let bad = burnin(&["table", "--format", "html", p(&results)]);
    assert_eq!(bad.code, 2);
    assert_eq!(
        bad.stderr,
        "burnin: --format html: expected one of markdown, latex, csv\n"
    );
    let clash = burnin(&[
        "table",
        "--format",
        "csv",
        p(&results),
        "-o",
        p(&d.0.join("t.md")),
    ]);
    assert_eq!(clash.code, 2);
    assert!(
        clash
            .stderr
            .contains("the file's extension names markdown, not csv"),
        "{}",
        clash.stderr
    );
    let missing = burnin(&["table", p(&d.0.join("nope.json"))]);
    assert_eq!(missing.code, 2);
    assert!(
        missing.stderr.starts_with("burnin: cannot read ") && missing.stderr.contains("nope.json"),
        "{}",
        missing.stderr
    );
    let not_results = burnin(&["table", p(&f)]);
    assert_eq!(not_results.code, 1);
    assert_eq!(
        not_results.stderr,
        format!(
            "{}: format: expected \"burnin-results\" or \"burnin-sweep\"\n",
            f.display()
        )
    );
    let before = std::fs::read_to_string(&results).unwrap();
    let over = burnin(&["table", p(&results), "-o", p(&results)]);
    assert_eq!(over.code, 2);
    assert!(
        over.stderr.contains("that is the results file"),
        "{}",
        over.stderr
    );
    assert_eq!(std::fs::read_to_string(&results).unwrap(), before);
    let nowhere = burnin(&["table", p(&results), "-o", p(&d.0.join("no/such/t.md"))]);
    assert_eq!(nowhere.code, 2);
    assert!(
        nowhere.stderr.contains("there is no folder"),
        "{}",
        nowhere.stderr
    );
    // A sweep's table has the swept value in front.
    let sweep = d.file(
        "sweep.json",
        r#"{"format": "burnin-experiment", "version": 1,
            "generator": {"kind": "lock", "horizon": 3, "actions": 2, "seed": 2},
            "episodes": 100, "seeds": 2, "sweep": {"parameter": "horizon", "values": [2, 3]},
            "learners": [{"algorithm": "uniform"}]}"#,
    );
    let r = burnin(&["run", "--json", p(&sweep)]);
    let sweep_results = d.file("sweep-results.json", &r.stdout);
    let t = burnin(&["table", "--format", "csv", p(&sweep_results)]);
    assert_eq!(t.code, 0, "{}", t.stderr);
    let rows: Vec<&str> = t.stdout.lines().collect();
    assert!(rows[0].starts_with("horizon,learner,"), "{}", rows[0]);
    assert!(rows[1].starts_with("2,uniform,") && rows[2].starts_with("3,uniform,"));
}

//! Clear messages, no silent no-ops (#35, class 5): each case a user met
//! with a message that named the wrong thing, printed a label raw, or
//! exited 0 having done nothing.

mod common;

use common::{Scratch, burnin, p};

fn ferry_with_label(d: &Scratch, label: &str) -> std::path::PathBuf {
    let text = std::fs::read_to_string(
        std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("demo-models/night-ferry.json"),
    )
    .unwrap();
    let text = text.replacen("\"quay\"", &serde_json::to_string(label).unwrap(), 1);
    d.file("ferry.json", &text)
}

/// `solve` printed labels' terminal escapes raw (run and validate escape
/// them): the table shows them as escapes.
#[test]
fn solve_shows_a_labels_control_characters_as_escapes() {
    let d = Scratch::new("msg-solve-escapes");
    let model = ferry_with_label(&d, "\u{1b}[31mred");
    let r = burnin(&["solve", p(&model)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    assert!(!r.stdout.contains('\u{1b}'), "no raw escape character");
    assert!(r.stdout.contains("\\u{1b}[31mred"), "{}", r.stdout);
}

/// `plot`'s "were not compared" printed labels raw and blamed "more than
/// ten learners" for two: the labels are quoted with escapes, and two
/// learners without a comparison are told so.
#[test]
fn plot_says_why_two_learners_were_not_compared() {
    let d = Scratch::new("msg-not-compared");
    d.demo("night-ferry.json", "night-ferry.json");
    let exp = d.file(
        "exp.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "night-ferry.json",
            "episodes": 30, "seeds": 3, "learners": [{"algorithm": "uniform", "label": "a\u001b[2J"},
            {"algorithm": "mvp"}, {"algorithm": "psrl"}]}"#,
    );
    let r = burnin(&["run", "--json", p(&exp)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let mut v: serde_json::Value = serde_json::from_str(&r.stdout).unwrap();
    // Only the first pair's comparison kept: the others are missing.
    let first = v["comparisons"][0].clone();
    v["comparisons"] = serde_json::json!([first]);
    assert_eq!(first["a"], "a\u{1b}[2J");
    assert_eq!(first["b"], "mvp");
    let results = d.file("results.json", &v.to_string());
    let r = burnin(&[
        "plot",
        p(&results),
        "-o",
        p(&d.0.join("x.svg")),
        "--view",
        "difference",
        "--compare",
        "a\u{1b}[2J",
        "psrl",
    ]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(!r.stderr.contains('\u{1b}'), "{}", r.stderr);
    assert!(
        r.stderr.contains(
            "\"a\\u{1b}[2J\" and \"psrl\" were not compared: the results file holds no comparison of the two"
        ),
        "{}",
        r.stderr
    );
}

/// `plot` of a truncated, BOM-prefixed, NaN-containing or empty file said
/// its format field was wrong: it says where the JSON breaks, as `run` does.
#[test]
fn plot_says_where_a_broken_file_stops_being_json() {
    let d = Scratch::new("msg-plot-json");
    let r = burnin(&[
        "run",
        "--json",
        "tests/browser/fixtures/ferry-experiment.json",
    ]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let good = r.stdout;
    let cut: String = good.lines().take(3).collect::<Vec<_>>().join("\n");
    let nan = good.replacen("\"optimal_value\": ", "\"optimal_value\": NaN, \"x\": ", 1);
    let line_of_nan = nan.lines().position(|l| l.contains("NaN")).unwrap() + 1;
    for (name, text, want) in [
        (
            "truncated",
            cut,
            "not valid JSON: line 3, column".to_string(),
        ),
        (
            "bom",
            format!("\u{feff}{good}"),
            "not valid JSON: line 1, column 1: expected value".to_string(),
        ),
        (
            "nan",
            nan,
            format!("not valid JSON: line {line_of_nan}, column"),
        ),
        (
            "empty",
            String::new(),
            "not valid JSON: line 1, column 0: EOF while parsing a value".to_string(),
        ),
    ] {
        let f = d.file(&format!("{name}.json"), &text);
        let r = burnin(&["plot", p(&f), "-o", p(&d.0.join("x.svg"))]);
        assert_eq!(r.code, 1, "{name}: {}", r.stderr);
        assert!(
            r.stderr.starts_with(&format!("{}: {want}", f.display())),
            "{name}: {}",
            r.stderr
        );
    }
}

/// `bench --only MVP` (keys are lower case) printed empty figures and
/// exited 0: an unknown key is refused with the keys there are.
#[test]
fn bench_refuses_an_unknown_learner_key() {
    let r = burnin(&["bench", "--only", "MVP"]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(r.stdout.is_empty());
    assert!(
        r.stderr
            .contains("--only \"MVP\": expected a learner of the benchmarks or floor: mvp,"),
        "{}",
        r.stderr
    );
}

/// `--threads 100000` panicked ("failed to spawn thread"): refused with
/// the range before anything runs.
#[test]
fn an_absurd_thread_count_is_refused() {
    let d = Scratch::new("msg-threads");
    d.demo("night-ferry.json", "night-ferry.json");
    let exp = d.file(
        "exp.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "night-ferry.json",
            "episodes": 10, "seeds": 2, "learners": [{"algorithm": "uniform"}]}"#,
    );
    for n in ["100000", "0"] {
        let r = burnin(&["run", "--threads", n, p(&exp)]);
        assert_eq!(r.code, 2, "{}", r.stderr);
        assert_eq!(
            r.stderr,
            format!("burnin: --threads {n}: expected 1 to 1024 runs in parallel\n")
        );
    }
}

/// Every reader blocked forever on a FIFO with no writer (a `model_path` in
/// a colleague's experiment included), and `/dev/stdin` was accepted as a
/// `model_path`. A `model_path` must be a regular file; a FIFO given on the
/// command line that no one opens for writing is an error after 10 s,
/// while a pipe with a writer (`<(…)`) is read as before.
#[cfg(target_os = "linux")]
#[test]
fn odd_files_are_refused_or_time_out_with_a_message() {
    use std::process::{Command, Stdio};
    let d = Scratch::new("msg-odd-files");
    let model = d.demo("night-ferry.json", "night-ferry.json");
    let fifo = d.0.join("fifo");
    let made = Command::new("mkfifo").arg(&fifo).status().unwrap();
    assert!(made.success());
    let exp = |path: &str| {
        format!(
            r#"{{"format": "burnin-experiment", "version": 1, "model_path": {}, "episodes": 10, "learners": [{{"algorithm": "uniform"}}]}}"#,
            serde_json::to_string(path).unwrap()
        )
    };
    let e = d.file("fifo-exp.json", &exp(p(&fifo)));
    let r = burnin(&["run", p(&e)]);
    assert_eq!(r.code, 1, "{}", r.stderr);
    assert_eq!(
        r.stderr,
        format!(
            "model_path: {}: not a regular file; name a model file\n",
            fifo.display()
        )
    );
    // /dev/stdin as a model_path, with the model on standard input.
    let e = d.file("stdin-exp.json", &exp("/dev/stdin"));
    let out = Command::new(env!("CARGO_BIN_EXE_burnin"))
        .args(["run", p(&e)])
        .stdin(std::fs::File::open(&model).unwrap())
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(1));
    assert_eq!(
        String::from_utf8_lossy(&out.stderr),
        "model_path: /dev/stdin: not a regular file; name a model file\n"
    );
    // The FIFO on the command line, with no writer.
    let r = burnin(&["validate", p(&fifo)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(
        r.stderr
            .contains("nothing opened it for writing within 10 s"),
        "{}",
        r.stderr
    );
    // A pipe with a writer is read.
    let out = Command::new("bash")
        .arg("-c")
        .arg(format!(
            "{} validate <(cat {})",
            env!("CARGO_BIN_EXE_burnin"),
            p(&model)
        ))
        .output()
        .unwrap();
    assert!(
        out.status.success(),
        "{}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert!(String::from_utf8_lossy(&out.stdout).starts_with("ok: \"Night ferry\""));
}

/// PSRL on a 100 000-state model: one episode (H·S²·A draws, 10¹¹ here)
/// outlasted the 2 s calibration and the run started anyway. The models'
/// sizes give a floor on the time, and a run over the budget by that floor
/// is refused before anything starts (at 1 ns a draw, derived by hand:
/// 10¹¹ draws × 2 000 episodes ÷ 2 threads = 10⁵ s ≈ 27 h 47 min).
#[test]
fn psrl_on_a_huge_model_is_refused_before_it_starts() {
    let d = Scratch::new("msg-psrl-size");
    let exp = d.file(
        "big.json",
        r#"{"format": "burnin-experiment", "version": 1,
            "generator": {"kind": "random", "states": 100000, "actions": 2, "successors": 2, "horizon": 5},
            "episodes": 1000, "seeds": 2, "learners": [{"algorithm": "psrl"}]}"#,
    );
    let r = burnin(&["run", "--threads", "2", "--budget", "1", p(&exp)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(r.stdout.is_empty());
    assert!(
        r.stderr
            .starts_with("burnin: this run is estimated to take at least 27 h 47 min on 2 threads")
            && r.stderr.contains("over the budget of 1 min"),
        "{}",
        r.stderr
    );
}

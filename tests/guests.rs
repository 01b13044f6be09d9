//! Guest learners (src/learn/guest.rs, src/bin/burnin/guest.rs): a user's
//! own learner measured with the same exact regret as the built-ins, as a
//! process speaking the JSON-lines protocol and as a Rust value. The guest
//! scripts are `examples/*.py` and `tests/guests/*.py` (Python 3, standard
//! library only).

use std::path::{Path, PathBuf};
use std::sync::Arc;

use serde_json::{Value, json};

use burnin::experiment::{Point, RunRecord, parse_experiment, run_all, try_run_all};
use burnin::learn::{Batch, Decision, Guest, GuestIntro, GuestPolicy, Guests};

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

/// Two doors, worked by hand. S = {hall, garden}, A = {left, right}, H = 2,
/// start in the hall. In the hall, left stays (Bernoulli reward, mean 0.8)
/// and right goes to the garden (reward 0); in the garden, left pays 1 and
/// right 0, both staying.
///
/// Optimal: at step 2, V(hall) = 0.8 and V(garden) = 1; at step 1,
/// Q(hall, left) = 0.8 + 0.8 = 1.6 and Q(hall, right) = 0 + 1 = 1, so
/// V* = 1.6. Uniform: at step 2, V(hall) = ½·0.8 = 0.4 and V(garden) = ½;
/// at step 1, V(hall) = ½·(0.8 + 0.4) + ½·(0 + 0.5) = 0.85. Each episode of
/// the uniform learner costs 1.6 − 0.85 = 0.75 (derived by hand).
/// (The model is in the page's fixture `tests/browser/fixtures/
/// two-doors-guest-experiment.json`, shared with the browser check.)
fn two_doors() -> String {
    let text = std::fs::read_to_string(
        root().join("tests/browser/fixtures/two-doors-guest-experiment.json"),
    )
    .unwrap();
    let v: Value = serde_json::from_str(&text).unwrap();
    v["model"].to_string()
}
const UNIFORM_EPISODE_REGRET: f64 = 0.75;

mod common;

use common::{Scratch, burnin};

/// A scratch folder holding the two-doors model as `two-doors.json`.
fn scratch(tag: &str) -> Scratch {
    let d = Scratch::new(&format!("guest-{tag}"));
    d.file("two-doors.json", &two_doors());
    d
}

/// Writes an experiment file into the folder.
fn write_experiment(d: &Scratch, name: &str, v: Value) -> PathBuf {
    d.file(name, &v.to_string())
}

fn experiment(model: &str, episodes: u64, seeds: u64, learners: Value) -> Value {
    json!({"format": "burnin-experiment", "version": 1, "model_path": model,
           "episodes": episodes, "seeds": seeds, "seed": 3, "learners": learners})
}

fn results(args: &[&str]) -> Value {
    let out = burnin(args);
    assert_eq!(out.code, 0, "{}", out.stderr);
    serde_json::from_str(&out.stdout).unwrap()
}

/// `burnin ARGS` as `burnin` runs it, but stopped (and the test failed)
/// when it has not ended after `limit` seconds: a hang fails, not waits.
fn burnin_within(d: &Scratch, limit: u64, args: &[&str]) -> common::Run {
    let (out_path, err_path) = (d.0.join("stdout.txt"), d.0.join("stderr.txt"));
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_burnin"))
        .args(args)
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .stdin(std::process::Stdio::null())
        .stdout(std::fs::File::create(&out_path).unwrap())
        .stderr(std::fs::File::create(&err_path).unwrap())
        .spawn()
        .unwrap();
    let until = std::time::Instant::now() + std::time::Duration::from_secs(limit);
    let status = loop {
        if let Some(s) = child.try_wait().unwrap() {
            break s;
        }
        if std::time::Instant::now() > until {
            let _ = child.kill();
            let _ = child.wait();
            panic!(
                "`burnin {}` still running after {limit} s; its error output: {}",
                args.join(" "),
                std::fs::read_to_string(&err_path).unwrap_or_default()
            );
        }
        std::thread::sleep(std::time::Duration::from_millis(20));
    };
    common::Run {
        code: status.code().expect("exited, not killed by a signal"),
        stdout: std::fs::read_to_string(&out_path).unwrap(),
        stderr: std::fs::read_to_string(&err_path).unwrap(),
    }
}

fn curve(v: &Value, learner: usize, key: &str) -> Vec<f64> {
    v["learners"][learner][key]
        .as_array()
        .unwrap()
        .iter()
        .map(|x| x.as_f64().unwrap())
        .collect()
}

/// The external uniform learner's regret is K·(V* − V^uniform) at every
/// checkpoint (hand-derived above), equal to the built-in uniform learner's
/// to 1e-12, with one message per episode and with batches of 64.
#[test]
fn process_uniform_learner_pays_the_hand_derived_regret() {
    let d = scratch("uniform");
    let e = write_experiment(
        &d,
        "e.json",
        experiment(
            "two-doors.json",
            300,
            3,
            json!([{"algorithm": "uniform"}, {"guest": "mine"}, {"guest": "batched"}]),
        ),
    );
    let v = results(&[
        "run",
        e.to_str().unwrap(),
        "--json",
        "--learner",
        "mine=python3 examples/uniform.py",
        "--learner",
        "batched=python3 examples/uniform.py 64",
    ]);
    assert_eq!(v["optimal_value"].as_f64().unwrap(), 1.6);
    let ks: Vec<f64> = v["learners"][1]["checkpoints"]
        .as_array()
        .unwrap()
        .iter()
        .map(|k| k.as_f64().unwrap())
        .collect();
    let builtin = curve(&v, 0, "regret_mean");
    for li in [1, 2] {
        assert_eq!(v["learners"][li]["algorithm"], "guest");
        let guest = curve(&v, li, "regret_mean");
        for (i, k) in ks.iter().enumerate() {
            let want = k * UNIFORM_EPISODE_REGRET;
            assert!(
                (guest[i] - want).abs() <= 1e-12 * want,
                "k = {k}: {} vs {want}",
                guest[i]
            );
            assert!((guest[i] - builtin[i]).abs() <= 1e-12 * want);
        }
        // One policy, given once: one model update per run; no published bound.
        assert_eq!(v["learners"][li]["model_updates"], json!([1, 1, 1]));
        assert!(v["learners"][li]["bound"].is_null());
    }
    // Batching changes the messages, not the draws: the same results.
    let alone = write_experiment(
        &d,
        "alone.json",
        experiment("two-doors.json", 300, 3, json!([{"guest": "mine"}])),
    );
    let one = burnin(&[
        "run",
        alone.to_str().unwrap(),
        "--json",
        "--learner",
        "mine=python3 examples/uniform.py",
    ]);
    let batched = burnin(&[
        "run",
        alone.to_str().unwrap(),
        "--json",
        "--learner",
        "mine=python3 examples/uniform.py 64",
    ]);
    assert_eq!(one.code, 0, "{}", one.stderr);
    assert_eq!(one.stdout, batched.stdout);
}

/// A guest whose rows are exactly uniform draws its actions as the built-in
/// uniform learner does, so at the same position in an experiment its runs
/// are the built-in's bit for bit (regret, returns, visits), all but the
/// model-update count.
#[test]
fn rust_guest_uniform_reproduces_the_built_in_run_for_run() {
    struct Coin(usize);
    impl Guest for Coin {
        fn decide(&mut self, b: Batch<'_>) -> Result<Decision, String> {
            Ok(if b.done == 0 {
                Decision::new(GuestPolicy::Probabilities(vec![0.5; self.0]), 7)
            } else {
                Decision::keep(7)
            })
        }
    }
    let text = |learner: Value| {
        json!({"format": "burnin-experiment", "version": 1, "model": serde_json::from_str::<Value>(&two_doors()).unwrap(),
               "episodes": 250, "seeds": 4, "learners": [learner]})
        .to_string()
    };
    let host: Guests = Arc::new(
        |_: &str, i: &GuestIntro| -> Result<Box<dyn Guest>, String> {
            let s = i.setting;
            Ok(Box::new(Coin(s.horizon * s.states * s.actions)))
        },
    );
    let guest = Point::with_guests(
        parse_experiment(&text(json!({"guest": "coin"})), None).unwrap(),
        Some(host),
    );
    let builtin =
        Point::new(parse_experiment(&text(json!({"algorithm": "uniform"})), None).unwrap());
    let strip = |rs: Vec<RunRecord>| -> Vec<RunRecord> {
        rs.into_iter()
            .map(|r| RunRecord {
                model_updates: 0,
                ..r
            })
            .collect()
    };
    let g = try_run_all(&guest).unwrap();
    assert!(g.iter().all(|r| r.model_updates == 1));
    assert_eq!(strip(g), strip(run_all(&builtin)));
}

fn mean_and_se(xs: &[f64]) -> (f64, f64) {
    let n = xs.len() as f64;
    let m = xs.iter().sum::<f64>() / n;
    let var = xs.iter().map(|x| (x - m) * (x - m)).sum::<f64>() / (n - 1.0);
    (m, (var / n).sqrt())
}

/// An external port of the built-in Q-learning with the Hoeffding bonus
/// (tests/guests/q_ucb_port.py; Jin et al. 2018, Algorithm 1) pays the same
/// mean regret as the built-in over 64 seeds: the two means differ by less
/// than 4 standard errors of their difference (a two-sample z-test at
/// 64 + 64 runs; a false alarm has probability about 6·10⁻⁵, and the seeds
/// are fixed, so the test is deterministic). The two break ties with
/// different generators, so they agree in distribution, not run for run.
#[test]
fn guest_port_of_q_learning_matches_the_built_in_over_64_seeds() {
    let d = scratch("port");
    std::fs::copy(
        root().join("demo-models/tide-pool-forager.json"),
        d.0.join("tide.json"),
    )
    .unwrap();
    let e = write_experiment(
        &d,
        "e.json",
        experiment(
            "tide.json",
            400,
            64,
            json!([{"algorithm": "q-ucb-hoeffding", "bonus_scale": 0.05}, {"guest": "port"}]),
        ),
    );
    let v = results(&[
        "run",
        e.to_str().unwrap(),
        "--json",
        "--learner",
        "port=python3 tests/guests/q_ucb_port.py 0.05",
    ]);
    let (mb, sb) = mean_and_se(&curve(&v, 0, "final_regret"));
    let (mg, sg) = mean_and_se(&curve(&v, 1, "final_regret"));
    let z = (mb - mg) / (sb * sb + sg * sg).sqrt();
    assert!(mb > 10.0, "the workload has regret to compare: {mb}");
    assert!(
        z.abs() < 4.0,
        "built-in {mb} ± {sb}, port {mg} ± {sg}: z = {z}"
    );
    // The port changes its policy as often as the built-in, roughly.
    let (ub, _) = mean_and_se(&curve(&v, 0, "model_updates"));
    let (ug, _) = mean_and_se(&curve(&v, 1, "model_updates"));
    assert!((ub - ug).abs() < 0.25 * ub, "updates {ub} vs {ug}");
}

/// Each way of breaking the contract stops the run with exit 3 and a
/// message naming the learner, the seed, the episode and what went wrong.
#[test]
fn a_misbehaving_process_is_stopped_with_a_message_naming_run_episode_and_line() {
    let d = scratch("bad");
    let e = write_experiment(
        &d,
        "e.json",
        experiment(
            "two-doors.json",
            50,
            2,
            json!([{"algorithm": "uniform"}, {"guest": "bad", "label": "my learner"}]),
        ),
    );
    let e = e.to_str().unwrap();
    for (how, want) in [
        (
            "crash",
            vec![
                "ended (exit status: 7) without answering message 2",
                "ZeroDivisionError",
            ],
        ),
        (
            "silent",
            vec!["gave no answer line 2 within 3 s; it was stopped"],
        ),
        (
            "garbage",
            vec!["answer line 2 is not JSON", "\"policy please?\""],
        ),
        (
            "action-out-of-range",
            vec!["answer line 2: \"actions\"[0][0] must be an action 0 … 1, found 2"],
        ),
        (
            "row-sum",
            vec!["answer line 2: \"probabilities\"[0][0] sums to 0.7, not 1"],
        ),
        (
            "wrong-shape",
            vec!["answer line 2: \"actions\"[0] must be a list of S = 2 entries"],
        ),
        // #35: an answer giving a key twice is refused, as every reader
        // refuses a repeated key.
        (
            "repeated-key",
            vec!["answer line 2: \"actions\" is given more than once"],
        ),
        // #35: a batch is at most 2²⁰ steps (H = 2 here).
        (
            "huge-batch",
            vec![
                "answer line 2: \"episodes\" must be 1 … 524288 (at most 1048576 steps a batch at H = 2), found 1048576",
            ],
        ),
        // #35: a guest that closes its output and runs on is waited for no
        // longer than the timeout.
        (
            "close-output",
            vec![
                "closed its output without answering message 2 and was still running 3 s later; it was stopped",
            ],
        ),
        // #35: its standard error is read as bytes and quoted lossily.
        (
            "crash-bytes",
            vec![
                "ended (exit status: 7) without answering message 2",
                "its last error output: caf\u{FFFD} au lait | Traceback: the learner gave up",
            ],
        ),
    ] {
        // `exec`: the guest itself holds its output (a shell that stays
        // between, as dash does, would hold it open too).
        let cmd = format!("bad=exec python3 tests/guests/misbehave.py {how}");
        let d = Scratch::new(&format!("guest-bad-{how}"));
        let out = burnin_within(
            &d,
            120,
            &[
                "run",
                e,
                "--learner",
                &cmd,
                // 3 s: long enough for a Python start on a loaded machine to
                // give its first answer (1 s once timed out at line 1 there).
                "--learner-timeout",
                "3",
                "--threads",
                "1",
            ],
        );
        assert_eq!(out.code, 3, "{how}: {}", out.stderr);
        let first = out
            .stderr
            .lines()
            .find(|l| l.starts_with("burnin:"))
            .unwrap_or_default();
        assert!(
            first.starts_with(
                "burnin: guest learner failed: learner \"my learner\", seed 0, episode 2: "
            ),
            "{how}: {first}"
        );
        for w in want {
            assert!(first.contains(w), "{how}: {first:?} lacks {w:?}");
        }
        assert!(out.stdout.is_empty(), "{how}: no results are written");
    }
}

/// A file names a guest; only the command line starts one, and the reader
/// refuses entries that mix the two kinds or give a guest parameters.
#[test]
fn guests_are_named_by_files_and_started_only_by_the_command_line() {
    let d = scratch("names");
    let e = write_experiment(
        &d,
        "e.json",
        experiment("two-doors.json", 10, 2, json!([{"guest": "mine"}])),
    );
    let out = burnin(&["run", e.to_str().unwrap()]);
    assert_eq!(out.code, 2);
    assert!(
        out.stderr.contains(
            "learners[0] is the guest learner \"mine\"; say what starts it with --learner mine=CMD"
        ),
        "{}",
        out.stderr
    );
    let out = burnin(&["run", e.to_str().unwrap(), "--learner", "mine"]);
    assert_eq!(out.code, 2);
    assert!(
        out.stderr
            .contains("--learner \"mine\": expected NAME=COMMAND"),
        "{}",
        out.stderr
    );
    let bad = write_experiment(
        &d,
        "bad.json",
        experiment(
            "two-doors.json",
            10,
            2,
            json!([{"guest": "a b"}, {"guest": "x", "algorithm": "mvp"}, {"guest": "y", "epsilon": 0.1}]),
        ),
    );
    let out = burnin(&["run", bad.to_str().unwrap()]);
    assert_eq!(out.code, 1);
    for w in [
        "learners[0].guest: expected a name of 1 to 64 letters, digits, '_', '-' or '.', found \"a b\"",
        "learners[1].algorithm: a learner has either \"algorithm\" (a built-in) or \"guest\" (your own), not both",
        "learners[2].epsilon: a guest learner takes no epsilon",
    ] {
        assert!(out.stderr.contains(w), "{} lacks {w}", out.stderr);
    }
}

/// Shards of an experiment with a guest merge into exactly the unsharded
/// results: one process per run keeps runs independent.
#[test]
fn sharded_guest_runs_merge_into_the_unsharded_results() {
    let d = scratch("shards");
    let e = write_experiment(
        &d,
        "e.json",
        experiment(
            "two-doors.json",
            120,
            3,
            json!([{"guest": "opt"}, {"algorithm": "mvp"}]),
        ),
    );
    let e = e.to_str().unwrap();
    let learner = "opt=python3 examples/optimist.py";
    let whole = burnin(&["run", e, "--json", "--learner", learner]);
    assert_eq!(whole.code, 0, "{}", whole.stderr);
    let mut files = Vec::new();
    for i in 1..=2 {
        let out = burnin(&["run", e, "--shard", &format!("{i}/2"), "--learner", learner]);
        assert_eq!(out.code, 0, "{}", out.stderr);
        let f = d.0.join(format!("s{i}.json"));
        std::fs::write(&f, out.stdout).unwrap();
        files.push(f.to_str().unwrap().to_owned());
    }
    let merged = burnin(&["merge", &files[0], &files[1], "--json"]);
    assert_eq!(merged.code, 0, "{}", merged.stderr);
    assert_eq!(merged.stdout, whole.stdout);
}

/// Whether a process whose command line holds `marker` is running.
#[cfg(target_os = "linux")]
fn running(marker: &str) -> Vec<String> {
    let mut found = Vec::new();
    for e in std::fs::read_dir("/proc").unwrap().flatten() {
        let name = e.file_name();
        if !name.to_string_lossy().bytes().all(|b| b.is_ascii_digit()) {
            continue;
        }
        let Ok(cmd) = std::fs::read(e.path().join("cmdline")) else {
            continue;
        };
        let cmd = String::from_utf8_lossy(&cmd).replace('\0', " ");
        if cmd.contains(marker) {
            found.push(format!("{}: {cmd}", name.to_string_lossy()));
        }
    }
    found
}

/// #35: a guest runs in a process group of its own, ended whole when its
/// run ends or fails: a guest that lingers after its input closes, one
/// stopped at the timeout, and one that closed its output and runs on leave
/// no process behind, not even the helper each started (counted in /proc
/// by a marker in their command lines).
#[cfg(target_os = "linux")]
#[test]
fn a_guest_leaves_no_process_of_its_group_behind() {
    let d = scratch("group");
    let e = write_experiment(
        &d,
        "e.json",
        experiment("two-doors.json", 20, 2, json!([{"guest": "g"}])),
    );
    for (how, code) in [("linger", 0), ("silent", 3), ("close-output", 3)] {
        let marker = format!("burnin-test-marker-{how}-{}", std::process::id());
        let cmd = format!("g=python3 tests/guests/misbehave.py {how} {marker}");
        let out = burnin_within(
            &d,
            120,
            &[
                "run",
                e.to_str().unwrap(),
                "--learner",
                &cmd,
                "--learner-timeout",
                "3",
                "--threads",
                "1",
            ],
        );
        assert_eq!(out.code, code, "{how}: {}", out.stderr);
        // A process killed a moment ago may still be being reaped.
        let until = std::time::Instant::now() + std::time::Duration::from_secs(5);
        let mut left = running(&marker);
        while !left.is_empty() && std::time::Instant::now() < until {
            std::thread::sleep(std::time::Duration::from_millis(50));
            left = running(&marker);
        }
        assert!(left.is_empty(), "{how}: left running: {left:?}");
    }
}

/// #35: a guest cannot flood Burnin. One that answers endlessly without
/// reading its input is stopped once a message has waited past the timeout
/// (one answer is read ahead and at most two messages are held, where every
/// batch and answer were queued before); one writing ten megabytes of
/// standard error without a newline is quoted by its last 400 bytes.
#[test]
fn a_guest_that_floods_its_output_or_error_output_is_bounded() {
    let d = scratch("flood");
    let e = write_experiment(
        &d,
        "e.json",
        experiment("two-doors.json", 1_000_000, 1, json!([{"guest": "g"}])),
    );
    let e = e.to_str().unwrap();
    let args = |how: &str| {
        vec![
            "run".to_string(),
            e.to_string(),
            "--learner".into(),
            format!("g=python3 tests/guests/misbehave.py {how}"),
            "--learner-timeout".into(),
            "3".into(),
            "--no-budget".into(),
        ]
    };
    let run = |how: &str| {
        let a = args(how);
        burnin_within(&d, 120, &a.iter().map(String::as_str).collect::<Vec<_>>())
    };
    let out = run("flood-keep");
    assert_eq!(out.code, 3, "{}", out.stderr);
    assert!(
        out.stderr.contains("did not read message") && out.stderr.contains("it was stopped"),
        "{}",
        out.stderr
    );
    let out = run("stderr-flood");
    assert_eq!(out.code, 3, "{}", out.stderr);
    let quoted = "x".repeat(400) + "…";
    assert!(out.stderr.contains(&quoted), "{}", out.stderr);
    assert!(out.stderr.len() < 2_000, "{} bytes", out.stderr.len());
}

/// #35: a byte that is not UTF-8 on a guest's standard error does not stop
/// Burnin reading it, so a correct guest that logs one runs to its end
/// (it died at its next log line, its error output's pipe closed).
#[test]
fn a_guest_logging_bytes_that_are_not_utf8_runs_to_its_end() {
    let d = scratch("bytes");
    let e = write_experiment(
        &d,
        "e.json",
        experiment("two-doors.json", 200, 2, json!([{"guest": "g"}])),
    );
    let out = burnin_within(
        &d,
        120,
        &[
            "run",
            e.to_str().unwrap(),
            "--json",
            "--learner",
            "g=python3 tests/guests/misbehave.py stderr-bytes",
        ],
    );
    assert_eq!(out.code, 0, "{}", out.stderr);
    let v: Value = serde_json::from_str(&out.stdout).unwrap();
    assert_eq!(
        v["learners"][0]["checkpoints"].as_array().unwrap().last(),
        Some(&json!(200))
    );
}

/// #35: `--estimate` counts a guest's largest batch: 2²⁰ steps, 24 bytes
/// each held and 46 bytes each in up to three messages (docs/formats.md),
/// so at least 170 MB where the same run of a built-in needs a few.
#[test]
fn the_estimate_counts_a_guests_largest_batch() {
    let d = scratch("estimate");
    let bytes = |learner: Value, extra: &[&str]| -> f64 {
        let e = write_experiment(
            &d,
            "e.json",
            experiment("two-doors.json", 1_000_000, 1, json!([learner])),
        );
        let mut args = vec!["run", e.to_str().unwrap(), "--estimate", "--json"];
        args.extend_from_slice(extra);
        let out = burnin(&args);
        assert_eq!(out.code, 0, "{}", out.stderr);
        let v: Value = serde_json::from_str(&out.stdout).unwrap();
        v["bytes"].as_f64().unwrap()
    };
    let guest = bytes(
        json!({"guest": "g"}),
        &["--learner", "g=python3 examples/uniform.py"],
    );
    let builtin = bytes(json!({"algorithm": "uniform"}), &[]);
    assert!(
        guest >= (1u64 << 20) as f64 * (24.0 + 3.0 * 46.0),
        "{guest}"
    );
    assert!(builtin < 20e6, "{builtin}");
}

/// A bandit (S = 1, H = 1) with Bernoulli arms of these means, as a model
/// object.
fn bandit(means: &[f64]) -> Value {
    let n = means.len();
    json!({"format": "burnin-model", "version": 1, "name": "arms", "horizon": 1,
           "states": ["s"], "actions": (0..n).map(|a| format!("a{a}")).collect::<Vec<_>>(),
           "start": [1],
           "steps": [{"transitions": [vec![json!([[0, 1]]); n]],
                      "rewards": [means.iter().map(|m| json!({"bernoulli": m})).collect::<Vec<_>>()]}]})
}

/// A Rust guest that gives one probability table and keeps it.
struct Rows(Vec<f64>);

impl Guest for Rows {
    fn decide(&mut self, b: Batch<'_>) -> Result<Decision, String> {
        Ok(if b.done == 0 {
            Decision::new(GuestPolicy::Probabilities(self.0.clone()), 1000)
        } else {
            Decision::keep(1000)
        })
    }
}

/// #35 §2: a probability row accepted within the 10⁻⁹ tolerance is the
/// distribution it is scaled to, so a guest always playing an optimal arm
/// has regret exactly 0 at every checkpoint, whether its row sums to
/// 1 + 9·10⁻¹⁰ or 1 − 9·10⁻¹⁰ (it was −0.0008 and +0.0008 at K = 10⁶, the
/// second with a slope of 1), and so does one mixing two optimal arms. On
/// two arms of means 0.3 and 0.8 the optimal value is 0.8 (derived by hand);
/// the third table's model has two arms of 0.8.
#[test]
fn an_optimal_policy_given_as_rows_within_the_tolerance_has_regret_exactly_zero() {
    for (means, row) in [
        (vec![0.3, 0.8], vec![0.0, 1.000_000_000_9]),
        (vec![0.3, 0.8], vec![0.0, 0.999_999_999_1]),
        (vec![0.3, 0.8, 0.8], vec![0.0, 0.3, 0.700_000_000_9]),
    ] {
        let text = json!({"format": "burnin-experiment", "version": 1, "model": bandit(&means),
                          "episodes": 1_000_000, "seeds": 2, "learners": [{"guest": "rows"}]})
        .to_string();
        let table = row.clone();
        let host: Guests = Arc::new(
            move |_: &str, _: &GuestIntro| -> Result<Box<dyn Guest>, String> {
                Ok(Box::new(Rows(table.clone())))
            },
        );
        let p = Point::with_guests(parse_experiment(&text, None).unwrap(), Some(host));
        for r in try_run_all(&p).unwrap() {
            assert!(
                r.regret.iter().chain(&r.episode_regret).all(|&x| x == 0.0),
                "{row:?}: regret {:?}",
                r.regret
            );
        }
    }
}

/// #35 §2, as `burnin run` reads a process's rows: the optimal arm's row
/// written as `[0, 1.0000000009]` or `[0, 0.9999999991]` gives regret
/// exactly 0 and a flat curve at K = 10⁶ (V* = 0.8 on arms 0.3 and 0.8).
#[test]
fn a_process_playing_the_optimal_arm_with_a_row_within_the_tolerance_has_regret_exactly_zero() {
    let d = scratch("rows");
    d.file("arms.json", &bandit(&[0.3, 0.8]).to_string());
    let e = write_experiment(
        &d,
        "e.json",
        experiment("arms.json", 1_000_000, 2, json!([{"guest": "rows"}])),
    );
    for row in ["0 1.0000000009", "0 0.9999999991"] {
        let cmd = format!("rows=python3 tests/guests/rows.py {row}");
        let v = results(&["run", e.to_str().unwrap(), "--json", "--learner", &cmd]);
        assert_eq!(v["optimal_value"].as_f64(), Some(0.8));
        for key in ["regret_mean", "final_regret"] {
            assert!(
                curve(&v, 0, key).iter().all(|&x| x == 0.0),
                "{row}: {key} {:?}",
                v["learners"][0][key]
            );
        }
    }
}

/// #35 §2, the other probabilities the core accepts within a tolerance:
/// model rows (and the start distribution) within 10⁻⁶ of 1, and a policy
/// given to `solve::evaluate`. On a model whose optimal rows sum to
/// 1 + 5·10⁻⁷ and 1 − 4·10⁻¹³ (rescaled, and kept as given below 10⁻¹²),
/// a guest playing the optimal policy has regret exactly 0; and the
/// optimal arm's row [0, 1 + 5·10⁻⁷] is worth V* = 0.8 exactly.
#[test]
fn model_rows_and_evaluated_policies_within_the_tolerance_keep_exact_regret() {
    use burnin::solve::{Policy, evaluate, solve};
    // Two doors with rows off by the amounts above: from the hall, right
    // goes to the garden with 1.0000005; left stays with 0.4999999999996
    // and goes to the garden with 0.5 (optimal at step 1: 0.8 + 0.4 + 0.5
    // against 0 + 1); the start row is 1.0000005.
    let mut model: Value = serde_json::from_str(&two_doors()).unwrap();
    model["start"] = json!([1.0000005, 0]);
    model["steps"][0]["transitions"][0] =
        json!([[[0, 0.4999999999996], [1, 0.5]], [[1, 1.0000005]]]);
    let text = json!({"format": "burnin-experiment", "version": 1, "model": model,
                      "episodes": 20_000, "seeds": 2, "learners": [{"guest": "best"}]})
    .to_string();
    let exp = parse_experiment(&text, None).unwrap();
    let sol = solve(&exp.model);
    let best: Vec<u32> = sol.policy.iter().copied().collect();
    struct Fixed(Vec<u32>);
    impl Guest for Fixed {
        fn decide(&mut self, b: Batch<'_>) -> Result<Decision, String> {
            Ok(if b.done == 0 {
                Decision::new(GuestPolicy::Actions(self.0.clone()), 100)
            } else {
                Decision::keep(100)
            })
        }
    }
    let host: Guests = Arc::new(
        move |_: &str, _: &GuestIntro| -> Result<Box<dyn Guest>, String> {
            Ok(Box::new(Fixed(best.clone())))
        },
    );
    for r in try_run_all(&Point::with_guests(exp, Some(host))).unwrap() {
        assert!(r.regret.iter().all(|&x| x == 0.0), "{:?}", r.regret);
    }
    let arms = serde_json::to_string(&bandit(&[0.3, 0.8])).unwrap();
    let m = burnin::parse_model(&arms).unwrap();
    let p = ndarray::Array3::from_shape_vec((1, 1, 2), vec![0.0, 1.0 + 5e-7]).unwrap();
    let v = evaluate(&m, &Policy::Stochastic(p)).unwrap();
    assert_eq!(v[[0, 0]], 0.8);
    assert_eq!(solve(&m).optimal_value, 0.8);
}

/// #35: a guest's own process group does not get the terminal's Ctrl-C,
/// so Burnin ends the groups of its running guests when it is interrupted:
/// after SIGINT to Burnin alone, nothing of a guest that lingers after its
/// input closes (nor the helper it started) is left.
#[cfg(target_os = "linux")]
#[test]
fn an_interrupted_run_leaves_no_guest_behind() {
    let d = scratch("interrupt");
    let e = write_experiment(
        &d,
        "e.json",
        experiment("two-doors.json", 1_000_000_000, 1, json!([{"guest": "g"}])),
    );
    let marker = format!("burnin-test-marker-interrupt-{}", std::process::id());
    let mut child = std::process::Command::new(env!("CARGO_BIN_EXE_burnin"))
        .args([
            "run",
            e.to_str().unwrap(),
            "--no-budget",
            "--learner",
            &format!("g=python3 tests/guests/misbehave.py linger {marker}"),
        ])
        .current_dir(env!("CARGO_MANIFEST_DIR"))
        .stdin(std::process::Stdio::null())
        .stdout(std::process::Stdio::null())
        .stderr(std::process::Stdio::null())
        .spawn()
        .unwrap();
    let until = std::time::Instant::now() + std::time::Duration::from_secs(60);
    while running(&marker).len() < 2 {
        assert!(std::time::Instant::now() < until, "the guest never started");
        std::thread::sleep(std::time::Duration::from_millis(50));
    }
    std::thread::sleep(std::time::Duration::from_millis(300));
    let killed = std::process::Command::new("kill")
        .args(["-INT", &child.id().to_string()])
        .status()
        .unwrap();
    assert!(killed.success());
    let status = child.wait().unwrap();
    assert!(!status.success(), "{status}");
    let until = std::time::Instant::now() + std::time::Duration::from_secs(5);
    let mut left = running(&marker);
    while !left.is_empty() && std::time::Instant::now() < until {
        std::thread::sleep(std::time::Duration::from_millis(50));
        left = running(&marker);
    }
    assert!(left.is_empty(), "left running: {left:?}");
}

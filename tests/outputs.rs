//! Outputs are never lost or half-written (#35, class 3): every output
//! path is checked before anything runs, an output never overwrites an
//! input under another name (compared by device and inode), and a file cut
//! short while writing leaves the old one as it was.

mod common;

use std::path::Path;
use std::process::{Command, Stdio};

use common::{Scratch, burnin, p};

fn experiment(d: &Scratch, episodes: u64) -> std::path::PathBuf {
    d.demo("night-ferry.json", "night-ferry.json");
    d.file(
        "exp.json",
        &format!(
            r#"{{"format": "burnin-experiment", "version": 1, "model_path": "night-ferry.json",
                "episodes": {episodes}, "seeds": 3, "seed": 5,
                "learners": [{{"algorithm": "uniform"}}, {{"algorithm": "mvp"}}]}}"#
        ),
    )
}

fn names(folder: &Path) -> Vec<String> {
    let mut v: Vec<String> = std::fs::read_dir(folder)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .collect();
    v.sort();
    v
}

/// `--csv X --seeds-csv X` and `--csv X.svg --figure X.svg` overwrote each
/// other with exit 0: refused before running, nothing written. Two
/// spellings of one path count as one.
#[test]
fn two_outputs_given_the_same_path_are_refused_before_running() {
    let d = Scratch::new("outputs-same-path");
    let f = experiment(&d, 20);
    let x = d.0.join("x.csv");
    let svg = d.0.join("x.svg");
    let dotted = d.0.join(".").join("x.csv");
    for (args, flag, other) in [
        (
            vec!["--csv", p(&x), "--seeds-csv", p(&x)],
            "--seeds-csv",
            "--csv",
        ),
        (
            vec!["--csv", p(&svg), "--figure", p(&svg)],
            "--figure",
            "--csv",
        ),
        (
            vec!["--cells-csv", p(&x), "--seeds-csv", p(&dotted)],
            "--seeds-csv",
            "--cells-csv",
        ),
    ] {
        let before = names(&d.0);
        let mut all = vec!["run"];
        all.extend(&args);
        all.push(p(&f));
        let r = burnin(&all);
        assert_eq!(r.code, 2, "{args:?}: {}", r.stderr);
        assert!(r.stdout.is_empty(), "{args:?}: nothing ran");
        assert!(
            r.stderr.contains(flag)
                && r.stderr.contains(&format!(
                    "{other} names the same file; give each output its own path"
                )),
            "{args:?}: {}",
            r.stderr
        );
        assert_eq!(names(&d.0), before, "{args:?}: no file written");
    }
}

/// The "would overwrite an input" check compared resolved paths only: a
/// hard link to the experiment, `/dev/stdin` when the experiment came
/// from standard input, and `plot -o` onto a hard link of the results file
/// overwrote the input. Files are compared by device and inode.
#[cfg(unix)]
#[test]
fn an_input_under_another_name_is_never_overwritten() {
    let d = Scratch::new("outputs-hard-link");
    let f = experiment(&d, 20);
    let text = std::fs::read_to_string(&f).unwrap();
    let link = d.0.join("link.csv");
    std::fs::hard_link(&f, &link).unwrap();
    let r = burnin(&["run", "--csv", p(&link), p(&f)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(
        r.stderr.contains("--csv") && r.stderr.contains("that is an input file"),
        "{}",
        r.stderr
    );
    assert_eq!(std::fs::read_to_string(&f).unwrap(), text);

    // The experiment on standard input, /dev/stdin as an output.
    let out = Command::new(env!("CARGO_BIN_EXE_burnin"))
        .args(["run", "--seeds-csv", "/dev/stdin", "-"])
        .current_dir(&d.0)
        .stdin(std::fs::File::open(&f).unwrap())
        .output()
        .unwrap();
    let err = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(2), "{err}");
    assert!(
        err.contains("--seeds-csv /dev/stdin: that is an input file"),
        "{err}"
    );
    assert_eq!(std::fs::read_to_string(&f).unwrap(), text);

    // plot -o onto a hard link of the results file.
    let r = burnin(&["run", "--json", p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let results = d.file("results.json", &r.stdout);
    let svg = d.0.join("results.svg");
    std::fs::hard_link(&results, &svg).unwrap();
    let r = burnin(&["plot", p(&results), "-o", p(&svg)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(
        r.stderr.contains("that is the results file"),
        "{}",
        r.stderr
    );
    assert_eq!(std::fs::read_to_string(&results).unwrap(), {
        let r = burnin(&["run", "--json", p(&f)]);
        r.stdout
    });
}

/// A `--csv` that is a folder or in a missing folder failed only after
/// the whole run: every output path is checked before running.
#[test]
fn every_output_path_is_checked_before_running() {
    let d = Scratch::new("outputs-checked-first");
    let f = experiment(&d, 20);
    let nowhere = d.0.join("no/such/folder/x.csv");
    for (flag, path, says) in [
        ("--csv", p(&d.0), "that is a folder".to_string()),
        (
            "--cells-csv",
            p(&nowhere),
            format!(
                "there is no folder {}",
                d.0.join("no/such/folder").display()
            ),
        ),
        (
            "--figure",
            p(&d.0.join("no/f.svg")),
            "there is no folder".to_string(),
        ),
    ] {
        let r = burnin(&["run", flag, path, p(&f)]);
        assert_eq!(r.code, 2, "{flag}: {}", r.stderr);
        assert!(r.stdout.is_empty(), "{flag}: nothing ran");
        assert!(
            r.stderr.starts_with(&format!("burnin: {flag} {path}: ")) && r.stderr.contains(&says),
            "{flag}: {}",
            r.stderr
        );
    }
    // generate, table and plot check theirs too.
    let r = burnin(&["generate", "bandit", "-o", p(&nowhere)]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert!(r.stderr.contains("there is no folder"), "{}", r.stderr);
}

/// Writes were not atomic: an output cut short (here by a file-size limit,
/// which ends the process mid-write as a full disk or an interrupt would)
/// replaced the old CSV by a file cut mid-row, and left a new curves CSV
/// beside the previous run's per-seed CSV. Each file is written to a
/// temporary name in its folder and renamed into place once all are
/// written, so the old files stay as they were.
#[cfg(target_os = "linux")]
#[test]
fn an_output_cut_short_leaves_the_old_files_as_they_were() {
    let d = Scratch::new("outputs-atomic");
    let f = experiment(&d, 3000);
    let curves = d.file("curves.csv", "the previous run's curves\n");
    let seeds = d.file("seeds.csv", "the previous run's seeds\n");
    let bin = env!("CARGO_BIN_EXE_burnin");
    // bash's ulimit -f counts kilobytes: 8 kB is less than either table (14 kB and 17 kB).
    let script = format!(
        "ulimit -f 8; exec {bin} run --csv {} --seeds-csv {} {}",
        p(&curves),
        p(&seeds),
        p(&f)
    );
    let out = Command::new("bash")
        .arg("-c")
        .arg(&script)
        .stdout(Stdio::piped())
        .stderr(Stdio::piped())
        .output()
        .unwrap();
    assert!(
        !out.status.success(),
        "the limit cut a table: {}",
        String::from_utf8_lossy(&out.stderr)
    );
    assert_eq!(
        std::fs::read_to_string(&curves).unwrap(),
        "the previous run's curves\n"
    );
    assert_eq!(
        std::fs::read_to_string(&seeds).unwrap(),
        "the previous run's seeds\n"
    );
    // Without the limit both are replaced, whole, and no temporary file
    // of that run is left.
    let before = names(&d.0);
    let r = burnin(&["run", "--csv", p(&curves), "--seeds-csv", p(&seeds), p(&f)]);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let c = std::fs::read_to_string(&curves).unwrap();
    assert!(
        c.starts_with("learner,algorithm,") && c.ends_with('\n'),
        "{c:.200}"
    );
    assert_eq!(names(&d.0), before);
}

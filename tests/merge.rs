//! Merges that cannot lie (#11, class 1): `burnin merge` refuses every shard
//! that does not prove it belongs to the experiment, or whose records are
//! not exactly that shard's runs in the experiment's shape, with a message
//! naming the file and the record; otherwise it merges to the bytes one run
//! gives (tests/cli.rs, `merged_shards_equal_a_single_run`). Each case is a
//! real shard from `burnin run --shard`, edited as a damaged file, an
//! earlier build or a careless hand would edit it.

mod common;

use common::{Scratch, burnin, p};
use serde_json::{Value, json};

/// The four shards of a small experiment (two learners, three seeds, a
/// model named by path), as JSON values.
fn shards(d: &Scratch) -> Vec<Value> {
    d.demo("night-ferry.json", "ferry.json");
    let f = d.file(
        "exp.json",
        r#"{"format": "burnin-experiment", "version": 1, "model_path": "ferry.json",
            "episodes": 60, "seeds": 3, "seed": 4, "eps_targets": [0.5],
            "learners": [{"algorithm": "ucbvi-hoeffding"}, {"algorithm": "psrl"}]}"#,
    );
    (1..=4)
        .map(|i| {
            let r = burnin(&["run", "--shard", &format!("{i}/4"), p(&f)]);
            assert_eq!(r.code, 0, "{}", r.stderr);
            serde_json::from_str(&r.stdout).unwrap()
        })
        .collect()
}

/// Merges `shards` written to files s1.json…; (exit code, stderr).
fn merge(d: &Scratch, shards: &[Value]) -> (i32, String) {
    let files: Vec<_> = shards
        .iter()
        .enumerate()
        .map(|(i, s)| d.file(&format!("s{}.json", i + 1), &s.to_string()))
        .collect();
    let mut args = vec!["merge"];
    args.extend(files.iter().map(|f| p(f)));
    let r = burnin(&args);
    assert!(r.code != 0 || r.stderr.is_empty(), "{}", r.stderr);
    (r.code, r.stderr)
}

/// Asserts that merging after `edit` exits 1 with a message containing `want`.
fn refused(d: &Scratch, base: &[Value], edit: impl FnOnce(&mut Vec<Value>), want: &str) {
    let mut s = base.to_vec();
    edit(&mut s);
    let (code, stderr) = merge(d, &s);
    assert_eq!(code, 1, "{want}: {stderr}");
    assert!(stderr.contains(want), "wanted {want:?} in:\n{stderr}");
}

/// Edits every shard's embedded experiment from 60 episodes to 50, and
/// makes its digest match the edited text when `redigest`.
fn fewer_episodes(s: &mut [Value], redigest: bool) {
    for x in s.iter_mut() {
        let t = x["experiment"]
            .as_str()
            .unwrap()
            .replace("\"episodes\": 60", "\"episodes\": 50");
        if redigest {
            x["digest"] = json!(burnin::experiment::text_digest(&t, x["model"].as_str()));
        }
        x["experiment"] = json!(t);
    }
}

#[test]
fn merge_refuses_every_inconsistent_shard() {
    let d = Scratch::new("merge-lies");
    let base = shards(&d);
    let (code, stderr) = merge(&d, &base);
    assert_eq!(code, 0, "the untouched shards merge: {stderr}");
    let rec = |s: &mut Vec<Value>, i: usize, j: usize| -> Value { s[i]["records"][j][1].take() };

    // A record out of range: a learner the experiment does not have.
    refused(
        &d,
        &base,
        |s| s[0]["records"][0][1]["learner"] = json!(7),
        "s1.json: records[0]: names learner 7 with seed index 0, but the experiment has 2 learners and 3 seeds",
    );
    refused(
        &d,
        &base,
        |s| s[1]["records"][0][0] = json!(3),
        "s2.json: records[0]: names sweep point 3, but the experiment has 1",
    );
    // A record duplicated inside one shard.
    refused(
        &d,
        &base,
        |s| {
            let r = s[0]["records"][0].clone();
            let n = s[0]["runs"][0].clone();
            s[0]["records"].as_array_mut().unwrap().push(r);
            s[0]["runs"].as_array_mut().unwrap().push(n);
        },
        "s1.json: records[2]: run 0 was already given in",
    );
    // A record missing.
    refused(
        &d,
        &base,
        |s| {
            s[2]["records"].as_array_mut().unwrap().remove(0);
            s[2]["runs"].as_array_mut().unwrap().remove(0);
        },
        "s3.json: lacks the run of learner 0 (\"ucbvi-hoeffding\"), seed index 2",
    );
    // A run moved into another shard's file.
    refused(
        &d,
        &base,
        |s| {
            let r = s[1]["records"][0].clone();
            s[0]["records"][0] = r;
        },
        "s1.json: records[0]: holds run 1, which belongs to shard 2 of 4, not 1",
    );
    // The listed run numbers disagree with the records.
    refused(
        &d,
        &base,
        |s| s[0]["runs"][1] = json!(0),
        "s1.json: records[1]: holds run 4, but the shard lists it as run 0",
    );
    // A curve shorter than the experiment says.
    refused(
        &d,
        &base,
        |s| {
            s[0]["records"][1][1]["regret"]
                .as_array_mut()
                .unwrap()
                .pop();
        },
        "s1.json: records[1]: regret has",
    );
    refused(
        &d,
        &base,
        |s| s[3]["records"][0][1]["within"] = json!([]),
        "s4.json: records[0]: within has 0 values; the experiment gives it 1",
    );
    // Counts that no run of the experiment can have.
    refused(
        &d,
        &base,
        |s| {
            let mut r = rec(s, 0, 0);
            r["visits"][0] = json!(r["visits"][0].as_u64().unwrap() + 1);
            s[0]["records"][0][1] = r;
        },
        "s1.json: records[0]: visits at step 1 add up to 61, not to the 60 episodes",
    );
    refused(
        &d,
        &base,
        |s| s[0]["records"][0][1]["last_above"] = json!([61]),
        "s1.json: records[0]: last_above holds 61, more than the 60 episodes",
    );
    // A seed that is not the run's.
    refused(
        &d,
        &base,
        |s| s[0]["records"][0][1]["seed"] = json!(12345),
        "s1.json: records[0]: has seed 12345, but the experiment gives that run seed",
    );
    // A field absent: named with its record.
    refused(
        &d,
        &base,
        |s| {
            s[1]["records"][1][1]
                .as_object_mut()
                .unwrap()
                .remove("visits");
        },
        "s2.json: not a shard file (records[1]: missing field `visits`",
    );
    // The embedded experiment edited (its digest no longer matches).
    refused(
        &d,
        &base,
        |s| fewer_episodes(s, false),
        "s1.json: its experiment or model text does not match the digest written with it",
    );
    // … and edited with the digest made to match: the records do not fit it.
    refused(
        &d,
        &base,
        |s| fewer_episodes(s, true),
        "s1.json: records[0]: regret has 36 values; the experiment gives it 34",
    );
    // Written by a build that draws different numbers.
    refused(
        &d,
        &base,
        |s| s[2]["draws"] = json!("0123456789abcdef"),
        "s3.json: was written by a build that draws different numbers (draw stream 0123456789abcdef",
    );
    // An earlier build's shard (version 1, with none of the proofs).
    refused(
        &d,
        &base,
        |s| {
            s[0]["version"] = json!(1);
        },
        "s1.json: is a burnin-shard version 1 file, written by an older build",
    );
    // A fault naming a built-in learner, as if it had failed.
    refused(
        &d,
        &base,
        |s| {
            s[0]["faults"] = json!([{"learner": 1, "label": "PSRL", "seed_index": 0,
                "episode": 1, "message": "gone"}]);
        },
        "s1.json: faults[0]: names learner 1, which is not a guest learner of the experiment",
    );
}

/// An absurd shard count is refused before anything of its size is
/// allocated: both where shards are written and where they are merged.
#[test]
fn an_absurd_shard_count_is_refused_before_allocating() {
    let d = Scratch::new("merge-count");
    let base = shards(&d);
    refused(
        &d,
        &base[..1],
        |s| s[0]["of"] = json!(1u64 << 60),
        "s1.json: says it is one of 1152921504606846976 shards; an experiment is split into 1 to 100000",
    );
    let r = burnin(&["run", "--shard", "1/100001", p(&d.0.join("exp.json"))]);
    assert_eq!(r.code, 2, "{}", r.stderr);
    assert_eq!(
        r.stderr,
        "burnin: --shard 1/100001: an experiment is split into 1 to 100000 shards\n"
    );
    // More shards than runs: the extra shards hold none, and the merge of
    // all eight is exact.
    let mut files = Vec::new();
    for i in 1..=8 {
        let r = burnin(&[
            "run",
            "--shard",
            &format!("{i}/8"),
            p(&d.0.join("exp.json")),
        ]);
        assert_eq!(r.code, 0, "{}", r.stderr);
        files.push(d.file(&format!("e{i}.json"), &r.stdout));
    }
    let mut args = vec!["merge", "--json"];
    args.extend(files.iter().map(|f| p(f)));
    let merged = burnin(&args);
    assert_eq!(merged.code, 0, "{}", merged.stderr);
    let whole = burnin(&["run", "--json", p(&d.0.join("exp.json"))]);
    assert_eq!(merged.stdout, whole.stdout);
}

/// #35 §4: forged records with regret 10³⁰⁸ merged with exit 0 into
/// results carrying null (infinite intervals). A record's numbers must be
/// finite and within the model format's ±1e300; within it, the intervals
/// stay finite (a standard deviation's squares would overflow past 10¹⁵⁴)
/// and every number written is a number.
#[test]
fn forged_huge_values_are_refused_or_summarised_finitely() {
    let d = Scratch::new("merge-huge");
    let base = shards(&d);
    let n = base[0]["records"][0][1]["regret"].as_array().unwrap().len();
    refused(
        &d,
        &base,
        |s| s[0]["records"][0][1]["regret"] = json!(vec![1e308; n]),
        "s1.json: records[0]: regret[0] is 1e308, not a finite number within ±1e300",
    );
    refused(
        &d,
        &base,
        |s| s[1]["records"][0][1]["returns"][2] = json!(-1.5e300),
        "s2.json: records[0]: returns[2] is -1.5e300, not a finite number within ±1e300",
    );
    let mut s = base.to_vec();
    s[0]["records"][0][1]["regret"] = json!(vec![1e300; n]);
    let files: Vec<_> = s
        .iter()
        .enumerate()
        .map(|(i, x)| d.file(&format!("h{}.json", i + 1), &x.to_string()))
        .collect();
    let mut args = vec!["merge", "--json"];
    args.extend(files.iter().map(|f| p(f)));
    let r = burnin(&args);
    assert_eq!(r.code, 0, "{}", r.stderr);
    let v: Value = serde_json::from_str(&r.stdout).unwrap();
    for l in v["learners"].as_array().unwrap() {
        for key in ["regret_mean", "regret_lo", "regret_hi"] {
            assert!(
                l[key].as_array().unwrap().iter().all(Value::is_number),
                "{key}: {}",
                l[key]
            );
        }
    }
    for c in v["comparisons"].as_array().unwrap() {
        for key in ["difference_lo", "difference_hi"] {
            assert!(
                c[key].as_array().unwrap().iter().all(Value::is_number),
                "{key}"
            );
        }
        assert!(c["at_k"]["lo"].is_number() && c["at_k"]["hi"].is_number());
    }
    // What merge writes, plot and table read back.
    let results = d.file("huge-results.json", &r.stdout);
    let svg = d.0.join("huge.svg");
    assert_eq!(burnin(&["plot", p(&results), "-o", p(&svg)]).code, 0);
    assert_eq!(burnin(&["table", p(&results)]).code, 0);
}

//! The Kubernetes recipe of docs/array-jobs.md (#18): its YAML is a batch/v1
//! Indexed Job as the Kubernetes API reference describes one (JobSpec,
//! PodSpec and Container fields), and its shell command line, run for every
//! completion index with the volume a scratch folder, gives shards that
//! merge into exactly one `burnin run`. (The Slurm recipe runs on a real
//! Slurm: tests/slurm/check.sh, called by `cargo xtask test`.)

mod common;

use common::{Scratch, burnin};
use serde_yaml::Value;
use std::path::Path;

/// The first ```yaml block of docs/array-jobs.md.
fn recipe() -> String {
    let md =
        std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/array-jobs.md"))
            .unwrap();
    md.split("```yaml\n")
        .nth(1)
        .and_then(|rest| rest.split("\n```").next())
        .expect("a yaml block in docs/array-jobs.md")
        .to_owned()
}

/// The keys of mapping `v` (at `path`) are among `known` and include `required`.
fn keys(v: &Value, path: &str, known: &[&str], required: &[&str]) {
    let m = v
        .as_mapping()
        .unwrap_or_else(|| panic!("{path}: a mapping"));
    for k in m.keys() {
        let k = k.as_str().unwrap_or_else(|| panic!("{path}: string keys"));
        assert!(known.contains(&k), "{path}.{k}: not a field of this object");
    }
    for r in required {
        assert!(m.contains_key(*r), "{path}.{r}: required");
    }
}

/// A DNS-1123 label, as Kubernetes names must be (at most 63 characters,
/// lower-case letters, digits and '-', starting and ending alphanumeric).
fn dns_label(s: &str) -> bool {
    !s.is_empty()
        && s.len() <= 63
        && s.chars()
            .all(|c| c.is_ascii_lowercase() || c.is_ascii_digit() || c == '-')
        && !s.starts_with('-')
        && !s.ends_with('-')
}

#[test]
fn the_kubernetes_recipe_is_an_indexed_job_whose_command_merges_exactly() {
    let job: Value = serde_yaml::from_str(&recipe()).expect("the recipe is YAML");
    // Kubernetes API reference, Job (batch/v1): the fields the recipe uses.
    keys(
        &job,
        "",
        &["apiVersion", "kind", "metadata", "spec"],
        &["apiVersion", "kind", "metadata", "spec"],
    );
    assert_eq!(job["apiVersion"], "batch/v1");
    assert_eq!(job["kind"], "Job");
    assert!(dns_label(job["metadata"]["name"].as_str().unwrap()));
    let spec = &job["spec"];
    keys(
        spec,
        "spec",
        &[
            "completions",
            "parallelism",
            "completionMode",
            "template",
            "backoffLimit",
            "backoffLimitPerIndex",
            "activeDeadlineSeconds",
        ],
        &["template", "completions", "completionMode"],
    );
    // An Indexed Job needs a number of completions; each pod gets its
    // index in JOB_COMPLETION_INDEX, 0 … completions − 1.
    assert_eq!(spec["completionMode"], "Indexed");
    let n = spec["completions"]
        .as_u64()
        .expect("completions: a whole number");
    assert!(n >= 1);
    let parallelism = spec["parallelism"].as_u64().unwrap_or(1);
    assert!(
        (1..=n).contains(&parallelism),
        "parallelism within 1 … completions"
    );
    let pod = &spec["template"]["spec"];
    keys(
        pod,
        "spec.template.spec",
        &["restartPolicy", "containers", "volumes"],
        &["restartPolicy", "containers"],
    );
    // A Job's pods may not restart Always.
    assert!(["OnFailure", "Never"].contains(&pod["restartPolicy"].as_str().unwrap()));
    let containers = pod["containers"].as_sequence().expect("containers: a list");
    assert_eq!(containers.len(), 1);
    let c = &containers[0];
    keys(
        c,
        "containers[0]",
        &[
            "name",
            "image",
            "command",
            "args",
            "resources",
            "volumeMounts",
            "env",
        ],
        &["name", "image"],
    );
    assert!(dns_label(c["name"].as_str().unwrap()));
    assert!(!c["image"].as_str().unwrap().is_empty());
    let command: Vec<&str> = c["command"]
        .as_sequence()
        .unwrap()
        .iter()
        .map(|x| x.as_str().unwrap())
        .collect();
    assert_eq!(
        command,
        ["/bin/sh", "-c"],
        "the line runs through the shell"
    );
    let line = c["args"][0].as_str().expect("args[0]: the command line");
    assert!(line.contains("JOB_COMPLETION_INDEX"), "{line}");
    assert!(
        line.contains(&format!("/{n}\"")),
        "the shard count is the completions, {n}: {line}"
    );
    let mounts = c["volumeMounts"].as_sequence().unwrap();
    let volumes = pod["volumes"].as_sequence().unwrap();
    for m in mounts {
        assert!(
            volumes.iter().any(|v| v["name"] == m["name"]),
            "volume mount {:?} names a volume of the pod",
            m["name"]
        );
    }
    assert_eq!(mounts[0]["mountPath"], "/data");

    // The command line itself, for every index, with /data a scratch folder.
    let d = Scratch::new("k8s");
    let data = d.0.join("data");
    std::fs::create_dir_all(data.join("shards")).unwrap();
    let exp = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/slurm/experiment.json");
    std::fs::copy(&exp, data.join("experiment.json")).unwrap();
    let bin = Path::new(env!("CARGO_BIN_EXE_burnin")).parent().unwrap();
    let path = format!(
        "{}:{}",
        bin.display(),
        std::env::var("PATH").unwrap_or_default()
    );
    let line = line.replace("/data", data.to_str().unwrap());
    for i in 0..n {
        let out = std::process::Command::new(command[0])
            .args(&command[1..])
            .arg(&line)
            .env("JOB_COMPLETION_INDEX", i.to_string())
            .env("PATH", &path)
            .output()
            .unwrap();
        assert!(
            out.status.success(),
            "index {i}: {}",
            String::from_utf8_lossy(&out.stderr)
        );
    }
    let mut shards: Vec<String> = std::fs::read_dir(data.join("shards"))
        .unwrap()
        .map(|e| e.unwrap().path().to_str().unwrap().to_owned())
        .collect();
    shards.sort();
    assert_eq!(
        shards.len() as u64,
        n,
        "one shard file per index, no .part left"
    );
    let mut args = vec!["merge", "--json"];
    args.extend(shards.iter().map(String::as_str));
    let merged = burnin(&args);
    assert_eq!(merged.code, 0, "{}", merged.stderr);
    let whole = burnin(&[
        "run",
        "--json",
        data.join("experiment.json").to_str().unwrap(),
    ]);
    assert_eq!(whole.code, 0, "{}", whole.stderr);
    assert_eq!(
        merged.stdout, whole.stdout,
        "the merged shards are one run, byte for byte"
    );
}

//! `cargo xtask dist DIR`: the page as a self-contained static site, for
//! any static host at any sub-path (every link in it is relative).
//!
//! It holds the page and its modules, the wasm core, the demo models, the
//! example learner modules, the web app manifest and icons, `build.json`
//! (the build identity and the file list) and `sw.js`, the service worker
//! that keeps exactly these files for offline use, in a cache named by the
//! digest of their bytes: a changed build is a new cache, offered to the
//! page as "a newer version is available".

use std::path::{Path, PathBuf};

use crate::{Result, build_wasm, step};

/// Files of `www/` that are development tools, not the page.
const NOT_PUBLISHED: [&str; 3] = ["bench.html", "bench.js", "bench-worker.js"];

/// 64-bit FNV-1a (as src/format/digest.rs; xtask has no dependencies).
fn fnv(h: u64, bytes: &[u8]) -> u64 {
    bytes.iter().fold(h, |h, &b| {
        (h ^ b as u64).wrapping_mul(0x0000_0100_0000_01b3)
    })
}

/// Every file under `dir`, as paths relative to it with '/', sorted.
fn files(dir: &Path, at: &Path, out: &mut Vec<String>) -> Result<()> {
    for e in std::fs::read_dir(at).map_err(|e| format!("{}: {e}", at.display()))? {
        let p = e.map_err(|e| e.to_string())?.path();
        let rel = p
            .strip_prefix(dir)
            .unwrap()
            .to_string_lossy()
            .replace('\\', "/");
        if rel.starts_with('.') || rel.contains("/.") {
            continue;
        }
        if p.is_dir() {
            files(dir, &p, out)?;
        } else {
            out.push(rel);
        }
    }
    out.sort();
    Ok(())
}

/// Whether `rel` (a file of www/) belongs to the published page.
fn published(rel: &str) -> bool {
    if NOT_PUBLISHED.contains(&rel) {
        return false;
    }
    match rel.strip_prefix("pkg/") {
        Some(f) => f == "burnin.js" || f == "burnin_bg.wasm",
        None => true,
    }
}

pub fn dist_cmd(args: &[String]) -> Result<()> {
    let (dir, note) = match args {
        [dir] => (dir, None),
        [dir, flag, note] if flag == "--note" => (dir, Some(note.as_str())),
        _ => return Err("usage: cargo xtask dist DIR [--note TEXT]".into()),
    };
    let dir = PathBuf::from(dir);
    let www = build_wasm()?;
    crate::run(crate::cargo().args(["build", "--bin", "burnin"]))?;
    write_dist(&www, &dir, note)?;
    println!(
        "wrote the static site to {} (serve it with .wasm as application/wasm; README, \"Publishing the page\")",
        dir.display()
    );
    Ok(())
}

/// Writes the site into `dir`. `note` (`--note TEXT`; the browser checks'
/// "a newer build is published") adds `publish-note.txt`, and so makes a
/// distinct build of the same page.
/// `www` is the built page (`build_wasm`), and target/debug/burnin the
/// CLI built from the same sources (it says the build identity).
pub fn write_dist(www: &Path, dir: &Path, note: Option<&str>) -> Result<()> {
    step(&format!("writing the static site to {}", dir.display()));
    if dir.exists() {
        // Only a folder that is empty or an earlier dist is replaced.
        let earlier = dir.join("build.json").is_file() && dir.join("sw.js").is_file();
        let empty = std::fs::read_dir(dir)
            .map_err(|e| e.to_string())?
            .next()
            .is_none();
        if !earlier && !empty {
            return Err(format!(
                "{} is not empty and holds no earlier Burnin site; give a new folder",
                dir.display()
            ));
        }
        std::fs::remove_dir_all(dir).map_err(|e| e.to_string())?;
    }
    std::fs::create_dir_all(dir).map_err(|e| e.to_string())?;
    let mut all = Vec::new();
    files(www, www, &mut all)?;
    let mut list: Vec<String> = all.into_iter().filter(|f| published(f)).collect();
    let build = crate::output(
        std::process::Command::new(crate::target_dir().join("debug/burnin")).arg("--version"),
    )
    .map(|v| v.trim().trim_start_matches("burnin ").to_string())
    .ok_or("cannot read the build identity from target/debug/burnin --version")?;
    let mut digest = 0xcbf2_9ce4_8422_2325u64;
    for rel in &list {
        let to = dir.join(rel);
        std::fs::create_dir_all(to.parent().unwrap()).map_err(|e| e.to_string())?;
        let mut bytes = std::fs::read(www.join(rel)).map_err(|e| format!("{rel}: {e}"))?;
        if rel == "index.html" {
            // The mark that makes the page keep itself for offline use.
            let text = String::from_utf8(bytes).map_err(|e| e.to_string())?;
            let marked = text.replacen(
                "<meta charset=\"utf-8\">",
                &format!(
                    "<meta charset=\"utf-8\">\n  <meta name=\"burnin-dist\" content=\"{build}\">"
                ),
                1,
            );
            if marked == text {
                return Err("www/index.html lost its <meta charset=\"utf-8\">".into());
            }
            bytes = marked.into_bytes();
        }
        digest = fnv(fnv(digest, rel.as_bytes()), &bytes);
        std::fs::write(&to, &bytes).map_err(|e| e.to_string())?;
    }
    if let Some(n) = note {
        std::fs::write(dir.join("publish-note.txt"), n).map_err(|e| e.to_string())?;
        digest = fnv(fnv(digest, b"publish-note.txt"), n.as_bytes());
        list.push("publish-note.txt".into());
    }
    let version = format!("{build}-{:08x}", digest >> 32);
    let mut cached = vec!["./".to_string()];
    cached.extend(list.iter().cloned());
    let quoted: Vec<String> = cached.iter().map(|f| format!("\"{f}\"")).collect();
    let sw = include_str!("sw.js")
        .replace("@VERSION@", &version)
        .replace("@FILES@", &format!("[{}]", quoted.join(", ")));
    std::fs::write(dir.join("sw.js"), sw).map_err(|e| e.to_string())?;
    std::fs::write(
        dir.join("build.json"),
        format!(
            "{{\"build\": \"{build}\", \"version\": \"{version}\", \"files\": [{}]}}\n",
            quoted.join(", ")
        ),
    )
    .map_err(|e| e.to_string())?;
    Ok(())
}

//! Build identity: a short digest of the core's source, so that the page,
//! `burnin --version` and every results file can say which build made
//! them. The same sources give the same digest natively and in wasm.

#[path = "src/format/digest.rs"]
#[allow(dead_code)]
mod digest;

use std::path::{Path, PathBuf};

fn sources(dir: &Path, out: &mut Vec<PathBuf>) {
    let mut entries: Vec<PathBuf> = std::fs::read_dir(dir)
        .expect("src/ is readable")
        .map(|e| e.expect("a directory entry").path())
        .collect();
    entries.sort();
    for p in entries {
        if p.is_dir() {
            // The CLI is a front end, not the core.
            if !p.ends_with("bin") {
                sources(&p, out);
            }
        } else if p.extension().is_some_and(|x| x == "rs") {
            out.push(p);
        }
    }
}

fn main() {
    println!("cargo:rerun-if-changed=src");
    let mut files = Vec::new();
    sources(Path::new("src"), &mut files);
    let texts: Vec<(String, Vec<u8>)> = files
        .iter()
        .map(|p| {
            // Paths with '/' and text without '\r', so every platform agrees.
            let name = p.to_string_lossy().replace('\\', "/");
            let bytes: Vec<u8> = std::fs::read(p)
                .expect("a readable source file")
                .into_iter()
                .filter(|&b| b != b'\r')
                .collect();
            (name, bytes)
        })
        .collect();
    let parts: Vec<&[u8]> = texts
        .iter()
        .flat_map(|(n, b)| [n.as_bytes(), b.as_slice()])
        .collect();
    let digest = digest::hex_digest(&parts);
    println!("cargo:rustc-env=BURNIN_CORE_DIGEST={}", &digest[..8]);
}

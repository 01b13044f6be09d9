//! What every command shares: how a command fails (and so its exit code),
//! reading input files and standard input, writing standard output.

use std::io::{Read, Write};
use std::path::Path;

use burnin::model::limits::MAX_FILE_BYTES;
use burnin::{Mdp, Problems};

/// How a command failed, and so its exit code.
pub enum Failure {
    /// The input is invalid (exit 1); each line already says what and where.
    Invalid(Vec<String>),
    /// Usage or I/O (exit 2).
    Io(String),
    /// A guest learner failed (exit 3).
    Guest(String),
}

/// Refuses to start when standard output is closed (`burnin run x.json >&-`),
/// rather than compute for hours and print into nothing with exit status 0.
///
/// Rust's runtime reopens a closed standard output on /dev/null before
/// `main`, read and write; a shell's `> /dev/null` opens it write-only. So
/// on Linux a standard output that is /dev/null opened for reading and
/// writing is taken as closed (read from /proc/self; elsewhere nothing is
/// checked).
pub fn stdout_is_open() -> Result<(), Failure> {
    let target = std::fs::read_link("/proc/self/fd/1");
    let flags = std::fs::read_to_string("/proc/self/fdinfo/1");
    let (Ok(target), Ok(flags)) = (target, flags) else {
        return Ok(());
    };
    let mode = flags
        .lines()
        .find_map(|l| l.strip_prefix("flags:"))
        .and_then(|f| u32::from_str_radix(f.trim(), 8).ok())
        .map(|f| f & 0o3);
    // O_ACCMODE = 0o3, O_RDWR = 0o2 (Linux).
    if target == Path::new("/dev/null") && mode == Some(0o2) {
        return Err(Failure::Io(
            "standard output is closed; nothing could be printed: send it to a file with > FILE"
                .into(),
        ));
    }
    Ok(())
}

/// Writes to stdout. A pipe closed before everything was written
/// (`burnin run x.json | head -1`) is an error: what was not written is lost.
pub fn emit(text: &str) -> Result<(), Failure> {
    let mut out = std::io::stdout().lock();
    out.write_all(text.as_bytes())
        .and_then(|_| out.flush())
        .map_err(|e| {
            Failure::Io(format!(
                "cannot write to standard output ({e}); the output is incomplete"
            ))
        })
}

/// Reads a file (or stdin for "-") as text, refusing files over the size limit
/// before reading them whole.
pub fn read_text(path: &Path) -> Result<String, Failure> {
    let name = path.display();
    let mut bytes = Vec::new();
    let limit = MAX_FILE_BYTES as u64 + 1;
    let res = if path.as_os_str() == "-" {
        std::io::stdin().lock().take(limit).read_to_end(&mut bytes)
    } else {
        std::fs::File::open(path).and_then(|f| f.take(limit).read_to_end(&mut bytes))
    };
    res.map_err(|e| Failure::Io(format!("cannot read {name}: {e}")))?;
    if bytes.len() > MAX_FILE_BYTES {
        return Err(Failure::Invalid(vec![format!(
            "{name}: file is over the limit of {MAX_FILE_BYTES} bytes"
        )]));
    }
    String::from_utf8(bytes).map_err(|e| {
        Failure::Invalid(vec![format!(
            "{name}: not UTF-8 text (invalid byte at offset {})",
            e.utf8_error().valid_up_to()
        )])
    })
}

pub fn invalid(p: Problems) -> Failure {
    Failure::Invalid(p.lines())
}

/// The problems of a results file, each line naming the file.
pub fn invalid_in(file: &Path, p: Problems) -> Failure {
    Failure::Invalid(
        p.lines()
            .into_iter()
            .map(|l| format!("{}: {l}", file.display()))
            .collect(),
    )
}

/// A model file (or standard input), read and checked.
pub fn load(path: &Path) -> Result<Mdp, Failure> {
    burnin::parse_model(&read_text(path)?).map_err(invalid)
}

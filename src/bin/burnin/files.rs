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
    } else if std::fs::metadata(path).is_ok_and(|m| !m.is_file() && !m.is_dir()) {
        bytes = read_special(path, limit)?;
        Ok(bytes.len())
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

/// Seconds a named pipe (FIFO) or device given as a file may take to
/// open: opening a FIFO waits for a writer, and none may ever come.
const OPEN_SECONDS: u64 = 10;

/// Reads a file that is not a regular file (a pipe from `<(…)`, a FIFO, a
/// device) on a thread of its own, so that a FIFO nobody writes to is an
/// error after `OPEN_SECONDS`, not a wait without end (#35).
fn read_special(path: &Path, limit: u64) -> Result<Vec<u8>, Failure> {
    let name = path.display().to_string();
    let (opened_tx, opened) = std::sync::mpsc::channel::<()>();
    let (done_tx, done) = std::sync::mpsc::channel();
    let owned = path.to_path_buf();
    std::thread::spawn(move || {
        let res = std::fs::File::open(&owned).and_then(|f| {
            let _ = opened_tx.send(());
            let mut bytes = Vec::new();
            f.take(limit).read_to_end(&mut bytes).map(|_| bytes)
        });
        let _ = done_tx.send(res);
    });
    let wait = std::time::Duration::from_secs(OPEN_SECONDS);
    match opened.recv_timeout(wait) {
        Ok(()) | Err(std::sync::mpsc::RecvTimeoutError::Disconnected) => {}
        Err(std::sync::mpsc::RecvTimeoutError::Timeout) => {
            return Err(Failure::Io(format!(
                "cannot read {name}: it is not a regular file, and nothing opened it for writing within {OPEN_SECONDS} s (a named pipe with no writer?)"
            )));
        }
    }
    done.recv()
        .unwrap_or_else(|_| Err(std::io::Error::other("the reader stopped")))
        .map_err(|e| Failure::Io(format!("cannot read {name}: {e}")))
}

/// A model file named inside another file (`model_path`): a regular file,
/// never a device, a pipe or standard input — a colleague's experiment
/// must not make Burnin wait on a FIFO or read the terminal (#35).
pub fn read_named_file(path: &Path) -> Result<String, Failure> {
    let under_dev = path.starts_with("/dev") || path.starts_with("/proc");
    match std::fs::metadata(path) {
        Ok(m) if !m.is_file() || under_dev => Err(Failure::Invalid(vec![format!(
            "{}: not a regular file; name a model file",
            path.display()
        )])),
        _ => read_text(path),
    }
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

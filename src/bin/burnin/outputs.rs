//! Output files: every path checked before a command runs, and every file
//! written to a temporary name beside it and renamed into place, so that
//! a full disk or an interrupt never leaves an output cut (#35).

use std::io::Write;
use std::path::Path;

use crate::files::Failure;

/// A file's device and inode.
type FileId = (u64, u64);

/// A file's identity: its device and inode, so that a hard link, a symbolic
/// link or /dev/stdin is recognised as the file it is.
#[cfg(unix)]
fn identity(m: &std::fs::Metadata) -> Option<(u64, u64)> {
    use std::os::unix::fs::MetadataExt;
    Some((m.dev(), m.ino()))
}

#[cfg(not(unix))]
fn identity(_: &std::fs::Metadata) -> Option<(u64, u64)> {
    None
}

/// The identity of an input: the file, or for "-" whatever standard input is.
fn input_identity(path: &Path) -> Option<(u64, u64)> {
    if path.as_os_str() == "-" {
        #[cfg(unix)]
        {
            use std::os::fd::AsFd;
            let fd = std::io::stdin().as_fd().try_clone_to_owned().ok()?;
            return identity(&std::fs::File::from(fd).metadata().ok()?);
        }
        #[cfg(not(unix))]
        return None;
    }
    identity(&std::fs::metadata(path).ok()?)
}

/// Where a path will be written: its folder resolved (links followed), so
/// that two spellings of one file compare equal before the file exists.
fn resolved(path: &Path) -> Option<std::path::PathBuf> {
    if let Ok(p) = std::fs::canonicalize(path) {
        return Some(p);
    }
    let folder = match path.parent() {
        Some(f) if !f.as_os_str().is_empty() => f,
        _ => Path::new("."),
    };
    Some(std::fs::canonicalize(folder).ok()?.join(path.file_name()?))
}

/// Checks every output path of a command before anything runs: each names
/// a file (not a folder) in a folder that exists and can be written, no
/// two name the same file, and none is one of the inputs (compared by
/// device and inode, so a hard link or /dev/stdin is caught too).
/// `outputs` pairs each path with the option that gave it; `what` names
/// the inputs in the message ("an input file", "the results file").
pub fn check_outputs(
    outputs: &[(&str, &Path)],
    inputs: &[&Path],
    what: &str,
) -> Result<(), Failure> {
    let ids: Vec<(u64, u64)> = inputs.iter().filter_map(|p| input_identity(p)).collect();
    let mut seen: Vec<(&str, std::path::PathBuf, Option<FileId>)> = Vec::new();
    for &(flag, path) in outputs {
        let at = |why: &str| Failure::Io(format!("{flag} {}: {why}", path.display()));
        let meta = std::fs::metadata(path).ok();
        if meta.as_ref().is_some_and(|m| m.is_dir()) {
            return Err(at("that is a folder; name a file"));
        }
        let id = meta.as_ref().and_then(identity);
        if id.is_some_and(|i| ids.contains(&i)) {
            return Err(at(&format!(
                "that is {what}, which this output would overwrite; choose another path"
            )));
        }
        let folder = match path.parent() {
            Some(f) if !f.as_os_str().is_empty() => f,
            _ => Path::new("."),
        };
        if !folder.is_dir() {
            return Err(at(&format!("there is no folder {}", folder.display())));
        }
        if meta
            .as_ref()
            .is_some_and(|m| m.is_file() && m.permissions().readonly())
        {
            return Err(at("the file is read-only; choose another path"));
        }
        let place = resolved(path).unwrap_or_else(|| path.to_path_buf());
        for (other, p, i) in &seen {
            if *p == place || (id.is_some() && id == *i) {
                return Err(at(&format!(
                    "{other} names the same file; give each output its own path"
                )));
            }
        }
        if meta.as_ref().is_none_or(|m| m.is_file()) {
            // The folder must take the temporary file the output is written to.
            let probe = Staged::create(path).map_err(|e| at(&e))?;
            drop(probe);
        }
        seen.push((flag, place, id));
    }
    Ok(())
}

/// An output written under a temporary name in its own folder, put in
/// place by `commit` (a rename, which replaces the old file at once): a
/// full disk or an interrupt while writing leaves the old file as it was.
/// Dropped without `commit`, the temporary file is removed.
pub struct Staged {
    temp: Option<std::path::PathBuf>,
    dest: std::path::PathBuf,
    shown: std::path::PathBuf,
    file: Option<std::fs::File>,
}

impl Staged {
    /// Creates the temporary file beside `path` (beside the file a link
    /// points to, when `path` is a symbolic link to an existing file).
    fn create(path: &Path) -> Result<Staged, String> {
        let dest = std::fs::canonicalize(path).unwrap_or_else(|_| path.to_path_buf());
        let name = dest
            .file_name()
            .map(|n| n.to_string_lossy().into_owned())
            .ok_or_else(|| "that names no file; name a file".to_string())?;
        let folder = match dest.parent() {
            Some(f) if !f.as_os_str().is_empty() => f.to_path_buf(),
            _ => std::path::PathBuf::from("."),
        };
        let mut last = None;
        for n in 0..100 {
            let temp = folder.join(format!(".{name}.{}-{n}.burnin-part", std::process::id()));
            match std::fs::OpenOptions::new()
                .write(true)
                .create_new(true)
                .open(&temp)
            {
                Ok(file) => {
                    return Ok(Staged {
                        temp: Some(temp),
                        dest,
                        shown: path.to_path_buf(),
                        file: Some(file),
                    });
                }
                Err(e) if e.kind() == std::io::ErrorKind::AlreadyExists => last = Some(e),
                Err(e) => {
                    return Err(format!(
                        "cannot write in the folder {} ({e})",
                        folder.display()
                    ));
                }
            }
        }
        Err(format!(
            "cannot write in the folder {} ({})",
            folder.display(),
            last.map_or_else(String::new, |e| e.to_string())
        ))
    }

    /// Writes `bytes` to a temporary file beside `path`, to the disk.
    pub fn write(path: &Path, bytes: &[u8]) -> Result<Staged, String> {
        let cannot = |e: std::io::Error| format!("cannot write {}: {e}", path.display());
        let mut s =
            Staged::create(path).map_err(|e| format!("cannot write {}: {e}", path.display()))?;
        let mut file = s.file.take().expect("a new file");
        file.write_all(bytes).map_err(cannot)?;
        if let Ok(old) = std::fs::metadata(&s.dest) {
            let _ = file.set_permissions(old.permissions());
        }
        file.sync_all().map_err(cannot)?;
        Ok(s)
    }

    /// Puts the file in place, replacing the old one.
    pub fn commit(mut self) -> Result<(), String> {
        let temp = self.temp.take().expect("not committed yet");
        std::fs::rename(&temp, &self.dest).map_err(|e| {
            let _ = std::fs::remove_file(&temp);
            format!("cannot write {}: {e}", self.shown.display())
        })
    }
}

impl Drop for Staged {
    fn drop(&mut self) {
        if let Some(t) = &self.temp {
            let _ = std::fs::remove_file(t);
        }
    }
}

/// Writes a regular output file (or a new one) to a temporary file beside
/// it, to be put in place by `commit`; anything else (/dev/null, a pipe)
/// is written at once, and `None` returned.
pub fn stage_output(path: &Path, bytes: &[u8]) -> Result<Option<Staged>, String> {
    if std::fs::metadata(path).is_ok_and(|m| !m.is_file()) {
        return std::fs::write(path, bytes)
            .map(|()| None)
            .map_err(|e| format!("cannot write {}: {e}", path.display()));
    }
    Staged::write(path, bytes).map(Some)
}

/// Writes a whole output file, never leaving it cut (`stage_output`).
pub fn write_output(path: &Path, bytes: &[u8]) -> Result<(), String> {
    match stage_output(path, bytes)? {
        Some(s) => s.commit(),
        None => Ok(()),
    }
}

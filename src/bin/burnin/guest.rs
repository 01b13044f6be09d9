//! Guest learners as processes: `burnin run --learner NAME=CMD` starts CMD
//! (through the shell, in a process group of its own) once per run and
//! speaks the guest protocol with it, one JSON object per line
//! (docs/formats.md, "Guest learners"): Burnin writes the introduction and
//! then each batch's trajectories to the process's standard input, and
//! reads one decision per line from its standard output. The process's
//! standard error is kept (its last lines, as bytes, each cut at a length)
//! for the message when it fails.
//!
//! A guest can neither hang nor flood a run: every wait on it ends at
//! `--learner-timeout` (writing a message, reading an answer, waiting for a
//! process that closed its output), at most one message waits to be
//! written and one answer is read ahead, and when its run ends, or it fails,
//! its whole process group is ended (whatever the shell or the guest
//! started), so no process outlives the run.
//!
//! A file names a guest; only the command line says what it runs.

use std::collections::{HashMap, VecDeque};
use std::time::{Duration, Instant};

use burnin::learn::{Batch, Decision, Guest, GuestHost, GuestIntro, Setting};

use crate::guest_process::{GuestProcess, Wait};

/// Lines of a guest's standard error kept for messages.
const STDERR_LINES: usize = 8;
/// Bytes kept of each of those lines; the rest of a longer line (or of
/// output that never ends its line) is dropped as it is read.
const STDERR_LINE_BYTES: usize = 400;

/// The guests given on the command line: name → shell command.
pub struct ProcessHost {
    pub commands: HashMap<String, String>,
    /// How long a guest may take to answer one message.
    pub timeout: Duration,
}

impl GuestHost for ProcessHost {
    fn start(&self, name: &str, intro: &GuestIntro) -> Result<Box<dyn Guest>, String> {
        let cmd = self.commands.get(name).ok_or_else(|| {
            format!("no command for guest learner {name:?} (--learner {name}=CMD)")
        })?;
        ProcessGuest::start(cmd, intro, self.timeout).map(|g| Box::new(g) as Box<dyn Guest>)
    }
}

/// The end of a guest's standard error: its last lines, each cut at
/// [`STDERR_LINE_BYTES`], and the line it is writing.
#[derive(Default)]
pub struct Tail {
    lines: VecDeque<Vec<u8>>,
    current: Vec<u8>,
    cut: bool,
}

impl Tail {
    pub fn push(&mut self, bytes: &[u8]) {
        for part in bytes.split_inclusive(|&b| b == b'\n') {
            let (text, ends) = match part.strip_suffix(b"\n") {
                Some(t) => (t, true),
                None => (part, false),
            };
            let room = STDERR_LINE_BYTES.saturating_sub(self.current.len());
            if text.len() > room {
                self.cut = true;
            }
            self.current
                .extend_from_slice(&text[..text.len().min(room)]);
            if ends {
                self.end_line();
            }
        }
    }

    fn end_line(&mut self) {
        let mut line = std::mem::take(&mut self.current);
        if std::mem::take(&mut self.cut) {
            line.extend_from_slice("…".as_bytes());
        }
        if line.iter().all(u8::is_ascii_whitespace) {
            return;
        }
        if self.lines.len() == STDERR_LINES {
            self.lines.pop_front();
        }
        self.lines.push_back(line);
    }

    /// The lines as text: bytes that are not UTF-8 replaced, control
    /// characters escaped.
    pub fn quoted(&self) -> String {
        let mut current = self.current.clone();
        if self.cut {
            current.extend_from_slice("…".as_bytes());
        }
        let current = (!current.iter().all(u8::is_ascii_whitespace)).then_some(&current);
        self.lines
            .iter()
            .chain(current)
            .map(|l| {
                let mut out = String::new();
                for c in String::from_utf8_lossy(l).trim_end().chars() {
                    if c.is_control() && c != '\t' {
                        out.extend(c.escape_default());
                    } else {
                        out.push(c);
                    }
                }
                out
            })
            .collect::<Vec<_>>()
            .join(" | ")
    }
}

struct ProcessGuest {
    process: GuestProcess,
    intro: Option<String>,
    setting: Setting,
    timeout: Duration,
    /// Answers read so far.
    lines: u64,
    command: String,
}

impl ProcessGuest {
    fn start(cmd: &str, intro: &GuestIntro, timeout: Duration) -> Result<ProcessGuest, String> {
        Ok(ProcessGuest {
            process: GuestProcess::spawn(cmd)?,
            intro: Some(intro.to_json()),
            setting: intro.setting,
            timeout,
            lines: 0,
            command: cmd.to_owned(),
        })
    }

    /// The message for a process whose output (or input) closed before
    /// message `self.lines + 1` was answered: it has until `deadline` to
    /// end; one still running then is stopped.
    fn exited(&mut self, deadline: Instant, started: Instant) -> String {
        let ended = self.process.ended_by(deadline);
        let status = self.process.stop();
        if ended {
            format!(
                "`{}` ended ({status}) without answering message {}{}",
                self.command,
                self.lines + 1,
                self.process.stderr_tail()
            )
        } else {
            format!(
                "`{}` closed its output without answering message {} and was still running {:.0} s later; it was stopped{}",
                self.command,
                self.lines + 1,
                started.elapsed().as_secs_f64(),
                self.process.stderr_tail()
            )
        }
    }
}

/// The start of a line, for a message.
fn excerpt(line: &str) -> String {
    let t = line.trim_end();
    match t.char_indices().nth(80) {
        Some((i, _)) => format!("{:?}…", &t[..i]),
        None => format!("{t:?}"),
    }
}

impl Guest for ProcessGuest {
    fn decide(&mut self, batch: Batch<'_>) -> Result<Decision, String> {
        if self.process.reaped() {
            return Err(format!("`{}` was stopped", self.command));
        }
        let msg = match self.intro.take() {
            Some(intro) => intro,
            None => batch.to_json(),
        };
        let started = Instant::now();
        let deadline = started + self.timeout;
        match self.process.send(msg, deadline) {
            Ok(()) => {}
            Err(Wait::Closed) => return Err(self.exited(deadline, started)),
            Err(Wait::Late) => {
                self.process.stop();
                return Err(format!(
                    "`{}` did not read message {} within {:.0} s; it was stopped{}",
                    self.command,
                    self.lines + 1,
                    started.elapsed().as_secs_f64(),
                    self.process.stderr_tail()
                ));
            }
        }
        let line = match self.process.recv(deadline) {
            Ok(Ok(line)) => line,
            Ok(Err(e)) => return Err(format!("answer line {}: {e}", self.lines + 1)),
            Err(Wait::Closed) => return Err(self.exited(deadline, started)),
            Err(Wait::Late) => {
                self.process.stop();
                return Err(format!(
                    "`{}` gave no answer line {} within {:.0} s; it was stopped{}",
                    self.command,
                    self.lines + 1,
                    started.elapsed().as_secs_f64(),
                    self.process.stderr_tail()
                ));
            }
        };
        self.lines += 1;
        let v: serde_json::Value = serde_json::from_str(&line).map_err(|e| {
            format!(
                "answer line {} is not JSON ({e}): {}",
                self.lines,
                excerpt(&line)
            )
        })?;
        if let Some(k) = burnin::learn::repeated_key(&line) {
            return Err(format!(
                "answer line {}: {k:?} is given more than once",
                self.lines
            ));
        }
        Decision::from_json(&v, &self.setting)
            .and_then(|d| d.check(&self.setting, self.lines == 1).map(|()| d))
            .map_err(|e| format!("answer line {}: {e}", self.lines))
    }
}

/// Reads `NAME=CMD` options into a host.
pub fn host(options: &[String], timeout: Duration) -> Result<ProcessHost, String> {
    let mut commands = HashMap::new();
    for o in options {
        let Some((name, cmd)) = o.split_once('=') else {
            return Err(format!("--learner {o:?}: expected NAME=COMMAND"));
        };
        if !burnin::experiment::valid_guest_name(name) {
            return Err(format!(
                "--learner {o:?}: a guest's name is 1 to {} letters, digits, '_', '-' or '.'",
                burnin::experiment::MAX_GUEST_NAME
            ));
        }
        if cmd.trim().is_empty() {
            return Err(format!("--learner {o:?}: the command is empty"));
        }
        if commands.insert(name.to_owned(), cmd.to_owned()).is_some() {
            return Err(format!("--learner {name}: given twice"));
        }
    }
    Ok(ProcessHost { commands, timeout })
}

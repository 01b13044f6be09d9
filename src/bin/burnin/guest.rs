//! Guest learners as processes: `burnin run --learner NAME=CMD` starts CMD
//! (through the shell) once per run and speaks the guest protocol with it,
//! one JSON object per line (docs/formats.md, "Guest learners"): Burnin
//! writes the introduction and then each batch's trajectories to the
//! process's standard input, and reads one decision per line from its
//! standard output. The process's standard error is kept (its last lines)
//! for the message when it fails.
//!
//! A file names a guest; only the command line says what it runs.

use std::collections::{HashMap, VecDeque};
use std::io::{BufRead, BufReader, Read, Write};
use std::process::{Child, Command, Stdio};
use std::sync::mpsc::{self, Receiver, RecvTimeoutError, Sender};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use burnin::learn::{Batch, Decision, Guest, GuestHost, GuestIntro, Setting};

/// Lines of a guest's standard error kept for messages.
const STDERR_LINES: usize = 8;
/// Longest answer line read (a policy of the largest model is far shorter).
const MAX_LINE: usize = 256 << 20;

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

struct ProcessGuest {
    child: Child,
    /// Lines to write; the writer thread ends when this is dropped.
    to_child: Option<Sender<String>>,
    from_child: Receiver<Result<String, String>>,
    stderr: Arc<Mutex<VecDeque<String>>>,
    intro: Option<String>,
    setting: Setting,
    timeout: Duration,
    /// Answers read so far.
    lines: u64,
    command: String,
}

fn shell(cmd: &str) -> Command {
    if cfg!(windows) {
        let mut c = Command::new("cmd");
        c.arg("/C").arg(cmd);
        c
    } else {
        let mut c = Command::new("sh");
        c.arg("-c").arg(cmd);
        c
    }
}

impl ProcessGuest {
    fn start(cmd: &str, intro: &GuestIntro, timeout: Duration) -> Result<ProcessGuest, String> {
        let mut child = shell(cmd)
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .map_err(|e| format!("cannot start `{cmd}`: {e}"))?;
        let stdin = child.stdin.take().expect("piped");
        let stdout = child.stdout.take().expect("piped");
        let stderr = child.stderr.take().expect("piped");
        let (to_child, for_writer) = mpsc::channel::<String>();
        std::thread::spawn(move || {
            let mut w = std::io::BufWriter::new(stdin);
            for line in for_writer {
                if w.write_all(line.as_bytes()).is_err()
                    || w.write_all(b"\n").is_err()
                    || w.flush().is_err()
                {
                    break;
                }
            }
        });
        let (to_reader, from_child) = mpsc::channel();
        std::thread::spawn(move || {
            let mut r = BufReader::new(stdout);
            loop {
                let mut line = String::new();
                let got = Read::take(&mut r, MAX_LINE as u64).read_line(&mut line);
                let msg = match got {
                    Ok(0) => break,
                    Ok(_) if !line.ends_with('\n') && line.len() >= MAX_LINE => Err(format!(
                        "an answer line is longer than {} MB",
                        MAX_LINE >> 20
                    )),
                    Ok(_) => Ok(line),
                    Err(e) => Err(format!("cannot read its output: {e}")),
                };
                let stop = msg.is_err();
                if to_reader.send(msg).is_err() || stop {
                    break;
                }
            }
        });
        let tail = Arc::new(Mutex::new(VecDeque::new()));
        let keep = Arc::clone(&tail);
        std::thread::spawn(move || {
            for line in BufReader::new(stderr).lines() {
                let Ok(line) = line else { break };
                let mut t = keep.lock().expect("not poisoned");
                if t.len() == STDERR_LINES {
                    t.pop_front();
                }
                t.push_back(line);
            }
        });
        Ok(ProcessGuest {
            child,
            to_child: Some(to_child),
            from_child,
            stderr: tail,
            intro: Some(intro.to_json()),
            setting: intro.setting,
            timeout,
            lines: 0,
            command: cmd.to_owned(),
        })
    }

    /// What the process's standard error said last, for a message.
    fn stderr_tail(&self) -> String {
        // Give the stderr reader a moment to catch the process's last words.
        std::thread::sleep(Duration::from_millis(50));
        let t = self.stderr.lock().expect("not poisoned");
        if t.is_empty() {
            String::new()
        } else {
            format!(
                "; its last error output: {}",
                t.iter().cloned().collect::<Vec<_>>().join(" | ")
            )
        }
    }

    fn exited(&mut self) -> String {
        let status = match self.child.wait() {
            Ok(s) => s.to_string(),
            Err(e) => format!("unknown status ({e})"),
        };
        format!(
            "`{}` ended ({status}) without answering message {}{}",
            self.command,
            self.lines + 1,
            self.stderr_tail()
        )
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
        let msg = match self.intro.take() {
            Some(intro) => intro,
            None => batch.to_json(),
        };
        let sent = self.to_child.as_ref().is_some_and(|t| t.send(msg).is_ok());
        if !sent {
            return Err(self.exited());
        }
        let started = Instant::now();
        let line = match self.from_child.recv_timeout(self.timeout) {
            Ok(Ok(line)) => line,
            Ok(Err(e)) => return Err(format!("answer line {}: {e}", self.lines + 1)),
            Err(RecvTimeoutError::Disconnected) => return Err(self.exited()),
            Err(RecvTimeoutError::Timeout) => {
                let _ = self.child.kill();
                return Err(format!(
                    "`{}` gave no answer line {} within {:.0} s; it was stopped{}",
                    self.command,
                    self.lines + 1,
                    started.elapsed().as_secs_f64(),
                    self.stderr_tail()
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
        Decision::from_json(&v, &self.setting)
            .and_then(|d| d.check(&self.setting, self.lines == 1).map(|()| d))
            .map_err(|e| format!("answer line {}: {e}", self.lines))
    }
}

impl Drop for ProcessGuest {
    fn drop(&mut self) {
        // Closing its input tells the guest the run is over.
        self.to_child = None;
        let until = Instant::now() + Duration::from_secs(2);
        while Instant::now() < until {
            if let Ok(Some(_)) = self.child.try_wait() {
                return;
            }
            std::thread::sleep(Duration::from_millis(5));
        }
        let _ = self.child.kill();
        let _ = self.child.wait();
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

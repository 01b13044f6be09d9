//! A guest learner's process for `burnin run --learner` (the protocol is
//! spoken in `guest.rs`): started through the shell in a process group of
//! its own, fed and read by threads whose buffers are bounded, and ended
//! with its whole group.
//!
//! Bounds: at most one message waits to be written while one is being
//! written, one answer line is read ahead (the rest wait in the pipe, and
//! the guest blocks on it), and of its standard error, read as bytes to its
//! end, its last lines are kept ([`Tail`]). Every wait on the process
//! takes a deadline.

use std::io::{BufRead, BufReader, Read, Write};
use std::process::{Child, Command, Stdio};
use std::sync::mpsc::{self, Receiver, RecvTimeoutError, SyncSender, TrySendError};
use std::sync::{Arc, Mutex};
use std::time::{Duration, Instant};

use crate::guest::Tail;

/// Longest answer line read (a policy of the largest model is far shorter).
const MAX_LINE: usize = 256 << 20;
/// How long a guest has to end once its input is closed.
const GRACE: Duration = Duration::from_secs(2);

/// A running guest and the threads that feed and read it.
pub struct GuestProcess {
    child: Child,
    /// Messages to write (at most one waiting); the writer thread ends when
    /// this is dropped.
    to_child: Option<SyncSender<String>>,
    /// Answer lines (at most one read ahead).
    from_child: Receiver<Result<String, String>>,
    stderr: Arc<Mutex<Tail>>,
    /// The process has been ended and reaped.
    reaped: bool,
}

fn shell(cmd: &str) -> Command {
    if cfg!(windows) {
        let mut c = Command::new("cmd");
        c.arg("/C").arg(cmd);
        c
    } else {
        let mut c = Command::new("sh");
        c.arg("-c").arg(cmd);
        // Its own process group, so that ending the group ends whatever
        // the shell (dash keeps itself between) and the guest started.
        #[cfg(unix)]
        std::os::unix::process::CommandExt::process_group(&mut c, 0);
        c
    }
}

/// What to do when a wait on a guest ends without what was waited for.
pub enum Wait {
    /// The pipe is closed: the process ended or closed it.
    Closed,
    /// The deadline passed.
    Late,
}

impl GuestProcess {
    pub fn spawn(cmd: &str) -> Result<GuestProcess, String> {
        let mut child = shell(cmd)
            .stdin(Stdio::piped())
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .map_err(|e| format!("cannot start `{cmd}`: {e}"))?;
        crate::guest_groups::register(child.id());
        let stdin = child.stdin.take().expect("piped");
        let stdout = child.stdout.take().expect("piped");
        let mut stderr = child.stderr.take().expect("piped");
        // One message in the channel while the writer writes the one before:
        // a guest that does not read its input holds at most two batches.
        let (to_child, for_writer) = mpsc::sync_channel::<String>(1);
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
        // A rendezvous: the reader holds at most one answer it has read
        // until it is asked for; the rest wait in the pipe (the guest then
        // blocks on a full pipe).
        let (to_reader, from_child) = mpsc::sync_channel(0);
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
        // Standard error as bytes: any byte is kept (quoted lossily), and
        // the pipe is read to its end so the guest never blocks on it.
        let tail = Arc::new(Mutex::new(Tail::default()));
        let keep = Arc::clone(&tail);
        std::thread::spawn(move || {
            let mut buf = [0u8; 8192];
            loop {
                match stderr.read(&mut buf) {
                    Ok(0) => break,
                    Ok(n) => keep
                        .lock()
                        .unwrap_or_else(|e| e.into_inner())
                        .push(&buf[..n]),
                    Err(e) if e.kind() == std::io::ErrorKind::Interrupted => {}
                    Err(_) => break,
                }
            }
        });
        Ok(GuestProcess {
            child,
            to_child: Some(to_child),
            from_child,
            stderr: tail,
            reaped: false,
        })
    }

    /// Whether the process has been ended and reaped.
    pub fn reaped(&self) -> bool {
        self.reaped
    }

    /// The next answer line, by `deadline`.
    pub fn recv(&self, deadline: Instant) -> Result<Result<String, String>, Wait> {
        let wait = deadline.saturating_duration_since(Instant::now());
        self.from_child.recv_timeout(wait).map_err(|e| match e {
            RecvTimeoutError::Disconnected => Wait::Closed,
            RecvTimeoutError::Timeout => Wait::Late,
        })
    }

    /// What the process's standard error said last, for a message.
    pub fn stderr_tail(&self) -> String {
        // Give the stderr reader a moment to catch the process's last words.
        std::thread::sleep(Duration::from_millis(50));
        let t = self
            .stderr
            .lock()
            .unwrap_or_else(|e| e.into_inner())
            .quoted();
        if t.is_empty() {
            String::new()
        } else {
            format!("; its last error output: {t}")
        }
    }

    /// Hands `msg` to the writer by `deadline`.
    pub fn send(&self, mut msg: String, deadline: Instant) -> Result<(), Wait> {
        let Some(to) = &self.to_child else {
            return Err(Wait::Closed);
        };
        loop {
            match to.try_send(msg) {
                Ok(()) => return Ok(()),
                Err(TrySendError::Disconnected(_)) => return Err(Wait::Closed),
                Err(TrySendError::Full(m)) => {
                    if Instant::now() >= deadline {
                        return Err(Wait::Late);
                    }
                    msg = m;
                    std::thread::sleep(Duration::from_millis(2));
                }
            }
        }
    }

    /// Whether the process started (the group's leader) has ended, without
    /// reaping it (its id, and so its group's, stays taken until then).
    fn leader_ended(&mut self) -> bool {
        #[cfg(target_os = "linux")]
        {
            // SAFETY: waitid with WNOWAIT only reads the child's state into
            // a zeroed siginfo_t that we own.
            unsafe {
                let mut info: libc::siginfo_t = std::mem::zeroed();
                let r = libc::waitid(
                    libc::P_PID,
                    self.child.id() as libc::id_t,
                    &mut info,
                    libc::WEXITED | libc::WNOHANG | libc::WNOWAIT,
                );
                r != 0 || info.si_pid() != 0
            }
        }
        #[cfg(not(target_os = "linux"))]
        {
            !matches!(self.child.try_wait(), Ok(None))
        }
    }

    /// Waits until the process has ended or `deadline` passes.
    pub fn ended_by(&mut self, deadline: Instant) -> bool {
        loop {
            if self.leader_ended() {
                return true;
            }
            if Instant::now() >= deadline {
                return false;
            }
            std::thread::sleep(Duration::from_millis(5));
        }
    }

    /// Ends the process and everything in its group, and reaps it: its
    /// exit status.
    pub fn stop(&mut self) -> String {
        if !self.reaped {
            #[cfg(unix)]
            // SAFETY: kill only sends a signal; the group's id is the
            // unreaped leader's, so it names no other process.
            unsafe {
                libc::kill(-(self.child.id() as libc::pid_t), libc::SIGKILL);
            }
            let _ = self.child.kill();
            crate::guest_groups::unregister(self.child.id());
        }
        self.reaped = true;
        match self.child.wait() {
            Ok(s) => s.to_string(),
            Err(e) => format!("unknown status ({e})"),
        }
    }
}

impl Drop for GuestProcess {
    fn drop(&mut self) {
        if self.reaped {
            return;
        }
        // Closing its input tells the guest the run is over; after the
        // grace, or once it has ended, its whole group is ended.
        self.to_child = None;
        self.ended_by(Instant::now() + GRACE);
        self.stop();
    }
}

//! The process groups of the guest learners running now, ended when Burnin
//! is interrupted or told to stop (SIGINT, SIGTERM, SIGHUP).
//!
//! Each guest runs in a process group of its own (`guest_process.rs`), so
//! the terminal's Ctrl-C, which goes to Burnin's group, no longer reaches
//! it: without this, a guest that does not end when its input closes would
//! outlive an interrupted run. The handler ends every registered group and
//! then ends Burnin by the same signal, as it would have ended without one.
//! It is installed when the first guest starts; only async-signal-safe calls
//! (atomic loads, `kill`, `signal`, `raise`) are made in it.

#[cfg(unix)]
mod unix {
    use std::sync::Once;
    use std::sync::atomic::{AtomicI32, Ordering};

    /// Slots for the groups' ids (0: free). A guest beyond them still ends
    /// with its run; only an interrupt would miss it.
    static GROUPS: [AtomicI32; 1024] = [const { AtomicI32::new(0) }; 1024];
    static INSTALL: Once = Once::new();

    extern "C" fn on_signal(sig: libc::c_int) {
        for g in &GROUPS {
            let id = g.load(Ordering::SeqCst);
            if id > 0 {
                // SAFETY: kill and signal/raise are async-signal-safe.
                unsafe {
                    libc::kill(-id, libc::SIGKILL);
                }
            }
        }
        // SAFETY: as above; the default action ends the process.
        unsafe {
            libc::signal(sig, libc::SIG_DFL);
            libc::raise(sig);
        }
    }

    /// Notes the group `id` (a guest's leader's process id).
    pub fn register(id: u32) {
        INSTALL.call_once(|| {
            let handler = on_signal as extern "C" fn(libc::c_int) as libc::sighandler_t;
            for sig in [libc::SIGINT, libc::SIGTERM, libc::SIGHUP] {
                // SAFETY: installs a handler that only makes
                // async-signal-safe calls.
                unsafe {
                    libc::signal(sig, handler);
                }
            }
        });
        let id = id as i32;
        for g in &GROUPS {
            if g.compare_exchange(0, id, Ordering::SeqCst, Ordering::SeqCst)
                .is_ok()
            {
                return;
            }
        }
    }

    /// Forgets the group `id` (before its leader is reaped).
    pub fn unregister(id: u32) {
        let id = id as i32;
        for g in &GROUPS {
            if g.compare_exchange(id, 0, Ordering::SeqCst, Ordering::SeqCst)
                .is_ok()
            {
                return;
            }
        }
    }
}

#[cfg(unix)]
pub use unix::{register, unregister};

#[cfg(not(unix))]
pub fn register(_id: u32) {}

#[cfg(not(unix))]
pub fn unregister(_id: u32) {}

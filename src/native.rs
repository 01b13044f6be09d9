//! The runner's clock and threads for native front ends (`burnin run`, the
//! tests, a Python package): std's scoped threads and `Instant`. Like
//! `src/wasm/` this is a front end's part, not the core's: the core's
//! runner (`experiment::Runner`) only calls the `Pool` and `Clock` it is
//! handed.

use std::time::{Duration, Instant};

use crate::experiment::Pool;

/// This machine's threads: each lane on a scoped thread of its own.
pub struct Threads;

impl Pool for Threads {
    fn scope(&self, lanes: usize, work: &(dyn Fn(usize) + Sync)) {
        std::thread::scope(|s| {
            for lane in 0..lanes {
                s.spawn(move || work(lane));
            }
        });
    }

    fn within(&self, seconds: f64, work: Box<dyn FnOnce() + Send>) {
        let (tx, rx) = std::sync::mpsc::channel();
        std::thread::spawn(move || {
            work();
            let _ = tx.send(());
        });
        let _ = rx.recv_timeout(Duration::from_secs_f64(seconds));
    }

    fn rest(&self) {
        std::thread::sleep(Duration::from_millis(1));
    }
}

/// Seconds since the clock was made, from `Instant` (the core's `Clock`).
pub fn clock() -> impl Fn() -> f64 + Send + Sync + Clone + 'static {
    let start = Instant::now();
    move || start.elapsed().as_secs_f64()
}

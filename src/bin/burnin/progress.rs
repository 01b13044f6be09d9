//! `burnin run`'s progress on standard error, as the core's runner reports
//! it: on a terminal, one line redrawn in place and fitted to the
//! terminal's width (indicatif); otherwise (a log file, CI) a line at
//! every tenth of the work, which indicatif does not draw (it hides its
//! bar when standard error is not a terminal).

use std::io::{IsTerminal, Write};
use std::sync::Mutex;
use std::time::Instant;

use burnin::experiment::{Estimate, Watch};
use indicatif::{ProgressBar, ProgressDrawTarget, ProgressState, ProgressStyle};

pub enum Progress {
    /// A terminal: the bar.
    Bar(ProgressBar),
    /// Anything else: the tenth last printed, and when the run began.
    Log { last: Mutex<u64>, start: Instant },
}

/// The bar's line: the bar as wide as the terminal leaves room for, the
/// counts in at most five characters each.
const TEMPLATE: &str = "[{wide_bar}] {percent:>3}% {done}/{all} episodes, {rate}/s, {eta} left";

impl Progress {
    pub fn new(total: u64) -> Progress {
        if !std::io::stderr().is_terminal() {
            return Progress::Log {
                last: Mutex::new(0),
                start: Instant::now(),
            };
        }
        let count = |f: fn(&ProgressState) -> f64| {
            move |s: &ProgressState, w: &mut dyn std::fmt::Write| {
                let _ = w.write_str(&compact(f(s)));
            }
        };
        let style = ProgressStyle::with_template(TEMPLATE)
            .expect("a valid template")
            .progress_chars("#.")
            .with_key("done", count(|s| s.pos() as f64))
            .with_key("all", count(|s| s.len().unwrap_or(0) as f64))
            .with_key("rate", count(|s| s.per_sec()));
        let bar = ProgressBar::with_draw_target(Some(total.max(1)), ProgressDrawTarget::stderr());
        bar.set_style(style);
        Progress::Bar(bar)
    }

    /// Takes the line off the terminal.
    pub fn clear(&self) {
        if let Progress::Bar(bar) = self {
            bar.finish_and_clear();
        }
    }

    /// A line of its own on standard error, above the bar.
    fn say(&self, line: &str) {
        let print = || {
            let _ = writeln!(std::io::stderr(), "{line}");
        };
        match self {
            Progress::Bar(bar) => bar.suspend(print),
            Progress::Log { .. } => print(),
        }
    }
}

impl Watch for Progress {
    fn progress(&self, done: u64, total: u64) {
        match self {
            Progress::Bar(bar) => bar.set_position(done),
            Progress::Log { last, start } => {
                let Ok(mut last) = last.lock() else { return };
                let total = total.max(1);
                let tenth = done * 10 / total;
                if tenth <= *last * 10 / total {
                    return;
                }
                *last = done;
                let rate = done as f64 / start.elapsed().as_secs_f64().max(1e-9);
                let _ = writeln!(
                    std::io::stderr(),
                    "{}% ({done}/{total} episodes, {rate:.0}/s)",
                    tenth * 10
                );
            }
        }
    }

    fn estimated(&self, e: &Estimate) {
        self.say(&format!("estimate: {}", e.words()));
    }
}

/// A count in at most five characters: 999, 12.3k, 456k, 4.56M, 1.23G.
fn compact(x: f64) -> String {
    let (v, unit) = match x {
        x if x < 1e3 => return format!("{x:.0}"),
        x if x < 1e6 => (x / 1e3, "k"),
        x if x < 1e9 => (x / 1e6, "M"),
        x => (x / 1e9, "G"),
    };
    let digits = if v < 10.0 {
        2
    } else if v < 100.0 {
        1
    } else {
        0
    };
    format!("{v:.digits$}{unit}")
}

#[cfg(test)]
mod tests {
    use super::compact;

    /// Counts in the progress line stay within five characters (derived by hand).
    #[test]
    fn compact_counts() {
        for (x, want) in [
            (0.0, "0"),
            (999.0, "999"),
            (1_234.0, "1.23k"),
            (56_780.0, "56.8k"),
            (560_000.0, "560k"),
            (4_560_000.0, "4.56M"),
            (1e9, "1.00G"),
        ] {
            assert_eq!(compact(x), want);
        }
    }
}

//! The semantic checks of a model, shared by files and generators.
//!
//! Each check takes one item with the JSON path it lives at, so a file whose
//! rows are partly malformed still gets every other row checked.

use std::collections::HashSet;

use super::limits::*;
use super::{MdpParts, Reward, StepParts};
use crate::format::{Problems, readable};

/// Distance from 1 within which a probability sum is renormalised.
pub const SUM_TOLERANCE: f64 = 1e-6;
/// Slack for the binary rounding of decimal entries at the tolerance's edge.
pub const SUM_ROUNDING: f64 = 1e-12;
/// Distance from 1 below which a sum is left exactly as given (floating-point
/// noise of decimal inputs such as 0.1 + 0.2 + 0.7), so files round-trip bit
/// for bit.
pub const SUM_EXACT: f64 = 1e-12;

/// Collects problems while walking a model.
#[derive(Default)]
pub struct Checker {
    problems: Problems,
}

/// Formats a probability sum so that one off from 1 never prints as "1.0000".
pub fn format_sum(sum: f64) -> String {
    for digits in 4..=12 {
        let s = format!("{sum:.digits$}");
        let one = format!("{:.digits$}", 1.0);
        if s != one {
            return s;
        }
    }
    format!("{sum:e}")
}

/// Renormalises the probabilities `prob(item)` of `items` when their sum is
/// within [`SUM_TOLERANCE`] but not within [`SUM_EXACT`] of 1.
pub fn normalise<T>(items: &mut [T], prob: impl Fn(&mut T) -> &mut f64) {
    let sum: f64 = items.iter_mut().map(|x| *prob(x)).sum();
    if (sum - 1.0).abs() > SUM_EXACT {
        for x in items.iter_mut() {
            *prob(x) /= sum;
        }
    }
}

impl Checker {
    pub fn push(&mut self, path: impl Into<String>, message: impl Into<String>) {
        self.problems.push(path, message);
    }

    pub fn is_clean(&self) -> bool {
        self.problems.is_empty()
    }

    pub fn into_problems(self) -> Problems {
        self.problems
    }

    /// All checks of a whole model.
    pub fn check_parts(&mut self, m: &MdpParts) {
        self.check_name(&m.name);
        if let Some(n) = &m.notes {
            self.check_notes(n);
        }
        let sized = self.check_horizon(m.horizon as f64)
            & self.check_labels("states", &m.states, "state", MAX_STATES)
            & self.check_labels("actions", &m.actions, "action", MAX_ACTIONS);
        if !sized {
            return;
        }
        let (s, a, h) = (m.states.len(), m.actions.len(), m.horizon);
        if !self.check_cells(s, a, h) {
            return;
        }
        if let Some(g) = m.discount {
            self.check_discount(g);
        }
        self.check_distribution("start", &m.start, s);
        if !self.check_step_count(m.stationary, m.steps.len(), h) {
            return;
        }
        let total: usize = m
            .steps
            .iter()
            .map(|st| st.transitions.iter().map(Vec::len).sum::<usize>())
            .sum();
        if !self.check_entries(total) {
            return;
        }
        for (i, st) in m.steps.iter().enumerate() {
            self.check_step(i, st, s, a);
        }
        if let Some(l) = &m.layout {
            self.check_layout(l, s);
        }
    }

    fn check_step(&mut self, i: usize, st: &StepParts, s: usize, a: usize) {
        let n = s * a;
        if st.transitions.len() != n || st.rewards.len() != n {
            self.push(
                format!("steps[{i}]"),
                format!(
                    "expected {n} transition rows and rewards (S·A = {s}·{a}), found {} and {}",
                    st.transitions.len(),
                    st.rewards.len()
                ),
            );
            return;
        }
        for r in 0..n {
            let (si, ai) = (r / a, r % a);
            self.check_row(
                &format!("steps[{i}].transitions[{si}][{ai}]"),
                &st.transitions[r],
                s,
            );
            self.check_reward(&format!("steps[{i}].rewards[{si}][{ai}]"), &st.rewards[r]);
        }
    }

    pub fn check_name(&mut self, name: &str) {
        if name.chars().count() > MAX_NAME_CHARS {
            self.push("name", format!("longer than {MAX_NAME_CHARS} characters"));
        }
    }

    pub fn check_notes(&mut self, notes: &str) {
        if notes.chars().count() > MAX_NOTES_CHARS {
            self.push("notes", format!("longer than {MAX_NOTES_CHARS} characters"));
        }
    }

    /// H must be a whole number in 1..=MAX_HORIZON.
    pub fn check_horizon(&mut self, h: f64) -> bool {
        if !(h.fract() == 0.0 && h >= 1.0) {
            self.push("horizon", format!("expected a whole number ≥ 1, found {h}"));
            false
        } else if h > MAX_HORIZON as f64 {
            self.push(
                "horizon",
                format!("{h} is over the limit of {MAX_HORIZON} steps"),
            );
            false
        } else {
            true
        }
    }

    /// Non-empty, unique, non-empty labels, at most `max` of them. Returns
    /// whether their number is usable (so later checks can rely on it).
    pub fn check_labels(&mut self, path: &str, labels: &[String], what: &str, max: usize) -> bool {
        if labels.is_empty() {
            self.push(path, format!("expected at least one {what}"));
            return false;
        }
        if labels.len() > max {
            self.push(
                path,
                format!("{} {what}s is over the limit of {max}", labels.len()),
            );
            return false;
        }
        let mut seen: HashSet<&str> = HashSet::with_capacity(labels.len());
        for (i, l) in labels.iter().enumerate() {
            if l.trim().is_empty() {
                self.push(format!("{path}[{i}]"), format!("{what} label is empty"));
            } else if l.chars().count() > MAX_LABEL_CHARS {
                self.push(
                    format!("{path}[{i}]"),
                    format!("{what} label is longer than {MAX_LABEL_CHARS} characters"),
                );
            } else if !seen.insert(l.as_str()) {
                self.push(
                    format!("{path}[{i}]"),
                    format!("duplicate {what} label {l:?}"),
                );
            }
        }
        true
    }

    /// H·S·A within [`MAX_CELLS`].
    pub fn check_cells(&mut self, s: usize, a: usize, h: usize) -> bool {
        // In u128: exact for any sizes, and the same on 32-bit wasm as natively.
        let cells = s as u128 * a as u128 * h as u128;
        if cells > MAX_CELLS as u128 {
            self.push(
                "",
                format!(
                    "H·S·A = {h}·{s}·{a} = {cells} is over the limit of {MAX_CELLS} (step, state, action) cells"
                ),
            );
            false
        } else {
            true
        }
    }

    /// Total entries within [`MAX_ENTRIES`].
    pub fn check_entries(&mut self, total: usize) -> bool {
        if total > MAX_ENTRIES {
            self.push(
                "steps",
                format!("{total} transition entries is over the limit of {MAX_ENTRIES}"),
            );
            false
        } else {
            true
        }
    }

    /// 0 < γ ≤ 1.
    pub fn check_discount(&mut self, g: f64) {
        if !(g > 0.0 && g <= 1.0) {
            self.push("discount", format!("expected 0 < discount ≤ 1, found {g}"));
        }
    }

    /// The number of step tables agrees with `stationary` and H.
    pub fn check_step_count(&mut self, stationary: bool, n: usize, h: usize) -> bool {
        let want = if stationary { 1 } else { h };
        if n != want {
            let why = if stationary {
                "\"stationary\": true needs exactly 1 step table".to_string()
            } else {
                format!("\"stationary\": false needs one step table per step (H = {h})")
            };
            self.push("steps", format!("{why}, found {n}"));
            false
        } else {
            true
        }
    }

    /// A probability vector over `n` states.
    pub fn check_distribution(&mut self, path: &str, d: &[f64], n: usize) {
        if d.len() != n {
            self.push(
                path,
                format!(
                    "expected {n} probabilities (one per state), found {}",
                    d.len()
                ),
            );
            return;
        }
        let mut ok = true;
        for (i, &p) in d.iter().enumerate() {
            if !p.is_finite() || p < 0.0 {
                self.push(
                    format!("{path}[{i}]"),
                    format!("probability {p} is not a number ≥ 0"),
                );
                ok = false;
            }
        }
        if ok {
            self.check_sum(path, d.iter().sum());
        }
    }

    fn check_sum(&mut self, path: &str, sum: f64) {
        // "Within 10⁻⁶" includes 10⁻⁶ itself: three entries of 0.333333 sum
        // to 1 − 10⁻⁶ in decimals but a few 10⁻¹⁷ further in binary.
        if (sum - 1.0).abs() > SUM_TOLERANCE + SUM_ROUNDING {
            self.push(
                path,
                format!("probabilities sum to {}, expected 1", format_sum(sum)),
            );
        }
    }

    /// One sparse transition row over `n` states.
    pub fn check_row(&mut self, path: &str, row: &[(u32, f64)], n: usize) {
        if row.is_empty() {
            self.push(
                path,
                "expected at least one [next_state, probability] entry",
            );
            return;
        }
        let mut seen: HashSet<u32> = HashSet::with_capacity(row.len());
        let mut ok = true;
        for (k, &(next, p)) in row.iter().enumerate() {
            if next as usize >= n {
                self.push(
                    format!("{path}[{k}][0]"),
                    format!(
                        "state index {next} is out of range (S = {n}, indices 0..{})",
                        n - 1
                    ),
                );
                ok = false;
            } else if !seen.insert(next) {
                self.push(
                    format!("{path}[{k}][0]"),
                    format!("state index {next} appears twice in this row"),
                );
                ok = false;
            }
            if !p.is_finite() || p < 0.0 {
                self.push(
                    format!("{path}[{k}][1]"),
                    format!("probability {p} is not a number ≥ 0"),
                );
                ok = false;
            }
        }
        if ok {
            self.check_sum(path, row.iter().map(|e| e.1).sum());
        }
    }

    /// A reward distribution's parameters.
    pub fn check_reward(&mut self, path: &str, r: &Reward) {
        // Within ±MAX_MAGNITUDE every sum over H ≤ 10 000 steps, and every
        // difference of two of them, stays finite.
        let finite = |x: f64| x.is_finite() && x.abs() <= MAX_MAGNITUDE;
        match *r {
            Reward::Fixed(x) if !finite(x) => self.push(
                path,
                format!(
                    "reward {} is not a finite number within ±{MAX_MAGNITUDE:e}",
                    readable(x)
                ),
            ),
            Reward::Bernoulli(p) if !(finite(p) && (0.0..=1.0).contains(&p)) => self.push(
                format!("{path}.bernoulli"),
                format!("expected a probability in [0, 1], found {p}"),
            ),
            Reward::Uniform(lo, hi) if !(finite(lo) && finite(hi) && lo <= hi) => self.push(
                format!("{path}.uniform"),
                format!(
                    "expected [lo, hi] with lo ≤ hi, both within ±{MAX_MAGNITUDE:e}, found [{}, {}]",
                    readable(lo),
                    readable(hi)
                ),
            ),
            Reward::Beta(a, b) if !(finite(a) && finite(b) && a > 0.0 && b > 0.0) => self.push(
                format!("{path}.beta"),
                format!(
                    "expected [α, β] with 0 < α, β ≤ {MAX_MAGNITUDE:e}, found [{}, {}]",
                    readable(a),
                    readable(b)
                ),
            ),
            _ => {}
        }
    }

    /// One finite position per state.
    pub fn check_layout(&mut self, l: &[[f64; 2]], n: usize) {
        if l.len() != n {
            self.push(
                "layout.positions",
                format!("expected {n} positions (one per state), found {}", l.len()),
            );
            return;
        }
        for (i, p) in l.iter().enumerate() {
            if !p.iter().all(|x| x.is_finite() && x.abs() <= MAX_MAGNITUDE) {
                self.push(
                    format!("layout.positions[{i}]"),
                    format!("expected two finite numbers [x, y] within ±{MAX_MAGNITUDE:e}"),
                );
            }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sum_off_by_less_than_display_precision_still_shows_the_difference() {
        // derived by hand: 0.99999 rounds to "1.0000" at 4 digits, so 5 are used
        assert_eq!(format_sum(0.97), "0.9700");
        assert_eq!(format_sum(0.99999), "0.99999");
        assert_eq!(format_sum(1.2), "1.2000");
    }
}

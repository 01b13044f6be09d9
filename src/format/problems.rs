//! Problems found in a file, each with the JSON path where it was found.

use std::fmt;

use crate::model::limits::MAX_REPORTED_PROBLEMS;

/// One problem found in a model: where (a JSON path such as
/// `steps[1].transitions[2][0]`) and what was expected.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Problem {
    /// JSON path of the offending value; empty for the document as a whole.
    pub path: String,
    /// What is wrong and what was expected.
    pub message: String,
}

impl fmt::Display for Problem {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.path.is_empty() {
            write!(f, "{}", self.message)
        } else {
            write!(f, "{}: {}", self.path, self.message)
        }
    }
}

/// Every problem found in one model (the first [`MAX_REPORTED_PROBLEMS`] of
/// them, and a count of the rest).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Problems {
    list: Vec<Problem>,
    unlisted: usize,
}

/// Longest path or message of a problem, in characters.
pub const MAX_PROBLEM_CHARS: usize = 1_000;

fn cut(mut s: String) -> String {
    if let Some((i, _)) = s.char_indices().nth(MAX_PROBLEM_CHARS) {
        s.truncate(i);
        s.push('…');
    }
    s
}

impl Problems {
    /// Records a problem at `path`. A message or path longer than
    /// [`MAX_PROBLEM_CHARS`] (one quoting a huge value from a file) is cut
    /// there and ends with "…".
    pub fn push(&mut self, path: impl Into<String>, message: impl Into<String>) {
        if self.list.len() < MAX_REPORTED_PROBLEMS {
            self.list.push(Problem {
                path: cut(path.into()),
                message: cut(message.into()),
            });
        } else {
            self.unlisted += 1;
        }
    }

    /// True when nothing was recorded.
    pub fn is_empty(&self) -> bool {
        self.list.is_empty()
    }

    /// The recorded problems, in the order found.
    pub fn list(&self) -> &[Problem] {
        &self.list
    }

    /// How many further problems were found but not listed.
    pub fn unlisted(&self) -> usize {
        self.unlisted
    }

    /// Total number of problems found.
    pub fn count(&self) -> usize {
        self.list.len() + self.unlisted
    }

    /// One problem, for callers that found a single fault.
    pub fn single(path: impl Into<String>, message: impl Into<String>) -> Self {
        let mut p = Problems::default();
        p.push(path, message);
        p
    }

    /// Adds every problem of `other` with its path put under `prefix`
    /// (`prefix.path`; an empty prefix keeps the paths), and a count of the
    /// ones `other` did not list.
    pub fn nest(&mut self, prefix: &str, other: &Problems) {
        for pr in &other.list {
            let path = match (prefix.is_empty(), pr.path.is_empty()) {
                (true, _) => pr.path.clone(),
                (false, true) => prefix.to_owned(),
                (false, false) => format!("{prefix}.{}", pr.path),
            };
            self.push(path, pr.message.clone());
        }
        if other.unlisted > 0 {
            self.push(prefix, format!("… and {} more problems", other.unlisted));
        }
    }

    /// Ok(()) when empty, otherwise the problems as an error.
    pub fn into_result(self) -> Result<(), Problems> {
        if self.is_empty() { Ok(()) } else { Err(self) }
    }

    /// One line per problem, and a last line counting unlisted ones.
    pub fn lines(&self) -> Vec<String> {
        let mut out: Vec<String> = self.list.iter().map(|p| p.to_string()).collect();
        if self.unlisted > 0 {
            out.push(format!("… and {} more problems", self.unlisted));
        }
        out
    }
}

impl fmt::Display for Problems {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        write!(f, "{}", self.lines().join("\n"))
    }
}

impl std::error::Error for Problems {}

//! The comparison table a paper carries, from any results or sweep file:
//! per learner its published bound and burn-in (the bound the results
//! carry, `crate::theory::Bound`, and the algorithm's name from the
//! catalogue) beside what was measured — regret at K with its 95%
//! interval, the tail slope and the burn-in with their bootstrap intervals,
//! and the median first ε-optimal episode per ε target. For a sweep, one
//! row per (point, learner) with the swept value in front.
//!
//! Every text in a cell is the core's rule for it ([`number_text`],
//! [`interval_text`], [`LearnerResult::slope_text`],
//! [`LearnerResult::burn_in_text`], [`median_text`]), so the CLI's `burnin
//! table`, the page's export and the CLI's own tables print the same
//! digits. One [`ComparisonTable`] is written three ways: Markdown (a
//! GitHub pipe table), LaTeX (a `table` float with a `tabular` and the
//! booktabs rules) and CSV (RFC 4180, [`csv_field`]).

use serde::Serialize;

use super::{
    LearnerResult, Output, Results, SweepResults, csv_field, interval_text, median_text,
    number_text,
};
use crate::learn::AlgorithmKind;
use crate::theory::Bound;

/// The caution the page prints under its results, where it presents what
/// they show (`www/index.html`, the results section; a test checks the two
/// agree word for word). Every table ends its caption with it.
pub const CAVEAT: &str = "Regret measured on small invented models shows how an algorithm behaves; it is not evidence that a deployed system is safe.";

/// The `\label` of the LaTeX table.
pub const LATEX_LABEL: &str = "tab:burnin-comparison";

/// A table's written form.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum TableFormat {
    Markdown,
    Latex,
    Csv,
}

impl TableFormat {
    pub const ALL: [TableFormat; 3] = [TableFormat::Markdown, TableFormat::Latex, TableFormat::Csv];

    /// The name in `burnin table --format`.
    pub fn key(self) -> &'static str {
        match self {
            TableFormat::Markdown => "markdown",
            TableFormat::Latex => "latex",
            TableFormat::Csv => "csv",
        }
    }

    /// How people call it.
    pub fn name(self) -> &'static str {
        match self {
            TableFormat::Markdown => "Markdown",
            TableFormat::Latex => "LaTeX",
            TableFormat::Csv => "CSV",
        }
    }

    /// The file extension it is written with.
    pub fn extension(self) -> &'static str {
        match self {
            TableFormat::Markdown => "md",
            TableFormat::Latex => "tex",
            TableFormat::Csv => "csv",
        }
    }

    /// Its media type (for a download).
    pub fn media_type(self) -> &'static str {
        match self {
            TableFormat::Markdown => "text/markdown",
            TableFormat::Latex => "application/x-tex",
            TableFormat::Csv => "text/csv",
        }
    }

    pub fn from_key(key: &str) -> Option<TableFormat> {
        Self::ALL.into_iter().find(|f| f.key() == key)
    }

    /// The format a file extension names (`md`, `markdown`, `tex`, `csv`,
    /// any case), if any.
    pub fn from_extension(ext: &str) -> Option<TableFormat> {
        match ext.to_ascii_lowercase().as_str() {
            "md" | "markdown" => Some(TableFormat::Markdown),
            "tex" => Some(TableFormat::Latex),
            "csv" => Some(TableFormat::Csv),
            _ => None,
        }
    }

    /// Every key, as messages list them.
    pub fn keys() -> String {
        Self::ALL.map(TableFormat::key).join(", ")
    }
}

/// What a column holds, and so how it is aligned and written.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ColumnKind {
    /// Words: left-aligned.
    Text,
    /// A number, or a number with its interval: right-aligned.
    Number,
    /// A published bound's formula: words, with an exponent `^{…}` set as
    /// a superscript in LaTeX.
    Formula,
    /// Where a bound is published: the full text in CSV, a numbered
    /// reference ("[1]") in Markdown and LaTeX, listed under the table.
    Source,
}

#[derive(Debug, Clone, PartialEq)]
pub struct Column {
    pub title: String,
    pub kind: ColumnKind,
}

/// One table of rows under one header.
#[derive(Debug, Clone, PartialEq)]
pub struct Section {
    /// A heading above it (empty for the main table).
    pub heading: String,
    pub columns: Vec<Column>,
    /// Each row, one text per column.
    pub rows: Vec<Vec<String>>,
}

/// The comparison table: its sections (the rows per learner; a sweep's
/// fitted exponents will be a second section, see [`scaling_section`]),
/// the caption and the notes under it.
#[derive(Debug, Clone, PartialEq)]
pub struct ComparisonTable {
    /// What the table shows, ending with [`CAVEAT`].
    pub caption: String,
    pub sections: Vec<Section>,
    /// Sentences under the table (an ε target every policy meets, a guest
    /// learner left out).
    pub notes: Vec<String>,
}

/// Marks a cell with nothing to show (no published bound, a missing ε
/// target).
const NONE: &str = "—";

/// The comparison table of results or sweep results.
pub fn comparison_table(out: &Output) -> ComparisonTable {
    match out {
        Output::Single(r) => single(r),
        Output::Sweep(s) => sweep(s),
    }
}

impl Output {
    /// The comparison table written as `format` ([`comparison_table`]).
    pub fn table(&self, format: TableFormat) -> String {
        comparison_table(self).write(format)
    }
}

/// The columns every row has (after the swept value of a sweep).
fn learner_columns(eps: &[EpsColumn]) -> Vec<Column> {
    let col = |title: &str, kind| Column {
        title: title.to_owned(),
        kind,
    };
    let mut c = vec![
        col("learner", ColumnKind::Text),
        col("algorithm", ColumnKind::Text),
        col("published bound", ColumnKind::Formula),
        col("bound applies", ColumnKind::Text),
        col("published burn-in", ColumnKind::Number),
        col("source", ColumnKind::Source),
        col("regret at K", ColumnKind::Number),
        col("95% interval", ColumnKind::Number),
        col("slope [95% bootstrap]", ColumnKind::Number),
        col("burn-in [95% bootstrap]", ColumnKind::Number),
    ];
    for e in eps {
        c.push(Column {
            title: e.title.clone(),
            kind: ColumnKind::Number,
        });
    }
    c
}

/// An ε target's column: its title, and whether its cells must name their
/// own ε (when the rows' ε differ: a sweep over H, whose default targets
/// are H/10 and H/20).
struct EpsColumn {
    title: String,
    per_row: bool,
}

/// The ε columns of `points`: one per target index any learner has.
fn eps_columns<'a>(points: impl Iterator<Item = &'a Results> + Clone) -> Vec<EpsColumn> {
    let learners = points.flat_map(|r| r.learners.iter());
    let n = learners
        .clone()
        .map(|l| l.episodes_to_eps.len())
        .max()
        .unwrap_or(0);
    (0..n)
        .map(|i| {
            let mut values = learners
                .clone()
                .filter_map(|l| l.episodes_to_eps.get(i).map(|e| e.epsilon));
            let first = values.next();
            let same = values.all(|v| Some(v.to_bits()) == first.map(f64::to_bits));
            match (first, same) {
                (Some(v), true) => EpsColumn {
                    title: format!("first ε-optimal episode (ε = {v})"),
                    per_row: false,
                },
                _ => EpsColumn {
                    title: format!("first ε-optimal episode (target {})", i + 1),
                    per_row: true,
                },
            }
        })
        .collect()
}

/// The catalogue's name of a learner's algorithm (a guest's name for a
/// guest learner; the key itself for an algorithm this build does not know).
fn algorithm_name(l: &LearnerResult) -> String {
    match (&l.guest, AlgorithmKind::from_key(&l.algorithm)) {
        (Some(g), _) => format!("guest learner {g}"),
        (None, Some(k)) => k.info().name.to_owned(),
        (None, None) => l.algorithm.clone(),
    }
}

/// Whether a bound covers the learner as it ran, and why not.
fn applies_text(b: &Bound) -> String {
    if b.applies {
        "yes".into()
    } else {
        format!("no: {}", b.why_not())
    }
}

/// Where a bound is published, with its note when the note qualifies the
/// bound itself (a note saying why it does not apply is the "bound
/// applies" column's).
fn source_text(b: &Bound) -> String {
    if b.applies && !b.note.is_empty() {
        format!("{}. {}", b.source, b.note)
    } else {
        b.source.clone()
    }
}

/// One learner's cells at one point.
fn learner_cells(l: &LearnerResult, eps: &[EpsColumn]) -> Vec<String> {
    let k = |v: &Vec<f64>| *v.last().expect("results hold a checkpoint");
    let (bound, applies, burn_in, source) = match &l.bound {
        Some(b) => (
            b.formula.clone(),
            applies_text(b),
            b.burn_in.map_or("none".into(), number_text),
            source_text(b),
        ),
        None => (NONE.into(), NONE.into(), NONE.into(), NONE.into()),
    };
    let mut cells = vec![
        l.label.clone(),
        algorithm_name(l),
        bound,
        applies,
        burn_in,
        source,
        number_text(k(&l.regret_mean)),
        interval_text(k(&l.regret_mean), k(&l.regret_lo), k(&l.regret_hi)),
        l.slope_text(),
        l.burn_in_text(),
    ];
    for (i, col) in eps.iter().enumerate() {
        cells.push(match l.episodes_to_eps.get(i) {
            None => NONE.into(),
            Some(e) => {
                let text = if e.trivial {
                    "trivial (ε ≥ V*)".to_string()
                } else {
                    median_text(&e.first_optimal)
                };
                if col.per_row {
                    format!("{text} (ε = {})", e.epsilon)
                } else {
                    text
                }
            }
        });
    }
    cells
}

/// The sentence that defines the columns, for every caption.
const DEFINITIONS: &str = "Regret at K: the exact cumulative regret, mean over seeds, with the 95% Student-t interval of the mean. Slope: least squares of ln regret on ln k over the last decade of episodes; burn-in: where the mean curve bends from linear growth into its √K regime (the break of a two-regime fit on log-log axes); both with 95% bootstrap intervals over seeds. First ε-optimal episode: the median over seeds of the first episode whose policy's regret was at most ε. Published bounds are orders (constants and log factors dropped; a theorem for a stationary MDP read with S → S·H), and the published burn-in is the K from which the bound's √K term overtakes its lower-order term (none: it has none). Definitions in full: docs/formats.md of Burnin.";

/// "by Burnin BUILD", or nothing for files that do not name their build.
fn build_words(build: &str) -> String {
    if build.is_empty() {
        String::new()
    } else {
        format!("; computed by Burnin {build}")
    }
}

/// The notes every results point adds: ε targets that say nothing about
/// learning.
fn trivial_notes(r: &Results, at: &str, notes: &mut Vec<String>) {
    let Some(l) = r.learners.first() else { return };
    for e in l.episodes_to_eps.iter().filter(|e| e.trivial) {
        notes.push(format!(
            "{at}ε = {} is at least V* = {}: every policy is ε-optimal, so its column says nothing about learning there.",
            e.epsilon,
            number_text(r.optimal_value)
        ));
    }
}

/// Guest learners that failed and are left out.
fn failed_notes(failed: &[super::RunFault], notes: &mut Vec<String>) {
    for f in failed {
        notes.push(format!(
            "The learner “{}” failed (seed {}, episode {}: {}) and is left out.",
            f.label, f.seed_index, f.episode, f.message
        ));
    }
}

fn single(r: &Results) -> ComparisonTable {
    let eps = eps_columns(std::iter::once(r));
    let rows = r.learners.iter().map(|l| learner_cells(l, &eps)).collect();
    let name = if r.name.is_empty() {
        String::new()
    } else {
        format!("{}: ", r.name)
    };
    let caption = format!(
        "{name}{} learner{} on the model “{}” (S = {}, A = {}, H = {}, V* = {}), K = {} episodes × {} seed{} (base seed {}, δ = {}{}{}). {DEFINITIONS} {CAVEAT}",
        r.learners.len(),
        if r.learners.len() == 1 { "" } else { "s" },
        r.model_name,
        r.states,
        r.actions,
        r.horizon,
        number_text(r.optimal_value),
        r.episodes,
        r.seeds,
        if r.seeds == 1 { "" } else { "s" },
        r.seed,
        r.delta,
        if r.shared_draws { ", shared draws" } else { "" },
        build_words(&r.build),
    );
    let mut notes = Vec::new();
    trivial_notes(r, "", &mut notes);
    failed_notes(&r.failed, &mut notes);
    ComparisonTable {
        caption,
        sections: vec![Section {
            heading: String::new(),
            columns: learner_columns(&eps),
            rows,
        }],
        notes,
    }
}

/// "S = 5" when every point has the same value, "S = 5 to 40" otherwise.
fn size_words(name: &str, values: impl Iterator<Item = usize> + Clone) -> String {
    let lo = values.clone().min().unwrap_or(0);
    let hi = values.max().unwrap_or(0);
    if lo == hi {
        format!("{name} = {lo}")
    } else {
        format!("{name} = {lo} to {hi}")
    }
}

fn sweep(s: &SweepResults) -> ComparisonTable {
    let eps = eps_columns(s.points.iter());
    let mut columns = vec![Column {
        title: s.parameter.clone(),
        kind: ColumnKind::Number,
    }];
    columns.extend(learner_columns(&eps));
    let mut rows = Vec::new();
    let mut notes = Vec::new();
    for (v, r) in s.values.iter().zip(&s.points) {
        for l in &r.learners {
            let mut row = vec![v.to_string()];
            row.extend(learner_cells(l, &eps));
            rows.push(row);
        }
        trivial_notes(r, &format!("At {} = {v}: ", s.parameter), &mut notes);
    }
    failed_notes(&s.failed, &mut notes);
    let first = &s.points[0];
    let mut models: Vec<&str> = Vec::new();
    for p in &s.points {
        if !models.contains(&p.model_name.as_str()) {
            models.push(&p.model_name);
        }
    }
    let models = models
        .iter()
        .map(|m| format!("“{m}”"))
        .collect::<Vec<_>>()
        .join(", ");
    let name = if s.name.is_empty() {
        String::new()
    } else {
        format!("{}: ", s.name)
    };
    let values = s
        .values
        .iter()
        .map(f64::to_string)
        .collect::<Vec<_>>()
        .join(", ");
    let caption = format!(
        "{name}{} swept over {values}, one row per value and learner; model{} {models} ({}, {}, {}), K = {} episodes × {} seed{} per point (base seed {}, δ = {}{}{}). {DEFINITIONS} {CAVEAT}",
        s.parameter,
        if s.points.iter().all(|p| p.model_name == first.model_name) {
            ""
        } else {
            "s"
        },
        size_words("S", s.points.iter().map(|p| p.states)),
        size_words("A", s.points.iter().map(|p| p.actions)),
        size_words("H", s.points.iter().map(|p| p.horizon)),
        first.episodes,
        first.seeds,
        if first.seeds == 1 { "" } else { "s" },
        first.seed,
        first.delta,
        if first.shared_draws {
            ", shared draws"
        } else {
            ""
        },
        build_words(&s.build),
    );
    let mut sections = vec![Section {
        heading: String::new(),
        columns,
        rows,
    }];
    sections.extend(scaling_section(s));
    ComparisonTable {
        caption,
        sections,
        notes,
    }
}

/// A sweep's fitted exponents ([`super::scaling`]): one row per learner
/// with the fitted exponent of its burn-in and of its regret at K in the
/// size the sweep changes, each with its interval and the number of points
/// that settled, beside the orders its published burn-in and bound predict;
/// every format writes it under the main table. None for a sweep without
/// scaling readings.
fn scaling_section(sweep: &SweepResults) -> Option<Section> {
    use super::scaling::exponent_text;
    let x = sweep.scaling_in.as_ref()?;
    let col = |title: String, kind| Column { title, kind };
    let exp_iv = |b: Option<f64>, iv: Option<(f64, f64)>| match (b, iv) {
        (Some(b), Some((lo, hi))) => format!(
            "{} [{}, {}]",
            exponent_text(b),
            exponent_text(lo),
            exponent_text(hi)
        ),
        (Some(b), None) => exponent_text(b),
        (None, _) => NONE.to_string(),
    };
    let rows: Vec<Vec<String>> = sweep
        .learners
        .iter()
        .filter_map(|l| {
            let sc = l.scaling.as_ref()?;
            let burn = if sc.settled_points >= 2 {
                exp_iv(sc.burn_in_exponent, sc.burn_in_exponent_interval)
            } else {
                format!(
                    "did not settle by K at {} of {} points",
                    sc.points - sc.settled_points,
                    sc.points
                )
            };
            Some(vec![
                l.label.clone(),
                burn,
                format!("{} of {}", sc.settled_points, sc.points),
                sc.published_burn_in_text(x),
                exp_iv(sc.regret_exponent, sc.regret_exponent_interval),
                if sc.published_regret_trivial {
                    "H·K (trivial)".to_string()
                } else {
                    sc.published_regret_exponent
                        .map_or(NONE.to_string(), exponent_text)
                },
            ])
        })
        .collect();
    if rows.is_empty() {
        return None;
    }
    Some(Section {
        heading: format!(
            "Scaling in {x}: least-squares exponents on log-log axes [95% bootstrap over seeds]"
        ),
        columns: vec![
            col("learner".into(), ColumnKind::Text),
            col(format!("burn-in exponent in {x}"), ColumnKind::Number),
            col("points settled".into(), ColumnKind::Number),
            col("published burn-in order".into(), ColumnKind::Formula),
            col(format!("regret-at-K exponent in {x}"), ColumnKind::Number),
            col("published regret exponent".into(), ColumnKind::Number),
        ],
        rows,
    })
}

impl ComparisonTable {
    /// The table written as `format`.
    pub fn write(&self, format: TableFormat) -> String {
        match format {
            TableFormat::Markdown => self.markdown(),
            TableFormat::Latex => self.latex(),
            TableFormat::Csv => self.csv(),
        }
    }

    /// The distinct sources of every section's source columns, in the
    /// order they first appear: reference i + 1 is `references()[i]`.
    pub fn references(&self) -> Vec<&str> {
        let mut refs: Vec<&str> = Vec::new();
        for s in &self.sections {
            for row in &s.rows {
                for (c, col) in row.iter().zip(&s.columns) {
                    if col.kind == ColumnKind::Source && c != NONE && !refs.contains(&c.as_str()) {
                        refs.push(c);
                    }
                }
            }
        }
        refs
    }

    /// The text of a cell as Markdown and LaTeX show it: a source as its
    /// reference number.
    fn shown<'a>(&self, refs: &[&str], col: &Column, cell: &'a str) -> std::borrow::Cow<'a, str> {
        match refs.iter().position(|r| *r == cell) {
            Some(i) if col.kind == ColumnKind::Source => format!("[{}]", i + 1).into(),
            _ => cell.into(),
        }
    }

    /// A GitHub pipe table per section, then the sources as a list, the
    /// notes and the caption.
    pub fn markdown(&self) -> String {
        let refs = self.references();
        let mut o = String::new();
        for s in &self.sections {
            if !s.heading.is_empty() {
                o.push_str(&format!("**{}**\n\n", md_escape(&s.heading)));
            }
            let line = |cells: Vec<String>| format!("| {} |\n", cells.join(" | "));
            o.push_str(&line(
                s.columns.iter().map(|c| md_escape(&c.title)).collect(),
            ));
            o.push_str(&line(
                s.columns
                    .iter()
                    .map(|c| match c.kind {
                        ColumnKind::Number => "---:".to_string(),
                        _ => ":---".to_string(),
                    })
                    .collect(),
            ));
            for row in &s.rows {
                o.push_str(&line(
                    row.iter()
                        .zip(&s.columns)
                        .map(|(cell, col)| md_escape(&self.shown(&refs, col, cell)))
                        .collect(),
                ));
            }
            o.push('\n');
        }
        for (i, r) in refs.iter().enumerate() {
            o.push_str(&format!("- [{}] {}\n", i + 1, md_escape(r)));
        }
        if !refs.is_empty() {
            o.push('\n');
        }
        for n in &self.notes {
            o.push_str(&format!("{}\n\n", md_paragraph(n)));
        }
        o.push_str(&md_paragraph(&self.caption));
        o.push('\n');
        o
    }

    /// A `table` float: per section a `tabular` with the booktabs rules
    /// (`\toprule`, `\midrule`, `\bottomrule`), the sources and notes in
    /// small type under it, the caption and a label. Needs
    /// `\usepackage{booktabs}`; every character a label may hold is
    /// escaped or written as a LaTeX command (see [`latex_text`]).
    pub fn latex(&self) -> String {
        let refs = self.references();
        let mut o = format!(
            "% A comparison table written by Burnin {} (burnin table); it needs \\usepackage{{booktabs}}.\n\\begin{{table}}[htbp]\n\\centering\n\\small\n",
            crate::BUILD
        );
        for (i, s) in self.sections.iter().enumerate() {
            if i > 0 {
                o.push_str("\\par\\medskip\n");
            }
            if !s.heading.is_empty() {
                o.push_str(&format!("{}\\par\\smallskip\n", latex_text(&s.heading)));
            }
            let spec: String = s
                .columns
                .iter()
                .map(|c| {
                    if c.kind == ColumnKind::Number {
                        'r'
                    } else {
                        'l'
                    }
                })
                .collect();
            o.push_str(&format!("\\begin{{tabular}}{{{spec}}}\n\\toprule\n"));
            let row = |cells: Vec<String>| {
                let mut cells = cells;
                // `\\` and `\midrule` read a following `[` as their
                // optional argument: a row never starts with one.
                if cells.first().is_some_and(|c| c.starts_with('[')) {
                    cells[0].insert_str(0, "{}");
                }
                format!("{} \\\\\n", cells.join(" & "))
            };
            o.push_str(&row(s
                .columns
                .iter()
                .map(|c| latex_text(&c.title))
                .collect()));
            o.push_str("\\midrule\n");
            for r in &s.rows {
                o.push_str(&row(r
                    .iter()
                    .zip(&s.columns)
                    .map(|(cell, col)| {
                        if col.kind == ColumnKind::Formula {
                            latex_formula(cell)
                        } else {
                            latex_text(&self.shown(&refs, col, cell))
                        }
                    })
                    .collect()));
            }
            o.push_str("\\bottomrule\n\\end{tabular}\n");
        }
        if !refs.is_empty() || !self.notes.is_empty() {
            o.push_str("\\par\\medskip\n{\\footnotesize\\raggedright\n");
            for (i, r) in refs.iter().enumerate() {
                o.push_str(&format!("[{}] {}\\par\n", i + 1, latex_text(r)));
            }
            for n in &self.notes {
                o.push_str(&format!("{}\\par\n", latex_text(n)));
            }
            o.push_str("}\n");
        }
        o.push_str(&format!(
            "\\caption{{{}}}\n\\label{{{LATEX_LABEL}}}\n\\end{{table}}\n",
            latex_text(&self.caption)
        ));
        o
    }

    /// One CSV table per section (fields quoted as RFC 4180 says, lines
    /// ending in a line feed as in Burnin's other CSV tables; sections, when
    /// there are more than one, separated by an empty line): the header,
    /// then the rows, each source written out in full.
    pub fn csv(&self) -> String {
        let mut o = String::new();
        for (i, s) in self.sections.iter().enumerate() {
            if i > 0 {
                o.push('\n');
            }
            let line = |cells: Vec<String>| format!("{}\n", cells.join(","));
            o.push_str(&line(
                s.columns.iter().map(|c| csv_field(&c.title)).collect(),
            ));
            for r in &s.rows {
                o.push_str(&line(r.iter().map(|c| csv_field(c)).collect()));
            }
        }
        o
    }
}

/// Text for a Markdown table cell (GitHub Flavored Markdown): a backslash
/// before each character that would otherwise be read as markup (`\`, `|`,
/// `*`, `_`, `` ` ``, `~`, `<`, `>`, `$` of GitHub's math, an `&` that
/// could start an entity, and a `]` that would close a link), and line
/// breaks and other control characters as spaces.
pub fn md_escape(s: &str) -> String {
    let mut o = String::with_capacity(s.len());
    let mut chars = s.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '\\' | '|' | '*' | '_' | '`' | '~' | '<' | '>' | '$' => {
                o.push('\\');
                o.push(c);
            }
            '&' if matches!(chars.peek(), Some(c) if c.is_ascii_alphanumeric() || *c == '#') => {
                o.push_str("\\&");
            }
            ']' if matches!(chars.peek(), Some('(' | '[' | ':')) => o.push_str("\\]"),
            c if c.is_control() => o.push(' '),
            c => o.push(c),
        }
    }
    o
}

/// A Markdown paragraph: [`md_escape`], and a start that would begin a
/// list or a heading ("- ", "+ ", "= ", "# ", "2024. ") escaped.
fn md_paragraph(s: &str) -> String {
    let o = md_escape(s);
    let digits = o.chars().take_while(char::is_ascii_digit).count();
    if o.starts_with(['-', '+', '=', '#']) {
        format!("\\{o}")
    } else if digits > 0 && o[digits..].starts_with(['.', ')']) {
        format!("{}\\{}", &o[..digits], &o[digits..])
    } else {
        o
    }
}

/// Text for LaTeX (text mode, any engine): the ten special characters
/// escaped (`\ & % $ # _ { } ~ ^`), `<`, `>` and `|` as their text
/// commands (the default font encoding prints other glyphs for them), the
/// symbols the core's texts use (−, ·, √, ×, ≥, →, Greek letters,
/// superscript and subscript digits, …) as LaTeX commands, so that pdfLaTeX
/// needs no Unicode set-up for them; control characters as spaces. Other
/// characters are kept (accented Latin letters work with pdfLaTeX's UTF-8
/// input; other scripts need XeLaTeX or LuaLaTeX).
pub fn latex_text(s: &str) -> String {
    let mut o = String::with_capacity(s.len() + 16);
    let mut chars = s.chars().peekable();
    while let Some(c) = chars.next() {
        if let Some(d) = superscript_digit(c) {
            let mut run = String::from(d);
            while let Some(d) = chars.peek().and_then(|&c| superscript_digit(c)) {
                run.push(d);
                chars.next();
            }
            o.push_str(&format!("\\textsuperscript{{{run}}}"));
            continue;
        }
        if let Some(d) = subscript_digit(c) {
            let mut run = String::from(d);
            while let Some(d) = chars.peek().and_then(|&c| subscript_digit(c)) {
                run.push(d);
                chars.next();
            }
            o.push_str(&format!("\\textsubscript{{{run}}}"));
            continue;
        }
        let math = |cmd: &str| format!("\\ensuremath{{{cmd}}}");
        let text: String = match c {
            '&' | '%' | '$' | '#' | '_' | '{' | '}' => format!("\\{c}"),
            '\\' => "\\textbackslash{}".into(),
            '~' => "\\textasciitilde{}".into(),
            '^' => "\\textasciicircum{}".into(),
            '<' => "\\textless{}".into(),
            '>' => "\\textgreater{}".into(),
            '|' => "\\textbar{}".into(),
            '−' => math("-"),
            '·' => math("\\cdot"),
            '√' => math("\\surd"),
            '×' => math("\\times"),
            '≥' => math("\\geq"),
            '≤' => math("\\leq"),
            '≈' => math("\\approx"),
            '→' => math("\\to"),
            '∞' => math("\\infty"),
            '±' => math("\\pm"),
            '′' => math("'"),
            '½' => math("\\frac{1}{2}"),
            '¼' => math("\\frac{1}{4}"),
            '¾' => math("\\frac{3}{4}"),
            '—' => "---".into(),
            '–' => "--".into(),
            '…' => "\\ldots{}".into(),
            '‘' => "`".into(),
            '’' => "'".into(),
            '“' => "``".into(),
            '”' => "''".into(),
            c if c.is_control() || c == '\u{a0}' => " ".into(),
            c => match greek(c) {
                Some(cmd) => math(cmd),
                None => c.to_string(),
            },
        };
        o.push_str(&text);
    }
    o
}

/// A published bound's formula for LaTeX: as [`latex_text`], with an
/// exponent written `^{…}` ("S^{3/2}") set as a superscript.
pub fn latex_formula(s: &str) -> String {
    let mut o = String::new();
    let mut rest = s;
    while let Some(i) = rest.find("^{") {
        let Some(j) = rest[i..].find('}') else { break };
        o.push_str(&latex_text(&rest[..i]));
        o.push_str(&format!(
            "\\textsuperscript{{{}}}",
            latex_text(&rest[i + 2..i + j])
        ));
        rest = &rest[i + j + 1..];
    }
    o.push_str(&latex_text(rest));
    o
}

fn superscript_digit(c: char) -> Option<char> {
    Some(match c {
        '⁰' => '0',
        '¹' => '1',
        '²' => '2',
        '³' => '3',
        '⁴' => '4',
        '⁵' => '5',
        '⁶' => '6',
        '⁷' => '7',
        '⁸' => '8',
        '⁹' => '9',
        '⁺' => '+',
        '⁻' => '-',
        _ => return None,
    })
}

fn subscript_digit(c: char) -> Option<char> {
    let d = (c as u32).checked_sub('₀' as u32)?;
    (d < 10).then(|| char::from_digit(d, 10).expect("a digit"))
}

/// The LaTeX command of a Greek letter.
fn greek(c: char) -> Option<&'static str> {
    Some(match c {
        'α' => "\\alpha",
        'β' => "\\beta",
        'γ' => "\\gamma",
        'δ' => "\\delta",
        'ε' => "\\varepsilon",
        'ι' => "\\iota",
        'λ' => "\\lambda",
        'μ' => "\\mu",
        'π' => "\\pi",
        'ρ' => "\\rho",
        'σ' => "\\sigma",
        'τ' => "\\tau",
        'Δ' => "\\Delta",
        'Ω' => "\\Omega",
        _ => return None,
    })
}

/// One format as the page offers it for download.
#[derive(Debug, Clone, Serialize)]
pub struct TableExport {
    pub key: &'static str,
    pub name: &'static str,
    pub extension: &'static str,
    pub media_type: &'static str,
    pub text: String,
}

/// The comparison table in every format, for a front end's downloads.
pub fn table_exports(out: &Output) -> Vec<TableExport> {
    let t = comparison_table(out);
    TableFormat::ALL
        .into_iter()
        .map(|f| TableExport {
            key: f.key(),
            name: f.name(),
            extension: f.extension(),
            media_type: f.media_type(),
            text: t.write(f),
        })
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Every special character of LaTeX (the ten Lamport lists in *LaTeX: A
    /// Document Preparation System*, 2nd ed., 1994; from memory) comes out
    /// escaped.
    #[test]
    fn latex_escapes_the_ten_special_characters() {
        assert_eq!(
            latex_text(r"&_%$#{}~^\"),
            r"\&\_\%\$\#\{\}\textasciitilde{}\textasciicircum{}\textbackslash{}"
        );
        assert_eq!(
            latex_text("H³·K"),
            r"H\textsuperscript{3}\ensuremath{\cdot}K"
        );
        assert_eq!(
            latex_text("ε₁₂"),
            r"\ensuremath{\varepsilon}\textsubscript{12}"
        );
        assert_eq!(
            latex_formula("H³·S^{3/2}·√(A·K)"),
            r"H\textsuperscript{3}\ensuremath{\cdot}S\textsuperscript{3/2}\ensuremath{\cdot}\ensuremath{\surd}(A\ensuremath{\cdot}K)"
        );
    }

    /// GitHub Flavored Markdown's backslash escapes (GFM spec 0.29, §2.4):
    /// a `|` inside a cell must be escaped (§4.10, tables); from memory.
    #[test]
    fn markdown_escapes_pipes_and_markup() {
        assert_eq!(md_escape("a|b*c_d"), r"a\|b\*c\_d");
        assert_eq!(md_escape("[x](y)"), r"[x\](y)");
        assert_eq!(md_escape("[0.1, 0.2]"), "[0.1, 0.2]");
        assert_eq!(md_escape("a\nb"), "a b");
    }

    /// A table of two sections writes both, in every format, and numbers
    /// the sources across them.
    #[test]
    fn every_section_is_written() {
        let col = |t: &str, kind| Column {
            title: t.into(),
            kind,
        };
        let t = ComparisonTable {
            caption: "c".into(),
            sections: vec![
                Section {
                    heading: String::new(),
                    columns: vec![col("x", ColumnKind::Text), col("src", ColumnKind::Source)],
                    rows: vec![vec!["a".into(), "Paper A".into()]],
                },
                Section {
                    heading: "fitted exponents".into(),
                    columns: vec![col("y", ColumnKind::Number), col("src", ColumnKind::Source)],
                    rows: vec![vec!["2".into(), "Paper B".into()]],
                },
            ],
            notes: vec![],
        };
        assert_eq!(t.references(), ["Paper A", "Paper B"]);
        let md = t.markdown();
        assert!(
            md.contains("| a | [1] |") && md.contains("| 2 | [2] |"),
            "{md}"
        );
        assert!(md.contains("**fitted exponents**"), "{md}");
        let tex = t.latex();
        assert_eq!(tex.matches("\\begin{tabular}").count(), 2, "{tex}");
        assert_eq!(t.csv(), "x,src\na,Paper A\n\ny,src\n2,Paper B\n");
    }
}

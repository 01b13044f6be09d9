//! The comparison table (`burnin table`, the page's "Comparison table"):
//! its numbers read back from the Markdown and the CSV equal the results
//! file's to the printed digits, and its LaTeX follows LaTeX's and
//! booktabs' rules.

mod common;

use burnin::experiment::{
    CAVEAT, LearnerResult, Output, Results, TableFormat, median_of, parse_results,
};
use serde_json::{Value, json};

/// A label holding every character LaTeX treats specially, and Markdown's
/// table separator.
const NASTY: &str = r"odd & _%$#{}~^\ label | *";

fn root() -> std::path::PathBuf {
    std::path::PathBuf::from(env!("CARGO_MANIFEST_DIR"))
}

/// Runs an experiment file (JSON) to the end, writes its results file and
/// reads that file back, as `burnin table` does.
fn results_file(e: &Value) -> Output {
    let exp = burnin::experiment::parse_experiment(&e.to_string(), None).unwrap();
    let mut q = burnin::experiment::RunQueue::new(exp);
    while !q.advance(u64::MAX) {}
    parse_results(&q.output().to_json()).unwrap()
}

/// The ferry fixture of the browser checks with learners that give every
/// kind of cell: a bound that applies with a burn-in, one without, a scaled
/// bonus, a Bayesian bound, no bound, and a settled burn-in.
fn ferry(seeds: u64) -> Output {
    let text = std::fs::read_to_string(root().join("tests/browser/fixtures/ferry-experiment.json"))
        .unwrap();
    let mut e: Value = serde_json::from_str(&text).unwrap();
    e["seeds"] = json!(seeds);
    e["learners"] = json!([
        {"algorithm": "psrl", "label": NASTY},
        {"algorithm": "ucbvi-bernstein"},
        {"algorithm": "mvp", "bonus_scale": 0.01},
        {"algorithm": "q-ucb-bernstein", "bonus_scale": 0.05},
        {"algorithm": "eps-greedy", "epsilon": 0.2},
        {"algorithm": "uniform"}
    ]);
    results_file(&e)
}

/// A sweep over H: the default ε targets (H/10, H/20) differ per point.
fn sweep_over_h() -> Output {
    results_file(&json!({
        "format": "burnin-experiment", "version": 1, "name": "H sweep",
        "generator": {"kind": "random", "states": 3, "actions": 2, "successors": 2, "horizon": 4, "seed": 3},
        "episodes": 300, "seeds": 2, "sweep": {"parameter": "horizon", "values": [4, 8]},
        "learners": [{"algorithm": "ucbvi-hoeffding", "label": NASTY}, {"algorithm": "uniform"}]
    }))
}

// ---------------------------------------------------------------------
// Reading the table back.

/// The rows of the first GitHub pipe table of `md` (header first), each
/// cell unescaped: cells are split at a `|` not preceded by a backslash,
/// and a backslash before ASCII punctuation is dropped (GitHub Flavored
/// Markdown spec 0.29, §2.4 backslash escapes and §4.10 tables; from
/// memory).
fn markdown_rows(md: &str) -> Vec<Vec<String>> {
    let lines: Vec<&str> = md
        .lines()
        .skip_while(|l| !l.starts_with('|'))
        .take_while(|l| l.starts_with('|'))
        .collect();
    assert!(lines.len() >= 3, "a header, a delimiter row and rows: {md}");
    let split = |l: &str| -> Vec<String> {
        let inner = l
            .strip_prefix("| ")
            .and_then(|l| l.strip_suffix(" |"))
            .unwrap_or_else(|| panic!("a row starts with `| ` and ends with ` |`: {l}"));
        let mut cells = vec![String::new()];
        let mut chars = inner.chars().peekable();
        while let Some(c) = chars.next() {
            match c {
                '\\' => {
                    let n = chars.next().expect("an escaped character");
                    assert!(n.is_ascii_punctuation(), "escaped {n:?} in {l}");
                    cells.last_mut().unwrap().push(n);
                }
                '|' => cells.push(String::new()),
                c => cells.last_mut().unwrap().push(c),
            }
        }
        cells.iter().map(|c| c.trim().to_owned()).collect()
    };
    let header = split(lines[0]);
    let delimiter = split(lines[1]);
    assert_eq!(delimiter.len(), header.len(), "the delimiter row");
    assert!(
        delimiter.iter().all(|d| d == ":---" || d == "---:"),
        "{delimiter:?}"
    );
    std::iter::once(header)
        .chain(lines[2..].iter().map(|l| split(l)))
        .collect()
}

/// The records of a CSV file (RFC 4180 §2: fields separated by commas, a
/// field with a comma, quote or line break enclosed in double quotes, a
/// quote inside one doubled), each line ending in a line feed.
fn csv_rows(text: &str) -> Vec<Vec<String>> {
    let mut rows = Vec::new();
    let mut row = vec![String::new()];
    let mut chars = text.chars().peekable();
    let mut quoted = false;
    while let Some(c) = chars.next() {
        match (quoted, c) {
            (false, '"') => {
                assert!(row.last().unwrap().is_empty(), "a quote opens a field");
                quoted = true;
            }
            (true, '"') if chars.peek() == Some(&'"') => {
                chars.next();
                row.last_mut().unwrap().push('"');
            }
            (true, '"') => {
                quoted = false;
                assert!(
                    matches!(chars.peek(), Some(',' | '\n') | None),
                    "a closing quote ends the field"
                );
            }
            (false, ',') => row.push(String::new()),
            (false, '\n') => rows.push(std::mem::replace(&mut row, vec![String::new()])),
            (_, c) => row.last_mut().unwrap().push(c),
        }
    }
    assert!(!quoted, "every quoted field is closed");
    assert_eq!(row, [""], "the last line ends in a line feed");
    rows
}

/// A number as `number_text` prints it ("−", "e+"), and half a unit of its
/// last printed digit: the value it stands for lies within that.
fn printed(text: &str) -> (f64, f64) {
    let t = text.replace('−', "-");
    let (mantissa, exponent) = match t.split_once("e+") {
        Some((m, e)) => (m.to_owned(), e.parse::<i32>().unwrap()),
        None => match t.split_once('e') {
            Some((m, e)) => (m.to_owned(), e.parse::<i32>().unwrap()),
            None => (t.clone(), 0),
        },
    };
    let decimals = mantissa.split_once('.').map_or(0, |(_, d)| d.len()) as i32;
    let x: f64 = t.parse().unwrap_or_else(|_| panic!("a number: {text:?}"));
    (x, 0.5 * 10f64.powi(exponent - decimals) * (1.0 + 1e-9))
}

fn assert_printed(text: &str, value: f64, what: &str) {
    let (x, half) = printed(text);
    assert!(
        (x - value).abs() <= half,
        "{what}: printed {text:?}, the file holds {value}"
    );
}

/// "[lo, hi]" (or "[0 (clipped), hi]") as its two numbers.
fn bracket(text: &str) -> (String, String) {
    let inner = text
        .trim()
        .strip_prefix('[')
        .and_then(|t| t.strip_suffix(']'))
        .unwrap_or_else(|| panic!("an interval: {text:?}"));
    let (lo, hi) = inner.split_once(", ").unwrap();
    (lo.replace(" (clipped)", ""), hi.to_owned())
}

/// Checks one row (cells by column title) against the learner's results.
fn check_row(cell: &dyn Fn(&str) -> String, l: &LearnerResult, source_of: &dyn Fn(&str) -> String) {
    assert_eq!(cell("learner"), l.label);
    let info = burnin::learn::AlgorithmKind::from_key(&l.algorithm)
        .unwrap()
        .info();
    assert_eq!(cell("algorithm"), info.name, "the catalogue's name");
    // Regret at K and its Student-t interval.
    let k = l.regret_mean.len() - 1;
    assert_printed(&cell("regret at K"), l.regret_mean[k], "regret at K");
    let (lo, hi) = bracket(&cell("95% interval"));
    assert_printed(&lo, l.regret_lo[k], "regret lo");
    assert_printed(&hi, l.regret_hi[k], "regret hi");
    // The slope and its bootstrap interval.
    let slope = cell("slope [95% bootstrap]");
    let (s, iv) = slope.split_once(' ').unwrap();
    assert_printed(s, l.slope.unwrap(), "slope");
    let (slo, shi) = bracket(iv);
    let (a, b) = l.slope_interval.unwrap();
    assert_printed(&slo, a, "slope lo");
    assert_printed(&shi, b, "slope hi");
    // Burn-in: whole episodes, exactly; or not settled.
    let burn = cell("burn-in [95% bootstrap]");
    match l.burn_in {
        Some(b) => {
            let (v, iv) = burn.split_once(' ').unwrap();
            assert_eq!(v.parse::<u64>().unwrap(), b, "burn-in");
            let (lo, hi) = bracket(iv.split(" (").next().unwrap());
            let (wlo, whi) = l.burn_in_interval.unwrap();
            assert_eq!(lo.parse::<u64>().ok(), wlo);
            assert_eq!(hi.parse::<u64>().ok(), whi);
        }
        None => assert!(burn.starts_with("not settled"), "{burn}"),
    }
    // The published bound, from the file's bound.
    match &l.bound {
        Some(b) => {
            assert_eq!(cell("published bound"), b.formula);
            let applies = cell("bound applies");
            assert_eq!(applies == "yes", b.applies, "{applies}");
            if !b.applies {
                assert_eq!(applies, format!("no: {}", b.why_not()));
            }
            match b.burn_in {
                Some(x) => assert_printed(&cell("published burn-in"), x, "published burn-in"),
                None => assert_eq!(cell("published burn-in"), "none"),
            }
            assert!(
                source_of(&cell("source")).starts_with(&b.source),
                "{} names {}",
                cell("source"),
                b.source
            );
        }
        None => {
            for c in [
                "published bound",
                "bound applies",
                "published burn-in",
                "source",
            ] {
                assert_eq!(cell(c), "—", "{c}");
            }
        }
    }
    // Episodes to ε: the median first ε-optimal episode, exactly.
    for e in &l.episodes_to_eps {
        let text = cell(&format!("first ε-optimal episode (ε = {})", e.epsilon));
        let got: Vec<u64> = e.first_optimal.iter().flatten().copied().collect();
        if got.len() == e.first_optimal.len() {
            let m = median_of(&got).unwrap();
            assert_eq!(text.parse::<f64>().unwrap(), m, "median first ε-optimal");
        } else {
            let n = e.first_optimal.len();
            assert_eq!(text, format!("not in {} of {n}", n - got.len()));
        }
    }
}

/// The rows of a table read back, checked against the results, with the
/// sources the `source` cells name.
fn check_rows(rows: &[Vec<String>], r: &Results, source_of: &dyn Fn(&str) -> String) {
    let header = &rows[0];
    assert_eq!(rows.len() - 1, r.learners.len(), "a row per learner");
    for (row, l) in rows[1..].iter().zip(&r.learners) {
        assert_eq!(row.len(), header.len(), "{row:?}");
        let cell = |title: &str| {
            let i = header
                .iter()
                .position(|h| h == title)
                .unwrap_or_else(|| panic!("no column {title:?} in {header:?}"));
            row[i].clone()
        };
        check_row(&cell, l, source_of);
    }
}

fn single(out: &Output) -> &Results {
    match out {
        Output::Single(r) => r,
        Output::Sweep(_) => panic!("results of one point"),
    }
}

/// The Markdown and the CSV read back give the results file's numbers to
/// the digits they print, and the same cells (the CSV writes each source
/// out, where the Markdown numbers them and lists them under the table).
#[test]
fn the_tables_numbers_are_the_results_files_to_the_printed_digits() {
    let out = ferry(3);
    let r = single(&out);
    assert!(
        r.learners.iter().any(|l| l.burn_in.is_some()),
        "a learner that settled, so a burn-in is checked"
    );
    let md = out.table(TableFormat::Markdown);
    let rows = markdown_rows(&md);
    let refs: Vec<(String, String)> = md
        .lines()
        .filter_map(|l| l.strip_prefix("- ["))
        .map(|l| {
            let (n, text) = l.split_once("] ").unwrap();
            (format!("[{n}]"), text.replace('\\', ""))
        })
        .collect();
    let source_of = |c: &str| {
        refs.iter()
            .find(|(n, _)| n == c)
            .map(|(_, t)| t.clone())
            .unwrap_or_else(|| panic!("{c} is listed under the table"))
    };
    check_rows(&rows, r, &source_of);
    let csv = out.table(TableFormat::Csv);
    let crows = csv_rows(&csv);
    check_rows(&crows, r, &|c: &str| c.to_owned());
    let src = rows[0].iter().position(|h| h == "source").unwrap();
    for (m, c) in rows.iter().zip(&crows) {
        for (i, (a, b)) in m.iter().zip(c).enumerate() {
            if i == src && a.starts_with('[') {
                assert_eq!(source_of(a), *b);
            } else {
                assert_eq!(a, b, "the same cell in Markdown and CSV");
            }
        }
    }
    // The caption names what ran and ends with the page's caution.
    assert!(md.contains("Night ferry") && md.contains("K = 1500 episodes × 3 seeds"));
    assert!(md.trim_end().ends_with(CAVEAT));
}

/// With one seed there is no interval, and the table says so (as every
/// table does: "n/a (one seed)").
#[test]
fn one_seed_has_no_interval() {
    let out = ferry(1);
    let rows = csv_rows(&out.table(TableFormat::Csv));
    let i = rows[0].iter().position(|h| h == "95% interval").unwrap();
    assert!(rows[1..].iter().all(|r| r[i] == "n/a (one seed)"));
}

/// A sweep: a row per (point, learner), the swept value in front; over H
/// the default ε targets (H/10, H/20: 0.4 and 0.2 at H = 4, 0.8 and 0.4 at
/// H = 8, derived by hand) differ per point, so each cell names its own.
#[test]
fn a_sweep_has_a_row_per_point_and_learner_with_the_swept_value_in_front() {
    let out = sweep_over_h();
    let Output::Sweep(s) = &out else {
        panic!("a sweep")
    };
    let rows = markdown_rows(&out.table(TableFormat::Markdown));
    assert_eq!(rows[0][0], "horizon");
    assert_eq!(rows.len() - 1, 4);
    let values: Vec<&str> = rows[1..].iter().map(|r| r[0].as_str()).collect();
    assert_eq!(values, ["4", "4", "8", "8"]);
    let t1 = rows[0]
        .iter()
        .position(|h| h == "first ε-optimal episode (target 1)")
        .unwrap();
    assert!(rows[1][t1].ends_with("(ε = 0.4)"), "{}", rows[1][t1]);
    assert!(rows[3][t1].ends_with("(ε = 0.8)"), "{}", rows[3][t1]);
    let at = |title: &str| rows[0].iter().position(|h| h == title).unwrap();
    for (p, point) in s.points.iter().enumerate() {
        for (li, l) in point.learners.iter().enumerate() {
            let row = &rows[1 + p * 2 + li];
            assert_eq!(row[at("learner")], l.label);
            let k = l.regret_mean.len() - 1;
            assert_printed(&row[at("regret at K")], l.regret_mean[k], "regret at K");
            let (lo, hi) = bracket(&row[at("95% interval")]);
            assert_printed(&lo, l.regret_lo[k], "regret lo");
            assert_printed(&hi, l.regret_hi[k], "regret hi");
            assert_eq!(row[at("burn-in [95% bootstrap]")], l.burn_in_text());
            assert_eq!(row[at("slope [95% bootstrap]")], l.slope_text());
        }
    }
    // The CSV holds the same cells, each source written out in full.
    let csv = csv_rows(&out.table(TableFormat::Csv));
    // The main table first; a sweep over H also has its scaling section
    // (the exponents in H) after it.
    assert!(csv.len() > rows.len(), "{} rows", csv.len());
    assert!(out.table(TableFormat::Markdown).contains("Scaling in H"));
    for (m, c) in rows.iter().zip(&csv) {
        for (i, (a, b)) in m.iter().zip(c).enumerate() {
            if i != at("source") || a == "—" {
                assert_eq!(a, b);
            }
        }
    }
}

/// A results file written by an earlier build (no per-seed readings, no ε
/// PAC readings) still gives a table.
#[test]
fn results_from_an_earlier_build_give_a_table() {
    let text = std::fs::read_to_string(
        root().join("tests/browser/fixtures/results-from-an-earlier-build.json"),
    )
    .unwrap();
    let out = parse_results(&text).unwrap();
    let rows = markdown_rows(&out.table(TableFormat::Markdown));
    assert_eq!(rows.len() - 1, single(&out).learners.len());
}

/// The caution is the page's, word for word (www/index.html, under the
/// results).
#[test]
fn the_caveat_is_the_pages() {
    let html = std::fs::read_to_string(root().join("www/index.html")).unwrap();
    // The results' caution paragraph holds exactly CAVEAT (the guide's
    // copies it there when it opens).
    let at = html
        .find("<p class=\"caption caution\" id=\"results-caution\"")
        .expect("www/index.html has a results caution");
    let tag_end = at + html[at..].find('>').expect("the tag closes") + 1;
    let text_end = tag_end + html[tag_end..].find("</p>").expect("the paragraph closes");
    assert_eq!(
        &html[tag_end..text_end],
        CAVEAT,
        "www/index.html's results caption is CAVEAT"
    );
}

// ---------------------------------------------------------------------
// The LaTeX, checked by a parser.

/// The commands the table may use: the LaTeX kernel's (Lamport, *LaTeX: A
/// Document Preparation System*, 2nd ed., 1994; `\textsuperscript`,
/// `\textsubscript`, `\ensuremath`, the text symbols of textcomp, which the
/// kernel has loaded since 2020) and booktabs' rules (S. Fear, *booktabs*
/// package documentation); from memory.
const KNOWN_COMMANDS: &[&str] = &[
    "begin",
    "end",
    "centering",
    "small",
    "footnotesize",
    "raggedright",
    "par",
    "medskip",
    "smallskip",
    "toprule",
    "midrule",
    "bottomrule",
    "caption",
    "label",
    "textbackslash",
    "textasciitilde",
    "textasciicircum",
    "textless",
    "textgreater",
    "textbar",
    "textsuperscript",
    "textsubscript",
    "ensuremath",
    "ldots",
    "cdot",
    "surd",
    "times",
    "geq",
    "leq",
    "approx",
    "to",
    "infty",
    "pm",
    "frac",
    "alpha",
    "beta",
    "gamma",
    "delta",
    "varepsilon",
    "iota",
    "lambda",
    "mu",
    "pi",
    "rho",
    "sigma",
    "tau",
    "Delta",
    "Omega",
];

/// What the parser found wrong in a piece of LaTeX text (a cell, the
/// caption), or None: braces balance, every `\` starts a known command or
/// escapes one of `& % $ # _ { }`, and none of `& % $ # _ ~ ^` and no `\\`
/// stands unescaped.
fn text_problem(t: &str) -> Option<String> {
    let mut depth = 0i32;
    let mut chars = t.chars().peekable();
    while let Some(c) = chars.next() {
        match c {
            '\\' => match chars.peek().copied() {
                Some(n) if "&%$#_{}".contains(n) => {
                    chars.next();
                }
                Some(n) if n.is_ascii_alphabetic() => {
                    let mut name = String::new();
                    while let Some(&n) = chars.peek().filter(|n| n.is_ascii_alphabetic()) {
                        name.push(n);
                        chars.next();
                    }
                    if !KNOWN_COMMANDS.contains(&name.as_str()) {
                        return Some(format!("unknown command \\{name}"));
                    }
                }
                other => return Some(format!("a backslash before {other:?}")),
            },
            '{' => depth += 1,
            '}' => {
                depth -= 1;
                if depth < 0 {
                    return Some("a closing brace without an opening one".into());
                }
            }
            '&' | '%' | '$' | '#' | '_' | '~' | '^' => {
                return Some(format!("an unescaped {c:?}"));
            }
            _ => {}
        }
    }
    (depth != 0).then(|| format!("{depth} unclosed braces"))
}

/// `s` split at every `&` that is not escaped.
fn split_cells(row: &str) -> Vec<&str> {
    let mut cells = Vec::new();
    let mut start = 0;
    let b = row.as_bytes();
    for i in 0..b.len() {
        if b[i] == b'&' && (i == 0 || b[i - 1] != b'\\') {
            cells.push(&row[start..i]);
            start = i + 1;
        }
    }
    cells.push(&row[start..]);
    cells
}

/// The text a LaTeX cell stands for, for the escapes and commands the table
/// writes.
fn unlatex(t: &str) -> String {
    let mut s = t.trim().to_owned();
    for (from, to) in [
        (r"\textbackslash{}", "\\"),
        (r"\textasciitilde{}", "~"),
        (r"\textasciicircum{}", "^"),
        (r"\textbar{}", "|"),
        (r"\textless{}", "<"),
        (r"\textgreater{}", ">"),
        (r"\ensuremath{\times}", "×"),
        (r"\ensuremath{\varepsilon}", "ε"),
        (r"\&", "&"),
        (r"\%", "%"),
        (r"\$", "$"),
        (r"\#", "#"),
        (r"\_", "_"),
        (r"\{", "{"),
        (r"\}", "}"),
    ] {
        s = s.replace(from, to);
    }
    s
}

/// One `tabular` of the table: its column count and rows, after checking
/// its rules: `\toprule`, the header, `\midrule`, the rows and
/// `\bottomrule`, each row ending in `\\` with columns − 1 `&`.
fn tabular(body: &[&str], spec: &str) -> Vec<Vec<String>> {
    let columns = spec.chars().filter(|c| "lrc".contains(*c)).count();
    assert_eq!(columns, spec.len(), "only l, r and c columns: {spec}");
    let rules: Vec<(usize, &str)> = body
        .iter()
        .enumerate()
        .filter(|(_, l)| {
            l.starts_with("\\toprule")
                || l.starts_with("\\midrule")
                || l.starts_with("\\bottomrule")
        })
        .map(|(i, l)| (i, l.trim()))
        .collect();
    assert_eq!(
        rules.iter().map(|r| r.1).collect::<Vec<_>>(),
        ["\\toprule", "\\midrule", "\\bottomrule"],
        "the booktabs rules, in order, once each"
    );
    assert_eq!(rules[0].0, 0, "\\toprule first");
    assert_eq!(rules[1].0, 2, "\\midrule under the one header row");
    assert_eq!(rules[2].0, body.len() - 1, "\\bottomrule last");
    let mut rows = Vec::new();
    for (i, l) in body.iter().enumerate() {
        if rules.iter().any(|r| r.0 == i) {
            continue;
        }
        let row = l
            .strip_suffix(" \\\\")
            .unwrap_or_else(|| panic!("row {i} ends in \\\\: {l}"));
        assert!(!row.contains("\\\\"), "one row per line: {l}");
        assert!(
            !row.starts_with('['),
            "no row starts with [ (it would be \\\\'s optional argument): {l}"
        );
        let cells = split_cells(row);
        assert_eq!(
            cells.len() - 1,
            columns - 1,
            "{} & for {columns} columns: {l}",
            cells.len() - 1
        );
        for c in &cells {
            if let Some(p) = text_problem(c) {
                panic!("cell {c:?}: {p}");
            }
        }
        rows.push(cells.into_iter().map(unlatex).collect());
    }
    rows
}

/// The LaTeX table, parsed: no TeX engine is installed where the tests run,
/// and Debian's texlive (with booktabs) is too heavy to install for CI, so
/// instead of compiling it this test checks it with a parser written here
/// for the rules the table must keep (Lamport 1994 for LaTeX, the booktabs
/// documentation for the rules; from memory): braces balance, the float
/// holds a `tabular` whose rows have columns − 1 `&` and end in `\\`, the
/// booktabs rules stand in order, every special character of a cell — the
/// label `odd & _%$#{}~^\ label | *` included — is escaped and reads back
/// as the label, only known commands are used, and the caption carries the
/// model, the episodes, the seeds and the page's caution.
#[test]
fn the_latex_follows_latex_and_booktabs_rules() {
    for out in [ferry(3), sweep_over_h()] {
        let tex = out.table(TableFormat::Latex);
        let lines: Vec<&str> = tex.lines().filter(|l| !l.starts_with('%')).collect();
        assert!(
            tex.starts_with("% ")
                && tex
                    .lines()
                    .next()
                    .unwrap()
                    .contains("\\usepackage{booktabs}")
        );
        // Braces balance over the whole document (escaped ones aside).
        let mut depth = 0i32;
        let b: Vec<char> = lines.join("\n").chars().collect();
        for (i, &c) in b.iter().enumerate() {
            let escaped = i > 0 && b[i - 1] == '\\' && !(i > 1 && b[i - 2] == '\\');
            if !escaped && c == '{' {
                depth += 1;
            } else if !escaped && c == '}' {
                depth -= 1;
                assert!(depth >= 0, "a brace closes nothing at {i}");
            }
        }
        assert_eq!(depth, 0, "braces balance");
        assert_eq!(lines[0], "\\begin{table}[htbp]");
        assert_eq!(*lines.last().unwrap(), "\\end{table}");
        let start = lines
            .iter()
            .position(|l| l.starts_with("\\begin{tabular}{"))
            .expect("a tabular");
        let end = lines
            .iter()
            .position(|l| *l == "\\end{tabular}")
            .expect("its end");
        let spec = lines[start]
            .strip_prefix("\\begin{tabular}{")
            .unwrap()
            .strip_suffix('}')
            .unwrap();
        let rows = tabular(&lines[start + 1..end], spec);
        let labels: Vec<&str> = match &out {
            Output::Single(r) => r.learners.iter().map(|l| l.label.as_str()).collect(),
            Output::Sweep(s) => s
                .points
                .iter()
                .flat_map(|p| p.learners.iter().map(|l| l.label.as_str()))
                .collect(),
        };
        let col = rows[0].iter().position(|h| h == "learner").unwrap();
        assert_eq!(rows.len() - 1, labels.len());
        for (row, label) in rows[1..].iter().zip(&labels) {
            assert_eq!(row[col], *label, "the label reads back");
        }
        assert!(labels.contains(&NASTY));
        // The caption: one line, checked as text, with what ran and the caution.
        let caption = lines
            .iter()
            .find_map(|l| l.strip_prefix("\\caption{"))
            .and_then(|l| l.strip_suffix('}'))
            .expect("a caption on one line");
        assert_eq!(text_problem(caption), None, "{caption}");
        assert!(caption.contains("episodes \\ensuremath{\\times}") && caption.contains("seeds"));
        assert!(caption.ends_with(&burnin::experiment::latex_text(CAVEAT)));
        assert!(lines.contains(&"\\label{tab:burnin-comparison}"));
        // The sources and notes under the table are text, too.
        for l in &lines[end + 1..] {
            if l.ends_with("\\par") && !l.starts_with('\\') {
                assert_eq!(text_problem(l), None, "{l}");
            }
        }
    }
}

//! Model file format v1 (`"format": "burnin-model"`): reading and writing.
//!
//! Reading happens in two passes. The first reads the JSON leniently and
//! reports every value of the wrong type or shape, each at its JSON path; when
//! the structure is sound, the second ([`Mdp::from_parts`]) reports every
//! semantic problem (sums, ranges, duplicates, limits). Writing produces the
//! canonical layout: fields in a fixed order, one transition row per line,
//! numbers written so that they read back to the same bits.
//!
//! The format is documented in `docs/formats.md`.

use serde::de::{MapAccess, SeqAccess};

use super::limits::{MAX_ACTIONS, MAX_FILE_BYTES, MAX_HORIZON, MAX_STATES};
use super::{Mdp, MdpParts, Problems, Reward, StepParts};
use crate::format::lax::{Accept, Lax, List, Reader, syntax_problem};
use crate::format::{check_header, lax_object};

/// The `format` value of a model file.
pub const MODEL_FORMAT: &str = "burnin-model";
/// The model format version this build reads and writes.
pub const MODEL_VERSION: u64 = 1;

lax_object! {
    struct RawModel {
        format: Lax<String>,
        version: Lax<f64>,
        name: Lax<String>,
        notes: Lax<String>,
        horizon: Lax<f64>,
        discount: Lax<f64>,
        states: Lax<List<Lax<String>, MAX_STATES>>,
        actions: Lax<List<Lax<String>, MAX_ACTIONS>>,
        start: Lax<List<Lax<f64>, MAX_STATES>>,
        stationary: Lax<bool>,
        steps: Lax<List<Lax<RawStep>, MAX_HORIZON>>,
        layout: Lax<RawLayout>,
    }
}

/// An S×A array of arrays, each level read leniently (and never stored
/// past the limits of S and A).
type Table<T> = Lax<List<Lax<List<T, MAX_ACTIONS>>, MAX_STATES>>;

/// One transition row's entries (at most one per next state).
type Entries = Lax<List<Lax<RawEntry>, MAX_STATES>>;

/// A reward's parameters: a pair, with room to say how many more were given.
type Pair = Lax<List<Lax<f64>, 2>>;

lax_object! {
    struct RawStep {
        transitions: Table<Entries>,
        rewards: Table<Lax<RawReward>>,
    }
}

/// `[next_state, probability]`, or the number of elements found instead of 2.
struct RawEntry {
    next: Lax<f64>,
    prob: Lax<f64>,
    len: usize,
}

impl Accept for RawEntry {
    fn seq<'de, A: SeqAccess<'de>>(mut seq: A) -> Result<Option<Self>, A::Error> {
        let next = seq.next_element::<Lax<f64>>()?;
        let prob = if next.is_some() {
            seq.next_element::<Lax<f64>>()?
        } else {
            None
        };
        let mut len = next.is_some() as usize + prob.is_some() as usize;
        while seq.next_element::<serde::de::IgnoredAny>()?.is_some() {
            len += 1;
        }
        Ok(Some(RawEntry {
            next: next.unwrap_or(Lax::Wrong(crate::format::lax::Kind::Null)),
            prob: prob.unwrap_or(Lax::Wrong(crate::format::lax::Kind::Null)),
            len,
        }))
    }
}

/// A reward: a number, or an object with exactly one distribution key.
enum RawReward {
    Fixed(f64),
    Dist {
        key: String,
        value: Pair,
        scalar: Option<Lax<f64>>,
        extra_keys: usize,
    },
    Empty,
}

impl Accept for RawReward {
    fn number(v: f64) -> Option<Self> {
        Some(RawReward::Fixed(v))
    }
    fn map<'de, M: MapAccess<'de>>(mut map: M) -> Result<Option<Self>, M::Error> {
        let Some(key) = map.next_key::<String>()? else {
            return Ok(Some(RawReward::Empty));
        };
        // `bernoulli` takes a number; `uniform` and `beta` take a pair.
        let (value, scalar) = if key == "bernoulli" {
            (
                Lax::Ok(List {
                    items: Vec::new(),
                    len: 0,
                }),
                Some(map.next_value::<Lax<f64>>()?),
            )
        } else {
            (map.next_value::<Pair>()?, None)
        };
        let mut extra_keys = 0;
        while map
            .next_entry::<serde::de::IgnoredAny, serde::de::IgnoredAny>()?
            .is_some()
        {
            extra_keys += 1;
        }
        Ok(Some(RawReward::Dist {
            key,
            value,
            scalar,
            extra_keys,
        }))
    }
}

lax_object! {
    struct RawLayout {
        positions: Lax<List<Lax<List<Lax<f64>, 2>>, MAX_STATES>>,
    }
}

/// Reads, checks and builds a model from the text of a model file.
///
/// Returns every problem found, each with its JSON path.
pub fn parse_model(text: &str) -> Result<Mdp, Problems> {
    let parts = parse_model_parts(text)?;
    Mdp::from_parts(parts)
}

/// The first pass: JSON syntax, types and shapes; the result is unchecked.
pub fn parse_model_parts(text: &str) -> Result<MdpParts, Problems> {
    if text.len() > MAX_FILE_BYTES {
        return Err(Problems::single(
            "",
            format!(
                "file is {} bytes, over the limit of {MAX_FILE_BYTES} bytes",
                text.len()
            ),
        ));
    }
    let raw: Lax<RawModel> =
        serde_json::from_str(text).map_err(|e| Problems::single("", syntax_problem(&e)))?;
    let mut problems = Problems::default();
    let parts = convert(
        raw,
        &mut Reader {
            problems: &mut problems,
        },
    );
    match parts {
        Some(p) if problems.is_empty() => Ok(p),
        _ => Err(problems),
    }
}

fn labels<const MAX: usize>(
    r: &mut Reader,
    path: &str,
    v: Option<Lax<List<Lax<String>, MAX>>>,
) -> Option<Vec<String>> {
    let list = r.require_list(path, v, "an array of strings", "labels")?;
    let mut out = Vec::with_capacity(list.len());
    let mut ok = true;
    for (i, x) in list.into_iter().enumerate() {
        match r.take(&format!("{path}[{i}]"), x, "a string") {
            Some(s) => out.push(s),
            None => ok = false,
        }
    }
    ok.then_some(out)
}

fn numbers(r: &mut Reader, path: &str, list: Vec<Lax<f64>>) -> Option<Vec<f64>> {
    let mut out = Vec::with_capacity(list.len());
    let mut ok = true;
    for (i, x) in list.into_iter().enumerate() {
        match r.take(&format!("{path}[{i}]"), x, "a number") {
            Some(v) => out.push(v),
            None => ok = false,
        }
    }
    ok.then_some(out)
}

fn convert(raw: Lax<RawModel>, r: &mut Reader) -> Option<MdpParts> {
    let m = r.take("", raw, "a JSON object (a burnin-model file)")?;
    if !check_header(r, m.format, m.version, MODEL_FORMAT, MODEL_VERSION) {
        return None;
    }
    m.fields.finish("", RawModel::FIELDS, r.problems);
    let name = match m.name {
        Some(n) => r.take("name", n, "a string"),
        None => Some(String::new()),
    };
    let notes = m.notes.and_then(|n| r.take("notes", n, "a string"));
    let horizon = r
        .require("horizon", m.horizon, "a whole number ≥ 1")
        .and_then(|h| r.whole("horizon", h, 1e15, "a whole number ≥ 1"));
    let discount = m.discount.and_then(|d| r.take("discount", d, "a number"));
    let states = labels(r, "states", m.states);
    let actions = labels(r, "actions", m.actions);
    let start = r
        .require_list(
            "start",
            m.start,
            "an array of probabilities",
            "probabilities",
        )
        .and_then(|l| numbers(r, "start", l));
    let stationary = m
        .stationary
        .and_then(|s| r.take("stationary", s, "true or false"));
    let layout = m.layout.and_then(|l| layout(r, l));
    let steps = r.require_list("steps", m.steps, "an array of step tables", "step tables");

    // Sizes first: nothing proportional to S, A or H is allocated beyond
    // what the file itself holds until they are known to be within limits.
    let (name, horizon, states, actions, start, steps) =
        (name?, horizon?, states?, actions?, start?, steps?);
    let horizon = horizon as usize;
    let mut sizes = super::check::Checker::default();
    let ok = sizes.check_horizon(horizon as f64)
        && sizes.check_cells(states.len().max(1), actions.len().max(1), horizon);
    for p in sizes.into_problems().list() {
        r.problems.push(p.path.clone(), p.message.clone());
    }
    if !ok {
        return None;
    }
    if states.is_empty() || actions.is_empty() {
        // No table can be read without S and A; the checks of
        // `Mdp::from_parts` report the empty list.
        return Some(MdpParts {
            name,
            notes,
            horizon,
            discount,
            states,
            actions,
            start,
            stationary: stationary.unwrap_or(true),
            steps: Vec::new(),
            layout,
        });
    }
    let (s, a) = (states.len(), actions.len());
    let stationary = stationary.unwrap_or(steps.len() == 1);
    let mut out_steps = Vec::with_capacity(steps.len());
    for (i, st) in steps.into_iter().enumerate() {
        if let Some(sp) = step(r, &format!("steps[{i}]"), st, s, a) {
            out_steps.push(sp);
        }
    }
    Some(MdpParts {
        name,
        notes,
        horizon,
        discount,
        states,
        actions,
        start,
        stationary,
        steps: out_steps,
        layout,
    })
}

fn layout(r: &mut Reader, l: Lax<RawLayout>) -> Option<Vec<[f64; 2]>> {
    let l = r.take("layout", l, "an object with \"positions\"")?;
    l.fields.finish("layout", RawLayout::FIELDS, r.problems);
    let list = r.require_list(
        "layout.positions",
        l.positions,
        "an array of [x, y] pairs",
        "positions",
    )?;
    let mut out = Vec::with_capacity(list.len());
    for (i, p) in list.into_iter().enumerate() {
        let path = format!("layout.positions[{i}]");
        let (x, y) = pair(r, &path, p, "an [x, y] pair")?;
        out.push([x, y]);
    }
    Some(out)
}

/// Reads an S×A table at `path`, turning each cell with `cell`.
fn table<T, U>(
    r: &mut Reader,
    path: &str,
    v: Option<Table<T>>,
    s: usize,
    a: usize,
    mut cell: impl FnMut(&mut Reader, &str, T) -> Option<U>,
) -> Option<Vec<U>> {
    let rows = r.require_list(
        path,
        v,
        &format!("an array of {s} rows (one per state)"),
        "rows",
    )?;
    if rows.len() != s {
        r.problems.push(
            path,
            format!("expected {s} rows (one per state), found {}", rows.len()),
        );
        return None;
    }
    let mut out = Vec::with_capacity(s * a);
    let mut ok = true;
    for (si, row) in rows.into_iter().enumerate() {
        let rp = format!("{path}[{si}]");
        let Some(row) = r.list(
            &rp,
            row,
            &format!("an array of {a} entries (one per action)"),
            "entries",
        ) else {
            ok = false;
            continue;
        };
        if row.len() != a {
            r.problems.push(
                rp,
                format!("expected {a} entries (one per action), found {}", row.len()),
            );
            ok = false;
            continue;
        }
        for (ai, c) in row.into_iter().enumerate() {
            match cell(r, &format!("{path}[{si}][{ai}]"), c) {
                Some(u) if ok => out.push(u),
                Some(_) => {}
                None => ok = false,
            }
        }
    }
    ok.then_some(out)
}

fn step(r: &mut Reader, path: &str, st: Lax<RawStep>, s: usize, a: usize) -> Option<StepParts> {
    let st = r.take(path, st, "an object with \"transitions\" and \"rewards\"")?;
    st.fields.finish(path, RawStep::FIELDS, r.problems);
    let transitions = table(
        r,
        &format!("{path}.transitions"),
        st.transitions,
        s,
        a,
        transition_row,
    );
    let rewards = table(r, &format!("{path}.rewards"), st.rewards, s, a, reward);
    Some(StepParts {
        transitions: transitions?,
        rewards: rewards?,
    })
}

fn transition_row(r: &mut Reader, path: &str, v: Entries) -> Option<Vec<(u32, f64)>> {
    let list = r.list(
        path,
        v,
        "an array of [next_state, probability] pairs",
        "pairs",
    )?;
    let mut out = Vec::with_capacity(list.len());
    let mut ok = true;
    for (k, e) in list.into_iter().enumerate() {
        let ep = format!("{path}[{k}]");
        let Some(e) = r.take(&ep, e, "a [next_state, probability] pair") else {
            ok = false;
            continue;
        };
        if e.len != 2 {
            r.problems.push(
                ep,
                format!(
                    "expected a [next_state, probability] pair, found {} elements",
                    e.len
                ),
            );
            ok = false;
            continue;
        }
        let next = r
            .take(&format!("{ep}[0]"), e.next, "a state index")
            .and_then(|n| {
                r.whole(
                    &format!("{ep}[0]"),
                    n,
                    u32::MAX as f64,
                    "a state index (a whole number ≥ 0)",
                )
            });
        let prob = r.take(&format!("{ep}[1]"), e.prob, "a probability");
        match (next, prob) {
            (Some(n), Some(p)) => out.push((n as u32, p)),
            _ => ok = false,
        }
    }
    ok.then_some(out)
}

fn pair(r: &mut Reader, path: &str, v: Pair, what: &str) -> Option<(f64, f64)> {
    let list = r.take(path, v, what)?;
    if list.len != 2 {
        r.problems
            .push(path, format!("expected {what}, found {} numbers", list.len));
        return None;
    }
    let xs = numbers(r, path, list.items)?;
    Some((xs[0], xs[1]))
}

fn reward(r: &mut Reader, path: &str, v: Lax<RawReward>) -> Option<Reward> {
    const EXPECTED: &str =
        "a number or an object {\"bernoulli\": p}, {\"uniform\": [lo, hi]} or {\"beta\": [α, β]}";
    match r.take(path, v, EXPECTED)? {
        RawReward::Fixed(x) => Some(Reward::Fixed(x)),
        RawReward::Empty => {
            r.problems
                .push(path, format!("empty object; expected {EXPECTED}"));
            None
        }
        RawReward::Dist {
            key,
            value,
            scalar,
            extra_keys,
        } => {
            if extra_keys > 0 {
                r.problems.push(
                    path,
                    "a reward object has exactly one key (its distribution)",
                );
                return None;
            }
            let kp = format!("{path}.{key}");
            match key.as_str() {
                "bernoulli" => scalar
                    .and_then(|s| r.take(&kp, s, "a probability"))
                    .map(Reward::Bernoulli),
                "uniform" => {
                    pair(r, &kp, value, "a pair [lo, hi]").map(|(a, b)| Reward::Uniform(a, b))
                }
                "beta" => pair(r, &kp, value, "a pair [α, β]").map(|(a, b)| Reward::Beta(a, b)),
                _ => {
                    r.problems.push(
                        kp,
                        "unknown reward distribution; known ones are bernoulli, uniform, beta",
                    );
                    None
                }
            }
        }
    }
}

/// Writes `x` so that it reads back to the same bits (shortest round-trip form).
pub fn num(x: f64) -> String {
    if x.is_finite() {
        serde_json::to_string(&x).expect("finite f64 serialises")
    } else {
        "null".to_owned()
    }
}

/// A JSON string literal.
pub fn string(s: &str) -> String {
    serde_json::to_string(s).expect("str serialises")
}

fn reward_json(r: &Reward) -> String {
    match *r {
        Reward::Fixed(x) => num(x),
        Reward::Bernoulli(p) => format!("{{\"bernoulli\": {}}}", num(p)),
        Reward::Uniform(lo, hi) => format!("{{\"uniform\": [{}, {}]}}", num(lo), num(hi)),
        Reward::Beta(a, b) => format!("{{\"beta\": [{}, {}]}}", num(a), num(b)),
    }
}

fn list<T>(xs: &[T], f: impl Fn(&T) -> String) -> String {
    let items: Vec<String> = xs.iter().map(f).collect();
    format!("[{}]", items.join(", "))
}

/// Writes a model file (format v1) in the canonical layout.
pub fn write_model(m: &Mdp) -> String {
    write_parts(&m.to_parts())
}

/// Writes model parts in the canonical layout.
pub fn write_parts(m: &MdpParts) -> String {
    let mut o = String::new();
    o.push_str("{\n");
    o.push_str(&format!("  \"format\": {},\n", string(MODEL_FORMAT)));
    o.push_str(&format!("  \"version\": {MODEL_VERSION},\n"));
    o.push_str(&format!("  \"name\": {},\n", string(&m.name)));
    if let Some(n) = &m.notes {
        o.push_str(&format!("  \"notes\": {},\n", string(n)));
    }
    o.push_str(&format!("  \"horizon\": {},\n", m.horizon));
    if let Some(g) = m.discount {
        o.push_str(&format!("  \"discount\": {},\n", num(g)));
    }
    o.push_str(&format!(
        "  \"states\": {},\n",
        list(&m.states, |s| string(s))
    ));
    o.push_str(&format!(
        "  \"actions\": {},\n",
        list(&m.actions, |s| string(s))
    ));
    o.push_str(&format!("  \"start\": {},\n", list(&m.start, |&p| num(p))));
    o.push_str(&format!("  \"stationary\": {},\n", m.stationary));
    o.push_str("  \"steps\": [\n");
    let a = m.actions.len().max(1);
    for (i, st) in m.steps.iter().enumerate() {
        o.push_str("    {\n      \"transitions\": [\n");
        let rows: Vec<String> = st
            .transitions
            .chunks(a)
            .map(|cells| {
                let c: Vec<String> = cells
                    .iter()
                    .map(|row| list(row, |&(n, p)| format!("[{n}, {}]", num(p))))
                    .collect();
                format!("        [{}]", c.join(", "))
            })
            .collect();
        o.push_str(&rows.join(",\n"));
        o.push_str("\n      ],\n      \"rewards\": [\n");
        let rows: Vec<String> = st
            .rewards
            .chunks(a)
            .map(|cells| format!("        {}", list(cells, reward_json)))
            .collect();
        o.push_str(&rows.join(",\n"));
        o.push_str("\n      ]\n    }");
        o.push_str(if i + 1 < m.steps.len() { ",\n" } else { "\n" });
    }
    o.push_str("  ]");
    if let Some(l) = &m.layout {
        o.push_str(&format!(
            ",\n  \"layout\": {{\"positions\": {}}}",
            list(l, |p| format!("[{}, {}]", num(p[0]), num(p[1])))
        ));
    }
    o.push_str("\n}\n");
    o
}

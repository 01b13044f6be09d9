//! Lenient JSON reading: every value is read as "the expected shape, or the
//! kind of value that stood there instead", so one pass over a file finds every
//! wrongly typed value rather than stopping at the first.
//!
//! Only syntax errors (and serde_json's nesting limit of 128) stop the read.

use std::fmt;
use std::marker::PhantomData;

use serde::de::{self, Deserialize, Deserializer, IgnoredAny, MapAccess, SeqAccess, Visitor};

/// The kind of a JSON value, for messages such as "expected a number, found a string".
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    Null,
    Bool,
    Number,
    String,
    Array,
    Object,
}

impl Kind {
    /// The kind with its article, as it reads in a sentence.
    pub fn phrase(self) -> &'static str {
        match self {
            Kind::Null => "null",
            Kind::Bool => "true/false",
            Kind::Number => "a number",
            Kind::String => "a string",
            Kind::Array => "an array",
            Kind::Object => "an object",
        }
    }
}

/// A value of the expected shape, or the kind found instead.
#[derive(Debug, Clone, PartialEq)]
pub enum Lax<T> {
    Ok(T),
    Wrong(Kind),
}

/// What a lenient type accepts; every hook it does not override rejects.
/// Rejecting hooks for arrays and objects must still consume them.
pub trait Accept: Sized {
    fn number(_v: f64) -> Option<Self> {
        None
    }
    fn string(_v: &str) -> Option<Self> {
        None
    }
    fn boolean(_v: bool) -> Option<Self> {
        None
    }
    fn seq<'de, A: SeqAccess<'de>>(mut seq: A) -> Result<Option<Self>, A::Error> {
        while seq.next_element::<IgnoredAny>()?.is_some() {}
        Ok(None)
    }
    fn map<'de, M: MapAccess<'de>>(mut map: M) -> Result<Option<Self>, M::Error> {
        while map.next_entry::<IgnoredAny, IgnoredAny>()?.is_some() {}
        Ok(None)
    }
}

impl Accept for f64 {
    fn number(v: f64) -> Option<Self> {
        Some(v)
    }
}

impl Accept for String {
    fn string(v: &str) -> Option<Self> {
        Some(v.to_owned())
    }
}

impl Accept for bool {
    fn boolean(v: bool) -> Option<Self> {
        Some(v)
    }
}

impl<T: for<'a> Deserialize<'a>> Accept for Vec<T> {
    fn seq<'de, A: SeqAccess<'de>>(mut seq: A) -> Result<Option<Self>, A::Error> {
        let mut out = Vec::with_capacity(seq.size_hint().unwrap_or(0).min(4096));
        while let Some(x) = seq.next_element::<T>()? {
            out.push(x);
        }
        Ok(Some(out))
    }
}

/// A list of at most `MAX` items: the items past `MAX` are skipped as they
/// are read (never stored), and `len` says how many the file held, so a
/// list far over its limit costs no memory. [`Reader::list`] reports it.
#[derive(Debug, Clone, PartialEq)]
pub struct List<T, const MAX: usize> {
    pub items: Vec<T>,
    pub len: usize,
}

impl<T: for<'a> Deserialize<'a>, const MAX: usize> Accept for List<T, MAX> {
    fn seq<'de, A: SeqAccess<'de>>(mut seq: A) -> Result<Option<Self>, A::Error> {
        let mut items = Vec::with_capacity(seq.size_hint().unwrap_or(0).min(4096));
        while items.len() < MAX {
            match seq.next_element::<T>()? {
                Some(x) => items.push(x),
                None => {
                    let len = items.len();
                    return Ok(Some(List { items, len }));
                }
            }
        }
        let mut len = items.len();
        while seq.next_element::<IgnoredAny>()?.is_some() {
            len += 1;
        }
        Ok(Some(List { items, len }))
    }
}

struct LaxVisitor<T>(PhantomData<T>);

impl<'de, T: Accept> Visitor<'de> for LaxVisitor<T> {
    type Value = Lax<T>;

    fn expecting(&self, f: &mut fmt::Formatter) -> fmt::Result {
        f.write_str("any JSON value")
    }
    fn visit_bool<E: de::Error>(self, v: bool) -> Result<Self::Value, E> {
        Ok(T::boolean(v).map_or(Lax::Wrong(Kind::Bool), Lax::Ok))
    }
    fn visit_i64<E: de::Error>(self, v: i64) -> Result<Self::Value, E> {
        self.visit_f64(v as f64)
    }
    fn visit_u64<E: de::Error>(self, v: u64) -> Result<Self::Value, E> {
        self.visit_f64(v as f64)
    }
    fn visit_f64<E: de::Error>(self, v: f64) -> Result<Self::Value, E> {
        Ok(T::number(v).map_or(Lax::Wrong(Kind::Number), Lax::Ok))
    }
    fn visit_str<E: de::Error>(self, v: &str) -> Result<Self::Value, E> {
        Ok(T::string(v).map_or(Lax::Wrong(Kind::String), Lax::Ok))
    }
    fn visit_unit<E: de::Error>(self) -> Result<Self::Value, E> {
        Ok(Lax::Wrong(Kind::Null))
    }
    fn visit_none<E: de::Error>(self) -> Result<Self::Value, E> {
        Ok(Lax::Wrong(Kind::Null))
    }
    fn visit_seq<A: SeqAccess<'de>>(self, seq: A) -> Result<Self::Value, A::Error> {
        Ok(T::seq(seq)?.map_or(Lax::Wrong(Kind::Array), Lax::Ok))
    }
    fn visit_map<M: MapAccess<'de>>(self, map: M) -> Result<Self::Value, M::Error> {
        Ok(T::map(map)?.map_or(Lax::Wrong(Kind::Object), Lax::Ok))
    }
}

impl<'de, T: Accept> Deserialize<'de> for Lax<T> {
    fn deserialize<D: Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        d.deserialize_any(LaxVisitor(PhantomData))
    }
}

/// Where a read value is, and how to report its problems: a small cursor
/// into the JSON path, and the problem list.
pub struct Reader<'p> {
    pub problems: &'p mut crate::model::Problems,
}

impl Reader<'_> {
    /// The value, or a "expected …, found …" problem at `path`.
    pub fn take<T>(&mut self, path: &str, v: Lax<T>, expected: &str) -> Option<T> {
        match v {
            Lax::Ok(x) => Some(x),
            Lax::Wrong(k) => {
                self.problems
                    .push(path, format!("expected {expected}, found {}", k.phrase()));
                None
            }
        }
    }

    /// A list's items, or a problem at `path`: not a list ("expected …"), or
    /// more than `MAX` items ("N WHAT is over the limit of MAX").
    pub fn list<T, const MAX: usize>(
        &mut self,
        path: &str,
        v: Lax<List<T, MAX>>,
        expected: &str,
        what: &str,
    ) -> Option<Vec<T>> {
        let l = self.take(path, v, expected)?;
        if l.len > MAX {
            self.problems
                .push(path, format!("{} {what} is over the limit of {MAX}", l.len));
            return None;
        }
        Some(l.items)
    }

    /// [`Reader::list`] for a required field.
    pub fn require_list<T, const MAX: usize>(
        &mut self,
        path: &str,
        v: Option<Lax<List<T, MAX>>>,
        expected: &str,
        what: &str,
    ) -> Option<Vec<T>> {
        match v {
            Some(v) => self.list(path, v, expected, what),
            None => self.require(path, None::<Lax<Vec<T>>>, expected),
        }
    }

    /// A string of at most `max` characters, or a problem at `path`.
    pub fn text(&mut self, path: &str, v: Lax<String>, max: usize) -> Option<String> {
        let s = self.take(path, v, "a string")?;
        let n = s.chars().count();
        if n > max {
            self.problems
                .push(path, format!("{n} characters is over the limit of {max}"));
            return None;
        }
        Some(s)
    }

    /// A required field: missing is a problem too.
    pub fn require<T>(&mut self, path: &str, v: Option<Lax<T>>, expected: &str) -> Option<T> {
        match v {
            Some(v) => self.take(path, v, expected),
            None => {
                self.problems
                    .push(path, format!("missing; expected {expected}"));
                None
            }
        }
    }

    /// A whole number in `0..=max` read from a JSON number.
    pub fn whole(&mut self, path: &str, v: f64, max: f64, what: &str) -> Option<u64> {
        if v.fract() == 0.0 && v >= 0.0 && v <= max {
            Some(v as u64)
        } else {
            self.problems
                .push(path, format!("expected {what}, found {v}"));
            None
        }
    }
}

/// Reads the keys of an object into named slots; keys it does not know, and
/// keys given twice, are reported by [`Fields::finish`].
pub struct Fields {
    pub unknown: Vec<String>,
    pub repeated: Vec<String>,
}

impl Fields {
    pub fn new() -> Self {
        Fields {
            unknown: Vec::new(),
            repeated: Vec::new(),
        }
    }

    /// Stores the next value of `map` in `slot`, noting a repeated key.
    pub fn store<'de, M: MapAccess<'de>, T: Deserialize<'de>>(
        &mut self,
        map: &mut M,
        key: &str,
        slot: &mut Option<T>,
    ) -> Result<(), M::Error> {
        let v = map.next_value::<T>()?;
        if slot.is_some() {
            self.repeated.push(key.to_owned());
        }
        *slot = Some(v);
        Ok(())
    }

    /// Skips the next value of `map`, noting the unknown key.
    pub fn skip<'de, M: MapAccess<'de>>(
        &mut self,
        map: &mut M,
        key: String,
    ) -> Result<(), M::Error> {
        map.next_value::<IgnoredAny>()?;
        self.unknown.push(key);
        Ok(())
    }

    /// Reports unknown and repeated keys of the object at `path`.
    pub fn finish(&self, path: &str, known: &[&str], problems: &mut crate::model::Problems) {
        let at = |k: &str| {
            if path.is_empty() {
                k.to_owned()
            } else {
                format!("{path}.{k}")
            }
        };
        for k in &self.unknown {
            problems.push(
                at(k),
                format!("unknown field; known fields here are {}", known.join(", ")),
            );
        }
        for k in &self.repeated {
            problems.push(at(k), "field given more than once");
        }
    }
}

impl Default for Fields {
    fn default() -> Self {
        Self::new()
    }
}

/// Describes a serde_json syntax error as "line L, column C: message".
pub fn syntax_problem(e: &serde_json::Error) -> String {
    let msg = e.to_string();
    // serde_json appends " at line L column C"; say it first, plainly.
    let core = msg
        .rsplit_once(" at line ")
        .map(|(m, _)| m.to_owned())
        .unwrap_or(msg);
    format!(
        "not valid JSON: line {}, column {}: {core}",
        e.line(),
        e.column()
    )
}

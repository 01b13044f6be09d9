//! File-format plumbing shared by every format: the lenient reader
//! ([`lax`]), the problem list ([`problems`]), object reading with unknown
//! and repeated keys reported ([`lax_object!`]), and the header check every
//! file starts with.

pub mod digest;
pub mod lax;
pub mod problems;

pub use problems::{Problem, Problems};

/// A number as a message or a label shows it: as Rust writes it when that
/// is short (`0.5`, `1e-7`, `12345`), with an exponent otherwise (Display
/// writes 1e300 with all its 301 digits).
pub fn readable(x: f64) -> String {
    let plain = x.to_string();
    if plain.len() > 12 {
        format!("{x:e}")
    } else {
        plain
    }
}

/// Whether `text` is one of the CSV tables Burnin writes (they start with
/// `learner,algorithm,`): a reader can then say so instead of reporting a
/// JSON syntax error.
pub fn is_burnin_csv(text: &str) -> bool {
    text.trim_start_matches('\u{feff}')
        .starts_with("learner,algorithm,")
}

/// What to tell someone who opened one of Burnin's CSV tables.
pub const CSV_NOT_OPENED: &str = "this is one of the CSV tables Burnin writes for other tools (curves, summary or regret by cell); Burnin opens JSON files: a model, an experiment, or results (\"Results JSON\", burnin-results or burnin-sweep)";

/// Most items of a list, characters of a string and keys of an object in a
/// value read whole ([`Bounded`]): far above what a generator or a sweep
/// needs (a bandit's 1 000 means, 100 sweep values, 64 learners).
pub const BOUNDED_ITEMS: usize = 1_000;

/// A small JSON value read whole (a generator, a sweep), within bounds:
/// lists and objects of at most [`BOUNDED_ITEMS`] items and strings of at
/// most as many characters, the rest skipped as it is read (never stored).
/// Keys given twice (which serde's value type would keep the last of
/// silently), and everything over a bound, are noted in `problems` with
/// their paths relative to the value.
#[derive(Debug, Clone, PartialEq)]
pub struct Bounded {
    pub value: serde_json::Value,
    pub problems: Problems,
}

impl<'de> serde::Deserialize<'de> for Bounded {
    fn deserialize<D: serde::Deserializer<'de>>(d: D) -> Result<Self, D::Error> {
        use serde::de::{DeserializeSeed, IgnoredAny, MapAccess, SeqAccess, Visitor};
        use serde_json::Value;
        struct Read<'a> {
            path: String,
            problems: &'a mut Problems,
        }
        impl Read<'_> {
            fn at(&mut self, tail: &str) -> Read<'_> {
                let path = match (self.path.is_empty(), tail.starts_with('[')) {
                    (true, _) | (false, true) => format!("{}{tail}", self.path),
                    (false, false) => format!("{}.{tail}", self.path),
                };
                Read {
                    path,
                    problems: self.problems,
                }
            }
            fn over(&mut self, n: usize, what: &str) {
                self.problems.push(
                    self.path.clone(),
                    format!("{n} {what} is over the limit of {BOUNDED_ITEMS}"),
                );
            }
        }
        impl<'de> DeserializeSeed<'de> for Read<'_> {
            type Value = Value;
            fn deserialize<D: serde::Deserializer<'de>>(self, d: D) -> Result<Value, D::Error> {
                d.deserialize_any(self)
            }
        }
        impl<'de> Visitor<'de> for Read<'_> {
            type Value = Value;
            fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
                f.write_str("any JSON value")
            }
            fn visit_bool<E>(self, v: bool) -> Result<Value, E> {
                Ok(Value::Bool(v))
            }
            fn visit_i64<E>(self, v: i64) -> Result<Value, E> {
                Ok(Value::from(v))
            }
            fn visit_u64<E>(self, v: u64) -> Result<Value, E> {
                Ok(Value::from(v))
            }
            fn visit_f64<E>(self, v: f64) -> Result<Value, E> {
                Ok(Value::from(v))
            }
            fn visit_str<E>(mut self, v: &str) -> Result<Value, E> {
                let n = v.chars().count();
                if n > BOUNDED_ITEMS {
                    self.over(n, "characters");
                    return Ok(Value::Null);
                }
                Ok(Value::String(v.to_owned()))
            }
            fn visit_unit<E>(self) -> Result<Value, E> {
                Ok(Value::Null)
            }
            fn visit_none<E>(self) -> Result<Value, E> {
                Ok(Value::Null)
            }
            fn visit_seq<A: SeqAccess<'de>>(mut self, mut seq: A) -> Result<Value, A::Error> {
                let mut out = Vec::new();
                while out.len() < BOUNDED_ITEMS {
                    let i = out.len();
                    match seq.next_element_seed(self.at(&format!("[{i}]")))? {
                        Some(v) => out.push(v),
                        None => return Ok(Value::Array(out)),
                    }
                }
                let mut n = out.len();
                while seq.next_element::<IgnoredAny>()?.is_some() {
                    n += 1;
                }
                if n > BOUNDED_ITEMS {
                    self.over(n, "items");
                }
                Ok(Value::Array(out))
            }
            fn visit_map<A: MapAccess<'de>>(mut self, mut map: A) -> Result<Value, A::Error> {
                let mut out = serde_json::Map::new();
                let mut n = 0;
                while let Some(k) = map.next_key::<String>()? {
                    n += 1;
                    if n > BOUNDED_ITEMS || k.chars().count() > BOUNDED_ITEMS {
                        map.next_value::<IgnoredAny>()?;
                        continue;
                    }
                    if out.contains_key(&k) {
                        let at = self.at(&k).path;
                        self.problems.push(at, "field given more than once");
                    }
                    let v = map.next_value_seed(self.at(&k))?;
                    out.insert(k, v);
                }
                if n > BOUNDED_ITEMS {
                    self.over(n, "keys");
                }
                Ok(Value::Object(out))
            }
        }
        let mut problems = Problems::default();
        let value = Read {
            path: String::new(),
            problems: &mut problems,
        }
        .deserialize(d)?;
        Ok(Bounded { value, problems })
    }
}

/// The `format` of a JSON document, when it is an object whose `format` is
/// a string; None for anything else (the model reader then reports what is
/// wrong with it).
pub fn identify(text: &str) -> Option<String> {
    #[derive(serde::Deserialize)]
    struct Header {
        format: Option<serde_json::Value>,
    }
    let h: Header = serde_json::from_str(text).ok()?;
    match h.format? {
        serde_json::Value::String(s) => Some(s),
        _ => None,
    }
}

use lax::{Lax, Reader};

/// Declares a lenient object reader: a struct whose fields are every key the
/// object may have (each `Option<T>`, `None` when absent), plus `fields`
/// noting unknown and repeated keys; its [`lax::Accept`] implementation; and
/// `FIELDS`, the keys in declaration order (what messages list as known).
///
/// ```ignore
/// lax_object! { struct RawPair { left: Lax<f64>, right: Lax<f64> } }
/// ```
#[macro_export]
#[doc(hidden)]
macro_rules! lax_object {
    ($(#[$meta:meta])* $vis:vis struct $name:ident { $($field:ident : $ty:ty),* $(,)? }) => {
        $(#[$meta])*
        #[derive(Default)]
        $vis struct $name {
            $($field: Option<$ty>,)*
            fields: $crate::format::lax::Fields,
        }

        impl $name {
            #[allow(dead_code)]
            const FIELDS: &'static [&'static str] = &[$(stringify!($field)),*];
        }

        impl $crate::format::lax::Accept for $name {
            fn map<'de, M: serde::de::MapAccess<'de>>(mut map: M) -> Result<Option<Self>, M::Error> {
                let mut out = $name::default();
                while let Some(key) = map.next_key::<String>()? {
                    let f = &mut out.fields;
                    match key.as_str() {
                        $(stringify!($field) => f.store(&mut map, &key, &mut out.$field)?,)*
                        _ => f.skip(&mut map, key)?,
                    }
                }
                Ok(Some(out))
            }
        }
    };
}
pub use lax_object;

/// Checks `format` and `version` of a document of the given kind; a wrong
/// format or version stops the read, since nothing else can be trusted.
pub fn check_header(
    r: &mut Reader,
    format: Option<Lax<String>>,
    version: Option<Lax<f64>>,
    want: &str,
    want_version: u64,
) -> bool {
    let Some(f) = r.require("format", format, &format!("the string {want:?}")) else {
        return false;
    };
    if f != want {
        let hint = match f.as_str() {
            "burnin-model" => " (this is a model file)".to_string(),
            "burnin-experiment" => " (this is an experiment file)".to_string(),
            "burnin-results" => " (this is a results file)".to_string(),
            "burnin-shard" => {
                " (this is a shard of an experiment's runs: merge the shards with `burnin merge`)"
                    .to_string()
            }
            _ => String::new(),
        };
        r.problems
            .push("format", format!("expected {want:?}, found {f:?}{hint}"));
        return false;
    }
    let Some(v) = r.require("version", version, "a whole number") else {
        return false;
    };
    if v != want_version as f64 {
        r.problems.push(
            "version",
            format!("version {v} is not supported; this build reads version {want_version}"),
        );
        return false;
    }
    true
}

//! File-format plumbing shared by every format: the lenient reader
//! ([`lax`]), the problem list ([`problems`]), object reading with unknown
//! and repeated keys reported ([`lax_object!`]), and the header check every
//! file starts with.

pub mod digest;
pub mod lax;
pub mod problems;

pub use problems::{Problem, Problems};

/// The `format` of a JSON document, when it is an object whose `format` is
/// a string; None for anything else (the model reader then reports what is
/// wrong with it).
/// Whether `text` is one of the CSV tables Burnin writes (they start with
/// `learner,algorithm,`): a reader can then say so instead of reporting a
/// JSON syntax error.
pub fn is_burnin_csv(text: &str) -> bool {
    text.trim_start_matches('\u{feff}')
        .starts_with("learner,algorithm,")
}

/// What to tell someone who opened one of Burnin's CSV tables.
pub const CSV_NOT_OPENED: &str = "this is one of the CSV tables Burnin writes for other tools (curves, summary or regret by cell); Burnin opens JSON files: a model, an experiment, or results (\"Results JSON\", burnin-results or burnin-sweep)";

/// The JSON paths (under `path`) of every key given more than once in any
/// object of the JSON text `raw`, at any depth: serde's value type keeps the
/// last of them silently, so objects read as values (a generator, a sweep)
/// are scanned with this first.
pub fn repeated_keys(raw: &str, path: &str) -> Vec<String> {
    use serde::de::{DeserializeSeed, Deserializer, MapAccess, SeqAccess, Visitor};
    struct Scan<'a> {
        path: String,
        out: &'a mut Vec<String>,
    }
    impl<'de> DeserializeSeed<'de> for Scan<'_> {
        type Value = ();
        fn deserialize<D: Deserializer<'de>>(self, d: D) -> Result<(), D::Error> {
            d.deserialize_any(self)
        }
    }
    impl<'de> Visitor<'de> for Scan<'_> {
        type Value = ();
        fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
            f.write_str("any JSON value")
        }
        fn visit_bool<E>(self, _: bool) -> Result<(), E> {
            Ok(())
        }
        fn visit_i64<E>(self, _: i64) -> Result<(), E> {
            Ok(())
        }
        fn visit_u64<E>(self, _: u64) -> Result<(), E> {
            Ok(())
        }
        fn visit_f64<E>(self, _: f64) -> Result<(), E> {
            Ok(())
        }
        fn visit_str<E>(self, _: &str) -> Result<(), E> {
            Ok(())
        }
        fn visit_unit<E>(self) -> Result<(), E> {
            Ok(())
        }
        fn visit_seq<A: SeqAccess<'de>>(self, mut seq: A) -> Result<(), A::Error> {
            let mut i = 0;
            while seq
                .next_element_seed(Scan {
                    path: format!("{}[{i}]", self.path),
                    out: self.out,
                })?
                .is_some()
            {
                i += 1;
            }
            Ok(())
        }
        fn visit_map<A: MapAccess<'de>>(self, mut map: A) -> Result<(), A::Error> {
            let mut seen = std::collections::HashSet::new();
            while let Some(k) = map.next_key::<String>()? {
                let at = if self.path.is_empty() {
                    k.clone()
                } else {
                    format!("{}.{k}", self.path)
                };
                if !seen.insert(k) {
                    self.out.push(at.clone());
                }
                map.next_value_seed(Scan {
                    path: at,
                    out: self.out,
                })?;
            }
            Ok(())
        }
    }
    let mut out = Vec::new();
    let mut de = serde_json::Deserializer::from_str(raw);
    let _ = Scan {
        path: path.to_owned(),
        out: &mut out,
    }
    .deserialize(&mut de);
    out
}

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

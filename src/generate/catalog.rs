//! The catalogue of generators: for each kind, its parameters (with type,
//! default, range and help text), its published source and how to build it.
//! The experiment reader (a file's `"generator"` object and sweeps), the
//! CLI's `burnin generate` subcommands and help, and the page's generator
//! form and sweep list are all built from [`GENERATORS`].
//!
//! A generator object in a file: `{"kind": "random", "states": 10, "seed": 4, …}`;
//! parameter names are the catalogue's, every omitted one takes its default.
//!
//! Adding a generator: its own file in `src/generate/` (the struct, its
//! parameters as [`GenParam`] statics, `generate` and a `build` from
//! [`Values`]) and one [`GeneratorInfo`] entry below.

use serde::Serialize;
use serde_json::Value;

use super::{ParamError, bandit, drift_grid, garnet, lock, lower_bound, river};
use crate::model::{Mdp, Problems};

/// The type of a generator parameter.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "kebab-case")]
pub enum ParamKind {
    /// A whole number ≥ 0.
    Whole,
    /// Any number in the range.
    Number,
    /// true or false (default false).
    Flag,
    /// A whole number, or absent (then drawn from the seed).
    OptionalWhole,
    /// A list of numbers (may be empty).
    Numbers,
}

/// One parameter of a generator.
#[derive(Debug, Serialize)]
pub struct GenParam {
    /// Its name in files (the CLI option is the name with dashes).
    pub name: &'static str,
    pub kind: ParamKind,
    /// The default (for a flag 0 = false; unused for optional and list kinds).
    pub default: f64,
    /// The range every value must lie in (each element of a list); further
    /// limits that depend on other parameters are checked by the generator.
    pub min: f64,
    pub max: f64,
    /// `min` itself is not allowed.
    pub min_open: bool,
    /// What it is, in a sentence.
    pub help: &'static str,
}

impl GenParam {
    /// A whole-number parameter in `min..=max`.
    pub const fn whole(
        name: &'static str,
        default: usize,
        min: usize,
        max: usize,
        help: &'static str,
    ) -> GenParam {
        GenParam {
            name,
            kind: ParamKind::Whole,
            default: default as f64,
            min: min as f64,
            max: max as f64,
            min_open: false,
            help,
        }
    }

    /// A number in [min, max].
    pub const fn number(
        name: &'static str,
        default: f64,
        min: f64,
        max: f64,
        help: &'static str,
    ) -> GenParam {
        GenParam {
            name,
            kind: ParamKind::Number,
            default,
            min,
            max,
            min_open: false,
            help,
        }
    }

    /// A flag, false unless given.
    pub const fn flag(name: &'static str, help: &'static str) -> GenParam {
        GenParam {
            name,
            kind: ParamKind::Flag,
            default: 0.0,
            min: 0.0,
            max: 1.0,
            min_open: false,
            help,
        }
    }

    /// A whole number in `min..=max` that may be left out.
    pub const fn optional_whole(
        name: &'static str,
        min: usize,
        max: usize,
        help: &'static str,
    ) -> GenParam {
        GenParam {
            kind: ParamKind::OptionalWhole,
            ..GenParam::whole(name, 0, min, max, help)
        }
    }

    /// A list of numbers, each in [min, max].
    pub const fn numbers(name: &'static str, min: f64, max: f64, help: &'static str) -> GenParam {
        GenParam {
            kind: ParamKind::Numbers,
            ..GenParam::number(name, 0.0, min, max, help)
        }
    }

    /// The same parameter with `min` itself excluded.
    pub const fn open_below(self) -> GenParam {
        GenParam {
            min_open: true,
            ..self
        }
    }

    /// Whether `x` is in the parameter's own range.
    pub fn check(&self, x: f64) -> Result<(), ParamError> {
        let above = if self.min_open {
            x > self.min
        } else {
            x >= self.min
        };
        if above && x <= self.max {
            return Ok(());
        }
        let message = match self.kind {
            ParamKind::Whole | ParamKind::OptionalWhole => {
                format!("{x} is outside {}..={}", self.min, self.max)
            }
            _ if (self.min, self.max, self.min_open) == (0.0, 1.0, false) => {
                format!("{x} is not a probability in [0, 1]")
            }
            _ => format!(
                "{x} is outside {}{}, {}]",
                if self.min_open { "(" } else { "[" },
                self.min,
                self.max
            ),
        };
        Err(ParamError {
            param: self.name,
            message,
        })
    }

    /// Whether a sweep can vary it.
    pub fn sweepable(&self) -> bool {
        !matches!(self.kind, ParamKind::Flag | ParamKind::Numbers)
    }
}

/// One generator kind, as every front end shows it.
#[derive(Debug, Serialize)]
pub struct GeneratorInfo {
    /// Its `"kind"` in files and its `burnin generate` subcommand.
    pub kind: &'static str,
    /// The display name.
    pub name: &'static str,
    /// One line on what it builds.
    pub about: &'static str,
    /// Where the construction is published (or "common practice").
    pub source: &'static str,
    /// Whether `seed` changes the model.
    pub seeded: bool,
    pub params: &'static [&'static GenParam],
    #[serde(skip)]
    pub build: fn(&Values, u64) -> Result<Mdp, ParamError>,
}

/// Every generator, in the order the docs and the page list them.
pub static GENERATORS: &[GeneratorInfo] = &[
    GeneratorInfo {
        kind: "random",
        name: "Random sparse (Garnet-style)",
        about: "Random sparse model, Garnet-style (Archibald, McKinnon & Thomas 1995).",
        source: "Archibald, McKinnon & Thomas, On the generation of Markov decision processes, J. Operational Research Society 46(3), 1995",
        seeded: true,
        params: garnet::PARAMS,
        build: garnet::build,
    },
    GeneratorInfo {
        kind: "river",
        name: "River chain",
        about: "The RiverSwim chain, a published construction (Strehl & Littman, JCSS 2008).",
        source: "Strehl & Littman, An analysis of model-based Interval Estimation for Markov Decision Processes, J. Computer and System Sciences 74(8), 2008",
        seeded: false,
        params: river::PARAMS,
        build: river::build,
    },
    GeneratorInfo {
        kind: "drift-grid",
        name: "Drift grid",
        about: "Board of cells c0r0, c1r0, … whose moves drift sideways, from a start inside it to one paying goal cell.",
        source: "common practice (grids with slip appear throughout the literature; no single source)",
        seeded: false,
        params: drift_grid::PARAMS,
        build: drift_grid::build,
    },
    GeneratorInfo {
        kind: "lock",
        name: "Combination lock",
        about: "Combination lock: one right action per step, a wrong one jams it.",
        source: "common practice (a hard-exploration test with no single source)",
        seeded: true,
        params: lock::PARAMS,
        build: lock::build,
    },
    GeneratorInfo {
        kind: "lower-bound",
        name: "Lower-bound instance",
        about: "Hard instance of the minimax lower bound (Domingues et al., ALT 2021).",
        source: "Domingues, Ménard, Kaufmann & Valko, Episodic Reinforcement Learning in Finite MDPs: Minimax Lower Bounds Revisited, ALT 2021, arXiv:2010.03531",
        seeded: true,
        params: lower_bound::PARAMS,
        build: lower_bound::build,
    },
    GeneratorInfo {
        kind: "bandit",
        name: "Bernoulli bandit",
        about: "Bernoulli multi-armed bandit (S = 1, H = 1).",
        source: "common practice",
        seeded: true,
        params: bandit::PARAMS,
        build: bandit::build,
    },
];

/// Every generator kind, comma-separated, as messages list them.
pub fn kinds() -> String {
    GENERATORS
        .iter()
        .map(|g| g.kind)
        .collect::<Vec<_>>()
        .join(", ")
}

/// Earlier names of generator kinds, still read (for one release) so that
/// files written before a rename keep opening: (old, new).
pub const OLD_KINDS: &[(&str, &str)] = &[("grid", "drift-grid")];

/// The catalogue entry of `kind` (or of the kind an old name now has).
pub fn info(kind: &str) -> Option<&'static GeneratorInfo> {
    let kind = OLD_KINDS
        .iter()
        .find(|(old, _)| *old == kind)
        .map_or(kind, |(_, new)| new);
    GENERATORS.iter().find(|g| g.kind == kind)
}

/// A parameter's value.
#[derive(Debug, Clone, PartialEq)]
pub enum ParamValue {
    Whole(u64),
    Number(f64),
    Flag(bool),
    /// An optional whole number that was not given.
    Unset,
    Numbers(Vec<f64>),
}

/// A value for every parameter of one generator, in catalogue order.
#[derive(Debug, Clone)]
pub struct Values {
    info: &'static GeneratorInfo,
    values: Vec<ParamValue>,
}

impl PartialEq for Values {
    fn eq(&self, other: &Self) -> bool {
        self.info.kind == other.info.kind && self.values == other.values
    }
}

impl Values {
    /// Every parameter at its default.
    pub fn defaults(info: &'static GeneratorInfo) -> Values {
        let values = info
            .params
            .iter()
            .map(|p| match p.kind {
                ParamKind::Whole => ParamValue::Whole(p.default as u64),
                ParamKind::Number => ParamValue::Number(p.default),
                ParamKind::Flag => ParamValue::Flag(p.default != 0.0),
                ParamKind::OptionalWhole => ParamValue::Unset,
                ParamKind::Numbers => ParamValue::Numbers(Vec::new()),
            })
            .collect();
        Values { info, values }
    }

    pub fn info(&self) -> &'static GeneratorInfo {
        self.info
    }

    fn slot(&self, name: &str) -> Option<usize> {
        self.info.params.iter().position(|p| p.name == name)
    }

    fn get(&self, name: &str) -> &ParamValue {
        &self.values[self.slot(name).expect("a parameter of this generator")]
    }

    /// Sets parameter `name`; false when the generator has no such parameter.
    pub fn set(&mut self, name: &str, v: ParamValue) -> bool {
        match self.slot(name) {
            Some(i) => {
                self.values[i] = v;
                true
            }
            None => false,
        }
    }

    /// Checks every value against its parameter's own range.
    pub fn check(&self) -> Result<(), ParamError> {
        for (p, v) in self.info.params.iter().zip(&self.values) {
            match v {
                ParamValue::Whole(x) => p.check(*x as f64)?,
                ParamValue::Number(x) => p.check(*x)?,
                ParamValue::Numbers(xs) => xs.iter().try_for_each(|&x| p.check(x))?,
                ParamValue::Flag(_) | ParamValue::Unset => {}
            }
        }
        Ok(())
    }

    /// A whole-number parameter (saturating: a value beyond `usize` fails the
    /// range check before it gets here).
    pub fn whole(&self, name: &str) -> usize {
        match self.get(name) {
            ParamValue::Whole(x) => usize::try_from(*x).unwrap_or(usize::MAX),
            other => unreachable!("{name} is whole, found {other:?}"),
        }
    }

    pub fn number(&self, name: &str) -> f64 {
        match self.get(name) {
            ParamValue::Number(x) => *x,
            other => unreachable!("{name} is a number, found {other:?}"),
        }
    }

    pub fn flag(&self, name: &str) -> bool {
        matches!(self.get(name), ParamValue::Flag(true))
    }

    pub fn optional_whole(&self, name: &str) -> Option<usize> {
        match self.get(name) {
            ParamValue::Whole(x) => Some(usize::try_from(*x).unwrap_or(usize::MAX)),
            _ => None,
        }
    }

    pub fn numbers(&self, name: &str) -> Vec<f64> {
        match self.get(name) {
            ParamValue::Numbers(xs) => xs.clone(),
            _ => Vec::new(),
        }
    }
}

/// A checked generator: its kind, every parameter's value, and the seed.
#[derive(Debug, Clone, PartialEq)]
pub struct GeneratorSpec {
    pub values: Values,
    pub seed: u64,
}

impl GeneratorSpec {
    /// Reads a generator object (at JSON path `path`), reporting every problem.
    pub fn from_json(v: &Value, path: &str) -> Result<GeneratorSpec, Problems> {
        let Some(map) = v.as_object() else {
            return Err(Problems::single(path, "expected an object with \"kind\""));
        };
        let info = match map.get("kind") {
            Some(Value::String(k)) => info(k),
            _ => None,
        };
        let Some(info) = info else {
            let message = match map.get("kind") {
                Some(k) => format!("unknown generator {k}; known ones are {}", kinds()),
                None => format!("missing; expected one of {}", kinds()),
            };
            return Err(Problems::single(format!("{path}.kind"), message));
        };
        let mut problems = Problems::default();
        let at = |k: &str| format!("{path}.{k}");
        let seed = match map.get("seed") {
            None => 1,
            Some(Value::Number(n)) if n.as_u64().is_some() => n.as_u64().unwrap(),
            Some(v) => {
                problems.push(
                    at("seed"),
                    format!("expected a whole number ≥ 0, found {v}"),
                );
                1
            }
        };
        let mut values = Values::defaults(info);
        for (k, v) in map {
            if k == "kind" || k == "seed" {
                continue;
            }
            let Some(p) = info.params.iter().find(|p| p.name == k) else {
                let names: Vec<&str> = std::iter::once("seed")
                    .chain(info.params.iter().map(|p| p.name))
                    .collect();
                problems.push(
                    at(k),
                    format!(
                        "{} takes no {k}; its parameters are {}",
                        info.kind,
                        names.join(", ")
                    ),
                );
                continue;
            };
            match read_value(p, v) {
                Ok(x) => {
                    values.set(p.name, x);
                }
                Err(want) => problems.push(at(k), format!("expected {want}, found {v}")),
            }
        }
        problems.into_result()?;
        let spec = GeneratorSpec { values, seed };
        spec.values
            .check()
            .map_err(|e| Problems::single(at(e.param), e.message))?;
        Ok(spec)
    }

    /// The generator as an object for files: its kind, seed and every
    /// parameter that has a value (what [`GeneratorSpec::from_json`] reads back).
    pub fn to_json(&self) -> Value {
        let mut o = serde_json::Map::new();
        o.insert("kind".into(), self.info().kind.into());
        o.insert("seed".into(), self.seed.into());
        for (p, v) in self.info().params.iter().zip(&self.values.values) {
            let v = match v {
                ParamValue::Whole(x) => Value::from(*x),
                ParamValue::Number(x) => Value::from(*x),
                ParamValue::Flag(b) => Value::from(*b),
                ParamValue::Numbers(xs) if !xs.is_empty() => Value::from(xs.clone()),
                ParamValue::Numbers(_) | ParamValue::Unset => continue,
            };
            o.insert(p.name.into(), v);
        }
        Value::Object(o)
    }

    /// The generator's catalogue entry.
    pub fn info(&self) -> &'static GeneratorInfo {
        self.values.info
    }

    /// Builds the model, or says which parameter is at fault.
    pub fn build(&self) -> Result<Mdp, ParamError> {
        self.values.check()?;
        (self.info().build)(&self.values, self.seed)
    }

    /// Builds the model; a parameter out of range is reported at `path`.
    pub fn generate(&self, path: &str) -> Result<Mdp, Problems> {
        self.build()
            .map_err(|e| Problems::single(format!("{path}.{}", e.param), e.message))
    }

    /// The same generator with the numeric parameter `name` set to `x`, or
    /// None when this kind has no such parameter (or a whole one and `x` is
    /// not whole). Setting the bandit's `arms` drops its `means`.
    pub fn with(&self, name: &str, x: f64) -> Option<GeneratorSpec> {
        let p = self.info().params.iter().find(|p| p.name == name)?;
        let v = match p.kind {
            // Whole numbers a double holds exactly (1e300 saturated to
            // 18446744073709551615 and was quoted as that; #35).
            ParamKind::Whole | ParamKind::OptionalWhole
                if x.fract() == 0.0 && (0.0..=9_007_199_254_740_992.0).contains(&x) =>
            {
                ParamValue::Whole(x as u64)
            }
            ParamKind::Number => ParamValue::Number(x),
            _ => return None,
        };
        let mut g = self.clone();
        g.values.set(name, v);
        if self.info().kind == "bandit" && name == "arms" {
            g.values.set("means", ParamValue::Numbers(Vec::new()));
        }
        Some(g)
    }
}

/// A JSON value as parameter `p`'s value, or what was expected.
fn read_value(p: &GenParam, v: &Value) -> Result<ParamValue, &'static str> {
    match p.kind {
        ParamKind::Whole | ParamKind::OptionalWhole => v
            .as_u64()
            .map(ParamValue::Whole)
            .ok_or("a whole number ≥ 0"),
        ParamKind::Number => v.as_f64().map(ParamValue::Number).ok_or("a number"),
        ParamKind::Flag => v.as_bool().map(ParamValue::Flag).ok_or("true or false"),
        ParamKind::Numbers => v
            .as_array()
            .filter(|xs| xs.iter().all(Value::is_number))
            .map(|xs| ParamValue::Numbers(xs.iter().filter_map(Value::as_f64).collect()))
            .ok_or("an array of numbers"),
    }
}

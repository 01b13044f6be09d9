//! A generator and its parameters as a JSON object, for experiment files
//! (sweeps over S, A or H) and for the page's generator form:
//! `{"kind": "random", "states": 10, "actions": 3, "seed": 4, …}`.
//! Parameter names are the generator structs' field names; every omitted
//! parameter takes the generator's default.

use serde_json::{Map, Value};

use super::{Bandit, Garnet, Grid, Lock, LowerBound, ParamError, RiverSwim};
use crate::model::{Mdp, Problems};

/// The generator kinds, as written in files.
pub const KINDS: &[&str] = &["random", "river", "grid", "lock", "lower-bound", "bandit"];

/// A checked generator specification.
#[derive(Debug, Clone, PartialEq)]
pub enum GeneratorSpec {
    Random(Garnet, u64),
    River(RiverSwim),
    Grid(Grid),
    Lock(Lock, u64),
    LowerBound(LowerBound, u64),
    Bandit(Bandit, u64),
}

/// Reads the fields of one generator object at `path`.
struct Obj<'a> {
    path: &'a str,
    map: &'a Map<String, Value>,
    problems: &'a mut Problems,
    used: Vec<&'static str>,
}

impl Obj<'_> {
    fn at(&self, key: &str) -> String {
        format!("{}.{key}", self.path)
    }
    fn whole(&mut self, key: &'static str, default: usize) -> usize {
        self.used.push(key);
        match self.map.get(key) {
            None => default,
            Some(Value::Number(n)) if n.as_u64().is_some() => n.as_u64().unwrap() as usize,
            Some(v) => {
                let at = self.at(key);
                self.problems
                    .push(at, format!("expected a whole number ≥ 0, found {v}"));
                default
            }
        }
    }
    fn opt_whole(&mut self, key: &'static str) -> Option<usize> {
        if self.map.contains_key(key) {
            Some(self.whole(key, 0))
        } else {
            self.used.push(key);
            None
        }
    }
    fn number(&mut self, key: &'static str, default: f64) -> f64 {
        self.used.push(key);
        match self.map.get(key) {
            None => default,
            Some(Value::Number(n)) => n.as_f64().unwrap_or(default),
            Some(v) => {
                let at = self.at(key);
                self.problems
                    .push(at, format!("expected a number, found {v}"));
                default
            }
        }
    }
    fn flag(&mut self, key: &'static str) -> bool {
        self.used.push(key);
        match self.map.get(key) {
            None => false,
            Some(Value::Bool(b)) => *b,
            Some(v) => {
                let at = self.at(key);
                self.problems
                    .push(at, format!("expected true or false, found {v}"));
                false
            }
        }
    }
    fn numbers(&mut self, key: &'static str) -> Vec<f64> {
        self.used.push(key);
        match self.map.get(key) {
            None => Vec::new(),
            Some(Value::Array(xs)) if xs.iter().all(Value::is_number) => {
                xs.iter().map(|x| x.as_f64().unwrap()).collect()
            }
            Some(v) => {
                let at = self.at(key);
                self.problems
                    .push(at, format!("expected an array of numbers, found {v}"));
                Vec::new()
            }
        }
    }
}

impl GeneratorSpec {
    /// Reads a generator object (at JSON path `path`), reporting every problem.
    pub fn from_json(v: &Value, path: &str) -> Result<GeneratorSpec, Problems> {
        let mut problems = Problems::default();
        let Some(map) = v.as_object() else {
            return Err(Problems::single(path, "expected an object with \"kind\""));
        };
        let kind = match map.get("kind") {
            Some(Value::String(k)) if KINDS.contains(&k.as_str()) => k.clone(),
            Some(k) => {
                return Err(Problems::single(
                    format!("{path}.kind"),
                    format!("unknown generator {k}; known ones are {}", KINDS.join(", ")),
                ));
            }
            None => {
                return Err(Problems::single(
                    format!("{path}.kind"),
                    format!("missing; expected one of {}", KINDS.join(", ")),
                ));
            }
        };
        let mut o = Obj {
            path,
            map,
            problems: &mut problems,
            used: vec!["kind"],
        };
        let seed = o.whole("seed", 1) as u64;
        let spec = match kind.as_str() {
            "random" => {
                let d = Garnet::default();
                GeneratorSpec::Random(
                    Garnet {
                        states: o.whole("states", d.states),
                        actions: o.whole("actions", d.actions),
                        successors: o.whole("successors", d.successors),
                        horizon: o.whole("horizon", d.horizon),
                        time_dependent: o.flag("time_dependent"),
                        bernoulli: !o.flag("fixed_rewards"),
                    },
                    seed,
                )
            }
            "river" => {
                let d = RiverSwim::default();
                GeneratorSpec::River(RiverSwim {
                    states: o.whole("states", d.states),
                    horizon: o.whole("horizon", d.horizon),
                    p_forward: o.number("p_forward", d.p_forward),
                    p_back: o.number("p_back", d.p_back),
                    small_reward: o.number("small_reward", d.small_reward),
                    big_reward: o.number("big_reward", d.big_reward),
                })
            }
            "grid" => {
                let d = Grid::default();
                GeneratorSpec::Grid(Grid {
                    width: o.whole("width", d.width),
                    height: o.whole("height", d.height),
                    slip: o.number("slip", d.slip),
                    horizon: o.whole("horizon", d.horizon),
                    goal_reward: o.number("goal_reward", d.goal_reward),
                })
            }
            "lock" => {
                let d = Lock::default();
                GeneratorSpec::Lock(
                    Lock {
                        horizon: o.whole("horizon", d.horizon),
                        actions: o.whole("actions", d.actions),
                        time_dependent: o.flag("time_dependent"),
                    },
                    seed,
                )
            }
            "lower-bound" => {
                let d = LowerBound::default();
                GeneratorSpec::LowerBound(
                    LowerBound {
                        actions: o.whole("actions", d.actions),
                        depth: o.whole("depth", d.depth),
                        horizon: o.whole("horizon", d.horizon),
                        wait_until: o.whole("wait_until", d.wait_until),
                        epsilon: o.number("epsilon", d.epsilon),
                        special_step: o.opt_whole("special_step"),
                        special_leaf: o.opt_whole("special_leaf"),
                        special_action: o.opt_whole("special_action"),
                    },
                    seed,
                )
            }
            _ => GeneratorSpec::Bandit(
                Bandit {
                    arms: o.whole("arms", 5),
                    means: o.numbers("means"),
                },
                seed,
            ),
        };
        let used = std::mem::take(&mut o.used);
        for k in map.keys() {
            if !used.contains(&k.as_str()) {
                problems.push(
                    format!("{path}.{k}"),
                    format!(
                        "{kind} takes no {k}; its parameters are {}",
                        used[1..].join(", ")
                    ),
                );
            }
        }
        problems.into_result()?;
        Ok(spec)
    }

    /// Builds the model; a parameter out of range is reported at `path`.
    pub fn generate(&self, path: &str) -> Result<Mdp, Problems> {
        let r: Result<Mdp, ParamError> = match self {
            GeneratorSpec::Random(g, seed) => g.generate(*seed),
            GeneratorSpec::River(g) => g.generate(),
            GeneratorSpec::Grid(g) => g.generate(),
            GeneratorSpec::Lock(g, seed) => g.generate(*seed),
            GeneratorSpec::LowerBound(g, seed) => g.generate(*seed),
            GeneratorSpec::Bandit(g, seed) => g.generate(*seed),
        };
        r.map_err(|e| Problems::single(format!("{path}.{}", e.param), e.message))
    }

    /// The same generator with S, A or H set to `value`, or None when this
    /// kind has no such parameter.
    pub fn with(&self, parameter: &str, value: usize) -> Option<GeneratorSpec> {
        let mut g = self.clone();
        let slot: &mut usize = match (&mut g, parameter) {
            (GeneratorSpec::Random(x, _), "states") => &mut x.states,
            (GeneratorSpec::Random(x, _), "actions") => &mut x.actions,
            (GeneratorSpec::Random(x, _), "horizon") => &mut x.horizon,
            (GeneratorSpec::River(x), "states") => &mut x.states,
            (GeneratorSpec::River(x), "horizon") => &mut x.horizon,
            (GeneratorSpec::Grid(x), "horizon") => &mut x.horizon,
            (GeneratorSpec::Lock(x, _), "actions") => &mut x.actions,
            (GeneratorSpec::Lock(x, _), "horizon") => &mut x.horizon,
            (GeneratorSpec::LowerBound(x, _), "actions") => &mut x.actions,
            (GeneratorSpec::LowerBound(x, _), "horizon") => &mut x.horizon,
            (GeneratorSpec::Bandit(x, _), "actions") if x.means.is_empty() => &mut x.arms,
            _ => return None,
        };
        *slot = value;
        Some(g)
    }
}

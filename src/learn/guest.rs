//! Guest learners: algorithms that Burnin does not ship, written by a user
//! and measured with the same exact regret as the built-ins.
//!
//! The contract (docs/formats.md, "Guest learners"): a guest is told what a
//! built-in learner is told ([`GuestIntro`]: S, A, H, K, δ, the labels and a
//! seed), never the model. Before each batch of episodes it gives a
//! [`Decision`]: a Markov policy for every (h, s) (one action, or a
//! probability row), or "keep the previous one", and how many episodes to
//! follow it for. Burnin simulates the batch with its own generator and hands
//! the guest the batch's trajectories with its next request. The policy is
//! evaluated exactly, once per change, like a built-in's.
//!
//! Three front ends host guests: a Rust value ([`Guest`] implemented by the
//! user, see `examples/own_learner.rs`), a process speaking JSON lines (the
//! CLI's `--learner NAME=CMD`), and a JavaScript module in a page worker.
//! All three go through [`GuestLearner`], which checks every decision the
//! same way ([`Decision::check`]) and draws actions the way a built-in
//! learner with the same policy would.
//!
//! Out of scope: adapting within an episode in a way a Markov table cannot
//! express (the policy is fixed for the episode before it starts).

use std::sync::Arc;

use rand::Rng;
use serde_json::Value;

use super::{LearnRng, Learner, PolicyView, Setting};

/// The protocol's name and version, sent in the first message.
pub const GUEST_PROTOCOL: &str = "burnin-guest";
pub const GUEST_VERSION: u32 = 1;

/// Largest batch a guest may ask for in one decision.
pub const MAX_BATCH: u64 = 1 << 20;

/// Most steps (episodes × H) in one batch: a batch's trajectories are held
/// whole and handed over at once, so this bounds the memory a guest's batch
/// takes (24 bytes a step held, at most [`MAX_STEP_TEXT`] bytes a step
/// written for a process) whatever the horizon.
pub const MAX_BATCH_STEPS: u64 = 1 << 20;

/// Most bytes one step takes in a batch message of the process protocol:
/// `[s,a,r,s'],` with S below 10⁵, A below 10³ and r written in at most 24
/// characters, plus an episode's brackets.
pub const MAX_STEP_TEXT: u64 = 46;

/// The largest batch a guest may ask for at horizon `h`: [`MAX_BATCH`]
/// episodes, and at most [`MAX_BATCH_STEPS`] steps.
pub fn max_batch(horizon: usize) -> u64 {
    (MAX_BATCH_STEPS / horizon.max(1) as u64).clamp(1, MAX_BATCH)
}

/// How far a probability row's sum may be from 1.
pub const ROW_SUM_TOLERANCE: f64 = 1e-9;

/// What a guest is told when its run starts.
#[derive(Debug, Clone)]
pub struct GuestIntro {
    pub setting: Setting,
    /// The run's seed, for the guest's own randomness.
    pub seed: u64,
    pub state_labels: Vec<String>,
    pub action_labels: Vec<String>,
    /// The learner's label in the experiment and the run's seed index, for
    /// messages.
    pub label: String,
    pub seed_index: u64,
}

impl GuestIntro {
    /// The first line of the process protocol.
    pub fn to_json(&self) -> String {
        let s = &self.setting;
        serde_json::json!({
            "protocol": GUEST_PROTOCOL,
            "version": GUEST_VERSION,
            "states": s.states,
            "actions": s.actions,
            "horizon": s.horizon,
            "episodes": s.episodes,
            "delta": s.delta,
            "seed": self.seed,
            "state_labels": self.state_labels,
            "action_labels": self.action_labels,
        })
        .to_string()
    }
}

/// A guest's policy for the coming episodes.
#[derive(Debug, Clone, PartialEq)]
pub enum GuestPolicy {
    /// `[h·S + s]` → action.
    Actions(Vec<u32>),
    /// `[(h·S + s)·A + a]` → probability of action a.
    Probabilities(Vec<f64>),
}

/// A guest's answer before a batch.
#[derive(Debug, Clone, PartialEq)]
pub struct Decision {
    /// None: keep the previous policy.
    pub policy: Option<GuestPolicy>,
    /// Episodes to follow it for (at least 1; cut at the run's end).
    pub episodes: u64,
}

impl Decision {
    /// Keep the policy for `episodes` more episodes.
    pub fn keep(episodes: u64) -> Decision {
        Decision {
            policy: None,
            episodes,
        }
    }

    /// A new policy for `episodes` episodes.
    pub fn new(policy: GuestPolicy, episodes: u64) -> Decision {
        Decision {
            policy: Some(policy),
            episodes,
        }
    }

    /// Checks the decision against the setting; the message names the first
    /// entry at fault.
    pub fn check(&self, set: &Setting, first: bool) -> Result<(), String> {
        let most = max_batch(set.horizon);
        if self.episodes == 0 || self.episodes > most {
            return Err(if most < MAX_BATCH {
                format!(
                    "\"episodes\" must be 1 … {most} (at most {MAX_BATCH_STEPS} steps a batch at H = {}), found {}",
                    set.horizon, self.episodes
                )
            } else {
                format!(
                    "\"episodes\" must be 1 … {MAX_BATCH}, found {}",
                    self.episodes
                )
            });
        }
        let (s_n, a_n) = (set.states, set.actions);
        match &self.policy {
            None if first => Err("the first answer must give a policy, not \"keep\"".into()),
            None => Ok(()),
            Some(GuestPolicy::Actions(acts)) => {
                if acts.len() != set.horizon * s_n {
                    return Err(format!(
                        "\"actions\" must hold H·S = {} actions, found {}",
                        set.horizon * s_n,
                        acts.len()
                    ));
                }
                match acts.iter().position(|&a| a as usize >= a_n) {
                    Some(i) => Err(format!(
                        "\"actions\"[{}][{}] is {}, but actions are 0 … {}",
                        i / s_n,
                        i % s_n,
                        acts[i],
                        a_n - 1
                    )),
                    None => Ok(()),
                }
            }
            Some(GuestPolicy::Probabilities(p)) => {
                if p.len() != set.horizon * s_n * a_n {
                    return Err(format!(
                        "\"probabilities\" must hold H·S·A = {} numbers, found {}",
                        set.horizon * s_n * a_n,
                        p.len()
                    ));
                }
                for (i, row) in p.chunks_exact(a_n).enumerate() {
                    let at = format!("\"probabilities\"[{}][{}]", i / s_n, i % s_n);
                    if let Some(a) = row.iter().position(|x| !(x.is_finite() && *x >= 0.0)) {
                        return Err(format!("{at}[{a}] is {}, not a probability", row[a]));
                    }
                    let sum: f64 = row.iter().sum();
                    if (sum - 1.0).abs() > ROW_SUM_TOLERANCE {
                        return Err(format!("{at} sums to {sum}, not 1"));
                    }
                }
                Ok(())
            }
        }
    }

    /// Reads a decision from its JSON form (the process protocol and the
    /// page): `{"actions": [[a; S]; H]}`, `{"probabilities": [[[p; A]; S];
    /// H]}` or `{"keep": true}`, each with an optional `"episodes": n`.
    pub fn from_json(v: &Value, set: &Setting) -> Result<Decision, String> {
        let Some(obj) = v.as_object() else {
            return Err(format!("expected a JSON object, found {}", kind(v)));
        };
        if let Some(k) = obj.keys().find(|k| {
            !matches!(
                k.as_str(),
                "actions" | "probabilities" | "keep" | "episodes"
            )
        }) {
            return Err(format!(
                "unknown key {k:?}; an answer has one of \"actions\", \"probabilities\", \
                 \"keep\", and optionally \"episodes\""
            ));
        }
        let episodes = match obj.get("episodes") {
            None => 1,
            Some(e) => e
                .as_u64()
                .ok_or_else(|| format!("\"episodes\" must be a whole number ≥ 1, found {e}"))?,
        };
        let given: Vec<&str> = ["actions", "probabilities", "keep"]
            .into_iter()
            .filter(|k| obj.contains_key(*k))
            .collect();
        if given.len() != 1 {
            return Err(format!(
                "an answer has exactly one of \"actions\", \"probabilities\" and \"keep\", found {}",
                if given.is_empty() {
                    "none".to_string()
                } else {
                    given.join(" and ")
                }
            ));
        }
        let (h_n, s_n, a_n) = (set.horizon, set.states, set.actions);
        let policy = match given[0] {
            "keep" => {
                if obj["keep"] != Value::Bool(true) {
                    return Err(format!("\"keep\" must be true, found {}", obj["keep"]));
                }
                None
            }
            "actions" => {
                let mut out = Vec::with_capacity(h_n * s_n);
                for_rows(&obj["actions"], "actions", h_n, s_n, |at, x| {
                    let a = x.as_u64().filter(|&a| a < a_n as u64).ok_or_else(|| {
                        format!("{at} must be an action 0 … {}, found {x}", a_n - 1)
                    })?;
                    out.push(a as u32);
                    Ok(())
                })?;
                Some(GuestPolicy::Actions(out))
            }
            _ => {
                let mut out = Vec::with_capacity(h_n * s_n * a_n);
                for_rows(
                    &obj["probabilities"],
                    "probabilities",
                    h_n,
                    s_n,
                    |at, row| {
                        let Some(row) = row.as_array().filter(|r| r.len() == a_n) else {
                            return Err(format!("{at} must be a list of A = {a_n} probabilities"));
                        };
                        for (a, x) in row.iter().enumerate() {
                            out.push(
                                x.as_f64().ok_or_else(|| {
                                    format!("{at}[{a}] must be a number, found {x}")
                                })?,
                            );
                        }
                        Ok(())
                    },
                )?;
                Some(GuestPolicy::Probabilities(out))
            }
        };
        Ok(Decision { policy, episodes })
    }
}

/// The first key an answer's text gives twice at its top level (serde's
/// value type keeps the last silently; every reader of Burnin's files
/// refuses a repeated key, and so does the reader of answers), or None.
pub fn repeated_key(text: &str) -> Option<String> {
    use serde::de::{Deserializer, IgnoredAny, MapAccess, Visitor};
    struct Keys;
    impl<'de> Visitor<'de> for Keys {
        type Value = Option<String>;
        fn expecting(&self, f: &mut std::fmt::Formatter) -> std::fmt::Result {
            f.write_str("an object")
        }
        fn visit_map<M: MapAccess<'de>>(self, mut map: M) -> Result<Option<String>, M::Error> {
            let mut seen = std::collections::HashSet::new();
            let mut twice = None;
            while let Some(k) = map.next_key::<String>()? {
                map.next_value::<IgnoredAny>()?;
                if twice.is_none() && !seen.insert(k.clone()) {
                    twice = Some(k);
                }
            }
            Ok(twice)
        }
    }
    let mut de = serde_json::Deserializer::from_str(text);
    de.deserialize_map(Keys).ok().flatten()
}

/// Calls `f` on each entry of an H × S nested list, with its path.
fn for_rows(
    v: &Value,
    key: &str,
    h_n: usize,
    s_n: usize,
    mut f: impl FnMut(&str, &Value) -> Result<(), String>,
) -> Result<(), String> {
    let steps = v
        .as_array()
        .filter(|a| a.len() == h_n)
        .ok_or_else(|| format!("{key:?} must be a list of H = {h_n} lists, one per step"))?;
    for (h, row) in steps.iter().enumerate() {
        let row = row
            .as_array()
            .filter(|a| a.len() == s_n)
            .ok_or_else(|| format!("{key:?}[{h}] must be a list of S = {s_n} entries"))?;
        for (s, x) in row.iter().enumerate() {
            f(&format!("{key:?}[{h}][{s}]"), x)?;
        }
    }
    Ok(())
}

fn kind(v: &Value) -> &'static str {
    match v {
        Value::Null => "null",
        Value::Bool(_) => "a boolean",
        Value::Number(_) => "a number",
        Value::String(_) => "a string",
        Value::Array(_) => "a list",
        Value::Object(_) => "an object",
    }
}

/// One observed step of a trajectory; its step h is its position in the
/// episode.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct GuestStep {
    pub state: u32,
    pub action: u32,
    pub reward: f64,
    pub next: u32,
}

/// The trajectories of the last batch: `episodes` × H steps, episode-major.
#[derive(Debug, Clone, Copy)]
pub struct Batch<'a> {
    /// Episodes finished before this request (the batch's last one
    /// included).
    pub done: u64,
    pub horizon: usize,
    pub steps: &'a [GuestStep],
}

impl Batch<'_> {
    /// Episodes in the batch.
    pub fn episodes(&self) -> usize {
        self.steps.len() / self.horizon.max(1)
    }

    /// The process protocol's message for this batch:
    /// `{"done": k, "trajectories": [[[s, a, r, s'], …H], …]}`.
    pub fn to_json(&self) -> String {
        use std::fmt::Write;
        let mut out = String::with_capacity(32 + self.steps.len() * 14);
        let _ = write!(out, "{{\"done\":{},\"trajectories\":[", self.done);
        for (e, ep) in self.steps.chunks(self.horizon.max(1)).enumerate() {
            out.push_str(if e == 0 { "[" } else { ",[" });
            for (h, st) in ep.iter().enumerate() {
                if h > 0 {
                    out.push(',');
                }
                let r = serde_json::Number::from_f64(st.reward)
                    .map_or_else(|| "null".to_string(), |n| n.to_string());
                let _ = write!(out, "[{},{},{},{}]", st.state, st.action, r, st.next);
            }
            out.push(']');
        }
        out.push_str("]}");
        out
    }
}

/// A guest learner, hosted by a front end.
pub trait Guest: Send {
    /// The decision for the next batch. The first call has an empty batch
    /// (`done` = 0); each later one brings every step of the batch just run.
    /// An error stops the run with this message.
    fn decide(&mut self, batch: Batch<'_>) -> Result<Decision, String>;
}

/// Starts guest learners by the name an experiment gives them.
pub trait GuestHost: Send + Sync {
    fn start(&self, name: &str, intro: &GuestIntro) -> Result<Box<dyn Guest>, String>;
}

impl<F> GuestHost for F
where
    F: Fn(&str, &GuestIntro) -> Result<Box<dyn Guest>, String> + Send + Sync,
{
    fn start(&self, name: &str, intro: &GuestIntro) -> Result<Box<dyn Guest>, String> {
        self(name, intro)
    }
}

/// A shared host.
pub type Guests = Arc<dyn GuestHost>;

/// How an action is drawn in one (h, s).
#[derive(Debug, Clone, Copy)]
enum Draw {
    /// Always this action: no draw, as a deterministic built-in.
    Fixed(u32),
    /// Every action with 1/A: one draw, as the built-in uniform learner.
    Uniform,
    /// Inverse CDF of the row starting at this index, with one uniform draw.
    Row(u32),
}

/// A guest as the runner sees it: a [`Learner`] whose policy is the guest's
/// last decision, checked and held as a table.
pub struct GuestLearner {
    set: Setting,
    name: String,
    intro: GuestIntro,
    host: Guests,
    guest: Option<Box<dyn Guest>>,
    /// Episodes left in the current batch.
    left: u64,
    done: u64,
    steps: Vec<GuestStep>,
    actions: Vec<u32>,
    probs: Vec<f64>,
    draws: Vec<Draw>,
    stochastic: bool,
    version: u64,
    fault: Option<String>,
}

impl GuestLearner {
    /// A guest named `name`, started through `host` at its first episode.
    pub fn new(name: &str, host: Guests, intro: GuestIntro) -> GuestLearner {
        let set = intro.setting;
        GuestLearner {
            set,
            name: name.to_owned(),
            intro,
            host,
            guest: None,
            left: 0,
            done: 0,
            steps: Vec::new(),
            actions: vec![0; set.horizon * set.states],
            probs: Vec::new(),
            draws: Vec::new(),
            stochastic: false,
            version: 0,
            fault: None,
        }
    }

    /// Asks the guest for its next decision and installs it.
    fn next_batch(&mut self) -> Result<(), String> {
        if self.guest.is_none() {
            self.guest = Some(self.host.start(&self.name, &self.intro)?);
        }
        let guest = self.guest.as_mut().expect("started above");
        let batch = Batch {
            done: self.done,
            horizon: self.set.horizon,
            steps: &self.steps,
        };
        let d = guest.decide(batch)?;
        self.steps.clear();
        d.check(&self.set, self.version == 0)?;
        match d.policy {
            Some(GuestPolicy::Actions(a))
                if self.stochastic || self.version == 0 || a != self.actions =>
            {
                self.actions = a;
                self.stochastic = false;
                self.version += 1;
            }
            Some(GuestPolicy::Probabilities(mut p)) => {
                // A row accepted within the tolerance is the distribution it
                // is scaled to: drawn and evaluated as such, so an optimal
                // policy's regret stays exactly 0.
                for row in p.chunks_exact_mut(self.set.actions) {
                    crate::model::check::normalise(row, |x| x);
                }
                if !self.stochastic || p != self.probs {
                    self.install_rows(p);
                    self.version += 1;
                }
            }
            // "keep", or the same policy again.
            _ => {}
        }
        self.left = d.episodes;
        Ok(())
    }

    fn install_rows(&mut self, p: Vec<f64>) {
        let a_n = self.set.actions;
        let uniform = 1.0 / a_n as f64;
        self.draws = p
            .chunks_exact(a_n)
            .enumerate()
            .map(|(i, row)| {
                if let Some(a) = row.iter().position(|&x| x == 1.0) {
                    Draw::Fixed(a as u32)
                } else if row.iter().all(|&x| x == uniform) {
                    Draw::Uniform
                } else {
                    Draw::Row((i * a_n) as u32)
                }
            })
            .collect();
        self.probs = p;
        self.stochastic = true;
    }
}

impl Learner for GuestLearner {
    fn begin_episode(&mut self, _rng: &mut LearnRng) {
        if self.left == 0
            && self.fault.is_none()
            && let Err(e) = self.next_batch()
        {
            self.fault = Some(e);
        }
    }

    fn policy(&self) -> PolicyView<'_> {
        if self.stochastic {
            PolicyView::Table(&self.probs)
        } else {
            PolicyView::Greedy(&self.actions)
        }
    }

    fn policy_version(&self) -> u64 {
        self.version
    }

    fn act(&mut self, h: usize, s: usize, rng: &mut LearnRng) -> usize {
        let i = h * self.set.states + s;
        if !self.stochastic {
            return self.actions[i] as usize;
        }
        match self.draws[i] {
            Draw::Fixed(a) => a as usize,
            Draw::Uniform => rng.random_range(0..self.set.actions as u32) as usize,
            Draw::Row(start) => {
                let row = &self.probs[start as usize..start as usize + self.set.actions];
                let u = rng.random::<f64>();
                let mut acc = 0.0;
                for (a, &p) in row.iter().enumerate() {
                    acc += p;
                    if u < acc {
                        return a;
                    }
                }
                // Rounding left u above the sum: the last action with weight.
                row.iter().rposition(|&p| p > 0.0).unwrap_or(0)
            }
        }
    }

    fn observe(&mut self, _h: usize, s: usize, a: usize, r: f64, next: usize, _: &mut LearnRng) {
        self.steps.push(GuestStep {
            state: s as u32,
            action: a as u32,
            reward: r,
            next: next as u32,
        });
    }

    fn end_episode(&mut self, _rng: &mut LearnRng) {
        self.done += 1;
        self.left = self.left.saturating_sub(1);
    }

    fn model_updates(&self) -> u64 {
        self.version
    }

    fn fault(&mut self) -> Option<String> {
        self.fault.take()
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use serde_json::json;

    const SET: Setting = Setting {
        states: 2,
        actions: 3,
        horizon: 2,
        episodes: 10,
        delta: 0.1,
    };

    fn read(v: Value, first: bool) -> Result<Decision, String> {
        Decision::from_json(&v, &SET).and_then(|d| d.check(&SET, first).map(|()| d))
    }

    /// The three forms of an answer and their checks (docs/formats.md).
    #[test]
    fn answers_are_read_in_their_three_forms_and_checked() {
        assert_eq!(
            read(json!({"actions": [[0, 2], [1, 1]], "episodes": 4}), true),
            Ok(Decision::new(GuestPolicy::Actions(vec![0, 2, 1, 1]), 4))
        );
        let p = json!({"probabilities": [[[1, 0, 0], [0.25, 0.25, 0.5]], [[0, 1, 0], [0, 0, 1]]]});
        assert_eq!(
            read(p, true).unwrap().policy,
            Some(GuestPolicy::Probabilities(vec![
                1.0, 0.0, 0.0, 0.25, 0.25, 0.5, 0.0, 1.0, 0.0, 0.0, 0.0, 1.0
            ]))
        );
        assert_eq!(read(json!({"keep": true}), false), Ok(Decision::keep(1)));
        for (v, first, want) in [
            (
                json!({"keep": true}),
                true,
                "the first answer must give a policy",
            ),
            (json!({"keep": false}), false, "\"keep\" must be true"),
            (
                json!({"keep": true, "episodes": 0}),
                false,
                "\"episodes\" must be 1",
            ),
            (
                json!({"keep": true, "episodes": -2}),
                false,
                "\"episodes\" must be a whole number",
            ),
            (
                json!({"keep": true, "actions": [[0, 0], [0, 0]]}),
                false,
                "found actions and keep",
            ),
            (json!({}), false, "found none"),
            (json!({"policy": 1}), false, "unknown key \"policy\""),
            (json!([1]), false, "expected a JSON object, found a list"),
            (
                json!({"actions": [[0, 3], [0, 0]]}),
                false,
                "\"actions\"[0][1] must be an action 0 … 2, found 3",
            ),
            (
                json!({"actions": [[0, 0]]}),
                false,
                "must be a list of H = 2 lists",
            ),
            (
                json!({"probabilities": [[[1, 0, 0], [0.5, 0.5, 0.5]], [[1, 0, 0], [1, 0, 0]]]}),
                false,
                "\"probabilities\"[0][1] sums to 1.5, not 1",
            ),
            (
                json!({"probabilities": [[[1, 0, 0], [2, -1, 0]], [[1, 0, 0], [1, 0, 0]]]}),
                false,
                "\"probabilities\"[0][1][1] is -1, not a probability",
            ),
        ] {
            let got = read(v.clone(), first).unwrap_err();
            assert!(got.contains(want), "{v}: {got:?} lacks {want:?}");
        }
    }

    /// The batch message of the process protocol.
    #[test]
    fn a_batch_is_written_as_one_line_of_trajectories() {
        let step = |s, a, r, n| GuestStep {
            state: s,
            action: a,
            reward: r,
            next: n,
        };
        let steps = [
            step(0, 1, 0.5, 1),
            step(1, 0, 1.0, 0),
            step(0, 0, 0.0, 0),
            step(0, 2, 0.25, 1),
        ];
        let b = Batch {
            done: 7,
            horizon: 2,
            steps: &steps,
        };
        assert_eq!(b.episodes(), 2);
        let v: Value = serde_json::from_str(&b.to_json()).unwrap();
        assert_eq!(
            v,
            json!({"done": 7, "trajectories": [[[0, 1, 0.5, 1], [1, 0, 1.0, 0]], [[0, 0, 0.0, 0], [0, 2, 0.25, 1]]]})
        );
    }
}

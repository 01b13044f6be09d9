//! The greedy policy a Q-learning-style learner keeps as it updates one
//! state at a time (`q-ucb-*`, UCB-Advantage, Q-EarlySettled-Advantage):
//! the table π_h(s), its version, and the count of episodes whose policy
//! differed from the one before.

use super::Setting;

pub struct GreedyTable {
    states: usize,
    /// π_h(s), `[h·S + s]`.
    greedy: Vec<u32>,
    version: u64,
    seen_version: Option<u64>,
    updates: u64,
    initialised: bool,
}

impl GreedyTable {
    pub fn new(set: &Setting) -> GreedyTable {
        GreedyTable {
            states: set.states,
            greedy: vec![0; set.horizon * set.states],
            version: 0,
            seen_version: None,
            updates: 0,
            initialised: false,
        }
    }

    /// Whether the first episode has begun: before it, the learner makes
    /// every state greedy once (then calls [`GreedyTable::begin_episode`]).
    pub fn initialised(&self) -> bool {
        self.initialised
    }

    /// Called at the start of each episode, after the first one's states
    /// were made greedy: counts the episode when its policy differs from
    /// the last counted one (the initial policy included).
    pub fn begin_episode(&mut self) {
        if !self.initialised {
            self.initialised = true;
            self.version += 1;
        }
        if self.seen_version != Some(self.version) {
            self.seen_version = Some(self.version);
            self.updates += 1;
        }
    }

    /// π_h(s) ← `a`; the version moves when it changes.
    pub fn set(&mut self, h: usize, s: usize, a: usize) {
        let slot = &mut self.greedy[h * self.states + s];
        if *slot != a as u32 {
            *slot = a as u32;
            self.version += 1;
        }
    }

    /// π_h(s).
    pub fn action(&self, h: usize, s: usize) -> usize {
        self.greedy[h * self.states + s] as usize
    }

    /// π, `[h·S + s]`.
    pub fn policy(&self) -> &[u32] {
        &self.greedy
    }

    /// Changes whenever the policy does.
    pub fn version(&self) -> u64 {
        self.version
    }

    /// Episodes whose policy differed from the one before (the first
    /// included).
    pub fn updates(&self) -> u64 {
        self.updates
    }
}

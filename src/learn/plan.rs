//! Planning over a learner's own estimates: backward induction with random
//! tie-breaking, the plan a planning learner keeps ([`Plan`]), and the rows a
//! replan has to recompute ([`StaleRows`]).

use rand::Rng;

use super::{LearnRng, RowCounts, Setting};

/// The maximum of `q`, the first action attaining it, and how many do
/// (0 when every entry is NaN).
#[inline]
fn max_and_ties(q: &[f64]) -> (f64, usize, u32) {
    let mut best = f64::NEG_INFINITY;
    let mut first = 0;
    let mut ties = 0u32;
    for (a, &x) in q.iter().enumerate() {
        if x > best {
            best = x;
            first = a;
            ties = 1;
        } else if x == best {
            ties += 1;
        }
    }
    (best, first, ties)
}

/// The k-th (from 0) action at or after `first` whose value equals `best`.
#[inline]
fn kth_maximiser(q: &[f64], best: f64, first: usize, mut k: u32) -> usize {
    for (a, &x) in q.iter().enumerate().skip(first) {
        if x == best {
            if k == 0 {
                return a;
            }
            k -= 1;
        }
    }
    unreachable!("k < ties, the number of maximisers")
}

/// The maximiser of `q`, ties broken uniformly at random: one pass finds
/// the maximum and how many actions attain it; when more than one does, one
/// draw picks the k-th of them (and no draw is made otherwise).
#[inline]
pub fn argmax_random(q: &[f64], rng: &mut LearnRng) -> usize {
    let (best, first, ties) = max_and_ties(q);
    if ties <= 1 {
        return first;
    }
    kth_maximiser(q, best, first, rng.random_range(0..ties))
}

/// Backward induction over a learner's own estimates. `q_of(h, s, a, v_next,
/// rng)` returns Q_h(s,a) given V_{h+1} (drawing from `rng` if it samples); `v` ((H+1)·S) and `policy` (H·S) are
/// filled, V_h(s) = max_a Q_h(s,a), the greedy action chosen with random
/// ties. Returns whether any action of `policy` changed.
fn plan(
    set: &Setting,
    v: &mut [f64],
    policy: &mut [u32],
    rng: &mut LearnRng,
    mut q_of: impl FnMut(usize, usize, usize, &[f64], &mut LearnRng) -> f64,
) -> bool {
    let (s_n, a_n, h_n) = (set.states, set.actions, set.horizon);
    let mut q = vec![0.0; a_n];
    let mut changed = false;
    v[h_n * s_n..].iter_mut().for_each(|x| *x = 0.0);
    for h in (0..h_n).rev() {
        let (now, next) = v.split_at_mut((h + 1) * s_n);
        let v_next = &next[..s_n];
        let v_now = &mut now[h * s_n..];
        for s in 0..s_n {
            for a in 0..a_n {
                q[a] = q_of(h, s, a, v_next, rng);
            }
            let best = argmax_random(&q, rng);
            v_now[s] = q[best];
            let slot = &mut policy[h * s_n + s];
            if *slot != best as u32 {
                *slot = best as u32;
                changed = true;
            }
        }
    }
    changed
}

/// Which rows of a plan have to be recomputed at the next replan, for
/// learners whose Q_h(s,a) is a function of the row's own statistics and of
/// V_{h+1} at the row's observed successors only (and, for UCBVI, of its own
/// previous value through a min, which a recomputation from unchanged inputs
/// leaves as it was).
///
/// A row is stale when its statistics changed, or when V_{h+1} changed at one
/// of its successors; [`Plan::replan_stale`] recomputes exactly those rows and
/// reuses the stored Q of the others, so the plan (values, policy, and every
/// random tie-break draw) is bit for bit what a full backward induction
/// gives. Once the optimistic values stop moving, as they do while a bonus
/// keeps them clipped at H, a replan costs O(H·S·A) flag reads instead of
/// O(entries) arithmetic.
#[derive(Debug, Clone)]
pub struct StaleRows {
    states: usize,
    actions: usize,
    /// Recompute every row at every plan (the tests' reference).
    always: bool,
    /// Per row (h, s, a): recompute it.
    row: Vec<bool>,
    /// Per (h, s), `[h·S + s]`: some row of the state is stale.
    state: Vec<bool>,
    /// `users[h·S + y]`: the rows (s, a) of step h whose observed successors
    /// include y (each listed once).
    users: Vec<Vec<(u32, u32)>>,
}

impl StaleRows {
    /// Every row stale (before the first plan).
    pub fn new(set: &Setting) -> StaleRows {
        StaleRows {
            states: set.states,
            actions: set.actions,
            always: false,
            row: vec![true; set.rows()],
            state: vec![true; set.horizon * set.states],
            users: vec![Vec::new(); set.horizon * set.states],
        }
    }

    /// Every row stale at every plan: a full backward induction each time.
    #[cfg(test)]
    pub(crate) fn always(&mut self) {
        self.always = true;
    }

    /// Row (h, s, a) has new statistics.
    #[inline]
    pub fn mark(&mut self, h: usize, s: usize, a: usize) {
        let hs = h * self.states + s;
        self.row[hs * self.actions + a] = true;
        self.state[hs] = true;
    }

    /// Counts a visit of (h, s, a) with reward `r` and next state `next` in
    /// the row's counts `c`, and marks the row stale (registering `next` as
    /// a successor the first time it is seen).
    #[inline]
    pub fn count(&mut self, c: &mut RowCounts, h: usize, s: usize, a: usize, r: f64, next: usize) {
        if c.add(r, next) {
            self.add_successor(h, s, a, next);
        }
        self.mark(h, s, a);
    }

    /// Row (h, s, a) has `y` as an observed successor for the first time.
    #[inline]
    pub fn add_successor(&mut self, h: usize, s: usize, a: usize, y: usize) {
        self.users[h * self.states + y].push((s as u32, a as u32));
    }

    /// Every row of step `h` with `y` among its observed successors is stale.
    #[inline]
    pub fn mark_users(&mut self, h: usize, y: usize) {
        let base = h * self.states;
        for &(s, a) in &self.users[base + y] {
            let hs = base + s as usize;
            self.row[hs * self.actions + a as usize] = true;
            self.state[hs] = true;
        }
    }

    /// Every row of step `h` is stale.
    fn mark_step(&mut self, h: usize) {
        let (s_n, a_n) = (self.states, self.actions);
        self.row[h * s_n * a_n..(h + 1) * s_n * a_n].fill(true);
        self.state[h * s_n..(h + 1) * s_n].fill(true);
    }
}

/// A planning learner's current plan: its values, its greedy policy, how
/// often it was recomputed, and a version that changes with the policy.
#[derive(Debug, Clone)]
pub struct Plan {
    states: usize,
    v: Vec<f64>,
    policy: Vec<u32>,
    /// Q of every row as last computed (only for [`Plan::replan_stale`]).
    q: Vec<f64>,
    /// For each (h, s), `[h·S + s]`: the first maximising action and how
    /// many actions attain the maximum, as last computed (only for
    /// [`Plan::replan_stale`]).
    ties: Vec<(u32, u32)>,
    /// Scratch for [`Plan::replan_stale`]: the states of one step whose value
    /// moved (kept to spare an allocation per plan).
    moved: Vec<usize>,
    version: u64,
    updates: u64,
}

impl Plan {
    pub fn new(set: &Setting) -> Plan {
        Plan {
            states: set.states,
            v: vec![0.0; (set.horizon + 1) * set.states],
            policy: vec![u32::MAX; set.horizon * set.states],
            q: Vec::new(),
            ties: Vec::new(),
            moved: Vec::new(),
            version: 0,
            updates: 0,
        }
    }

    /// Recomputes the plan by backward induction ([`plan`]), counting the
    /// update and changing the version if any action changed.
    pub fn replan(
        &mut self,
        set: &Setting,
        rng: &mut LearnRng,
        q_of: impl FnMut(usize, usize, usize, &[f64], &mut LearnRng) -> f64,
    ) {
        if plan(set, &mut self.v, &mut self.policy, rng, q_of) {
            self.version += 1;
        }
        self.updates += 1;
    }

    /// The same plan as [`Plan::replan`] computes, recomputing only the rows
    /// that `stale` marks (and clearing their marks); `q_of` must not draw
    /// from `rng`. When V_h(s) changes, the rows of step h − 1 that lead to
    /// s become stale. Marking more rows than needed is harmless: a row
    /// recomputed from unchanged inputs gets its old value back.
    ///
    /// A state none of whose rows is stale keeps its maximum and its tied
    /// maximisers, so only the tie-break is drawn again — the one draw
    /// [`argmax_random`] would make, picking the same action.
    pub fn replan_stale(
        &mut self,
        set: &Setting,
        rng: &mut LearnRng,
        stale: &mut StaleRows,
        mut q_of: impl FnMut(usize, usize, usize, &[f64]) -> f64,
    ) {
        if stale.always {
            return self.replan(set, rng, |h, s, a, v_next, _| q_of(h, s, a, v_next));
        }
        let (s_n, a_n, h_n) = (set.states, set.actions, set.horizon);
        if self.q.is_empty() {
            self.q = vec![0.0; set.rows()];
            self.ties = vec![(0, 0); h_n * s_n];
        }
        let mut changed = false;
        let moved = &mut self.moved;
        for h in (0..h_n).rev() {
            let (now, next) = self.v.split_at_mut((h + 1) * s_n);
            let v_next = &next[..s_n];
            let v_now = &mut now[h * s_n..];
            let hs = h * s_n..(h + 1) * s_n;
            let rows = h * s_n * a_n..(h + 1) * s_n * a_n;
            let q_h = &mut self.q[rows.clone()];
            let flags_h = &mut stale.row[rows];
            let states = stale.state[hs.clone()]
                .iter_mut()
                .zip(&mut self.ties[hs.clone()])
                .zip(&mut self.policy[hs]);
            for (s, ((state_stale, tie), slot)) in states.enumerate() {
                let q = &mut q_h[s * a_n..(s + 1) * a_n];
                if std::mem::take(state_stale) {
                    let flags = &mut flags_h[s * a_n..(s + 1) * a_n];
                    for (a, (x, f)) in q.iter_mut().zip(flags).enumerate() {
                        if std::mem::take(f) {
                            *x = q_of(h, s, a, v_next);
                        }
                    }
                    let (best, first, ties) = max_and_ties(q);
                    *tie = (first as u32, ties);
                    if best.to_bits() != v_now[s].to_bits() {
                        v_now[s] = best;
                        moved.push(s);
                    }
                }
                let (first, ties) = *tie;
                let pick = if ties <= 1 {
                    first
                } else {
                    let k = rng.random_range(0..ties);
                    if ties as usize == a_n {
                        k
                    } else {
                        kth_maximiser(q, v_now[s], first as usize, k) as u32
                    }
                };
                // Without a branch: with random tie-breaks, whether the
                // action changed is a coin flip the processor cannot predict.
                changed |= *slot != pick;
                *slot = pick;
            }
            // The rows of step h − 1 that lead to a state whose value moved
            // are stale; when many moved, marking the whole step is cheaper
            // than following each state's users (and marks a superset).
            if h > 0 && !moved.is_empty() {
                if moved.len() * 8 > s_n {
                    stale.mark_step(h - 1);
                } else {
                    for &y in moved.iter() {
                        stale.mark_users(h - 1, y);
                    }
                }
            }
            moved.clear();
        }
        if changed {
            self.version += 1;
        }
        self.updates += 1;
    }

    /// The planned action in state `s` at step `h`.
    #[inline]
    pub fn action(&self, h: usize, s: usize) -> usize {
        self.policy[h * self.states + s] as usize
    }

    pub fn policy(&self) -> &[u32] {
        &self.policy
    }

    /// V_h(s) as last planned (0 at h = H and before the first plan).
    pub fn value(&self, h: usize, s: usize) -> f64 {
        self.v[h * self.states + s]
    }

    /// Q of row (h, s, a) as last computed by [`Plan::replan_stale`] (NaN
    /// before it first ran, and for a plan only ever made by [`Plan::replan`]).
    pub fn q(&self, row: usize) -> f64 {
        self.q.get(row).copied().unwrap_or(f64::NAN)
    }

    pub fn version(&self) -> u64 {
        self.version
    }

    pub fn updates(&self) -> u64 {
        self.updates
    }
}
#[cfg(test)]
mod tests {
    use rand::{RngCore, SeedableRng};

    use super::*;
    use crate::generate::Garnet;
    use crate::learn::{EpsGreedy, Learner, Mvp, MvpSamples, PolicyView, Ucbvi};
    use crate::sample::{self, Sampler};

    /// Runs `fast` (recomputing stale rows only) and `full` (recomputing
    /// every row at every plan) side by side, each with its own copy of one
    /// seeded generator, and checks after every plan that both follow the
    /// same policy and have drawn the same numbers.
    fn check_same_plans(
        mut fast: Box<dyn Learner>,
        mut full: Box<dyn Learner>,
        m: &crate::Mdp,
        episodes: usize,
    ) {
        let sampler = Sampler::new(m);
        let (mut r1, mut r2) = (LearnRng::seed_from_u64(7), LearnRng::seed_from_u64(7));
        let policy = |l: &dyn Learner| match l.policy() {
            PolicyView::Greedy(p) | PolicyView::Mixed { greedy: p, .. } => p.to_vec(),
            PolicyView::Uniform | PolicyView::Table(_) => Vec::new(),
        };
        for k in 0..episodes {
            fast.begin_episode(&mut r1);
            full.begin_episode(&mut r2);
            assert_eq!(policy(&*fast), policy(&*full), "policy of episode {k}");
            assert_eq!(fast.policy_version(), full.policy_version(), "episode {k}");
            let mut s = sampler.start(&mut r1);
            sampler.start(&mut r2);
            for h in 0..m.horizon() {
                let a = fast.act(h, s, &mut r1);
                assert_eq!(a, full.act(h, s, &mut r2));
                let row = s * m.n_actions() + a;
                let r = sample::reward(&mut r1, m.step(h).reward(row));
                sample::reward(&mut r2, m.step(h).reward(row));
                let next = sampler.next(&mut r1, h, row);
                sampler.next(&mut r2, h, row);
                fast.observe(h, s, a, r, next, &mut r1);
                full.observe(h, s, a, r, next, &mut r2);
                s = next;
            }
            fast.end_episode(&mut r1);
            full.end_episode(&mut r2);
            assert_eq!(r1.next_u64(), r2.next_u64(), "draws after episode {k}");
        }
        assert_eq!(fast.model_updates(), full.model_updates());
    }

    fn model(time_dependent: bool) -> crate::Mdp {
        Garnet {
            states: 6,
            actions: 3,
            successors: 3,
            horizon: 5,
            time_dependent,
            bernoulli: true,
        }
        .generate(3)
        .unwrap()
    }

    fn setting(m: &crate::Mdp, episodes: u64) -> Setting {
        Setting {
            states: m.n_states(),
            actions: m.n_actions(),
            horizon: m.horizon(),
            episodes,
            delta: 0.1,
        }
    }

    /// Replanning only the stale rows is an exact shortcut: the same values,
    /// policies and random draws as a full backward induction every time
    /// (derived from the definition of `StaleRows`; checked here on learners
    /// whose values stay clipped at H, scale 1, and whose values move, small
    /// scales). The Bernstein term that reads the successors' visit counts
    /// stays at its H² cap at these sizes (it leaves the cap only after
    /// about 10⁴·H·S²·A·L² visits), so its marking is not exercised here.
    #[test]
    fn replanning_stale_rows_only_equals_full_backward_induction() {
        const K: u64 = 400;
        /// `make()` as built, against `make()` replanning every row.
        fn against_full<L: Learner + 'static>(
            make: impl Fn() -> L,
            stale: impl Fn(&mut L) -> &mut StaleRows,
            m: &crate::Mdp,
        ) {
            let mut full = make();
            stale(&mut full).always();
            check_same_plans(Box::new(make()), Box::new(full), m, K as usize);
        }
        for td in [false, true] {
            let m = model(td);
            let set = setting(&m, K);
            for scale in [1.0, 0.05, 0.002] {
                for bernstein in [false, true] {
                    against_full(|| Ucbvi::new(set, scale, bernstein), |l| &mut l.stale, &m);
                }
                for samples in [MvpSamples::LatestBatch, MvpSamples::All] {
                    against_full(
                        || Mvp::with_samples(set, scale, samples),
                        |l| &mut l.stale,
                        &m,
                    );
                }
            }
            against_full(|| EpsGreedy::new(set, 0.1), |l| &mut l.stale, &m);
        }
    }

    /// Among tied maximisers each is picked with probability 1/ties: a χ²
    /// test with 3 degrees of freedom against the 0.999 critical value
    /// 16.266 (standard χ² table, e.g. NIST/SEMATECH e-Handbook of
    /// Statistical Methods, section 1.3.6.7.4, from memory); a non-maximiser is never picked.
    #[test]
    fn argmax_breaks_ties_uniformly() {
        let mut rng = LearnRng::seed_from_u64(11);
        let q = [0.5, 2.0, 1.0, 2.0, 2.0, -1.0, 2.0];
        let mut counts = [0u32; 7];
        let n = 40_000;
        for _ in 0..n {
            counts[argmax_random(&q, &mut rng)] += 1;
        }
        assert_eq!(counts[0] + counts[2] + counts[5], 0, "{counts:?}");
        let e = n as f64 / 4.0;
        let chi2: f64 = [1, 3, 4, 6]
            .iter()
            .map(|&i| (counts[i] as f64 - e).powi(2) / e)
            .sum();
        assert!(chi2 < 16.266, "χ² = {chi2}, counts {counts:?}");
        // A unique maximum draws nothing.
        let before = rng.clone();
        assert_eq!(argmax_random(&[0.0, 3.0, 1.0], &mut rng), 1);
        assert_eq!(rng, before);
    }
}

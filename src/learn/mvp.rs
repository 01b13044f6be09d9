//! MVP (Monotonic Value Propagation) with doubling updates, in its two
//! published versions, which differ only in the samples an update reads:
//!
//! - **latest batch** (`mvp`, Zhang, Chen, Lee & Du 2024): the version whose
//!   regret is min{√(SAH³K), HK} up to log factors, with no burn-in cost.
//!   When the visit count n of (h, s, a) reaches 1, 2, 4, 8, … (= 2^i), its
//!   reward and transition estimates are rebuilt from samples 2^(i−1)+1 … 2^i
//!   alone, and the batch statistics are reset;
//! - **all samples** (`mvp-2021`, the first version, Zhang, Ji & Du 2021):
//!   the same trigger, but each rebuild reads every sample so far, 1 … 2^i.
//!
//! After n visits the estimates have been rebuilt ⌊log₂ n⌋ + 1 times. After
//! an episode in which any such trigger fired, the learner replans by
//! backward induction:
//!
//! ```text
//! Q_h(s,a) = min( r̂ + P̂·V_{h+1} + b, H ),   Q_h(s,a) = H before the first rebuild
//! b = c · ( c₁·√(Var_P̂(V_{h+1})·L/m) + c₂·√((σ̂ − r̂²)·L/m) + c₃·H·L/m )
//! c₁ = 460/9, c₂ = 2√2, c₃ = 544/9,  L = ln(200·S·A·H²·K²/δ)
//! ```
//!
//! with m the number of samples of the latest rebuild (2^(i−1), or 1, for the
//! latest batch; 2^i for all samples), r̂ and σ̂ their empirical first and
//! second moments of the reward, P̂ their empirical transitions, and c the
//! `bonus_scale` (1 = the published constants). Its policy changes only when
//! it replans (ties among maximisers broken at random at that moment) and is
//! used unchanged until the next replan.
//!
//! The first version is written from Remark 1 of arXiv:2307.13586, which
//! says that it differs from the later one only in that an update at count
//! 2^i uses all 2^i samples so far instead of the latest batch; we have not
//! read the algorithm in the 2021 paper itself. Its bonus, constants and L
//! are therefore the 2024 paper's (Algorithm 1), applied to all the samples,
//! and, like the 2024 version, it keeps statistics per step h (time-dependent
//! transitions) with per-step rewards in [0, 1]; the 2021 paper states its
//! result for a stationary kernel and a total reward at most 1 (its
//! abstract), which the bound in `src/theory.rs` translates.
//!
//! # References
//! - Z. Zhang, Y. Chen, J. D. Lee and S. S. Du, "Settling the Sample
//!   Complexity of Online Reinforcement Learning", COLT 2024,
//!   arXiv:2307.13586, Algorithm 1 (the bonus and the batches) and Remark 1
//!   (the difference from the first version).
//! - Z. Zhang, X. Ji and S. S. Du, "Is Reinforcement Learning More Difficult
//!   Than Bandits? A Near-optimal Algorithm Escaping the Curse of Horizon",
//!   COLT 2021, arXiv:2009.13503 (the first version; read here only through
//!   Remark 1 above and the abstract).

use super::{LearnRng, Learner, Plan, PolicyView, RowCounts, Setting, StaleRows};

const C1: f64 = 460.0 / 9.0;
const C2: f64 = 2.0 * std::f64::consts::SQRT_2;
const C3: f64 = 544.0 / 9.0;

/// Which samples a rebuild of MVP's estimates reads.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum MvpSamples {
    /// The latest batch, samples 2^(i−1)+1 … 2^i (Zhang, Chen, Lee & Du 2024).
    LatestBatch,
    /// Every sample so far, 1 … 2^i (the first version, Zhang, Ji & Du 2021,
    /// as Remark 1 of arXiv:2307.13586 describes it).
    All,
}

/// The estimates of one (h, s, a) from its latest rebuild.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct FrozenStats {
    /// m, the number of samples they hold (0 before the first rebuild).
    pub size: u32,
    pub reward_mean: f64,
    pub reward_second_moment: f64,
    /// Next states and their empirical probabilities in the batch.
    pub next: Vec<(u32, f64)>,
}

pub struct Mvp {
    set: Setting,
    scale: f64,
    samples: MvpSamples,
    l: f64,
    /// Visits so far, per row.
    visits: Vec<u32>,
    /// Statistics of the batch being collected (every sample so far with
    /// [`MvpSamples::All`]).
    current: Vec<RowCounts>,
    /// Estimates from the latest rebuild.
    frozen: Vec<FrozenStats>,
    /// How often each row's estimates were rebuilt.
    rebuilds: Vec<u32>,
    triggered: bool,
    plan: Plan,
    /// Rows rebuilt, or whose successors' values changed, since the last plan.
    pub(super) stale: StaleRows,
    /// Every next state any batch of the row has held (registered in `stale`).
    seen: Vec<Vec<u32>>,
}

impl Mvp {
    /// MVP as in Zhang, Chen, Lee & Du (2024): rebuilds from the latest batch.
    pub fn new(set: Setting, bonus_scale: f64) -> Mvp {
        Mvp::with_samples(set, bonus_scale, MvpSamples::LatestBatch)
    }

    /// MVP whose rebuilds read `samples`.
    pub fn with_samples(set: Setting, bonus_scale: f64, samples: MvpSamples) -> Mvp {
        Mvp {
            set,
            scale: bonus_scale,
            samples,
            l: log_factor(&set),
            visits: vec![0; set.rows()],
            current: vec![RowCounts::default(); set.rows()],
            frozen: vec![FrozenStats::default(); set.rows()],
            rebuilds: vec![0; set.rows()],
            // The first episode starts from a plan (all Q = H).
            triggered: true,
            plan: Plan::new(&set),
            stale: StaleRows::new(&set),
            seen: vec![Vec::new(); set.rows()],
        }
    }

    /// How often the estimates of (h, s, a) have been rebuilt.
    pub fn rebuilds(&self, h: usize, s: usize, a: usize) -> u32 {
        self.rebuilds[self.set.row(h, s, a)]
    }

    /// The estimates of (h, s, a) from its latest rebuild.
    pub fn batch(&self, h: usize, s: usize, a: usize) -> &FrozenStats {
        &self.frozen[self.set.row(h, s, a)]
    }

    /// V_h(s) of the current plan (max_a Q_h(s,a); 0 at h = H).
    pub fn value(&self, h: usize, s: usize) -> f64 {
        self.plan.value(h, s)
    }

    /// Q_h(s,a) of the current plan (after the first plan).
    pub fn planned_q(&self, h: usize, s: usize, a: usize) -> f64 {
        self.plan.q(self.set.row(h, s, a))
    }
}

/// L = ln(200·S·A·H²·K²/δ), the log factor of the bonus.
pub fn log_factor(set: &Setting) -> f64 {
    let (s, a, h, k) = (
        set.states as f64,
        set.actions as f64,
        set.horizon as f64,
        set.episodes as f64,
    );
    libm::log(200.0 * s * a * h * h * k * k / set.delta)
}

/// The largest bonus estimates from m samples can carry at scale 1: the formula
/// above with the largest variances, Var_P̂(V_{h+1}) = H²/4 (values in [0, H])
/// and a reward variance of ¼ (rewards in [0, 1]).
pub fn largest_bonus(set: &Setting, m: f64) -> f64 {
    let (hh, l) = (set.horizon as f64, log_factor(set));
    C1 * (hh * hh / 4.0 * l / m).sqrt() + C2 * (0.25 * l / m).sqrt() + C3 * hh * l / m
}

/// Visits of one (h, s, a) after which its bonus is below H whatever the
/// data, at scale 1, for the smallest m = 2^i whose [`largest_bonus`] is
/// below H: with the latest batch, 2m (the batch rebuilt when the visits
/// reach 2^(i+1) holds samples 2^i + 1 … 2^(i+1), so m samples are read from
/// 2m visits on); with all samples, m (the rebuild at 2^i reads them all).
/// Until a row has that many visits its Q may be clipped at H, so MVP's
/// plan can stay optimistic everywhere and its regret linear.
pub fn visits_for_bonus_below_h(set: &Setting, samples: MvpSamples) -> f64 {
    let hh = set.horizon as f64;
    let mut m = 1.0f64;
    while largest_bonus(set, m) >= hh && m < 1e18 {
        m *= 2.0;
    }
    match samples {
        MvpSamples::LatestBatch => 2.0 * m,
        MvpSamples::All => m,
    }
}

impl Learner for Mvp {
    fn begin_episode(&mut self, rng: &mut LearnRng) {
        if !self.triggered {
            return;
        }
        self.triggered = false;
        let set = self.set;
        let (hh, l, scale) = (set.horizon as f64, self.l, self.scale);
        let frozen = &self.frozen;
        // Only rebuilt rows and rows whose successors' values changed are
        // recomputed; the others keep their Q (see `StaleRows`).
        self.plan
            .replan_stale(&set, rng, &mut self.stale, |h, s, a, v_next| {
                let b = &frozen[set.row(h, s, a)];
                if b.size == 0 {
                    return hh;
                }
                let m = b.size as f64;
                let (mut pv, mut pv2) = (0.0, 0.0);
                for &(y, p) in &b.next {
                    let x = v_next[y as usize];
                    pv += p * x;
                    pv2 += p * x * x;
                }
                let var = (pv2 - pv * pv).max(0.0);
                let rvar = (b.reward_second_moment - b.reward_mean * b.reward_mean).max(0.0);
                let bonus =
                    C1 * (var * l / m).sqrt() + C2 * (rvar * l / m).sqrt() + C3 * hh * l / m;
                (b.reward_mean + pv + scale * bonus).min(hh)
            });
    }

    fn policy(&self) -> PolicyView<'_> {
        PolicyView::Greedy(self.plan.policy())
    }

    fn policy_version(&self) -> u64 {
        self.plan.version()
    }

    fn act(&mut self, h: usize, s: usize, _rng: &mut LearnRng) -> usize {
        self.plan.action(h, s)
    }

    fn observe(&mut self, h: usize, s: usize, a: usize, r: f64, next: usize, _rng: &mut LearnRng) {
        let row = self.set.row(h, s, a);
        self.visits[row] += 1;
        let cur = &mut self.current[row];
        cur.add(r, next);
        if self.visits[row].is_power_of_two() {
            let m = cur.n as f64;
            self.frozen[row] = FrozenStats {
                size: cur.n,
                reward_mean: cur.r_sum / m,
                reward_second_moment: cur.r2_sum / m,
                next: cur.next.iter().map(|&(y, c)| (y, c as f64 / m)).collect(),
            };
            if self.samples == MvpSamples::LatestBatch {
                *cur = RowCounts::default();
            }
            self.rebuilds[row] += 1;
            self.triggered = true;
            self.stale.mark(h, s, a);
            for &(y, _) in &self.frozen[row].next {
                if !self.seen[row].contains(&y) {
                    self.seen[row].push(y);
                    self.stale.add_successor(h, s, a, y as usize);
                }
            }
        }
    }

    fn model_updates(&self) -> u64 {
        self.plan.updates()
    }
}

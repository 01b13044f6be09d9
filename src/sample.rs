//! Sampling from a model: next states in O(1) per draw with alias tables,
//! rewards from their distributions.
//!
//! **Invariant:** every draw uses the generator passed in and only `f64`
//! draws from it, and transcendental functions go through `libm`, so a seed
//! gives the same trajectory natively and in wasm.
//!
//! # References
//! - M. D. Vose, "A linear algorithm for generating random numbers with a
//!   given distribution", *IEEE Transactions on Software Engineering* 17(9),
//!   1991, 972–975 (the alias method as built here).
//! - G. Marsaglia and W. W. Tsang, "A simple method for generating gamma
//!   variables", *ACM Transactions on Mathematical Software* 26(3), 2000,
//!   363–372.

use rand::Rng;

use crate::model::{Mdp, Reward};

/// Alias tables for every row of every step table of a model.
#[derive(Debug, Clone)]
pub struct Sampler {
    tables: Vec<AliasTable>,
    stationary: bool,
    start: AliasRow,
}

/// All rows of one step table, in the model's CSR layout.
#[derive(Debug, Clone)]
struct AliasTable {
    offsets: Vec<u32>,
    next: Vec<u32>,
    /// Probability of keeping column i (else its alias).
    keep: Vec<f64>,
    /// Index (within the row) of column i's alias.
    alias: Vec<u32>,
}

/// One distribution over a small set of outcomes.
#[derive(Debug, Clone)]
struct AliasRow {
    outcome: Vec<u32>,
    keep: Vec<f64>,
    alias: Vec<u32>,
}

/// Vose's construction for probabilities `p` (summing to 1 up to rounding):
/// returns (keep, alias) with keep[i] the probability of column i itself.
fn build(p: &[f64]) -> (Vec<f64>, Vec<u32>) {
    let n = p.len();
    let mut keep: Vec<f64> = p.iter().map(|x| x * n as f64).collect();
    let mut alias: Vec<u32> = (0..n as u32).collect();
    let mut small: Vec<usize> = Vec::new();
    let mut large: Vec<usize> = Vec::new();
    for (i, &k) in keep.iter().enumerate() {
        if k < 1.0 {
            small.push(i)
        } else {
            large.push(i)
        }
    }
    while let (Some(&s), Some(&l)) = (small.last(), large.last()) {
        small.pop();
        alias[s] = l as u32;
        keep[l] = (keep[l] + keep[s]) - 1.0;
        if keep[l] < 1.0 {
            large.pop();
            small.push(l);
        }
    }
    // What is left is 1 up to rounding.
    for i in large.into_iter().chain(small) {
        keep[i] = 1.0;
    }
    (keep, alias)
}

#[inline]
fn pick<R: Rng>(rng: &mut R, keep: &[f64], alias: &[u32]) -> usize {
    let n = keep.len();
    let u = rng.random::<f64>() * n as f64;
    let i = (u as usize).min(n - 1);
    if u - (i as f64) < keep[i] {
        i
    } else {
        alias[i] as usize
    }
}

impl Sampler {
    pub fn new(m: &Mdp) -> Sampler {
        let tables = m
            .step_tables()
            .iter()
            .map(|st| {
                let (offsets, next, prob) = st.csr();
                let mut keep = Vec::with_capacity(prob.len());
                let mut alias = Vec::with_capacity(prob.len());
                for r in 0..offsets.len() - 1 {
                    let (lo, hi) = (offsets[r] as usize, offsets[r + 1] as usize);
                    let (k, a) = build(&prob[lo..hi]);
                    keep.extend(k);
                    alias.extend(a);
                }
                AliasTable {
                    offsets: offsets.to_vec(),
                    next: next.to_vec(),
                    keep,
                    alias,
                }
            })
            .collect();
        let support: Vec<u32> = (0..m.n_states() as u32)
            .filter(|&s| m.start()[s as usize] > 0.0)
            .collect();
        let p: Vec<f64> = support.iter().map(|&s| m.start()[s as usize]).collect();
        let (keep, alias) = build(&p);
        Sampler {
            tables,
            stationary: m.is_stationary(),
            start: AliasRow {
                outcome: support,
                keep,
                alias,
            },
        }
    }

    /// A start state drawn from ρ.
    #[inline]
    pub fn start<R: Rng>(&self, rng: &mut R) -> usize {
        let i = pick(rng, &self.start.keep, &self.start.alias);
        self.start.outcome[i] as usize
    }

    /// A next state drawn from P_h(·|row), row = s·A + a.
    #[inline]
    pub fn next<R: Rng>(&self, rng: &mut R, h: usize, row: usize) -> usize {
        let t = &self.tables[if self.stationary { 0 } else { h }];
        let (lo, hi) = (t.offsets[row] as usize, t.offsets[row + 1] as usize);
        let i = pick(rng, &t.keep[lo..hi], &t.alias[lo..hi]);
        t.next[lo + i] as usize
    }
}

/// A standard normal draw (Marsaglia's polar method).
fn normal<R: Rng>(rng: &mut R) -> f64 {
    loop {
        let u = 2.0 * rng.random::<f64>() - 1.0;
        let v = 2.0 * rng.random::<f64>() - 1.0;
        let s = u * u + v * v;
        if s > 0.0 && s < 1.0 {
            return u * (-2.0 * libm::log(s) / s).sqrt();
        }
    }
}

/// A Gamma(shape, 1) draw (Marsaglia & Tsang 2000; for shape < 1 the
/// boost Gamma(shape + 1)·U^(1/shape) from the same paper).
pub fn gamma<R: Rng>(rng: &mut R, shape: f64) -> f64 {
    if shape == 1.0 {
        // Gamma(1, 1) is the standard exponential: −ln U (U uniform on (0, 1]).
        return -libm::log(1.0 - rng.random::<f64>());
    }
    if shape < 1.0 {
        let u: f64 = rng.random();
        return gamma(rng, shape + 1.0) * libm::pow(u, 1.0 / shape);
    }
    let d = shape - 1.0 / 3.0;
    let c = 1.0 / (9.0 * d).sqrt();
    loop {
        let x = normal(rng);
        let v = 1.0 + c * x;
        if v <= 0.0 {
            continue;
        }
        let v = v * v * v;
        let u: f64 = rng.random();
        if u < 1.0 - 0.0331 * x * x * x * x
            || libm::log(u) < 0.5 * x * x + d * (1.0 - v + libm::log(v))
        {
            return d * v;
        }
    }
}

/// A Beta(a, b) draw as X/(X+Y) with X ~ Gamma(a), Y ~ Gamma(b).
pub fn beta<R: Rng>(rng: &mut R, a: f64, b: f64) -> f64 {
    let x = gamma(rng, a);
    let y = gamma(rng, b);
    if x + y > 0.0 { x / (x + y) } else { 0.5 }
}

/// A reward drawn from its distribution.
#[inline]
pub fn reward<R: Rng>(rng: &mut R, r: &Reward) -> f64 {
    match *r {
        Reward::Fixed(x) => x,
        Reward::Bernoulli(p) => {
            if rng.random::<f64>() < p {
                1.0
            } else {
                0.0
            }
        }
        Reward::Uniform(lo, hi) => lo + (hi - lo) * rng.random::<f64>(),
        Reward::Beta(a, b) => beta(rng, a, b),
    }
}

#!/usr/bin/env python3
"""UCBVI-Hoeffding in plain loops compiled with numba: the peer a
speed-minded researcher writes instead of vectorised numpy, for the
comparison in BENCHMARKS.md (issue #32). The algorithm and the accounting
are `benches/numpy_ucbvi.py`'s: every episode a backward induction over
the dense empirical model with the bonus 7·H·L/√n, L = ln(5·S·A·T/δ),
Q = min(Q_prev, H, r̂ + P̂·V + b), Q = Q_prev for unvisited pairs (Azar,
Osband & Munos, ICML 2017), counts per step h, and the same exact regret
accounting as Burnin: each episode's policy is evaluated exactly on the
true model. Compile time is excluded (a first call of 2 episodes before
the timed one) and printed apart.

Burnin's side is `burnin.run` of the package's release build
(`pip install ./python`), one thread, one seed, ucbvi-hoeffding, on the
same models (the random generator, 5 successors, seed 1), whole calls:
the experiment's reading and summaries count against Burnin.

Usage: python3 benches/numba_ucbvi.py [EPISODES]   (needs numba)
"""
import math
import sys
import time
import warnings

import numpy as np
from numba import njit

import burnin


@njit(cache=False)
def ucbvi(P, R, start, H, K, seed):
    S, A = P.shape[1], P.shape[2]
    np.random.seed(seed)
    L = math.log(5 * S * A * K * H / 0.05)
    # V* by backward induction on the true model.
    V = np.zeros(S)
    for h in range(H - 1, -1, -1):
        W = np.empty(S)
        for s in range(S):
            best = -1e300
            for a in range(A):
                q = R[h, s, a]
                for t in range(S):
                    q += P[h, s, a, t] * V[t]
                best = max(best, q)
            W[s] = best
        V = W
    v_star = 0.0
    for s in range(S):
        v_star += start[s] * V[s]
    N = np.zeros((H, S, A))
    Nsas = np.zeros((H, S, A, S))
    Rsum = np.zeros((H, S, A))
    Qprev = np.full((H, S, A), float(H))
    pi = np.zeros((H, S), dtype=np.int64)
    regret = 0.0
    for _ in range(K):
        # Plan.
        V = np.zeros(S)
        for h in range(H - 1, -1, -1):
            W = np.empty(S)
            for s in range(S):
                best, best_a = -1e300, 0
                for a in range(A):
                    n = N[h, s, a]
                    q = Qprev[h, s, a]
                    if n > 0:
                        x = Rsum[h, s, a] / n + 7 * H * L / math.sqrt(n)
                        for t in range(S):
                            x += Nsas[h, s, a, t] / n * V[t]
                        q = min(q, min(x, H))
                    Qprev[h, s, a] = q
                    if q > best:
                        best, best_a = q, a
                W[s] = best
                pi[h, s] = best_a
            V = W
        # Exact value of the episode's policy.
        V = np.zeros(S)
        for h in range(H - 1, -1, -1):
            W = np.empty(S)
            for s in range(S):
                a = pi[h, s]
                x = R[h, s, a]
                for t in range(S):
                    x += P[h, s, a, t] * V[t]
                W[s] = x
            V = W
        v = 0.0
        for s in range(S):
            v += start[s] * V[s]
        regret += v_star - v
        # Simulate and count.
        u, s, acc = np.random.random(), S - 1, 0.0
        for i in range(S):
            acc += start[i]
            if u < acc:
                s = i
                break
        for h in range(H):
            a = pi[h, s]
            r = 1.0 if np.random.random() < R[h, s, a] else 0.0
            u, nxt, acc = np.random.random(), S - 1, 0.0
            for t in range(S):
                acc += P[h, s, a, t]
                if u < acc:
                    nxt = t
                    break
            N[h, s, a] += 1
            Nsas[h, s, a, nxt] += 1
            Rsum[h, s, a] += r
            s = nxt
    return regret


def main():
    warnings.simplefilter("ignore")  # one seed: the results say "n/a (one seed)"
    K = int(sys.argv[1]) if len(sys.argv) > 1 else 20000
    import numba

    print(f"burnin {burnin.BUILD}, numba {numba.__version__}, K = {K}, best of 3")
    print("| model | numba peer (episodes/s) | Burnin (episodes/s) | Burnin ÷ peer | numba compile (s) |")
    print("|---|---|---|---|---|")
    for S, A, H in [(10, 3, 10), (20, 4, 20)]:
        gen = {"kind": "random", "states": S, "actions": A, "successors": 5, "horizon": H}
        m = burnin.generate.random(states=S, actions=A, successors=5, horizon=H)
        P, R, start = m.P, m.mean_rewards, m.start
        t = time.perf_counter()
        ucbvi(P, R, start, H, 2, 1)
        compile_s = time.perf_counter() - t
        peer = burnin_rate = 0.0
        exp = {"format": "burnin-experiment", "version": 1, "generator": gen, "episodes": K, "seeds": 1,
               "learners": [{"algorithm": "ucbvi-hoeffding"}]}
        for _ in range(3):
            t = time.perf_counter()
            ucbvi(P, R, start, H, K, 1)
            peer = max(peer, K / (time.perf_counter() - t))
            t = time.perf_counter()
            burnin.run(exp, threads=1, progress=False)
            burnin_rate = max(burnin_rate, K / (time.perf_counter() - t))
        print(f"| S={S} A={A} H={H} | {peer:.0f} | {burnin_rate:.0f} | {burnin_rate / peer:.1f} | {compile_s:.1f} |")


if __name__ == "__main__":
    main()

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

Usage: python3 benches/numba_ucbvi.py [EPISODES [ROUNDS]] [--split] [--scale=X]   (needs numba)

--scale=X multiplies the bonus on both sides (Burnin's "bonus_scale"): with
the published constants (1) every Q stays at H on these models for all
K = 10⁵ episodes (the bonus 7·H·L/√n is above H until a row has about
(7L)² ≈ 25 000 visits), so every action ties and the learner follows a
fresh random tie-break each episode, as the uniform learner would.

--split times the peer's variants without the exact evaluation, without
planning (the first policy kept) and without both, and Burnin at K, K/5
and K = 1 (its fixed cost), for BENCHMARKS.md's split of the time.
"""
import math
import os
import sys
import time
import warnings

import numpy as np
from numba import njit

import burnin


@njit(cache=False)
def ucbvi(P, R, start, H, K, seed, plan=True, evaluate=True, scale=1.0):
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
        # Plan (left out by --split's variants with plan=False: the policy
        # then stays the first, action 0 everywhere).
        if plan:
            V = np.zeros(S)
            for h in range(H - 1, -1, -1):
                W = np.empty(S)
                for s in range(S):
                    best, best_a = -1e300, 0
                    for a in range(A):
                        n = N[h, s, a]
                        q = Qprev[h, s, a]
                        if n > 0:
                            x = Rsum[h, s, a] / n + scale * 7 * H * L / math.sqrt(n)
                            for t in range(S):
                                x += Nsas[h, s, a, t] / n * V[t]
                            q = min(q, min(x, H))
                        Qprev[h, s, a] = q
                        if q > best:
                            best, best_a = q, a
                    W[s] = best
                    pi[h, s] = best_a
                V = W
        # Exact value of the episode's policy (left out with evaluate=False).
        if evaluate:
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


def best_rate(work, K, rounds):
    """The best episodes/s of `rounds` calls of work() (K episodes each)."""
    best = 0.0
    for _ in range(rounds):
        t = time.perf_counter()
        work()
        best = max(best, K / (time.perf_counter() - t))
    return best


def load():
    return "load average " + " ".join(f"{x:.2f}" for x in os.getloadavg())


def main():
    warnings.simplefilter("ignore")  # one seed: the results say "n/a (one seed)"
    args = [a for a in sys.argv[1:] if not a.startswith("--")]
    split = "--split" in sys.argv
    scales = [float(a.split("=", 1)[1]) for a in sys.argv[1:] if a.startswith("--scale=")]
    scale = scales[-1] if scales else 1.0
    K = int(args[0]) if args else 20000
    rounds = int(args[1]) if len(args) > 1 else 3
    import numba

    print(f"burnin {burnin.BUILD}, numba {numba.__version__}, K = {K}, best of {rounds}, bonus scale {scale:g}, {load()}")
    if split:
        print("| model | peer whole | peer no evaluation | peer no planning | peer neither | Burnin K | Burnin K/5 | Burnin K = 1 (s) |")
        print("|---|---|---|---|---|---|---|---|")
    else:
        print("| model | numba peer (episodes/s) | Burnin (episodes/s) | Burnin ÷ peer | numba compile (s) |")
        print("|---|---|---|---|---|")
    for S, A, H in [(10, 3, 10), (20, 4, 20)]:
        gen = {"kind": "random", "states": S, "actions": A, "successors": 5, "horizon": H}
        m = burnin.generate.random(states=S, actions=A, successors=5, horizon=H)
        P, R, start = m.P, m.mean_rewards, m.start
        t = time.perf_counter()
        ucbvi(P, R, start, H, 2, 1, True, True, scale)
        compile_s = time.perf_counter() - t

        def exp(k):
            return {"format": "burnin-experiment", "version": 1, "generator": gen, "episodes": k, "seeds": 1,
                    "learners": [{"algorithm": "ucbvi-hoeffding", "bonus_scale": scale}]}

        def ours(k):
            return lambda: burnin.run(exp(k), threads=1, progress=False)

        def peer(plan=True, evaluate=True):
            return lambda: ucbvi(P, R, start, H, K, 1, plan, evaluate, scale)

        if not split:
            # The peer and Burnin alternate, so that a change of the
            # machine's load falls on both.
            a = b = 0.0
            for _ in range(rounds):
                a = max(a, best_rate(peer(), K, 1))
                b = max(b, best_rate(ours(K), K, 1))
            print(f"| S={S} A={A} H={H} | {a:.0f} | {b:.0f} | {b / a:.2f} | {compile_s:.1f} |", flush=True)
            continue
        for plan, evaluate in [(False, False), (True, False), (False, True)]:
            ucbvi(P, R, start, H, 2, 1, plan, evaluate, scale)  # the variants' compilation
        r = [0.0] * 6
        t1 = math.inf
        for _ in range(rounds):
            r[0] = max(r[0], best_rate(peer(), K, 1))
            r[1] = max(r[1], best_rate(peer(evaluate=False), K, 1))
            r[2] = max(r[2], best_rate(peer(plan=False), K, 1))
            r[3] = max(r[3], best_rate(peer(False, False), K, 1))
            r[4] = max(r[4], best_rate(ours(K), K, 1))
            r[5] = max(r[5], best_rate(ours(K // 5), K // 5, 1))
            t = time.perf_counter()
            ours(1)()
            t1 = min(t1, time.perf_counter() - t)
        cells = " | ".join(f"{x:.0f}" for x in r)
        print(f"| S={S} A={A} H={H} | {cells} | {t1:.4f} |", flush=True)
    print(load())


if __name__ == "__main__":
    main()

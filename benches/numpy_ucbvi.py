"""A straightforward vectorised numpy UCBVI with the Hoeffding bonus.

The peer a researcher would otherwise write in a notebook, for the speed
comparison in BENCHMARKS.md: replans every episode by backward induction over
dense (S, A, S) count arrays, with the bonus 7·H·L/√n, L = ln(5·S·A·T/δ),
Q = min(Q_prev, H, r̂ + P̂·V + b) and Q = Q_prev for unvisited pairs
(Azar, Osband & Munos, "Minimax Regret Bounds for Reinforcement Learning",
ICML 2017), counts per step h, and the same exact regret accounting as
Burnin: each episode's policy is evaluated exactly on the true model.

Usage: python3 benches/numpy_ucbvi.py MODEL.json EPISODES [SEED]
Prints JSON: episodes per second and the regret (which differs from Burnin's:
other random streams, argmax ties to the first action).
"""
import json
import math
import sys
import time

import numpy as np


def load(path):
    m = json.load(open(path))
    S, A, H = len(m["states"]), len(m["actions"]), m["horizon"]
    tables = m["steps"]
    P = np.zeros((len(tables), S, A, S))
    R = np.zeros((len(tables), S, A))
    for t, st in enumerate(tables):
        for s in range(S):
            for a in range(A):
                for nxt, p in st["transitions"][s][a]:
                    P[t, s, a, nxt] = p
                r = st["rewards"][s][a]
                R[t, s, a] = r["bernoulli"] if isinstance(r, dict) else r
    step = (lambda h: 0) if len(tables) == 1 else (lambda h: h)
    return P, R, np.array(m["start"], dtype=float), H, step


def optimal(P, R, H, step):
    V = np.zeros(P.shape[1])
    for h in reversed(range(H)):
        V = (R[step(h)] + P[step(h)] @ V).max(axis=1)
    return V


def evaluate(P, R, H, step, pi):
    S = P.shape[1]
    V = np.zeros(S)
    idx = np.arange(S)
    for h in reversed(range(H)):
        t = step(h)
        V = R[t, idx, pi[h]] + P[t, idx, pi[h]] @ V
    return V


def main():
    path, K = sys.argv[1], int(sys.argv[2])
    seed = int(sys.argv[3]) if len(sys.argv) > 3 else 1
    P, R, start, H, step = load(path)
    S, A = P.shape[1], P.shape[2]
    delta = 0.05
    L = math.log(5 * S * A * K * H / delta)
    v_star = start @ optimal(P, R, H, step)
    rng = np.random.default_rng(seed)
    cumP = np.cumsum(P, axis=-1)
    cum_start = np.cumsum(start)
    N = np.zeros((H, S, A))
    Nsas = np.zeros((H, S, A, S))
    Rsum = np.zeros((H, S, A))
    Qprev = np.full((H, S, A), float(H))
    regret = 0.0
    t0 = time.perf_counter()
    for _ in range(K):
        V = np.zeros(S)
        pi = np.zeros((H, S), dtype=int)
        for h in reversed(range(H)):
            n = np.maximum(N[h], 1.0)
            q = Rsum[h] / n + (Nsas[h] / n[..., None]) @ V + 7 * H * L / np.sqrt(n)
            q = np.where(N[h] > 0, np.minimum(np.minimum(q, H), Qprev[h]), Qprev[h])
            Qprev[h] = q
            pi[h] = q.argmax(axis=1)
            V = q.max(axis=1)
        regret += v_star - start @ evaluate(P, R, H, step, pi)
        s = min(int(np.searchsorted(cum_start, rng.random(), side="right")), S - 1)
        for h in range(H):
            a = pi[h, s]
            t = step(h)
            r = 1.0 if rng.random() < R[t, s, a] else 0.0
            nxt = min(int(np.searchsorted(cumP[t, s, a], rng.random(), side="right")), S - 1)
            N[h, s, a] += 1
            Nsas[h, s, a, nxt] += 1
            Rsum[h, s, a] += r
            s = nxt
    secs = time.perf_counter() - t0
    print(json.dumps({"episodes": K, "seconds": secs, "episodes_per_second": K / secs,
                      "regret": regret, "numpy": np.__version__}))


if __name__ == "__main__":
    main()

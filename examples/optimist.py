#!/usr/bin/env python3
"""Count-based optimist: a guest learner of our own, standard library only.

Run it with `burnin run --learner optimist="python3 examples/optimist.py"`.

It keeps, per step h and pair (s, a), the visit count n, the reward sum and
the successor counts. Its value of a pair is the empirical one plus a bonus
that shrinks with visits,

    Q_h(s,a) = min(H - h, r̂ + Σ P̂(s') V_{h+1}(s') + c·(H - h)·sqrt(L / n)),
    L = log(6·S·A·H·K/δ),  a pair never tried being worth H - h,

and it acts greedily on Q (ties to the lowest action). To stay cheap it
replans only when some pair's count reaches a power of two, and asks for
batches of episodes until then: the doubling idea of Auer, Jaksch & Ortner,
"Near-optimal regret bounds for reinforcement learning", JMLR 11 (2010), in
a simpler form of our own. Its bonus scale c is the first argument (default
0.2). Protocol: docs/formats.md, "Guest learners".
"""
import json
import math
import sys


def main():
    scale = float(sys.argv[1]) if len(sys.argv) > 1 else 0.2
    intro = json.loads(sys.stdin.readline())
    S, A, H, K = intro["states"], intro["actions"], intro["horizon"], intro["episodes"]
    log_term = math.log(6 * S * A * H * K / intro["delta"])
    n = [[[0] * A for _ in range(S)] for _ in range(H)]
    reward = [[[0.0] * A for _ in range(S)] for _ in range(H)]
    succ = [[[{} for _ in range(A)] for _ in range(S)] for _ in range(H)]
    # Counts at the last plan: a pair whose count doubles since triggers a new one.
    planned = [[[0] * A for _ in range(S)] for _ in range(H)]

    def plan():
        v_next = [0.0] * S
        actions = []
        for h in range(H - 1, -1, -1):
            cap = H - h
            v = [0.0] * S
            act = [0] * S
            for s in range(S):
                best, best_a = -1.0, 0
                for a in range(A):
                    c = n[h][s][a]
                    if c == 0:
                        q = cap
                    else:
                        mean_next = sum(k * v_next[t] for t, k in succ[h][s][a].items()) / c
                        q = min(cap, reward[h][s][a] / c + mean_next + scale * cap * math.sqrt(log_term / c))
                    if q > best:
                        best, best_a = q, a
                v[s], act[s] = best, best_a
            v_next = v
            actions.append(act)
            for s in range(S):
                for a in range(A):
                    planned[h][s][a] = n[h][s][a]
        actions.reverse()
        return actions

    def answer(message):
        sys.stdout.write(json.dumps(message) + "\n")
        sys.stdout.flush()

    answer({"actions": plan()})
    for line in sys.stdin:
        msg = json.loads(line)
        replan = False
        for episode in msg["trajectories"]:
            for h, (s, a, r, s2) in enumerate(episode):
                n[h][s][a] += 1
                reward[h][s][a] += r
                d = succ[h][s][a]
                d[s2] = d.get(s2, 0) + 1
                if n[h][s][a] >= 2 * max(1, planned[h][s][a]):
                    replan = True
        if replan:
            answer({"actions": plan()})
        else:
            # Nothing doubled: keep the policy for the next episode.
            answer({"keep": True})


if __name__ == "__main__":
    main()

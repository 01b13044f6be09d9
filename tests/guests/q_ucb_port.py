#!/usr/bin/env python3
"""A port of Burnin's built-in q-ucb-hoeffding as a guest learner, for the test
`guest_port_of_q_learning_matches_the_built_in_over_64_seeds` (tests/guests.rs).

Q-learning with the Hoeffding bonus, C. Jin, Z. Allen-Zhu, S. Bubeck and
M. I. Jordan, "Is Q-learning Provably Efficient?", NeurIPS 2018, Algorithm 1,
with the constants of src/learn/qlearn.rs: α_t = (H+1)/(H+t),
b_t = c·sqrt(H³·ι/t), ι = ln(S·A·K·H/δ). Ties are broken with Python's own
generator, so runs are not the built-in's draw for draw, only in distribution.
Argument: the bonus scale c.
"""
import json
import math
import random
import sys

intro = json.loads(sys.stdin.readline())
S, A, H, K = intro["states"], intro["actions"], intro["horizon"], intro["episodes"]
c = float(sys.argv[1])
rng = random.Random(intro["seed"])
iota = math.log(S * A * K * H / intro["delta"])
q = [[[float(H)] * A for _ in range(S)] for _ in range(H)]
n = [[[0] * A for _ in range(S)] for _ in range(H)]
v = [[float(H)] * S for _ in range(H)] + [[0.0] * S]
greedy = [[0] * S for _ in range(H)]


def regreedy(h, s):
    row = q[h][s]
    best = max(row)
    greedy[h][s] = rng.choice([a for a in range(A) if row[a] == best])
    v[h][s] = min(best, float(H))


for h in range(H):
    for s in range(S):
        regreedy(h, s)
sys.stdout.write(json.dumps({"actions": greedy}) + "\n")
sys.stdout.flush()
for line in sys.stdin:
    for episode in json.loads(line)["trajectories"]:
        for h, (s, a, r, s2) in enumerate(episode):
            n[h][s][a] += 1
            t = n[h][s][a]
            alpha = (H + 1) / (H + t)
            bonus = c * math.sqrt(H ** 3 * iota / t)
            q[h][s][a] = (1 - alpha) * q[h][s][a] + alpha * (r + v[h + 1][s2] + bonus)
            regreedy(h, s)
    sys.stdout.write(json.dumps({"actions": greedy}) + "\n")
    sys.stdout.flush()

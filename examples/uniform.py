#!/usr/bin/env python3
"""A uniform guest learner for `burnin run --learner NAME="python3 examples/uniform.py [BATCH]"`.

It plays every action with probability 1/A in every step and never changes
its mind: the first answer gives the probability table, every later one says
"keep". BATCH (default 1) is how many episodes it asks for per message; the
trajectories still arrive, batch by batch, and are read and ignored.
Protocol: docs/formats.md, "Guest learners". Standard library only.
"""
import json
import sys


def main():
    batch = int(sys.argv[1]) if len(sys.argv) > 1 else 1
    intro = json.loads(sys.stdin.readline())
    if intro.get("protocol") != "burnin-guest" or intro.get("version") != 1:
        sys.exit(f"uniform.py speaks burnin-guest 1, not {intro.get('protocol')} {intro.get('version')}")
    s_n, a_n, h_n = intro["states"], intro["actions"], intro["horizon"]
    row = [1 / a_n] * a_n
    table = [[row] * s_n for _ in range(h_n)]
    out = sys.stdout
    out.write(json.dumps({"probabilities": table, "episodes": batch}) + "\n")
    out.flush()
    keep = json.dumps({"keep": True, "episodes": batch}) + "\n"
    for line in sys.stdin:
        json.loads(line)  # a batch of trajectories: nothing to learn from
        out.write(keep)
        out.flush()


if __name__ == "__main__":
    main()

#!/usr/bin/env python3
"""The Python package's in-process learner on the learning workload
(BENCHMARKS.md, "Measured by hand"): a trivial learner written as a class
(uniform probabilities, then "keep"), answering once per episode and in
batches of 64, beside the built-in uniform learner, one thread, one seed,
on the learning workload's model (the random generator with S = 20, A = 4,
H = 20, 5 successors, seed 1: `src/bench.rs`'s `garnet`). Best of 3 rounds,
whole `burnin.run` calls (the experiment's reading and summaries included).

Run with a release build of the package: `pip install ./python`, then
`python3 benches/python_guest.py`.
"""
import time
import warnings

import numpy as np

import burnin


class Uniform:
    batch = 1

    def __init__(self, intro):
        self.table = np.full((intro["horizon"], intro["states"], intro["actions"]), 1 / intro["actions"])

    def decide(self, batch):
        if batch["done"] == 0:
            return {"probabilities": self.table, "episodes": self.batch}
        return {"keep": True, "episodes": self.batch}


class Uniform64(Uniform):
    batch = 64


MODEL = {"kind": "random", "states": 20, "actions": 4, "successors": 5, "horizon": 20}


def rate(episodes, learner, cls):
    exp = {"format": "burnin-experiment", "version": 1, "generator": MODEL, "episodes": episodes, "seeds": 1, "learners": [learner]}
    best = 0.0
    for _ in range(3):
        t = time.perf_counter()
        burnin.run(exp, learners={"u": cls} if cls else None, threads=1, progress=False)
        best = max(best, episodes / (time.perf_counter() - t))
    return best


def main():
    warnings.simplefilter("ignore")  # one seed: the results say "n/a (one seed)"
    print(f"burnin {burnin.BUILD}")
    print("| learner | K | episodes/s |\n|---|---|---|")
    for name, k, learner, cls in [
        ("built-in uniform learner, for reference", 200_000, {"algorithm": "uniform"}, None),
        ("class, batches of 64", 200_000, {"guest": "u"}, Uniform64),
        ("class, one episode a call", 50_000, {"guest": "u"}, Uniform),
    ]:
        print(f"| {name} | {k} | {rate(k, learner, cls):.0f} |")


if __name__ == "__main__":
    main()

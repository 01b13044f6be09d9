"""Splits a learner's time per step into simulating, learning, planning and
exact evaluation, from a sampling profile (perf), not from guesses.

Usage (on Linux, with perf; the binary built with debug info so inlined
functions keep their names):

    CARGO_PROFILE_RELEASE_DEBUG=2 cargo build --release --bin burnin --target-dir target/profile
    perf record -F 4000 -e cpu-clock --call-graph dwarf -o perf.data \\
        target/profile/release/burnin bench --only KEY
    perf script -i perf.data --inline -F ip,sym > stacks.txt
    python3 benches/step_split.py stacks.txt

Each sample is put in the first class whose functions are on its stack
(inlined frames included), in this order:
- planning: the learner's `begin_episode` (replanning, posterior draws);
- evaluation: Burnin's exact evaluation of a new policy for its regret
  (`Evaluator`, `episode_regret`), which any learner pays once per policy;
- learning: the learner's `act`, `observe` and `end_episode` (counts,
  incremental updates);
- simulating: everything else in the episode loop (the reward and
  next-state draws, visit counts; what the floor workload does).
Samples outside the run (start-up, the set-up of the model and V*) are
left out. Prints JSON: the share of each class.
"""
import json
import re
import sys

CLASSES = [
    ("planning", re.compile(r"\bbegin_episode\b")),
    ("evaluation", re.compile(r"Evaluator|episode_regret|solve::evaluate")),
    ("learning", re.compile(r"(\bact\b|\bobserve\b|\bend_episode\b)")),
]
IN_RUN = re.compile(r"RunState.*advance|Run::advance")


def samples(text):
    stack = []
    for line in text.splitlines():
        if not line.strip():
            if stack:
                yield stack
            stack = []
        elif line.startswith((" ", "\t")):
            stack.append(line.strip())
        # Header lines (command, time, event) start in the first column.
    if stack:
        yield stack


def main(path):
    counts = {name: 0 for name, _ in CLASSES}
    counts["simulating"] = 0
    outside = 0
    for stack in samples(open(path, encoding="utf-8", errors="replace").read()):
        frames = " | ".join(stack)
        if not IN_RUN.search(frames):
            outside += 1
            continue
        for name, pattern in CLASSES:
            if pattern.search(frames):
                counts[name] += 1
                break
        else:
            counts["simulating"] += 1
    total = sum(counts.values())
    print(json.dumps({
        "samples_in_run": total,
        "samples_outside": outside,
        "share": {k: round(v / total, 4) if total else None for k, v in counts.items()},
    }, indent=1))


if __name__ == "__main__":
    main(sys.argv[1])

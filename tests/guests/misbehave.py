#!/usr/bin/env python3
"""Guest learners that break the contract, one per argument, for the tests in
tests/guests.rs: each answers the introduction correctly (uniform actions)
and then, at its second answer, does the one thing its name says."""
import json
import sys

how = sys.argv[1]
intro = json.loads(sys.stdin.readline())
S, A, H = intro["states"], intro["actions"], intro["horizon"]


def say(obj):
    sys.stdout.write((obj if isinstance(obj, str) else json.dumps(obj)) + "\n")
    sys.stdout.flush()


say({"actions": [[0] * S for _ in range(H)]})
sys.stdin.readline()
if how == "crash":
    sys.stderr.write("Traceback: ZeroDivisionError: the learner divided by zero\n")
    sys.exit(7)
elif how == "silent":
    for line in sys.stdin:
        pass
elif how == "garbage":
    say("policy please?")
elif how == "action-out-of-range":
    say({"actions": [[A] * S for _ in range(H)]})
elif how == "row-sum":
    say({"probabilities": [[[0.7] + [0.0] * (A - 1)] * S for _ in range(H)]})
elif how == "wrong-shape":
    say({"actions": [[0] * (S + 1) for _ in range(H)]})

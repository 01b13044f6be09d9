#!/usr/bin/env python3
"""Guest learners that break the contract, one per argument, for the tests in
tests/guests.rs: each answers the introduction correctly (uniform actions)
and then, at its second answer, does the one thing its name says.

A second argument, when given, is a marker: the guest then starts a helper
process carrying the marker in its command line (as a learner that starts
workers would), so a test can count what is left of the guest after a run.
"""
import json
import os
import subprocess
import sys
import time

how = sys.argv[1]
if len(sys.argv) > 2:
    subprocess.Popen(
        [sys.executable, "-c", "import time; time.sleep(300)", sys.argv[2]],
        stdin=subprocess.DEVNULL,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
intro = json.loads(sys.stdin.readline())
S, A, H = intro["states"], intro["actions"], intro["horizon"]


def say(obj):
    sys.stdout.write((obj if isinstance(obj, str) else json.dumps(obj)) + "\n")
    sys.stdout.flush()


def err(data):
    sys.stderr.buffer.write(data)
    sys.stderr.buffer.flush()


say({"actions": [[0] * S for _ in range(H)]})
if how == "flood-keep":
    # Answers without reading its input, as fast as the pipe takes them.
    while True:
        say({"keep": True})
sys.stdin.readline()
if how == "crash":
    sys.stderr.write("Traceback: ZeroDivisionError: the learner divided by zero\n")
    sys.exit(7)
elif how == "crash-bytes":
    # A byte that is not UTF-8 (Latin-1 é), then the last words.
    err(b"caf\xe9 au lait\nTraceback: the learner gave up\n")
    sys.exit(7)
elif how == "stderr-flood":
    # Ten megabytes of standard error without a newline, then a crash.
    for _ in range(160):
        err(b"x" * 65536)
    sys.exit(7)
elif how == "silent":
    for line in sys.stdin:
        pass
elif how == "close-output":
    # Closes its output and runs on, not reading.
    sys.stdout.close()
    os.close(1)
    time.sleep(300)
elif how == "garbage":
    say("policy please?")
elif how == "action-out-of-range":
    say({"actions": [[A] * S for _ in range(H)]})
elif how == "row-sum":
    say({"probabilities": [[[0.7] + [0.0] * (A - 1)] * S for _ in range(H)]})
elif how == "wrong-shape":
    say({"actions": [[0] * (S + 1) for _ in range(H)]})
elif how == "repeated-key":
    policy = json.dumps([[0] * S for _ in range(H)])
    say('{"actions": %s, "actions": %s}' % (policy, policy))
elif how == "huge-batch":
    say({"keep": True, "episodes": 1 << 20})
elif how in ("linger", "stderr-bytes"):
    # A correct learner (always action 0) that logs to standard error; at
    # the end of its input it lingers instead of exiting.
    err(b"starting: caf\xe9\n")
    while True:
        say({"keep": True})
        line = sys.stdin.readline()
        if not line:
            break
        err(b"batch read, done = %d\n" % json.loads(line)["done"])
    if how == "linger":
        time.sleep(300)

"""Ctrl-C while a learner class of yours is inside `decide` (#32).

A user's `decide` that never returns — a pure-Python loop, or a call that
blocks in C such as `time.sleep(1000)` — must still be stoppable by Ctrl-C
or the notebook's stop button, both of which send the process SIGINT
(ipykernel's interrupt_mode "signal", its default on POSIX). Python runs a
signal's handler only in the main thread, at a bytecode boundary, and a
blocking `time.sleep` is woken by a signal only in the main thread (PEP 475;
the `signal` module's documentation): so the package calls learner classes
from the thread that called `burnin.run`.

Each case runs in its own interpreter (a subprocess), is sent SIGINT once
its learner is inside `decide`, and must exit with KeyboardInterrupt,
leaving no results file; the timeouts are generous and only there so that
a hang fails the test instead of stalling the suite.
"""

import os
import signal
import subprocess
import sys
import textwrap
import threading
import time

import numpy as np
import pytest

import burnin

SCRIPT = textwrap.dedent(
    """
    import sys, time
    import numpy as np
    import burnin

    HOW = sys.argv[1]

    class Stuck:
        def __init__(self, intro):
            self.h, self.s = intro["horizon"], intro["states"]

        def decide(self, batch):
            if batch["done"] >= 3:
                print("inside decide", flush=True)
                if HOW == "loop":
                    while True:
                        pass
                elif HOW == "sleep":
                    time.sleep(1000)
            return {"actions": np.zeros((self.h, self.s), dtype=np.int64)}

    exp = {
        "format": "burnin-experiment", "version": 1,
        "generator": {"kind": "river", "states": 4, "horizon": 6},
        "episodes": 1000, "seeds": 2,
        "learners": [{"algorithm": "uniform"}, {"guest": "stuck"}],
    }
    try:
        res = burnin.run(exp, learners={"stuck": Stuck}, progress=False, threads=int(sys.argv[3]))
    except KeyboardInterrupt:
        print("KeyboardInterrupt", flush=True)
        raise
    res.save(sys.argv[2])
    print("finished", flush=True)
    """
)


@pytest.mark.parametrize("threads", [1, 2])
@pytest.mark.parametrize("how", ["loop", "sleep"])
def test_ctrl_c_stops_a_decide_that_never_returns(tmp_path, how, threads):
    script = tmp_path / "stuck.py"
    script.write_text(SCRIPT)
    out = tmp_path / "results.json"
    p = subprocess.Popen(
        [sys.executable, str(script), how, str(out), str(threads)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
    )
    try:
        # Wait until the learner is inside decide (its line), then ~1 s more.
        line = p.stdout.readline()
        assert line.strip() == "inside decide", (line, p.stderr.read() if p.poll() is not None else "")
        time.sleep(1.0)
        p.send_signal(signal.SIGINT)
        try:
            rest, err = p.communicate(timeout=60)
        except subprocess.TimeoutExpired:
            pytest.fail(f"decide ({how}) was not interrupted within 60 s of SIGINT")
    finally:
        if p.poll() is None:
            p.kill()
            p.wait()
    assert "KeyboardInterrupt" in rest, (rest, err)
    assert "finished" not in rest
    assert err.rstrip().endswith("KeyboardInterrupt"), err
    assert p.returncode != 0
    assert not out.exists()
    assert not any(tmp_path.glob("results.json*"))


class Where:
    """Records the thread each call of it runs on."""

    seen = set()

    def __init__(self, intro):
        Where.seen.add(threading.get_ident())
        self.h, self.s = intro["horizon"], intro["states"]

    def decide(self, batch):
        Where.seen.add(threading.get_ident())
        return {"actions": np.zeros((self.h, self.s), dtype=np.int64), "episodes": 7}


def test_learner_classes_are_made_and_called_on_the_calling_thread():
    """What makes the above work: with two runner threads and four runs,
    every construction and every decide runs on the thread that called
    burnin.run (threading.get_ident, the interpreter's own thread id)."""
    Where.seen = set()
    exp = {
        "format": "burnin-experiment", "version": 1,
        "generator": {"kind": "river", "states": 4, "horizon": 6},
        "episodes": 200, "seeds": 2,
        "learners": [{"guest": "w", "label": "one"}, {"guest": "w", "label": "two"}],
    }
    burnin.run(exp, learners={"w": Where}, threads=2, progress=False)
    assert Where.seen == {threading.get_ident()}
    # And from a thread of the user's own: that thread, not the main one.
    box = {}

    def other():
        Where.seen = set()
        burnin.run(exp, learners={"w": Where}, threads=2, progress=False)
        box["seen"], box["me"] = Where.seen, threading.get_ident()

    t = threading.Thread(target=other)
    t.start()
    t.join()
    assert box["seen"] == {box["me"]} and box["me"] != threading.get_ident()

"""Experiments in process: the same results as the CLI, learners of your
own as classes, faults, figures.

Outside references: the CLI (`burnin run --json`, `burnin plot`, and a
process guest through `--learner`) on the same files; the exact expected
regret of the uniform learner derived here from the model with numpy
(regret of episode k is V*₁(ρ) − V^unif₁(ρ) whatever was observed, so K
episodes cost K·(V* − V^unif): derived by hand from the definition of
expected regret, as tests/learners.rs does in Rust).
"""

import json
import sys

import numpy as np
import pytest

import burnin

SMALL = {
    "format": "burnin-experiment",
    "version": 1,
    "name": "pytest: three built-ins on a small river",
    "generator": {"kind": "river", "states": 4, "horizon": 6},
    "episodes": 600,
    "seeds": 3,
    "seed": 11,
    "checkpoints": 16,
    "learners": [
        {"algorithm": "ucbvi-hoeffding", "bonus_scale": 0.1},
        {"algorithm": "mvp", "bonus_scale": 0.01},
        {"algorithm": "eps-greedy"},
    ],
}


class Uniform:
    """The uniform learner as a class: the probability table once, then
    "keep" (examples/uniform.py as a class)."""

    def __init__(self, intro):
        self.h, self.s, self.a = intro["horizon"], intro["states"], intro["actions"]
        self.batch = 1

    def decide(self, batch):
        if batch["done"] == 0:
            return {"probabilities": np.full((self.h, self.s, self.a), 1 / self.a), "episodes": self.batch}
        assert batch["states"].shape == (self.batch, self.h)
        return {"keep": True, "episodes": self.batch}


class Uniform64(Uniform):
    def __init__(self, intro):
        super().__init__(intro)
        self.batch = 64


def test_results_equal_burnin_run_json(cli, tmp_path):
    f = tmp_path / "e.json"
    f.write_text(json.dumps(SMALL))
    want = cli("run", "--json", "--threads", "2", str(f)).stdout
    got = burnin.run(f, threads=1, progress=False)
    assert got.to_json() == want
    assert burnin.run(SMALL, progress=False).to_json() == want
    assert burnin.run(json.dumps(SMALL), threads=3, progress=False).to_json() == want
    # Loading and saving keep the bytes.
    got.save(tmp_path / "r.json")
    assert (tmp_path / "r.json").read_text() == want
    assert burnin.Results.load(tmp_path / "r.json").to_json() == want


def test_a_class_and_the_same_learner_as_a_process_give_the_same_results(cli, repo, tmp_path):
    exp = dict(SMALL, learners=[{"guest": "unif"}, {"algorithm": "uniform"}], episodes=300)
    f = tmp_path / "e.json"
    f.write_text(json.dumps(exp))
    proc = f"{sys.executable} {repo / 'examples' / 'uniform.py'} 64"
    want = cli("run", "--json", str(f), "--learner", f"unif={proc}").stdout
    got = burnin.run(f, learners={"unif": Uniform64}, progress=False)
    assert got.to_json() == want


def test_uniform_class_pays_exactly_k_times_the_value_gap():
    model = burnin.generate.random(states=5, actions=3, successors=2, horizon=4, seed=2)
    P, R, rho = model.P, model.mean_rewards, model.start
    H, S, A, _ = P.shape
    v_star = np.zeros(S)
    v_unif = np.zeros(S)
    for h in reversed(range(H)):
        v_star = (R[h] + P[h] @ v_star).max(axis=1)
        v_unif = (R[h] + P[h] @ v_unif).mean(axis=1)
    gap = float(rho @ v_star - rho @ v_unif)
    K = 500
    exp = {"format": "burnin-experiment", "version": 1, "model": model, "episodes": K, "seeds": 2, "learners": [{"guest": "u", "label": "uniform class"}]}
    res = burnin.run(exp, learners={"u": Uniform}, progress=False)
    c = res.curves["uniform class"]
    assert c.episodes[-1] == K and c.seeds.shape == (2, len(c.episodes))
    np.testing.assert_allclose(c.seeds[:, -1], K * gap, rtol=1e-12)
    np.testing.assert_allclose(c.mean, c.episodes * gap, rtol=1e-12)


class Raises:
    def __init__(self, intro):
        self.seed_index = intro["seed_index"]

    def decide(self, batch):
        if batch["done"] >= 5 and self.seed_index == 1:
            raise ZeroDivisionError("my bug")
        return {"actions": np.zeros((6, 4), dtype=np.int64)}


class BadAnswer:
    def __init__(self, intro):
        pass

    def decide(self, batch):
        return {"actions": [[9] * 4] * 6}


def test_a_learners_exception_names_the_learner_seed_and_episode():
    exp = dict(SMALL, learners=[{"guest": "r", "label": "mine"}], episodes=50)
    with pytest.raises(burnin.LearnerError) as e:
        burnin.run(exp, learners={"r": Raises}, progress=False)
    assert (e.value.learner, e.value.seed, e.value.episode) == ("mine", 1, 6)
    assert "ZeroDivisionError: my bug" in e.value.message and "test_runs.py" in e.value.message
    assert str(e.value).startswith('learner "mine", seed 1, episode 6: decide raised ZeroDivisionError: my bug')
    with pytest.raises(burnin.LearnerError) as e:
        burnin.run(exp, learners={"r": BadAnswer}, progress=False)
    assert e.value.message == 'answer 1: "actions"[0][0] must be an action 0 … 1, found 9'
    with pytest.raises(ValueError, match="learners\\[0\\] is the guest learner \"r\""):
        burnin.run(exp, progress=False)


def test_bad_experiments_raise_the_clis_problems(cli, tmp_path):
    bad = dict(SMALL, episodes=0, seeds="many")
    f = tmp_path / "bad.json"
    f.write_text(json.dumps(bad))
    want = cli("run", str(f), check=False)
    assert want.returncode == 1
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.run(bad, progress=False)
    assert e.value.lines() == want.stderr.strip().splitlines()


def test_figures_are_burnin_plots_bytes(cli, tmp_path):
    f = tmp_path / "e.json"
    f.write_text(json.dumps(SMALL))
    res = burnin.run(f, progress=False)
    (tmp_path / "r.json").write_text(res.to_json())
    for args, kw in [((), {}), (("--log", "--bounds"), {"log": True, "bounds": True}), (("--view", "episode", "--no-bands"), {"view": "episode", "bands": False})]:
        cli("plot", str(tmp_path / "r.json"), "-o", str(tmp_path / "f.svg"), *args)
        assert res.figure(**kw) == (tmp_path / "f.svg").read_text(), args
    cli("plot", str(tmp_path / "r.json"), "-o", str(tmp_path / "f.png"), "--log")
    assert res.figure(log=True, format="png") == (tmp_path / "f.png").read_bytes()
    assert res._repr_svg_().startswith("<svg")
    cli("table", str(tmp_path / "r.json"), "--format", "latex", "-o", str(tmp_path / "t.tex"))
    assert res.table("latex") == (tmp_path / "t.tex").read_text()
    with pytest.raises(ValueError, match="view=\"sideways\": expected one of cumulative"):
        res.figure(view="sideways")


def test_progress_is_reported_to_a_callable():
    seen = []
    burnin.run(SMALL, progress=lambda d, t: seen.append((d, t)), threads=1)
    assert seen and seen[-1] == (3 * 3 * 600, 3 * 3 * 600)
    assert all(a[0] <= b[0] for a, b in zip(seen, seen[1:]))


def test_to_pandas_is_the_seeds_csv(cli, tmp_path):
    pd = pytest.importorskip("pandas", reason="to_pandas needs pandas")
    f = tmp_path / "e.json"
    f.write_text(json.dumps(SMALL))
    cli("run", str(f), "--seeds-csv", str(tmp_path / "s.csv"))
    want = pd.read_csv(tmp_path / "s.csv")
    got = burnin.run(f, progress=False).to_pandas()
    assert len(got) == len(want)
    np.testing.assert_array_equal(got["regret"].to_numpy(), want["regret"].to_numpy())
    assert list(got["learner"]) == list(want["learner"])


def test_an_interrupt_stops_the_run_and_is_raised_again():
    """Ctrl-C (SIGINT, what the notebook's stop button sends the kernel)
    during a run of 10⁹ episodes: the core's runner is cancelled and the
    KeyboardInterrupt reaches the caller, with no results."""
    import os
    import signal
    import threading

    exp = dict(SMALL, episodes=10**9, seeds=2, learners=[{"algorithm": "uniform"}])
    timer = threading.Timer(0.5, lambda: os.kill(os.getpid(), signal.SIGINT))
    timer.start()
    try:
        with pytest.raises(KeyboardInterrupt):
            burnin.run(exp, progress=False)
    finally:
        timer.cancel()


def test_progress_true_shows_a_bar_or_lines_on_standard_error(capfd):
    """With tqdm installed its bar, else a line per tenth: both on standard
    error, both reaching 100 %."""
    burnin.run(SMALL, progress=True)
    err = capfd.readouterr().err
    assert "burnin" in err and "100%" in err


class BrokenConstructor:
    def __init__(self, intro):
        raise KeyError("states_count")


def test_a_constructors_exception_names_the_first_episode():
    exp = dict(SMALL, learners=[{"algorithm": "uniform"}, {"guest": "b", "label": "broken"}], episodes=20)
    with pytest.raises(burnin.LearnerError) as e:
        burnin.run(exp, learners={"b": BrokenConstructor}, progress=False)
    assert (e.value.learner, e.value.episode) == ("broken", 1)
    assert e.value.message.startswith("its class raised KeyError: 'states_count' (at ")

"""A sweep's results in the package: the same file as the CLI, its
readings as numpy arrays and a data frame, each point's own results, and
the sweep views of the chart.

Outside references: the CLI on the same experiment file — `burnin run
--json` (the bytes, and the values the arrays must hold, read from that
JSON by Python's own parser), `burnin run --csv` (the sweep's rows:
learner, algorithm, swept value, regret at K and its interval) and
`burnin plot --view …` (the SVG and PNG bytes).
"""

import json
import math

import numpy as np
import pytest

import burnin

# Bandits with 2 to 8 arms: small enough for a test, and the learners
# settle at some points and not at others, so the arrays carry both
# numbers and the file's nulls (NaN); the size changes, so the sweep has
# scaling readings (in A) and every sweep view.
SWEEP = {
    "format": "burnin-experiment",
    "version": 1,
    "name": "pytest: a sweep over the arms of a bandit",
    "generator": {"kind": "bandit", "arms": 2},
    "episodes": 3000,
    "seeds": 4,
    "seed": 5,
    "checkpoints": 20,
    "learners": [
        {"algorithm": "ucbvi-hoeffding", "bonus_scale": 0.1},
        {"algorithm": "mvp", "bonus_scale": 0.01, "label": "MVP small"},
        {"algorithm": "uniform"},
    ],
    "sweep": {"parameter": "arms", "values": [2, 3, 5, 8]},
}

VIEWS = ["sweep", "sweep-slope", "sweep-burn-in", "sweep-scaling", "sweep-regret-scaling"]


@pytest.fixture(scope="module")
def ran(cli, tmp_path_factory):
    """The sweep run by the CLI and by the package: (experiment file, CLI
    stdout, package results)."""
    d = tmp_path_factory.mktemp("sweep")
    f = d / "sweep.json"
    f.write_text(json.dumps(SWEEP))
    want = cli("run", "--json", "--threads", "2", str(f)).stdout
    got = burnin.run(f, threads=1, progress=False)
    return f, want, got


def nan_for_null(xs):
    return np.array([math.nan if x is None else x for x in xs], dtype=float)


def test_a_sweeps_results_are_burnin_run_json(ran):
    _, want, got = ran
    assert got.to_json() == want
    assert got.is_sweep and not burnin.Results(got.points[0].to_json()).is_sweep
    assert repr(got) == "<burnin.Results burnin-sweep over arms = 2, 3, 5, 8: ucbvi-hoeffding ×0.1, MVP small, uniform>"


def test_the_arrays_hold_the_jsons_values(ran):
    _, want, got = ran
    j = json.loads(want)
    sw = got.sweep
    assert sw.parameter == "arms" and sw.scaling_in == j["scaling_in"] == "A"
    np.testing.assert_array_equal(sw.values, j["values"])
    np.testing.assert_array_equal(sw.scaling_x, j["scaling_x"])
    assert list(sw.learners) == [l["label"] for l in j["learners"]]
    settled = missing = 0
    for li, l in enumerate(j["learners"]):
        c = sw.learners[l["label"]]
        assert c.algorithm == l["algorithm"]
        np.testing.assert_array_equal(c.values, j["values"])
        for k in ("regret_mean", "regret_lo", "regret_hi", "slope", "burn_in"):
            np.testing.assert_array_equal(getattr(c, k), nan_for_null(l[k]), err_msg=k)
        # The intervals of slope and burn-in are each point's own.
        at = [p["learners"][li] for p in j["points"]]
        assert all(p["label"] == l["label"] for p in at)
        for k, end in [("slope_lo", 0), ("slope_hi", 1)]:
            np.testing.assert_array_equal(getattr(c, k), nan_for_null([p["slope_interval"][end] for p in at]))
        for k, end in [("burn_in_lo", 0), ("burn_in_hi", 1)]:
            np.testing.assert_array_equal(getattr(c, k), nan_for_null([(p["burn_in_interval"] or [None, None])[end] for p in at]))
        np.testing.assert_array_equal(c.seeds_linear_at_k, [p["seeds_linear_at_k"] for p in at])
        settled += int(np.isfinite(c.burn_in).sum())
        missing += int(np.isnan(c.burn_in_hi).sum())
        # The scaling reading, field by field.
        s = l["scaling"]
        assert {f: getattr(c.scaling, f) for f in s} == {f: tuple(v) if isinstance(v, list) else v for f, v in s.items()}
    # The sweep was chosen to hold both settled burn-ins and nulls.
    assert settled >= 4 and missing >= 1
    assert np.isnan(sw.learners["uniform"].burn_in).all()
    assert sw.learners["uniform"].scaling.burn_in_exponent is None


def test_each_point_is_its_own_results(ran):
    _, want, got = ran
    j = json.loads(want)
    pts = got.points
    assert len(pts) == len(j["values"])
    for p, jp in zip(pts, j["points"]):
        assert p.to_dict() == jp
        for l in jp["learners"]:
            c = p.curves[l["label"]]
            np.testing.assert_array_equal(c.episodes, l["checkpoints"])
            np.testing.assert_array_equal(c.mean, l["regret_mean"])
            np.testing.assert_array_equal(c.seeds, l["regret_by_seed"])
    with pytest.raises(ValueError, match="each point's are in .points"):
        got.curves
    with pytest.raises(ValueError, match="not of a sweep"):
        pts[0].sweep


def test_to_pandas_is_one_row_per_learner_and_value(cli, ran, tmp_path):
    pd = pytest.importorskip("pandas", reason="to_pandas needs pandas")
    f, want, got = ran
    cli("run", str(f), "--csv", str(tmp_path / "s.csv"))
    csv = pd.read_csv(tmp_path / "s.csv")
    df = got.to_pandas()
    assert list(df.columns) == ["learner", "algorithm", "arms", *burnin.SWEEP_COLUMNS]
    assert len(df) == len(csv) == 3 * 4
    assert list(df["learner"]) == list(csv["learner"])
    assert list(df["algorithm"]) == list(csv["algorithm"])
    for k in ("arms", "regret_mean", "regret_lo", "regret_hi"):
        np.testing.assert_array_equal(df[k].to_numpy(), csv[k].to_numpy(), err_msg=k)
    # The rest of the row is the learner's arrays at that value.
    sw = got.sweep
    row = df[(df["learner"] == "MVP small") & (df["arms"] == 5)].iloc[0]
    i = list(sw.values).index(5)
    for k in burnin.SWEEP_COLUMNS:
        np.testing.assert_equal(row[k], getattr(sw.learners["MVP small"], k)[i])


def test_the_sweep_views_are_burnin_plots_bytes(cli, ran, tmp_path):
    f, want, got = ran
    r = tmp_path / "r.json"
    r.write_text(want)
    for view in VIEWS:
        cli("plot", str(r), "-o", str(tmp_path / "f.svg"), "--view", view)
        assert got.figure(view=view) == (tmp_path / "f.svg").read_text(), view
    cli("plot", str(r), "-o", str(tmp_path / "f.svg"))
    assert got.figure() == (tmp_path / "f.svg").read_text()
    cli("plot", str(r), "-o", str(tmp_path / "f.png"), "--view", "sweep-burn-in")
    assert got.figure(view="sweep-burn-in", format="png") == (tmp_path / "f.png").read_bytes()
    with pytest.raises(ValueError, match="these results have no cumulative view; they have: sweep"):
        got.figure(view="cumulative")

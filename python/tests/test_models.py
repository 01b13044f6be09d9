"""Models from files, dicts and numpy arrays; the exact solution and policy
evaluation as arrays; bad arrays.

Outside references: an independent backward induction written here in numpy
(`numpy_backward_induction`, from the Bellman optimality equation of
Puterman 1994, §4.5), SciPy's LP solver (`scipy.optimize.linprog`, the LP
formulation of the finite-horizon optimality equations, as the Rust tests'
`tests/lp_agreement.rs` uses with microlp), and the CLI (`burnin validate`,
`burnin solve --json`, `burnin generate`) for the same inputs as files.
"""

import json

import numpy as np
import pytest

import burnin


def numpy_backward_induction(P, R, rho):
    """V*, Q* of a finite-horizon MDP by backward induction (Puterman 1994,
    §4.5): Q_h = R_h + P_h·V_{h+1}, V_h = max_a Q_h, V_H = 0."""
    H, S, A, _ = P.shape
    V = np.zeros((H + 1, S))
    Q = np.zeros((H, S, A))
    for h in reversed(range(H)):
        Q[h] = R[h] + P[h] @ V[h + 1]
        V[h] = Q[h].max(axis=1)
    return V, Q, float(rho @ V[0])


def random_model(rng, H, S, A, sparse=True):
    P = rng.random((H, S, A, S))
    if sparse:
        P[P < 0.5] = 0.0
        P[..., 0] += 1e-3  # every row keeps an entry
    P /= P.sum(axis=-1, keepdims=True)
    R = rng.random((H, S, A))
    rho = rng.random(S)
    rho /= rho.sum()
    return P, R, rho


@pytest.mark.parametrize("seed", range(12))
def test_solution_from_arrays_equals_numpy_backward_induction(seed):
    rng = np.random.default_rng(seed)
    H, S, A = rng.integers(1, 7), rng.integers(1, 9), rng.integers(1, 5)
    P, R, rho = random_model(rng, H, S, A)
    m = burnin.Model.from_arrays(P, R, rho)
    sol = m.solve()
    V, Q, opt = numpy_backward_induction(P, R, rho)
    assert sol.v.shape == (H + 1, S) and sol.q.shape == (H, S, A)
    assert sol.policy.shape == (H, S) and sol.gaps.shape == (H, S, A)
    np.testing.assert_allclose(sol.v, V, rtol=0, atol=1e-12)
    np.testing.assert_allclose(sol.q, Q, rtol=0, atol=1e-12)
    assert abs(sol.optimal_value - opt) <= 1e-12
    np.testing.assert_allclose(sol.gaps, np.maximum(V[:-1, :, None] - Q, 0), atol=1e-12)
    # The policy is greedy in Q* (ties within 1e-12 may go either way).
    chosen = np.take_along_axis(Q, sol.policy[..., None], axis=2)[..., 0]
    np.testing.assert_allclose(chosen, V[:-1], atol=1e-12)
    # The arrays come back as given (the model keeps every nonzero entry).
    np.testing.assert_array_equal(m.P, P)
    np.testing.assert_array_equal(m.mean_rewards, R)


def test_stationary_arrays_are_one_table_and_agree_with_numpy():
    rng = np.random.default_rng(7)
    P, R, rho = random_model(rng, 1, 4, 3)
    m = burnin.Model.from_arrays(P[0], R[0], rho, horizon=5)
    assert m.stationary and m.horizon == 5
    V, Q, opt = numpy_backward_induction(np.repeat(P, 5, 0), np.repeat(R, 5, 0), rho)
    np.testing.assert_allclose(m.solve().v, V, atol=1e-12)
    # A stationary kernel with time-dependent rewards: H tables.
    R5 = rng.random((5, 4, 3))
    m2 = burnin.Model.from_arrays(P[0], R5, rho)
    assert not m2.stationary
    V2, _, _ = numpy_backward_induction(np.repeat(P, 5, 0), R5, rho)
    np.testing.assert_allclose(m2.solve().v, V2, atol=1e-12)


def test_solution_agrees_with_scipy_linear_program():
    """The LP of the finite-horizon optimality equations: minimise Σ_h,s V_h(s)
    subject to V_h(s) ≥ R_h(s,a) + Σ_s' P_h(s'|s,a)·V_{h+1}(s') (Puterman 1994,
    §6.9, written for the layered finite-horizon model); its optimum is V*."""
    linprog = pytest.importorskip("scipy.optimize", reason="SciPy gives the LP reference").linprog
    for seed in range(4):
        rng = np.random.default_rng(100 + seed)
        H, S, A = 4, 5, 3
        P, R, rho = random_model(rng, H, S, A)
        n = H * S
        rows, rhs = [], []
        for h in range(H):
            for s in range(S):
                for a in range(A):
                    row = np.zeros(n)
                    row[h * S + s] = -1.0
                    if h + 1 < H:
                        row[(h + 1) * S:(h + 2) * S] += P[h, s, a]
                    rows.append(row)
                    rhs.append(-R[h, s, a])
        lp = linprog(np.ones(n), A_ub=np.array(rows), b_ub=np.array(rhs), bounds=(None, None), method="highs")
        assert lp.status == 0
        sol = burnin.Model.from_arrays(P, R, rho).solve()
        np.testing.assert_allclose(sol.v[:-1].ravel(), lp.x, atol=1e-7)


def test_policy_evaluation_equals_numpy():
    """V^π_h = Σ_a π_h(a|s)(R_h + P_h V^π_{h+1}), derived from the Bellman
    equation (Puterman 1994, §4.2), computed here in numpy."""
    rng = np.random.default_rng(3)
    P, R, rho = random_model(rng, 4, 5, 3)
    m = burnin.Model.from_arrays(P, R, rho)
    pi = rng.random((4, 5, 3))
    pi /= pi.sum(axis=-1, keepdims=True)
    V = np.zeros((5, 5))
    for h in reversed(range(4)):
        V[h] = (pi[h] * (R[h] + P[h] @ V[h + 1])).sum(axis=1)
    ev = m.evaluate(pi)
    np.testing.assert_allclose(ev.v, V, atol=1e-12)
    assert abs(ev.value - rho @ V[0]) <= 1e-12
    acts = rng.integers(0, 3, size=(4, 5))
    Vd = np.zeros((5, 5))
    for h in reversed(range(4)):
        q = R[h] + P[h] @ Vd[h + 1]
        Vd[h] = q[np.arange(5), acts[h]]
    np.testing.assert_allclose(m.evaluate(acts).v, Vd, atol=1e-12)
    with pytest.raises(ValueError, match=r"policy has shape \(5, 4\), expected \(H, S\) = \(4, 5\)"):
        m.evaluate(acts.T)


def dense_file(P, R, rho, reward="bernoulli"):
    """The model file equivalent to the arrays: every next state listed."""
    H, S, A, _ = P.shape
    cell = (lambda x: {"bernoulli": x}) if reward == "bernoulli" else (lambda x: x)
    return {
        "format": "burnin-model",
        "version": 1,
        "name": "arrays",
        "horizon": int(H),
        "states": [f"s{i}" for i in range(S)],
        "actions": [f"a{i}" for i in range(A)],
        "start": list(map(float, rho)),
        "stationary": False,
        "steps": [
            {
                "transitions": [[[[t, float(P[h, s, a, t])] for t in range(S)] for a in range(A)] for s in range(S)],
                "rewards": [[cell(float(R[h, s, a])) for a in range(A)] for s in range(S)],
            }
            for h in range(H)
        ],
    }


def bad_cases():
    rng = np.random.default_rng(5)
    P, R, rho = random_model(rng, 2, 3, 2, sparse=False)
    short = P.copy()
    short[1, 2, 0] *= 0.9  # a row summing to 0.9
    negative = P.copy()
    negative[0, 1, 1] = [1.2, -0.2, 0.0]  # sums to 1, one entry negative
    high = R.copy()
    high[0, 2, 1] = 1.5  # a Bernoulli mean above 1
    low = R.copy()
    low[1, 0, 0] = -0.25
    return [
        ("row not summing to 1", short, R, rho, "bernoulli"),
        ("negative probability", negative, R, rho, "bernoulli"),
        ("Bernoulli mean above 1", P, high, rho, "bernoulli"),
        ("start not summing to 1", P, R, rho * 0.5, "bernoulli"),
        ("fixed reward below 0 (for learners)", P, low, rho, "fixed"),
    ]


@pytest.mark.parametrize("case", bad_cases(), ids=lambda c: c[0])
def test_bad_arrays_raise_the_messages_of_the_same_file(case, cli, tmp_path):
    """The CLI's `burnin validate` (or, for learners' reward range, an
    experiment run) on the equivalent file is the reference."""
    name, P, R, rho, reward = case
    f = tmp_path / "m.json"
    f.write_text(json.dumps(dense_file(P, R, rho, reward)))
    if name.endswith("(for learners)"):
        m = burnin.Model.from_arrays(P, R, rho, reward=reward)
        with pytest.raises(burnin.InvalidInput) as e:
            m.check_learnable()
        exp = tmp_path / "e.json"
        exp.write_text(json.dumps({"format": "burnin-experiment", "version": 1, "model": dense_file(P, R, rho, reward), "episodes": 10, "learners": [{"algorithm": "uniform"}]}))
        out = cli("run", str(exp), check=False)
        want = [l.removeprefix("model.") for l in out.stderr.strip().splitlines()]
    else:
        with pytest.raises(burnin.InvalidInput) as e:
            burnin.Model.from_arrays(P, R, rho, reward=reward)
        out = cli("validate", str(f), check=False)
        want = out.stderr.strip().splitlines()
    assert out.returncode == 1
    assert e.value.lines() == want, name
    assert all(isinstance(p, burnin.Problem) for p in e.value.problems)


def test_nan_and_shapes_are_named_at_their_paths():
    P = np.full((2, 3, 2, 3), 1 / 3)
    R = np.full((2, 3, 2), 0.5)
    nan = P.copy()
    nan[1, 0, 1, 2] = np.nan
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_arrays(nan, R)
    assert e.value.lines() == ["steps[1].transitions[0][1][2][1]: probability NaN is not a number ≥ 0"]
    r_nan = R.copy()
    r_nan[0, 2, 0] = np.nan
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_arrays(P, r_nan)
    assert e.value.lines() == ["steps[0].rewards[2][0].bernoulli: expected a probability in [0, 1], found NaN"]
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_arrays(P[..., :2], R)
    assert e.value.lines() == ["P: expected shape (H, S, A, S) or (S, A, S), found (2, 3, 2, 2)"]
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_arrays(P, R[:, :2])
    assert e.value.lines() == ["rewards: expected shape (H, S, A) = (H, 3, 2) or (S, A) = (3, 2) to match P, found (2, 2, 2)"]
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_arrays(P[0], R[0])
    assert e.value.lines() == ["horizon: P and the rewards are both stationary; give horizon=H"]
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_arrays(P, R, np.ones(2) / 2)
    assert e.value.lines() == ["start: expected shape (S,) = (3,), found (2,)"]


def test_files_and_dicts_read_as_the_cli_solves_them(cli, repo, tmp_path):
    path = repo / "demo-models" / "pearl-reef.json"
    m = burnin.Model.from_file(path)
    assert burnin.Model.from_dict(json.loads(path.read_text())).to_json() == m.to_json()
    assert m.to_json() == cli("canon", str(path)).stdout
    ref = json.loads(cli("solve", "--json", str(path)).stdout)
    sol = m.solve()
    assert sol.optimal_value == ref["optimal_value"]
    np.testing.assert_array_equal(sol.v[: m.horizon], np.array(ref["v"])[: m.horizon])
    np.testing.assert_array_equal(sol.q, np.array(ref["q"]))
    np.testing.assert_array_equal(sol.policy, np.array(ref["policy"]))
    bad = json.loads(path.read_text())
    bad["horizn"] = bad.pop("horizon")
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.Model.from_dict(bad)
    f = tmp_path / "bad.json"
    f.write_text(json.dumps(bad))
    assert e.value.lines() == cli("validate", str(f), check=False).stderr.splitlines()


def test_every_generator_gives_the_clis_model(cli):
    """`burnin generate KIND` with the same options is the reference; the
    functions are built from the catalogue, one per entry."""
    kinds = [g["kind"] for g in burnin.generators()]
    assert sorted(vars(burnin.generate)) == sorted(k.replace("-", "_") for k in kinds)
    for kind in kinds:
        fn = getattr(burnin.generate, kind.replace("-", "_"))
        m = fn(seed=5)
        assert m.to_json() == cli("generate", kind, "--seed", "5").stdout, kind
    m = burnin.generate.random(states=6, actions=3, successors=2, seed=9)
    assert m.to_json() == cli("generate", "random", "--states", "6", "--actions", "3", "--successors", "2", "--seed", "9").stdout
    with pytest.raises(burnin.InvalidInput) as e:
        burnin.generate.random(states=0)
    assert e.value.lines() == ["random.states: 0 is outside 1..=100000"]
    with pytest.raises(TypeError):
        burnin.generate.random(colours=3)

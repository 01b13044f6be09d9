"""Burnin in process: exact regret and burn-in of exploration algorithms on
finite-horizon tabular MDPs, from the same Rust core as the ``burnin`` CLI
and the page, with the same numbers bit for bit.

- :class:`Model` — from a file, JSON text, a dict or numpy arrays (checked by
  the core; problems raised as one :class:`InvalidInput` carrying the
  ``path: message`` list), or from a generator of the catalogue
  (``burnin.generate.random(states=20, …)``); solved exactly
  (:meth:`Model.solve`) and policies evaluated exactly
  (:meth:`Model.evaluate`).
- :func:`run` — an experiment (a dict, JSON text or file) run in this
  process with the built-in learners and learners of yours written as
  Python classes (the guest contract: see :func:`run`); returns
  :class:`Results`, the same JSON as ``burnin run --json``, with numpy
  curves, a data frame and the core's chart.

Steps are numbered 0 … H−1 in arrays (the CLI shows them as 1 … H).
"""

from __future__ import annotations

import json
import os
import sys
import types
from dataclasses import dataclass
from inspect import Parameter, Signature
from pathlib import Path
from typing import Any, Callable, Dict, List, Mapping, Optional, Sequence, Tuple, Union

import numpy as np

from . import _burnin
from ._errors import InvalidInput, LearnerError, Problem

__all__ = [
    "BUILD",
    "InvalidInput",
    "LearnerError",
    "Problem",
    "Model",
    "Solution",
    "Evaluation",
    "Results",
    "Curve",
    "Sweep",
    "SweepCurve",
    "Scaling",
    "SWEEP_COLUMNS",
    "run",
    "generate",
    "generators",
    "algorithms",
]

#: This build: the version and a digest of the core's source, as
#: ``burnin --version`` and every results file (``"build"``) name it.
BUILD: str = _burnin.BUILD
__version__ = BUILD.split("+")[0]

PathLike = Union[str, "os.PathLike[str]"]


@dataclass(frozen=True)
class Solution:
    """The exact solution of a model (backward induction, the core's solver).

    ``v``: V*_h(s), shape (H+1, S), row H zero. ``q``: Q*_h(s, a), shape
    (H, S, A). ``policy``: an optimal action per (h, s), shape (H, S), int64
    (ties go to the lowest action index). ``gaps``: Δ_h(s, a) = V*_h(s) −
    Q*_h(s, a) ≥ 0, shape (H, S, A). ``optimal_value``: Σ_s ρ(s)·V*_0(s).
    """

    optimal_value: float
    v: np.ndarray
    q: np.ndarray
    policy: np.ndarray
    gaps: np.ndarray


@dataclass(frozen=True)
class Evaluation:
    """A policy's exact values: ``v`` of shape (H+1, S) (row H zero) and
    ``value`` = Σ_s ρ(s)·V^π_0(s)."""

    value: float
    v: np.ndarray


class Model:
    """A finite-horizon tabular MDP, checked by the core.

    Make one with :meth:`from_file`, :meth:`from_json`, :meth:`from_dict`,
    :meth:`from_arrays` or a function of :data:`generate`.
    """

    __slots__ = ("_m",)

    def __init__(self, native: "_burnin.Mdp"):
        self._m = native

    # --- making models -------------------------------------------------
    @classmethod
    def from_json(cls, text: str) -> "Model":
        """A model file's text (burnin-model v1, docs/formats.md)."""
        return cls(_burnin.model_from_json(text))

    @classmethod
    def from_file(cls, path: PathLike) -> "Model":
        """Reads a model file (burnin-model v1)."""
        return cls.from_json(Path(path).read_text(encoding="utf-8"))

    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> "Model":
        """A model file's content as a dict (``json.load`` of a file)."""
        return cls.from_json(json.dumps(d))

    @classmethod
    def from_arrays(
        cls,
        P: Any,
        rewards: Any,
        start: Any = 0,
        *,
        reward: str = "bernoulli",
        horizon: Optional[int] = None,
        name: str = "arrays",
        states: Optional[Sequence[str]] = None,
        actions: Optional[Sequence[str]] = None,
        discount: Optional[float] = None,
    ) -> "Model":
        """A model from dense arrays.

        ``P``: P_h(s' | s, a), shape (H, S, A, S), or (S, A, S) for the same
        kernel at every step. ``rewards``: mean rewards r̄_h(s, a), shape
        (H, S, A) or (S, A). ``reward``: ``"bernoulli"`` (a reward of 1 with
        probability r̄, else 0: means in [0, 1]) or ``"fixed"`` (always r̄).
        ``start``: a distribution of shape (S,), or a state index (default
        state 0). ``horizon``: H, needed only when both arrays are
        stationary. ``states``/``actions``: labels (default s0…, a0…).

        The arrays get the file format's checks: each entry P[h, s, a, s']
        is checked as the entry ``[s', p]`` of row ``steps[h].transitions[s][a]``
        of a file listing every next state, so a bad entry raises
        :class:`InvalidInput` with the ``path: message`` a file would get
        (e.g. ``steps[0].transitions[1][0]: probabilities sum to 0.9000,
        expected 1``); shapes are checked first (paths ``P``, ``rewards``,
        ``start``, ``horizon``).
        """
        P = np.ascontiguousarray(P, dtype=np.float64)
        R = np.ascontiguousarray(rewards, dtype=np.float64)
        if np.ndim(start) == 0 and not isinstance(start, float):
            s_n = P.shape[-1] if P.ndim >= 1 else 0
            k = int(start)
            if not 0 <= k < s_n:
                raise InvalidInput([("start", f"state index {k} is out of range (S = {s_n})")])
            rho = np.zeros(s_n)
            rho[k] = 1.0
        else:
            rho = np.ascontiguousarray(start, dtype=np.float64)
        return cls(
            _burnin.model_from_arrays(
                P,
                R,
                rho,
                reward,
                horizon,
                name,
                None if states is None else [str(s) for s in states],
                None if actions is None else [str(a) for a in actions],
                discount,
            )
        )

    # --- writing -------------------------------------------------------
    def to_json(self) -> str:
        """The canonical file text (what ``burnin canon`` writes)."""
        return self._m.to_json()

    def to_dict(self) -> Dict[str, Any]:
        """The canonical file content as a dict."""
        return json.loads(self.to_json())

    def save(self, path: PathLike) -> None:
        """Writes the canonical file."""
        Path(path).write_text(self.to_json(), encoding="utf-8")

    # --- facts ---------------------------------------------------------
    @property
    def name(self) -> str:
        return self._m.name

    @property
    def horizon(self) -> int:
        """H."""
        return self._m.horizon

    @property
    def states(self) -> list:
        """State labels (S of them)."""
        return self._m.states

    @property
    def actions(self) -> list:
        """Action labels (A of them)."""
        return self._m.actions

    @property
    def n_states(self) -> int:
        return len(self._m.states)

    @property
    def n_actions(self) -> int:
        return len(self._m.actions)

    @property
    def stationary(self) -> bool:
        """Whether one table serves every step."""
        return self._m.stationary

    @property
    def discount(self) -> float:
        """γ (1 when none is given)."""
        return self._m.discount

    @property
    def start(self) -> np.ndarray:
        """ρ, shape (S,)."""
        return self._m.start

    @property
    def P(self) -> np.ndarray:
        """P_h(s' | s, a), dense, shape (H, S, A, S)."""
        return self._m.transitions()

    @property
    def mean_rewards(self) -> np.ndarray:
        """r̄_h(s, a), shape (H, S, A)."""
        return self._m.mean_rewards()

    # --- solving -------------------------------------------------------
    def solve(self) -> Solution:
        """The exact solution (V*, Q*, an optimal policy, the gaps)."""
        d = self._m.solve()
        return Solution(**d)

    def evaluate(self, policy: Any) -> Evaluation:
        """Exact values of a Markov policy: an integer array of actions of
        shape (H, S), or action probabilities of shape (H, S, A)."""
        p = np.asarray(policy)
        if p.dtype.kind in "iub":
            v, value = self._m.evaluate_actions(np.ascontiguousarray(p, dtype=np.int64))
        else:
            v, value = self._m.evaluate_probabilities(np.ascontiguousarray(p, dtype=np.float64))
        return Evaluation(value=value, v=v)

    def check_learnable(self) -> None:
        """Raises :class:`InvalidInput` when learners cannot run on this
        model (a discount below 1, or rewards outside [0, 1])."""
        self._m.check_learnable()

    def __repr__(self) -> str:
        return repr(self._m)


# --- the catalogues ----------------------------------------------------


def generators() -> list:
    """The catalogue of generators (kind, name, source, parameters with
    type, default, range and help), as the CLI and the page list it."""
    return json.loads(_burnin.generator_catalogue())


def algorithms() -> dict:
    """The catalogue of algorithms and the glossary, as the page gets it."""
    return json.loads(_burnin.algorithm_catalogue())


def _generator_function(info: dict) -> Callable[..., Model]:
    kind = info["kind"]
    params = []
    lines = [info["about"], "", f"Source: {info['source']}.", "", "Keyword arguments:"]
    for p in info["params"]:
        if p["kind"] in ("optional-whole", "numbers"):
            default: Any = None
        elif p["kind"] == "flag":
            default = bool(p["default"])
        elif p["kind"] == "whole":
            default = int(p["default"])
        else:
            default = p["default"]
        params.append(Parameter(p["name"], Parameter.KEYWORD_ONLY, default=default))
        lo, hi = p["min"], p["max"]
        rng = "" if p["kind"] == "flag" else f" [{lo:g} … {'∞' if hi is None else format(hi, 'g')}]"
        lines.append(f"    {p['name']} ({p['kind']}, default {default}){rng}: {p['help']}")
    params.append(Parameter("seed", Parameter.KEYWORD_ONLY, default=1))
    lines.append(
        "    seed (whole, default 1): the generator's seed"
        + ("" if info["seeded"] else " (this kind does not use it)")
    )
    sig = Signature(params, return_annotation=Model)

    def make(**kwargs: Any) -> Model:
        bound = sig.bind(**kwargs)
        spec: Dict[str, Any] = {"kind": kind}
        for k, v in bound.arguments.items():
            if v is not None:
                spec[k] = v.tolist() if hasattr(v, "tolist") else v
        return Model(_burnin.model_from_generator(json.dumps(spec)))

    make.__name__ = make.__qualname__ = kind.replace("-", "_")
    make.__doc__ = "\n".join(lines)
    make.__signature__ = sig  # type: ignore[attr-defined]
    return make


#: One function per generator of the core's catalogue, named by its kind
#: (dashes as underscores): ``generate.random(states=20, actions=4,
#: seed=7)``, ``generate.lower_bound(…)``. Parameters out of range raise
#: :class:`InvalidInput` at ``kind.parameter``.
generate = types.SimpleNamespace(
    **{f.__name__: f for f in (_generator_function(g) for g in generators())}
)


# --- experiments and results -------------------------------------------


@dataclass(frozen=True)
class Curve:
    """One learner's regret curve at the checkpoints: ``episodes`` (C,),
    ``mean`` with its 95% interval ``lo``/``hi`` (C,), and every seed's
    cumulative regret ``seeds`` (n, C)."""

    episodes: np.ndarray
    mean: np.ndarray
    lo: np.ndarray
    hi: np.ndarray
    seeds: np.ndarray


@dataclass(frozen=True)
class Scaling:
    """How one learner's burn-in and regret at K grow with the size a sweep
    changes (``Sweep.scaling_in``: S, A, H, K or the swept parameter), as
    power laws fitted on log–log axes, beside the published bound's
    exponents on the same points (the ``sweep-scaling`` and
    ``sweep-regret-scaling`` views). Intervals are 95% bootstrap intervals
    over seeds, ``(lo, hi)``; None where the results file has null."""

    burn_in_exponent: Optional[float]
    burn_in_exponent_interval: Optional[Tuple[float, float]]
    settled_points: int
    points: int
    regret_exponent: Optional[float]
    regret_exponent_interval: Optional[Tuple[float, float]]
    published_burn_in_exponent: Optional[float]
    published_regret_exponent: Optional[float]
    published_applies: bool
    published_no_burn_in: bool
    published_regret_trivial: bool

    @classmethod
    def _from_json(cls, text: Optional[str]) -> Optional["Scaling"]:
        if text is None:
            return None
        d = json.loads(text)
        for k in ("burn_in_exponent_interval", "regret_exponent_interval"):
            if d.get(k) is not None:
                d[k] = tuple(d[k])
        return cls(**{f: d.get(f) for f in cls.__dataclass_fields__})


@dataclass(frozen=True)
class SweepCurve:
    """One learner's readings at each point of a sweep, arrays of shape
    (P,) in the order of ``values`` (the swept values). NaN stands where
    the results file has null: an interval with one seed, a slope with no
    positive regret, a burn-in (or an end of its interval) not settled by
    K.

    ``regret_mean`` with its 95% interval ``regret_lo``/``regret_hi``:
    regret at K. ``slope`` (the tail slope of ln regret on ln k) and
    ``burn_in`` (episodes), each with its 95% bootstrap interval over
    seeds (``slope_lo``/``slope_hi``, ``burn_in_lo``/``burn_in_hi``).
    ``seeds_linear_at_k``: seeds still growing linearly at K.
    ``scaling``: the learner's :class:`Scaling` reading (None when the
    sweep changes no size read on log axes)."""

    algorithm: str
    values: np.ndarray
    regret_mean: np.ndarray
    regret_lo: np.ndarray
    regret_hi: np.ndarray
    slope: np.ndarray
    slope_lo: np.ndarray
    slope_hi: np.ndarray
    burn_in: np.ndarray
    burn_in_lo: np.ndarray
    burn_in_hi: np.ndarray
    seeds_linear_at_k: np.ndarray
    scaling: Optional[Scaling]


@dataclass(frozen=True)
class Sweep:
    """A sweep's readings against the swept value: ``parameter`` (its
    name), ``values`` (P,), ``scaling_in`` (what the scaling exponents are
    in: "S", "A", "H", "K" or the parameter; None without scaling readings)
    and ``scaling_x`` (that size at each point, (P,), or None), and
    ``learners``: each learner's :class:`SweepCurve` by label."""

    parameter: str
    values: np.ndarray
    scaling_in: Optional[str]
    scaling_x: Optional[np.ndarray]
    learners: Dict[str, SweepCurve]


#: The columns of ``Results.to_pandas()`` for a sweep, after ``learner``,
#: ``algorithm`` and the swept parameter's own name.
SWEEP_COLUMNS = (
    "regret_mean",
    "regret_lo",
    "regret_hi",
    "slope",
    "slope_lo",
    "slope_hi",
    "burn_in",
    "burn_in_lo",
    "burn_in_hi",
    "seeds_linear_at_k",
)


class Results:
    """The results of a run: the same object as the results file
    (``burnin run --json``), with numpy curves, a data frame and the
    core's chart. For a sweep (``is_sweep``): its readings against the
    swept value as arrays (:attr:`sweep`), each point's own results
    (:attr:`points`), a data frame of the readings and the sweep views."""

    __slots__ = ("_text", "_dict", "_sweep")

    def __init__(self, text: str):
        self._text = text
        self._dict: Optional[dict] = None
        self._sweep: Optional[dict] = None

    @classmethod
    def from_json(cls, text: str) -> "Results":
        """Reads a results or sweep file's text (checked by the core)."""
        return cls(_burnin.read_results(text))

    @classmethod
    def load(cls, path: PathLike) -> "Results":
        """Reads a results file (as ``burnin run --json`` writes it)."""
        return cls.from_json(Path(path).read_text(encoding="utf-8"))

    def to_json(self) -> str:
        """The results file's text, byte for byte what ``burnin run --json`` prints."""
        return self._text

    def save(self, path: PathLike) -> None:
        """Writes the results file (whole: to a temporary file, then renamed)."""
        path = Path(path)
        tmp = path.with_name(path.name + ".part")
        tmp.write_text(self._text, encoding="utf-8")
        os.replace(tmp, path)

    def to_dict(self) -> dict:
        """The results file's content."""
        if self._dict is None:
            self._dict = json.loads(self._text)
        return self._dict

    @property
    def is_sweep(self) -> bool:
        """Whether these are a sweep's results (``burnin-sweep``)."""
        return self.to_dict().get("format") == "burnin-sweep"

    @property
    def curves(self) -> Dict[str, Curve]:
        """Each learner's :class:`Curve`, by label (for a sweep, each
        point's are in ``points[i].curves``)."""
        return {k: Curve(**v) for k, v in _burnin.curves(self._text).items()}

    def _sweep_native(self) -> dict:
        if self._sweep is None:
            self._sweep = _burnin.sweep(self._text)
        return self._sweep

    @property
    def sweep(self) -> Sweep:
        """A sweep's readings against the swept value as numpy arrays
        (:class:`Sweep`); ValueError for the results of one experiment."""
        d = self._sweep_native()
        learners = {}
        for label, c in d["learners"].items():
            c = dict(c)
            c["scaling"] = Scaling._from_json(c["scaling"])
            learners[label] = SweepCurve(**c)
        return Sweep(d["parameter"], d["values"], d["scaling_in"], d["scaling_x"], learners)

    @property
    def points(self) -> List["Results"]:
        """A sweep's points, each as the :class:`Results` of its own
        experiment (curves, data frame, charts), in the order of
        ``sweep.values``; ValueError for the results of one experiment."""
        return [Results(t) for t in self._sweep_native()["points"]]

    def to_pandas(self):
        """A long data frame. Needs pandas.

        Results of one experiment: one row per (learner, seed, checkpoint),
        columns ``learner``, ``algorithm``, ``seed_index``, ``episode``,
        ``regret`` (the rows of ``burnin run --seeds-csv``).

        A sweep: one row per (learner, swept value), learner by learner in
        the experiment's order: ``learner``, ``algorithm``, the swept
        value in a column named by the parameter (``states``, ``delta``,
        …; the rows of ``burnin run --csv`` up to ``regret_hi``), then
        ``regret_mean``, ``regret_lo``, ``regret_hi`` (regret at K and its
        95% interval), ``slope``, ``slope_lo``, ``slope_hi``, ``burn_in``,
        ``burn_in_lo``, ``burn_in_hi`` (with their bootstrap intervals),
        ``seeds_linear_at_k``; floats, NaN where the file has null (see
        :class:`SweepCurve`)."""
        import pandas as pd

        if self.is_sweep:
            sw = self.sweep
            cols: Dict[str, Any] = {"learner": [], "algorithm": [], sw.parameter: []}
            for c in SWEEP_COLUMNS:
                cols[c] = []
            for label, c in sw.learners.items():
                n = len(c.values)
                cols["learner"] += [label] * n
                cols["algorithm"] += [c.algorithm] * n
                cols[sw.parameter].append(c.values)
                for k in SWEEP_COLUMNS:
                    cols[k].append(getattr(c, k))
            for k in (sw.parameter, *SWEEP_COLUMNS):
                cols[k] = np.concatenate(cols[k]) if cols[k] else np.zeros(0)
            return pd.DataFrame(cols)
        d = self.to_dict()
        rows = []
        for l in d.get("learners", []):
            for j, curve in enumerate(l.get("regret_by_seed", [])):
                for k, x in zip(l["checkpoints"], curve):
                    rows.append((l["label"], l["algorithm"], j, k, x))
        return pd.DataFrame(rows, columns=["learner", "algorithm", "seed_index", "episode", "regret"])

    def figure(
        self,
        view: Optional[str] = None,
        log: bool = False,
        *,
        bands: bool = True,
        lower: bool = False,
        bounds: bool = False,
        compare: Optional[Sequence[str]] = None,
        caption: bool = True,
        width: int = 1280,
        height: int = 720,
        type_scale: float = 1.25,
        format: str = "svg",
    ) -> Union[str, bytes]:
        """The core's chart, byte for byte what ``burnin plot`` writes with
        the same options: SVG text, or PNG bytes with ``format="png"``.
        ``view``: cumulative, episode, difference (results of one
        experiment); sweep (regret at K against the swept value),
        sweep-slope, sweep-burn-in, sweep-scaling, sweep-regret-scaling (a
        sweep; the scaling views when the sweep changes a size). Default:
        the first the results have."""
        if format not in ("svg", "png"):
            raise ValueError(f"format={format!r}: expected 'svg' or 'png'")
        return _burnin.figure(
            self._text,
            view,
            log,
            bands,
            lower,
            bounds,
            None if compare is None else tuple(compare),
            caption,
            width,
            height,
            type_scale,
            format == "png",
        )

    def table(self, format: str = "markdown") -> str:
        """The comparison table (``burnin table``): markdown, latex or csv."""
        return _burnin.table(self._text, format)

    def _repr_svg_(self) -> str:
        return self.figure(width=960, height=540)

    def __repr__(self) -> str:
        d = self.to_dict()
        labels = [l["label"] for l in d.get("learners", [])]
        over = ""
        if d.get("format") == "burnin-sweep":
            over = f" over {d.get('parameter')} = {', '.join(format(v, 'g') for v in d.get('values', []))}"
        return f"<burnin.Results {d.get('format')}{over}: {', '.join(labels)}>"


class _TextProgress:
    """A line per tenth on standard error, when tqdm is not installed."""

    def __init__(self) -> None:
        self.shown = -1

    def __call__(self, done: int, total: int) -> None:
        tenth = 10 * done // max(total, 1)
        if tenth != self.shown:
            self.shown = tenth
            print(f"burnin: {10 * tenth}% ({done} of {total} episodes)", file=sys.stderr, flush=True)


class _TqdmProgress:
    def __init__(self, tqdm: Any) -> None:
        self.tqdm = tqdm
        self.bar: Any = None

    def __call__(self, done: int, total: int) -> None:
        if self.bar is None:
            self.bar = self.tqdm(total=total, unit="ep", unit_scale=True, desc="burnin")
        self.bar.update(done - self.bar.n)

    def close(self) -> None:
        if self.bar is not None:
            self.bar.close()


def _progress(progress: Any) -> Any:
    if progress is False or progress is None:
        return None
    if callable(progress):
        return progress
    try:
        from tqdm.auto import tqdm
    except ImportError:
        return _TextProgress()
    return _TqdmProgress(tqdm)


def run(
    experiment: Union[Mapping[str, Any], str, "os.PathLike[str]"],
    *,
    learners: Optional[Mapping[str, type]] = None,
    threads: Optional[int] = None,
    progress: Union[bool, Callable[[int, int], None], None] = True,
    budget_minutes: Optional[float] = None,
) -> Results:
    """Runs an experiment in this process and returns its :class:`Results`.

    ``experiment``: a dict (an experiment file's content; its ``"model"``
    may be a :class:`Model`), an experiment file's JSON text, or a path
    (``model_path`` is then read beside the file; otherwise beside the
    working directory). The core checks it (:class:`InvalidInput`).

    ``learners``: your learners, by the guest name the experiment gives
    them (``{"guest": "optimist"}``), each a class following the guest
    contract (docs/formats.md): ``cls(intro)`` is called at the start of
    each run with the introduction (a dict: ``states``, ``actions``,
    ``horizon``, ``episodes``, ``delta``, ``seed``, ``state_labels``,
    ``action_labels``, ``label``, ``seed_index``), then ``decide(batch)``
    before each batch of episodes. ``batch`` is a dict with ``done`` (the
    episodes finished so far) and numpy arrays of shape (episodes, H):
    ``states``, ``actions``, ``rewards``, ``next_states`` (empty before the
    first batch). It returns the protocol's answer as a dict:
    ``{"actions": (H, S) ints}``, ``{"probabilities": (H, S, A)}`` or
    ``{"keep": True}``, each with an optional ``"episodes": n`` (default 1).
    An exception, or an answer the contract refuses, stops the run with a
    :class:`LearnerError` naming the learner, seed and episode.

    ``threads``: runs in parallel (default: the machine's cores); the
    results do not depend on it. ``progress``: True (tqdm when installed,
    else a line per tenth on standard error), False, or a callable
    ``(done, total)``. ``budget_minutes``: refuse a run estimated longer
    (default: no estimate). The core runs on threads of its own with the GIL
    released; your classes are made and called from the thread that called
    ``run``, one call at a time. Ctrl-C or the notebook's stop button stops
    the run and raises KeyboardInterrupt, with nothing written, even while
    your ``decide`` is inside a loop that never ends or a ``time.sleep``
    (when ``run`` is called from the main thread, where Python handles
    signals).
    """
    base: Optional[str] = None
    if isinstance(experiment, Mapping):
        d = dict(experiment)
        if isinstance(d.get("model"), Model):
            d["model"] = d["model"].to_dict()
        text = json.dumps(d)
        base = os.getcwd()
    elif isinstance(experiment, str) and experiment.lstrip().startswith("{"):
        text = experiment
        base = os.getcwd()
    else:
        path = Path(experiment)
        text = path.read_text(encoding="utf-8")
        base = str(path.parent)
    shown = _progress(progress)
    try:
        out, warnings = _burnin.run_experiment(
            text, base, dict(learners or {}), threads, shown, budget_minutes
        )
    finally:
        if hasattr(shown, "close"):
            shown.close()
    if warnings:
        import warnings as w

        for m in warnings:
            w.warn(m, stacklevel=2)
    return Results(out)

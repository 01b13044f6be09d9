# Type stubs of the burnin package (python/pysrc/burnin/__init__.py).
# The generator functions of `generate` are built at import from the core's
# catalogue; their signatures here are checked against it by
# python/tests/test_stubs.py.
import os
from typing import Any, Callable, Dict, List, Literal, Mapping, NamedTuple, Optional, Sequence, Tuple, TypedDict, Union

import numpy as np

BUILD: str
__version__: str

PathLike = Union[str, os.PathLike[str]]

class Problem(NamedTuple):
    """One problem of an input: its JSON path and what is wrong."""
    path: str
    message: str

class InvalidInput(ValueError):
    """Every problem the core found in an input, each `path: message`."""
    problems: List[Problem]
    unlisted: int
    def __init__(self, problems: Sequence[Tuple[str, str]], unlisted: int = ...) -> None: ...
    def lines(self) -> List[str]: ...

class LearnerError(RuntimeError):
    """A learner of yours failed: its label, the seed index and the episode."""
    learner: str
    seed: int
    episode: int
    message: str

class Solution:
    """v (H+1, S), q (H, S, A), policy (H, S) int64, gaps (H, S, A)."""
    optimal_value: float
    v: np.ndarray
    q: np.ndarray
    policy: np.ndarray
    gaps: np.ndarray

class Evaluation:
    """v (H+1, S) and value = Σ_s ρ(s)·V^π_0(s)."""
    value: float
    v: np.ndarray

class Model:
    """A finite-horizon tabular MDP, checked by the core."""
    @classmethod
    def from_json(cls, text: str) -> Model: ...
    @classmethod
    def from_file(cls, path: PathLike) -> Model: ...
    @classmethod
    def from_dict(cls, d: Mapping[str, Any]) -> Model: ...
    @classmethod
    def from_arrays(
        cls,
        P: Any,
        rewards: Any,
        start: Any = ...,
        *,
        reward: Literal["bernoulli", "fixed"] = ...,
        horizon: Optional[int] = ...,
        name: str = ...,
        states: Optional[Sequence[str]] = ...,
        actions: Optional[Sequence[str]] = ...,
        discount: Optional[float] = ...,
    ) -> Model:
        """P (H, S, A, S) or (S, A, S); rewards (H, S, A) or (S, A); start (S,) or a state."""
    def to_json(self) -> str: ...
    def to_dict(self) -> Dict[str, Any]: ...
    def save(self, path: PathLike) -> None: ...
    @property
    def name(self) -> str: ...
    @property
    def horizon(self) -> int: ...
    @property
    def states(self) -> List[str]: ...
    @property
    def actions(self) -> List[str]: ...
    @property
    def n_states(self) -> int: ...
    @property
    def n_actions(self) -> int: ...
    @property
    def stationary(self) -> bool: ...
    @property
    def discount(self) -> float: ...
    @property
    def start(self) -> np.ndarray:
        """ρ, (S,)."""
    @property
    def P(self) -> np.ndarray:
        """(H, S, A, S)."""
    @property
    def mean_rewards(self) -> np.ndarray:
        """(H, S, A)."""
    def solve(self) -> Solution: ...
    def evaluate(self, policy: Any) -> Evaluation:
        """Actions (H, S) ints, or probabilities (H, S, A)."""
    def check_learnable(self) -> None: ...

def generators() -> List[Dict[str, Any]]: ...
def algorithms() -> Dict[str, Any]: ...

class _Generate:
    """One function per entry of the core's generator catalogue."""
    def random(self, *, states: int = 10, actions: int = 3, successors: int = 3, horizon: int = 10, time_dependent: bool = False, fixed_rewards: bool = False, seed: int = 1) -> Model:
        """Random sparse model, Garnet-style (Archibald, McKinnon & Thomas 1995)."""
    def river(self, *, states: int = 6, horizon: int = 20, p_forward: float = 0.3, p_back: float = 0.1, small_reward: float = 0.005, big_reward: float = 1.0, seed: int = 1) -> Model:
        """River-swim-style chain (after Strehl & Littman 2008)."""
    def drift_grid(self, *, width: int = 7, height: int = 4, slip: float = 0.1, horizon: int = 12, goal_reward: float = 1.0, start_column: Optional[int] = None, start_row: Optional[int] = None, goal_column: Optional[int] = None, goal_row: Optional[int] = None, seed: int = 1) -> Model:
        """Board of cells c0r0, c1r0, … whose moves drift sideways, from a start inside it to one paying goal cell."""
    def lock(self, *, horizon: int = 6, actions: int = 2, time_dependent: bool = False, seed: int = 1) -> Model:
        """Combination lock: one right action per step, a wrong one jams it."""
    def lower_bound(self, *, actions: int = 2, depth: int = 2, horizon: int = 10, wait_until: int = 3, epsilon: float = 0.2, special_step: Optional[int] = None, special_leaf: Optional[int] = None, special_action: Optional[int] = None, seed: int = 1) -> Model:
        """Hard instance of the minimax lower bound (Domingues et al., ALT 2021)."""
    def bandit(self, *, arms: int = 5, means: Optional[Sequence[float]] = None, seed: int = 1) -> Model:
        """Bernoulli multi-armed bandit (S = 1, H = 1)."""

generate: _Generate

class Intro(TypedDict):
    """What a learner class is given: the guest protocol's introduction."""
    protocol: str
    version: int
    states: int
    actions: int
    horizon: int
    episodes: int
    delta: float
    seed: int
    state_labels: List[str]
    action_labels: List[str]
    label: str
    seed_index: int

class Batch(TypedDict):
    """The last batch: `done` and arrays of shape (episodes, H)."""
    done: int
    states: np.ndarray
    actions: np.ndarray
    rewards: np.ndarray
    next_states: np.ndarray

class Curve:
    """episodes (C,), mean/lo/hi (C,), seeds (n, C)."""
    episodes: np.ndarray
    mean: np.ndarray
    lo: np.ndarray
    hi: np.ndarray
    seeds: np.ndarray

class Scaling:
    """How burn-in and regret at K grow with the size a sweep changes:
    fitted exponents with 95% bootstrap intervals `(lo, hi)`, and the
    published bound's exponents on the same points (None: null in the file)."""
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

class SweepCurve:
    """One learner across a sweep: arrays of shape (P,) in the order of
    `values`, float64, NaN where the results file has null (no interval
    with one seed; a slope with no positive regret; a burn-in, or an end
    of its interval, not settled by K)."""
    algorithm: str
    values: np.ndarray
    """The swept values."""
    regret_mean: np.ndarray
    """Mean regret at K; `regret_lo`/`regret_hi` its 95% Student-t interval."""
    regret_lo: np.ndarray
    regret_hi: np.ndarray
    slope: np.ndarray
    """Tail slope of ln regret on ln k; `slope_lo`/`slope_hi` its 95% bootstrap interval."""
    slope_lo: np.ndarray
    slope_hi: np.ndarray
    burn_in: np.ndarray
    """Burn-in in episodes; `burn_in_lo`/`burn_in_hi` its 95% bootstrap interval."""
    burn_in_lo: np.ndarray
    burn_in_hi: np.ndarray
    seeds_linear_at_k: np.ndarray
    """Seeds still growing linearly at K."""
    scaling: Optional[Scaling]

class Sweep:
    """A sweep's readings: the parameter, `values` (P,), what the scaling
    exponents are in (`scaling_in`: "S", "A", "H", "K" or the parameter)
    and that size at each point (`scaling_x`, (P,)), both None without
    scaling readings; each learner's SweepCurve by label."""
    parameter: str
    values: np.ndarray
    scaling_in: Optional[str]
    scaling_x: Optional[np.ndarray]
    learners: Dict[str, SweepCurve]

SWEEP_COLUMNS: Tuple[str, ...]
"""The columns of a sweep's `to_pandas()` after `learner`, `algorithm` and
the swept parameter's own name (its values): `regret_mean`, `regret_lo`,
`regret_hi`, `slope`, `slope_lo`, `slope_hi`, `burn_in`, `burn_in_lo`,
`burn_in_hi`, `seeds_linear_at_k` (floats, NaN for null)."""

class Results:
    """The results file (`burnin run --json`) with arrays, a frame and the
    chart; for a sweep, its readings (`sweep`) and each point's results
    (`points`)."""
    def __init__(self, text: str) -> None: ...
    @classmethod
    def from_json(cls, text: str) -> Results: ...
    @classmethod
    def load(cls, path: PathLike) -> Results: ...
    def to_json(self) -> str: ...
    def save(self, path: PathLike) -> None: ...
    def to_dict(self) -> Dict[str, Any]: ...
    @property
    def is_sweep(self) -> bool: ...
    @property
    def curves(self) -> Dict[str, Curve]:
        """Per learner label (results of one experiment; a sweep's are per point)."""
    @property
    def sweep(self) -> Sweep:
        """A sweep's readings as arrays (ValueError for one experiment's results)."""
    @property
    def points(self) -> List[Results]:
        """A sweep's points, each its own results, in the order of `sweep.values`."""
    def to_pandas(self) -> Any:
        """One experiment: a row per (learner, seed, checkpoint), columns
        learner, algorithm, seed_index, episode, regret. A sweep: a row per
        (learner, swept value), columns learner, algorithm, the parameter's
        name (the value), then SWEEP_COLUMNS."""
    def figure(
        self,
        view: Optional[str] = ...,
        log: bool = ...,
        *,
        bands: bool = ...,
        lower: bool = ...,
        bounds: bool = ...,
        compare: Optional[Sequence[str]] = ...,
        caption: bool = ...,
        width: int = ...,
        height: int = ...,
        type_scale: float = ...,
        format: Literal["svg", "png"] = ...,
    ) -> Union[str, bytes]: ...
    def table(self, format: Literal["markdown", "latex", "csv"] = ...) -> str: ...
    def _repr_svg_(self) -> str: ...

def run(
    experiment: Union[Mapping[str, Any], str, os.PathLike[str]],
    *,
    learners: Optional[Mapping[str, type]] = ...,
    threads: Optional[int] = ...,
    progress: Union[bool, Callable[[int, int], None], None] = ...,
    budget_minutes: Optional[float] = ...,
) -> Results:
    """Runs an experiment in this process (the GIL released while the core
    runs; your classes called from this thread, so Ctrl-C stops even a
    `decide` that never returns)."""

"""The exceptions the package raises (the native module builds them)."""

from __future__ import annotations

from typing import List, NamedTuple, Sequence, Tuple


class Problem(NamedTuple):
    """One problem of an input: its JSON path (as in a file) and what is wrong."""

    path: str
    message: str

    def __str__(self) -> str:
        return f"{self.path}: {self.message}" if self.path else self.message


class InvalidInput(ValueError):
    """A model, experiment or results input the core refused.

    ``problems`` lists every problem found, each a :class:`Problem` whose
    text is the ``path: message`` line ``burnin validate`` prints for the
    same input; ``unlisted`` counts those left out past the core's limit.
    """

    problems: List[Problem]
    unlisted: int

    def __init__(self, problems: Sequence[Tuple[str, str]], unlisted: int = 0):
        self.problems = [Problem(p, m) for p, m in problems]
        self.unlisted = unlisted
        super().__init__(str(self))

    def lines(self) -> List[str]:
        """One ``path: message`` line per problem, as the CLI prints them."""
        out = [str(p) for p in self.problems]
        if self.unlisted:
            out.append(f"… and {self.unlisted} more problems")
        return out

    def __str__(self) -> str:
        return "\n".join(self.lines())


class LearnerError(RuntimeError):
    """A learner of yours failed during a run: raised in ``decide`` or in its
    constructor, or gave an answer the guest contract refuses. The run is
    stopped and no results are given. ``learner`` is its label in the
    experiment, ``seed`` the seed index, ``episode`` the (1-based) episode
    it was deciding for, and ``message`` what went wrong."""

    def __init__(self, text: str, learner: str, seed: int, episode: int, message: str):
        super().__init__(text)
        self.learner = learner
        self.seed = seed
        self.episode = episode
        self.message = message

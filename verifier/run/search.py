"""Hunting counterexamples beyond the fixed families, with Hypothesis.

:func:`search` draws complexes from :mod:`verifier.strategies` (one per bound variable),
asks whether the claim fails on them, and lets Hypothesis shrink a failure; our own
shrinker (:mod:`verifier.run.shrink`) then makes it minimal in the project's sense.  The
search is reproducible for a seed and stops after a time budget.
"""

from __future__ import annotations

import random
import time
from dataclasses import dataclass

from hypothesis import HealthCheck, Phase, find, settings
from hypothesis import strategies as st
from hypothesis.errors import NoSuchExample

from ..claims.evaluate import Context, Limits, evaluate_claim
from ..claims.loader import Claim
from .cases import holds_on
from .shrink import shrink

__all__ = ["search", "Found"]


class _TimeUp(Exception):
    pass


def _only_time_up(error: BaseException) -> bool:
    """True for our time-out, also when Hypothesis reports it inside an exception group."""
    if isinstance(error, _TimeUp):
        return True
    if isinstance(error, BaseExceptionGroup):
        return error.subgroup(lambda e: not isinstance(e, (_TimeUp, BaseExceptionGroup))) is None
    return False


@dataclass
class Found:
    original: dict          # variable -> Complex as Hypothesis found (and shrank) it
    minimal: dict           # variable -> Complex after our shrinker
    steps: list[str]
    sides: list[str]
    witness: dict | None
    evidence: str
    examples: int
    seconds: float
    original_sides: list[str] = ()    # the two sides of the statement on the original
    evaluations: int = 0              # evaluations our shrinker made
    minimal_shown: bool = True        # False if the shrinker's budget ran out


def _strategy(max_vertices: int, max_dim: int):
    from ..strategies import complexes, flag_complexes
    return st.one_of(complexes(max_vertices=max_vertices, max_dim=max_dim),
                     flag_complexes(max_vertices=max_vertices, max_dim=max_dim))


def search(claim: Claim, seconds: float = 60.0, seed: int = 0, max_vertices: int = 8,
           max_dim: int = 3, limits: Limits | None = None) -> Found | None:
    """A minimal counterexample to ``claim`` found by random generation, or None."""
    limits = limits or Limits(seconds=min(30.0, seconds))
    strategy = st.fixed_dictionaries({v: _strategy(max_vertices, max_dim)
                                      for v in claim.variables})
    deadline = time.monotonic() + seconds
    examples = 0
    smallest = None            # the last failing example seen (Hypothesis shrinks towards it)

    def fails(env) -> bool:
        nonlocal examples, smallest
        if time.monotonic() > deadline:
            raise _TimeUp
        examples += 1
        failing = holds_on(claim, env, limits) == "fails"
        if failing:
            smallest = env
        return failing

    start = time.monotonic()
    config = settings(max_examples=10 ** 7, deadline=None, database=None,
                      derandomize=False, phases=[Phase.generate, Phase.shrink],
                      suppress_health_check=list(HealthCheck))
    try:
        original = find(strategy, fails, settings=config, random=random.Random(seed))
    except NoSuchExample:
        return None
    except BaseException as error:       # noqa: BLE001 - only our own time-out is expected
        if not _only_time_up(error):
            raise
        if smallest is None:
            return None
        original = smallest     # time ran out while Hypothesis was still shrinking
    shrunk = shrink(claim, original, limits)
    outcome = evaluate_claim(claim.statement, shrunk.env, Context(limits))
    before = evaluate_claim(claim.statement, original, Context(limits))
    return Found(original, shrunk.env, shrunk.steps, outcome.sides, outcome.witness,
                 outcome.evidence, examples, time.monotonic() - start, list(before.sides),
                 shrunk.evaluations, shrunk.complete)

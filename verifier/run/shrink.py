"""Shrinking a failing case to a minimal counterexample.

Starting from a complex on which the claim fails, try in a fixed order: removing one
vertex (with every simplex containing it), removing one facet, contracting one edge; take
the first smaller complex on which the claim still fails (inside its ``where`` domain),
and repeat.  The result is minimal in the sense of the issue: removing any one vertex or
any one facet makes the claim hold, leaves its domain, or makes it undefined.  For claims
over several complexes each variable is shrunk in turn, the others held fixed.

Every evaluation obeys the run's limits; a candidate that runs into the time limit ends
the shrinking (the result is then marked not minimal), so a slow claim cannot keep the
client busy for one time limit per candidate.

Deterministic: candidates are tried in the order of the complex's canonical vertex and
simplex order, so the same failure always shrinks to the same counterexample.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field

from ..claims.evaluate import Limits
from ..complex import Complex
from .cases import _judge

__all__ = ["shrink", "Shrunk", "candidates"]


@dataclass
class Shrunk:
    env: dict
    steps: list[str] = field(default_factory=list)
    evaluations: int = 0
    complete: bool = True      # False if the budget ran out before minimality was shown
    stopped: str | None = None  # why shrinking stopped early, if it did


def _without_vertex(K: Complex, v: int) -> Complex | None:
    keep = [s for s in K.facets if v not in s]
    if not keep:
        return None
    others = [u for u in range(K.n_vertices) if u != v]
    facets = [K.label_of(s) for s in keep] + [[K.labels[u]] for u in others]
    return Complex.from_facets(facets)


def _without_facet(K: Complex, f: tuple[int, ...]) -> Complex | None:
    if len(K.facets) == 1 and len(f) == 1:
        return None
    rest = [s for s in K.simplices if s != f]
    if not rest:
        return None
    return Complex(K.labels, tuple(rest)) if len(f) > 1 else _without_vertex(K, f[0])


def _contract(K: Complex, u: int, v: int) -> Complex:
    image = [[K.labels[u] if w == v else K.labels[w] for w in s] for s in K.facets]
    return Complex.from_facets([list(dict.fromkeys(s)) for s in image])


def candidates(K: Complex):
    """Smaller complexes, in the fixed order (description, complex)."""
    for v in range(K.n_vertices):
        smaller = _without_vertex(K, v)
        if smaller is not None:
            yield f"removed vertex {K.labels[v]!r}", smaller
    for f in K.facets:
        smaller = _without_facet(K, f)
        if smaller is not None:
            yield f"removed facet {list(K.label_of(f))}", smaller
    for s in K.simplices:
        if len(s) == 2:
            yield f"contracted edge {list(K.label_of(s))}", _contract(K, s[0], s[1])


def shrink(claim, env: dict, limits: Limits, max_evaluations: int = 5000,
           max_seconds: float = 300.0) -> Shrunk:
    """Shrink a failing environment (variable -> Complex) to a minimal one."""
    result = Shrunk(dict(env))
    deadline = time.monotonic() + max_seconds
    progress = True
    while progress:
        progress = False
        for variable in claim.variables:
            for description, smaller in candidates(result.env[variable]):
                if result.evaluations >= max_evaluations or time.monotonic() > deadline:
                    result.complete = False
                    return result
                trial = dict(result.env)
                trial[variable] = smaller
                result.evaluations += 1
                judged = _judge(claim, trial, limits)
                if judged["outcome"] == "limit" and judged.get("message", "").startswith(
                        "seconds"):
                    # a smaller case that needs the whole time limit: every further try
                    # would cost as much, so the shrinker stops here (not minimal)
                    result.complete = False
                    result.stopped = f"a candidate reached the time limit ({description})"
                    return result
                if judged["outcome"] == "fails":
                    prefix = f"{variable}: " if len(claim.variables) > 1 else ""
                    result.steps.append(prefix + description)
                    result.env = trial
                    progress = True
                    break
            if progress:
                break
    return result

"""The independent exact backend: recompute invariants without python-flint.

Results of the main backend (``verifier.exact``, which uses python-flint) are re-checked
here on a code path that shares nothing with it: plain Python integers and fractions,
and sympy's DomainMatrix running with ``SYMPY_GROUND_TYPES=python``.  Because sympy
switches to python-flint whenever python-flint is importable, the computation runs in a
separate worker process (``python -m verifier.independent.worker``) in which that
variable is set before sympy is imported and ``flint`` can never be loaded.  One worker
process serves a whole batch of tasks.

Importing this package loads neither sympy nor python-flint.

>>> results = recompute([{"facets": [[1, 2]], "compute": ["det", "euler", "betti"]}])
>>> results[0]
{'det': -1, 'euler': 1, 'betti': (1, 0)}
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction

from .compute import QUANTITIES, IndependentInputError, validate_task
from .process import call

__all__ = ["recompute", "run", "IndependentRun", "IndependentCheckError",
           "IndependentInputError", "QUANTITIES"]



class IndependentCheckError(RuntimeError):
    """The independent worker failed or could not guarantee independence (says why)."""


@dataclass(frozen=True)
class IndependentRun:
    """What one worker process returned: decoded results and its own report.

    ``results`` has one dict per task (quantity name -> exact value); ``report`` says
    whether python-flint was loaded (``flint_in_sys_modules``), which ground types sympy
    used (``sympy_ground_types``), library versions and timings.
    """
    results: list[dict]
    report: dict = field(default_factory=dict)


def _number(text: str):
    q = Fraction(text)
    return q.numerator if q.denominator == 1 else q


def _decode(name: str, value):
    if name in ("green", "connection"):
        return [[_number(e) for e in row] for row in value]
    if name == "det":
        return _number(value)
    if name == "charpoly":
        return [_number(c) for c in value]
    if name == "simplices":
        return [tuple(s) for s in value]
    if isinstance(value, list):
        return tuple(value)
    return value


def run(tasks, *, timeout: float | None = None) -> IndependentRun:
    """Recompute a batch of tasks in one worker process and return results and report.

    Each task is ``{"facets": [[label, ...], ...], "compute": [name, ...]}`` with names
    from :data:`QUANTITIES` (``simplices``, ``f_vector``, ``connection``, ``green``,
    ``det``, ``charpoly``, ``signature``, ``betti``, ``euler``, ``wu``) or ``betti_mod_P``
    for a prime P.  Decoded values: ``green``/``connection`` lists of rows of ints or
    Fractions; ``det`` int or Fraction; ``charpoly`` list of ints, constant term first;
    ``signature`` (positive, negative, zero); ``betti``/``betti_mod_P``/``f_vector``
    tuples; ``euler``/``wu`` ints; ``simplices`` tuples of labels in (dim, lex) order.

    Parameters: ``tasks`` -- a list of task dicts; ``timeout`` -- seconds for the whole
    batch (None: no limit).  Returns: :class:`IndependentRun`.
    Raises :class:`IndependentInputError` for a malformed task (before any process
    starts) and :class:`IndependentCheckError` when the worker fails, times out, or
    reports that sympy did not run with python ground types or that flint was loaded.

    >>> run([{"facets": [[1, 2], [2, 3]], "compute": ["wu"]}]).results
    [{'wu': -1}]

    Notes: one process start (about a second for importing sympy) per call, so batch
    many tasks into one call.  Reference: sympy documentation, "Ground types"
    (SYMPY_GROUND_TYPES) for why a separate process is needed.
    """
    tasks = list(tasks)
    for i, task in enumerate(tasks):
        validate_task(task, f"task {i}")
    answer = call("verifier.independent.worker", {"tasks": tasks}, timeout,
                  IndependentCheckError, "independent worker")
    report = answer.get("report", {})
    results = [{name: _decode(name, value) for name, value in result.items()}
               for result in answer["results"]]
    if len(results) != len(tasks):
        raise IndependentCheckError(f"independent worker answered {len(results)} of "
                                    f"{len(tasks)} tasks")
    return IndependentRun(results, report)


def recompute(tasks, *, timeout: float | None = None) -> list[dict]:
    """Recompute a batch of tasks independently of python-flint; one dict per task.

    Same as :func:`run` but returns only the decoded results.

    >>> recompute([{"facets": [[1, 2, 3]], "compute": ["signature", "betti_mod_2"]}])
    [{'signature': (4, 3, 0), 'betti_mod_2': (1, 0, 0)}]

    Notes and reference: see :func:`run`.
    """
    return run(tasks, timeout=timeout).results

"""The table of exact values: every expression evaluated on every case of a family.

:func:`parse_expressions` checks the expressions of a discovery (claim language, one
bound variable ``K``, numeric result); :func:`value_table` evaluates them on every case
of a union of families, exactly, in a process pool.  Nothing here finds relations; the
table is the data :mod:`verifier.discover.relations` reads.

Within one case, a function applied to the same arguments is computed once and shared
by every expression (``positive(connection(K))`` and ``negative(connection(K))`` build
the connection matrix once): the memo lives for one case only and keys on the identity
of the argument objects, so values of different cases never mix.
"""

from __future__ import annotations

import os
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field
from fractions import Fraction
from multiprocessing import get_context

from ..claims.errors import ClaimError, ExpressionError, Place
from ..claims.evaluate import Context, Limits, evaluate
from ..claims.expression import parse

__all__ = ["Expression", "ValueTable", "DiscoveryError", "parse_expressions", "value_table",
           "family_cases", "CHUNK"]

CHUNK = 256          # cases per task sent to a worker process
NUMERIC = ("number", "any")


class DiscoveryError(ClaimError):
    """A discovery cannot start or cannot go on: a bad discovery file, an expression that
    is not a number, a case on which an expression cannot be evaluated.  One line, with
    the place (file:line:column) when it is known; the command exits with status 2."""


@dataclass(frozen=True)
class Expression:
    """One expression of a discovery: its text (the key of relations), a display name,
    and where it was written (for error messages)."""
    text: str
    name: str
    place: Place | None = None


@dataclass
class ValueTable:
    """Exact values: ``values[i][j]`` is expression j on case i (int or Fraction)."""
    expressions: list[Expression]
    case_ids: list[str]
    values: list[list]
    families: list[dict] = field(default_factory=list)
    seconds: float = 0.0
    workers: int = 1

    def column(self, j: int) -> list:
        return [row[j] for row in self.values]

    def __post_init__(self):
        self._integers = None

    def integer_array(self):
        """The values as an int64 array when every value is an integer of absolute value
        below 2^31 (so that sums of products over up to 2^31 cases stay exact in int64);
        None otherwise.  Built once (the discovery's value step builds it)."""
        if self._integers is None:
            import numpy as np
            array = False
            if all(type(x) is int and -2 ** 31 < x < 2 ** 31 for row in self.values for x in row):
                array = np.array(self.values, dtype=np.int64).reshape(
                    len(self.values), len(self.expressions))
            self._integers = array
        return self._integers if self._integers is not False else None


def parse_expressions(items: list[Expression]) -> list:
    """The checked syntax trees of the expressions, in order; raise DiscoveryError at the
    first one that does not parse or does not give a number.

    >>> [n.type for n in parse_expressions([Expression("euler(K)", "chi")])]
    ['number']
    >>> parse_expressions([Expression("dim(K) <= 1", "low")])
    Traceback (most recent call last):
    ...
    verifier.discover.values.DiscoveryError: <expression>:1:1: 'dim(K) <= 1' gives a bool; a discovery needs numbers (write e.g. (1 if dim(K) <= 1 else 0))
    """
    nodes = []
    seen: dict[str, Expression] = {}
    for item in items:
        if item.text in seen:
            raise DiscoveryError(f"expression '{item.text}' is listed twice",
                                 item.place or Place(None, 1, 1))
        seen[item.text] = item
        try:
            node = parse(item.text, {"K": "complex"}, item.place)
        except ExpressionError as error:
            raise DiscoveryError(error.message, error.place) from None
        if node.type not in NUMERIC:
            raise DiscoveryError(f"'{item.text}' gives a {node.type}; a discovery needs "
                                 f"numbers (write e.g. (1 if {item.text} else 0))"
                                 if node.type == "bool" else
                                 f"'{item.text}' gives a {node.type}; a discovery needs numbers",
                                 item.place or Place(None, 1, 1))
        nodes.append(node)
    return nodes


def family_cases(families: list):
    """(case id, Complex) of a union of families, lazily; the id is 'i|family case id'
    with i the position of the family in the list (as in the runner's case ids)."""
    for i, family in enumerate(families):
        for case_id, K in family:
            yield f"{i}|{case_id}", K


def _memo_table():
    """The main backend's function table, memoised for one case (see module docstring)."""
    from ..claims.backend import IMPLEMENTATIONS
    cache: dict = {}

    def remembered(name, function):
        def call(*args, **keywords):
            if keywords:
                return function(*args, **keywords)
            try:
                key = (name, tuple(id(a) for a in args))
                hash(key)
            except TypeError:
                return function(*args)
            if key in cache:
                return cache[key][0]
            value = function(*args)
            cache[key] = (value, args)       # the arguments stay alive: ids stay unique
            return value
        return call

    return {name: remembered(name, f) for name, f in IMPLEMENTATIONS.items()}


def _evaluate_chunk(texts: tuple[str, ...], chunk: list, seconds: float) -> list:
    """Worker: values of the expressions on each (case id, facets) of a chunk.  Returns
    one row per case, or ('error', case id, expression, message) at the first failure."""
    from ..complex import Complex
    nodes = [parse(t, {"K": "complex"}) for t in texts]
    limits = Limits(seconds=seconds)
    rows = []
    for case_id, facets in chunk:
        K = Complex.from_facets(facets)
        table = _memo_table()
        row = []
        for text, node in zip(texts, nodes):
            try:
                value = evaluate(node, {"K": K}, Context(limits, table=table))
            except ClaimError as error:
                return [("error", case_id, text, error.message)]
            if isinstance(value, bool) or not isinstance(value, (int, Fraction)):
                kind = type(value).__name__
                return [("error", case_id, text, f"the value is a {kind}, not a number")]
            row.append(value if not (isinstance(value, Fraction) and value.denominator == 1)
                       else int(value))
        rows.append(row)
    return rows


def value_table(families: list, expressions: list[Expression], workers: int | None = None,
                case_seconds: float = 60.0, specs: list[dict] | None = None) -> ValueTable:
    """Evaluate every expression exactly on every case of the families.

    Parameters: families -- :class:`verifier.families.Family` objects (their union is
    the set of cases); expressions -- :class:`Expression` items (checked with
    :func:`parse_expressions` first); workers -- processes (default: 2, or 1 for fewer
    than 2 * CHUNK cases); case_seconds -- the evaluator's time limit per case.
    Returns: a :class:`ValueTable`.  Raises :class:`DiscoveryError` naming the case and
    the expression when an expression cannot be evaluated on a case.

    Method: the parent enumerates the cases and ships facet lists in chunks of CHUNK
    cases to a pool of forked processes (results come back in order); each process
    rebuilds the complex and evaluates with the main backend, memoised per case.
    """
    import time
    parse_expressions(expressions)
    texts = tuple(e.text for e in expressions)
    started = time.perf_counter()
    cases = [(cid, K.facet_labels()) for cid, K in family_cases(families)]
    chunks = [cases[i:i + CHUNK] for i in range(0, len(cases), CHUNK)]
    if workers is None:
        workers = min(2, os.cpu_count() or 1) if len(cases) >= 2 * CHUNK else 1
    if workers > 1 and len(chunks) > 1:
        with ProcessPoolExecutor(max_workers=workers, mp_context=get_context("fork")) as pool:
            results = list(pool.map(_evaluate_chunk, [texts] * len(chunks), chunks,
                                    [case_seconds] * len(chunks)))
    else:
        workers = 1
        results = [_evaluate_chunk(texts, chunk, case_seconds) for chunk in chunks]
    values = []
    for rows in results:
        for row in rows:
            if isinstance(row, tuple) and row and row[0] == "error":
                _, case_id, text, message = row
                place = next((e.place for e in expressions if e.text == text), None)
                raise DiscoveryError(f"'{text}' cannot be evaluated on case {case_id}: "
                                     f"{message}", place)
            values.append(row)
    table = ValueTable(list(expressions), [cid for cid, _ in cases], values,
                       [f.spec() for f in families] if specs is None else specs, 0.0, workers)
    table.integer_array()                   # part of the value step: the exact int64 table
    table.seconds = time.perf_counter() - started
    return table

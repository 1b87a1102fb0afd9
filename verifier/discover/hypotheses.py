"""Hypotheses under which a failing claim holds: predicates that separate the cases.

Given the cases of a run where a statement holds (H) and where it fails (F), and the
value of every predicate of the registry on every case, a *literal* is a predicate or
its negation, and a *hypothesis* is a literal or a conjunction of two.  A hypothesis P

* **separates** the cases when it selects exactly the passing ones: P(K) is true for
  every case in H and false for every case in F ("holds exactly when P");
* is **sufficient** when it selects some passing cases and no failing one ("holds on
  every case with P").

:func:`separators` returns the simplest of each kind: single literals before
conjunctions, fewer and cheaper predicates first; a conjunction is left out when one of
its literals alone does as well, and among hypotheses selecting the same cases only the
simplest is kept (the others are named as equivalent on these cases).  Every reported
hypothesis is re-checked against the cases before it is returned, so none that fails to
separate (or to exclude the failing cases) is ever reported.

Reference: the search is exhaustive over literals and pairs of literals (the "k-term
monomial" hypotheses of L. G. Valiant, A theory of the learnable, Comm. ACM 27 (1984)
1134-1142, with k = 2); nothing is sampled.
"""

from __future__ import annotations

import os
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field
from multiprocessing import get_context

from .predicates import PREDICATES, Predicate

__all__ = ["Literal", "Hypothesis", "Separation", "separators", "predicate_table",
           "MAX_SUFFICIENT"]

MAX_SUFFICIENT = 3        # sufficient hypotheses reported when none separates


@dataclass(frozen=True)
class Literal:
    predicate: Predicate
    positive: bool = True

    @property
    def words(self) -> str:
        return self.predicate.words if self.positive else f"not ({self.predicate.words})"

    @property
    def where(self) -> str:
        return self.predicate.where if self.positive else f"not ({self.predicate.where})"

    @property
    def key(self) -> str:
        return self.predicate.key if self.positive else f"not-{self.predicate.key}"


@dataclass
class Hypothesis:
    """A literal or a conjunction of two, with the cases it selects."""
    literals: tuple
    kind: str                       # "separates" or "sufficient"
    selected: int                   # bitset over the cases
    passing_covered: int            # how many passing cases it selects
    equivalent: list = field(default_factory=list)   # same cases, less simple

    @property
    def words(self) -> str:
        return " and ".join(lit.words for lit in self.literals)

    @property
    def where(self) -> str:
        if len(self.literals) == 1:
            return self.literals[0].where
        return " and ".join(f"({lit.where})" for lit in self.literals)

    @property
    def key(self) -> str:
        return "-and-".join(lit.key for lit in self.literals)


@dataclass
class Separation:
    passing: int
    failing: int
    separating: list[Hypothesis]
    sufficient: list[Hypothesis]
    dropped: list[str] = field(default_factory=list)   # predicates not decided on a case


def _bits(values: list[bool]) -> int:
    out = 0
    for i, v in enumerate(values):
        if v:
            out |= 1 << i
    return out


def _cost(literals) -> tuple:
    return (len(literals), sum(lit.predicate.cost for lit in literals),
            sum(0 if lit.positive else 1 for lit in literals))


def separators(holds: list[bool], values: dict, registry: list[Predicate] | None = None,
               max_sufficient: int = MAX_SUFFICIENT) -> Separation:
    """The simplest hypotheses that separate passing from failing cases, and (when
    useful) the broadest sufficient ones.

    Parameters: holds -- one bool per case (True where the statement holds); values --
    predicate key -> list of bools (one per case), for the predicates of ``registry``
    that could be decided on every case; registry -- default :data:`PREDICATES`.
    Returns: a :class:`Separation`.

    >>> from verifier.discover.predicates import predicate
    >>> low, pure = predicate("dim<=1"), predicate("pure")
    >>> s = separators([True, True, False], {"dim<=1": [True, True, False],
    ...                                      "pure": [True, False, True]}, [low, pure])
    >>> [h.words for h in s.separating]
    ['dim(K) <= 1']

    Method: bitsets over the cases; every literal and every pair of literals of
    different predicates is tried (2p + 2p(p-1) candidates for p predicates); each
    reported candidate is checked again against ``holds`` before it is returned.
    """
    registry = [p for p in (registry or PREDICATES) if p.key in values]
    n = len(holds)
    everything = (1 << n) - 1
    passing = _bits(holds)
    failing = everything & ~passing
    literals = []
    for p in registry:
        bits = _bits(values[p.key])
        literals.append((Literal(p, True), bits))
        literals.append((Literal(p, False), everything & ~bits))
    candidates = [((lit,), bits) for lit, bits in literals]
    for i in range(len(literals)):
        for j in range(i + 1, len(literals)):
            (a, sa), (b, sb) = literals[i], literals[j]
            if a.predicate.key != b.predicate.key:
                candidates.append(((a, b), sa & sb))
    candidates.sort(key=lambda c: _cost(c[0]))
    exact: dict[int, Hypothesis] = {}
    sufficient: dict[int, Hypothesis] = {}
    for lits, bits in candidates:
        if bits & failing or not bits & passing:
            continue
        if len(lits) == 2 and any(_alone(lit, literals) == bits for lit in lits):
            continue                        # one of its literals alone does as well
        kind = "separates" if bits == passing else "sufficient"
        chosen = exact if kind == "separates" else sufficient
        if bits in chosen:
            chosen[bits].equivalent.append(" and ".join(lit.words for lit in lits))
            continue
        chosen[bits] = Hypothesis(lits, kind, bits, bin(bits & passing).count("1"))
    separating = list(exact.values())
    broad = sorted(sufficient.values(), key=lambda h: (-h.passing_covered, _cost(h.literals)))
    kept: list[Hypothesis] = []
    for h in broad:                         # keep the maximal ones: not inside a kept one
        if any(h.selected & ~k.selected == 0 for k in kept):
            continue
        kept.append(h)
        if len(kept) == max_sufficient:
            break
    for h in separating + kept:             # the check: never report what does not hold
        if h.selected & failing or (h.kind == "separates" and h.selected != passing):
            raise AssertionError(f"separator check failed for {h.words}; this is a bug")
    return Separation(bin(passing).count("1"), bin(failing).count("1"), separating, kept)


def _alone(lit, literals) -> int | None:
    for other, bits in literals:
        if other == lit:
            return bits
    return None


def _test_chunk(keys: tuple, chunk: list) -> list:
    """Worker: the registry's tests on each (case id, facets); None where undecided."""
    from ..complex import Complex
    tests = {p.key: p.test for p in PREDICATES}
    rows = []
    for _case_id, facets in chunk:
        K = Complex.from_facets(facets)
        row = []
        for key in keys:
            try:
                row.append(bool(tests[key](K)))
            except (ValueError, ArithmeticError):   # e.g. a manifold test not decided
                row.append(None)
        rows.append(row)
    return rows


def predicate_table(cases: list, registry: list[Predicate] | None = None,
                    workers: int | None = None) -> tuple[dict, list[str]]:
    """Each predicate's value on each (case id, Complex): key -> list of bools, and the
    keys of predicates left out because they could not be decided on some case.

    Predicates of the default registry are evaluated in a process pool (2 workers for
    large runs); a user's own registry is evaluated in this process.
    """
    registry = registry or PREDICATES
    keys = tuple(p.key for p in registry)
    shipped = [(cid, K.facet_labels()) for cid, K in cases]
    chunks = [shipped[i:i + 256] for i in range(0, len(shipped), 256)]
    default = all(p in PREDICATES for p in registry)
    if workers is None:
        workers = min(2, os.cpu_count() or 1) if len(shipped) >= 512 else 1
    if default and workers > 1 and len(chunks) > 1:
        with ProcessPoolExecutor(max_workers=workers, mp_context=get_context("fork")) as pool:
            results = list(pool.map(_test_chunk, [keys] * len(chunks), chunks))
        rows = [row for part in results for row in part]
    else:
        rows = []
        for _cid, K in cases:
            row = []
            for p in registry:
                try:
                    row.append(bool(p.test(K)))
                except (ValueError, ArithmeticError):
                    row.append(None)
            rows.append(row)
    values, dropped = {}, []
    for j, key in enumerate(keys):
        column = [row[j] for row in rows]
        if any(v is None for v in column):
            dropped.append(key)
        else:
            values[key] = column
    return values, dropped

"""Exact integer relations among the columns of a value table.

A *relation* is an integer vector c = (c_0, c_1, ..., c_m), not zero, with
c_0 + c_1 e_1 + ... + c_m e_m = 0 on every case, where e_j are the expressions (and, at
degree 2, the products e_i e_j).  The relations form a lattice: the integer vectors in
the kernel of the case × (1, e_1, ..., e_m) matrix.  :func:`find_relations` returns an
LLL-reduced basis of that whole lattice, each basis vector checked on every case.

The null space proposes; the check decides: :func:`check_relation` evaluates a
candidate on every case in exact integer/rational arithmetic, and only candidates it
accepts are reported (anything else is kept aside as ``rejected`` with the first case
where it fails).

References
----------
[1] A. K. Lenstra, H. W. Lenstra, L. Lovász, Factoring polynomials with rational
    coefficients, Math. Ann. 261 (1982) 515-534.
[2] H. Cohen, A Course in Computational Algebraic Number Theory, GTM 138 (1993), §2.7.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from fractions import Fraction

import numpy as np

from ..exact import integer_kernel
from .values import Expression, ValueTable

__all__ = ["Relation", "RelationResult", "find_relations", "check_relation", "columns_of",
           "relation_text", "statement_text", "CONSTANT"]

CONSTANT = "1"       # the key of the constant term in a relation's coefficients


@dataclass(frozen=True)
class Relation:
    """A checked relation: ``coefficients`` maps expression texts (and "1") to nonzero
    integers; ``cases`` is the number of cases it was checked on."""
    coefficients: dict
    cases: int
    text: str
    statement: str


@dataclass
class RelationResult:
    """Everything a discovery of relations found."""
    table: ValueTable
    degree: int
    columns: list[Expression]            # the expressions (and products) related
    relations: list[Relation]
    rejected: list[dict] = field(default_factory=list)   # proposals the check refused
    constants: list[tuple[Expression, object]] = field(default_factory=list)
    ranges: list[tuple[Expression, object, object]] = field(default_factory=list)
    seconds_values: float = 0.0
    seconds_relations: float = 0.0

    @property
    def cases(self) -> int:
        return len(self.table.case_ids)


def columns_of(table: ValueTable, degree: int) -> tuple[list[Expression], list[list]]:
    """The columns related at a degree: the expressions, then (degree 2) the products
    e_i e_j for i <= j, written ``(a) * (b)``; and the rows of values.

    >>> from verifier.discover.values import ValueTable, Expression
    >>> t = ValueTable([Expression("a(K)", "a"), Expression("b(K)", "b")], ["x"], [[2, 3]])
    >>> cols, rows = columns_of(t, 2)
    >>> [c.name for c in cols], rows
    (['a', 'b', 'a^2', 'a*b', 'b^2'], [[2, 3, 4, 6, 9]])
    """
    if degree not in (1, 2):
        raise ValueError(f"degree must be 1 or 2, got {degree!r}")
    columns = list(table.expressions)
    if degree == 1:
        return columns, table.values
    rows = [list(row) for row in table.values]
    if degree == 2:
        m = len(table.expressions)
        for i in range(m):
            for j in range(i, m):
                a, b = table.expressions[i], table.expressions[j]
                name = f"{a.name}^2" if i == j else f"{a.name}*{b.name}"
                columns.append(Expression(f"({a.text}) * ({b.text})", name))
                for row, values in zip(rows, table.values):
                    row.append(values[i] * values[j])
    return columns, rows


def check_relation(coefficients: dict, columns: list[Expression], rows: list[list],
                   case_ids: list[str], dense=None) -> str | None:
    """The first case id on which a relation fails, or None when it holds on every case.

    Definition: the relation holds on a case when c_"1" + Σ c_e · value(e) == 0, in
    exact integer and rational arithmetic.

    >>> from verifier.discover.values import Expression
    >>> cols = [Expression("x", "x"), Expression("y", "y")]
    >>> check_relation({"x": 2, "y": -1}, cols, [[1, 2], [3, 6]], ["a", "b"]) is None
    True
    >>> check_relation({"x": 2, "y": -1, "1": 1}, cols, [[1, 2], [3, 6]], ["a", "b"])
    'a'
    """
    position = {c.text: j for j, c in enumerate(columns)}
    unknown = [k for k in coefficients if k != CONSTANT and k not in position]
    if unknown:
        raise KeyError(f"relation names an expression not in the table: {unknown[0]!r}")
    constant = coefficients.get(CONSTANT, 0)
    terms = [(position[k], c) for k, c in coefficients.items() if k != CONSTANT and c]
    if dense is not None:
        fast = _int64_check(constant, terms, dense, case_ids)
        if fast is not False:
            return fast
    for case_id, row in zip(case_ids, rows):
        if constant + sum(c * row[j] for j, c in terms) != 0:
            return case_id
    return None


def dense_int64(rows: list[list]):
    """(int64 array of the rows, column maxima of |value|) when every value is an int
    below 2^62 in absolute value; None otherwise."""
    import numpy as np
    if not rows or not all(type(x) is int for row in rows for x in row):
        return None
    try:
        array = np.array(rows, dtype=np.int64)
    except OverflowError:
        return None
    maxima = [int(m) for m in np.abs(array).max(axis=0)]
    return (array, maxima) if max(maxima) < 2 ** 62 else None


def _int64_check(constant: int, terms: list, dense, case_ids: list[str]):
    """The check in numpy int64 when it is provably exact: ``dense`` holds the rows
    (column 0 the constant 1, the others the columns the terms index), and
    Σ |c_j| · max |value_j| < 2^62, so no partial sum can overflow.  Returns the first
    failing case id, None, or False when the bound does not hold."""
    import numpy as np
    array, maxima = dense
    if sum(abs(c) * maxima[j] for j, c in terms) + abs(constant) >= 2 ** 62:
        return False
    vector = np.zeros(array.shape[1], dtype=np.int64)
    vector[0] = constant
    for j, c in terms:
        vector[j] = c
    bad = np.flatnonzero(array @ vector)
    return case_ids[int(bad[0])] if len(bad) else None


def _side(terms: list[tuple[int, str]]) -> str:
    """Terms (coefficient, name) as a sum; the name "1" is the constant."""
    parts = []
    for i, (c, name) in enumerate(terms):
        body = str(abs(c)) if name == CONSTANT else (name if abs(c) == 1 else f"{abs(c)} {name}")
        parts.append((("-" if c < 0 else "") if i == 0 else ("- " if c < 0 else "+ ")) + body)
    return " ".join(parts) or "0"


def _lead(vector: list[int], columns: list[Expression]) -> int | None:
    """The column a relation is solved for: the last one with coefficient ±1."""
    units = [j for j in range(1, len(vector)) if abs(vector[j]) == 1]
    return units[-1] if units else None


def relation_text(vector: list[int], columns: list[Expression]) -> str:
    """A relation in plain mathematical form, with the expressions' display names.

    Solved for the last expression with coefficient ±1 when there is one
    ("chi = f0 - f1 + f2"), otherwise written as positive terms = positive terms
    ("2 f1 = 3 f2").  ``vector[0]`` is the constant term.

    >>> from verifier.discover.values import Expression
    >>> cols = [None] + [Expression(t, t) for t in ("f0", "f1", "f2", "chi")]
    >>> relation_text([0, 1, -1, 1, -1], cols)
    'chi = f0 - f1 + f2'
    >>> relation_text([0, 0, 2, -3, 0], cols)
    '2 f1 = 3 f2'
    >>> relation_text([-2, 0, 0, 0, 1], cols)
    'chi = 2'
    """
    names = [CONSTANT] + [c.name for c in columns[1:]]
    lead = _lead(vector, columns)
    if lead is not None:
        sign = vector[lead]
        rest = [(-sign * vector[j], names[j]) for j in range(1, len(vector))
                if j != lead and vector[j]]
        if vector[0]:
            rest.append((-sign * vector[0], CONSTANT))
        return f"{names[lead]} = {_side(rest)}"
    left = [(vector[j], names[j]) for j in range(1, len(vector)) if vector[j] > 0]
    right = [(-vector[j], names[j]) for j in range(1, len(vector)) if vector[j] < 0]
    if vector[0] > 0:
        left.append((vector[0], CONSTANT))
    elif vector[0] < 0:
        right.append((-vector[0], CONSTANT))
    return f"{_side(left)} = {_side(right)}"


def _claim_side(terms: list[tuple[int, str]]) -> str:
    if not terms:
        return "0"
    parts = []
    for c, text in terms:
        body = str(abs(c)) if text == CONSTANT else (
            f"({text})" if abs(c) == 1 else f"{abs(c)} * ({text})")
        parts.append(("- " if c < 0 else "+ ") + body)
    joined = " ".join(parts)
    return joined[2:] if joined.startswith("+ ") else "-" + joined[2:]


def statement_text(vector: list[int], columns: list[Expression]) -> str:
    """The relation as a claim statement: positive terms == negative terms.

    >>> from verifier.discover.values import Expression
    >>> cols = [None, Expression("euler(K)", "chi"), Expression("sum(green(K))", "g")]
    >>> statement_text([0, -1, 1], cols)
    '(sum(green(K))) == (euler(K))'
    """
    texts = [CONSTANT] + [c.text for c in columns[1:]]
    left = [(vector[j], texts[j]) for j in range(1, len(vector)) if vector[j] > 0]
    right = [(-vector[j], texts[j]) for j in range(1, len(vector)) if vector[j] < 0]
    if vector[0] > 0:
        left.append((vector[0], CONSTANT))
    elif vector[0] < 0:
        right.append((-vector[0], CONSTANT))
    return f"{_claim_side(left)} == {_claim_side(right)}"


def _normalise(vector: list[int]) -> list[int]:
    """Sign convention: the last nonzero coefficient of an expression is positive."""
    for x in reversed(vector[1:]):
        if x:
            return vector if x > 0 else [-v for v in vector]
    return vector if vector[0] >= 0 else [-v for v in vector]


def _weight(vector: list[int]) -> tuple[int, int]:
    return (sum(1 for x in vector if x), sum(abs(x) for x in vector))


def sparser(vectors: list[list[int]]) -> list[list[int]]:
    """The same lattice, with each vector made sparser where adding or subtracting
    another basis vector lowers (number of nonzero entries, sum of absolute values).

    Each step is unimodular (b_i <- b_i ± b_j), so the span stays the same lattice; the
    weight strictly decreases, so the loop ends.

    >>> sparser([[1, 1, 0], [1, 1, 1]])
    [[0, 0, -1], [1, 1, 0]]
    """
    basis = [list(v) for v in vectors]
    improved = True
    while improved:
        improved = False
        for i in range(len(basis)):
            for j in range(len(basis)):
                if i == j:
                    continue
                for sign in (1, -1):
                    candidate = [a + sign * b for a, b in zip(basis[i], basis[j])]
                    if _weight(candidate) < _weight(basis[i]):
                        basis[i], improved = candidate, True
    return basis


def _with_constant(table: ValueTable, degree: int):
    """The int64 matrix [1 | e_1 .. e_m (| e_i e_j)] of every case, or None when a value is
    not an integer below 2^31 (products of two such stay below 2^62)."""
    values = table.integer_array()
    if values is None:
        return None
    parts = [np.ones((len(values), 1), dtype=np.int64), values]
    if degree == 2:
        m = values.shape[1]
        parts += [(values[:, i] * values[:, j])[:, None] for i in range(m) for j in range(i, m)]
    return np.hstack(parts)


def _gram(array, maxima: list[int]):
    """M^T M exactly, as lists of Python ints, or None when it could overflow.

    Over Q the kernel of M^T M is the kernel of M (x^T M^T M x = |M x|^2), so the 13 x 13
    Gram matrix stands in for the whole case table when the null space is proposed; the
    final check still runs on every case.  float64 is used when every partial sum is
    provably below 2^53 (then exact), int64 below 2^62, otherwise None; ``maxima`` are
    the column maxima of |M|."""
    bound = len(array) * max(maxima) ** 2
    if bound < 2 ** 53:
        product = array.T.astype(np.float64) @ array.astype(np.float64)
        return [[int(x) for x in row] for row in product]
    if bound < 2 ** 62:
        return (array.T @ array).tolist()
    return None


class _LazyRows:
    """The rows [1, *row], built only if an exact check has to fall back to them."""

    def __init__(self, rows):
        self.rows = rows

    def __iter__(self):
        return ([1, *row] for row in self.rows)


def find_relations(table: ValueTable, degree: int = 1, proposals=None) -> RelationResult:
    """An LLL-reduced basis of the lattice of integer relations among a table's columns,
    each checked on every case.

    Definition: the relations are the integer vectors c != 0 with
    c_0 + Σ_j c_j e_j(K) = 0 for every case K (see the module docstring).

    Parameters: table -- a :class:`ValueTable`; degree -- 1, or 2 to add the products
    of pairs; proposals -- for tests, a function (rows, n) -> list of integer vectors
    used instead of the null space (every proposal still meets the exact check).
    Returns: a :class:`RelationResult` with the checked relations (a basis of the whole
    lattice when the proposals are the null space's), the rejected proposals, the
    constant expressions and each expression's minimum and maximum.

    >>> from verifier.discover.values import ValueTable, Expression
    >>> t = ValueTable([Expression("a", "a"), Expression("b", "b")], ["p", "q", "r"],
    ...                [[1, 3], [2, 5], [4, 9]])
    >>> [r.text for r in find_relations(t).relations]
    ['b = 2 a + 1']

    Method: the exact kernel of the case × (1, e_1, ..., e_m) matrix over Q and an
    LLL-reduced basis of its integer points (:func:`verifier.exact.integer_kernel`,
    after [1], [2]), made sparser by unimodular steps (:func:`sparser`) so that each
    relation names few expressions; then :func:`check_relation` on every case.  A relation
    depends only on a case's row of values, so the check runs once per distinct row
    (every case has its row among them; a failure is reported at the first case that
    has the failing row, which is the first failing case).
    """
    started = time.perf_counter()
    columns, rows = columns_of(table, degree)
    full_columns = [None] + columns
    n = len(full_columns)
    keyed_columns = [Expression(CONSTANT, CONSTANT)] + columns
    array = _with_constant(table, degree)
    maxima = [int(m) for m in np.abs(array).max(axis=0)] if array is not None and len(array) \
        else None
    gram = _gram(array, maxima) if maxima is not None else None
    if gram is not None:                        # every case at once, exactly in int64
        matrix, witnesses = None, table.case_ids
        dense = (array, maxima)
        kernel_of = gram
    else:                                       # each distinct row of values, first case
        count = len(rows)
        first = dict(zip(map(tuple, reversed(rows)), range(count - 1, -1, -1)))
        order = sorted(first.items(), key=lambda item: item[1])
        matrix = [[1, *row] for row, _ in order]
        witnesses = [table.case_ids[i] for _, i in order]
        dense = dense_int64(matrix)
        kernel_of = matrix
    if proposals:
        vectors = proposals(matrix if matrix is not None else array.tolist(), n)
    else:
        vectors = sparser(integer_kernel(kernel_of, n))
    relations, rejected = [], []
    for vector in vectors:
        vector = _normalise([int(x) for x in vector])
        coefficients = {keyed_columns[j].text: vector[j] for j in range(n) if vector[j]}
        if not coefficients:
            continue
        text = relation_text(vector, full_columns)
        failing = check_relation(coefficients, keyed_columns,
                                 matrix if matrix is not None else _LazyRows(rows),
                                 witnesses, dense)
        if failing is None:
            relations.append(Relation(coefficients, len(table.case_ids), text,
                                      statement_text(vector, full_columns)))
        else:
            rejected.append({"coefficients": coefficients, "text": text,
                             "fails_on": failing})
    relations.sort(key=lambda r: (sum(abs(c) for c in r.coefficients.values()),
                                  len(r.coefficients)))
    constants, ranges = [], []
    for j, expression in enumerate(table.expressions):
        if matrix is None:
            if not len(array):
                continue
            low, high = int(array[:, j + 1].min()), int(array[:, j + 1].max())
        else:
            column = [row[j + 1] for row in matrix]
            if not column:
                continue
            low, high = min(column), max(column)
        ranges.append((expression, low, high))
        if low == high:
            constants.append((expression, low))
    return RelationResult(table, degree, columns, relations, rejected, constants, ranges,
                          table.seconds, time.perf_counter() - started)


def as_fraction_text(x) -> str:
    return str(x) if not isinstance(x, Fraction) else (
        str(x.numerator) if x.denominator == 1 else f"{x.numerator}/{x.denominator}")

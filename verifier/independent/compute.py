"""Exact invariants of a finite simplicial complex on a code path of its own.

This module is the second, independent exact backend.  It shares no code with
``verifier.complex``, ``verifier.exact`` or ``verifier.invariants``: it takes a complex as
plain data (a list of facets, each a list of vertex labels) and rebuilds everything it
needs -- the simplex list, the connection matrix, signed boundary matrices -- from scratch.

Two kinds of arithmetic are used, both exact:

* plain Python integers and ``fractions.Fraction`` for simplices, Euler and Wu
  characteristics, ranks over Q and over Z/p, Betti numbers and the inertia (signature)
  of a symmetric matrix;
* sympy's ``DomainMatrix`` over ZZ for the determinant, the characteristic polynomial and
  the inverse (Green function).  sympy uses python-flint internally whenever python-flint
  is importable, so these functions refuse to run unless sympy was imported with
  ``SYMPY_GROUND_TYPES=python`` and ``flint`` was never imported; the supported way to call
  them is the worker process that :func:`verifier.independent.recompute` starts.

Simplices are sorted tuples of vertex positions (vertex ``i`` is ``labels[i]``), ordered
by (dimension, lexicographic) -- the order every simplex-indexed matrix of the project
uses, so results can be compared entry by entry.
"""

from __future__ import annotations

import sys
from fractions import Fraction
from itertools import combinations

__all__ = [
    "QUANTITIES", "IndependentInputError", "IndependenceBroken",
    "validate_task", "simplices_of", "f_vector", "connection_matrix", "determinant",
    "characteristic_polynomial", "green_function", "inertia", "descartes_signature",
    "boundary_matrix", "rank_over_q", "rank_mod_p", "betti_numbers",
    "euler_characteristic", "wu_characteristic", "compute_task",
]

#: Names a task may ask for; ``betti_mod_P`` for any prime P is accepted as well.
QUANTITIES = ("simplices", "f_vector", "connection", "green", "det", "charpoly",
              "signature", "betti", "euler", "wu")


class IndependentInputError(ValueError):
    """A task handed to the independent backend is malformed (says which task and where)."""


class IndependenceBroken(RuntimeError):
    """The process cannot guarantee independence from python-flint (sympy would use it)."""


# ----------------------------------------------------------------------------- input
def _is_prime(p: int) -> bool:
    if p < 2:
        return False
    if p % 2 == 0:
        return p == 2
    d = 3
    while d * d <= p:
        if p % d == 0:
            return False
        d += 2
    return True


def _betti_prime(name: str) -> int | None:
    """The prime P of a quantity named ``betti_mod_P``; None for other names."""
    prefix = "betti_mod_"
    if not name.startswith(prefix) or not name[len(prefix):].isdigit():
        return None
    return int(name[len(prefix):])


def validate_task(task, where: str = "task") -> tuple[list[list], list[str]]:
    """Check one task and return its facets and the names of the quantities it asks for.

    A task is a mapping ``{"facets": [[label, ...], ...], "compute": [name, ...]}``.
    Labels are integers or strings (not booleans); a facet may not repeat a vertex;
    names come from :data:`QUANTITIES` or are ``betti_mod_P`` with P prime.

    Parameters: ``task`` -- the mapping; ``where`` -- how error messages name the task.
    Returns: ``(facets, names)`` as lists.  Raises :class:`IndependentInputError`.

    >>> validate_task({"facets": [[1, 2]], "compute": ["det", "betti_mod_3"]})
    ([[1, 2]], ['det', 'betti_mod_3'])
    >>> try:
    ...     validate_task({"facets": [[1, 1]], "compute": []}, "task 4")
    ... except IndependentInputError as error:
    ...     print(error)
    task 4: facet 0 repeats a vertex: [1, 1]

    Notes: linear in the size of the task.  Reference: common practice, no source.
    """
    if not isinstance(task, dict):
        raise IndependentInputError(f"{where}: expected an object with 'facets' and "
                                    f"'compute', got {type(task).__name__}")
    unknown = sorted(set(task) - {"facets", "compute"})
    if unknown:
        raise IndependentInputError(f"{where}: unknown field {unknown[0]!r}; "
                                    "valid fields are 'facets' and 'compute'")
    facets, names = task.get("facets"), task.get("compute", [])
    if not isinstance(facets, list):
        raise IndependentInputError(f"{where}: 'facets' must be a list of lists of labels")
    for position, facet in enumerate(facets):
        if not isinstance(facet, list):
            raise IndependentInputError(
                f"{where}: facet {position} must be a list of labels, got {facet!r}")
        for label in facet:
            if isinstance(label, bool) or not isinstance(label, (int, str)):
                raise IndependentInputError(
                    f"{where}: facet {position} has label {label!r}; "
                    "labels must be integers or strings")
        if len(set(facet)) != len(facet):
            raise IndependentInputError(f"{where}: facet {position} repeats a vertex: {facet!r}")
    if not isinstance(names, list) or not all(isinstance(n, str) for n in names):
        raise IndependentInputError(f"{where}: 'compute' must be a list of quantity names")
    for name in names:
        p = _betti_prime(name)
        if p is not None:
            if not _is_prime(p):
                raise IndependentInputError(
                    f"{where}: {name!r} needs a prime modulus, and {p} is not prime")
        elif name not in QUANTITIES:
            raise IndependentInputError(
                f"{where}: unknown quantity {name!r}; valid names are "
                f"{', '.join(QUANTITIES)} and betti_mod_P for a prime P")
    return facets, list(names)


# ------------------------------------------------------------------------ simplices
def _label_order(labels) -> list:
    try:
        return sorted(labels)
    except TypeError:  # integers mixed with strings: by type name, then by text
        return sorted(labels, key=lambda v: (type(v).__name__, repr(v)))


def simplices_of(facets) -> tuple[list, list[tuple[int, ...]]]:
    """The vertex labels and all simplices of the complex generated by ``facets``.

    The complex generated by a family of finite sets is the set of all their non-empty
    subsets.  Labels are sorted (integers numerically, strings alphabetically, integers
    before strings when mixed); a simplex is the sorted tuple of its vertices' positions
    in that list; simplices are ordered by (dimension, lexicographic).

    Parameters: ``facets`` -- a list of lists of labels (need not be maximal; empty lists
    are ignored).  Returns: ``(labels, simplices)``.

    >>> simplices_of([[3, 1], [2]])
    ([1, 2, 3], [(0,), (1,), (2,), (0, 2)])

    Notes: enumerates the 2^k - 1 faces of each maximal set of size k, so the cost is
    proportional to the number of simplices times their size.
    Reference: E. H. Spanier, Algebraic Topology, McGraw-Hill 1966, ch. 3 (definition).
    """
    labels = _label_order({v for facet in facets for v in facet})
    position = {v: i for i, v in enumerate(labels)}
    tops = {tuple(sorted(position[v] for v in facet)) for facet in facets if facet}
    closed: set[tuple[int, ...]] = set()
    for top in sorted(tops, key=len, reverse=True):
        if top in closed:
            continue
        for k in range(1, len(top) + 1):
            closed.update(combinations(top, k))
    return labels, sorted(closed, key=lambda s: (len(s), s))


def f_vector(simplices) -> tuple[int, ...]:
    """Numbers of simplices of each dimension 0, 1, ..., dim.

    f_k is the number of k-simplices (simplices with k+1 vertices).

    Parameters: ``simplices`` -- list of tuples.  Returns: a tuple of ints (empty for the
    empty complex).

    >>> f_vector(simplices_of([[1, 2, 3]])[1])
    (3, 3, 1)

    Notes: linear time.  Reference: R. P. Stanley, Combinatorics and Commutative
    Algebra, 2nd ed., Birkhauser 1996, ch. II (f-vector).
    """
    counts: dict[int, int] = {}
    for s in simplices:
        counts[len(s) - 1] = counts.get(len(s) - 1, 0) + 1
    return tuple(counts.get(k, 0) for k in range(max(counts, default=-1) + 1))


def euler_characteristic(simplices) -> int:
    """The Euler characteristic: sum over simplices x of (-1)^dim(x).

    Parameters: ``simplices`` -- list of tuples.  Returns: an int.

    >>> euler_characteristic(simplices_of([[1, 2], [2, 3], [1, 3]])[1])   # a circle
    0

    Notes: linear time.  Reference: E. H. Spanier, Algebraic Topology, 1966, ch. 4.3.
    """
    return sum(1 if len(s) % 2 else -1 for s in simplices)


def connection_matrix(simplices) -> list[list[int]]:
    """The connection matrix L: L[x][y] = 1 if simplices x and y share a vertex, else 0.

    Parameters: ``simplices`` -- list of tuples, giving the row/column order.
    Returns: a list of rows of 0/1 integers (symmetric, ones on the diagonal).

    >>> connection_matrix(simplices_of([[1, 2]])[1])     # order v1, v2, e
    [[1, 0, 1], [0, 1, 1], [1, 1, 1]]

    Notes: quadratic in the number of simplices.
    Reference: O. Knill, The energy of a simplicial complex, Linear Algebra Appl. 600
    (2020), arXiv:1907.03369.
    """
    sets = [frozenset(s) for s in simplices]
    return [[0 if x.isdisjoint(y) else 1 for y in sets] for x in sets]


def wu_characteristic(simplices, L=None) -> int:
    """The Wu characteristic: sum over ordered pairs of intersecting simplices of w(x) w(y).

    Here w(x) = (-1)^dim(x); equivalently w^T L w with L the connection matrix.

    Parameters: ``simplices`` -- list of tuples; ``L`` -- its connection matrix if already
    built.  Returns: an int.

    >>> wu_characteristic(simplices_of([[1, 2]])[1])      # an interval: 1 + 1 + 1 - 4
    -1

    Notes: quadratic in the number of simplices.
    Reference: O. Knill, The cohomology for Wu characteristics, arXiv:1803.06788 (2018);
    the invariant goes back to W.-T. Wu, Topologie combinatoire et invariants
    combinatoires, Colloq. Math. 7 (1959) (journal details from memory).
    """
    if L is None:
        L = connection_matrix(simplices)
    w = [1 if len(s) % 2 else -1 for s in simplices]
    return sum(w[i] * sum(w[j] for j, e in enumerate(row) if e) for i, row in enumerate(L))


# ------------------------------------------------------------------- sympy section
def _domain_matrix(rows):
    """``rows`` as a sympy DomainMatrix over ZZ, after checking independence from flint.

    Raises :class:`IndependenceBroken` when sympy's ground types are not 'python' or
    when ``flint`` has been imported in this process.
    """
    if "flint" in sys.modules:
        raise IndependenceBroken("python-flint is loaded in this process; the independent "
                                 "backend must run in the worker process "
                                 "(verifier.independent.recompute)")
    from sympy.external.gmpy import GROUND_TYPES
    if GROUND_TYPES != "python":
        raise IndependenceBroken(f"sympy runs with ground types {GROUND_TYPES!r}; the "
                                 "independent backend needs SYMPY_GROUND_TYPES=python set "
                                 "before sympy is imported")
    from sympy.polys.domains import ZZ
    from sympy.polys.matrices import DomainMatrix
    n = len(rows)
    return DomainMatrix([[ZZ(int(e)) for e in row] for row in rows], (n, n), ZZ)


def determinant(rows) -> int:
    """The determinant of a square integer matrix.

    Parameters: ``rows`` -- list of rows of ints.  Returns: an int (1 for the 0x0 matrix).

    >>> from verifier.independent import recompute     # runs in the worker process
    >>> recompute([{"facets": [[1, 2]], "compute": ["det"]}])[0]["det"]
    -1

    Notes: fraction-free Bareiss elimination inside sympy's DomainMatrix over ZZ with
    python ground types, O(n^3) integer operations.
    References: E. H. Bareiss, Sylvester's identity and multistep integer-preserving
    Gaussian elimination, Math. Comp. 22 (1968); sympy.polys.matrices (used independently).
    """
    if not rows:
        return 1
    return int(_domain_matrix(rows).det())


def characteristic_polynomial(rows) -> list[int]:
    """Coefficients of det(x I - M) for a square integer matrix M, constant term first.

    Parameters: ``rows`` -- list of rows of ints.  Returns: list of n+1 ints (``[1]`` for
    the 0x0 matrix); the last one is 1.

    >>> from verifier.independent import recompute     # runs in the worker process
    >>> recompute([{"facets": [[1, 2]], "compute": ["charpoly"]}])[0]["charpoly"]
    [1, 1, -3, 1]

    Notes: sympy's DomainMatrix.charpoly over ZZ (Berkowitz's division-free algorithm,
    O(n^4) integer operations) with python ground types.
    References: S. J. Berkowitz, On computing the determinant in small parallel time using
    a small number of processors, Inform. Process. Lett. 18 (1984); sympy.polys.matrices
    (used independently).
    """
    if not rows:
        return [1]
    coeffs = [int(c) for c in _domain_matrix(rows).charpoly()]
    return coeffs[::-1]


def green_function(rows) -> list[list]:
    """The exact inverse of an invertible integer matrix (for L: the Green function g = L^-1).

    Parameters: ``rows`` -- list of rows of ints.  Returns: list of rows of ints, or of
    ``Fraction`` where an entry is not an integer.  Raises ``ZeroDivisionError`` for a
    singular matrix.

    >>> from verifier.independent import recompute     # runs in the worker process
    >>> recompute([{"facets": [[1, 2]], "compute": ["green"]}])[0]["green"]
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]

    Notes: sympy's fraction-free ``inv_den`` over ZZ gives N and d with M N = d I; the
    answer N/d is accepted only after the exact check M (N/d) = I in plain Python
    integers.  O(n^3).  For the connection matrix the inverse is an integer matrix
    (unimodularity theorem).
    References: O. Knill, On Fredholm determinants in topology, arXiv:1612.08229 (2016)
    (unimodularity); O. Knill, The energy of a simplicial complex, Linear Algebra Appl.
    600 (2020), arXiv:1907.03369 (Green function).
    """
    n = len(rows)
    if n == 0:
        return []
    from sympy.polys.matrices.exceptions import DMNonInvertibleMatrixError
    try:
        numerator, den = _domain_matrix(rows).inv_den()
    except DMNonInvertibleMatrixError:
        raise ZeroDivisionError("the matrix is singular") from None
    den = int(den)
    N = [[int(e) for e in row] for row in numerator.to_list()]
    # exact witness: M N == den * I, checked without sympy
    for i in range(n):
        row = rows[i]
        support = [k for k in range(n) if row[k]]
        for j in range(n):
            value = sum(row[k] * N[k][j] for k in support)
            if value != (den if i == j else 0):
                raise ArithmeticError("the inverse failed its exact check M G = I")
    return [[_exact(Fraction(e, den)) for e in row] for row in N]


def _exact(q: Fraction):
    return q.numerator if q.denominator == 1 else q


# ------------------------------------------------------------------ inertia (plain)
def inertia(rows) -> tuple[int, int, int]:
    """Numbers of positive, negative and zero eigenvalues of a symmetric rational matrix.

    By Sylvester's law of inertia these numbers are unchanged under congruence
    M -> E^T M E with E invertible, so they are read off from a diagonal matrix
    congruent to M.

    Parameters: ``rows`` -- a symmetric matrix as rows of ints / Fractions.
    Returns: ``(positive, negative, zero)``.

    >>> inertia([[1, 0, 1], [0, 1, 1], [1, 1, 1]])       # connection matrix of an edge
    (2, 1, 0)
    >>> inertia([[0, 2], [2, 0]]), inertia([[0, 0], [0, 0]])
    ((1, 1, 0), (0, 0, 2))

    Notes: exact symmetric elimination over Q (Python ints while pivots are +-1).  A
    non-zero diagonal pivot is eliminated from its row and column; when the remaining
    diagonal is zero but some entry a_ij is not, row and column j are added to row and
    column i (a congruence) which makes the new a_ii = 2 a_ij non-zero; when the
    remaining block is zero, its order counts zero eigenvalues.  O(n^3).
    Reference: J. J. Sylvester, A demonstration of the theorem that every homogeneous
    quadratic polynomial is reducible ... , Philos. Mag. 4 (1852); G. H. Golub and
    C. F. Van Loan, Matrix Computations, 4th ed., 2013, section 8.1 (law of inertia).
    """
    A = [list(row) for row in rows]
    n = len(A)
    for i in range(n):
        if len(A[i]) != n or any(A[i][j] != A[j][i] for j in range(i)):
            raise ValueError("inertia needs a symmetric square matrix")
    active = list(range(n))
    positive = negative = 0
    while active:
        pivot = next((i for i in active if A[i][i] in (1, -1)), None)
        if pivot is None:
            pivot = next((i for i in active if A[i][i] != 0), None)
        if pivot is None:
            pair = next(((i, j) for i in active for j in active if A[i][j] != 0), None)
            if pair is None:
                break                      # the remaining block is zero
            i, j = pair                    # congruence: row/col i += row/col j
            for k in active:
                A[i][k] += A[j][k]
            for k in active:
                A[k][i] += A[k][j]
            pivot = i
        p = A[pivot][pivot]
        if p > 0:
            positive += 1
        else:
            negative += 1
        active.remove(pivot)
        prow = A[pivot]
        support = [k for k in active if prow[k] != 0]
        for r in support:
            factor = prow[r] * p if p in (1, -1) else Fraction(prow[r], p)
            row = A[r]
            for k in support:
                row[k] -= factor * prow[k]
    return positive, negative, n - positive - negative


def descartes_signature(coeffs) -> tuple[int, int, int]:
    """(positive, negative, zero) roots, with multiplicity, of a real-rooted polynomial.

    Descartes' rule of signs bounds the number of positive roots by the number of sign
    changes of the coefficient sequence, with equality when all roots are real; negative
    roots are the positive roots of p(-x).

    Parameters: ``coeffs`` -- coefficients, constant term first, of a polynomial whose
    roots are all real (e.g. the characteristic polynomial of a symmetric matrix).
    Returns: ``(positive, negative, zero)``.

    >>> descartes_signature([1, 1, -3, 1])       # x^3 - 3x^2 + x + 1 = (x-1)(x^2-2x-1)
    (2, 1, 0)

    Notes: linear time; exact only for real-rooted input, which is not checked.
    Reference: D. R. Curtiss, Recent extensions of Descartes' rule of signs, Ann. of
    Math. 19 (1918) (equality for real-rooted polynomials).
    """
    coeffs = list(coeffs)
    zero = 0
    while zero < len(coeffs) and coeffs[zero] == 0:
        zero += 1
    rest = coeffs[zero:]

    def changes(seq):
        signs = [c > 0 for c in seq if c != 0]
        return sum(1 for a, b in zip(signs, signs[1:]) if a != b)

    return changes(rest), changes([c if k % 2 == 0 else -c for k, c in enumerate(rest)]), zero


# --------------------------------------------------------------- homology (plain)
def boundary_matrix(simplices, k: int) -> list[dict[int, int]]:
    """The signed boundary map from k-chains to (k-1)-chains, as sparse columns.

    The boundary of the k-simplex (v_0, ..., v_k) (vertices in increasing order) is
    sum_i (-1)^i (v_0, ..., v_i omitted, ..., v_k).

    Parameters: ``simplices`` -- list of tuples; ``k`` -- dimension >= 1.  Returns: one
    dict per k-simplex (in the simplex order), mapping the position of each face among
    the (k-1)-simplices to its sign.

    >>> boundary_matrix(simplices_of([[1, 2, 3]])[1], 2)   # edges 01, 02, 12
    [{2: 1, 1: -1, 0: 1}]

    Notes: linear in the number of k-simplices times k.
    Reference: J. R. Munkres, Elements of Algebraic Topology, Addison-Wesley 1984, sec. 5.
    """
    faces = {s: i for i, s in enumerate(s for s in simplices if len(s) == k)}
    columns = []
    for s in simplices:
        if len(s) == k + 1:
            columns.append({faces[s[:i] + s[i + 1:]]: (-1) ** i for i in range(k + 1)})
    return columns


def rank_over_q(vectors) -> int:
    """Rank over the rationals of a list of sparse integer vectors.

    Parameters: ``vectors`` -- dicts {index: int}.  Returns: an int.

    >>> rank_over_q([{0: 1, 1: -1}, {1: 1, 2: -1}, {0: 1, 2: -1}])
    2

    Notes: fraction-free elimination in Python integers: each pivot row is combined
    with the others by integer multiples and every row is divided by the gcd of its
    entries, so all arithmetic stays exact and integral.  O(r n m) in the worst case.
    Reference: common practice (Gaussian elimination), no source.
    """
    from math import gcd
    pivots: dict[int, dict[int, int]] = {}      # pivot column -> reduced row
    for vector in vectors:
        row = {c: v for c, v in vector.items() if v}
        while row:
            c = min(row)
            if c not in pivots:
                g = 0
                for v in row.values():
                    g = gcd(g, v)
                pivots[c] = {k: v // g for k, v in row.items()}
                break
            prow = pivots[c]
            a, b = prow[c], row[c]
            new = {k: a * v for k, v in row.items()}
            for k, v in prow.items():
                new[k] = new.get(k, 0) - b * v
            row = {k: v for k, v in new.items() if v}
            g = 0
            for v in row.values():
                g = gcd(g, v)
            if g > 1:
                row = {k: v // g for k, v in row.items()}
    return len(pivots)


def rank_mod_p(vectors, p: int) -> int:
    """Rank over the field Z/p of a list of sparse integer vectors (p prime).

    Parameters: ``vectors`` -- dicts {index: int}; ``p`` -- a prime.  Returns: an int.

    >>> rank_mod_p([{0: 1, 1: 1}, {1: 1, 2: 1}, {0: 1, 2: 1}], 2)
    2
    >>> rank_mod_p([{0: 1, 1: 1}, {1: 1, 2: 1}, {0: 1, 2: 1}], 3)
    3

    Notes: Gaussian elimination modulo p with inverses by Fermat's little theorem.
    Reference: common practice (Gaussian elimination over a finite field), no source.
    """
    pivots: dict[int, dict[int, int]] = {}      # pivot column -> row with pivot 1
    for vector in vectors:
        row = {c: v % p for c, v in vector.items() if v % p}
        while row:
            c = min(row)
            if c not in pivots:
                inv = pow(row[c], p - 2, p)
                pivots[c] = {k: v * inv % p for k, v in row.items()}
                break
            b = row[c]
            for k, v in pivots[c].items():
                row[k] = (row.get(k, 0) - b * v) % p
            row = {k: v for k, v in row.items() if v}
    return len(pivots)


def betti_numbers(simplices, p: int | None = None) -> tuple[int, ...]:
    """Betti numbers b_0, ..., b_dim of the complex, over Q (``p=None``) or over Z/p.

    b_k = dim ker d_k - dim im d_{k+1} = f_k - rank d_k - rank d_{k+1} for the signed
    boundary maps d_k (with d_0 = 0), ranks taken over the field in question.

    Parameters: ``simplices`` -- list of tuples; ``p`` -- None or a prime.
    Returns: a tuple of length dim+1 (empty for the empty complex).

    >>> circle = simplices_of([[1, 2], [2, 3], [1, 3]])[1]
    >>> betti_numbers(circle), betti_numbers(circle, 2)
    ((1, 1), (1, 1))

    Notes: one sparse elimination per boundary map (see :func:`rank_over_q`,
    :func:`rank_mod_p`).  Reference: J. R. Munkres, Elements of Algebraic Topology,
    1984, sec. 7 and 11 (homology with field coefficients).
    """
    f = f_vector(simplices)
    ranks = [0] * (len(f) + 1)
    for k in range(1, len(f)):
        columns = boundary_matrix(simplices, k)
        ranks[k] = rank_over_q(columns) if p is None else rank_mod_p(columns, p)
    return tuple(f[k] - ranks[k] - ranks[k + 1] for k in range(len(f)))


# ----------------------------------------------------------------------- one task
def compute_task(facets, names) -> dict:
    """Compute the requested quantities for the complex generated by ``facets``.

    Parameters: ``facets`` -- list of lists of labels; ``names`` -- quantity names from
    :data:`QUANTITIES` or ``betti_mod_P``.  Returns: a dict name -> exact value (ints,
    Fractions, lists, tuples).  ``simplices`` are given as tuples of labels.

    When both ``signature`` and ``charpoly`` are asked for, the signature from the
    congruence elimination is cross-checked against Descartes' rule on the
    characteristic polynomial, and a disagreement raises ``ArithmeticError``.

    >>> compute_task([[1, 2]], ["euler", "wu", "betti", "signature"])
    {'euler': 1, 'wu': -1, 'betti': (1, 0), 'signature': (2, 1, 0)}

    Notes: the connection matrix is built once and shared.  Reference: see the
    functions called.
    """
    labels, simplices = simplices_of(facets)
    cache: dict[str, object] = {}

    def L():
        if "L" not in cache:
            cache["L"] = connection_matrix(simplices)
        return cache["L"]

    def charpoly():
        if "charpoly" not in cache:
            cache["charpoly"] = characteristic_polynomial(L())
        return cache["charpoly"]

    out: dict[str, object] = {}
    for name in names:
        if name == "simplices":
            out[name] = [tuple(labels[i] for i in s) for s in simplices]
        elif name == "f_vector":
            out[name] = f_vector(simplices)
        elif name == "connection":
            out[name] = [list(row) for row in L()]
        elif name == "green":
            out[name] = green_function(L())
        elif name == "det":
            out[name] = determinant(L())
        elif name == "charpoly":
            out[name] = charpoly()
        elif name == "signature":
            value = inertia(L())
            if "charpoly" in names and descartes_signature(charpoly()) != value:
                raise ArithmeticError("signature by congruence disagrees with Descartes' "
                                      "rule on the characteristic polynomial")
            out[name] = value
        elif name == "betti":
            out[name] = betti_numbers(simplices)
        elif name == "euler":
            out[name] = euler_characteristic(simplices)
        elif name == "wu":
            out[name] = wu_characteristic(simplices, L())
        else:
            prime = _betti_prime(name)
            if prime is None:
                raise IndependentInputError(f"unknown quantity {name!r}")
            out[name] = betti_numbers(simplices, prime)
    return out

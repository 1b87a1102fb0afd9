"""The independent backend of the claim language: every function, without python-flint.

:data:`IMPLEMENTATIONS` maps each name of the function table
(:mod:`verifier.claims.functions`) to an implementation that computes its value on a
code path of its own, so that ``Context(table=IMPLEMENTATIONS)`` evaluates any claim
statement in a process that never loads python-flint.  This is what certificate checking
uses to re-verify results (SPEC.md section 8).

What is shared with the main backend, and what is not:

* shared: :class:`verifier.complex.Complex` (the input, its labels and simplex order),
  the claim language itself (parser, type checker, evaluator, value descriptions);
* re-implemented here from the definitions: all linear algebra (exact matrices over Q
  in plain Python, :mod:`verifier.independent.matrix`), the matrices of a complex
  (connection, Green function, boundary, Dirac, Hodge), Euler and Wu characteristics,
  Betti numbers, curvature, Poincare-Hopf indices, the manifold tests (own link
  recognition and collapses), and every operation on complexes (star, link, unit
  sphere, boundary, interior, refinement, join, cone, suspension, product, skeleton,
  union).  Nothing here imports ``verifier.exact``, ``verifier.invariants``,
  ``verifier.operations`` or ``verifier.claims.backend``.

Values compare equal to the main backend's: numbers are ``int``/``Fraction``, simplices
tuples of labels, sets frozensets, complexes :class:`~verifier.complex.Complex`,
matrices :class:`~verifier.claims.values.Indexed` around our own
:class:`~verifier.independent.matrix.Matrix`, polynomials our own
:class:`~verifier.independent.matrix.Poly` (described with the same text).  Errors for
bad arguments carry the main backend's messages.  Deliberate differences: the
reciprocity of a characteristic polynomial is always decided exactly (the main backend
uses a randomized test above order 400, and refuses non-integer matrices); ``charpoly``
of a non-square matrix fails when it is called rather than later; and a manifold test
that needs a collapse tries several collapse orders before it reports "could not
decide" (:class:`NotDecided`, with the main backend's wording), so it decides some
complexes the main backend leaves open.

Run as a separate process with :func:`recheck` (``python -m verifier.independent.recheck``).

>>> from verifier.claims.evaluate import Context, evaluate
>>> from verifier.claims.expression import parse
>>> K = Complex.from_facets([[1, 2, 3], [3, 4]])
>>> node = parse("sum(green(K)) == euler(K)", {"K": "complex"})
>>> evaluate(node, {"K": K}, Context(table=IMPLEMENTATIONS))
True
"""

from __future__ import annotations

from fractions import Fraction
from itertools import combinations, permutations

from ..claims.errors import ClaimError, EvaluationError, LimitExceeded, Undecided
from ..claims.evaluate import Context, Limits, evaluate, evaluate_claim
from ..claims.expression import parse, parse_condition
from ..claims.enclosure import (Count, Enclosure, enclosure_list, free_energy_value,
                                imaginary_part, real_part,
                                probability_vector, rounded_points, zeta_value)
from ..claims.values import Indexed
from ..complex import Complex, ComplexError
from . import certified as cert
from . import homology as hom
from . import matrix as mx
from .matrix import Matrix

__all__ = [
    "IMPLEMENTATIONS", "NotDecided", "evaluate_claim_independently", "recheck",
    "recheck_run", "RecheckRun", "RecheckError", "RecheckInputError",
    "f_vector", "h_vector", "euler", "wu", "connection", "green", "boundary_matrix", "dirac", "hodge",
    "signless_hodge", "betti", "homology", "torsion", "use_witnesses", "curvature", "poincare_hopf_index", "star", "closed_star",
    "link", "unit_sphere", "boundary", "interior", "refine", "join", "cone", "suspension",
    "product", "skeleton", "union", "is_sphere", "is_ball", "is_closed_manifold",
    "is_manifold", "is_manifold_with_boundary",
]



class NotDecided(EvaluationError):
    """A manifold test that these methods cannot decide for this complex (says why)."""


class _Undecided(Exception):
    """Raised inside the manifold tests; the adapter turns it into :class:`NotDecided`."""


class _OperationError(ValueError):
    """A bad argument to an operation (the evaluator prefixes the function's name)."""


# ------------------------------------------------------------------- helpers
def _omega(x) -> int:
    """(-1)^dim x for a simplex x given as a sequence of vertices (-1 for the empty one)."""
    return 1 if len(x) % 2 else -1


def _labels(K: Complex, simplices) -> tuple:
    return tuple(K.label_of(s) for s in simplices)


def _keys(K: Complex) -> tuple:
    return _labels(K, K.simplices)


def _simplex(K: Complex, x) -> tuple[int, ...]:
    """The index tuple of the simplex named by the labels x, or the user's error."""
    try:
        return K.simplex_of(x)
    except (KeyError, TypeError):
        raise EvaluationError(f"{list(x)!r} is not a simplex of the complex") from None


def _vertex(K: Complex, v) -> int:
    simplex = _simplex(K, v)
    if len(simplex) != 1:
        raise EvaluationError(f"{list(v)!r} is not a vertex")
    return simplex[0]


def _facet_indices(K: Complex) -> list[tuple[int, ...]]:
    """The maximal simplices: those that are no codimension-one face of another."""
    covered = set()
    for s in K.simplices:
        if len(s) > 1:
            covered.update(s[:i] + s[i + 1:] for i in range(len(s)))
    return [s for s in K.simplices if s not in covered]


def _generated(K: Complex, simplices) -> Complex:
    """The smallest complex containing the given simplices (index tuples of K), in K's labels."""
    return Complex.from_facets([K.label_of(s) for s in simplices])


def _counts(simplices) -> tuple[int, ...]:
    sizes: dict[int, int] = {}
    for s in simplices:
        sizes[len(s)] = sizes.get(len(s), 0) + 1
    return tuple(sizes.get(k, 0) for k in range(1, max(sizes, default=0) + 1))


def _components(K: Complex) -> int:
    """Number of connected components of the 1-skeleton (union-find on the edges)."""
    parent = list(range(K.n_vertices))

    def root(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for s in K.simplices:
        if len(s) == 2:
            a, b = root(s[0]), root(s[1])
            if a != b:
                parent[max(a, b)] = min(a, b)
    return sum(1 for i in range(K.n_vertices) if root(i) == i)


def _is_pure(K: Complex) -> bool:
    top = len(K.simplices[-1]) if K.simplices else 0
    return all(len(f) == top for f in _facet_indices(K))


# ------------------------------------------------------------------ counting
def h_vector(K: Complex) -> tuple[int, ...]:
    """(h_0, ..., h_d), d = dim K + 1, read off the polynomial identity
    sum_k h_k x^(d-k) = sum_i f_(i-1) (x - 1)^(d-i)  (f_(-1) = 1).

    Parameters: ``K`` -- a complex.  Returns: a tuple of d + 1 ints.

    >>> h_vector(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    (1, 1, 1)

    Notes: the right side is expanded as polynomials (coefficient lists), a different
    computation from the binomial sum of the main backend.
    Reference: R. P. Stanley, Combinatorics and Commutative Algebra, 2nd ed., Birkhauser
    1996, ch. II.2.
    """
    f = [1] + list(f_vector(K))
    d = len(f) - 1
    total = [0] * (d + 1)                     # coefficients of x^0 .. x^d
    for i, count in enumerate(f):
        power = [1]                           # (x - 1)^(d - i), lowest degree first
        for _ in range(d - i):
            power = [(power[j - 1] if j > 0 else 0) - (power[j] if j < len(power) else 0)
                     for j in range(len(power) + 1)]
        for j, c in enumerate(power):
            total[j] += count * c
    return tuple(total[d - k] for k in range(d + 1))


def f_vector(K: Complex) -> tuple[int, ...]:
    """(f_0, ..., f_d): the number of simplices of each dimension.

    f_k is the number of k-simplices (simplices with k + 1 vertices).

    Parameters: ``K`` -- a complex.  Returns: a tuple of ints (empty for the empty complex).

    >>> f_vector(Complex.from_facets([[1, 2, 3], [3, 4]]))
    (4, 4, 1)

    Notes: one pass over the simplices.  Reference: R. P. Stanley, Combinatorics and
    Commutative Algebra, 2nd ed., Birkhauser 1996, ch. II (f-vector).
    """
    return _counts(K.simplices)


def euler(x) -> int:
    """The Euler characteristic: the sum of (-1)^dim over simplices.

    For a complex it is f_0 - f_1 + f_2 - ...; for a set or list of simplices (a star,
    an interior) the sum of (-1)^dim over its members.

    Parameters: ``x`` -- a complex, or a collection of simplices.  Returns: an int.

    >>> euler(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))     # a circle
    0
    >>> euler(frozenset({(1,), (1, 2)}))                           # a half-open edge
    0

    Notes: linear time.  Reference: L. Euler (1758); H. Poincare (1895); E. H. Spanier,
    Algebraic Topology, McGraw-Hill 1966, sec. 4.3.
    """
    if isinstance(x, Complex):
        return sum(f if k % 2 == 0 else -f for k, f in enumerate(f_vector(x)))
    return sum(_omega(s) for s in x)


def wu(K: Complex) -> int:
    """The Wu characteristic: the sum of w(x) w(y) over ordered pairs of intersecting
    simplices, w(x) = (-1)^dim x.

    Parameters: ``K`` -- a complex.  Returns: an int.

    >>> wu(Complex.from_facets([[1, 2]]))            # 3 diagonal pairs, 4 vertex-edge pairs
    -1
    >>> wu(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    0

    Notes: straight from the definition: for each simplex x, the simplices meeting x are
    the union of the vertex stars of x's vertices, held as bit sets over the simplex
    list, and their signed count is read off with two population counts.  O(n^2 / 64)
    word operations for n simplices.
    References: W. Wu, Topologie combinatoire et invariants combinatoires, Colloq.
    Math. 7 (1959); O. Knill, Gauss-Bonnet for multi-linear valuations,
    arXiv:1601.04533 (2016).
    """
    stars = [0] * K.n_vertices
    even = odd = 0
    for position, s in enumerate(K.simplices):
        bit = 1 << position
        for v in s:
            stars[v] |= bit
        if len(s) % 2:
            even |= bit
        else:
            odd |= bit
    total = 0
    for s in K.simplices:
        meeting = 0
        for v in s:
            meeting |= stars[v]
        total += _omega(s) * ((meeting & even).bit_count() - (meeting & odd).bit_count())
    return total


# ------------------------------------------------------------------ matrices
def _connection_matrix(K: Complex) -> Matrix:
    masks = []
    for s in K.simplices:
        mask = 0
        for v in s:
            mask |= 1 << v
        masks.append(mask)
    n = len(masks)
    return Matrix((n, n), tuple(tuple(1 if a & b else 0 for b in masks) for a in masks))


def connection(K: Complex) -> Indexed:
    """The connection matrix L: L[x, y] = 1 if the simplices x and y share a vertex, else 0.

    Parameters: ``K`` -- a complex.  Returns: an :class:`Indexed` matrix whose rows and
    columns are named by the simplices (in labels), in K's simplex order.

    >>> connection(Complex.from_facets([[1, 2]])).matrix.rows()     # order 1, 2, {1, 2}
    [[1, 0, 1], [0, 1, 1], [1, 1, 1]]

    Notes: vertex sets as bit masks; O(n^2) for n simplices.
    Reference: O. Knill, On Fredholm determinants in topology, arXiv:1612.08229 (2016).
    """
    keys = _keys(K)
    return Indexed(_connection_matrix(K), keys, keys)


def green(K: Complex) -> Indexed:
    """The Green function g = L^-1, the inverse of the connection matrix.

    Parameters: ``K`` -- a complex.  Returns: an :class:`Indexed` matrix (integral by
    the unimodularity theorem).

    >>> green(Complex.from_facets([[1, 2]])).matrix.rows()
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]

    Notes: Gauss-Jordan elimination over Q (:func:`verifier.independent.matrix.inverse`),
    accepted only after the exact check L g = I.  Unlike the main backend, which uses
    the star formula, nothing about the structure of g is assumed.
    Reference: O. Knill, The energy of a simplicial complex, Linear Algebra Appl. 600
    (2020) 96-129.
    """
    keys = _keys(K)
    return Indexed(mx.inverse(_connection_matrix(K)), keys, keys)


def _full_boundary(K: Complex, signed: bool) -> Matrix:
    """B[face, x] = (-1)^i for the face of x without its i-th vertex, on all simplices."""
    index, n = K.index, len(K.simplices)
    rows = [dict() for _ in range(n)]
    for j, s in enumerate(K.simplices):
        if len(s) > 1:
            for i in range(len(s)):
                rows[index[s[:i] + s[i + 1:]]][j] = -1 if (signed and i % 2) else 1
    return Matrix.from_sparse((n, n), rows)


def boundary_matrix(K: Complex, k: int) -> Indexed:
    """The signed boundary matrix d_k from k-chains to (k-1)-chains.

    The boundary of [v_0, ..., v_k] (v_0 < ... < v_k) is sum_i (-1)^i [v_0..^v_i..v_k];
    rows are the (k-1)-simplices, columns the k-simplices, both in simplex order.

    Parameters: ``K`` -- a complex; ``k`` -- an integer >= 0.  Returns: an
    :class:`Indexed` matrix (no rows for k = 0, no columns for k > dim K).

    >>> boundary_matrix(Complex.from_facets([[1, 2, 3]]), 2).matrix.rows()
    [[1], [-1], [1]]

    Reference: J. R. Munkres, Elements of Algebraic Topology, Addison-Wesley 1984, sec. 5.
    """
    if isinstance(k, bool) or not isinstance(k, int) or k < 0:
        raise EvaluationError(f"boundary_matrix needs a dimension k >= 0, got {k}")
    faces = [s for s in K.simplices if len(s) == k]
    cells = [s for s in K.simplices if len(s) == k + 1]
    where = {s: i for i, s in enumerate(faces)}
    rows = [dict() for _ in faces]
    for j, s in enumerate(cells):
        for i in range(len(s)):
            face = s[:i] + s[i + 1:]
            if face:
                rows[where[face]][j] = -1 if i % 2 else 1
    return Indexed(Matrix.from_sparse((len(faces), len(cells)), rows),
                   _labels(K, faces), _labels(K, cells))


def dirac(K: Complex) -> Indexed:
    """The Dirac operator D = d + d^T on all simplices, d the exterior derivative.

    Parameters: ``K`` -- a complex.  Returns: an :class:`Indexed` matrix.

    >>> dirac(Complex.from_facets([[1, 2]])).matrix.rows()
    [[0, 0, -1], [0, 0, 1], [-1, 1, 0]]

    Notes: d is the transpose of the signed boundary B on all chains, so D = B + B^T.
    Reference: O. Knill, The McKean-Singer formula in graph theory, arXiv:1301.1408 (2013).
    """
    B = _full_boundary(K, signed=True)
    keys = _keys(K)
    return Indexed(B + B.T, keys, keys)


def hodge(K: Complex) -> Indexed:
    """The Hodge Laplacian H = D^2 = d d^T + d^T d.

    Parameters: ``K`` -- a complex.  Returns: an :class:`Indexed` matrix, block diagonal
    by dimension.

    >>> hodge(Complex.from_facets([[1, 2]])).matrix.rows()
    [[1, -1, 0], [-1, 1, 0], [0, 0, 2]]

    Notes: computed as B B^T + B^T B with B the signed boundary on all chains, which is
    D^2 because B^2 = 0.  Reference: O. Knill, arXiv:1301.1408 (2013).
    """
    B = _full_boundary(K, signed=True)
    Bt = B.T
    keys = _keys(K)
    return Indexed(B @ Bt + Bt @ B, keys, keys)


def signless_hodge(K: Complex) -> Indexed:
    """The signless Hodge operator |D|^2, with |D| = |d| + |d|^T the unsigned Dirac operator.

    Parameters: ``K`` -- a complex.  Returns: an :class:`Indexed` matrix.

    >>> signless_hodge(Complex.from_facets([[1, 2]])).matrix.rows()
    [[1, 1, 0], [1, 1, 0], [0, 0, 2]]

    Reference: O. Knill, The hydrogen identity for Laplacians, arXiv:1803.01464 (2018).
    """
    B = _full_boundary(K, signed=False)
    D = B + B.T
    keys = _keys(K)
    return Indexed(D @ D, keys, keys)


# ------------------------------------------------------------------ homology
def _boundary_rows(K: Complex, k: int) -> Matrix:
    return boundary_matrix(K, k).matrix


def _betti_numbers(K: Complex, p: int = 0) -> tuple[int, ...]:
    f = f_vector(K)
    ranks = [0] * (len(f) + 1)
    for k in range(1, len(f)):
        d = _boundary_rows(K, k)
        ranks[k] = mx.rank(d) if p == 0 else mx.rank_mod(d, p)
    return tuple(f[k] - ranks[k] - ranks[k + 1] for k in range(len(f)))


def _prime(p) -> bool:
    return hom.is_prime(p)


# Witnesses handed over with a re-check task (complex key -> morse/1 dict), and the Morse
# complexes verified from them or built here, for the task being evaluated.
_WITNESSES: dict[str, dict] = {}
_MORSE: dict[str, hom.MorseComplex] = {}


def use_witnesses(witnesses: dict | None) -> None:
    """Make ``witnesses`` (complex key -> ``morse/1`` witness) available to
    :func:`homology`, :func:`torsion` and :func:`betti`; forget earlier ones.

    Keys are :func:`verifier.independent.homology.complex_key` of the complex a witness
    was made for.  Nothing is trusted: a witness is verified before it is used.
    """
    _WITNESSES.clear()
    _MORSE.clear()
    _WITNESSES.update(witnesses or {})


def _morse(K: Complex) -> hom.MorseComplex:
    """The verified Morse complex of a large complex: from the witness handed over for
    it when there is one (verified, never trusted), else from our own collapse matching."""
    key = hom.complex_key(K.labels, K.facets)
    if key not in _MORSE:
        witness = _WITNESSES.get(key)
        if witness is None:
            _MORSE[key] = hom.morse_complex(K.facets)
        else:
            try:
                _MORSE[key] = hom.verify_witness(K.facets, witness)
            except hom.WitnessError as error:
                raise EvaluationError(f"the homology witness was rejected: {error}") from None
    return _MORSE[key]


def _large(K: Complex) -> bool:
    return len(K.simplices) >= hom.WITNESS_THRESHOLD


def betti(K: Complex, k=None, p=0):
    """Betti numbers b_k = dim H_k(K; F) over F = Q (p = 0) or over Z/p (p prime).

    b_k = f_k - rank d_k - rank d_(k+1), ranks of the signed boundary matrices over the
    field (unreduced homology: b_0 counts connected components).

    Parameters: ``K`` -- a complex; ``k`` -- None for all of them, else a dimension;
    ``p`` -- 0 or a prime.  Returns: the tuple (b_0, ..., b_dim) when k is None, else
    b_k (0 outside 0..dim).

    >>> circle = Complex.from_facets([[1, 2], [2, 3], [1, 3]])
    >>> betti(circle), betti(circle, 1), betti(circle, None, 2)
    ((1, 1), 1, (1, 1))

    Notes: below :data:`~verifier.independent.homology.WITNESS_THRESHOLD` simplices one
    exact elimination per boundary matrix (over Q, or modulo p); from there on the same
    eliminations on the Morse complex of a verified witness (or of our own collapse
    matching), which is chain-homotopy equivalent to K over Z (R. Forman, Adv. Math. 134
    (1998), Thm. 8.2), hence has the same Betti numbers over every field.
    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 5, 7 and 11.
    """
    if p and not _prime(p):
        raise EvaluationError(f"betti over Z/p needs a prime p, got {p}")
    numbers = _morse(K).betti(p) if _large(K) else _betti_numbers(K, p)
    if k is None:
        return numbers
    return numbers[k] if 0 <= k < len(numbers) else 0


def homology(K: Complex) -> tuple:
    """Integer homology: one pair (free rank, torsion coefficients) per dimension 0..dim.

    H_k(K; Z) = Z^r + Z/d_1 + ... + Z/d_m with d_1 | ... | d_m, each > 1; the pair is
    (r, (d_1, ..., d_m)).

    Parameters: ``K`` -- a complex.  Returns: a tuple of pairs (empty for the empty
    complex).

    >>> homology(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    ((1, ()), (1, ()))

    Notes: below :data:`~verifier.independent.homology.WITNESS_THRESHOLD` simplices from
    the Smith normal form of the simplicial boundary matrices; from there on from the
    Morse complex of the witness handed over with the task (verified first: matching,
    acyclicity, Morse boundary, d o d = 0), or of our own collapse matching when none
    was.  Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 11;
    R. Forman, Adv. Math. 134 (1998) 90-145.
    """
    if _large(K):
        return _morse(K).homology
    return hom.homology_by_smith(K.facets)


def torsion(K: Complex, k) -> tuple:
    """The torsion coefficients of H_k(K; Z): its invariant factors > 1, increasing.

    Parameters: ``K`` -- a complex; ``k`` -- an integer.  Returns: a tuple of ints
    (empty outside 0..dim).

    >>> RP2 = [[1, 2, 3], [1, 3, 4], [1, 4, 5], [1, 5, 6], [1, 2, 6], [2, 3, 5],
    ...        [2, 4, 5], [2, 4, 6], [3, 4, 6], [3, 5, 6]]
    >>> torsion(Complex.from_facets(RP2), 1)
    (2,)

    Notes: read off :func:`homology`.  Reference: J. R. Munkres, Elements of Algebraic
    Topology, 1984, sec. 11 (Smith normal form).
    """
    if isinstance(k, bool) or not isinstance(k, int):
        raise EvaluationError(f"torsion needs an integer degree, got {k}")
    return hom.torsion_of(homology(K), k)


# ------------------------------------------------------------ local geometry
def _star_indices(K: Complex, x: tuple[int, ...]) -> list[tuple[int, ...]]:
    members = set(x)
    return [z for z in K.simplices if members.issubset(z)]


def _link_of(K: Complex, x: tuple[int, ...]) -> Complex:
    members = set(x)
    return _generated(K, (tuple(v for v in z if v not in members)
                          for z in _star_indices(K, x) if len(z) > len(x)))


def star(K: Complex, x) -> frozenset:
    """The open star of a simplex: the simplices that contain it, St(x) = {z : x in z}.

    Parameters: ``K`` -- a complex; ``x`` -- a simplex of K (a tuple of labels).
    Returns: a frozenset of simplices (tuples of labels); not a complex.

    >>> sorted(star(Complex.from_facets([[1, 2, 3], [3, 4]]), (3,)))
    [(1, 2, 3), (1, 3), (2, 3), (3,), (3, 4)]

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 2.
    """
    return frozenset(_labels(K, _star_indices(K, _simplex(K, x))))


def closed_star(K: Complex, x) -> Complex:
    """The closed star: the smallest subcomplex containing the open star of x.

    Parameters: ``K`` -- a complex; ``x`` -- a simplex of K.  Returns: a complex in K's labels.

    >>> closed_star(Complex.from_facets([[1, 2, 3], [3, 4], [4, 5]]), (3,)).facet_labels()
    [[3, 4], [1, 2, 3]]

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 2.
    """
    return _generated(K, _star_indices(K, _simplex(K, x)))


def link(K: Complex, x) -> Complex:
    """The link of a simplex: Lk(x) = {z in K : z and x disjoint, z union x in K}.

    Parameters: ``K`` -- a complex; ``x`` -- a simplex of K.  Returns: a complex in K's
    labels (the empty complex for a facet).

    >>> link(Complex.from_facets([[1, 2, 3], [1, 3, 4]]), (1,)).facet_labels()
    [[2, 3], [3, 4]]

    Notes: Lk(x) = {z minus x : z in St(x), z != x}.
    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 2.
    """
    return _link_of(K, _simplex(K, x))


def _flags(simplex: tuple) -> list[list[tuple]]:
    """The maximal chains of non-empty faces of a simplex: one per vertex order."""
    return [[tuple(sorted(order[:k])) for k in range(1, len(order) + 1)]
            for order in permutations(simplex)]


def unit_sphere(K: Complex, x) -> Complex:
    """The unit sphere of x: the order complex of the simplices comparable with x.

    S(x) is the order complex of {y in K : y a proper face of x, or x a proper face of
    y}: the link of the vertex x in the barycentric refinement.  Vertices are labelled
    by their simplices (tuples of K's labels).

    Parameters: ``K`` -- a complex; ``x`` -- a simplex of K.  Returns: a complex.

    >>> unit_sphere(Complex.from_facets([["a", "b"]]), ("a",)).facet_labels()
    [[('a', 'b')]]

    Notes: every proper face of x lies below every simplex containing x, so a maximal
    chain is a maximal chain of proper faces of x (a vertex order of x, cut before x)
    followed by a maximal chain from x to a facet (an order of the facet's other
    vertices).  Reference: O. Knill, The graph spectrum of barycentric refinements,
    arXiv:1508.02027 (2015).
    """
    x = _simplex(K, x)
    lower = [chain[:-1] for chain in _flags(x)] if len(x) > 1 else [[]]
    upper = []
    for facet in _facet_indices(K):
        rest = [v for v in facet if v not in x]
        if len(rest) == len(facet) - len(x) and rest:
            for order in permutations(rest):
                upper.append([tuple(sorted(x + order[:k])) for k in range(1, len(order) + 1)])
    upper = upper or [[]]
    chains = [a + b for a in lower for b in upper]
    return Complex.from_facets([[K.label_of(s) for s in chain] for chain in chains if chain])


def _boundary_faces(K: Complex) -> list[tuple[int, ...]]:
    facets = _facet_indices(K)
    if not _is_pure(K):
        dims = sorted({len(f) - 1 for f in facets})
        raise _OperationError(
            f"the boundary is defined for pure complexes (all facets of one dimension); "
            f"this complex has facets of dimensions {dims}")
    seen: dict[tuple[int, ...], int] = {}
    for f in facets:
        for i in range(len(f)):
            face = f[:i] + f[i + 1:]
            if face:
                seen[face] = seen.get(face, 0) + 1
    return [face for face, times in seen.items() if times == 1]


def boundary(K: Complex) -> Complex:
    """The boundary of a pure d-complex: generated by the (d-1)-simplices that lie in
    exactly one facet.

    Parameters: ``K`` -- a pure complex.  Returns: a complex in K's labels (empty for a
    closed manifold).

    >>> boundary(Complex.from_facets([[1, 2, 3]])).facet_labels()
    [[1, 2], [1, 3], [2, 3]]

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 35.
    """
    return _generated(K, _boundary_faces(K))


def interior(K: Complex) -> frozenset:
    """The interior of a pure complex: its simplices that are not in its boundary.

    Parameters: ``K`` -- a pure complex.  Returns: a frozenset of simplices (labels).

    >>> sorted(interior(Complex.from_facets([[1, 2, 3], [1, 3, 4]])))
    [(1, 2, 3), (1, 3), (1, 3, 4)]

    Reference: definition (int K = K minus its boundary).
    """
    faces = [set(f) for f in _boundary_faces(K)]
    return frozenset(K.label_of(z) for z in K.simplices
                     if not any(face.issuperset(z) for face in faces))


def refine(K: Complex, times=1) -> Complex:
    """The barycentric refinement: the order complex of the face poset, ``times`` times.

    Each vertex of the refinement is labelled by the integer position, in the previous
    complex's simplex order, of the simplex it stands for.

    Parameters: ``K`` -- a complex; ``times`` -- 0 to 4.  Returns: a complex.

    >>> refine(Complex.from_facets([[1, 2, 3]])).f_vector
    (7, 12, 6)

    Notes: the maximal chains of the face poset of K are the vertex orders of its
    facets, x_1 = {v_1} < x_2 = {v_1, v_2} < ... (one per facet and order).
    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 15.
    """
    if isinstance(times, bool) or not isinstance(times, int) or not 0 <= times <= 4:
        raise EvaluationError(f"refine takes 0 to 4 refinements, got {times}")
    for _ in range(times):
        index = K.index
        K = Complex.from_facets([[index[s] for s in chain]
                                 for facet in _facet_indices(K) for chain in _flags(facet)])
    return K


def product(A: Complex, B: Complex) -> Complex:
    """The product A x B: the order complex of the product of the two face posets.

    Vertices are the pairs (x, y) of simplices, labelled by their positions (i, j) in the
    simplex orders of A and B; simplices are chains for the componentwise order.

    Parameters: ``A``, ``B`` -- complexes.  Returns: a complex.

    >>> edge = Complex.from_facets([[0, 1]])
    >>> product(edge, edge).f_vector
    (9, 16, 8)

    Notes: a maximal chain runs from (vertex, vertex) to (facet, facet) by covering steps,
    each growing one side by one vertex: a vertex order of a facet of A, one of a facet of
    B, and an interleaving of their steps.  Reference: A. Bjorner, Topological methods,
    Handbook of Combinatorics, Elsevier 1995, sec. 10.
    """
    chains = []
    for F in _facet_indices(A):
        for G in _facet_indices(B):
            for left in _flags(F):
                for right in _flags(G):
                    for steps in combinations(range(len(F) + len(G) - 2), len(F) - 1):
                        i = j = 0
                        chain = [(A.index[left[0]], B.index[right[0]])]
                        for step in range(len(F) + len(G) - 2):
                            if step in steps:
                                i += 1
                            else:
                                j += 1
                            chain.append((A.index[left[i]], B.index[right[j]]))
                        chains.append(chain)
    return Complex.from_facets(chains)


def _tagged(K: Complex, tag: int) -> list[list]:
    return [[(tag, K.labels[v]) for v in f] for f in _facet_indices(K)]


def join(A: Complex, B: Complex) -> Complex:
    """The join A * B: all unions of a simplex of A and a simplex of B (either may be empty).

    Labels are (0, a) for a vertex a of A and (1, b) for a vertex b of B.

    >>> join(Complex.from_facets([[0], [1]]), Complex.from_facets([[0], [1]])).f_vector
    (4, 4)

    Notes: its facets are the unions of a facet of A and a facet of B.
    Reference: J. Matousek, Using the Borsuk-Ulam Theorem, Springer 2003, sec. 4.2.
    """
    first = _tagged(A, 0) or [[]]
    second = _tagged(B, 1) or [[]]
    return Complex.from_facets([f + g for f in first for g in second])


def _fresh(K: Complex, names: tuple, role: str):
    for name in names:
        if name in K.labels:
            raise _OperationError(f"{role} label {name!r} is already a vertex label of the "
                                  f"complex; pass another {role} label")


def cone(K: Complex) -> Complex:
    """The cone over K: the join with one new vertex labelled "apex".

    >>> cone(Complex.from_facets([[1, 2]])).facet_labels()
    [[1, 2, 'apex']]

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 8.
    """
    _fresh(K, ("apex",), "apex")
    return Complex.from_facets([list(K.label_of(f)) + ["apex"] for f in _facet_indices(K)]
                               or [["apex"]])


def suspension(K: Complex) -> Complex:
    """The suspension of K: the join with two new vertices "north" and "south".

    >>> suspension(Complex.from_facets([[0], [1]])).f_vector
    (4, 4)

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 8.
    """
    poles = ("north", "south")
    _fresh(K, poles, "pole")
    return Complex.from_facets([list(K.label_of(f)) + [p] for f in _facet_indices(K)
                                for p in poles] or [[p] for p in poles])


def skeleton(K: Complex, k) -> Complex:
    """The k-skeleton: the simplices of dimension at most k.

    >>> skeleton(Complex.from_facets([[0, 1, 2, 3]]), 1).f_vector
    (4, 6)

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 2.
    """
    if isinstance(k, bool) or not isinstance(k, int) or k < 0:
        raise _OperationError(f"skeleton dimension must be an integer >= 0, got {k!r}")
    return _generated(K, [s for s in K.simplices if len(s) <= k + 1])


def union(a, b):
    """The disjoint union of two complexes (labels (0, a) and (1, b)), or the union of
    two sets of simplices.

    >>> union(Complex.from_facets([["p"]]), Complex.from_facets([[1, 2]])).facet_labels()
    [[(0, 'p')], [(1, 1), (1, 2)]]

    Reference: definition.
    """
    if isinstance(a, Complex) and isinstance(b, Complex):
        return Complex.from_facets(_tagged(a, 0) + _tagged(b, 1))
    if isinstance(a, frozenset) and isinstance(b, frozenset):
        return a | b
    raise EvaluationError("union takes two complexes (disjoint union) or two sets of simplices")


def curvature(K: Complex, v) -> Fraction:
    """Levitt curvature at a vertex: sum_{k >= 0} (-1)^k f_(k-1)(S(v)) / (k + 1).

    S(v) is the link of v and f_(-1) = 1.  By Gauss-Bonnet the curvatures sum to the
    Euler characteristic.

    Parameters: ``K`` -- a complex; ``v`` -- a vertex as a one-label tuple.
    Returns: a Fraction.

    >>> curvature(Complex.from_facets([[1, 2], [2, 3], [1, 3]]), (1,))
    Fraction(0, 1)
    >>> curvature(Complex.from_facets([[1, 2]]), (1,))                  # 1 - 1/2
    Fraction(1, 2)

    Notes: the link's f-vector is counted from the link itself.
    Reference: N. Levitt, The Euler characteristic is the unique locally determined
    numerical homotopy invariant of finite complexes, Discrete Comput. Geom. 7 (1992) 59-67.
    """
    sphere = _link_of(K, (_vertex(K, v),))
    f = (1,) + f_vector(sphere)
    return sum((Fraction((-1) ** k * count, k + 1) for k, count in enumerate(f)), Fraction(0))


def poincare_hopf_index(K: Complex, v) -> int:
    """The Poincare-Hopf index at v of the vertex order: i(v) = 1 - chi(S^-(v)).

    S^-(v) is the part of the link of v spanned by the vertices that come before v in
    K's vertex order (the function f = vertex position).  The indices sum to chi.

    Parameters: ``K`` -- a complex; ``v`` -- a vertex as a one-label tuple.  Returns: an int.

    >>> K = Complex.from_facets([[1, 2], [2, 3], [1, 3]])
    >>> [poincare_hopf_index(K, (v,)) for v in (1, 2, 3)]
    [1, 0, -1]

    Reference: O. Knill, A graph theoretical Poincare-Hopf theorem, arXiv:1201.1162 (2012).
    """
    w = _vertex(K, v)
    lower = [z for z in _star_indices(K, (w,)) if len(z) > 1 and z[-1] == w]
    # each such z gives the simplex z minus w of the lower link, of sign -omega(z)
    return 1 - sum(-_omega(z) for z in lower)


# ----------------------------------------------------------- manifold tests
def _collapse_once(simplices, order) -> bool:
    """Greedy elementary collapses in the given order (a stack, last item first): a
    free face (a face of exactly one simplex) is removed with that simplex, and its
    faces are looked at again.  True if a single vertex remains."""
    alive = set(simplices)
    up: dict[tuple, set] = {s: set() for s in alive}
    for s in alive:
        if len(s) > 1:
            for i in range(len(s)):
                up[s[:i] + s[i + 1:]].add(s)
    stack = list(order)
    while stack and len(alive) > 1:
        s = stack.pop()
        if s not in alive or len(up[s]) != 1:
            continue
        (t,) = up[s]
        if up[t]:
            continue
        for gone in (t, s):
            alive.discard(gone)
            if len(gone) > 1:
                for i in range(len(gone)):
                    face = gone[:i] + gone[i + 1:]
                    up[face].discard(gone)
                    if face in alive:
                        stack.append(face)
    return len(alive) == 1


COLLAPSE_ATTEMPTS = 8


def _collapsible(simplices) -> bool:
    """True when some sequence of elementary collapses reduces the complex to a vertex
    (a witness that it is collapsible).  Tries the (dimension, lex) order and then
    ``COLLAPSE_ATTEMPTS - 1`` seeded random orders; False means only that every
    attempt got stuck (a collapsible complex can trap a greedy collapse).

    Reference: J. H. C. Whitehead, Simplicial spaces, nuclei and m-groups, Proc. London
    Math. Soc. 45 (1939) (collapses); F. H. Lutz and B. Benedetti, Random discrete Morse
    theory and a new library of triangulations, Exp. Math. 23 (2014) (greedy collapses
    can get stuck; from memory).
    """
    import random

    simplices = sorted(simplices, key=lambda s: (len(s), s))
    for attempt in range(COLLAPSE_ATTEMPTS):
        order = list(simplices)
        if attempt:
            random.Random(attempt).shuffle(order)
        if _collapse_once(simplices, order):
            return True
    return False


def _degrees(K: Complex) -> list[int]:
    degrees = [0] * K.n_vertices
    for s in K.simplices:
        if len(s) == 2:
            degrees[s[0]] += 1
            degrees[s[1]] += 1
    return degrees


def _vertex_links(K: Complex):
    """The link of every vertex, in vertex order; the stars are gathered in one pass over
    the simplices (linear in the size of K, not quadratic)."""
    stars: list[list[tuple[int, ...]]] = [[] for _ in range(K.n_vertices)]
    for z in K.simplices:
        if len(z) > 1:
            for v in z:
                stars[v].append(z)
    for v in range(K.n_vertices):
        yield _generated(K, (tuple(w for w in z if w != v) for z in stars[v]))


def _sphere(K: Complex, d: int) -> bool:
    if d == -1:
        return len(K.simplices) == 0
    if K.dim != d or not _is_pure(K):
        return False
    if d == 0:
        return K.n_vertices == 2
    if d == 1:
        return all(x == 2 for x in _degrees(K)) and _components(K) == 1
    if not _closed_manifold(K) or _components(K) != 1:
        return False
    if d == 2:
        return euler(K) == 2
    if euler(K) != (2 if d % 2 == 0 else 0) or any(_betti_numbers(K, 2)[1:d]):
        return False
    if _collapsible(set(K.simplices) - {_facet_indices(K)[-1]}):
        return True
    raise _Undecided(f"could not decide whether a {d}-manifold with the homology of a "
                     "sphere is a PL sphere (greedy collapse got stuck)")


def _ball(K: Complex, d: int) -> bool:
    if K.dim != d or not _is_pure(K) or d < 0:
        return False
    if d == 0:
        return K.n_vertices == 1
    if _components(K) != 1:
        return False
    if d == 1:
        degrees = _degrees(K)
        return max(degrees) <= 2 and degrees.count(1) == 2
    if not (_manifold(K) and not _closed_manifold(K)):
        return False
    if d == 2:
        return euler(K) == 1
    if euler(K) != 1 or not _sphere(boundary(K), d - 1):
        return False
    if _collapsible(K.simplices):
        return True
    raise _Undecided(f"could not decide whether a {d}-manifold with sphere boundary is a "
                     "ball (greedy collapse got stuck)")


def _closed_manifold(K: Complex) -> bool:
    d = K.dim
    if d < 0 or not _is_pure(K):
        return False
    return all(_sphere(S, d - 1) for S in _vertex_links(K))


def _manifold(K: Complex) -> bool:
    d = K.dim
    if d < 0 or not _is_pure(K):
        return False
    if d == 0:
        return True
    return all(_sphere(S, d - 1) or _ball(S, d - 1) for S in _vertex_links(K))


def _decided(name: str, test, *args) -> bool:
    try:
        return test(*args)
    except _Undecided as reason:
        raise NotDecided(f"{name}: {reason}") from None


def is_sphere(K: Complex, d: int | None = None) -> bool:
    """Is K a combinatorial d-sphere (d defaults to dim K)?

    Method: d = -1: empty; d = 0: two points; d = 1: connected with every vertex of
    degree 2; d = 2: connected closed surface (every vertex link a circle) with chi = 2
    (classification of surfaces); d >= 3: a connected closed combinatorial manifold with
    the Euler characteristic and mod-2 homology of a sphere whose deletion of one facet
    collapses to a point.

    Parameters: ``K`` -- a complex; ``d`` -- the dimension asked about.  Returns: a bool.
    Raises :class:`NotDecided` when the greedy collapse gets stuck.

    >>> is_sphere(Complex.from_facets([[1, 2, 3], [1, 2, 4], [1, 3, 4], [2, 3, 4]]))
    True

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 35; J. H. C.
    Whitehead, Simplicial spaces, nuclei and m-groups, Proc. London Math. Soc. 45 (1939)
    (a collapsible combinatorial manifold is a ball).
    """
    return _decided("is_sphere", _sphere, K, K.dim if d is None else d)


def is_ball(K: Complex, d: int | None = None) -> bool:
    """Is K a combinatorial d-ball (d defaults to dim K)?

    Method: d = 0: a point; d = 1: a path; d = 2: a connected surface with nonempty
    boundary and chi = 1 (only the disc); d >= 3: a manifold with boundary, chi = 1,
    boundary a sphere, collapsing to a point.

    >>> is_ball(Complex.from_facets([[1, 2, 3]])), is_ball(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    (True, False)

    Reference: as for :func:`is_sphere`.
    """
    return _decided("is_ball", _ball, K, K.dim if d is None else d)


def is_closed_manifold(K: Complex) -> bool:
    """Is K a closed combinatorial d-manifold: pure, every vertex link a (d-1)-sphere?

    >>> is_closed_manifold(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    True
    >>> is_closed_manifold(Complex.from_facets([[1, 2, 3]]))
    False

    Notes: links recognised by :func:`is_sphere`; decided for d <= 3, by a collapse
    witness beyond.  Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 35.
    """
    return _decided("is_closed_manifold", _closed_manifold, K)


def is_manifold(K: Complex) -> bool:
    """Is K a combinatorial manifold, with or without boundary: pure, every vertex link
    a (d-1)-sphere or a (d-1)-ball?

    >>> is_manifold(Complex.from_facets([[1, 2, 3]])), is_manifold(Complex.from_facets([[1, 2], [1, 3], [1, 4]]))
    (True, False)

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 35.
    """
    return _decided("is_manifold", _manifold, K)


def is_manifold_with_boundary(K: Complex) -> bool:
    """Is K a combinatorial manifold with nonempty boundary (a manifold, not closed)?

    >>> is_manifold_with_boundary(Complex.from_facets([[1, 2, 3]]))
    True

    Reference: J. R. Munkres, Elements of Algebraic Topology, 1984, sec. 35.
    """
    return _decided("is_manifold_with_boundary",
                    lambda C: _manifold(C) and not _closed_manifold(C), K)


# ----------------------------------------------------- small language adapters
def _simplices(K):
    return _keys(K)


def _vertices(K):
    return tuple((v,) for v in K.labels)


def _facets(K):
    return _labels(K, _facet_indices(K))


def _dim(x):
    return x.dim if isinstance(x, Complex) else len(x) - 1


def _size(x):
    if isinstance(x, Complex):
        return len(x.simplices)
    if isinstance(x, Indexed):
        return x.matrix.shape[0]
    return len(x)


def _omega_of(x):
    return _omega(tuple(x))


def _range(n):
    if isinstance(n, bool) or not isinstance(n, int) or not 0 <= n <= 10_000:
        raise EvaluationError(f"range needs an integer from 0 to 10000, got {n}")
    return tuple(range(n))


def _identity(n):
    if isinstance(n, Complex):
        keys = _keys(n)
        return Indexed(Matrix.identity(len(keys)), keys, keys)
    if isinstance(n, bool) or not isinstance(n, int) or n < 0:
        raise EvaluationError(f"identity needs a size n >= 0 or a complex, got {n}")
    return Indexed(Matrix.identity(n))


def _transpose(M):
    return Indexed(M.matrix.T, M.cols, M.rows)


def _abs(x):
    if isinstance(x, Indexed):
        return Indexed(x.matrix.entrywise_abs(), x.rows, x.cols)
    if isinstance(x, Enclosure):
        return x.modulus()
    return abs(x)


def _det(M):
    return mx.det(M.matrix)


def _trace(M):
    return M.matrix.trace()


def _rank(M):
    return mx.rank(M.matrix)


def _kernel_dim(M):
    return mx.kernel_dim(M.matrix)


def _charpoly(M):
    return mx.charpoly(M.matrix)


def _is_reciprocal(p, ctx=None):
    """Exact always: the polynomial is at hand (charpoly is computed eagerly)."""
    return p.is_reciprocal()


def _signature(M):
    return tuple(mx.signature(M.matrix))


def _positive(M):
    return mx.signature(M.matrix)[0]


def _negative(M):
    return mx.signature(M.matrix)[1]


def _multiplicity(M, value):
    return mx.multiplicity(M.matrix, value)


def _zeta(M, s, t=0):
    if t == 0 and isinstance(s, int) and not isinstance(s, bool):
        return (M.matrix ** (-s)).trace()
    poly = _spectral_poly(M, "zeta")
    if poly.coeffs[0] == 0:
        raise EvaluationError("zeta: matrix is singular (0 is an eigenvalue)")
    return zeta_value(poly.coeffs, s, t, lambda bits: cert.zeta_enclosure(poly, s, t, bits),
                      BITS)


# ------------------------------------------------------- certified numbers
BITS = 160      # the starting precision here; the main backend starts at 128 bits

_POLYS: dict = {}


def _spectral_poly(M, name: str):
    """The exact characteristic polynomial of a symmetric integer matrix (cached)."""
    matrix = M.matrix
    hit = _POLYS.get(id(matrix))
    if hit is not None and hit[0] is matrix:
        return hit[1]
    n, m = matrix.shape
    if n != m:
        raise EvaluationError(f"{name} needs a square matrix, got {n}x{m}")
    if not matrix.is_integer() or not mx.is_symmetric(matrix):
        raise EvaluationError(f"{name} needs a symmetric integer matrix (real eigenvalues)")
    poly = mx.charpoly(matrix)
    if len(_POLYS) >= 8:
        _POLYS.pop(next(iter(_POLYS)))
    _POLYS[id(matrix)] = (matrix, poly)
    return poly


def _eigenvalue_enclosures(M):
    poly = _spectral_poly(M, "eigenvalue_enclosures")
    return enclosure_list(lambda bits: cert.eigenvalue_enclosures(poly, bits), BITS)


def _zeros_in_box(M, re_lo, re_hi, im_lo, im_hi):
    poly, details = _spectral_poly(M, "zeros_in_box"), {}
    n = cert.zeros_in_box(poly, re_lo, re_hi, im_lo, im_hi, BITS, details=details)
    return Count(n, details["bits"])


def _zeros_on_axis(M, t_lo, t_hi):
    poly, details = _spectral_poly(M, "zeros_on_axis"), {}
    n = cert.zeros_on_axis(poly, t_lo, t_hi, BITS, details=details)
    return Count(n, details["bits"])


def _interaction(V) -> list[list]:
    """The rows of an interaction matrix: a symmetric matrix, or a complex's Green function."""
    matrix = green(V).matrix if isinstance(V, Complex) else V.matrix
    n, m = matrix.shape
    if n != m or not mx.is_symmetric(matrix):
        raise EvaluationError("the interaction matrix must be square and symmetric")
    return matrix.rows()


def _free_energy(V, p, T):
    rows = _interaction(V)
    p = probability_vector(p, len(rows))
    U = Fraction(0)
    for x, px in enumerate(p):
        if px:
            U += px * sum(rows[x][y] * py for y, py in enumerate(p) if py)
    return free_energy_value(U, p, T, lambda bits: cert.entropy_enclosure(p, bits), BITS)


def _critical_points(V, T):
    if Fraction(T) <= 0:
        raise EvaluationError(f"critical_points needs a temperature T > 0, got {T}")
    found = cert.critical_points(_interaction(V), Fraction(T))
    return rounded_points(point for point, _kind in found)


IMPLEMENTATIONS = {
    "simplices": _simplices, "vertices": _vertices, "facets": _facets, "dim": _dim,
    "size": _size, "f_vector": f_vector, "omega": _omega_of, "range": _range,
    "euler": euler, "wu": wu,
    "connection": connection, "green": green, "hodge": hodge,
    "signless_hodge": signless_hodge, "dirac": dirac, "boundary_matrix": boundary_matrix,
    "identity": _identity, "transpose": _transpose, "abs": _abs, "det": _det,
    "trace": _trace, "rank": _rank, "kernel_dim": _kernel_dim, "charpoly": _charpoly,
    "is_reciprocal": _is_reciprocal, "signature": _signature, "positive": _positive,
    "negative": _negative, "multiplicity": _multiplicity, "zeta": _zeta, "betti": betti,
    "homology": homology, "torsion": torsion,
    "is_manifold": is_manifold, "is_manifold_with_boundary": is_manifold_with_boundary,
    "is_closed_manifold": is_closed_manifold, "curvature": curvature,
    "is_sphere": is_sphere, "is_ball": is_ball,
    "h_vector": h_vector,
    "index": poincare_hopf_index, "star": star, "closed_star": closed_star, "link": link,
    "unit_sphere": unit_sphere, "boundary": boundary, "interior": interior,
    "refine": refine, "join": join, "cone": cone, "suspension": suspension,
    "product": product, "skeleton": skeleton, "union": union,
    "eigenvalue_enclosures": _eigenvalue_enclosures, "zeros_in_box": _zeros_in_box,
    "zeros_on_axis": _zeros_on_axis, "re": real_part, "im": imaginary_part,
    "free_energy": _free_energy,
    "critical_points": _critical_points,
}
"""Function name -> independent implementation, one entry per name of the table."""


# --------------------------------------------------------- evaluating claims
def _label(value):
    """A label read from JSON: lists (JSON's tuples) become tuples, recursively."""
    if isinstance(value, list):
        return tuple(_label(v) for v in value)
    return value


def _plain(value):
    """A JSON-ready copy: tuples become lists, Fractions their exact text."""
    if isinstance(value, dict):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    if isinstance(value, Fraction):
        return str(value)
    return value


def evaluate_claim_independently(statement: str, variables: dict, where: str | None = None,
                                 limits: Limits | None = None) -> dict:
    """Evaluate a claim statement on given complexes with the independent backend.

    The statement (and the optional precondition ``where``) are parsed and type-checked
    by the claim language; every bound variable is a complex given by its facets; the
    functions called are those of :data:`IMPLEMENTATIONS`.

    Parameters: ``statement`` -- the claim's statement text; ``variables`` -- name ->
    list of facets (each a list of labels; a list inside a facet is read as a tuple
    label); ``where`` -- the precondition text or None; ``limits`` -- evaluation limits
    (default :class:`~verifier.claims.evaluate.Limits`).

    Returns: a dict with ``outcome`` ("holds", "fails" or "outside"), ``holds`` (bool;
    False when outside), ``outside`` (bool), ``sides`` (exact texts of the two sides of
    a top-level comparison, as :func:`~verifier.claims.values.describe_value` writes
    them), ``witness`` (the deciding binding of a quantifier or the first differing
    matrix entry, JSON-ready) and ``evidence`` ("exact").

    Raises the claim language's errors: :class:`~verifier.claims.errors.ExpressionError`
    for a statement that does not parse, :class:`~verifier.claims.errors.EvaluationError`
    (and its subclass ``LimitExceeded``) when a case cannot be evaluated.

    >>> result = evaluate_claim_independently("sum(green(K)) == euler(K)", {"K": [[1, 2]]})
    >>> result["holds"], result["sides"]
    (True, ['1', '1'])

    Notes: the cost is that of the functions called.  Reference: SPEC.md section 8
    (independent re-checking).
    """
    types = {name: "complex" for name in variables}
    node = parse_condition(statement, types)
    condition = (parse_condition(where, types, what="'where'") if where is not None
                 else None)
    env = {name: Complex.from_facets([[_label(v) for v in facet] for facet in facets])
           for name, facets in variables.items()}
    limits = limits or Limits()
    if condition is not None and not evaluate(condition, env, Context(limits, IMPLEMENTATIONS)):
        return {"outcome": "outside", "holds": False, "outside": True, "sides": [],
                "witness": None, "evidence": "exact"}
    outcome = evaluate_claim(node, env, Context(limits, IMPLEMENTATIONS))
    result = {"outcome": "holds" if outcome.holds else "fails", "holds": outcome.holds,
              "outside": False, "sides": list(outcome.sides),
              "witness": _plain(outcome.witness), "evidence": outcome.evidence}
    if outcome.certified:
        result["certified"] = outcome.certified
    return result


def _problem(outcome: str, message: str) -> dict:
    return {"outcome": outcome, "holds": None, "outside": False, "sides": [], "witness": None,
            "evidence": None, "message": message}


def run_task(task: dict) -> dict:
    """One re-check task as plain data: the result of
    :func:`evaluate_claim_independently`, or, when the claim cannot be evaluated on the
    case, ``outcome`` "error" or "limit" with a ``message`` and ``holds`` None (the same
    outcomes and messages the runner records).

    >>> run_task({"statement": "det(hodge(K)) == 0", "variables": {"K": [[1]]}})["outcome"]
    'holds'
    >>> run_task({"statement": "zeta(hodge(K), 1) == 0", "variables": {"K": [[1]]}})["message"]
    'zeta: matrix is singular'

    A task may carry ``witnesses`` (see :func:`validate_tasks`), verified before use by
    :func:`homology`, :func:`torsion` and :func:`betti` on large complexes.
    """
    use_witnesses(task.get("witnesses"))
    try:
        return evaluate_claim_independently(task["statement"], task["variables"],
                                            task.get("where"))
    except ComplexError as error:
        return _problem("error", f"building the case: {error}")
    except Undecided as error:
        return _problem("undecided", error.message)
    except LimitExceeded as error:
        return _problem("limit", f"{error.limit}: {error.message}")
    except ClaimError as error:
        return _problem("error", error.message)
    except RecursionError:
        return _problem("limit", "max_depth: recursion too deep")
    except MemoryError:
        return _problem("limit", "memory: the case needed more memory than the re-check "
                                 "process may use")


# ------------------------------------------------------------------- client
class RecheckInputError(ValueError):
    """A re-check task is malformed (says which task and what is wrong)."""


class RecheckError(RuntimeError):
    """The re-check process failed, timed out, or could not guarantee independence."""


class RecheckRun:
    """What one re-check process returned: ``results`` (one dict per task) and
    ``report`` (whether python-flint was loaded, sympy's ground types, timings)."""

    __slots__ = ("results", "report")

    def __init__(self, results: list[dict], report: dict):
        self.results, self.report = results, report

    def __repr__(self):
        return f"RecheckRun({len(self.results)} results, report={self.report!r})"


def validate_tasks(tasks) -> list[dict]:
    """Check re-check tasks before any process starts; returns them as a list.

    A task is ``{"statement": text, "variables": {name: [[label, ...], ...]},
    "where": text or None}``; labels are integers, strings, or lists of those (tuples).
    An optional ``"witnesses"`` maps complex keys
    (:func:`verifier.independent.homology.complex_key`) to ``morse/1`` homology
    witnesses computed by the main backend; they are verified, never trusted.

    >>> validate_tasks([{"statement": "euler(K) == 1", "variables": {"K": [[1]]}}])[0]["where"] is None
    True
    >>> validate_tasks([{"statement": "euler(K) == 1", "variables": {"K": [1]}}])
    Traceback (most recent call last):
    ...
    verifier.independent.claims.RecheckInputError: task 0: variable 'K' must be a list of facets (lists of labels)
    """
    checked = []
    for number, task in enumerate(tasks):
        where = f"task {number}"
        if not isinstance(task, dict):
            raise RecheckInputError(f"{where}: expected an object, got {type(task).__name__}")
        unknown = sorted(set(task) - {"statement", "variables", "where", "witnesses"})
        if unknown:
            raise RecheckInputError(f"{where}: unknown field {unknown[0]!r}; valid fields are "
                                    "'statement', 'variables', 'where' and 'witnesses'")
        witnesses = task.get("witnesses") or {}
        if not isinstance(witnesses, dict) or not all(
                isinstance(k, str) and isinstance(w, dict) for k, w in witnesses.items()):
            raise RecheckInputError(f"{where}: 'witnesses' must map complex keys to "
                                    "witness objects")
        if not isinstance(task.get("statement"), str):
            raise RecheckInputError(f"{where}: 'statement' must be the claim's text")
        if task.get("where") is not None and not isinstance(task["where"], str):
            raise RecheckInputError(f"{where}: 'where' must be text or null")
        variables = task.get("variables")
        if not isinstance(variables, dict):
            raise RecheckInputError(f"{where}: 'variables' must map names to facet lists")
        for name, facets in variables.items():
            if not isinstance(facets, list) or not all(isinstance(f, list) for f in facets):
                raise RecheckInputError(f"{where}: variable {name!r} must be a list of facets "
                                        "(lists of labels)")
        entry = {"statement": task["statement"], "variables": variables,
                 "where": task.get("where")}
        if witnesses:
            entry["witnesses"] = witnesses
        checked.append(entry)
    return checked


def recheck_run(tasks, timeout: float | None = None) -> RecheckRun:
    """Re-check claim cases in a separate process that never loads python-flint.

    Starts ``python -m verifier.independent.recheck`` with ``SYMPY_GROUND_TYPES=python``,
    sends the tasks (see :func:`validate_tasks`) as JSON and reads one result per task
    (see :func:`run_task`) and the process's report.

    Parameters: ``tasks`` -- a list of task dicts; ``timeout`` -- seconds for the whole
    batch (None: no limit).  Returns: :class:`RecheckRun`.
    Raises :class:`RecheckInputError` for malformed tasks (before any process starts),
    :class:`RecheckError` when the process fails, times out, reports that python-flint
    was loaded, or that sympy ran with other ground types than 'python'.

    >>> run = recheck_run([{"statement": "wu(K) == -1", "variables": {"K": [[1, 2]]}}])
    >>> run.results[0]["holds"], run.report["flint_in_sys_modules"]
    (True, False)

    Notes: one process start (about half a second) per call, one process per core for
    batches of 16 tasks or more; batch many tasks.  Reference: sympy documentation,
    "Ground types" (why a separate process is needed).
    """
    tasks = validate_tasks(tasks)
    from .process import call
    share = _processes(len(tasks))
    parts = [tasks[i::share] for i in range(share)]      # interleaved: similar sizes

    def one(part):
        return call("verifier.independent.recheck", {"tasks": part}, timeout, RecheckError,
                    "the re-check process")

    if share == 1:
        answers = [one(parts[0])]
    else:
        from concurrent.futures import ThreadPoolExecutor
        with ThreadPoolExecutor(share) as pool:
            answers = list(pool.map(one, parts))
    results: list = [None] * len(tasks)
    for i, (part, answer) in enumerate(zip(parts, answers)):
        got = answer.get("results", [])
        if len(got) != len(part):
            raise RecheckError(f"the re-check process answered {len(got)} of {len(part)} tasks")
        results[i::share] = got
    report = dict(answers[0].get("report", {}))
    if share > 1:
        report["processes"] = share
    return RecheckRun(results, report)


def _processes(count: int) -> int:
    """Re-check processes for ``count`` tasks: one per core (at most 4) for big batches."""
    import os
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    return max(1, min(4, cores or 1, count // 8))


def recheck(tasks, timeout: float | None = None) -> list[dict]:
    """Re-check claim cases without python-flint; one result dict per task.

    Same as :func:`recheck_run` but returns only the results.

    >>> recheck([{"statement": "betti(K, 1) == 1", "variables": {"K": [[1, 2], [2, 3], [1, 3]]}}])
    [{'outcome': 'holds', 'holds': True, 'outside': False, 'sides': ['1', '1'], 'witness': None, 'evidence': 'exact'}]

    Notes and reference: see :func:`recheck_run`.
    """
    return recheck_run(tasks, timeout).results

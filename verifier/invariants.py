"""Invariants of finite abstract simplicial complexes, computed exactly.

Each function is small and pure: it takes an immutable :class:`~verifier.complex.Complex`
(or a matrix / polynomial built from one) and returns an exact value -- an ``int``, a
``fractions.Fraction``, a tuple, or a :class:`~verifier.exact.Matrix` /
:class:`~verifier.exact.Poly`.  Matrices are indexed by ``K.simplices`` (ordered by
dimension, then lexicographically).

Notation: for a simplex x with k+1 vertices, dim x = k and omega(x) = (-1)^k.
St(x) = {z in K : x subset of z} is the (open) star; chi(A) = sum of omega over a set A.

References
----------
.. [EC]  L. Euler (1758); H. Poincare (1895): chi = sum_k (-1)^k f_k = sum_k (-1)^k b_k.
.. [Wu]  W. Wu, "Topologie combinatoire et invariants combinatoires",
         Colloq. Math. 7 (1959) 1-8.
.. [GB]  O. Knill, "Gauss-Bonnet for multi-linear valuations", arXiv:1601.04533 (2016).
.. [FD]  O. Knill, "On Fredholm determinants in topology", arXiv:1612.08229 (2016).
.. [HE]  O. Knill, "One can hear the Euler characteristic of a simplicial complex",
         arXiv:1711.09527 (2017).
.. [EN]  O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
         96-129, arXiv:1907.03369.
.. [HY]  O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018).
.. [MS]  O. Knill, "The McKean-Singer formula in graph theory", arXiv:1301.1408 (2013).
.. [LE]  N. Levitt, "The Euler characteristic is the unique locally determined numerical
         homotopy invariant of finite complexes", Discrete Comput. Geom. 7 (1992) 59-67.
.. [PH]  O. Knill, "A graph theoretical Poincare-Hopf theorem", arXiv:1201.1162 (2012).
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from collections.abc import Iterable
from fractions import Fraction
from itertools import combinations

import numpy as np

from . import exact, operations
from .complex import Complex
from .exact import Matrix, Poly, Verdict

__all__ = [
    "simplices", "vertices", "facets", "omega", "dim", "size", "f_vector", "euler", "wu",
    "connection", "green", "green_many", "green_by_inversion", "fredholm", "boundary_matrix",
    "exterior_derivative", "dirac", "hodge", "signless_dirac", "signless_hodge", "betti",
    "charpoly", "is_reciprocal", "det", "trace", "rank", "kernel_dim", "positive", "negative",
    "signature", "multiplicity", "zeta", "curvature", "index", "indices", "is_closed_manifold",
    "is_manifold_with_boundary", "is_manifold", "is_sphere", "is_ball", "NotDecided",
]


class NotDecided(ValueError):
    """A yes/no invariant that our methods cannot decide for this input (says why)."""


# --------------------------------------------------------------------- counting
def omega(x) -> int:
    """The sign (-1)^dim x of a simplex x (a tuple of vertices).

    >>> omega((0,)), omega((0, 1)), omega((0, 1, 2))
    (1, -1, 1)
    """
    return -1 if len(x) % 2 == 0 else 1


def simplices(K: Complex) -> tuple[tuple, ...]:
    """All simplices of K in the user's vertex labels, ordered by (dimension, lex).

    >>> simplices(Complex.from_facets([[1, 2]]))
    ((1,), (2,), (1, 2))
    """
    return tuple(K.label_of(s) for s in K.simplices)


def vertices(K: Complex) -> tuple:
    """The vertex labels of K, in order.

    >>> vertices(Complex.from_facets([["b", "a"]]))
    ('a', 'b')
    """
    return K.labels


def facets(K: Complex) -> tuple[tuple, ...]:
    """The maximal simplices of K in the user's labels, ordered by (dimension, lex).

    >>> facets(Complex.from_facets([[1, 2, 3], [3, 4]]))
    ((3, 4), (1, 2, 3))
    """
    return tuple(K.label_of(s) for s in K.facets)


def dim(K: Complex) -> int:
    """The dimension of K: the largest dim of a simplex, -1 when K is empty.

    >>> dim(Complex.from_facets([[1, 2, 3], [3, 4]]))
    2
    """
    return K.dim


def size(K: Complex) -> int:
    """The number of simplices of K (the order of its connection matrix).

    >>> size(Complex.from_facets([[1, 2]]))
    3
    """
    return len(K.simplices)


def f_vector(K: Complex) -> tuple[int, ...]:
    """(f_0, ..., f_d): f_k is the number of k-dimensional simplices.

    >>> f_vector(Complex.from_facets([[1, 2, 3], [3, 4]]))
    (4, 4, 1)
    """
    return K.f_vector


def euler(K: Complex | Iterable) -> int:
    """The Euler characteristic chi = sum over simplices x of omega(x).

    Accepts a complex or any collection of simplices (a star, an interior, ...);
    for a complex this is f_0 - f_1 + f_2 - ... [EC].

    >>> euler(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))   # a circle
    0
    >>> euler([(0,), (0, 1)])                                  # a half-open edge
    0

    References: [EC].
    """
    if isinstance(K, Complex):
        return sum((-1) ** k * f for k, f in enumerate(K.f_vector))
    return sum(omega(x) for x in K)


def _omega_vector(K: Complex) -> np.ndarray:
    """omega(x) for every simplex, in simplex order."""
    return 1 - 2 * (np.asarray(K.dims, dtype=np.int64) % 2)


def _star_euler(K: Complex) -> list[int]:
    """chi(St(z)) = sum over simplices containing z of omega, for every simplex z."""
    faces, cofaces = K.containments()
    chi = np.bincount(faces, weights=_omega_vector(K)[cofaces], minlength=len(K.simplices))
    return [int(round(c)) for c in chi]   # integer sums of +-1 below 2^53: exact


def wu(K: Complex) -> int:
    """The Wu characteristic: the sum of omega(x) omega(y) over ordered pairs of
    intersecting simplices x, y.

    Computed as sum over z of omega(z) chi(St(z))^2, which is the same number because the
    connection matrix factors as L = Z^T diag(omega) Z with Z the containment matrix
    (see :func:`connection`).  For a d-manifold with boundary, wu(K) = chi(K) - chi(boundary);
    for closed manifolds it equals chi [GB].

    >>> wu(Complex.from_facets([[1, 2]]))      # chi - chi(two endpoints) = 1 - 2
    -1

    References: [Wu], [GB].
    """
    return sum(omega(z) * c * c for z, c in zip(K.simplices, _star_euler(K)))


# ------------------------------------------------------------ connection, green
def _vertex_incidence(K: Complex) -> Matrix:
    rows, cols = K.vertex_incidence()
    return Matrix.from_entries((len(K.simplices), K.n_vertices), rows, cols,
                               np.ones(len(rows), dtype=np.int64))


def connection(K: Complex) -> Matrix:
    """The connection matrix L: L[x, y] = 1 if the simplices x and y intersect, else 0.

    L = 1 + A with A the adjacency matrix of the connection graph.  It is unimodular:
    det L = prod_x omega(x) [FD]; its inverse is the Green function (:func:`green`).

    >>> connection(Complex.from_facets([[1, 2]])).rows()    # order: 1, 2, {1,2}
    [[1, 0, 1], [0, 1, 1], [1, 1, 1]]

    Built sparse as the support of V V^T, V the simplex-vertex incidence matrix.
    References: [FD], [EN].
    """
    if not K.simplices:
        return Matrix.zeros(0)
    V = _vertex_incidence(K)
    return (V @ V.T).support()   # (V V^T)[x, y] = number of common vertices


def fredholm(K: Complex) -> int:
    """det L, the Fredholm characteristic; equals prod_x omega(x) [FD].

    Computed by the exact symmetric elimination of L (every pivot is +-1).

    >>> fredholm(Complex.from_facets([[1, 2]]))
    -1
    """
    return exact.det(connection(K))


def _containment_mobius(K: Complex) -> Matrix:
    """M[x, z] = (-1)^(dim z - dim x) if x is a face of z: the inverse of the containment
    matrix Z[x, z] = [x subset of z] (Mobius inversion on the face poset)."""
    faces, cofaces = K.containments()
    w = _omega_vector(K)
    n = len(K.simplices)
    return Matrix.from_entries((n, n), faces, cofaces, w[faces] * w[cofaces])


def green(K: Complex) -> Matrix:
    """The Green function g = L^-1, exactly, with its check L g = I.

    Star formula [EN]: g(x, y) = omega(x) omega(y) chi(St(x) cap St(y)), nonzero only when
    x cup y is a simplex.  In matrix form g = M diag(omega) M^T with M the Mobius matrix of
    the face poset, because L = Z^T diag(omega) Z.  The candidate is accepted only after
    L g = I is verified in exact integer arithmetic; if that ever failed, g would come from
    an exact inversion instead.

    >>> green(Complex.from_facets([[1, 2]])).rows()
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]

    Notes: cost is that of two sparse integer products; g is as sparse as L.
    References: [EN].
    """
    n = len(K.simplices)
    if n == 0:
        return Matrix.zeros(0)
    M = _containment_mobius(K)
    signs = Matrix.from_entries((n, n), np.arange(n), np.arange(n), _omega_vector(K))
    candidate = M @ signs @ M.T
    L = connection(K)
    if exact.is_inverse(L, candidate):
        return candidate.with_provenance("star formula, verified L*g = I exactly")
    return green_by_inversion(K)


def green_many(complexes: Iterable[Complex], small: int = 200) -> list[Matrix]:
    """The Green functions of many complexes at once (the same values as :func:`green`).

    Complexes with at most ``small`` simplices are grouped by size and the star formula
    g = diag(omega) Z diag(omega) Z^T diag(omega) is evaluated for a whole group with
    stacked floating-point products (Z the containment matrix, read off as the entries of
    V V^T equal to |x|, V the simplex-vertex incidence); every candidate is accepted
    only after the exact check L g = I (:func:`verifier.exact.verified_inverse_batch`).
    Larger complexes, and any candidate that failed, go through :func:`green`.  This is
    the fast path for families of many small complexes.

    >>> [g.total() for g in green_many([Complex.from_facets([[1, 2]]), Complex.from_facets([[1], [2]])])]
    [1, 2]
    """
    complexes = list(complexes)
    result: list[Matrix | None] = [None] * len(complexes)
    groups: dict[int, list[int]] = {}
    for position, K in enumerate(complexes):
        if 0 < len(K.simplices) <= small:
            groups.setdefault(len(K.simplices), []).append(position)
    for n, members in groups.items():
        width = max(complexes[p].n_vertices for p in members)
        V = np.zeros((len(members), n, width))
        for k, p in enumerate(members):
            rows, cols = complexes[p].vertex_incidence()
            V[k, rows, cols] = 1.0
        shared = np.matmul(V, V.transpose(0, 2, 1))       # common vertices of x and y
        sizes = V.sum(axis=2)
        Z = (shared == sizes[:, :, None]).astype(np.float64)  # Z[x, z] = [x is a face of z]
        L = (shared > 0).astype(np.float64)
        w = 1.0 - 2.0 * ((sizes - 1) % 2)                 # omega
        G = np.matmul(Z * w[:, None, :], Z.transpose(0, 2, 1)) * w[:, :, None] * w[:, None, :]
        for p, g, ok in zip(members, G, exact.verified_inverse_batch(L, G)):
            if ok:
                result[p] = Matrix.from_array(g.astype(np.int64)).with_provenance(
                    "star formula (batched), verified L*g = I exactly")
    return [g if g is not None else green(K) for g, K in zip(result, complexes)]


def green_by_inversion(K: Complex) -> Matrix:
    """g = L^-1 by exact general inversion (the baseline the star formula is checked against)."""
    return exact.inverse(connection(K))


# ------------------------------------------------------------- Hodge and Dirac
def boundary_matrix(K: Complex, k: int) -> Matrix:
    """The signed boundary matrix d_k from k-chains to (k-1)-chains.

    Rows are the (k-1)-simplices and columns the k-simplices, each in simplex order;
    the boundary of [v_0, ..., v_k] (v_0 < ... < v_k) is sum_i (-1)^i [v_0..^v_i..v_k].
    For k = 0 or k > dim K the matrix has no rows or no columns.

    >>> boundary_matrix(Complex.from_facets([[1, 2, 3]]), 2).rows()
    [[1], [-1], [1]]

    References: [MU] §5.
    """
    if k < 0:
        raise ValueError("boundary_matrix needs k >= 0")
    f = K.f_vector
    rows_n = f[k - 1] if 1 <= k <= len(f) else 0
    cols_n = f[k] if k < len(f) else 0
    if rows_n == 0 or cols_n == 0:
        return Matrix.zeros(rows_n, cols_n)
    offset_rows = sum(f[:k - 1])
    offset_cols = sum(f[:k])
    index = K.index
    rows, cols, values = [], [], []
    for j in range(cols_n):
        s = K.simplices[offset_cols + j]
        for i in range(len(s)):
            rows.append(index[s[:i] + s[i + 1:]] - offset_rows)
            cols.append(j)
            values.append(1 if i % 2 == 0 else -1)
    return Matrix.from_entries((rows_n, cols_n), rows, cols, values)


def _full_boundary(K: Complex, signed: bool) -> Matrix:
    """The boundary operator on all chains, as an n x n matrix in simplex order."""
    index = K.index
    rows, cols, values = [], [], []
    for j, s in enumerate(K.simplices):
        if len(s) == 1:
            continue
        for i in range(len(s)):
            rows.append(index[s[:i] + s[i + 1:]])
            cols.append(j)
            values.append(1 if (i % 2 == 0 or not signed) else -1)
    n = len(K.simplices)
    return Matrix.from_entries((n, n), rows, cols, values)


def exterior_derivative(K: Complex) -> Matrix:
    """The exterior derivative d on all cochains: the transpose of the full boundary matrix.

    >>> exterior_derivative(Complex.from_facets([[1, 2]])).rows()
    [[0, 0, 0], [0, 0, 0], [-1, 1, 0]]
    """
    return _full_boundary(K, signed=True).T


def dirac(K: Complex) -> Matrix:
    """The Dirac operator D = d + d^T on all simplices [MS].

    >>> dirac(Complex.from_facets([[1, 2]])).rows()
    [[0, 0, -1], [0, 0, 1], [-1, 1, 0]]
    """
    d = exterior_derivative(K)
    return d + d.T


def hodge(K: Complex) -> Matrix:
    """The Hodge Laplacian H = D^2 = d d^T + d^T d, block diagonal by dimension [MS].

    The nullity of the block on k-simplices is the Betti number b_k (Hodge theorem).

    >>> hodge(Complex.from_facets([[1, 2]])).rows()
    [[1, -1, 0], [-1, 1, 0], [0, 0, 2]]
    """
    D = dirac(K)
    return D @ D


def signless_dirac(K: Complex) -> Matrix:
    """|D| = |d| + |d|^T, the Dirac operator with every sign removed [HY]."""
    d = _full_boundary(K, signed=False).T
    return d + d.T


def signless_hodge(K: Complex) -> Matrix:
    """The signless Hodge operator |H| = |D|^2 [HY].

    Hydrogen identity [HY]: for a 1-dimensional complex, L - L^-1 = |H|.

    >>> signless_hodge(Complex.from_facets([[1, 2]])).rows()
    [[1, 1, 0], [1, 1, 0], [0, 0, 2]]
    """
    D = signless_dirac(K)
    return D @ D


# --------------------------------------------------------------------- homology
def betti(K: Complex, k: int | None = None, p: int = 0):
    """Betti numbers b_k = dim H_k(K; F) over F = Q (p = 0) or F = Z/p (p prime).

    b_k = f_k - rank d_k - rank d_(k+1) with d_k the boundary matrices, ranks exact over
    the field.  Unreduced homology: b_0 is the number of connected components.
    Returns the tuple (b_0, ..., b_dim) when k is None, else b_k (0 outside 0..dim).

    >>> betti(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    (1, 1)
    >>> betti(Complex.from_facets([[1, 2], [2, 3], [1, 3]]), 1)
    1

    References: [MU] §5, §7.
    """
    def rank(M: Matrix) -> int:
        return exact.rank(M) if p == 0 else exact.rank_mod(M, p)

    f = K.f_vector
    ranks = [0] + [rank(boundary_matrix(K, j)) for j in range(1, len(f))] + [0]
    numbers = tuple(f[j] - ranks[j] - ranks[j + 1] for j in range(len(f)))
    if k is None:
        return numbers
    return numbers[k] if 0 <= k < len(numbers) else 0


# --------------------------------------------------------------------- spectra
def charpoly(M: Matrix) -> Poly:
    """The characteristic polynomial det(x I - M), exact.

    >>> str(charpoly(connection(Complex.from_facets([[1, 2]]))))
    'x^3 - 3*x^2 + x + 1'
    """
    return exact.charpoly(M)


def is_reciprocal(p: Poly | Matrix, *, square: bool = False) -> bool | Verdict:
    """Is the polynomial p reciprocal, p(x) = +-x^n p(1/x)?

    Given a Poly the answer is an exact bool.  Given a matrix M the question is asked of
    its characteristic polynomial (of M^2 when ``square``) and the answer is a
    :class:`~verifier.exact.Verdict` with its evidence level: exact for small matrices,
    a randomized test with a stated error bound for large ones.

    >>> is_reciprocal(Poly([1, -3, 1]))
    True
    """
    if isinstance(p, Poly):
        return p.is_reciprocal()
    return exact.charpoly_is_reciprocal(p, square=square)


def signature(M: Matrix) -> tuple[int, int, int]:
    """(positive, negative, zero) eigenvalue counts of a symmetric matrix, exact.

    For L the counts are (number of even-, number of odd-dimensional simplices, 0), so
    positive - negative = chi [HE].

    >>> signature(connection(Complex.from_facets([[1, 2]])))
    (2, 1, 0)
    """
    return exact.signature(M)


def det(M: Matrix):
    """The exact determinant of a square matrix.

    >>> det(connection(Complex.from_facets([[1, 2]])))
    -1
    """
    return exact.det(M)


def trace(M: Matrix):
    """The exact trace of a square matrix.

    >>> trace(hodge(Complex.from_facets([[1, 2]])))
    4
    """
    return M.trace()


def rank(M: Matrix) -> int:
    """The exact rank over Q.

    >>> rank(boundary_matrix(Complex.from_facets([[1, 2], [2, 3], [1, 3]]), 1))
    2
    """
    return exact.rank(M)


def kernel_dim(M: Matrix) -> int:
    """The dimension of the null space over Q (columns minus rank).

    >>> kernel_dim(hodge(Complex.from_facets([[1, 2], [2, 3], [1, 3]])))   # b_0 + b_1
    2
    """
    return exact.kernel_dim(M)


def positive(M: Matrix) -> int:
    """The number of positive eigenvalues of a symmetric matrix, exact.

    >>> positive(connection(Complex.from_facets([[1, 2]])))
    2
    """
    return exact.signature(M)[0]


def negative(M: Matrix) -> int:
    """The number of negative eigenvalues of a symmetric matrix, exact.

    >>> negative(connection(Complex.from_facets([[1, 2]])))
    1
    """
    return exact.signature(M)[1]


def multiplicity(M: Matrix, value) -> int:
    """The multiplicity of the rational number ``value`` as an eigenvalue of M, exact.

    >>> multiplicity(connection(Complex.from_facets([[1, 2]])), 1)
    1
    """
    return exact.multiplicity(M, value)


def zeta(M: Matrix, s: int):
    """The spectral zeta value zeta(s) = sum over eigenvalues of lambda^-s = tr M^-s,
    for an integer s and an invertible M (exact rational).

    >>> zeta(connection(Complex.from_facets([[1, 2]])), 1)   # tr g
    -1
    """
    if not isinstance(s, int):
        raise ValueError("zeta is evaluated exactly at integers only")
    return (M ** (-s)).trace()


# -------------------------------------------------------------- local geometry
def _vertex(K: Complex, v) -> int:
    """Vertex index from an index or a one-element simplex."""
    if isinstance(v, tuple):
        if len(v) != 1:
            raise ValueError(f"{v!r} is not a vertex")
        v = v[0]
    if not (isinstance(v, int) and 0 <= v < K.n_vertices):
        raise ValueError(f"{v!r} is not a vertex index of this complex")
    return v


def curvature(K: Complex, v, form: str = "link") -> Fraction:
    """Levitt curvature at the vertex v (an index).

    K(v) = sum_{k >= 0} (-1)^k f_{k-1}(S(v)) / (k + 1), with f_{-1} = 1, where S(v) is
    the link of v (``form="link"``, general complexes) or the unit sphere of v in the
    1-skeleton taken as a flag complex (``form="graph"``, equal to the link for flag
    complexes).  The link form equals sum over simplices x containing v of omega(x)/|x|,
    so Gauss-Bonnet sum_v K(v) = chi holds for every complex; the graph form only for
    flag complexes (a hollow triangle has graph curvatures 1/3 each) [LE].

    >>> [curvature(Complex.from_facets([[1, 2], [2, 3], [1, 3]]), v) for v in range(3)]
    [Fraction(0, 1), Fraction(0, 1), Fraction(0, 1)]

    References: [LE]; O. Knill, "A graph theoretical Gauss-Bonnet-Chern theorem",
    arXiv:1111.5395 (2011).
    """
    v = _vertex(K, v)
    if form == "link":
        return sum((Fraction(omega(K.simplices[j]), len(K.simplices[j]))
                    for j in K.vertex_stars()[v]), Fraction(0))
    if form == "graph":
        sphere = operations.graph_unit_sphere(K, v)
        return Fraction(1) + sum((Fraction((-1) ** (k + 1) * f, k + 2)
                                  for k, f in enumerate(sphere.f_vector)), Fraction(0))
    raise ValueError(f"unknown form {form!r}; use 'link' or 'graph'")


def _values(K: Complex, f) -> list:
    values = [f[v] for v in range(K.n_vertices)] if not isinstance(f, dict) else \
        [f[label] for label in K.labels]
    if len(set(values)) != len(values):
        raise ValueError("the function must be injective on vertices")
    return values


def index(K: Complex, f, v, form: str = "link") -> int:
    """Poincare-Hopf index of an injective function f on the vertices at the vertex v.

    i_f(v) = 1 - chi(S^-(v)), where S^-(v) is the part of the link of v spanned by the
    vertices w with f(w) < f(v) (``form="link"``), or the flag complex of the lower part
    of the unit sphere in the 1-skeleton (``form="graph"``, for flag complexes).  With the
    link, every simplex is counted at its vertex of largest f, so sum_v i_f(v) = chi
    holds for every complex [PH].

    f is a dict {label: value} or a sequence indexed by vertex index.

    >>> K = Complex.from_facets([[1, 2], [2, 3], [1, 3]])
    >>> [index(K, [0, 1, 2], v) for v in range(3)]
    [1, 0, -1]

    References: [PH].
    """
    v = _vertex(K, v)
    values = _values(K, f)
    if form == "link":
        below = [x for x in K.simplices
                 if all(values[w] < values[v] for w in x) and tuple(sorted(x + (v,))) in K.index]
        return 1 - euler(below)
    if form == "graph":
        sphere = operations.graph_unit_sphere(K, v)
        lower = [x for x in sphere.simplices
                 if all(values[K.simplex_of([sphere.labels[w]])[0]] < values[v] for w in x)]
        return 1 - euler(lower)
    raise ValueError(f"unknown form {form!r}; use 'link' or 'graph'")


def indices(K: Complex, f, form: str = "link") -> list[int]:
    """The Poincare-Hopf indices of f at all vertices, in vertex order (see :func:`index`)."""
    return [index(K, f, v, form) for v in range(K.n_vertices)]


# -------------------------------------------------------------- manifold tests
def _components(K: Complex) -> int:
    import networkx as nx
    return nx.number_connected_components(K.graph()) if K.n_vertices else 0


def _collapses_to_point(simplices: set[tuple[int, ...]], attempts: int = 8) -> bool:
    """Greedy elementary collapses in up to ``attempts`` fixed orders (the natural one,
    then seeded shuffles); True as soon as one reaches a single vertex -- a witness that
    the complex is collapsible.  False means only that every order tried got stuck."""
    import random
    for attempt in range(attempts):
        order = sorted(simplices, key=lambda s: (-len(s), s))
        if attempt:
            random.Random(attempt).shuffle(order)
            order.sort(key=len, reverse=True)
        if _greedy_collapse(simplices, order):
            return True
    return False


def _greedy_collapse(simplices: set[tuple[int, ...]], order: list) -> bool:
    """One greedy sequence of elementary collapses, free faces taken in ``order``."""
    alive = set(simplices)
    cofaces: dict = {s: set() for s in alive}
    for s in alive:
        if len(s) > 1:
            for face in combinations(s, len(s) - 1):
                cofaces[face].add(s)
    changed = True
    while changed and len(alive) > 1:
        changed = False
        for s in order:
            if s not in alive or len(cofaces[s]) != 1:
                continue
            (t,) = cofaces[s]
            if len(t) != len(s) + 1 or cofaces[t]:
                continue
            for x in (s, t):  # remove the free pair
                alive.discard(x)
                if len(x) > 1:
                    for face in combinations(x, len(x) - 1):
                        cofaces[face].discard(x)
            changed = True
    return len(alive) == 1


def is_sphere(K: Complex, d: int | None = None) -> bool:
    """Is K a combinatorial (PL) d-sphere?  d defaults to dim K.

    Method: d <= 0 by counting; d = 1: connected, every vertex of degree 2; d = 2: a
    connected closed surface with chi = 2 (classification of surfaces); d >= 3: a closed
    combinatorial d-manifold whose deletion of one facet collapses to a point (greedy
    collapses; then it is a PL ball plus a simplex, a PL sphere).  When the greedy
    collapse gets stuck the question is not decided: NotDecided is raised.

    >>> is_sphere(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    True
    """
    d = K.dim if d is None else d
    if d == -1:
        return len(K.simplices) == 0
    if K.dim != d or not K.is_pure():
        return False
    if d == 0:
        return K.n_vertices == 2
    if d == 1:
        degrees = [0] * K.n_vertices
        for s in K.facets:
            for v in s:
                degrees[v] += 1
        return all(x == 2 for x in degrees) and _components(K) == 1
    if not is_closed_manifold(K) or _components(K) != 1:
        return False
    if d == 2:
        return euler(K) == 2
    if euler(K) != (2 if d % 2 == 0 else 0) or any(betti(K, p=2)[1:d]):
        return False
    if _collapses_to_point(set(K.simplices) - {K.facets[0]}):
        return True
    raise NotDecided(f"could not decide whether a {d}-manifold with the homology of a sphere "
                     "is a PL sphere (greedy collapse got stuck)")


def is_ball(K: Complex, d: int | None = None) -> bool:
    """Is K a combinatorial (PL) d-ball?  d defaults to dim K.

    Method: d = 0: one vertex; d = 1: a path; d = 2: a connected surface with nonempty
    boundary and chi = 1 (only the disc); d >= 3: a d-manifold with boundary, boundary a
    sphere, collapsing greedily to a point (a collapsible PL manifold is a ball);
    otherwise NotDecided.

    >>> is_ball(Complex.from_facets([[1, 2, 3]]))
    True
    """
    d = K.dim if d is None else d
    if K.dim != d or not K.is_pure() or d < 0:
        return False
    if d == 0:
        return K.n_vertices == 1
    if _components(K) != 1:
        return False
    if d == 1:
        degrees = [0] * K.n_vertices
        for s in K.facets:
            for v in s:
                degrees[v] += 1
        return max(degrees) <= 2 and degrees.count(1) == 2
    if not is_manifold_with_boundary(K):
        return False
    if d == 2:
        return euler(K) == 1
    if euler(K) != 1 or not is_sphere(operations.boundary(K), d - 1):
        return False
    if _collapses_to_point(set(K.simplices)):
        return True
    raise NotDecided(f"could not decide whether a {d}-manifold with sphere boundary is a ball "
                     "(greedy collapse got stuck)")


def _links_all(K: Complex, test) -> bool:
    return all(test(operations.link(K, (v,))) for v in range(K.n_vertices))


def is_closed_manifold(K: Complex) -> bool:
    """Is K a closed combinatorial manifold: pure of dimension d with every vertex link a
    (d-1)-sphere?

    Decided exactly for d <= 3 (links of dimension <= 2 are recognised by the
    classification of surfaces); for d >= 4 the link test uses :func:`is_sphere`'s
    collapse witness and may raise NotDecided.

    >>> is_closed_manifold(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    True
    >>> is_closed_manifold(Complex.from_facets([[1, 2, 3]]))
    False

    References: [MU] §35 (combinatorial manifolds, links).
    """
    d = K.dim
    if d < 0 or not K.is_pure():
        return False
    return _links_all(K, lambda S: is_sphere(S, d - 1))


def is_manifold(K: Complex) -> bool:
    """Is K a combinatorial d-manifold, with or without boundary: pure, and every vertex
    link a (d-1)-sphere or a (d-1)-ball?

    >>> is_manifold(Complex.from_facets([[1, 2, 3]])), is_manifold(Complex.from_facets([[1, 2], [1, 3], [1, 4]]))
    (True, False)

    References: [MU] §35.
    """
    d = K.dim
    if d < 0 or not K.is_pure():
        return False
    if d == 0:
        return True
    return _links_all(K, lambda S: is_sphere(S, d - 1) or is_ball(S, d - 1))


def is_manifold_with_boundary(K: Complex) -> bool:
    """Is K a combinatorial manifold with nonempty boundary (some vertex link a ball)?

    >>> is_manifold_with_boundary(Complex.from_facets([[1, 2, 3]]))
    True
    >>> is_manifold_with_boundary(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    False
    """
    return is_manifold(K) and not is_closed_manifold(K)

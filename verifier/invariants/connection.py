"""The connection matrix, its determinant and its inverse, the Green function.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [FD]  O. Knill, "On Fredholm determinants in topology", arXiv:1612.08229 (2016).
.. [EN]  O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
         96-129, arXiv:1907.03369.
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from .. import exact
from ..complex import Complex
from ..complex import MASK_MAX_VERTICES
from ..exact import Matrix, mask_kernels
from ..exact.matrix import DENSE_MAX
from ..exact.linalg import gram_support, gram_support_congruence_holds, inverse_by_congruence
from .counting import _omega_vector

__all__ = ["connection", "fredholm", "green", "green_many", "green_by_inversion"]

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

    Built sparse as the support of V V^T, V the simplex-vertex incidence matrix (row by
    row for large complexes, :func:`verifier.exact.linalg.gram_support`).  The
    matrix carries the proposed factorisation L = Z^T diag(omega) Z (Z the containment
    matrix, built only when asked for), which :func:`verifier.exact.signature` and
    :func:`verifier.exact.det` verify exactly before they use it.
    References: [FD], [EN].
    """
    if not K.simplices:
        return Matrix.zeros(0)
    n = len(K.simplices)
    V = _vertex_incidence(K)
    if n * n <= DENSE_MAX:
        L = (V @ V.T).support()  # (V V^T)[x, y] = number of common vertices
    else:                        # the same pattern, row by row without the product
        L = gram_support(V)
    return L.with_congruence(lambda: (_containment(K), _omega_vector(K)))


def _containment(K: Complex) -> Matrix:
    """Z[x, z] = 1 if x is a face of z (x = z included): unitriangular in simplex order."""
    faces, cofaces = K.containments()
    n = len(K.simplices)
    return Matrix.from_entries((n, n), faces, cofaces, np.ones(len(faces), dtype=np.int64))


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


LITERAL_CHECK_MAX = 20_000   # up to this many simplices L g = I is checked as a product
MASK_GREEN_MAX = 1_024       # up to this many simplices the bitmask kernels (dense n x n)
assert MASK_GREEN_MAX <= mask_kernels.MAX_ORDER   # where their int64 bound is proved


def green(K: Complex) -> Matrix:
    """The Green function g = L^-1, exactly, with its check L g = I.

    Star formula [EN]: g(x, y) = omega(x) omega(y) chi(St(x) cap St(y)), nonzero only when
    x cup y is a simplex.  In matrix form g = M diag(omega) M^T with M the Mobius matrix of
    the face poset, because L = Z^T diag(omega) Z.  The candidate is accepted only after
    L g = I is verified in exact integer arithmetic; if that ever failed, g would come from
    an exact inversion instead.

    >>> green(Complex.from_facets([[1, 2]])).rows()
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]

    Notes: complexes with at most ``MASK_GREEN_MAX`` simplices on at most
    ``MASK_MAX_VERTICES`` vertices take the bitmask kernels of
    :mod:`verifier.exact.mask_kernels`: the star formula summed over the faces of each
    simplex and the exact check L g = I (the product summed over faces by the binomial
    identity [x meets t] = sum over non-empty S in x and t of (-1)^(|S| + 1)), both in
    int64 arithmetic that provably cannot overflow there (partial sums <= n^3).
    Otherwise (:func:`green_general`), up to ``LITERAL_CHECK_MAX`` simplices the check is
    the product L g compared with I.  Beyond, that product costs sum over k of
    |column k of L| |row k of g| (4.4 * 10^9 multiply-adds for a 3-manifold with 226,208
    simplices, where L has 1.6 * 10^8 nonzeros), so L g = I is proved from checked
    factors instead: (1) L = Z^T D Z entry by entry against the definition of L (x and y
    share a vertex), without storing L
    (:func:`verifier.exact.linalg.gram_support_congruence_holds`); (2) Z M = M Z = I; then
    L g = Z^T D (Z M) D M^T = Z^T M^T = (M Z)^T = I exactly
    (:func:`verifier.exact.linalg.inverse_by_congruence`).  g is as sparse as the pairs x, y
    with x cup y a simplex.
    References: [EN].
    """
    n = len(K.simplices)
    if n == 0:
        return Matrix.zeros(0)
    if n <= MASK_GREEN_MAX and K.n_vertices <= MASK_MAX_VERTICES:
        candidate, verified = mask_kernels.checked_green(K.vertex_masks())
        if verified:     # entries at most n in absolute value: the int64 form holds them
            return Matrix((n, n), int64=candidate,
                          provenance="star formula, verified L*g = I exactly")
    return green_general(K)


def green_general(K: Complex) -> Matrix:
    """The Green function by the star formula with the general exact matrices (any size).

    The same value as :func:`green` (the path :func:`green` takes beyond the bitmask
    kernels, and the reference they are tested and timed against): g = M diag(omega) M^T
    built as sparse :class:`~verifier.exact.Matrix` products, accepted after L g = I is
    verified exactly, else exact inversion.

    >>> green_general(Complex.from_facets([[1, 2]])).rows()
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]
    """
    n = len(K.simplices)
    if n == 0:
        return Matrix.zeros(0)
    M = _containment_mobius(K)
    w = _omega_vector(K)
    if n > LITERAL_CHECK_MAX:
        Z = _containment(K)
        if gram_support_congruence_holds(_vertex_incidence(K), Z, w):
            candidate = inverse_by_congruence(Z, w, M)
            if candidate is not None:
                return candidate.with_provenance("star formula, verified L*g = I exactly")
        return green_by_inversion(K)
    signs = Matrix.from_entries((n, n), np.arange(n), np.arange(n), w)
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

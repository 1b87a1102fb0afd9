"""Boundary matrices, the exterior derivative, Dirac and Hodge operators.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [MS]  O. Knill, "The McKean-Singer formula in graph theory", arXiv:1301.1408 (2013).
.. [HY]  O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018).
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from ..complex import Complex
from ..exact import Matrix

__all__ = ["boundary_matrix", "exterior_derivative", "dirac", "hodge", "signless_dirac",
           "signless_hodge"]


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

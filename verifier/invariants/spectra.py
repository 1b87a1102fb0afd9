"""Exact spectral invariants of matrices: characteristic polynomial, signature, ...

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [HE]  O. Knill, "One can hear the Euler characteristic of a simplicial complex",
         arXiv:1711.09527 (2017).
.. [EN]  O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
         96-129, arXiv:1907.03369.
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from .. import exact
from ..exact import Matrix, Poly, Verdict

__all__ = ["charpoly", "is_reciprocal", "signature", "det", "trace", "rank", "kernel_dim",
           "positive", "negative", "multiplicity", "zeta"]


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

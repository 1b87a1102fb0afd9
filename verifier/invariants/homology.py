"""Homology.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from .. import exact
from ..complex import Complex
from ..exact import Matrix
from .hodge import boundary_matrix

__all__ = ["betti"]


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

"""Sizes of constructions, predicted from f-vectors before anything is built.

A construction that would exceed a memory cap is refused from these numbers, so that no
process ever starts building it.

* Barycentric refinement: the j-simplices of sd K are the chains s_0 < ... < s_j of
  faces; the chains that end at a fixed i-simplex are the ordered partitions of its i+1
  vertices into j+1 blocks, (j+1)! S(i+1, j+1) of them (S the Stirling numbers of the
  second kind), so f_j(sd K) = sum_i f_i (j+1)! S(i+1, j+1) [BR].
* Join: |A * B| = |A| + |B| + |A| |B| (every simplex of A, of B, and every union).
* Product (the order complex of the product of the face posets): the chains ending at
  a pair (s, t) depend only on |s| and |t|; :func:`product_size` counts them exactly.

>>> refined_f_vector((3, 3), 1)          # a triangle's boundary refined: a hexagon
(6, 6)
>>> sum(refined_f_vector((7, 21, 14), 4)) # the 7-vertex torus refined four times
54432
>>> product_size((2, 1), (2, 1))   # an edge times an edge: a square, 9 + 16 + 8 simplices
33

References
----------
.. [BR] F. Brenti and V. Welker, "f-vectors of barycentric subdivisions", Math. Z. 259
        (2008) 849-865 (the formula for f(sd K)).
"""

from __future__ import annotations

from functools import lru_cache
from math import comb, factorial

__all__ = ["refined_f_vector", "join_size", "product_size"]


@lru_cache(maxsize=None)
def _stirling2(n: int, k: int) -> int:
    if n == k:
        return 1
    if k == 0 or k > n:
        return 0
    return k * _stirling2(n - 1, k) + _stirling2(n - 1, k - 1)


def refined_f_vector(f: tuple[int, ...], times: int = 1) -> tuple[int, ...]:
    """The f-vector of the ``times``-fold barycentric refinement of a complex with f-vector f."""
    f = tuple(f)
    for _ in range(times):
        f = tuple(sum(f[i] * factorial(j + 1) * _stirling2(i + 1, j + 1)
                      for i in range(j, len(f))) for j in range(len(f)))
    return f


def join_size(a: int, b: int) -> int:
    """Number of simplices of the join of complexes with a and b simplices."""
    return a + b + a * b


@lru_cache(maxsize=None)
def _chains_to_top(a: int, b: int) -> int:
    """Chains of pairs of nonempty subsets (S, T) of an a-set and a b-set, strictly
    increasing in the product order and ending at the whole pair."""
    total = 1
    for x in range(1, a + 1):
        for y in range(1, b + 1):
            if (x, y) != (a, b):
                total += comb(a, x) * comb(b, y) * _chains_to_top(x, y)
    return total


def product_size(fa: tuple[int, ...], fb: tuple[int, ...]) -> int:
    """Number of simplices of the product complex (order complex of the product of the
    face posets) of complexes with f-vectors fa and fb."""
    return sum(x * y * _chains_to_top(i + 1, j + 1)
               for i, x in enumerate(fa) for j, y in enumerate(fb))

"""Sizes of constructions, predicted from f-vectors before anything is built.

A construction that would exceed a memory cap is refused from these numbers, so that no
process ever starts building it (the derived families when they are made, the claim
language before it calls an operation).

* Barycentric refinement: the j-simplices of sd K are the chains s_0 < ... < s_j of
  faces; the chains that end at a fixed i-simplex are the ordered partitions of its i+1
  vertices into j+1 blocks, (j+1)! S(i+1, j+1) of them (S the Stirling numbers of the
  second kind), so f_j(sd K) = sum_i f_i (j+1)! S(i+1, j+1) [BR].
* Join: a simplex of K * H is one of K, one of H, or the union of one of each.
* Product (the order complex of the product of the face posets): the chains ending at
  a pair (s, t) depend only on dim s and dim t.

>>> sum(refined_f_vector((7, 21, 14), 4)) # the 7-vertex torus refined four times
54432
>>> product_size((2, 1), (2, 1))          # an edge times an edge: a square, 9 + 16 + 8
33

References
----------
.. [BR] F. Brenti and V. Welker, "f-vectors of barycentric subdivisions", Math. Z. 259
        (2008) 849-865 (the formula for f(sd K)).
"""

from __future__ import annotations

from functools import lru_cache
from itertools import product as cartesian
from math import comb, prod

__all__ = ["refined_f_vector", "product_f_vector", "join_f_vector", "cone_f_vector",
           "suspension_f_vector", "join_size", "product_size"]


@lru_cache(maxsize=None)
def _chains_to_top(dims: tuple[int, ...]) -> tuple[int, ...]:
    """Chains ending at the top of a product of face posets of simplices of the given
    dimensions, by number of elements: entry j counts the chains with j elements."""
    below = [1]                                      # the chain made of the top alone
    for face in cartesian(*(range(a + 1) for a in dims)):
        if face == dims:
            continue
        ways = prod(comb(a + 1, b + 1) for a, b in zip(dims, face))
        sub = _chains_to_top(face)
        below += [0] * (len(sub) - len(below))
        for j, c in enumerate(sub):
            below[j] += ways * c
    return (0,) + tuple(below)


def _order_complex_f_vector(types: dict[tuple[int, ...], int]) -> tuple[int, ...]:
    out: list[int] = []
    for dims, count in types.items():
        chains = _chains_to_top(dims)
        out += [0] * (len(chains) - 1 - len(out))
        for j in range(1, len(chains)):
            out[j - 1] += count * chains[j]
    while out and out[-1] == 0:
        out.pop()
    return tuple(out)


def refined_f_vector(f: tuple[int, ...], times: int = 1) -> tuple[int, ...]:
    """The f-vector of the barycentric refinement K' of a complex with f-vector f.

    Definition: f_k(K') = sum_{i >= k} (k+1)! S(i+1, k+1) f_i(K), S the Stirling
    numbers of the second kind (a chain of k+1 faces of an i-simplex is an ordered
    set partition of its i+1 vertices into k+1 blocks).

    Parameters: f -- an f-vector; times -- how many refinements.
    Returns: the f-vector after ``times`` refinements.

    >>> refined_f_vector((3, 3, 1))
    (7, 12, 6)

    Notes: counted as chains in the face poset, O(d^2) per refinement.
    Reference: F. Brenti and V. Welker, f-vectors of barycentric subdivisions,
    Math. Z. 259 (2008) 849-865.
    """
    for _ in range(times):
        f = _order_complex_f_vector({(i,): n for i, n in enumerate(f) if n})
    return tuple(f)


def product_f_vector(f: tuple[int, ...], g: tuple[int, ...]) -> tuple[int, ...]:
    """The f-vector of ``operations.product`` of complexes with f-vectors f and g.

    Definition: the product is the order complex of the product of the face posets;
    its k-simplices are the chains of k+1 pairs (x, y), counted through the chains
    below each pair, which depend only on dim x and dim y.

    Parameters: f, g -- f-vectors.  Returns: the f-vector of the product.

    >>> product_f_vector((2, 1), (2, 1))    # the square cut into 8 triangles
    (9, 16, 8)

    Notes: O(d^2 e^2) for dimensions d, e.
    Reference: A. Björner, Topological methods, in Handbook of Combinatorics,
    Elsevier 1995, section 10 (order complexes of products of posets).
    """
    return _order_complex_f_vector({(i, j): a * b for i, a in enumerate(f)
                                    for j, b in enumerate(g) if a and b})


def join_f_vector(f: tuple[int, ...], g: tuple[int, ...]) -> tuple[int, ...]:
    """The f-vector of the join K * H of complexes with f-vectors f and g.

    Definition: f_k(K * H) = f_k(K) + f_k(H) + sum_{i + j = k - 1} f_i(K) f_j(H)
    (a simplex of the join is a simplex of K, of H, or a union of one of each).

    >>> join_f_vector((2,), (2,))           # S^0 * S^0 is a square
    (4, 4)

    Reference: J. Matoušek, Using the Borsuk-Ulam Theorem, Springer 2003, section 4.2.
    """
    out = [0] * max(len(f), len(g), len(f) + len(g))
    for k in range(len(out)):
        out[k] = (f[k] if k < len(f) else 0) + (g[k] if k < len(g) else 0)
    for i, a in enumerate(f):
        for j, b in enumerate(g):
            out[i + j + 1] += a * b
    return tuple(out)


def cone_f_vector(f: tuple[int, ...]) -> tuple[int, ...]:
    """The f-vector of the cone: the join with one point.

    >>> cone_f_vector((3, 3))               # the cone over a triangle's boundary
    (4, 6, 3)

    Reference: as :func:`join_f_vector`.
    """
    return join_f_vector(f, (1,))


def suspension_f_vector(f: tuple[int, ...]) -> tuple[int, ...]:
    """The f-vector of the suspension: the join with two points.

    >>> suspension_f_vector((3, 3))         # the boundary of the double pyramid
    (5, 9, 6)

    Reference: as :func:`join_f_vector`.
    """
    return join_f_vector(f, (2,))


def join_size(a: int, b: int) -> int:
    """Number of simplices of the join of complexes with a and b simplices."""
    return a + b + a * b


def product_size(fa: tuple[int, ...], fb: tuple[int, ...]) -> int:
    """Number of simplices of the product complex of complexes with f-vectors fa and fb."""
    return sum(product_f_vector(tuple(fa), tuple(fb)))

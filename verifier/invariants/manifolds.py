"""Manifold, sphere and ball recognition.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from itertools import combinations

from .. import operations
from ..complex import Complex
from .counting import euler
from .homology import betti

__all__ = ["NotDecided", "is_sphere", "is_ball", "is_closed_manifold", "is_manifold",
           "is_manifold_with_boundary"]


class NotDecided(ValueError):
    """A yes/no invariant that our methods cannot decide for this input (says why)."""


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

"""The registry of predicates a hypothesis may be made of: one plain table.

Each :class:`Predicate` has a short ``key``, the ``words`` a report uses, a ``where``
text in the claim language (what a proposed claim is written with, so it means exactly
what was tested), and ``test``, a direct exact test on a :class:`~verifier.Complex`
that the finder uses on every case because it is fast.  The two must agree:
``tests/test_discover.py`` checks them against each other on every complex with at most
5 vertices and on catalog surfaces, and every hypothesis the finder proposes is then
re-decided through ``where`` by ``verifier run``.

To add a predicate, append one ``Predicate(...)`` to ``PREDICATES`` (or pass your own
list to :func:`verifier.discover.hypotheses.separators`); nothing else changes.

References
----------
[1] J. R. Munkres, Elements of Algebraic Topology (1984), §2 (links), §62-63 (manifolds).
[2] R. P. Stanley, Combinatorics and Commutative Algebra, 2nd ed. (1996), III.4 (flag
    complexes: every minimal non-face has two elements).
[3] D. König, Theorie der endlichen und unendlichen Graphen (1936): a graph is bipartite
    exactly when the unsigned incidence matrix of each component has rank n_c - 1.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

__all__ = ["Predicate", "PREDICATES", "predicate", "FLAG_WHERE", "HOMOLOGY_SPHERE_WHERE",
           "BIPARTITE_WHERE"]


@dataclass(frozen=True)
class Predicate:
    """One predicate: a key, its words, its claim-language text, and a direct test."""
    key: str
    words: str
    where: str
    test: Callable
    cost: int = 1          # simplicity rank: lower is reported first among equals


# A clique of three vertices of a complex L that is not a triangle of L: the number of
# triangles of the graph of L is trace(A^3)/6 with A = (|B||B|^T - B B^T)/2, B the
# vertex-edge boundary matrix.  K is flag exactly when no link of a simplex of K (nor K
# itself) has such an empty triangle [2] (a minimal non-face S with |S| >= 3 leaves one
# in the link of S minus three of its vertices).
_TRIANGLES = ("trace((abs(B) * transpose(abs(B)) - B * transpose(B)) ** 3) == "
              "48 * count(dim(y) == 2 for y in simplices(L))")
FLAG_WHERE = (f"all({_TRIANGLES} for L in [K] if dim(L) >= 1 for B in [boundary_matrix(L, 1)])"
              f" and all({_TRIANGLES} for x in simplices(K) for L in [link(K, x)] "
              "if dim(L) >= 1 for B in [boundary_matrix(L, 1)])")
HOMOLOGY_SPHERE_WHERE = ("is_closed_manifold(K) and sum(betti(K)) == 2 and (dim(K) == 0 or "
                         "betti(K, 0) == 1) and all(size(torsion(K, k)) == 0 for k in "
                         "range(dim(K) + 1))")
BIPARTITE_WHERE = ("dim(K) == 0 or rank(abs(boundary_matrix(K, 1))) == "
                   "size(vertices(K)) - betti(K, 0)")


def _is_flag(K) -> bool:
    """K equals the clique complex of its 1-skeleton (K is always contained in it)."""
    from ..complex import Complex
    return len(Complex.from_graph(K.graph(), flag=True).simplices) == len(K.simplices)


def _is_bipartite(K) -> bool:
    import networkx as nx
    return nx.is_bipartite(K.graph())


def _is_homology_sphere(K) -> bool:
    from .. import invariants as inv
    if not inv.is_closed_manifold(K):
        return False
    betti = inv.betti(K)
    return (sum(betti) == 2 and (K.dim == 0 or betti[0] == 1)
            and all(not inv.torsion(K, k) for k in range(K.dim + 1)))


def _connected(K) -> bool:
    from ..invariants import betti
    return betti(K, 0) == 1


def _manifold(K) -> bool:
    from ..invariants import is_manifold
    return bool(is_manifold(K))


def _closed_manifold(K) -> bool:
    from ..invariants import is_closed_manifold
    return bool(is_closed_manifold(K))


def _manifold_with_boundary(K) -> bool:
    from ..invariants import is_manifold_with_boundary
    return bool(is_manifold_with_boundary(K))


def _dimension_at_most(k: int) -> Predicate:
    return Predicate(f"dim<={k}", f"dim(K) <= {k}", f"dim(K) <= {k}",
                     lambda K, k=k: K.dim <= k, cost=1)


PREDICATES: list[Predicate] = [
    *(_dimension_at_most(k) for k in range(4)),
    Predicate("connected", "K is connected", "betti(K, 0) == 1", _connected),
    Predicate("pure", "K is pure", "all(dim(x) == dim(K) for x in facets(K))",
              lambda K: K.is_pure()),
    Predicate("flag", "K is a flag complex", FLAG_WHERE, _is_flag, cost=2),
    Predicate("bipartite", "the 1-skeleton of K is bipartite", BIPARTITE_WHERE,
              _is_bipartite, cost=2),
    Predicate("manifold", "K is a manifold", "is_manifold(K)", _manifold),
    Predicate("manifold-with-boundary", "K is a manifold with boundary",
              "is_manifold_with_boundary(K)", _manifold_with_boundary),
    Predicate("closed-manifold", "K is a closed manifold", "is_closed_manifold(K)",
              _closed_manifold),
    Predicate("homology-sphere", "K is a homology sphere (a closed manifold with the "
              "integral homology of a sphere; in dimension <= 2 exactly a sphere)",
              HOMOLOGY_SPHERE_WHERE, _is_homology_sphere, cost=2),
]


def predicate(key: str, registry: list[Predicate] | None = None) -> Predicate:
    """The predicate with a key.

    >>> predicate("dim<=1").where
    'dim(K) <= 1'
    """
    for p in registry or PREDICATES:
        if p.key == key:
            return p
    raise KeyError(f"no predicate '{key}'")

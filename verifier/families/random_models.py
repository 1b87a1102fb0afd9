"""Seeded random families: flag complexes of random graphs, random pure complexes,
Linial-Meshulam 2-complexes, flag complexes of random geometric graphs.

Every case is drawn from its own generator ``case_random(family, seed, number)``
(:func:`verifier.families.family.case_random`), so case ``"random-flag/s11/17"`` is
rebuilt from its id alone, in any process, without drawing cases 0..16.  Each case
first draws its number of vertices n uniformly from ``vertices = [lo, hi]``
(``rng.randint(lo, hi)``), then the complex on the vertices ``0..n-1``.

The draws follow networkx's generators call for call (``gnp_random_graph`` and
``random_geometric_graph`` given the same ``random.Random``), which the tests check;
they are written out here so that a case does not depend on the networkx version,
and so that the geometric graph's edges are decided exactly (see
:class:`RandomGeometric`).
"""

from __future__ import annotations

from fractions import Fraction
from itertools import combinations
from math import comb

from ..complex import Complex
from .family import (MAX_COUNT, MAX_RANDOM_VERTICES, MAX_SIMPLICES, FamilyType, Param,
                     SeededFamily, graph_complex)

__all__ = ["RANDOM_FLAG", "RANDOM_PURE", "LINIAL_MESHULAM", "RANDOM_GEOMETRIC",
           "gnp_edges", "geometric_edges"]

# Draws of one case of random-pure with facet_probability (one per (d+1)-set).
MAX_DRAWS = 10_000_000


def _vertices(meaning: str = "number of vertices n, or a range [lo, hi] to draw n "
                             "from uniformly") -> Param:
    return Param.integer_range("vertices", 1, MAX_RANDOM_VERTICES, meaning)


def _count() -> Param:
    return Param.integer("count", 1, MAX_COUNT, "how many complexes to draw")


def _seed() -> Param:
    return Param.integer("seed", 0, 2 ** 63 - 1, "seed of the family; case i uses a "
                         "generator derived from (family, seed, i)", default=0)


# ------------------------------------------------------------------ graphs
def gnp_edges(rng, n: int, p: float) -> list[tuple[int, int]]:
    """The edges of a G(n, p) random graph drawn with ``rng``.

    Definition: each of the n(n-1)/2 pairs {u, v} of 0..n-1, in lexicographic order,
    is an edge when ``rng.random() < p``, independently.

    Parameters: rng -- a random.Random; n -- number of vertices; p -- edge probability.
    Returns: the list of edges (u, v), u < v.

    >>> import random
    >>> gnp_edges(random.Random(1), 3, 1.0)
    [(0, 1), (0, 2), (1, 2)]

    Notes: the same draws as networkx ``gnp_random_graph(n, p, seed=rng)`` for
    0 < p < 1; O(n^2).
    Reference: E. N. Gilbert, "Random graphs", Ann. Math. Statist. 30 (1959) 1141-1144.
    """
    return [e for e in combinations(range(n), 2) if rng.random() < p]


def geometric_edges(points: list[list[float]], radius: float) -> list[tuple[int, int]]:
    """The pairs of points at Euclidean distance at most ``radius``, decided exactly.

    Definition: {u, v} is an edge when sum_i (x_u,i - x_v,i)^2 <= radius^2, computed in
    exact rational arithmetic on the binary values of the coordinates and the radius.

    Parameters: points -- coordinates (floats, read as the exact rationals they are);
    radius -- the threshold.  Returns: the edges (u, v), u < v, lexicographically.

    >>> geometric_edges([[0.0, 0.0], [0.5, 0.0], [1.0, 1.0]], 0.5)   # distance exactly 0.5
    [(0, 1)]
    >>> geometric_edges([[0.0, 0.0], [0.6, 0.8]], 1.0)   # the binary 0.6, 0.8 lie beyond 1
    []

    Notes: O(n^2 dim); exact, so the graph does not depend on rounding.
    Reference: M. Penrose, "Random Geometric Graphs", Oxford 2003, ch. 1.
    """
    exact = [[Fraction(x) for x in p] for p in points]
    bound = Fraction(radius) ** 2
    return [(u, v) for u, v in combinations(range(len(points)), 2)
            if sum((a - b) ** 2 for a, b in zip(exact[u], exact[v])) <= bound]


def _expected_cliques(n: int, p: float) -> float:
    """Expected number of non-empty cliques of G(n, p): sum_k C(n, k) p^C(k, 2)."""
    return sum(comb(n, k) * p ** comb(k, 2) for k in range(1, n + 1))


class RandomFlag(SeededFamily):
    """Flag complexes of G(n, p)."""

    def sample(self, rng, number):
        lo, hi = self.params["vertices"]
        n = rng.randint(lo, hi)
        edges = gnp_edges(rng, n, self.params["edge_probability"])
        return graph_complex(n, edges, True, f"case {self.name}/s{self.params['seed']}/{number}")


def _build_random_flag(params, context):
    hi, p = params["vertices"][1], params["edge_probability"]
    expected = _expected_cliques(hi, p)
    if expected > MAX_SIMPLICES:
        raise context.error("edge_probability", f"with {hi} vertices and edge_probability "
                            f"{p} a flag complex has about {expected:.3g} simplices on "
                            f"average, more than the limit {MAX_SIMPLICES} per case; "
                            "lower one of them")
    return RandomFlag("random-flag", params)


RANDOM_FLAG = FamilyType(
    name="random-flag",
    description="flag (clique) complexes of Erdos-Renyi random graphs G(n, p)",
    params=(_vertices(),
            Param.number("edge_probability", 0, 1, "probability p of each edge"),
            _count(), _seed()),
    build=_build_random_flag,
    reference="E. N. Gilbert, Ann. Math. Statist. 30 (1959) 1141-1144; M. Kahle, Discrete "
              "Math. 309 (2009) 1658-1671",
)


# ------------------------------------------------------------- pure complexes
class RandomPure(SeededFamily):
    """Random pure d-complexes: m random (d+1)-sets, or each (d+1)-set with probability q."""

    def sample(self, rng, number):
        lo, hi = self.params["vertices"]
        n = rng.randint(lo, hi)
        size = self.params["dimension"] + 1
        if self.params["facets"] is not None:
            facets = _distinct_subsets(rng, n, size, self.params["facets"])
        else:
            q = self.params["facet_probability"]
            facets = [s for s in combinations(range(n), size) if rng.random() < q]
            if not facets:  # keep every case a non-empty pure d-complex
                facets = [tuple(sorted(rng.sample(range(n), size)))]
        return Complex.from_facets(facets)


def _distinct_subsets(rng, n: int, size: int, m: int) -> list[tuple[int, ...]]:
    """m distinct random size-subsets of range(n), uniformly among all such choices."""
    total = comb(n, size)
    m = min(m, total)
    if total <= 100_000:
        chosen = sorted(rng.sample(range(total), m))
        return [_unrank(r, n, size) for r in chosen]
    found: set[tuple[int, ...]] = set()
    while len(found) < m:
        found.add(tuple(sorted(rng.sample(range(n), size))))
    return sorted(found)


def _unrank(rank: int, n: int, size: int) -> tuple[int, ...]:
    """The size-subset of range(n) at position ``rank`` in lexicographic order."""
    out, v = [], 0
    while size:
        below = comb(n - v - 1, size - 1)
        if rank < below:
            out.append(v)
            size -= 1
        else:
            rank -= below
        v += 1
    return tuple(out)


def _build_random_pure(params, context):
    lo, hi = params["vertices"]
    d, m, q = params["dimension"], params["facets"], params["facet_probability"]
    if (m is None) == (q is None):
        raise context.error("facets", "give exactly one of 'facets' (how many facets) and "
                            "'facet_probability' (probability of each (d+1)-set)")
    if lo < d + 1:
        raise context.error("vertices", f"a pure {d}-complex needs at least {d + 1} "
                            f"vertices; got vertices = {params['vertices']}")
    if m is not None:
        if m > comb(lo, d + 1):
            raise context.error("facets", f"{lo} vertices have only {comb(lo, d + 1)} sets "
                                f"of size {d + 1}; got facets = {m}")
        if m * (2 ** (d + 1) - 1) > MAX_SIMPLICES:
            raise context.error("facets", f"{m} facets of dimension {d} may have up to "
                                f"{m * (2 ** (d + 1) - 1)} simplices, more than the limit "
                                f"{MAX_SIMPLICES} per case")
    else:
        draws = comb(hi, d + 1)
        if draws > MAX_DRAWS:
            raise context.error("facet_probability", f"{hi} vertices have {draws} sets of "
                                f"size {d + 1}, each drawn once per case (limit {MAX_DRAWS}); "
                                "use 'facets' or fewer vertices")
        if q * draws * (2 ** (d + 1) - 1) > MAX_SIMPLICES:
            raise context.error("facet_probability", f"about {q * draws:.3g} facets of "
                                f"dimension {d} per case, more than the limit of "
                                f"{MAX_SIMPLICES} simplices allows")
    return RandomPure("random-pure", params)


RANDOM_PURE = FamilyType(
    name="random-pure",
    description="random pure d-dimensional complexes: m random facets, or each (d+1)-set "
            "with probability q",
    params=(_vertices(),
            Param.integer("dimension", 0, 20, "dimension d of every facet"),
            Param.integer("facets", 1, MAX_SIMPLICES, "number m of distinct facets, drawn "
                          "uniformly (give this or facet_probability)", default=None),
            Param.number("facet_probability", 0, 1, "probability q of each (d+1)-set "
                         "(give this or facets); a case with no facet gets one uniform "
                         "facet", low_open=True, default=None),
            _count(), _seed()),
    build=_build_random_pure,
    reference="common practice, no source (the d-dimensional analogue of G(n, m) and "
              "G(n, p); vertex set = union of the facets)",
)


# ------------------------------------------------------------ Linial-Meshulam
class LinialMeshulam(SeededFamily):
    """Y(n, p): the complete graph on n vertices plus each triangle with probability p."""

    def sample(self, rng, number):
        lo, hi = self.params["vertices"]
        n = rng.randint(lo, hi)
        p = self.params["probability"]
        triangles = [t for t in combinations(range(n), 3) if rng.random() < p]
        return Complex._from_index_sets(
            tuple(range(n)), list(combinations(range(n), 2)) + triangles)

    def f_bound(self):
        hi = self.params["vertices"][1]
        return (hi, comb(hi, 2), comb(hi, 3))


def _build_linial_meshulam(params, context):
    hi, p = params["vertices"][1], params["probability"]
    expected = hi + comb(hi, 2) + p * comb(hi, 3)
    if expected > MAX_SIMPLICES:
        raise context.error("probability", f"with {hi} vertices a case has about "
                            f"{expected:.3g} simplices, more than the limit "
                            f"{MAX_SIMPLICES}; lower vertices or probability")
    return LinialMeshulam("linial-meshulam", params)


LINIAL_MESHULAM = FamilyType(
    name="linial-meshulam",
    description="random 2-complexes Y(n, p): complete graph plus each triangle with "
            "probability p",
    params=(_vertices(),
            Param.number("probability", 0, 1, "probability p of each triangle"),
            _count(), _seed()),
    build=_build_linial_meshulam,
    reference="N. Linial and R. Meshulam, Homological connectivity of random 2-complexes, "
              "Combinatorica 26 (2006) 475-487",
)


# ---------------------------------------------------------- geometric graphs
class RandomGeometric(SeededFamily):
    """Flag complexes of random geometric graphs in the unit cube [0, 1]^dimension.

    The points are drawn as networkx ``random_geometric_graph`` draws them (vertex by
    vertex, coordinate by coordinate, ``rng.random()``); two vertices are joined when
    their Euclidean distance is at most ``radius``, decided exactly
    (:func:`geometric_edges`), where networkx compares rounded floats.
    """

    def sample(self, rng, number):
        lo, hi = self.params["vertices"]
        n = rng.randint(lo, hi)
        dim = self.params["dimension"]
        points = [[rng.random() for _ in range(dim)] for _ in range(n)]
        edges = geometric_edges(points, self.params["radius"])
        return graph_complex(n, edges, True, f"case {self.name}/s{self.params['seed']}/{number}")


RANDOM_GEOMETRIC = FamilyType(
    name="random-geometric",
    description="flag complexes of random geometric graphs (n uniform points in the unit "
            "cube, joined when at distance <= radius)",
    params=(_vertices(),
            Param.number("radius", 0, 10, "distance threshold", low_open=True),
            Param.integer("dimension", 1, 10, "dimension of the ambient cube", default=2),
            _count(), _seed()),
    build=lambda params, context: RandomGeometric("random-geometric", params),
    reference="M. Penrose, Random Geometric Graphs, Oxford 2003 (Vietoris-Rips complexes "
              "of random points)",
)

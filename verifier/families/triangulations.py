"""Every triangulated closed surface, 2-sphere and 3-sphere on few vertices, one per
isomorphism class.

Three generators, all exhaustive and isomorph-free:

Closed surfaces (n <= 10 vertices) and combinatorial 3-manifolds (n <= 9 vertices)
    by *lexicographic enumeration* in the manner of T. Sulanke and F. H. Lutz,
    "Isomorphism-free lexicographic enumeration of triangulated surfaces and
    3-manifolds", Eur. J. Combin. 30 (2009) 1965-1979.  Fix the maximal vertex degree d
    and give vertex 0 degree d with a fixed star: for surfaces the triangles
    0 i (i+1) around the cycle 1, 2, ..., d; for 3-manifolds the cone from 0 over one
    labelled 2-sphere on the vertices 1..d per isomorphism class (from the 2-sphere
    generator below).  Then repeatedly take the lexicographically smallest *open*
    ridge (an edge in one triangle, a triangle in one tetrahedron) and close it by a
    new facet whose last vertex w is a vertex already used or the smallest unused
    label (symmetry breaking: unused labels are interchangeable).  A branch is cut as
    soon as

    * a ridge would lie in three facets, a vertex degree would exceed d, or more
      than n vertices would be used;
    * a link that must become a circle (the link of a vertex of a surface, of an edge
      of a 3-manifold) closes into a cycle that is not all of it -- in a closed
      manifold such a link is one circle, and a circle inside a circle is the whole
      circle -- or something is added at a vertex or edge whose link has closed;
    * (3-manifolds) a vertex link closes up without being a 2-sphere (connected with
      Euler characteristic 2).

    A branch without open ridges that used all n vertices is a closed combinatorial
    manifold (every link a circle, respectively every vertex link a 2-sphere).  Every
    one is reached: label a vertex of maximal degree 0, its star as fixed (through an
    isomorphism of its link onto the fixed representative), and every other vertex in
    the order in which the closing rule meets it; each partial complex of that run is
    a subcomplex of the manifold, so no rule cuts it.  A labelled surface is kept only
    if its *root* (vertex 0 with its link read 1, 2, ..., d) is least among all roots
    (a vertex of degree d with its link read from any start in either direction) in
    the order of the degree sequences read along the link: that order does not depend
    on labels, and the labellings of every least root are reached, so each class keeps
    at least one (at 10 vertices 46,655 labelled surfaces remain of 1,488,153).  The
    labelled results are then reduced to one per isomorphism class by canonical forms.

2-spheres (n <= 12 vertices)
    by *vertex splitting* from the boundary of the tetrahedron.  Every triangulated
    2-sphere other than the tetrahedron boundary has a contractible edge (one in no
    separating triangle; E. Steinitz and H. Rademacher, "Vorlesungen ueber die Theorie
    der Polyeder", Springer 1934), so every 2-sphere on n vertices arises from one on
    n - 1 vertices by splitting a vertex v along two of its link vertices a, b: v
    becomes the edge v v', the arc of the link cycle from a to b stays with v, the
    other arc goes to v', and the triangles v v' a, v v' b are added.  Counts: OEIS
    A000109 (1, 1, 2, 5, 14, 50, 233, 1249, 7595 for n = 4..12).

Canonical forms
    A complex is identified by its *canonical facets*: the facets relabelled by a
    canonical labelling of the vertex-facet incidence graph (vertices and facets as
    nodes of two colours), computed by BLISS through python-igraph
    (``Graph.canonical_permutation``; T. Junttila and P. Kaski, "Engineering an
    efficient canonical labeling tool for large and sparse graphs", ALENEX 2007).
    Two complexes have the same canonical facets exactly when they are isomorphic.

Parts
    Each generator is split by the maximal vertex degree d of its results, so that one
    part is generated without the others: the lexicographic searches fix d at the
    start, vertex splitting canonicalises only the children of maximal degree d.

Measured on one core (numba's disk cache warm; compiling both searches once takes
about 15 s more): every closed surface with <= 9 vertices (712 classes) 0.7 s, with 10
vertices (42,426) 5.5 s; every 2-sphere with <= 12 vertices (9,150) 7.6 s; every
combinatorial 3-manifold with <= 9 vertices (1,344) 1.7 s, and the 3-spheres among
them (``is_sphere`` on each) 2.9 s.

The numbers of classes found (tests/test_triangulations.py compares them with the
published tables): closed surfaces on n = 4..10 vertices 1, 1, 3, 9, 43, 655, 42426
(F. H. Lutz, "Enumeration and random realization of triangulated surfaces", 2006;
Sulanke-Lutz 2009); combinatorial 3-manifolds on n = 5..9 vertices 1, 2, 5, 39, 1297,
all 3-spheres but one 9-vertex triangulation of the twisted S^2-bundle over S^1
(A. Altshuler and L. Steinberg 1976; B. Bagchi and B. Datta, "Uniqueness of Walkup's
9-vertex 3-dimensional Klein bottle", Discrete Math. 308 (2008)).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

__all__ = ["canonical_facets", "encode_facets", "decode_facets", "surfaces", "spheres_2", "manifolds_3", "spheres_3", "is_orientable_surface",
           "MAX_SURFACE_VERTICES", "MAX_SPHERE2_VERTICES", "MAX_MANIFOLD3_VERTICES",
           "DIGITS"]

MAX_SURFACE_VERTICES = 10
MAX_SPHERE2_VERTICES = 12
MAX_MANIFOLD3_VERTICES = 9

# vertex labels in the compact facet code: 0..9 then a..z (at most 36 vertices)
DIGITS = "0123456789abcdefghijklmnopqrstuvwxyz"


# ------------------------------------------------------------------ canonical forms
def canonical_facets(n: int, facets) -> tuple[tuple[int, ...], ...]:
    """The facets of a pure complex on vertices 0..n-1, canonically relabelled.

    Definition: take the vertex-facet incidence graph (a node per vertex, coloured 0, a
    node per facet, coloured 1, an edge for each incidence), its canonical labelling by
    BLISS, and number the vertices 0..n-1 in the order of their canonical labels;
    return the relabelled facets, each sorted, in lexicographic order.  Isomorphic
    complexes, and only they, give the same result.

    >>> canonical_facets(4, [(1, 2, 3), (0, 1, 2), (0, 1, 3), (0, 2, 3)])
    ((0, 1, 2), (0, 1, 3), (0, 2, 3), (1, 2, 3))
    >>> canonical_facets(3, [(0, 2), (1, 2)]) == canonical_facets(3, [(0, 1), (0, 2)])
    True

    Reference: colour-preserving isomorphism of incidence graphs, e.g. B. D. McKay and
    A. Piperno, "Practical graph isomorphism, II", J. Symb. Comput. 60 (2014) 94-112;
    BLISS: Junttila-Kaski, ALENEX 2007.
    """
    import igraph

    facets = [tuple(f) for f in facets]
    edges = [(v, n + i) for i, f in enumerate(facets) for v in f]
    graph = igraph.Graph(n=n + len(facets), edges=edges)
    permutation = graph.canonical_permutation(color=[0] * n + [1] * len(facets))
    # igraph's permute_vertices(permutation) puts node permutation[i] at position i:
    # the canonical label of a node is its position in the permutation
    label = [0] * len(permutation)
    for position, node in enumerate(permutation):
        label[node] = position
    order = sorted(range(n), key=label.__getitem__)
    new = [0] * n
    for position, v in enumerate(order):
        new[v] = position
    return tuple(sorted(tuple(sorted(new[v] for v in f)) for f in facets))


def encode_facets(facets) -> str:
    """The compact text of a list of facets: each facet its vertex labels as digits
    (0-9, then a-z), facets written one after another without separators.

    >>> encode_facets([(0, 1, 2), (0, 1, 10)])
    '01201a'
    """
    return "".join("".join(DIGITS[v] for v in f) for f in facets)


def decode_facets(code: str, width: int) -> list[tuple[int, ...]] | None:
    """The facets spelled by :func:`encode_facets` (``width`` vertices each), or None if
    ``code`` is not such a text (length, characters).

    >>> decode_facets('01201a', 3)
    [(0, 1, 2), (0, 1, 10)]
    >>> decode_facets('0120', 3) is None
    True
    """
    if not isinstance(code, str) or not code or len(code) % width:
        return None
    if any(c not in DIGITS for c in code):
        return None
    return [tuple(DIGITS.index(c) for c in code[i:i + width])
            for i in range(0, len(code), width)]


def is_orientable_surface(facets) -> bool:
    """Is the closed surface with these triangles orientable?

    Definition: the triangles can be ordered cyclically so that each edge is run
    through in opposite directions by its two triangles.  Decided by propagating an
    orientation over the dual graph (a connected closed surface has two orientations or
    none).

    >>> is_orientable_surface([(0, 1, 2), (0, 1, 3), (0, 2, 3), (1, 2, 3)])
    True

    Reference: J. R. Munkres, "Elements of Algebraic Topology" (1984), §6 (orientation of
    a pseudomanifold, as common practice).
    """
    facets = [tuple(f) for f in facets]
    by_edge: dict = {}
    for i, (a, b, c) in enumerate(facets):
        for u, v in ((a, b), (b, c), (a, c)):
            by_edge.setdefault((u, v), []).append(i)
    sign = [0] * len(facets)

    def directed(i, s):      # the three directed edges of triangle i under orientation s
        a, b, c = facets[i]
        cycle = ((a, b), (b, c), (c, a))
        return cycle if s > 0 else tuple((v, u) for u, v in cycle)

    for start in range(len(facets)):
        if sign[start]:
            continue
        sign[start] = 1
        stack = [start]
        while stack:
            i = stack.pop()
            for u, v in directed(i, sign[i]):
                for j in by_edge[(min(u, v), max(u, v))]:
                    if j == i:
                        continue
                    want = -1 if (u, v) in directed(j, 1) else 1
                    if sign[j] == 0:
                        sign[j] = want
                        stack.append(j)
                    elif sign[j] != want:
                        return False
    return True


# ------------------------------------------------------------------ compiled searches
def _kernels() -> dict:
    """The two compiled lexicographic searches (:mod:`.lexicographic`, imported on first
    use: numba compiles them once and caches them on disk)."""
    from . import lexicographic

    return {"surface": lexicographic.surface_search,
            "manifold": lexicographic.manifold_search}


def _classes(n: int, rows: np.ndarray) -> list[tuple[tuple[int, ...], ...]]:
    """The distinct canonical facet lists among the labelled complexes ``rows``
    (facets padded with -1), in order of first appearance."""
    seen: dict = {}
    for row in rows:
        facets = [tuple(f) for f in row.tolist() if f[0] >= 0]
        form = canonical_facets(n, facets)
        seen.setdefault(form, None)
    return list(seen)


# ------------------------------------------------------------------ closed surfaces
@lru_cache(maxsize=None)
def surfaces(n: int, d: int) -> tuple[tuple[tuple[int, ...], ...], ...]:
    """Every closed surface on n vertices of maximal vertex degree d, one per
    isomorphism class, as canonical facet lists, sorted by their code.

    Definition: a closed surface is a connected pure 2-complex in which every edge lies
    in two triangles and every vertex link is one circle.

    >>> [len(surfaces(6, d)) for d in range(3, 6)]
    [0, 1, 2]

    Notes: lexicographic enumeration (see the module docstring), n <= 10.
    Reference: Sulanke-Lutz 2009 (method and counts).
    """
    if not 4 <= n <= MAX_SURFACE_VERTICES or not 3 <= d <= n - 1:
        return ()
    rows = _kernels()["surface"](n, d)
    return tuple(sorted(_classes(n, rows), key=encode_facets))


# ------------------------------------------------------------------ 2-spheres
def _split_children(n: int, facets, d: int):
    """The labelled 2-spheres on n + 1 vertices obtained from the 2-sphere ``facets`` on
    n vertices by one vertex split, those of maximal vertex degree d only.

    Splitting v along the link vertices a = c_i and b = c_j (i < j) of its link cycle
    c_0 .. c_{k-1}: v keeps the triangles v c_m c_{m+1} for i <= m < j, the new vertex n
    takes the others (v replaced by n), and the triangles v n a, v n b are added."""
    around: list[dict] = [dict() for _ in range(n)]     # v -> {x: [neighbours of x in Lk v]}
    for a, b, c in facets:
        for v, x, y in ((a, b, c), (b, a, c), (c, a, b)):
            around[v].setdefault(x, []).append(y)
            around[v].setdefault(y, []).append(x)
    degree = [len(around[v]) for v in range(n)]
    by_degree = sorted(range(n), key=lambda u: -degree[u])
    rest = [f for f in facets]
    for v in range(n):
        start = min(around[v])
        cycle, prev, cur = [start], None, start
        while True:
            x, y = around[v][cur]
            step = x if x != prev else y
            if step == start:
                break
            cycle.append(step)
            prev, cur = cur, step
        k = len(cycle)
        others = [f for f in rest if v not in f]
        for i in range(k):
            for j in range(i + 1, k):
                a, b = cycle[i], cycle[j]
                top = max(j - i + 2, k - (j - i) + 2, degree[a] + 1, degree[b] + 1)
                for u in by_degree:
                    if u not in (v, a, b):
                        top = max(top, degree[u])
                        break
                if top != d:
                    continue
                kept = [tuple(sorted((v, cycle[m], cycle[m + 1]))) for m in range(i, j)]
                moved = [tuple(sorted((cycle[m], cycle[(m + 1) % k]))) + (n,)
                         for m in list(range(j, k)) + list(range(0, i))]
                yield others + kept + moved + [(a, v, n) if a < v else (v, a, n),
                                               (b, v, n) if b < v else (v, b, n)]


@lru_cache(maxsize=None)
def _sphere_level(n: int) -> tuple[tuple[tuple[int, ...], ...], ...]:
    """All 2-spheres on n vertices (canonical facet lists, sorted by code)."""
    if n == 4:
        return (canonical_facets(4, [(0, 1, 2), (0, 1, 3), (0, 2, 3), (1, 2, 3)]),)
    return tuple(sorted((f for d in range(3, n) for f in spheres_2(n, d)),
                        key=encode_facets))


@lru_cache(maxsize=None)
def spheres_2(n: int, d: int) -> tuple[tuple[tuple[int, ...], ...], ...]:
    """Every triangulated 2-sphere on n vertices of maximal vertex degree d, one per
    isomorphism class, as canonical facet lists sorted by their code.

    >>> [len(spheres_2(6, d)) for d in range(3, 6)]
    [0, 1, 1]

    Notes: vertex splitting of every sphere on n - 1 vertices (all of them, cached);
    only the children of maximal degree d are canonicalised.
    Reference: OEIS A000109; Steinitz-Rademacher 1934 (contractible edges).
    """
    if not 4 <= n <= MAX_SPHERE2_VERTICES or not 3 <= d <= n - 1:
        return ()
    if n == 4:
        return _sphere_level(4) if d == 3 else ()
    seen: dict = {}
    for parent in _sphere_level(n - 1):
        for child in _split_children(n - 1, parent, d):
            seen.setdefault(canonical_facets(n, child), None)
    return tuple(sorted(seen, key=encode_facets))


# ------------------------------------------------------------------ 3-manifolds
@lru_cache(maxsize=None)
def manifolds_3(n: int, d: int) -> tuple[tuple[tuple[int, ...], ...], ...]:
    """Every combinatorial 3-manifold on n vertices of maximal vertex degree d, one per
    isomorphism class (canonical facet lists sorted by their code).

    Definition: a pure 3-complex in which every vertex link is a triangulated 2-sphere,
    connected.

    >>> len(manifolds_3(5, 4))
    1

    Notes: lexicographic enumeration from the star of vertex 0, one search per class of
    its link (a 2-sphere on d vertices), n <= 9.
    Reference: Sulanke-Lutz 2009; Altshuler-Steinberg 1976 (n = 9).
    """
    if not 5 <= n <= MAX_MANIFOLD3_VERTICES or not 4 <= d <= n - 1:
        return ()
    search = _kernels()["manifold"]
    seen: dict = {}
    for link in _sphere_level(d):
        shifted = np.array([[v + 1 for v in f] for f in link], dtype=np.int64)
        for form in _classes(n, search(n, d, shifted)):
            seen.setdefault(form, None)
    return tuple(sorted(seen, key=encode_facets))


@lru_cache(maxsize=None)
def spheres_3(n: int, d: int) -> tuple[tuple[tuple[int, ...], ...], ...]:
    """The combinatorial 3-manifolds of :func:`manifolds_3` that are 3-spheres.

    >>> len(spheres_3(6, 5)), len(spheres_3(6, 4))
    (2, 0)

    Notes: decided by :func:`verifier.invariants.is_sphere` (homology, then a collapse
    of the sphere minus a facet to a point).
    Reference: Altshuler-Steinberg 1976: every combinatorial 3-manifold on <= 9
    vertices is a sphere except one on 9 vertices.
    """
    from ..complex import Complex
    from ..invariants.manifolds import is_sphere

    return tuple(f for f in manifolds_3(n, d)
                 if is_sphere(Complex._from_index_sets(tuple(range(n)), f)))

"""Recipes for classic triangulations that come in infinite series.

Each builder returns a :class:`~verifier.complex.Complex` whose vertices are labelled
``1..n``, and a companion function ``*_invariants`` returns the invariants the
recipe must have according to the mathematics it rests on (classification of
surfaces, Künneth formula, homology of lens spaces, universal coefficients).  The
catalog (:mod:`verifier.families.catalog`) serves both under names such as
``surface-orientable-3``; the tests compare the two.

Invariant records use the same keys as the reference data file
``data/triangulations.json``: ``dimension``, ``vertices``, ``f_vector``, ``euler``,
``betti_Q`` (ranks of integral homology), ``torsion`` (invariant factors > 1 of each
H_k(K; Z)), ``betti_F2``, ``betti_F3``, ``orientable``, ``source``.

References
----------
.. [CS]  Classification of closed surfaces: chi = 2 - 2g, H_1 = Z^(2g) (orientable genus
         g); chi = 2 - k, H_1 = Z^(k-1) + Z/2 (k cross-caps).  W. S. Massey, "Algebraic
         Topology: An Introduction", Springer GTM 56 (1967), ch. 1 and 4 (from memory).
.. [MC]  A. F. Möbius (1861) and Á. Császár, "A polyhedron without diagonals",
         Acta Sci. Math. (Szeged) 13 (1949) 140-142: the 7-vertex torus.
.. [RP]  The 6-vertex real projective plane: the antipodal quotient of the boundary of
         the icosahedron (hemi-icosahedron); W. Kühnel, "Tight Polyhedral Submanifolds
         and Tight Triangulations", Springer LNM 1612 (1995) (from memory).
.. [EZ]  S. Eilenberg and J. A. Zilber, "On products of complexes", Amer. J. Math. 75
         (1953) 200-204: the staircase (ordered) triangulation of a product.
.. [KU]  Künneth formula: A. Hatcher, "Algebraic Topology", Cambridge (2002), Thm 3B.6
         (from memory).
.. [UC]  Universal coefficient theorem for homology: Hatcher (2002), Thm 3A.3
         (from memory): dim H_k(K; Z/p) = b_k + t_k(p) + t_(k-1)(p), t_k(p) the number
         of invariant factors of H_k(K; Z) divisible by p.
.. [LS]  Lens spaces L(p, q) = S^3 / <(z, w) -> (zeta z, zeta^q w)>, zeta = exp(2 pi i/p);
         H_* = Z, Z/p, 0, Z.  Hatcher (2002), Example 2.43 (from memory).
.. [DS]  For a closed 3-manifold, f_2 = 2 f_3 and chi = 0 (each triangle lies in two
         tetrahedra; Poincaré duality), so f_1 = f_0 + f_3.
"""

from __future__ import annotations

from itertools import combinations, permutations
from math import comb, gcd

from ..complex import Complex

__all__ = [
    "ConstructionError", "simplex", "simplex_boundary", "torus_7", "projective_plane_6",
    "orientable_surface", "nonorientable_surface", "sphere_product", "torus_product",
    "lens_space", "simplex_invariants", "simplex_boundary_invariants",
    "orientable_surface_invariants", "nonorientable_surface_invariants",
    "sphere_product_invariants", "torus_product_invariants", "lens_space_invariants",
]


class ConstructionError(ValueError):
    """A parameter of a construction is outside the range where the recipe is defined."""


def _need_int(name: str, value, low: int, recipe: str) -> int:
    if isinstance(value, bool) or not isinstance(value, int) or value < low:
        raise ConstructionError(f"{recipe}: {name} must be an integer >= {low}, got {value!r}")
    return value


# ------------------------------------------------------------------ helpers
def _mod_p_betti(betti_q: list[int], torsion: list[list[int]], p: int) -> list[int]:
    """Betti numbers over Z/p from integral homology by universal coefficients [UC]."""
    t = [sum(1 for factor in factors if factor % p == 0) for factors in torsion]
    return [b + t[k] + (t[k - 1] if k > 0 else 0) for k, b in enumerate(betti_q)]


def _record(*, dimension, vertices, f_vector, betti_q, torsion, orientable, source,
            title, provenance) -> dict:
    """An invariant record in the reference data's format; Euler characteristic from the
    f-vector must agree with the one from the Betti numbers (Euler-Poincaré)."""
    euler = sum((-1) ** k * f for k, f in enumerate(f_vector))
    if euler != sum((-1) ** k * b for k, b in enumerate(betti_q)):
        raise AssertionError(f"{title}: f-vector and Betti numbers give different chi")
    return {
        "title": title, "dimension": dimension, "vertices": vertices,
        "f_vector": list(f_vector), "euler": euler, "betti_Q": list(betti_q),
        "torsion": [list(t) for t in torsion],
        "betti_F2": _mod_p_betti(betti_q, torsion, 2),
        "betti_F3": _mod_p_betti(betti_q, torsion, 3),
        "orientable": orientable, "source": source, "provenance": provenance,
    }


def _numbered(facets) -> Complex:
    """A complex from facets over arbitrary sortable labels, relabelled 1..n in label order."""
    labels = sorted({v for f in facets for v in f})
    number = {v: i + 1 for i, v in enumerate(labels)}
    return Complex.from_facets([[number[v] for v in f] for f in facets])


def _staircase(first: Complex, second: Complex) -> list[tuple]:
    """Facets of the staircase triangulation of |first| x |second| [EZ].

    With the vertices of each factor totally ordered (here by label), a facet
    (v_0 < ... < v_a) of the first and (w_0 < ... < w_b) of the second give the
    C(a+b, a) simplices {(v_i(t), w_j(t))} along the monotone lattice paths from (0, 0)
    to (a, b); these triangulate the prism and agree on common faces.  Vertices are
    the pairs (v, w) of labels.
    """
    facets = []
    for f in first.facet_labels():
        for g in second.facet_labels():
            a, b = len(f) - 1, len(g) - 1
            for rises in combinations(range(a + b), a):  # steps at which v advances
                i = j = 0
                path = [(f[0], g[0])]
                for step in range(a + b):
                    if step in rises:
                        i += 1
                    else:
                        j += 1
                    path.append((f[i], g[j]))
                facets.append(tuple(path))
    return facets


def _staircase_f_vector(f: list[int], g: list[int]) -> list[int]:
    """f-vector of the staircase product from the factors' f-vectors.

    A k-simplex of the product lies over a unique pair (i-simplex, j-simplex) whose
    projections it covers; such k-chains in the grid [0..i] x [0..j] correspond to
    subsets A (steps where the first coordinate rises, |A| = i) and B (|B| = j) of the
    k steps with A u B = all steps: C(k, i) C(i, i + j - k) of them.  Counting
    argument, common practice.
    """
    top = (len(f) - 1) + (len(g) - 1)
    out = []
    for k in range(top + 1):
        total = 0
        for i, fi in enumerate(f):
            for j, gj in enumerate(g):
                if 0 <= i + j - k <= i and i <= k:
                    total += fi * gj * comb(k, i) * comb(i, i + j - k)
        out.append(total)
    return out


# ------------------------------------------------------------ balls, spheres
def simplex(d: int) -> Complex:
    """The d-simplex: the d-ball with vertices 1..d+1 and a single facet.

    Definition: all non-empty subsets of {1, ..., d+1}.

    Parameters: d -- an integer >= 0.  Returns: a Complex with f_k = C(d+1, k+1).

    >>> simplex(2).f_vector
    (3, 3, 1)

    Expected invariants: f_k = C(d+1, k+1); chi = 1; contractible, so H_0 = Z and
    every other homology group vanishes over any coefficients (a cone; Hatcher 2002,
    §2.1, from memory).  Method: direct; size 2^(d+1) - 1 simplices.
    """
    d = _need_int("d", d, 0, "simplex")
    return Complex.from_facets([list(range(1, d + 2))])


def simplex_invariants(d: int) -> dict:
    """The invariants the d-simplex must have: f_k = C(d+1, k+1), chi = 1, acyclic.

    Parameters: d -- an integer >= 0.  Returns: a record with the keys of the reference
    data (f_vector, euler, betti_Q, torsion, betti_F2, betti_F3, orientable, source, ...).
    Reference: the simplex is a cone, hence contractible (Hatcher 2002, §2.1).

    >>> simplex_invariants(1)["f_vector"]
    [2, 1]
    """
    d = _need_int("d", d, 0, "simplex")
    return _record(
        title=f"{d}-simplex ({d}-ball, {d + 1} vertices)", dimension=d, vertices=d + 1,
        f_vector=[comb(d + 1, k + 1) for k in range(d + 1)],
        betti_q=[1] + [0] * d, torsion=[[] for _ in range(d + 1)], orientable=True,
        source="standard: the d-simplex is a cone, hence contractible (Hatcher, Algebraic "
               "Topology, 2002, §2.1)", provenance="constructed: all subsets of {1..d+1}")


def simplex_boundary(d: int) -> Complex:
    """The boundary of the (d+1)-simplex: the d-sphere on d+2 vertices.

    Definition: all proper non-empty subsets of {1, ..., d+2}.

    Parameters: d -- an integer >= 0.  Returns: a Complex with f_k = C(d+2, k+1),
    k = 0..d.

    >>> simplex_boundary(1).f_vector
    (3, 3)

    Expected invariants: f_k = C(d+2, k+1); chi = 1 + (-1)^d; H_0 = Z^2 for d = 0, else
    H_0 = H_d = Z and all other groups 0, torsion-free (Hatcher 2002, Cor. 2.14, from
    memory).  Method: direct.
    """
    d = _need_int("d", d, 0, "simplex boundary")
    return Complex.from_facets([list(f) for f in combinations(range(1, d + 3), d + 1)])


def simplex_boundary_invariants(d: int) -> dict:
    """The invariants the boundary of the (d+1)-simplex must have (those of S^d).

    Parameters: d -- an integer >= 0.  Returns: a record with the keys of the reference
    data; f_k = C(d+2, k+1), H_0 = H_d = Z (H_0 = Z^2 for d = 0).
    Reference: homology of spheres (Hatcher 2002, Cor. 2.14).

    >>> simplex_boundary_invariants(2)["betti_Q"]
    [1, 0, 1]
    """
    d = _need_int("d", d, 0, "simplex boundary")
    betti_q = [2] if d == 0 else [1] + [0] * (d - 1) + [1]
    return _record(
        title=f"boundary of the {d + 1}-simplex (S^{d}, {d + 2} vertices)", dimension=d,
        vertices=d + 2, f_vector=[comb(d + 2, k + 1) for k in range(d + 1)],
        betti_q=betti_q, torsion=[[] for _ in range(d + 1)], orientable=True,
        source="standard: homology of spheres (Hatcher, Algebraic Topology, 2002, Cor. 2.14)",
        provenance="constructed: all (d+1)-subsets of {1..d+2}")


# ------------------------------------------------------------------ surfaces
def torus_7() -> Complex:
    """The 7-vertex torus of Möbius and Császár [MC].

    Definition: triangles {i, i+1, i+3} and {i, i+2, i+3} for i in Z/7, vertex i
    labelled i+1.  Every pair of vertices is an edge (K_7 embedded in the torus).

    >>> torus_7().f_vector
    (7, 21, 14)

    Expected invariants: f = (7, 21, 14), chi = 0, H_* = Z, Z^2, Z [CS].
    """
    return Complex.from_facets([[(i + s) % 7 + 1 for s in shape]
                                for i in range(7) for shape in ((0, 1, 3), (0, 2, 3))])


# The hemi-icosahedron: antipodal quotient of the icosahedron boundary [RP].
_RP2_6 = ((1, 2, 3), (1, 2, 4), (1, 3, 5), (1, 4, 6), (1, 5, 6),
          (2, 3, 6), (2, 4, 5), (2, 5, 6), (3, 4, 5), (3, 4, 6))


def projective_plane_6() -> Complex:
    """The 6-vertex real projective plane (hemi-icosahedron) [RP].

    Definition: the ten triangles 123 124 135 146 156 236 245 256 345 346; every pair
    of the six vertices is an edge (K_6 embedded in RP^2).

    >>> projective_plane_6().f_vector
    (6, 15, 10)

    Expected invariants: f = (6, 15, 10), chi = 1, H_* = Z, Z/2, 0 [CS].
    """
    return Complex.from_facets([list(f) for f in _RP2_6])


def _surface_sum(piece: Complex, copies: int) -> Complex:
    """Connected sum of ``copies`` copies of a closed surface ``piece`` (labels 1..m).

    Each new copy loses its lexicographically first triangle tau, the complex built so
    far loses sigma, the last triangle of the previous copy, and tau is identified with
    sigma vertex by vertex in increasing order; the other vertices of the copy get the
    next free labels in their order.  The two parts meet exactly in the boundary of
    sigma, so the union is a simplicial complex, and each vertex link of a glued vertex
    is two arcs joined at their ends: a circle.  Linear time in ``copies``.
    """
    facets = sorted(tuple(f) for f in piece.facet_labels())
    m, tau = piece.n_vertices, facets[0]
    total, last, size = set(facets), facets, m
    for _ in range(copies - 1):
        sigma = max(last)
        total.discard(sigma)
        image = dict(zip(tau, sigma))
        for v in range(1, m + 1):
            if v not in image:
                size += 1
                image[v] = size
        last = [tuple(sorted(image[v] for v in f)) for f in facets[1:]]
        total.update(last)
    return Complex.from_facets([list(f) for f in sorted(total)])


def orientable_surface(g: int) -> Complex:
    """A triangulation of the closed orientable surface of genus g.

    Definition: g = 0 is the boundary of the tetrahedron; g >= 1 is the connected sum of
    g copies of the 7-vertex torus [MC], each glued to the previous one by removing a
    triangle from both and identifying the two boundary triangles (vertices 1..n).

    Parameters: g -- an integer >= 0.  Returns: a Complex, a closed 2-manifold (every
    vertex link is a circle).

    >>> orientable_surface(2).f_vector
    (11, 39, 26)

    Expected invariants [CS]: for g >= 1, f = (4g + 3, 18g + 3, 12g + 2) (each connected
    sum of surfaces loses 3 vertices, 3 edges and 2 triangles); chi = 2 - 2g;
    H_0 = Z, H_1 = Z^(2g), H_2 = Z, torsion-free, so the Betti numbers are (1, 2g, 1)
    over Q, Z/2 and Z/3.  Method: iterated gluing, linear in g.
    """
    g = _need_int("g", g, 0, "orientable surface")
    if g == 0:
        return simplex_boundary(2)
    return _surface_sum(torus_7(), g)


def orientable_surface_invariants(g: int) -> dict:
    """The invariants the orientable surface of genus g must have.

    Parameters: g -- an integer >= 0.  Returns: a record with the keys of the reference
    data: f = (4g+3, 18g+3, 12g+2) for g >= 1 ((4, 6, 4) for g = 0), chi = 2 - 2g,
    H_* = Z, Z^(2g), Z.  Reference: classification of surfaces [CS].

    >>> orientable_surface_invariants(3)["euler"]
    -4
    """
    g = _need_int("g", g, 0, "orientable surface")
    f = [4, 6, 4] if g == 0 else [4 * g + 3, 18 * g + 3, 12 * g + 2]
    return _record(
        title=f"closed orientable surface of genus {g} ({f[0]} vertices)", dimension=2,
        vertices=f[0], f_vector=f, betti_q=[1, 2 * g, 1], torsion=[[], [], []],
        orientable=True,
        source="classification of surfaces: chi = 2 - 2g, H_1 = Z^(2g) (Massey, Algebraic "
               "Topology: An Introduction, 1967); 7-vertex torus of Moebius (1861) and "
               "Csaszar (1949)",
        provenance="constructed: boundary of the tetrahedron (g = 0) or connected sum of g "
                   "7-vertex tori")


def nonorientable_surface(k: int) -> Complex:
    """A triangulation of the closed non-orientable surface with k cross-caps.

    Definition: the connected sum of k copies of the 6-vertex projective plane [RP],
    glued as in :func:`orientable_surface` (vertices 1..n).  k = 1 is RP^2, k = 2 the
    Klein bottle.

    Parameters: k -- an integer >= 1.  Returns: a Complex, a closed 2-manifold.

    >>> nonorientable_surface(2).f_vector
    (9, 27, 18)

    Expected invariants [CS]: f = (3k + 3, 12k + 3, 8k + 2); chi = 2 - k;
    H_1 = Z^(k-1) + Z/2, H_2 = 0, so the Betti numbers are (1, k-1, 0) over Q and Z/3
    and (1, k, 1) over Z/2 [UC].  Method: iterated gluing, linear in k.
    """
    k = _need_int("k", k, 1, "non-orientable surface")
    return _surface_sum(projective_plane_6(), k)


def nonorientable_surface_invariants(k: int) -> dict:
    """The invariants the non-orientable surface with k cross-caps must have.

    Parameters: k -- an integer >= 1.  Returns: a record with the keys of the reference
    data: f = (3k+3, 12k+3, 8k+2), chi = 2 - k, H_* = Z, Z^(k-1) + Z/2, 0.
    Reference: classification of surfaces [CS]; universal coefficients [UC].

    >>> nonorientable_surface_invariants(2)["torsion"]
    [[], [2], []]
    """
    k = _need_int("k", k, 1, "non-orientable surface")
    return _record(
        title=f"closed non-orientable surface with {k} cross-caps ({3 * k + 3} vertices)",
        dimension=2, vertices=3 * k + 3, f_vector=[3 * k + 3, 12 * k + 3, 8 * k + 2],
        betti_q=[1, k - 1, 0], torsion=[[], [2], []], orientable=False,
        source="classification of surfaces: chi = 2 - k, H_1 = Z^(k-1) + Z/2 (Massey, "
               "Algebraic Topology: An Introduction, 1967); 6-vertex RP^2 (hemi-icosahedron)",
        provenance="constructed: connected sum of k 6-vertex projective planes")


# ------------------------------------------------------------------ products
def sphere_product(a: int, b: int) -> Complex:
    """The staircase triangulation of S^a x S^b, each sphere the boundary of a simplex.

    Definition: the product [EZ] of ``simplex_boundary(a)`` and ``simplex_boundary(b)``
    with vertex orders 1 < 2 < ...; the pair (v, w) is labelled (v - 1)(b + 2) + w.

    Parameters: a, b -- integers >= 1.  Returns: a Complex, a closed (a+b)-manifold on
    (a+2)(b+2) vertices with (a+2)(b+2) C(a+b, a) facets.

    >>> sphere_product(1, 1).f_vector
    (9, 27, 18)

    Expected invariants: f-vector by the chain count of the staircase product (see
    :func:`sphere_product_invariants`); by the Künneth formula [KU] H_k(S^a x S^b) is
    free of rank [k = 0] + [k = a] + [k = b] + [k = a + b]; chi = (1 + (-1)^a)(1 + (-1)^b).
    S^1 x S^1 is the 9-vertex "3 x 3 grid" torus and S^1 x S^2 a 12-vertex 3-manifold
    with f = (12, 48, 72, 36).
    """
    a = _need_int("a", a, 1, "sphere product")
    b = _need_int("b", b, 1, "sphere product")
    return _numbered(_staircase(simplex_boundary(a), simplex_boundary(b)))


def sphere_product_invariants(a: int, b: int) -> dict:
    """The invariants the staircase product S^a x S^b must have.

    Parameters: a, b -- integers >= 1.  Returns: a record with the keys of the reference
    data: free homology of rank [k=0] + [k=a] + [k=b] + [k=a+b], the f-vector from the
    chain count of the staircase product.  Reference: Künneth formula [KU]; [EZ].

    >>> sphere_product_invariants(1, 2)["betti_Q"]
    [1, 1, 1, 1]
    """
    a = _need_int("a", a, 1, "sphere product")
    b = _need_int("b", b, 1, "sphere product")
    betti_q = [0] * (a + b + 1)
    for k in (0, a, b, a + b):
        betti_q[k] += 1
    f = _staircase_f_vector([comb(a + 2, k + 1) for k in range(a + 1)],
                            [comb(b + 2, k + 1) for k in range(b + 1)])
    return _record(
        title=f"S^{a} x S^{b} (staircase product, {f[0]} vertices)", dimension=a + b,
        vertices=f[0], f_vector=f, betti_q=betti_q, torsion=[[] for _ in betti_q],
        orientable=True,
        source="Kuenneth formula (Hatcher, Algebraic Topology, 2002, Thm 3B.6); staircase "
               "triangulation of products (Eilenberg and Zilber, Amer. J. Math. 75 (1953))",
        provenance="constructed: staircase product of two simplex boundaries")


def torus_product(n: int) -> Complex:
    """The n-torus (S^1)^n as the iterated staircase product of triangles' boundaries.

    Definition: ((S^1 x S^1) x S^1) x ... with each S^1 the 3-cycle on 1 < 2 < 3 and the
    vertices of each partial product ordered lexicographically; labels 1..3^n in that
    order [EZ].

    Parameters: n -- an integer >= 1.  Returns: a Complex, a closed n-manifold on 3^n
    vertices with 3^n n! facets.

    >>> torus_product(2).f_vector
    (9, 27, 18)

    Expected invariants: H_k((S^1)^n) = Z^C(n, k), torsion-free, chi = 0 for n >= 1
    (Künneth formula [KU]); f-vector from the staircase chain count.  Method: n - 1
    staircase products; keep n <= 4 (3^n n! facets).
    """
    n = _need_int("n", n, 1, "torus product")
    circle = simplex_boundary(1)
    K = circle
    for _ in range(n - 1):
        K = _numbered(_staircase(K, circle))
    return K


def torus_product_invariants(n: int) -> dict:
    """The invariants the staircase n-torus must have.

    Parameters: n -- an integer >= 1.  Returns: a record with the keys of the reference
    data: H_k = Z^C(n, k), chi = 0, f-vector by the staircase chain count.
    Reference: Künneth formula [KU]; [EZ].

    >>> torus_product_invariants(3)["betti_Q"]
    [1, 3, 3, 1]
    """
    n = _need_int("n", n, 1, "torus product")
    f = [3, 3]
    for _ in range(n - 1):
        f = _staircase_f_vector(f, [3, 3])
    betti_q = [comb(n, k) for k in range(n + 1)]
    return _record(
        title=f"{n}-torus (S^1)^{n} (staircase product, {3 ** n} vertices)", dimension=n,
        vertices=3 ** n, f_vector=f, betti_q=betti_q, torsion=[[] for _ in betti_q],
        orientable=True,
        source="Kuenneth formula (Hatcher, Algebraic Topology, 2002, Thm 3B.6): "
               "H_k((S^1)^n) = Z^C(n,k); staircase triangulation (Eilenberg and Zilber, "
               "Amer. J. Math. 75 (1953))",
        provenance="constructed: iterated staircase product of 3-cycles")


# --------------------------------------------------------------- lens spaces
def _lens_check(p, q) -> tuple[int, int]:
    p = _need_int("p", p, 2, "lens space")
    q = _need_int("q", q, 1, "lens space")
    if q >= p or gcd(p, q) != 1:
        raise ConstructionError(
            f"lens space L({p},{q}): q must satisfy 1 <= q < p and gcd(p, q) = 1")
    return p, q


def lens_space(p: int, q: int) -> Complex:
    """A triangulation of the lens space L(p, q) as a quotient of a subdivided S^3.

    Definition [LS]: L(p, q) = S^3 / (Z/p), the generator acting by
    (z, w) -> (zeta z, zeta^q w).  Here S^3 = S^1 * S^1 is the join X = C * C' of two
    2p-cycles a_0..a_(2p-1) and b_0..b_(2p-1); the generator acts simplicially by
    a_i -> a_(i+2), b_j -> b_(j+2q) (the rotations by 2 pi / p and 2 pi q / p of the
    regular 2p-gons).  No simplex of X contains two vertices of one orbit, so the
    action is free and injective on every closed simplex; the orbit space is then a
    regular cell complex, and its barycentric subdivision -- the quotient of the
    barycentric subdivision sd(X) by the action, computed here -- is a simplicial
    complex triangulating L(p, q).  The builder checks the covering condition
    f_k(quotient) = f_k(sd X) / p in every dimension.

    Parameters: p >= 2, 1 <= q < p with gcd(p, q) = 1.  Returns: a Complex, a closed
    orientable 3-manifold on 16p + 8 vertices (an orbit of simplices of X per vertex).

    >>> lens_space(2, 1).f_vector  # RP^3
    (40, 232, 384, 192)

    Expected invariants: H_* = Z, Z/p, 0, Z [LS]; Betti numbers (1, 0, 0, 1) over Q and
    over Z/r for r not dividing p, (1, 1, 1, 1) over Z/r for r | p [UC]; chi = 0;
    f = (16p + 8, 112p + 8, 192p, 96p): f_0 and f_3 = 24 f_3(X) / p by counting orbits
    of simplices and of flags of X (f(X) = (4p, 4p^2 + 4p, 8p^2, 4p^2)), the rest by
    [DS].  Method: O(p) time; each simplex of X is replaced by the member of its orbit
    whose first vertex has index 0 or 1.
    """
    p, q = _lens_check(p, q)
    n = 2 * p
    q_inverse = pow(q, -1, p)

    def act(simplex_: tuple, t: int) -> tuple:
        return tuple(sorted((side, (i + t * (2 if side == "a" else 2 * q)) % n)
                            for side, i in simplex_))

    def start(indices: list[int]) -> int:  # first vertex of a vertex or an edge of a cycle
        return indices[0] if len(indices) == 1 or (indices[0] + 1) % n == indices[1] \
            else indices[1]

    def representative(simplex_: tuple) -> tuple:
        """The member of the orbit whose first a-vertex (else first b-vertex) is 0 or 1."""
        a = sorted(i for side, i in simplex_ if side == "a")
        if a:
            return act(simplex_, -(start(a) // 2) % p)
        b = sorted(i for side, i in simplex_ if side == "b")
        return act(simplex_, -(start(b) // 2) * q_inverse % p)

    # one facet {a_i, a_(i+1), b_j, b_(j+1)} of X per orbit: i in {0, 1}
    orbit_number: dict[tuple, int] = {}
    flags = set()
    for i in (0, 1):
        for j in range(n):
            facet = (("a", i), ("a", i + 1), ("b", j), ("b", (j + 1) % n))
            for order in permutations(facet):
                chain = []
                for k in range(1, 5):
                    key = representative(order[:k])
                    chain.append(orbit_number.setdefault(key, len(orbit_number)))
                flags.add(tuple(sorted(chain)))
    # covering check: 24 flags per facet of X, f_3(X) = 4p^2 facets, p flags per orbit
    if len(flags) != 24 * n * n // p:
        raise AssertionError("lens space: flags of sd(X) collide in the quotient")
    order_ = sorted(orbit_number, key=lambda key: (len(key), key))
    label = {orbit_number[key]: position + 1 for position, key in enumerate(order_)}
    K = Complex.from_facets([[label[v] for v in f] for f in sorted(flags)])
    if list(K.f_vector) != [16 * p + 8, 112 * p + 8, 192 * p, 96 * p]:
        raise AssertionError("lens space: quotient f-vector differs from f(sd X) / p")
    return K


def lens_space_invariants(p: int, q: int) -> dict:
    """The invariants the triangulated lens space L(p, q) must have.

    Parameters: p >= 2, 1 <= q < p, gcd(p, q) = 1.  Returns: a record with the keys of
    the reference data: H_* = Z, Z/p, 0, Z; f = (16p+8, 112p+8, 192p, 96p).
    Reference: homology of lens spaces [LS]; [UC]; [DS].

    >>> lens_space_invariants(3, 1)["betti_F3"]
    [1, 1, 1, 1]
    """
    p, q = _lens_check(p, q)
    return _record(
        title=f"lens space L({p},{q}) ({16 * p + 8} vertices)", dimension=3,
        vertices=16 * p + 8, f_vector=[16 * p + 8, 112 * p + 8, 192 * p, 96 * p],
        betti_q=[1, 0, 0, 1], torsion=[[], [p], [], []], orientable=True,
        source="lens spaces L(p,q) = S^3/(Z/p), H_* = Z, Z/p, 0, Z (Hatcher, Algebraic "
               "Topology, 2002, Example 2.43); universal coefficients for Z/2, Z/3",
        provenance="constructed: quotient of the barycentric subdivision of the join of two "
                   "2p-cycles by (a_i, b_j) -> (a_(i+2), b_(j+2q))")

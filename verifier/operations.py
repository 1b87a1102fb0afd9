"""Operations that build new complexes from old ones.

Every function here is pure: it takes immutable :class:`~verifier.complex.Complex`
values (and simplices of them) and returns a new value, never changing its input.

Conventions
-----------
* A simplex argument ``x`` is a tuple of vertex **indices** of ``K``, as in
  ``K.simplices`` (use ``K.simplex_of(labels)`` to get one from labels).
* A complex returned by a *local* operation (star, link, skeleton, induced
  subcomplex, boundary, graph unit sphere) carries ``K``'s vertex **labels**, not
  its indices: its vertex indices are renumbered, its labels are the ones of ``K``.
* Sets of simplices (open star, interior) are frozensets of **positions** in
  ``K.simplices``.
* Operations on two complexes tag the labels as ``(0, a)`` for a vertex ``a`` of
  the first and ``(1, b)`` for a vertex ``b`` of the second.
* Bad arguments raise :class:`OperationError` (a ``ValueError``) with a message
  that says what was given and what would be valid.
"""

from __future__ import annotations

from collections.abc import Hashable, Iterable
from itertools import combinations

from .complex import SMALL_INPUT, Complex, _row_keys, _sort_labels

__all__ = [
    "OperationError", "star", "closed_star", "link", "skeleton", "induced", "relabel",
    "disjoint_union", "join", "cone", "suspension", "refine", "product", "unit_sphere",
    "boundary", "interior", "connected_sum", "graph_unit_sphere",
]


class OperationError(ValueError):
    """An operation was given an argument it cannot use (says which and why)."""


# ------------------------------------------------------------------ helpers
def _simplex(K: Complex, x) -> tuple[int, ...]:
    """``x`` as a sorted tuple of vertex indices of ``K``, or OperationError."""
    try:
        simplex = tuple(sorted(x))
    except TypeError:
        raise OperationError(
            f"expected a simplex as a tuple of vertex indices, got {x!r}") from None
    if not _is_simplex(K, simplex):
        raise OperationError(
            f"{x!r} is not a simplex of the complex; give a tuple of vertex indices "
            f"(K.simplex_of(labels) converts labels)")
    return simplex


def _is_simplex(K: Complex, simplex: tuple) -> bool:
    """Membership of a sorted tuple, by the index dict for small complexes and by a
    binary search over the lexicographic row keys of its dimension for large ones
    (which spares building a dict of every simplex to ask about one)."""
    if len(K.simplices) <= SMALL_INPUT:
        return simplex in K.index
    k = len(simplex) - 1
    if not (0 <= k <= K.dim and all(isinstance(v, int) and 0 <= v < K.n_vertices
                                    for v in simplex)):
        return False
    import numpy as np
    keys = K.simplex_keys(k)
    key = _row_keys(np.array([simplex], dtype=np.int64), K.n_vertices)
    at = int(np.searchsorted(keys, key)[0])
    return at < len(keys) and keys[at] == key[0]


def _generated(K: Complex, sets: Iterable[tuple[int, ...]]) -> Complex:
    """The smallest complex containing the given simplices of ``K`` (as index
    tuples), with ``K``'s labels."""
    return Complex.from_facets([K.label_of(s) for s in sets])


def _order_complex(labels: list, below: list[list[int]]) -> Complex:
    """The order complex of a finite poset: its vertices are the elements, its
    simplices the non-empty chains.

    The elements are ``0..n-1`` in a linear extension (an element comes after
    everything below it) and ``below[i]`` lists the elements strictly below ``i``.
    ``labels[i]`` labels element ``i``.  Chains are built by extending every chain
    that ends below ``i`` by ``i``; each chain is found once, already sorted.
    """
    ending: list[list[tuple[int, ...]]] = []
    for i, lower in enumerate(below):
        chains = [(i,)]
        for j in lower:
            chains.extend(c + (i,) for c in ending[j])
        ending.append(chains)
    canonical = _sort_labels(labels)
    if list(canonical) != list(labels):  # relabel so that index order is label order
        position = {label: p for p, label in enumerate(canonical)}
        new = [position[label] for label in labels]
        ending = [[tuple(sorted(new[v] for v in c)) for c in chains] for chains in ending]
    return Complex(canonical, tuple(sorted((c for chains in ending for c in chains),
                                           key=lambda c: (len(c), c))))


def _proper_faces(z: tuple[int, ...]):
    """The non-empty proper faces of a simplex, as index tuples."""
    for k in range(1, len(z)):
        yield from combinations(z, k)


def _tagged_facets(K: Complex, tag: int) -> list[list]:
    return [[(tag, v) for v in f] for f in K.facet_labels()]


# ------------------------------------------------------------- local pieces
def star(K: Complex, x) -> frozenset[int]:
    """The open star of a simplex: the positions of the simplices that contain it.

    St(x) = {z in K : x ⊆ z}.  It is a set of simplices, not a complex (it is
    closed upward, not downward); :func:`closed_star` is its closure.

    Parameters
    ----------
    K : Complex
    x : tuple of int -- a simplex of ``K`` as vertex indices.

    Returns
    -------
    frozenset of int -- positions in ``K.simplices``.

    >>> K = Complex.from_facets([[0, 1, 2], [2, 3]])
    >>> sorted(K.label_of(K.simplices[i]) for i in star(K, (2,)))
    [(0, 1, 2), (0, 2), (1, 2), (2,), (2, 3)]

    Notes
    -----
    Scans the simplices containing the first vertex of ``x``: O(|St(v)| dim).
    """
    x = _simplex(K, x)
    members = set(x)
    simplices = K.simplices
    start, around = K.vertex_star_arrays()
    return frozenset(j for j in around[start[x[0]]:start[x[0] + 1]].tolist()
                     if members.issubset(simplices[j]))


def closed_star(K: Complex, x) -> Complex:
    """The closed star of a simplex: the smallest subcomplex containing its open star.

    closed St(x) = {y in K : y ⊆ z for some z ⊇ x}, the union of the closed
    simplices that contain ``x``.

    Parameters
    ----------
    K : Complex
    x : tuple of int -- a simplex of ``K`` as vertex indices.

    Returns
    -------
    Complex -- with ``K``'s vertex labels.

    >>> K = Complex.from_facets([[0, 1, 2], [2, 3], [3, 4]])
    >>> closed_star(K, K.simplex_of([2])).facet_labels()
    [[2, 3], [0, 1, 2]]
    """
    simplices = K.simplices
    return _generated(K, (simplices[j] for j in star(K, x)))


def link(K: Complex, x) -> Complex:
    """The link of a simplex: the simplices disjoint from it whose union with it is in K.

    Lk(x) = {z in K : z ∩ x = ∅, z ∪ x in K}.  For a vertex of a combinatorial
    d-manifold it is a (d-1)-sphere.  The link of a facet is the empty complex
    ``Complex((), ())``.

    Parameters
    ----------
    K : Complex
    x : tuple of int -- a simplex of ``K`` as vertex indices.

    Returns
    -------
    Complex -- with ``K``'s vertex labels.

    >>> K = Complex.from_facets([[0, 1, 2], [0, 2, 3]])
    >>> link(K, K.simplex_of([0])).facet_labels()
    [[1, 2], [2, 3]]
    >>> link(K, K.simplex_of([0, 2])).facet_labels()
    [[1], [3]]

    Notes
    -----
    Every z ∪ x is in the open star of x, so Lk(x) = {z \\ x : z in St(x), z ≠ x}.

    References
    ----------
    .. [1] J. R. Munkres, *Elements of Algebraic Topology*, Addison-Wesley 1984, §2.
    """
    simplices = K.simplices
    x = _simplex(K, x)
    members = set(x)
    return _generated(K, (tuple(v for v in simplices[j] if v not in members)
                                for j in star(K, x) if len(simplices[j]) > len(x)))


def skeleton(K: Complex, k: int) -> Complex:
    """The k-skeleton: the simplices of dimension at most k.

    Parameters
    ----------
    K : Complex
    k : int -- a dimension, ``k >= 0``.

    Returns
    -------
    Complex -- same labels and vertex indices as ``K``; its simplices are a prefix
    of ``K.simplices`` (positions agree).

    >>> K = Complex.from_facets([[0, 1, 2, 3]])
    >>> skeleton(K, 1).f_vector
    (4, 6)
    """
    if isinstance(k, bool) or not isinstance(k, int) or k < 0:
        raise OperationError(f"skeleton dimension must be an integer >= 0, got {k!r}")
    count = sum(K.f_vector[:k + 1])
    return Complex(K.labels, K.simplices[:count])


def induced(K: Complex, vertices: Iterable[Hashable]) -> Complex:
    """The induced subcomplex on a set of vertices: the simplices all of whose vertices lie in it.

    K[W] = {z in K : z ⊆ W}.

    Parameters
    ----------
    K : Complex
    vertices : iterable of vertex labels of ``K`` (labels, not indices).

    Returns
    -------
    Complex -- with ``K``'s vertex labels; its vertices are exactly ``vertices``.

    >>> K = Complex.from_facets([[0, 1, 2], [2, 3]])
    >>> induced(K, [0, 2, 3]).facet_labels()
    [[0, 2], [2, 3]]
    """
    position = {label: i for i, label in enumerate(K.labels)}
    chosen = set()
    for label in vertices:
        if label not in position:
            raise OperationError(f"{label!r} is not a vertex label of the complex")
        chosen.add(position[label])
    return _generated(K, (s for s in K.simplices if chosen.issuperset(s)))


def relabel(K: Complex, mapping) -> Complex:
    """The same complex with each vertex label ``a`` replaced by ``mapping[a]``.

    Parameters
    ----------
    K : Complex
    mapping : dict (labels it misses are kept) or function of one label; must be
        injective on the labels of ``K``.

    Returns
    -------
    Complex -- isomorphic to ``K``.

    >>> relabel(Complex.from_facets([[1, 2]]), {1: "a", 2: "b"}).facet_labels()
    [['a', 'b']]

    Notes
    -----
    Delegates to :meth:`Complex.relabel`; a non-injective mapping raises
    :class:`~verifier.complex.ComplexError`.
    """
    return K.relabel(mapping)


# ------------------------------------------------------ combining complexes
def disjoint_union(K: Complex, H: Complex) -> Complex:
    """The disjoint union K ⊔ H: the simplices of both, on disjoint vertex sets.

    Parameters
    ----------
    K, H : Complex

    Returns
    -------
    Complex -- vertex ``a`` of ``K`` is labelled ``(0, a)``, vertex ``b`` of ``H`` is
    ``(1, b)``.  Its f-vector is the sum of the two.

    >>> P = Complex.from_facets([["p"]])
    >>> disjoint_union(P, Complex.from_facets([[1, 2]])).facet_labels()
    [[(0, 'p')], [(1, 1), (1, 2)]]
    """
    return Complex.from_facets(_tagged_facets(K, 0) + _tagged_facets(H, 1))


def join(K: Complex, H: Complex) -> Complex:
    """The join K * H: every union of a simplex of K and a simplex of H.

    K * H = {x ∪ y : x in K ∪ {∅}, y in H ∪ {∅}, x ∪ y ≠ ∅} on disjoint vertex
    sets.  Its Euler characteristic satisfies 1 - χ(K*H) = (1 - χ(K))(1 - χ(H)).

    Parameters
    ----------
    K, H : Complex

    Returns
    -------
    Complex -- labels ``(0, a)`` for vertices of ``K``, ``(1, b)`` for those of ``H``.

    >>> two_points = Complex.from_facets([[0], [1]])
    >>> join(two_points, two_points).f_vector  # a square, the circle S^0 * S^0
    (4, 4)

    Notes
    -----
    The facets of the join are the unions of a facet of K and a facet of H.

    References
    ----------
    .. [1] J. Matoušek, *Using the Borsuk-Ulam Theorem*, Springer 2003, §4.2.
    """
    first = _tagged_facets(K, 0) or [[]]
    second = _tagged_facets(H, 1) or [[]]
    return Complex.from_facets([f + g for f in first for g in second])


def _new_labels(K: Complex, names: tuple, role: str) -> None:
    if len(set(names)) != len(names):
        raise OperationError(f"the {role} labels must be distinct, got {names!r}")
    for name in names:
        if name in K.labels:
            raise OperationError(
                f"{role} label {name!r} is already a vertex label of the complex; "
                f"pass another {role} label")


def cone(K: Complex, apex: Hashable = "apex") -> Complex:
    """The cone over K: the join of K with one new vertex, the apex.

    CK = K ∪ {x ∪ {apex} : x in K} ∪ {{apex}}.  It is contractible, so χ(CK) = 1.

    Parameters
    ----------
    K : Complex
    apex : label of the new vertex (default ``"apex"``); must not be a label of ``K``.

    Returns
    -------
    Complex -- ``K``'s labels unchanged, plus ``apex``.

    >>> cone(Complex.from_facets([[1, 2]]), apex=0).facet_labels()
    [[0, 1, 2]]
    """
    _new_labels(K, (apex,), "apex")
    return Complex.from_facets([f + [apex] for f in K.facet_labels()] or [[apex]])


def suspension(K: Complex, poles: tuple = ("north", "south")) -> Complex:
    """The suspension of K: the join of K with two new vertices, the poles.

    SK = K * S^0.  Its Euler characteristic is χ(SK) = 2 - χ(K); the suspension of
    a d-sphere is a (d+1)-sphere.

    Parameters
    ----------
    K : Complex
    poles : pair of distinct labels, neither a label of ``K``
        (default ``("north", "south")``).

    Returns
    -------
    Complex -- ``K``'s labels unchanged, plus the two poles.

    >>> suspension(Complex.from_facets([[0], [1]]), poles=(2, 3)).f_vector
    (4, 4)
    """
    poles = tuple(poles)
    if len(poles) != 2:
        raise OperationError(f"a suspension has two poles, got {poles!r}")
    _new_labels(K, poles, "pole")
    return Complex.from_facets([f + [p] for f in K.facet_labels() for p in poles]
                               or [[p] for p in poles])


def refine(K: Complex, times: int = 1) -> Complex:
    """The barycentric refinement K': the order complex of the face poset of K.

    The vertices of K' are the simplices of K; its simplices are the chains
    x0 ⊊ x1 ⊊ ... ⊊ xk of simplices of K.  K' is homeomorphic to K, and its
    f-vector is f_k(K') = sum_{i>=k} (k+1)! S(i+1, k+1) f_i(K), S the Stirling
    numbers of the second kind.

    Parameters
    ----------
    K : Complex
    times : int -- how many times to refine, ``times >= 0`` (0 returns ``K``).

    Returns
    -------
    Complex -- vertex ``i`` of each refinement is labelled by the integer ``i``, the
    position of the refined simplex in the previous complex's ``simplices``; so
    ``K.simplices[label]`` is the simplex a vertex of ``refine(K)`` stands for.

    >>> refine(Complex.from_facets([[0, 1, 2]])).f_vector
    (7, 12, 6)
    >>> refine(Complex.from_facets([[0, 1]])).facet_labels()
    [[0, 2], [1, 2]]

    Notes
    -----
    Chains are generated by extending the chains ending at each proper face of a
    simplex; since faces precede cofaces in simplex order, every chain comes out
    already sorted and nothing is closed or deduplicated afterwards.  Time is
    linear in the size of the output.

    References
    ----------
    .. [1] J. R. Munkres, *Elements of Algebraic Topology*, Addison-Wesley 1984, §15.
    .. [2] F. Brenti and V. Welker, f-vectors of barycentric subdivisions,
           *Math. Z.* 259 (2008) 849-865.
    """
    if isinstance(times, bool) or not isinstance(times, int) or times < 0:
        raise OperationError(f"refine times must be an integer >= 0, got {times!r}")
    for _ in range(times):
        K = _face_poset_chains(K)
    return K


def _face_poset_chains(K: Complex) -> Complex:
    """The order complex of the face poset of K (one barycentric refinement).

    Chains with m + 1 elements are the chains with m elements extended by a strict
    coface of their last element.  Positions in ``K.simplices`` list faces before
    cofaces, so a chain written in increasing positions is a sorted tuple; extending
    the chains in lexicographic order, each by its cofaces in increasing order, gives
    the longer chains in lexicographic order again.  Everything is a few array passes.
    """
    import numpy as np

    n = len(K.simplices)
    faces, cofaces = K.containments()
    strict = faces != cofaces
    faces, cofaces = faces[strict], cofaces[strict]
    order = np.lexsort((cofaces, faces))
    above = cofaces[order]                                   # strict cofaces, by face
    start = np.concatenate([[0], np.cumsum(np.bincount(faces, minlength=n))]).astype(np.int64)
    chains = np.arange(n, dtype=np.int64)[:, None]
    levels = [chains]
    while True:
        last = chains[:, -1]
        degree = start[last + 1] - start[last]
        total = int(degree.sum())
        if total == 0:
            break
        first = np.repeat(start[last], degree)
        within = np.arange(total, dtype=np.int64) - np.repeat(np.cumsum(degree) - degree, degree)
        chains = np.concatenate([np.repeat(chains, degree, axis=0),
                                 above[first + within][:, None]], axis=1)
        levels.append(chains)
    return Complex._from_arrays(tuple(range(n)), levels)


def product(K: Complex, H: Complex) -> Complex:
    """The product K × H, triangulated as the order complex of the product of face posets.

    The vertices are the pairs (x, y) of a simplex x of K and a simplex y of H; the
    simplices are the chains (x0, y0) < (x1, y1) < ... with xi ⊆ xi+1, yi ⊆ yi+1 and
    (xi, yi) ≠ (xi+1, yi+1).  Its space is |K| × |H|, so χ(K × H) = χ(K) χ(H) and
    dim(K × H) = dim K + dim H.

    Parameters
    ----------
    K, H : Complex

    Returns
    -------
    Complex -- vertex (x, y) is labelled by the pair of positions ``(i, j)`` with
    ``x = K.simplices[i]``, ``y = H.simplices[j]``.

    >>> edge = Complex.from_facets([[0, 1]])
    >>> product(edge, edge).f_vector  # a square cut into 8 triangles
    (9, 16, 8)

    Notes
    -----
    The order complex of the product of the face posets of K and H is a
    triangulation of |K| × |H| [1]; its size grows like the product of the two
    refinements, so keep the factors small.

    References
    ----------
    .. [1] A. Björner, Topological methods, in *Handbook of Combinatorics*,
           Elsevier 1995, §10.
    """
    m = len(H.simplices)
    faces_K = [[K.index[y] for y in _proper_faces(z)] + [i] for i, z in enumerate(K.simplices)]
    faces_H = [[H.index[y] for y in _proper_faces(z)] + [j] for j, z in enumerate(H.simplices)]
    below = [[a * m + b for a in faces_K[i] for b in faces_H[j] if (a, b) != (i, j)]
             for i in range(len(K.simplices)) for j in range(m)]
    labels = [(i, j) for i in range(len(K.simplices)) for j in range(m)]
    return _order_complex(labels, below)


# ------------------------------------------------------- spheres and boundaries
def unit_sphere(K: Complex, x) -> Complex:
    """The unit sphere of a simplex x: the simplices comparable with x, as an order complex.

    S(x) is the order complex of {y in K : y ⊊ x or x ⊊ y}, which is the link of
    the vertex x in the barycentric refinement K' (the unit sphere of x in the
    graph of K').  It is the join of the refined boundary of x and the order
    complex of the simplices strictly containing x.

    Parameters
    ----------
    K : Complex
    x : tuple of int -- a simplex of ``K`` as vertex indices.

    Returns
    -------
    Complex -- each vertex is labelled by its simplex of ``K`` as a tuple of ``K``'s labels.

    >>> triangle = Complex.from_facets([["a", "b", "c"]])
    >>> unit_sphere(triangle, triangle.simplex_of(["a"])).facet_labels()
    [[('a', 'b'), ('a', 'b', 'c')], [('a', 'b', 'c'), ('a', 'c')]]

    Notes
    -----
    A face of x lies below every simplex containing x, so a set of simplices
    comparable with x is a chain exactly when adding x keeps it a chain: the chains
    of that set are the simplices of the link of x in K'.

    References
    ----------
    .. [1] O. Knill, The graph spectrum of barycentric refinements,
           arXiv:1508.02027 (2015).
    """
    x = _simplex(K, x)
    index, simplices = K.index, K.simplices
    members = sorted([index[y] for y in _proper_faces(x)] + [j for j in star(K, x)
                                                              if j != index[x]])
    local = {j: p for p, j in enumerate(members)}
    below = [[local[index[y]] for y in _proper_faces(simplices[j]) if index[y] in local]
             for j in members]
    return _order_complex([K.label_of(simplices[j]) for j in members], below)


def _boundary_faces(K: Complex) -> list[tuple[int, ...]]:
    """The (d-1)-simplices of a pure d-complex that lie in exactly one facet."""
    if not K.is_pure():
        dims = sorted({len(f) - 1 for f in K.facets})
        raise OperationError(
            f"the boundary is defined for pure complexes (all facets of one dimension); "
            f"this complex has facets of dimensions {dims}")
    if len(K.simplices) > SMALL_INPUT and K.dim >= 1:
        return [tuple(face) for face in K.simplex_array(K.dim - 1)[_free_faces(K)].tolist()]
    count: dict[tuple[int, ...], int] = {}
    for f in K.facets:
        for face in combinations(f, len(f) - 1):
            if face:
                count[face] = count.get(face, 0) + 1
    return [face for face, c in count.items() if c == 1]


def _free_faces(K: Complex):
    """Indices (among the (d-1)-simplices) of the faces in exactly one facet of a pure
    d-complex, d >= 1, counted from the face table in one pass."""
    import numpy as np
    d = K.dim
    below = K.face_positions(d).ravel() - K.dimension_offsets()[d - 1]
    return np.flatnonzero(np.bincount(below, minlength=K.f_vector[d - 1]) == 1)


def boundary(K: Complex) -> Complex:
    """The boundary of a pure complex: the closure of its free codimension-one faces.

    For a pure d-complex, ∂K is the subcomplex generated by the (d-1)-simplices
    contained in exactly one facet.  For a d-manifold with boundary it is the
    boundary (d-1)-manifold; for a closed manifold it is empty.

    Parameters
    ----------
    K : Complex -- pure (every facet of dimension ``K.dim``).

    Returns
    -------
    Complex -- with ``K``'s vertex labels; ``Complex((), ())`` if there is none.

    >>> boundary(Complex.from_facets([[0, 1, 2]])).facet_labels()
    [[0, 1], [0, 2], [1, 2]]

    Raises
    ------
    OperationError -- if ``K`` is not pure.
    """
    return _generated(K, _boundary_faces(K))


def interior(K: Complex) -> frozenset[int]:
    """The interior of a pure complex: the positions of the simplices not in its boundary.

    int K = K \\ ∂K, a set of simplices (not a complex).

    Parameters
    ----------
    K : Complex -- pure.

    Returns
    -------
    frozenset of int -- positions in ``K.simplices``.

    >>> K = Complex.from_facets([[0, 1, 2], [0, 2, 3]])
    >>> sorted(K.label_of(K.simplices[j]) for j in interior(K))
    [(0, 1, 2), (0, 2), (0, 2, 3)]
    """
    if len(K.simplices) > SMALL_INPUT and K.dim >= 1:
        import numpy as np
        _boundary_faces(K)                                   # purity, with its message
        free = np.zeros(len(K.simplices), dtype=bool)
        free[K.dimension_offsets()[K.dim - 1] + _free_faces(K)] = True
        faces, cofaces = K.containments()
        on_boundary = np.zeros(len(K.simplices), dtype=bool)
        on_boundary[faces[free[cofaces]]] = True               # faces of free faces
        return frozenset(np.flatnonzero(~on_boundary).tolist())
    on_boundary = {y for face in _boundary_faces(K) for k in range(1, len(face) + 1)
                   for y in combinations(face, k)}
    return frozenset(j for j, z in enumerate(K.simplices) if z not in on_boundary)


def connected_sum(K: Complex, H: Complex) -> Complex:
    """The connected sum K # H: remove a facet from each and glue along the two boundaries.

    Both complexes must be pure of the same dimension d >= 1.  The facet removed
    from each is its first facet in simplex order; the i-th vertex (in index order)
    of the facet of ``K`` is identified with the i-th vertex of the facet of ``H``.
    When K and H are connected combinatorial d-manifolds, the result is a
    triangulation of their connected sum; f_i(K # H) = f_i(K) + f_i(H) - C(d+1, i+1)
    for i < d and f_d(K # H) = f_d(K) + f_d(H) - 2.

    Parameters
    ----------
    K, H : Complex -- pure, of the same dimension ``d >= 1``.

    Returns
    -------
    Complex -- labels ``(0, a)`` for vertices of ``K`` (the glued vertices keep
    ``K``'s label) and ``(1, b)`` for the other vertices of ``H``.

    >>> tetrahedron = Complex.from_facets([[0, 1, 2, 3]])
    >>> sphere = boundary(tetrahedron)
    >>> connected_sum(sphere, sphere).f_vector  # still a 2-sphere
    (5, 9, 6)

    Notes
    -----
    For oriented manifolds whose connected sum depends on orientations, this fixed
    choice of gluing picks one of them; for surfaces the result is unique up to
    homeomorphism.
    """
    for name, C in (("first", K), ("second", H)):
        if C.dim < 1 or not C.is_pure():
            raise OperationError(
                f"connected sum needs pure complexes of dimension >= 1; the {name} one has "
                f"facets of dimensions {sorted({len(f) - 1 for f in C.facets})}")
    if K.dim != H.dim:
        raise OperationError(
            f"connected sum needs complexes of the same dimension, got {K.dim} and {H.dim}")
    glued = dict(zip(H.facets[0], K.facets[0]))

    def label_in_H(w: int):
        return (0, K.labels[glued[w]]) if w in glued else (1, H.labels[w])

    return Complex.from_facets([[(0, K.labels[v]) for v in f] for f in K.facets[1:]] +
                               [[label_in_H(w) for w in f] for f in H.facets[1:]])


def graph_unit_sphere(K: Complex, v) -> Complex:
    """The unit sphere of a vertex in the graph of K, as a flag complex.

    S(v) is the flag (clique) complex of the subgraph of the 1-skeleton induced by
    the neighbours of v.  For a flag complex K it equals the link of v; it is the
    complex used for the curvature of flag complexes.

    Parameters
    ----------
    K : Complex
    v : int or tuple of one int -- a vertex of ``K`` as a vertex index (or the
        0-simplex ``(v,)``).

    Returns
    -------
    Complex -- with ``K``'s vertex labels; empty for an isolated vertex.

    >>> K = Complex.from_facets([[0, 1], [1, 2], [0, 2], [0, 3]])  # hollow triangle + edge
    >>> graph_unit_sphere(K, 0).facet_labels()  # 1 and 2 are adjacent: filled in
    [[3], [1, 2]]

    References
    ----------
    .. [1] O. Knill, A graph theoretical Gauss-Bonnet-Chern theorem,
           arXiv:1111.5395 (2011).
    """
    import networkx as nx

    x = _simplex(K, (v,) if isinstance(v, int) else v)
    if len(x) != 1:
        raise OperationError(f"graph_unit_sphere needs a vertex, got the simplex {v!r}")
    simplices = K.simplices
    neighbours = {w for j in K.vertex_stars()[x[0]] if len(simplices[j]) == 2
                  for w in simplices[j] if w != x[0]}
    graph = K.graph().subgraph(neighbours)
    return Complex.from_graph(nx.relabel_nodes(graph, {w: K.labels[w] for w in neighbours}),
                              flag=True)

"""Manifold, sphere and ball recognition.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from itertools import combinations

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components

from .. import operations
from ..complex import Complex, _row_keys
from .counting import euler
from .homology import betti

__all__ = ["NotDecided", "is_sphere", "is_ball", "is_closed_manifold", "is_manifold",
           "is_manifold_with_boundary"]


SMALL_COLLAPSE = 2_000    # complexes up to this size collapse in plain Python


class NotDecided(ValueError):
    """A yes/no invariant that our methods cannot decide for this input (says why)."""


def _components(K: Complex) -> int:
    """The number of connected components (of the 1-skeleton)."""
    if not K.n_vertices:
        return 0
    edges = K.simplex_array(1)
    graph = sp.coo_array((np.ones(len(edges)), (edges[:, 0], edges[:, 1])),
                         shape=(K.n_vertices, K.n_vertices))
    return int(connected_components(graph, directed=False)[0])


def _degrees(K: Complex) -> np.ndarray:
    """The number of edges at each vertex."""
    return np.bincount(K.simplex_array(1).ravel(), minlength=K.n_vertices)


# ----------------------------------------------------------------------------------
# Link tests for all simplices of one dimension at once (used for dimensions 1 to 3).

def _coface_counts(K: Complex, k: int) -> np.ndarray:
    """For every k-simplex, the number of (k+1)-simplices containing it."""
    offsets = K.dimension_offsets()
    if k + 1 > K.dim:
        return np.zeros(K.f_vector[k], dtype=np.int64)
    return np.bincount(K.face_positions(k + 1).ravel() - offsets[k], minlength=K.f_vector[k])


def _boundary_count(K: Complex, k: int) -> np.ndarray:
    """For every k-simplex, the number of free (d-1)-faces of the pure d-complex K
    (those in exactly one facet) that contain it; k <= d - 1."""
    d = K.dim
    free = np.flatnonzero(_coface_counts(K, d - 1) == 1)
    if k == d - 1:
        counts = np.zeros(K.f_vector[k], dtype=np.int64)
        counts[free] = 1
        return counts
    offsets = K.dimension_offsets()
    faces = _faces_of_dimension(K, d - 1, k)[free]
    return np.bincount(faces.ravel() - offsets[k], minlength=K.f_vector[k])


def _faces_of_dimension(K: Complex, j: int, k: int) -> np.ndarray:
    """For every j-simplex, the positions of its k-faces (one column per k-face)."""
    S = K.simplex_array(j)
    keys = K.simplex_keys(k)
    columns = [np.searchsorted(keys, _keys(K, S[:, list(c)]))
               for c in combinations(range(j + 1), k + 1)]
    return np.stack(columns, axis=1) + K.dimension_offsets()[k]


def _keys(K: Complex, rows: np.ndarray) -> np.ndarray:
    return _row_keys(rows, K.n_vertices)


def _links_connected(K: Complex, k: int) -> bool:
    """Is the link of every k-simplex connected (k <= dim - 2, K pure)?

    The 1-skeleton of Lk(s) has a vertex for each (k+1)-simplex t containing s and an
    edge for each (k+2)-simplex r containing s, joining the two faces r - {a} and
    r - {b} with r - {a, b} = s.  All these graphs are built at once, as one graph whose
    nodes are the pairs (t, i) (s = t minus its i-th vertex); its components never mix
    two simplices s, so every link is connected exactly when there are f_k components.
    """
    offsets = K.dimension_offsets()
    width = k + 2                                   # vertices of a (k+1)-simplex
    R = K.face_positions(k + 2) - offsets[k + 1]    # the (k+1)-faces of each r, by omitted vertex
    first, second = [], []
    for a, b in combinations(range(k + 3), 2):
        # s = r - {r_a, r_b}; in t1 = r - {r_a} the vertex r_b is at b - 1 (b > a);
        # in t2 = r - {r_b} the vertex r_a is at a
        first.append(R[:, a] * width + (b - 1))
        second.append(R[:, b] * width + a)
    nodes = K.f_vector[k + 1] * width
    graph = sp.coo_array((np.ones(sum(map(len, first))), (np.concatenate(first),
                                                            np.concatenate(second))),
                         shape=(nodes, nodes))
    return int(connected_components(graph, directed=False)[0]) == K.f_vector[k]


def _vertex_link_euler(K: Complex) -> np.ndarray:
    """chi(Lk v) for every vertex v: sum over simplices t containing v, t != v, of
    (-1)^(dim t - 1)."""
    chi = np.zeros(K.n_vertices, dtype=np.int64)
    for k in range(1, K.dim + 1):
        chi += (-1) ** (k - 1) * np.bincount(K.simplex_array(k).ravel(), minlength=K.n_vertices)
    return chi


def _low_dimensional_manifold(K: Complex, boundary: bool) -> bool:
    """The vertex-link test of :func:`is_closed_manifold` (``boundary=False``) or
    :func:`is_manifold` (``boundary=True``) for a pure K of dimension 1, 2 or 3, decided
    for all vertices at once.

    The links of a combinatorial manifold of dimension <= 3 are recognised by counting
    and connectivity (classification of curves and surfaces):
    d = 1: every vertex lies on two edges (one or two with boundary);
    d = 2: every edge lies in two triangles (one or two), every vertex link is connected,
    and (with boundary) a vertex lies on 0 or 2 boundary edges -- a circle or a path;
    d = 3: every triangle lies in two tetrahedra (one or two), every edge link is
    connected with 0 or 2 boundary triangles at the edge (a circle or a path), so that
    every vertex link is a surface; it must be connected with chi = 2 (a sphere) or,
    if the vertex lies on a boundary triangle, chi = 1 (a disc).
    """
    d = K.dim
    counts = _coface_counts(K, d - 1)
    if np.any(counts > 2) or (not boundary and np.any(counts < 2)):
        return False
    if d == 1:
        return True
    if boundary and not np.all(np.isin(_boundary_count(K, d - 2), (0, 2))):
        return False
    if not _links_connected(K, d - 2):
        return False
    if d == 2:
        return True
    if not _links_connected(K, 0):
        return False
    on_boundary = _boundary_count(K, 0) > 0 if boundary else np.zeros(K.n_vertices, bool)
    return bool(np.all(_vertex_link_euler(K) == np.where(on_boundary, 1, 2)))


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


def _collapses(K: Complex, without: tuple | None = None, attempts: int = 8) -> bool:
    """Does K (minus the facet ``without``) collapse to a point by greedy elementary
    collapses in one of ``attempts`` orders?  True is a witness of collapsibility.

    Small complexes go through :func:`_collapses_to_point`; large ones through a compiled
    worklist version of the same greedy rule (:func:`_collapse_kernel`): a free face s
    (exactly one coface t, which has no coface) is removed with t, and the faces of s and
    t whose coface counts drop are examined again.  Linear in the number of simplices
    times the square of the dimension.
    """
    if len(K.simplices) <= SMALL_COLLAPSE:
        simplices = set(K.simplices)
        return _collapses_to_point(simplices - {without} if without else simplices, attempts)
    import random
    offsets = K.dimension_offsets()
    n = len(K.simplices)
    face_start = np.zeros(n + 1, dtype=np.int64)
    codimension_one = [k + 1 if k else 0 for k in range(K.dim + 1)]     # faces per simplex
    face_start[1:] = np.cumsum(np.repeat(codimension_one, K.f_vector))
    faces = np.concatenate([np.zeros(0, dtype=np.int64)] +
                           [K.face_positions(k).ravel() for k in range(1, K.dim + 1)])
    owner = np.repeat(np.arange(n), np.diff(face_start))
    order = np.argsort(faces, kind="stable")
    coface_start = np.concatenate([[0], np.cumsum(np.bincount(faces, minlength=n))])
    cofaces = owner[order]
    alive = np.ones(n, dtype=np.bool_)
    if without is not None:
        alive[offsets[len(without) - 1] + int(np.searchsorted(
            K.simplex_keys(len(without) - 1),
            _keys(K, np.array([without], dtype=np.int64))[0]))] = False
    kernel = _collapse_kernel()
    for attempt in range(attempts):
        visit = np.concatenate([np.arange(offsets[k], offsets[k + 1], dtype=np.int64)
                                for k in range(K.dim, -1, -1)])   # higher dimensions first
        if attempt:                         # a seeded shuffle within each dimension
            shuffled = visit.tolist()
            random.Random(attempt).shuffle(shuffled)
            shuffled = np.array(shuffled, dtype=np.int64)
            dims = np.repeat(np.arange(K.dim + 1), K.f_vector)
            visit = shuffled[np.argsort(-dims[shuffled], kind="stable")]
        if kernel(face_start, faces, coface_start, cofaces, alive.copy(), visit) == 1:
            return True
    return False


_KERNEL: list = []


def _collapse_kernel():
    """The compiled greedy collapse (numba), compiled on first use and cached on disk."""
    if _KERNEL:
        return _KERNEL[0]
    import numba

    @numba.njit(cache=True)
    def collapse(face_start, faces, coface_start, cofaces, alive, visit):
        n = len(alive)
        count = np.zeros(n, dtype=np.int64)          # alive cofaces of each simplex
        for t in range(n):
            if alive[t]:
                for a in range(face_start[t], face_start[t + 1]):
                    count[faces[a]] += 1
        queue = np.empty(len(visit) + 2 * len(faces) + 1, dtype=np.int64)
        queue[:len(visit)] = visit                     # first in, first out, like sweeps
        head, tail = 0, len(visit)
        # every decrement queues at most one simplex, and every simplex whose count reaches
        # 0 queues its faces once: at most 2 |faces| entries after the initial ones
        remaining = 0
        for s in range(n):
            if alive[s]:
                remaining += 1
        while head < tail and remaining > 1:
            s = queue[head]
            head += 1
            if not alive[s] or count[s] != 1:
                continue
            t = -1
            for a in range(coface_start[s], coface_start[s + 1]):
                if alive[cofaces[a]]:
                    t = cofaces[a]
                    break
            if count[t] != 0:
                continue
            alive[s] = False                           # the elementary collapse of (s, t)
            alive[t] = False
            remaining -= 2
            for x in (s, t):
                for a in range(face_start[x], face_start[x + 1]):
                    f = faces[a]
                    count[f] -= 1
                    if not alive[f]:
                        continue
                    if count[f] == 1:
                        queue[tail] = f
                        tail += 1
                    elif count[f] == 0:            # f became maximal: its faces may be free
                        for b in range(face_start[f], face_start[f + 1]):
                            queue[tail] = faces[b]
                            tail += 1
        return remaining

    _KERNEL.append(collapse)
    return collapse


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
        return bool(np.all(_degrees(K) == 2)) and _components(K) == 1
    if not is_closed_manifold(K) or _components(K) != 1:
        return False
    if d == 2:
        return euler(K) == 2
    if euler(K) != (2 if d % 2 == 0 else 0) or any(betti(K, p=2)[1:d]):
        return False
    if _collapses(K, without=K.facets[0]):
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
        degrees = _degrees(K)
        return int(degrees.max()) <= 2 and int(np.count_nonzero(degrees == 1)) == 2
    if not is_manifold_with_boundary(K):
        return False
    if d == 2:
        return euler(K) == 1
    if euler(K) != 1 or not is_sphere(operations.boundary(K), d - 1):
        return False
    if _collapses(K):
        return True
    raise NotDecided(f"could not decide whether a {d}-manifold with sphere boundary is a ball "
                     "(greedy collapse got stuck)")


def _links_all(K: Complex, test) -> bool:
    return all(test(operations.link(K, (v,))) for v in range(K.n_vertices))


def is_closed_manifold(K: Complex) -> bool:
    """Is K a closed combinatorial manifold: pure of dimension d with every vertex link a
    (d-1)-sphere?

    Decided exactly for d <= 3 (links of dimension <= 2 are recognised by the
    classification of surfaces), for all vertices at once by counting cofaces and
    connected components of links (:func:`_low_dimensional_manifold`); for d >= 4 the
    link test uses :func:`is_sphere`'s collapse witness and may raise NotDecided.

    >>> is_closed_manifold(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    True
    >>> is_closed_manifold(Complex.from_facets([[1, 2, 3]]))
    False

    References: [MU] §35 (combinatorial manifolds, links).
    """
    d = K.dim
    if d < 0 or not K.is_pure():
        return False
    if 1 <= d <= 3:
        return _low_dimensional_manifold(K, boundary=False)
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
    if d <= 3:
        return _low_dimensional_manifold(K, boundary=True)
    return _links_all(K, lambda S: is_sphere(S, d - 1) or is_ball(S, d - 1))


def is_manifold_with_boundary(K: Complex) -> bool:
    """Is K a combinatorial manifold with nonempty boundary (some vertex link a ball)?

    >>> is_manifold_with_boundary(Complex.from_facets([[1, 2, 3]]))
    True
    >>> is_manifold_with_boundary(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    False
    """
    return is_manifold(K) and not is_closed_manifold(K)

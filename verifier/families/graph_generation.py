"""Every graph on n vertices exactly once up to isomorphism, by canonical augmentation.

Method (B. D. McKay, "Isomorph-free exhaustive generation", J. Algorithms 26 (1998)
306-324, vertex augmentation).  Suppose every graph on m vertices is known exactly once,
as a list of canonical *parents*.  Each graph G on n = m + 1 vertices has a *canonical
deletion vertex* c(G), chosen by a rule that depends on G only up to automorphism (below);
its *canonical parent* is G - c(G).  A child of a parent P is P plus a new vertex v = m
joined to a set S of P's vertices, and the child G = P + (v, S) is *accepted* iff v lies
in the Aut(G)-orbit of c(G).  Only one S per Aut(P)-orbit of subsets of V(P) is tried.

* Every graph on n vertices is reached: delete c(G); what is left is isomorphic to a
  parent P in the list, the isomorphism carries the neighbourhood of c(G) to a subset
  S0 of V(P), and the representative S of the Aut(P)-orbit of S0 gives a child
  isomorphic to G in which v plays the part of c(G), so it is accepted.
* No graph is reached twice: if accepted children P + (v, S) and P' + (v', S') are
  isomorphic, an isomorphism can be chosen that maps v to v' (both lie in the orbit of
  the canonical deletion vertex); it restricts to an isomorphism P -> P', so P = P' (one
  canonical parent per class) and it is an automorphism of P carrying S to S', so S and
  S' are the same orbit representative.

The canonical deletion vertex.  Each vertex u gets the invariant key
(deg u, sum of the degrees of u's neighbours, number of edges among u's neighbours),
compared lexicographically.  c(G) is, among the vertices of largest key, the one that a
canonical labelling places last.  A compiled screen (numba) computes the keys of every
child of a parent at once, for all 2^m subsets S: it rejects S at once when some old
vertex has a larger key than v, accepts S without any labelling when v alone has the
largest key, and leaves only ties to the canonical labelling (one labelling, and an
automorphism group when v is not the last of the tied vertices).  Every accepted child
is labelled once for its canonical code, which it needs as a case id and as a parent
(a tie reuses that labelling); each parent's automorphism group is computed once.

Canonical labellings and automorphism groups come from the BLISS algorithm (T. Junttila
and P. Kaski, "Engineering an efficient canonical labeling tool for large and sparse
graphs", ALENEX 2007) through python-igraph (``Graph.canonical_permutation`` with the
splitting heuristic ``"fl"``, ``Graph.automorphism_group``).  A graph on vertices 0..n-1
is stored as its *code*: the integer whose bit ``j (j - 1) / 2 + i`` is set when
{i, j}, i < j, is an edge (the upper triangle of the adjacency matrix read column by
column).  The canonical code of a graph is the code of its BLISS canonical form; two
graphs are isomorphic iff their canonical codes agree.  Every generated graph is stored
by its canonical code, and serves as a parent in that form.

Order.  The graphs on n vertices are listed parent by parent in the order of the list on
n - 1 vertices, and the children of one parent by increasing S (read as a bitmask); the
list on 1 vertex is the single vertex.  The order is therefore the same on every machine
and in every run for a given BLISS version (igraph is pinned in pyproject.toml).

Counts: OEIS A000088 (graphs on n unlabeled nodes) and A001349 (connected graphs on n
unlabeled nodes), checked by tests/test_graph_generation.py.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from numba import njit

from ..canonical_kernels import popcount

__all__ = ["A000088", "A001349", "MAX_GENERATED_VERTICES", "pair_bit", "graph_code",
           "code_edges", "canonical_code", "is_connected", "graphs_on", "children_of"]

# OEIS A000088: graphs on n unlabeled nodes, n = 0..11 (looked up on oeis.org).
A000088 = (1, 1, 2, 4, 11, 34, 156, 1044, 12346, 274668, 12005168, 1018997864)
# OEIS A001349: connected graphs on n unlabeled nodes, n = 0..11 (looked up on oeis.org).
A001349 = (1, 1, 1, 2, 6, 21, 112, 853, 11117, 261080, 11716571, 1006700565)

# 11 vertices: the code has 55 bits (fits an unsigned 64-bit word); the list of the
# 12,005,168 parents on 10 vertices is kept in memory while the children are made.
MAX_GENERATED_VERTICES = 11


# ------------------------------------------------------------------ codes
def pair_bit(i: int, j: int) -> int:
    """The bit of the edge {i, j} in a graph code.

    Definition: for i < j, ``j (j - 1) / 2 + i`` (pairs ordered by their larger end,
    then by the smaller); symmetric in i and j.

    >>> [pair_bit(0, 1), pair_bit(0, 2), pair_bit(2, 1), pair_bit(0, 3)]
    [0, 1, 2, 3]

    Reference: common practice, no source (the column-wise upper triangle).
    """
    if i > j:
        i, j = j, i
    return j * (j - 1) // 2 + i


def graph_code(n: int, edges) -> int:
    """The code of the graph on vertices 0..n-1 with these edges.

    Definition: the sum of ``2 ** pair_bit(i, j)`` over the edges {i, j}.

    >>> graph_code(3, [(0, 1), (1, 2)])        # the path 0 - 1 - 2
    5

    Reference: common practice, no source.
    """
    code = 0
    for i, j in edges:
        if i == j or not (0 <= i < n and 0 <= j < n):
            raise ValueError(f"({i}, {j}) is not an edge of a simple graph on vertices "
                             f"0..{n - 1}")
        code |= 1 << pair_bit(i, j)
    return code


@lru_cache(maxsize=None)
def _pairs(n: int) -> tuple[tuple[int, int], ...]:
    """The pairs {i, j}, i < j, of range(n) in bit order."""
    return tuple((i, j) for j in range(n) for i in range(j))


def code_edges(n: int, code: int) -> list[tuple[int, int]]:
    """The edges (i, j), i < j, of the graph with this code, in bit order.

    >>> code_edges(3, 5)
    [(0, 1), (1, 2)]

    Reference: inverse of :func:`graph_code`.
    """
    pairs = _pairs(n)
    return [pairs[k] for k in range(len(pairs)) if code >> k & 1]


def _rows(n: int, code: int) -> np.ndarray:
    """Adjacency rows as bitmasks: bit j of row i is set when {i, j} is an edge."""
    rows = np.zeros(n, dtype=np.int64)
    for i, j in code_edges(n, code):
        rows[i] |= 1 << j
        rows[j] |= 1 << i
    return rows


def _igraph(n: int, edges):
    import igraph

    return igraph.Graph(n=n, edges=edges)


def _canonical_labels(graph) -> list[int]:
    """The canonical label of each vertex: BLISS's canonical permutation lists, for
    each position k of the canonical form, the vertex placed there (the convention of
    ``Graph.permute_vertices`` in python-igraph 1.0), so vertex perm[k] gets label k."""
    perm = graph.canonical_permutation(sh="fl")
    labels = [0] * len(perm)
    for k, v in enumerate(perm):
        labels[v] = k
    return labels


def _relabelled_code(edges, labels) -> int:
    code = 0
    for i, j in edges:
        a, b = labels[i], labels[j]
        code |= 1 << (a * (a - 1) // 2 + b if a > b else b * (b - 1) // 2 + a)
    return code


def canonical_code(n: int, code: int) -> int:
    """The canonical code of a graph: the code of its canonical form.

    Definition: relabel the graph by the canonical labelling of BLISS (splitting
    heuristic "fl") and take the code; isomorphic graphs, and only they, get the same
    canonical code.

    Parameters: n -- number of vertices (1..11); code -- a graph code.
    Returns: an int.

    >>> canonical_code(3, graph_code(3, [(0, 1), (0, 2)])) == canonical_code(3, 5)
    True

    Reference: T. Junttila and P. Kaski, ALENEX 2007 (BLISS), via python-igraph.
    """
    edges = code_edges(n, code)
    return _relabelled_code(edges, _canonical_labels(_igraph(n, edges)))


@njit(cache=True)
def _connected_rows(rows, n):
    """True when the graph with these adjacency rows (n >= 1 vertices) is connected."""
    reach = np.int64(1)
    frontier = np.int64(1)
    while frontier:
        grown = reach
        for u in range(n):
            if frontier >> u & 1:
                grown |= rows[u]
        frontier = grown & ~reach
        reach = grown
    return reach == (np.int64(1) << n) - 1


def is_connected(n: int, code: int) -> bool:
    """True when the graph on vertices 0..n-1 with this code is connected.

    >>> is_connected(3, graph_code(3, [(0, 1), (1, 2)])), is_connected(3, 1)
    (True, False)

    Reference: definition (breadth-first search over bitmask rows).
    """
    return bool(_connected_rows(_rows(n, code), n))


# ------------------------------------------------------------- the screen
@njit(cache=True)
def _key(rows, degrees, u):
    """The invariant key of vertex u: (degree, neighbour degree sum, edges among the
    neighbours), packed into one integer (the last two fit in 8 and 6 bits, n <= 11)."""
    neighbours = rows[u]
    degree_sum = 0
    inside = 0
    w = 0
    x = neighbours
    while x:
        if x & 1:
            degree_sum += degrees[w]
            inside += popcount(rows[w] & neighbours)
        x >>= 1
        w += 1
    return (degrees[u] * 256 + degree_sum) * 64 + inside // 2


@njit(cache=True)
def _vertex_keys(rows, n):
    degrees = np.empty(n, dtype=np.int64)
    for u in range(n):
        degrees[u] = popcount(rows[u])
    keys = np.empty(n, dtype=np.int64)
    for u in range(n):
        keys[u] = _key(rows, degrees, u)
    return keys


@njit(cache=True)
def _screen(rows, m, representative):
    """For every subset S of the m parent vertices (a bitmask), what the child
    P + (v = m, S) needs: 0 -- skip (not an orbit representative, or v cannot be the
    canonical deletion vertex); 1 -- accepted, v alone has the largest key; 2 -- v ties
    with other vertices for the largest key.  Bit 4 is added when the child is connected.
    """
    n = m + 1
    status = np.zeros(1 << m, dtype=np.int8)
    parent_degree = np.empty(m, dtype=np.int64)
    for u in range(m):
        parent_degree[u] = popcount(rows[u])
    degrees = np.empty(n, dtype=np.int64)
    child = np.empty(n, dtype=np.int64)
    for S in range(1 << m):
        if not representative[S]:
            continue
        dv = popcount(S)
        possible = True
        for u in range(m):
            d = parent_degree[u] + (S >> u & 1)
            if d > dv:
                possible = False
                break
            degrees[u] = d
        if not possible:
            continue
        degrees[m] = dv
        for u in range(m):
            child[u] = rows[u] | ((S >> u & 1) << m)
        child[m] = S
        kv = _key(child, degrees, m)
        verdict = 1
        for u in range(m):
            if degrees[u] == dv:
                ku = _key(child, degrees, u)
                if ku > kv:
                    verdict = 0
                    break
                if ku == kv:
                    verdict = 2
        if verdict == 0:
            continue
        if _connected_rows(child, n):
            verdict += 4
        status[S] = verdict
    return status


@njit(cache=True)
def _orbit_minima(images, size):
    """label[S] = the least subset in the orbit of S under the group generated by the
    permutations images[k] of range(size) (iterated to a fixed point)."""
    label = np.arange(size)
    changed = True
    while changed:
        changed = False
        for k in range(images.shape[0]):
            for S in range(size):
                t = label[images[k, S]]
                if t < label[S]:
                    label[S] = t
                    changed = True
                elif label[S] < t:
                    label[images[k, S]] = label[S]
                    changed = True
    return label


@lru_cache(maxsize=None)
def _all_subsets(m: int) -> np.ndarray:
    return np.ones(1 << m, dtype=np.bool_)


def _subset_representatives(m: int, generators) -> np.ndarray:
    """One subset of range(m) per orbit of the group generated by ``generators``
    (permutations as lists): the least member of each orbit, as a boolean mask."""
    if not generators:
        return _all_subsets(m)
    masks = np.arange(1 << m, dtype=np.int64)
    images = np.zeros((len(generators), 1 << m), dtype=np.int64)
    for k, g in enumerate(generators):
        for i in range(m):
            images[k] |= ((masks >> i) & 1) << g[i]
    return _orbit_minima(images, 1 << m) == masks


@lru_cache(maxsize=None)
def _bits(m: int) -> tuple[tuple[int, ...], ...]:
    return tuple(tuple(u for u in range(m) if S >> u & 1) for S in range(1 << m))


def _same_orbit(generators, n: int, a: int, b: int) -> bool:
    """True when a and b lie in one orbit of the group generated by ``generators``."""
    parent = list(range(n))

    def root(x):
        while parent[x] != x:
            parent[x] = parent[parent[x]]
            x = parent[x]
        return x
    for g in generators:
        for x in range(n):
            rx, ry = root(x), root(g[x])
            if rx != ry:
                parent[rx] = ry
    return root(a) == root(b)


def _children(m: int, code: int, connected_only: bool = False) -> list[int]:
    """The canonical codes of the accepted children of the canonical parent ``code`` on
    m vertices, by increasing S; only the connected ones when ``connected_only``."""
    n = m + 1
    edges = code_edges(m, code)
    rows = _rows(m, code)
    generators = _igraph(m, edges).automorphism_group(sh="fl") if m > 1 else []
    status = _screen(rows, m, _subset_representatives(m, generators))
    bits = _bits(m)
    found = []
    for S in np.flatnonzero(status).tolist():
        verdict = int(status[S])
        if connected_only and not verdict & 4:
            continue
        child_edges = edges + [(u, m) for u in bits[S]]
        graph = _igraph(n, child_edges)
        labels = _canonical_labels(graph)
        if verdict & 3 == 2:
            child_rows = rows.copy()
            for u in bits[S]:
                child_rows[u] |= 1 << m
            child_rows = np.append(child_rows, np.int64(S))
            keys = _vertex_keys(child_rows, n)
            deletion = max((u for u in range(n) if keys[u] == keys[m]),
                           key=lambda u: labels[u])
            if deletion != m and not _same_orbit(graph.automorphism_group(sh="fl"), n,
                                                 deletion, m):
                continue
        found.append(_relabelled_code(child_edges, labels))
    return found


def _check_vertices(n: int, low: int = 1) -> None:
    if not low <= n <= MAX_GENERATED_VERTICES:
        raise ValueError(f"graphs are generated on {low} to {MAX_GENERATED_VERTICES} "
                         f"vertices; asked for {n}")


@lru_cache(maxsize=None)
def _level(n: int) -> np.ndarray:
    if n == 1:
        return np.zeros(1, dtype=np.uint64)
    found = []
    for code in _level(n - 1).tolist():
        found.extend(_children(n - 1, code))
    return np.array(found, dtype=np.uint64)


def graphs_on(n: int) -> np.ndarray:
    """Every graph on exactly n vertices, once per isomorphism class, as canonical codes.

    Definition: the canonical-augmentation list described in the module docstring
    (level n from level n - 1, cached for the process).

    Parameters: n -- 1..10 (11 is possible in principle, through :func:`children_of`
    block by block, but the list has 1,018,997,864 entries).
    Returns: a read-only numpy array of uint64 codes in the generation order.

    >>> [len(graphs_on(n)) for n in range(1, 6)]      # OEIS A000088(1..5)
    [1, 2, 4, 11, 34]

    Notes: measured on one core: about 7 s for n = 9 (levels 1..9 from scratch) and
    3.5 min more for n = 10.
    Reference: B. D. McKay, J. Algorithms 26 (1998) 306-324; counts OEIS A000088.
    """
    _check_vertices(n)
    if n > 10:
        raise ValueError(f"the whole list of graphs on {n} vertices is not kept in memory; "
                         "use children_of block by block")
    level = _level(n)
    level.flags.writeable = False
    return level


def children_of(n: int, start: int, stop: int, connected: bool = False) -> list[int]:
    """The graphs on n vertices whose canonical parents are the graphs number
    start..stop-1 of :func:`graphs_on(n - 1) <graphs_on>`, as canonical codes.

    Definition: the accepted children of those parents, parent by parent, each parent's
    children by increasing neighbourhood S of the new vertex; with ``connected`` only
    the connected ones.  Over consecutive blocks covering 0..A000088(n - 1) these are
    :func:`graphs_on(n) <graphs_on>`, each graph exactly once.

    Parameters: n -- 2..11; start, stop -- a block of parent numbers; connected -- keep
    only connected graphs.
    Returns: a list of int codes.

    >>> len(children_of(4, 0, 4)), len(children_of(4, 0, 4, connected=True))  # A000088, A001349
    (11, 6)

    Reference: B. D. McKay, J. Algorithms 26 (1998) 306-324.
    """
    _check_vertices(n, 2)
    parents = graphs_on(n - 1)
    if not 0 <= start <= stop <= len(parents):
        raise ValueError(f"parents {start}..{stop - 1} are not among the "
                         f"{len(parents)} graphs on {n - 1} vertices")
    found = []
    for code in parents[start:stop].tolist():
        found.extend(_children(n - 1, code, connected))
    return found

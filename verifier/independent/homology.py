"""Integer homology on the independent path: discrete-Morse witnesses and Smith normal form.

A witness (scheme ``morse/1``) lets this module confirm the integer homology of a large
complex without redoing the main backend's reduction.  It consists of an acyclic matching
V of the simplices (pairs (a, b), a a codimension-one face of b), the unmatched (critical)
simplices, the boundary D of the Morse complex those critical cells span, and the claimed
homology.  :func:`verify_witness` trusts none of it: it checks that V is a matching of
face relations covering every simplex once, that V is acyclic, recomputes D by following
gradient paths, checks D o D = 0, and computes the homology of the (small) Morse complex
by its own Smith normal form; any disagreement raises :class:`WitnessError` naming the
pair, cell or entry at fault.

Without a witness, :func:`morse_complex` builds a matching of its own (elementary
collapses, a maximal simplex made critical whenever none is free), and for small
complexes :func:`homology_by_smith` works on the full simplicial boundary matrices.

Conventions (those of every simplex-indexed object of the project): vertices are
positions 0..V-1 in the sorted labels; a simplex is the sorted tuple of its vertices;
simplices are numbered by (dimension, lexicographic order).  The boundary of
[v_0, ..., v_k] is sum_i (-1)^i [v_0 .. ^v_i .. v_k].

This module uses plain Python integers and numpy (for tables of simplices); it imports
nothing of the project outside :mod:`verifier.independent` and never loads python-flint.

>>> circle = [(0, 1), (1, 2), (0, 2)]
>>> homology_by_smith(circle)
((1, ()), (1, ()))
>>> witness = collapse_witness(circle)
>>> verify_witness(circle, witness).homology
((1, ()), (1, ()))

References
----------
.. [F]  R. Forman, "Morse theory for cell complexes", Adv. Math. 134 (1998) 90-145
        (acyclic matchings, gradient paths, the Morse complex).
.. [MB] M. Mrozek and B. Batko, "Coreduction homology algorithm", Discrete Comput.
        Geom. 42 (2009) 515-529.
.. [BL] B. Benedetti and F. H. Lutz, "Random discrete Morse theory and a new library of
        triangulations", Exp. Math. 23 (2014) 66-94 (collapses, removing a facet when
        stuck).
.. [MU] J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley 1984, sec. 11
        (Smith normal form, homology from invariant factors).
.. [K]  A. B. Kahn, "Topological sorting of large networks", Comm. ACM 5 (1962) 558-562.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass
from itertools import combinations
from math import gcd

import numpy as np

__all__ = [
    "SCHEME", "WITNESS_THRESHOLD", "WitnessError", "Tables", "MorseComplex",
    "tables_from_facets", "complex_key", "verify_witness", "morse_complex",
    "collapse_witness", "invariant_factors", "homology_by_smith", "torsion_of", "is_prime",
]

SCHEME = "morse/1"
#: From this many simplices on, the claim functions answer through a Morse complex.
WITNESS_THRESHOLD = 10_000


class WitnessError(ValueError):
    """A homology witness is malformed or wrong (the message names the pair, cell or entry)."""


# ----------------------------------------------------------------- the complex
@dataclass(frozen=True)
class Tables:
    """The simplices of a complex as arrays, and the positions of their faces.

    ``arrays[k]`` is the (f_k, k + 1) array of k-simplices in lexicographic order;
    ``offsets[k]`` the position of the first k-simplex in the global numbering;
    ``faces[k]`` (k >= 1) the (f_k, k + 1) array whose column i holds the global position
    of the face without vertex i (sign (-1)^i in the boundary).
    """
    arrays: tuple
    offsets: tuple
    faces: tuple

    @property
    def size(self) -> int:
        return self.offsets[-1]

    @property
    def dim(self) -> int:
        return len(self.arrays) - 1

    def dims(self) -> np.ndarray:
        """The dimension of every simplex, by global position."""
        return np.repeat(np.arange(len(self.arrays)), [len(a) for a in self.arrays])

    def simplex(self, x: int) -> tuple:
        """The vertex tuple of the simplex at global position x."""
        k = int(np.searchsorted(self.offsets, x, side="right")) - 1
        return tuple(int(v) for v in self.arrays[k][x - self.offsets[k]])


def _encode(rows: np.ndarray, base: int):
    """Rows of vertex positions as int64 numbers in base ``base`` (their lexicographic
    order is the numeric one), or None when such numbers would not fit in 63 bits."""
    if base ** max(rows.shape[1], 1) >= 2 ** 63:
        return None
    keys = np.zeros(len(rows), dtype=np.int64)
    for column in range(rows.shape[1]):
        keys = keys * base + rows[:, column]
    return keys


def _unique_rows(rows: np.ndarray, base: int) -> np.ndarray:
    """The distinct rows, in lexicographic order."""
    keys = _encode(rows, base)
    if keys is None:
        return np.unique(rows, axis=0)
    _, first = np.unique(keys, return_index=True)
    return rows[first]


def _positions(rows: np.ndarray, table: np.ndarray, base: int) -> np.ndarray:
    """Positions in ``table`` (distinct rows, lexicographic) of each row of ``rows``."""
    keys, known = _encode(rows, base), _encode(table, base)
    if keys is None:
        where = {tuple(r): i for i, r in enumerate(table.tolist())}
        return np.array([where[tuple(r)] for r in rows.tolist()], dtype=np.int64)
    return np.searchsorted(known, keys)


def tables_from_facets(facets) -> Tables:
    """The simplices generated by ``facets`` (sorted tuples of vertex positions).

    The complex generated by a family of finite sets is the set of their non-empty
    subsets.  Parameters: ``facets`` -- an iterable of sequences of vertex positions
    (need not be maximal).  Returns: :class:`Tables`.

    >>> t = tables_from_facets([(0, 1, 2)])
    >>> [len(a) for a in t.arrays], t.offsets, t.faces[2].tolist()
    ([3, 3, 1], (0, 3, 6, 7), [[5, 4, 3]])

    Notes: all (k + 1)-subsets of each facet, made distinct by sorting numeric row keys;
    face positions by binary search.  Cost O(sum over facets of 2^size) plus sorting.
    Reference: E. H. Spanier, Algebraic Topology, McGraw-Hill 1966, ch. 3 (definition).
    """
    by_size: dict[int, list] = {}
    for facet in facets:
        facet = tuple(sorted(int(v) for v in facet))
        if facet:
            by_size.setdefault(len(facet), []).append(facet)
    if not by_size:
        return Tables((), (0,), ())
    blocks = {m: np.array(sorted(set(fs)), dtype=np.int64) for m, fs in by_size.items()}
    base = int(max(int(b.max()) for b in blocks.values())) + 2
    top = max(blocks)
    arrays = []
    for k in range(top):
        parts = [block[:, list(columns)] for m, block in blocks.items() if m > k
                 for columns in combinations(range(m), k + 1)]
        arrays.append(_unique_rows(np.concatenate(parts), base))
    offsets = tuple(int(x) for x in np.concatenate([[0], np.cumsum([len(a) for a in arrays])]))
    faces = [None]
    for k in range(1, top):
        columns = [_positions(np.delete(arrays[k], i, axis=1), arrays[k - 1], base)
                   + offsets[k - 1] for i in range(k + 1)]
        faces.append(np.stack(columns, axis=1))
    return Tables(tuple(arrays), offsets, tuple(faces))


def complex_key(labels, facets) -> str:
    """A SHA-256 naming one complex exactly: its labels and its facets.

    Parameters: ``labels`` -- the sorted vertex labels; ``facets`` -- sorted tuples of
    vertex positions.  Returns: hex text.  Both processes compute it the same way, so a
    witness sent along with a case can be found again for the complex it was made for.

    >>> complex_key([1, 2], [(0, 1)]) == complex_key([1, 2], [(0, 1)])
    True
    """
    text = json.dumps([[repr(label) for label in labels], sorted(list(f) for f in facets)])
    return hashlib.sha256(text.encode()).hexdigest()


# --------------------------------------------------------------- Morse complex
@dataclass(frozen=True)
class MorseComplex:
    """A Morse complex: critical cells per dimension and its boundary matrices.

    ``critical[k]`` lists the global positions of the critical k-cells, ascending;
    ``boundaries[k]`` (k = 1..dim) is a dict {(i, j): v} with i indexing the critical
    (k-1)-cells and j the critical k-cells; ``homology`` its integer homology.
    """
    critical: tuple
    boundaries: dict
    homology: tuple

    def betti(self, p: int = 0) -> tuple:
        """Betti numbers over Q (p = 0) or over Z/p, from ranks of the Morse boundary.

        b_k = c_k - rank D_k - rank D_(k+1) over the field, c_k the number of critical
        k-cells (the Morse complex is chain-homotopy equivalent to the simplicial one
        over Z [F, Thm. 8.2], hence also after tensoring with Z/p).
        """
        from .compute import rank_mod_p
        counts = [len(c) for c in self.critical]
        ranks = [0] * (len(counts) + 1)
        for k, entries in self.boundaries.items():
            if p == 0:
                ranks[k] = len(invariant_factors(_rows_of(entries)))
            else:
                ranks[k] = rank_mod_p([dict(r) for r in _rows_of(entries)], p)
        return tuple(counts[k] - ranks[k] - ranks[k + 1] for k in range(len(counts)))


def _rows_of(entries: dict) -> list[dict]:
    rows: dict[int, dict] = {}
    for (i, j), v in entries.items():
        rows.setdefault(i, {})[j] = v
    return list(rows.values())


def _gradient_order(tables: Tables, partner: np.ndarray, lower: np.ndarray, k: int) -> list:
    """The cells of dimension k - 1 matched upward, in an order along gradient paths.

    Graph: a -> a' when a' != a is a face of V(a) and a' is itself matched upward
    (a gradient path a, V(a), a', V(a'), ...).  Kahn's algorithm [K] lists it so that
    every a precedes every a' it points to; a cycle, which exists exactly when the
    matching is not acyclic in dimensions (k - 1, k) [F, Thm. 9.3], raises
    :class:`WitnessError` naming the pairs along it.
    """
    if k > tables.dim:
        return []
    start, stop = tables.offsets[k - 1], tables.offsets[k]
    cells = np.flatnonzero(lower[start:stop]) + start
    if len(cells) == 0:
        return []
    local = np.full(tables.size, -1, dtype=np.int64)
    local[cells] = np.arange(len(cells))
    boxes = tables.faces[k][partner[cells] - tables.offsets[k]]       # faces of V(a)
    source = np.repeat(np.arange(len(cells)), boxes.shape[1])
    target = local[boxes.ravel()]
    keep = (target >= 0) & (boxes.ravel() != np.repeat(cells, boxes.shape[1]))
    source, target = source[keep], target[keep]
    by_source = np.argsort(source, kind="stable")
    starts = np.searchsorted(source[by_source], np.arange(len(cells) + 1)).tolist()
    successors = target[by_source].tolist()
    indegree = np.bincount(target, minlength=len(cells)).tolist()
    stack = [u for u in range(len(cells)) if indegree[u] == 0]
    order = []
    while stack:
        u = stack.pop()
        order.append(u)
        for v in successors[starts[u]:starts[u + 1]]:
            indegree[v] -= 1
            if indegree[v] == 0:
                stack.append(v)
    if len(order) < len(cells):
        _raise_cycle(tables, partner, cells, source, target, indegree, k)
    return cells[order].tolist()


def _raise_cycle(tables, partner, cells, source, target, indegree, k):
    """Walk backwards inside the cells Kahn's algorithm could not list; name a cycle."""
    left = {u for u, d in enumerate(indegree) if d > 0}
    before: dict[int, int] = {}
    for s, t in zip(source.tolist(), target.tolist()):
        if s in left and t in left:
            before.setdefault(t, s)
    u, seen = next(iter(sorted(left))), []
    while u not in seen:
        seen.append(u)
        u = before[u]
    loop = list(reversed(seen[seen.index(u):]))
    pairs = ", ".join(f"({int(cells[v])}, {int(partner[cells[v]])})" for v in loop)
    raise WitnessError(f"the matching is not acyclic: a closed gradient path in dimensions "
                       f"{k - 1}-{k} runs through the pairs {pairs}")


def _flow(tables: Tables, partner: np.ndarray, lower: np.ndarray, upper: np.ndarray,
          order: list, critical_low: list, critical_high: list, k: int) -> dict:
    """The Morse boundary D_k by following gradient paths [F, Thm. 8.10].

    Start from the chains d(s) of the critical k-cells s (all of them at once, one row
    per (k-1)-cell, one column per critical k-cell); visit the cells a matched upward in
    gradient order: a chain coefficient c at a, V(a) = b, e = [d(b) : a], is replaced by
    -c e (d(b) - e a) on the other faces of b; coefficients on cells matched downward are
    dropped.  What remains on critical (k-1)-cells is D_k.
    """
    faces = tables.faces[k]
    high = tables.offsets[k]
    rows: dict[int, dict] = {}
    for j, s in enumerate(critical_high):
        for i, a in enumerate(faces[s - high].tolist()):
            if not upper[a]:
                row = rows.setdefault(a, {})
                value = row.get(j, 0) + (-1 if i % 2 else 1)
                if value:
                    row[j] = value
                else:
                    del row[j]
    for a in order:
        row = rows.pop(a, None)
        if not row:
            continue
        boundary = faces[int(partner[a]) - high].tolist()
        e = -1 if boundary.index(a) % 2 else 1
        for i, other in enumerate(boundary):
            if other == a or upper[other]:
                continue
            factor = -e * (-1 if i % 2 else 1)
            target = rows.setdefault(other, {})
            for j, c in row.items():
                value = target.get(j, 0) + factor * c
                if value:
                    target[j] = value
                else:
                    del target[j]
    index = {a: i for i, a in enumerate(critical_low)}
    return {(index[a], j): v for a, row in rows.items() if a in index
            for j, v in row.items()}


def _product_is_zero(first: dict, second: dict, k: int) -> None:
    """D_(k-1) D_k = 0, or :class:`WitnessError` naming a non-zero entry."""
    by_row: dict[int, list] = {}
    for (i, j), v in second.items():
        by_row.setdefault(i, []).append((j, v))
    product: dict = {}
    for (i, m), v in first.items():
        for j, w in by_row.get(m, ()):
            product[(i, j)] = product.get((i, j), 0) + v * w
    for (i, j), v in sorted(product.items()):
        if v:
            raise WitnessError(f"the Morse boundary is not a chain complex: entry ({i}, {j}) "
                               f"of D_{k - 1} D_{k} is {v}, not 0")


def _assemble(tables: Tables, partner: np.ndarray) -> MorseComplex:
    """The Morse complex of an acyclic matching given by ``partner`` (-1: critical)."""
    dims = tables.dims()
    matched = partner >= 0
    other = np.where(matched, partner, 0)
    lower = matched & (dims[other] > dims)
    upper = matched & ~lower
    critical = [np.flatnonzero(~matched[tables.offsets[k]:tables.offsets[k + 1]])
                + tables.offsets[k] for k in range(tables.dim + 1)]
    critical = tuple(c.tolist() for c in critical)
    boundaries = {}
    lower_list, upper_list = lower.tolist(), upper.tolist()
    for k in range(1, tables.dim + 1):
        order = _gradient_order(tables, partner, lower, k)
        boundaries[k] = _flow(tables, partner, lower_list, upper_list, order,
                              critical[k - 1], critical[k], k)
    for k in range(2, tables.dim + 1):
        _product_is_zero(boundaries[k - 1], boundaries[k], k)
    return MorseComplex(critical, boundaries, _homology_of(critical, boundaries))


def _homology_of(critical, boundaries) -> tuple:
    """(free rank, torsion) per dimension from the invariant factors of each D_k [MU, 11]."""
    factors = {k: invariant_factors(_rows_of(entries)) for k, entries in boundaries.items()}
    result = []
    for k in range(len(critical)):
        rank_in, rank_out = len(factors.get(k + 1, ())), len(factors.get(k, ()))
        torsion = tuple(d for d in factors.get(k + 1, ()) if d > 1)
        result.append((len(critical[k]) - rank_in - rank_out, torsion))
    return tuple(result)


# -------------------------------------------------------------------- witnesses
def _integers(value, what: str) -> np.ndarray:
    if not isinstance(value, list) or not all(
            type(x) is int for x in value):      # noqa: E721 - bool is not an index
        raise WitnessError(f"{what} must be a list of integers")
    return np.array(value, dtype=np.int64)


def _read_matching(tables: Tables, witness) -> np.ndarray:
    """Check the matching and return ``partner`` (the matched cell, -1 if critical).

    Every pair (a, b) must have a a codimension-one face of b; pairs and critical cells
    must together cover every simplex exactly once; critical cells must be ascending.
    """
    if not isinstance(witness, dict):
        raise WitnessError(f"a witness is a JSON object, got {type(witness).__name__}")
    missing = [f for f in ("scheme", "size", "pairs", "critical", "boundaries", "homology")
               if f not in witness]
    if missing:
        raise WitnessError(f"the witness has no field {missing[0]!r}")
    if witness["scheme"] != SCHEME:
        raise WitnessError(f"unknown witness scheme {witness['scheme']!r} (expected {SCHEME!r})")
    n = tables.size
    if witness["size"] != n:
        raise WitnessError(f"the witness is for {witness['size']} simplices, "
                           f"the complex has {n}")
    pairs, critical = _integers(witness["pairs"], "pairs"), _integers(witness["critical"],
                                                                       "critical")
    if len(pairs) % 2:
        raise WitnessError(f"pairs must have even length, got {len(pairs)} numbers")
    for name, values in (("pairs", pairs), ("critical", critical)):
        bad = np.flatnonzero((values < 0) | (values >= n))
        if len(bad):
            raise WitnessError(f"{name}[{bad[0]}] = {values[bad[0]]} is not a simplex "
                               f"(positions are 0..{n - 1})")
    if len(critical) > 1 and np.any(np.diff(critical) <= 0):
        i = int(np.flatnonzero(np.diff(critical) <= 0)[0])
        raise WitnessError(f"critical cells must be ascending: critical[{i}] = "
                           f"{critical[i]}, critical[{i + 1}] = {critical[i + 1]}")
    a, b = pairs[0::2], pairs[1::2]
    dims = tables.dims()
    wrong = np.flatnonzero(dims[b] != dims[a] + 1)
    if len(wrong):
        p = int(wrong[0])
        raise WitnessError(f"pair {p} ({a[p]}, {b[p]}): {tables.simplex(int(a[p]))} is not a "
                           f"codimension-one face of {tables.simplex(int(b[p]))}")
    for k in range(1, tables.dim + 1):
        here = np.flatnonzero(dims[b] == k)
        is_face = (tables.faces[k][b[here] - tables.offsets[k]] == a[here, None]).any(axis=1)
        if not is_face.all():
            p = int(here[np.flatnonzero(~is_face)[0]])
            raise WitnessError(f"pair {p} ({a[p]}, {b[p]}): {tables.simplex(int(a[p]))} is "
                               f"not a face of {tables.simplex(int(b[p]))}")
    cells = np.concatenate([pairs, critical])
    counts = np.bincount(cells, minlength=n)
    if np.any(counts > 1):
        x = int(np.flatnonzero(counts > 1)[0])
        places = [f"pair {i // 2}" for i in np.flatnonzero(pairs == x).tolist()]
        places += ["critical"] * int(np.count_nonzero(critical == x))
        raise WitnessError(f"simplex {x} {tables.simplex(x)} occurs more than once: in "
                           f"{' and '.join(places)}")
    if np.any(counts == 0):
        x = int(np.flatnonzero(counts == 0)[0])
        raise WitnessError(f"simplex {x} {tables.simplex(x)} is neither in a pair nor critical")
    partner = np.full(n, -1, dtype=np.int64)
    partner[a], partner[b] = b, a
    return partner


def _read_boundaries(witness, morse: MorseComplex) -> None:
    """Compare the witness's Morse boundaries with the recomputed ones, entry by entry."""
    given = witness["boundaries"]
    if not isinstance(given, dict):
        raise WitnessError("boundaries must map dimensions '1', '2', ... to entry lists")
    dim = len(morse.critical) - 1
    extra = sorted(set(given) - {str(k) for k in range(1, dim + 1)})
    if extra:
        raise WitnessError(f"boundaries has a key {extra[0]!r}; the dimensions are 1..{dim}")
    for k in range(1, dim + 1):
        entries = given.get(str(k), [])
        rows, columns = len(morse.critical[k - 1]), len(morse.critical[k])
        claimed = {}
        if not isinstance(entries, list):
            raise WitnessError(f"boundaries[{k!r}] must be a list of [i, j, v]")
        for number, entry in enumerate(entries):
            if (not isinstance(entry, list) or len(entry) != 3
                    or not all(type(x) is int for x in entry)):   # noqa: E721
                raise WitnessError(f"D_{k} entry {number} must be [i, j, v] (integers), "
                                   f"got {entry!r}")
            i, j, v = entry
            if not (0 <= i < rows and 0 <= j < columns):
                raise WitnessError(f"D_{k} entry {number} [{i}, {j}, {v}] is outside the "
                                   f"{rows} x {columns} matrix")
            if v == 0 or (i, j) in claimed:
                raise WitnessError(f"D_{k} entry {number} [{i}, {j}, {v}] is "
                                   f"{'zero' if v == 0 else 'repeated'}")
            claimed[(i, j)] = v
        computed = morse.boundaries[k]
        for i, j in sorted(set(claimed) | set(computed)):
            if claimed.get((i, j), 0) != computed.get((i, j), 0):
                raise WitnessError(
                    f"Morse boundary D_{k} entry ({i}, {j}) (critical cells "
                    f"{morse.critical[k - 1][i]} and {morse.critical[k][j]}): the witness "
                    f"says {claimed.get((i, j), 0)}, the gradient paths give "
                    f"{computed.get((i, j), 0)}")


def _read_homology(witness, morse: MorseComplex) -> None:
    claimed = witness["homology"]
    try:
        shaped = tuple((int(rank), tuple(int(t) for t in torsion)) for rank, torsion in claimed)
    except (TypeError, ValueError):
        raise WitnessError("homology must be a list of [rank, [torsion, ...]]") from None
    if shaped != morse.homology:
        for k in range(max(len(shaped), len(morse.homology))):
            mine = morse.homology[k] if k < len(morse.homology) else None
            theirs = shaped[k] if k < len(shaped) else None
            if mine != theirs:
                raise WitnessError(f"claimed homology H_{k} = {_describe(theirs)} but the "
                                   f"verified Morse complex gives H_{k} = {_describe(mine)}")


def _describe(group) -> str:
    """Z^r + Z/t1 + ... as mathematicians write it; 'nothing' outside the dimensions."""
    if group is None:
        return "nothing (no such dimension)"
    rank, torsion = group
    parts = ([("Z" if rank == 1 else f"Z^{rank}")] if rank else []) + [f"Z/{t}" for t in torsion]
    return " + ".join(parts) or "0"


def verify_witness(facets, witness) -> MorseComplex:
    """The Morse complex of a verified ``morse/1`` witness, with its integer homology.

    Checks, in order: the witness is for this complex (its size); every pair (a, b) is a
    codimension-one face relation; pairs and critical cells cover each simplex exactly
    once; the matching is acyclic (Kahn's algorithm per dimension); the Morse boundaries
    recomputed along gradient paths equal the witness's entry for entry; D o D = 0; the
    Smith normal form of the Morse boundaries gives the claimed homology.

    Parameters: ``facets`` -- sorted tuples of vertex positions (or :class:`Tables`);
    ``witness`` -- the dict (scheme ``morse/1``).  Returns: :class:`MorseComplex`.
    Raises :class:`WitnessError` naming the first thing that is wrong.

    >>> triangle = [(0, 1, 2)]
    >>> w = {"scheme": "morse/1", "size": 7, "pairs": [1, 3, 2, 4, 5, 6],
    ...      "critical": [0], "boundaries": {}, "homology": [[1, []], [0, []], [0, []]]}
    >>> verify_witness(triangle, w).homology
    ((1, ()), (0, ()), (0, ()))

    Notes: numpy for the checks on pairs; Python loops for Kahn's sort and the gradient
    flow, linear in the number of simplices times the number of critical cells reached;
    the Smith normal form only on the Morse complex.  References: [F], [K], [MU].
    """
    tables = facets if isinstance(facets, Tables) else tables_from_facets(facets)
    partner = _read_matching(tables, witness)
    morse = _assemble(tables, partner)
    _read_boundaries(witness, morse)
    _read_homology(witness, morse)
    return morse


# ----------------------------------------------------------- our own matching
def collapse_matching(tables: Tables) -> np.ndarray:
    """An acyclic matching by elementary collapses: ``partner`` (-1 for critical cells).

    Repeatedly pair a free face (a simplex with exactly one remaining coface) with that
    coface and remove both; when no face is free, remove a remaining simplex of highest
    position (a maximal one) as critical.  Removal orders of this kind give acyclic
    matchings [BL, sec. 2], [F, sec. 9].
    """
    n = tables.size
    dims = tables.dims()
    face_lists = [[] for _ in range(tables.offsets[1] if tables.dim >= 0 else 0)]
    for k in range(1, tables.dim + 1):
        face_lists.extend(tables.faces[k].tolist())
    cofaces = [[] for _ in range(n)]
    for x in range(tables.offsets[1] if tables.dim >= 1 else n, n):
        for f in face_lists[x]:
            cofaces[f].append(x)
    alive = [True] * n
    count = [len(c) for c in cofaces]
    partner = [-1] * n
    free = [x for x in range(n) if count[x] == 1]

    def remove(x):
        alive[x] = False
        for f in face_lists[x]:
            count[f] -= 1
            if count[f] == 1 and alive[f]:
                free.append(f)

    top = n - 1
    while True:
        while free:
            x = free.pop()
            if not alive[x] or count[x] != 1:
                continue
            y = next(c for c in cofaces[x] if alive[c])
            partner[x], partner[y] = y, x
            remove(y)
            remove(x)
        while top >= 0 and not alive[top]:
            top -= 1
        if top < 0:
            break
        remove(top)
    del dims
    return np.array(partner, dtype=np.int64)


def morse_complex(facets) -> MorseComplex:
    """The Morse complex of our own collapse matching (:func:`collapse_matching`).

    Parameters: ``facets`` -- sorted tuples of vertex positions (or :class:`Tables`).
    Returns: :class:`MorseComplex` (boundaries by gradient paths, homology by Smith
    normal form).

    >>> morse_complex([(0, 1), (1, 2), (0, 2)]).homology
    ((1, ()), (1, ()))
    """
    tables = facets if isinstance(facets, Tables) else tables_from_facets(facets)
    return _assemble(tables, collapse_matching(tables))


def collapse_witness(facets) -> dict:
    """A ``morse/1`` witness made from our own collapse matching (for tests and tools).

    >>> collapse_witness([(0, 1)])["pairs"]
    [1, 2]
    """
    tables = facets if isinstance(facets, Tables) else tables_from_facets(facets)
    partner = collapse_matching(tables)
    morse = _assemble(tables, partner)
    dims = tables.dims()
    lower = np.flatnonzero((partner >= 0) & (dims[np.maximum(partner, 0)] > dims))
    pairs = np.stack([lower, partner[lower]], axis=1).ravel().tolist()
    return {"scheme": SCHEME, "size": tables.size, "pairs": pairs,
            "critical": sorted(x for c in morse.critical for x in c),
            "boundaries": {str(k): [[i, j, v] for (i, j), v in sorted(entries.items())]
                           for k, entries in morse.boundaries.items()},
            "homology": [[rank, list(torsion)] for rank, torsion in morse.homology]}


# ------------------------------------------------------------ Smith normal form
def _diagonal(rows: list[dict]) -> list[int]:
    """Non-zero entries of a diagonal form of an integer matrix, by unimodular row and
    column operations (rows: one dict {column: entry} per row; consumed)."""
    rows = [dict(r) for r in rows if r]
    columns: dict[int, set] = {}
    for i, row in enumerate(rows):
        for j in row:
            columns.setdefault(j, set()).add(i)
    alive = set(range(len(rows)))
    found = []

    def subtract(target: int, source: int, q: int):
        """row[target] -= q * row[source], keeping the column index up to date."""
        row, pivot_row = rows[target], rows[source]
        for j, v in pivot_row.items():
            value = row.get(j, 0) - q * v
            if value:
                if j not in row:
                    columns[j].add(target)
                row[j] = value
            else:
                row.pop(j, None)
                columns[j].discard(target)

    def drop(i: int, j: int):
        for jj in rows[i]:
            columns[jj].discard(i)
        rows[i] = {}
        alive.discard(i)
        columns.pop(j, None)

    # Unit pivots first, column by column, with the shortest row holding a unit.
    for j in sorted(columns):
        holders = [i for i in columns.get(j, ()) if abs(rows[i][j]) == 1]
        if not holders:
            continue
        p = min(holders, key=lambda i: (len(rows[i]), i))
        sign = rows[p][j]
        for i in sorted(columns[j] - {p}):
            subtract(i, p, rows[i][j] * sign)
        found.append(1)
        drop(p, j)
    # The rest: smallest entry as pivot, Euclid on its column and row until it divides.
    while True:
        alive = {i for i in alive if rows[i]}
        if not alive:
            break
        p, j = min(((i, jj) for i in alive for jj in rows[i]),
                   key=lambda ij: (abs(rows[ij[0]][ij[1]]), len(rows[ij[0]])))
        pivot = rows[p][j]
        for i in sorted(columns[j] - {p}):
            subtract(i, p, rows[i][j] // pivot)
        if len(columns[j]) > 1:
            continue                          # a remainder is now the smallest entry
        row = rows[p]
        for jj in [c for c in row if c != j]:
            q = row[jj] // pivot              # column jj -= q * column j: only row p has j
            value = row[jj] - q * pivot
            if value:
                row[jj] = value
            else:
                del row[jj]
                columns[jj].discard(p)
        if len(row) > 1:
            continue
        found.append(abs(pivot))
        drop(p, j)
    return found


def invariant_factors(rows: list[dict]) -> tuple[int, ...]:
    """The non-zero invariant factors d_1 | d_2 | ... of an integer matrix.

    The Smith normal form of A is diag(d_1, ..., d_r, 0, ...) = U A W with U, W
    unimodular and d_i | d_(i+1); r is the rank.  Parameters: ``rows`` -- one dict
    {column: entry} per row.  Returns: the tuple (d_1, ..., d_r), positive, increasing.

    >>> invariant_factors([{0: 2, 1: 4}, {0: 6, 1: 8}])
    (2, 4)
    >>> invariant_factors([{0: 2}, {1: 3}])
    (1, 6)

    Notes: sparse elimination (unit pivots first, then Euclid with smallest pivots) to
    a diagonal, then gcd/lcm exchanges to the divisibility chain.  Reference: [MU, sec.
    11]; H. Cohen, A Course in Computational Algebraic Number Theory, Springer 1993,
    sec. 2.4.4.
    """
    diagonal = sorted(_diagonal(rows))
    units = sum(1 for d in diagonal if d == 1)
    rest = diagonal[units:]
    for i in range(len(rest)):
        for j in range(i + 1, len(rest)):
            g = gcd(rest[i], rest[j])
            rest[i], rest[j] = g, rest[i] // g * rest[j]
    return tuple([1] * units + rest)


def _simplicial_boundaries(tables: Tables) -> dict:
    """The simplicial boundary matrices d_k as row dicts (rows: (k-1)-simplices)."""
    result = {}
    for k in range(1, tables.dim + 1):
        rows = [dict() for _ in range(len(tables.arrays[k - 1]))]
        low = tables.offsets[k - 1]
        for j, boundary in enumerate(tables.faces[k].tolist()):
            for i, face in enumerate(boundary):
                rows[face - low][j] = -1 if i % 2 else 1
        result[k] = rows
    return result


def homology_by_smith(facets) -> tuple:
    """Integer homology from the Smith normal form of the simplicial boundary matrices.

    H_k = Z^(f_k - r_k - r_(k+1)) + sum of Z/d over the invariant factors d > 1 of
    d_(k+1), r_k the rank of d_k [MU, sec. 11].  Parameters: ``facets`` -- sorted tuples
    of vertex positions (or :class:`Tables`).  Returns: a tuple over dimensions 0..dim of
    (free rank, torsion tuple).

    >>> homology_by_smith([(0, 1, 2)])
    ((1, ()), (0, ()), (0, ()))

    Notes: for small complexes; larger ones go through :func:`morse_complex`.
    """
    tables = facets if isinstance(facets, Tables) else tables_from_facets(facets)
    boundaries = _simplicial_boundaries(tables)
    factors = {k: invariant_factors(rows) for k, rows in boundaries.items()}
    result = []
    for k in range(tables.dim + 1):
        rank_in, rank_out = len(factors.get(k + 1, ())), len(factors.get(k, ()))
        result.append((len(tables.arrays[k]) - rank_in - rank_out,
                       tuple(d for d in factors.get(k + 1, ()) if d > 1)))
    return tuple(result)


def torsion_of(homology: tuple, k: int) -> tuple:
    """The torsion coefficients of H_k in a homology tuple (empty outside 0..dim)."""
    return homology[k][1] if 0 <= k < len(homology) else ()


# -------------------------------------------------------------------- primality
_MR_BASES = (2, 3, 5, 7, 11, 13, 17, 19, 23, 29, 31, 37, 41)
_MR_BOUND = 3_317_044_064_679_887_385_961_981


def _strong_probable_prime(n: int, a: int) -> bool:
    """Miller's test: n - 1 = d 2^s, a^d = 1 or a^(d 2^r) = -1 mod n for some r < s."""
    d, s = n - 1, 0
    while d % 2 == 0:
        d, s = d // 2, s + 1
    x = pow(a, d, n)
    if x in (1, n - 1):
        return True
    for _ in range(s - 1):
        x = x * x % n
        if x == n - 1:
            return True
    return False


def _jacobi(a: int, n: int) -> int:
    """The Jacobi symbol (a/n) for odd n > 0, by quadratic reciprocity."""
    a, result = a % n, 1
    while a:
        while a % 2 == 0:
            a //= 2
            if n % 8 in (3, 5):
                result = -result
        a, n = n, a
        if a % 4 == 3 and n % 4 == 3:
            result = -result
        a %= n
    return result if n == 1 else 0


def _strong_lucas_probable_prime(n: int) -> bool:
    """The strong Lucas test with Selfridge's parameters (D first of 5, -7, 9, ... with
    (D/n) = -1, P = 1, Q = (1 - D)/4); n odd, not a square."""
    if _isqrt(n) ** 2 == n:
        return False
    D = 5
    while True:
        j = _jacobi(D, n)
        if j == -1:
            break
        if j == 0 and abs(D) != n:
            return False
        D = -D - 2 if D > 0 else -D + 2
    P, Q = 1, (1 - D) // 4
    d, s = n + 1, 0
    while d % 2 == 0:
        d, s = d // 2, s + 1
    U, V, Qk = 1, P, Q % n
    for bit in bin(d)[3:]:
        U, V, Qk = U * V % n, (V * V - 2 * Qk) % n, Qk * Qk % n
        if bit == "1":
            U, V = P * U + V, D * U + P * V
            U, V = (U + n if U % 2 else U) // 2 % n, (V + n if V % 2 else V) // 2 % n
            Qk = Qk * Q % n
    if U == 0 or V == 0:
        return True
    for _ in range(s - 1):
        V, Qk = (V * V - 2 * Qk) % n, Qk * Qk % n
        if V == 0:
            return True
    return False


def _isqrt(n: int) -> int:
    from math import isqrt
    return isqrt(n)


def is_prime(p) -> bool:
    """True when the integer p is a prime.

    Below 3,317,044,064,679,887,385,961,981 Miller's test to the 13 prime bases 2..41 is
    a proof (J. Sorenson and J. Webster, Math. Comp. 86 (2017) 985-1003); above it, the
    Baillie-PSW test (Miller base 2 and a strong Lucas test: R. Baillie and S. S.
    Wagstaff, Math. Comp. 35 (1980) 1391-1417), which has no known counterexample.

    >>> is_prime(2), is_prime(91), is_prime(2 ** 61 + 1), is_prime(2 ** 127 - 1)
    (True, False, False, True)
    """
    if isinstance(p, bool) or not isinstance(p, int) or p < 2:
        return False
    for q in _MR_BASES:
        if p % q == 0:
            return p == q
    if p < _MR_BOUND:
        return all(_strong_probable_prime(p, a) for a in _MR_BASES)
    return _strong_probable_prime(p, 2) and _strong_lucas_probable_prime(p)

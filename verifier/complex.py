"""The immutable finite abstract simplicial complex.

A finite abstract simplicial complex K is a finite set of non-empty finite sets
(simplices) closed under taking non-empty subsets.  Here a ``Complex`` stores

* ``labels``     -- the vertex labels the user gave, in canonical (sorted) order;
                    vertex ``i`` is ``labels[i]``;
* ``simplices``  -- every simplex as a sorted tuple of vertex indices, ordered by
                    (dimension, lexicographic), so every prefix of the list is a
                    subcomplex and ``simplices[:n0]`` are the vertices;
* ``index``      -- the position of each simplex in that list.

Every matrix indexed by simplices (connection matrix, Green function, Hodge
operator, ...) uses this order.  Because faces come before the simplices that
contain them, the containment matrix is unitriangular in this order, which is
what makes exact elimination on the connection matrix cheap.

Isomorphism: ``canonical_form()`` is an exact canonical form (equal for two
complexes iff they are isomorphic) computed by individualisation-refinement for
complexes on at most ``CANONICAL_MAX_VERTICES`` vertices; ``content_hash`` is the
SHA-256 of that form.  Beyond that bound ``content_hash`` is the hash of a strong
isomorphism invariant (colour refinement of the vertex-simplex incidence): equal
for isomorphic complexes, but non-isomorphic complexes can share it -- typically when
all vertices look alike to colour refinement (a 12-cycle and two disjoint 6-cycles
do).  ``hash_is_canonical`` says which one a complex carries.
"""

from __future__ import annotations

import hashlib
import json
import re
from collections.abc import Hashable, Iterable
from itertools import chain, combinations
from pathlib import Path

import numpy as np

__all__ = ["Complex", "ComplexError", "CANONICAL_MAX_VERTICES"]

CANONICAL_MAX_VERTICES = 10   # (also the bound of verifier.canonical_kernels)
MASK_MAX_VERTICES = 62  # complexes on at most this many vertices have vertex bitmasks
SMALL_INPUT = 2_000     # inputs up to this many labels (or simplices) take the plain-Python
                        # paths; larger ones the vectorised paths (same results)


class ComplexError(ValueError):
    """A user-supplied description of a complex is not valid (says where and why)."""


def _sort_labels(labels: Iterable[Hashable]) -> tuple:
    labels = set(labels)
    try:
        ordered = tuple(sorted(labels))
        if all(a < b for a, b in zip(ordered, ordered[1:])):
            return ordered
    except TypeError:  # mixed label types
        pass
    # no total order (mixed types, or a partial order such as sets under inclusion, for
    # which sorted() would depend on the input order): order by type name, then by text
    return tuple(sorted(labels, key=lambda v: (type(v).__name__, _label_text(v))))


def _label_text(v) -> str:
    """A text for a label that does not depend on how the label was built (a set's
    repr follows its iteration order, which can depend on insertion history)."""
    if isinstance(v, (set, frozenset)):
        return "{" + ", ".join(sorted(_label_text(w) for w in v)) + "}"
    if isinstance(v, tuple):
        return "(" + ", ".join(_label_text(w) for w in v) + ")"
    return repr(v)


class Complex:
    """An immutable finite abstract simplicial complex.

    Build one with :meth:`from_facets`, :meth:`from_graph` or :meth:`from_file`.

    >>> K = Complex.from_facets([[1, 2, 3], [3, 4]])
    >>> K.f_vector
    (4, 4, 1)
    >>> K.dim
    2
    >>> [K.label_of(s) for s in K.facets]
    [(3, 4), (1, 2, 3)]
    """

    __slots__ = ("labels", "simplices", "_cache")

    def __init__(self, labels: tuple, simplices: tuple[tuple[int, ...], ...]):
        """Low-level constructor: ``simplices`` must already be closed, sorted by
        (dim, lex) and indexed into ``labels``.  Use the ``from_*`` builders."""
        object.__setattr__(self, "labels", labels)
        object.__setattr__(self, "simplices", simplices)
        object.__setattr__(self, "_cache", {})

    def __setattr__(self, name, value):
        raise AttributeError("Complex is immutable")

    def __delattr__(self, name):
        raise AttributeError("Complex is immutable")

    # ------------------------------------------------------------------ builders
    @classmethod
    def from_facets(cls, facets: Iterable[Iterable[Hashable]]) -> "Complex":
        """The smallest complex containing the given sets (its facets need not be maximal).

        Vertex labels may be any hashable values; the empty set is ignored.
        """
        raw, places = [], []
        for position, facet in enumerate(facets):
            if isinstance(facet, (str, bytes)) or not isinstance(facet, Iterable):
                _check_repeats(raw, places)          # an earlier error is reported first
                raise ComplexError(
                    f"facet {position}: expected a list of vertex labels, got {facet!r}")
            members = list(facet)
            if members:
                raw.append(members)
                places.append(position)
        flat = list(chain.from_iterable(raw))
        if len(flat) <= SMALL_INPUT:
            _check_repeats(raw, places)
            labels = _sort_labels(flat)
            position = {v: i for i, v in enumerate(labels)}
            return cls._from_index_sets(labels, (tuple(sorted(position[v] for v in f))
                                                 for f in raw))
        labels, indices = _label_indices(flat)
        sizes = np.fromiter(map(len, raw), dtype=np.int64, count=len(raw))
        groups = _facet_groups(indices, sizes)
        repeated = [np.flatnonzero(sizes == width)[np.any(rows[:, 1:] == rows[:, :-1], axis=1)]
                    for width, rows in groups.items()]
        repeated = np.concatenate(repeated) if repeated else np.zeros(0, dtype=np.int64)
        if len(repeated):
            first = int(repeated.min())
            raise ComplexError(f"facet {places[first]}: repeated vertex in {raw[first]!r}")
        return cls._from_arrays(labels, _close_downward(len(labels), groups))

    @classmethod
    def _from_index_sets(cls, labels: tuple, sets: Iterable[tuple[int, ...]]) -> "Complex":
        """Close sorted index tuples downward and order the result."""
        maximal = set(sets)
        if sum(map(len, maximal)) > SMALL_INPUT:
            groups: dict[int, list] = {}
            for s in maximal:
                groups.setdefault(len(s), []).append(s)
            arrays = {w: np.array(g, dtype=np.int64).reshape(len(g), w)
                      for w, g in groups.items() if w}
            return cls._from_arrays(labels, _close_downward(len(labels), arrays))
        closed: set[tuple[int, ...]] = set()
        for s in sorted(maximal, key=len, reverse=True):
            if s in closed:
                continue
            for k in range(1, len(s) + 1):
                closed.update(combinations(s, k))
        for v in range(len(labels)):
            closed.add((v,))
        return cls(labels, tuple(sorted(closed, key=lambda s: (len(s), s))))

    @classmethod
    def _from_arrays(cls, labels: tuple, levels: list[np.ndarray]) -> "Complex":
        """The complex whose k-simplices are the rows of ``levels[k]`` (int arrays of
        shape (f_k, k + 1), rows sorted, in lexicographic order, the levels closed
        downward).  The arrays are kept as :meth:`simplex_array`."""
        simplices = tuple(chain.from_iterable(
            zip(*(a[:, i].tolist() for i in range(a.shape[1]))) for a in levels))
        K = cls(labels, simplices)
        for k, array in enumerate(levels):
            array = np.ascontiguousarray(array, dtype=np.int64)
            array.flags.writeable = False
            K._cache[("simplex_array", k)] = array
        K._cache["f_vector"] = tuple(len(a) for a in levels)
        return K

    @classmethod
    def _with_vertex_masks(cls, labels: tuple, simplices: tuple, masks: list[int]) -> "Complex":
        """Low-level constructor like ``Complex(labels, simplices)`` that also keeps the
        simplices' vertex bitmasks (``masks[i]`` = sum of 2^v over ``simplices[i]``, at
        most ``MASK_MAX_VERTICES`` vertices) as :meth:`vertex_masks`, for a builder
        that has them anyway (the clique enumeration of flag complexes)."""
        K = cls(labels, simplices)
        array = np.array(masks, dtype=np.int64)
        array.flags.writeable = False
        K._cache["vertex_masks"] = array
        return K

    @classmethod
    def from_simplices(cls, simplices: Iterable[Iterable[Hashable]]) -> "Complex":
        """Same as :meth:`from_facets`; named for readability when a full list is given."""
        return cls.from_facets(simplices)

    @classmethod
    def from_graph(cls, graph, flag: bool = False, max_dim: int | None = None) -> "Complex":
        """A networkx graph as a complex.

        ``flag=False``: the 1-dimensional complex (vertices and edges).
        ``flag=True``: the flag (clique) complex, whose simplices are the cliques.
        Self-loops are rejected; isolated vertices are kept.
        """
        if any(u == v for u, v in graph.edges()):
            raise ComplexError("graph has a self-loop; simplicial complexes have none")
        if not flag:
            return cls.from_facets([[v] for v in graph.nodes()] + [list(e) for e in graph.edges()])
        import networkx as nx

        cliques = []
        for clique in nx.enumerate_all_cliques(graph):
            if max_dim is not None and len(clique) > max_dim + 1:
                break
            cliques.append(clique)
        return cls.from_facets(cliques)

    @classmethod
    def from_file(cls, path: str | Path) -> "Complex":
        """Read facets from a file.

        ``.json``: a list of facets, or an object with a ``"facets"`` list.
        Anything else: text, one facet per line, labels separated by spaces or commas;
        ``#`` starts a comment.  Labels that look like integers become integers.
        """
        path = Path(path)
        try:
            text = path.read_text(encoding="utf-8")
        except OSError as error:
            raise ComplexError(f"{path}: cannot read ({error.strerror})") from None
        except UnicodeDecodeError:
            raise ComplexError(f"{path}: not a UTF-8 text file") from None
        if path.suffix.lower() == ".json":
            try:
                data = json.loads(text)
            except json.JSONDecodeError as error:
                raise ComplexError(
                    f"{path}:{error.lineno}:{error.colno}: invalid JSON ({error.msg})") from None
            facets = data.get("facets") if isinstance(data, dict) else data
            if not isinstance(facets, list):
                raise ComplexError(f"{path}: expected a list of facets or {{\"facets\": [...]}}")
            for i, facet in enumerate(facets):
                if not isinstance(facet, list) or not all(
                        isinstance(v, (int, str)) and not isinstance(v, bool) for v in facet):
                    raise ComplexError(
                        f"{path}: facet {i} must be a list of integer or string labels, got {facet!r}")
            try:
                return cls.from_facets(facets)
            except ComplexError as error:
                raise ComplexError(f"{path}: {error}") from None
        facets = []
        for lineno, line in enumerate(text.splitlines(), start=1):
            body = line.split("#", 1)[0].replace(",", " ").strip()
            if not body:
                continue
            labels = [int(t) if re.fullmatch(r"-?[0-9]+", t) else t for t in body.split()]
            if len(set(labels)) != len(labels):
                raise ComplexError(f"{path}:{lineno}: repeated vertex in {labels!r}")
            facets.append(labels)
        return cls.from_facets(facets)

    # ---------------------------------------------------------------- structure
    def _cached(self, key, compute):
        cache = self._cache
        if key not in cache:
            cache[key] = compute()
        return cache[key]

    @property
    def index(self) -> dict[tuple[int, ...], int]:
        """Position of each simplex (a sorted tuple of vertex indices) in ``simplices``."""
        return self._cached("index", lambda: {s: i for i, s in enumerate(self.simplices)})

    def __len__(self) -> int:
        return len(self.simplices)

    def __iter__(self):
        return iter(self.simplices)

    def __contains__(self, simplex) -> bool:
        return tuple(simplex) in self.index

    @property
    def n_vertices(self) -> int:
        return len(self.labels)

    @property
    def dim(self) -> int:
        """Largest dimension of a simplex; -1 for the empty complex."""
        return len(self.simplices[-1]) - 1 if self.simplices else -1

    @property
    def f_vector(self) -> tuple[int, ...]:
        """(f_0, f_1, ..., f_d): the number of simplices of each dimension."""
        def compute():
            counts = [0] * (self.dim + 1)
            for s in self.simplices:
                counts[len(s) - 1] += 1
            return tuple(counts)
        return self._cached("f_vector", compute)

    @property
    def facets(self) -> tuple[tuple[int, ...], ...]:
        """The maximal simplices, in simplex order."""
        def compute():
            if len(self.simplices) > SMALL_INPUT:
                covered = np.zeros(len(self.simplices), dtype=bool)
                for k in range(1, self.dim + 1):
                    covered[self.face_positions(k).ravel()] = True
                simplices = self.simplices
                return tuple(simplices[i] for i in np.flatnonzero(~covered).tolist())
            covered = set()
            for s in self.simplices:
                if len(s) > 1:
                    covered.update(combinations(s, len(s) - 1))
            return tuple(s for s in self.simplices if s not in covered)
        return self._cached("facets", compute)

    @property
    def dims(self) -> tuple[int, ...]:
        """Dimension of each simplex, in simplex order."""
        return self._cached("dims", lambda: tuple(len(s) - 1 for s in self.simplices))

    def is_pure(self) -> bool:
        """True when every facet has the complex's dimension."""
        return all(len(f) == self.dim + 1 for f in self.facets)

    def label_of(self, simplex: tuple[int, ...]) -> tuple:
        """The user's labels of a simplex given by vertex indices."""
        return tuple(self.labels[v] for v in simplex)

    def simplex_of(self, labels: Iterable[Hashable]) -> tuple[int, ...]:
        """The index tuple of a simplex given by the user's labels (KeyError if absent)."""
        position = self._cached("label_position", lambda: {v: i for i, v in enumerate(self.labels)})
        simplex = tuple(sorted(position[v] for v in labels))
        if simplex not in self.index:
            raise KeyError(f"{tuple(labels)!r} is not a simplex of this complex")
        return simplex

    def facet_labels(self) -> list[list]:
        """The facets in the user's labels (for printing and certificates)."""
        return [list(self.label_of(f)) for f in self.facets]

    def vertex_incidence(self) -> tuple[np.ndarray, np.ndarray]:
        """The pairs (simplex position, vertex index) with the vertex in the simplex,
        as two parallel int64 arrays (the nonzeros of the simplex-vertex incidence matrix)."""
        def compute():
            offsets = self.dimension_offsets()
            rows, cols = [], []
            for k in range(self.dim + 1):
                S = self.simplex_array(k)
                rows.append(np.repeat(np.arange(offsets[k], offsets[k + 1], dtype=np.int64),
                                      k + 1))
                cols.append(S.ravel())
            if not rows:
                return np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64)
            return np.concatenate(rows), np.concatenate(cols)
        return self._cached("vertex_incidence", compute)

    def vertex_masks(self) -> np.ndarray:
        """The simplices as vertex bitmasks: entry i is the sum of 2^v over the vertices
        v of ``simplices[i]`` (int64, read-only), for complexes on at most
        ``MASK_MAX_VERTICES`` vertices (ValueError beyond).

        x is a face of z iff ``m[x] & ~m[z] == 0``; x and z meet iff ``m[x] & m[z] != 0``.

        >>> Complex.from_facets([[0, 1], [2]]).vertex_masks().tolist()   # 0, 1, 2, 01
        [1, 2, 4, 3]
        """
        if self.n_vertices > MASK_MAX_VERTICES:
            raise ValueError(f"vertex bitmasks need at most {MASK_MAX_VERTICES} vertices, "
                             f"this complex has {self.n_vertices}")

        def compute():
            powers = np.left_shift(np.int64(1), np.arange(self.n_vertices, dtype=np.int64))
            parts = [np.bitwise_or.reduce(powers[self.simplex_array(k)], axis=1)
                     for k in range(self.dim + 1)]
            array = np.concatenate(parts) if parts else np.zeros(0, dtype=np.int64)
            array = array.astype(np.int64)
            array.flags.writeable = False
            return array
        return self._cached("vertex_masks", compute)

    def containments(self) -> tuple[np.ndarray, np.ndarray]:
        """All pairs (x, z) of simplex positions with x a face of z (x = z included).

        Returned as two parallel int64 arrays ``(faces, cofaces)``; there are
        sum over z of (2^|z| - 1) pairs.  This is the incidence structure of the face
        poset, from which the connection matrix, its factorisation and the Green
        function are built.  Computed by looking every subset of every simplex up among
        the simplices of its dimension (a vectorised binary search over lexicographic row
        keys); the pairs come grouped by the coface's dimension and by subset.
        """
        def compute():
            offsets = self.dimension_offsets()
            keys = [self.simplex_keys(j) for j in range(self.dim + 1)]
            faces, cofaces = [], []
            for k in range(self.dim + 1):
                S = self.simplex_array(k)
                positions = np.arange(offsets[k], offsets[k + 1], dtype=np.int64)
                for width in range(1, k + 2):
                    for columns in combinations(range(k + 1), width):
                        face = S[:, list(columns)]
                        found = np.searchsorted(keys[width - 1], _row_keys(face, self.n_vertices))
                        faces.append(found + offsets[width - 1])
                        cofaces.append(positions)
            if not faces:
                return np.zeros(0, dtype=np.int64), np.zeros(0, dtype=np.int64)
            return np.concatenate(faces), np.concatenate(cofaces)
        return self._cached("containments", compute)

    def dimension_offsets(self) -> tuple[int, ...]:
        """Where each dimension starts in ``simplices``: the k-simplices are the
        positions ``offsets[k] .. offsets[k+1] - 1`` (``dim + 2`` numbers)."""
        return self._cached("dimension_offsets", lambda: tuple(
            int(x) for x in np.concatenate([[0], np.cumsum(self.f_vector, dtype=np.int64)])))

    def simplex_array(self, k: int) -> np.ndarray:
        """The k-simplices as an int64 array of shape (f_k, k + 1), one sorted row of
        vertex indices per simplex, in simplex order (read-only)."""
        def compute():
            offsets = self.dimension_offsets()
            if not 0 <= k < len(offsets) - 1:
                return np.zeros((0, k + 1), dtype=np.int64)
            block = self.simplices[offsets[k]:offsets[k + 1]]
            array = np.fromiter(chain.from_iterable(block), dtype=np.int64,
                                count=len(block) * (k + 1)).reshape(len(block), k + 1)
            array.flags.writeable = False
            return array
        return self._cached(("simplex_array", k), compute)

    def simplex_keys(self, k: int) -> np.ndarray:
        """Sort keys of the k-simplices (:func:`_row_keys` of :meth:`simplex_array`),
        increasing in simplex order, for binary searches; cached."""
        return self._cached(("simplex_keys", k),
                            lambda: _row_keys(self.simplex_array(k), self.n_vertices))

    def face_positions(self, k: int) -> np.ndarray:
        """The codimension-one faces of the k-simplices (k >= 1), as positions in
        ``simplices``: an int64 array of shape (f_k, k + 1) whose column i holds the face
        that omits the i-th smallest vertex (the face carrying the sign (-1)^i in the
        boundary).  Read-only; computed by a vectorised search, without the index dict.
        """
        def compute():
            offsets = self.dimension_offsets()
            S = self.simplex_array(k)
            if k < 1 or len(S) == 0:
                return np.zeros((len(S), k + 1), dtype=np.int64)
            keys = self.simplex_keys(k - 1)
            result = np.empty(S.shape, dtype=np.int64)
            for i in range(k + 1):
                face = np.delete(S, i, axis=1)
                result[:, i] = np.searchsorted(keys, _row_keys(face, self.n_vertices))
            result += offsets[k - 1]
            result.flags.writeable = False
            return result
        return self._cached(("face_positions", k), compute)

    def vertex_stars(self) -> tuple[tuple[int, ...], ...]:
        """For each vertex, the positions of the simplices that contain it."""
        def compute():
            start, members = self.vertex_star_arrays()
            members = members.tolist()
            bounds = start.tolist()
            return tuple(tuple(members[a:b]) for a, b in zip(bounds, bounds[1:]))
        return self._cached("vertex_stars", compute)

    def vertex_star_arrays(self) -> tuple[np.ndarray, np.ndarray]:
        """The vertex stars as arrays ``(start, members)``: the simplices containing vertex
        v are ``members[start[v]:start[v + 1]]``, in simplex order (int64, n + 1 and
        sum |z| entries)."""
        def compute():
            rows, cols = self.vertex_incidence()
            order = np.argsort(cols, kind="stable")       # rows ascend: stars stay in order
            counts = np.bincount(cols, minlength=self.n_vertices)
            start = np.concatenate([[0], np.cumsum(counts)]).astype(np.int64)
            return start, rows[order]
        return self._cached("vertex_star_arrays", compute)

    def graph(self):
        """The 1-skeleton as a networkx graph on vertex indices 0..n-1."""
        import networkx as nx

        g = nx.Graph()
        g.add_nodes_from(range(self.n_vertices))
        g.add_edges_from(s for s in self.simplices if len(s) == 2)
        return g

    def relabel(self, mapping) -> "Complex":
        """The same complex with vertex labels replaced by ``mapping[label]`` (a dict or a function)."""
        get = mapping.get if isinstance(mapping, dict) else mapping
        new = [get(v) if not isinstance(mapping, dict) or v in mapping else v for v in self.labels]
        if len(set(new)) != len(new):
            raise ComplexError("relabelling must be injective")
        return Complex.from_facets([[new[v] for v in f] for f in self.facets] +
                                   [[x] for x in new])

    # -------------------------------------------------------------- comparison
    def __eq__(self, other) -> bool:
        return (isinstance(other, Complex) and self.labels == other.labels
                and self.simplices == other.simplices)

    def __hash__(self) -> int:
        return hash((self.labels, self.simplices))

    def __repr__(self) -> str:
        facets = self.facet_labels()
        shown = facets if len(facets) <= 8 else facets[:8] + ["..."]
        return f"Complex(f_vector={list(self.f_vector)}, facets={shown})"

    def _repr_html_(self) -> str:
        """Notebook display: a small drawing and key invariants (see verifier.drawing)."""
        from .drawing import complex_html   # lazy: matplotlib only when a notebook asks

        return complex_html(self)

    # ------------------------------------------------------------- isomorphism
    @property
    def hash_is_canonical(self) -> bool:
        """True when ``content_hash`` is an exact isomorphism class hash."""
        return self.n_vertices <= CANONICAL_MAX_VERTICES

    def canonical_form(self) -> tuple[tuple[int, ...], ...]:
        """The least facet list over the relabellings to 0..n-1 that the search reaches.

        Two complexes have the same canonical form iff they are isomorphic.
        Computed by individualisation-refinement (a partition of the vertices refined by
        incidence counts, branches over a non-singleton cell, pruned by interchangeable
        vertices); meant for small complexes (cost grows with the automorphism group).
        Up to ``CANONICAL_MAX_VERTICES`` vertices the same search runs compiled
        (:mod:`verifier.canonical_kernels`), with the same result.
        """
        def compute():
            if 0 < self.n_vertices <= CANONICAL_MAX_VERTICES:
                from .canonical_kernels import canonical_rows

                vertices, ends = canonical_rows(self.n_vertices, self.vertex_masks())
                vertices, ends = vertices.tolist(), ends.tolist()
                return tuple(tuple(vertices[a:b]) for a, b in zip([0] + ends, ends))
            return _canonical_form(self)
        return self._cached("canonical_form", compute)

    @property
    def content_hash(self) -> str:
        """SHA-256 (hex) identifying the complex up to isomorphism; see module docstring."""
        def compute():
            if self.hash_is_canonical:
                # the text json.dumps(payload, separators=(",", ":"), sort_keys=True)
                # writes for payload = {"canonical": [list(f) for f in form], "n": n},
                # spelled out (lists of ints print alike in Python and JSON)
                form = str([list(f) for f in self.canonical_form()]).replace(" ", "")
                text = f'{{"canonical":{form},"n":{self.n_vertices}}}'
            else:
                payload = {"colour-refinement": _refinement_invariant(self),
                           "f": list(self.f_vector)}
                text = json.dumps(payload, separators=(",", ":"), sort_keys=True)
            return hashlib.sha256(text.encode()).hexdigest()
        return self._cached("content_hash", compute)

    def is_isomorphic(self, other: "Complex") -> bool:
        """Exact isomorphism test (for complexes small enough for canonical forms)."""
        return (self.f_vector == other.f_vector and self.n_vertices == other.n_vertices
                and self.canonical_form() == other.canonical_form())


def _row_keys(rows: np.ndarray, n_vertices: int) -> np.ndarray:
    """Keys that order the rows of an int array (sorted vertex tuples of one length)
    lexicographically: a mixed-radix integer when n^width fits in 63 bits, otherwise a
    big-endian byte string (whose byte order is the lexicographic order of the rows)."""
    width = rows.shape[1]
    if width == 0:
        return np.zeros(len(rows), dtype=np.int64)
    if max(n_vertices, 2) ** width < 2 ** 63:
        keys = np.zeros(len(rows), dtype=np.int64)
        for column in range(width):
            keys = keys * n_vertices + rows[:, column]
        return keys
    packed = np.ascontiguousarray(rows.astype(">u4"))
    return packed.view(np.dtype((np.void, 4 * width))).ravel()


def _check_repeats(raw: list[list], places: list[int]) -> None:
    """ComplexError naming the first set with a repeated vertex, if there is one."""
    for members, position in zip(raw, places):
        if len(set(members)) != len(members):
            raise ComplexError(f"facet {position}: repeated vertex in {members!r}")


# ------------------------------------------------------------------------------
# Vectorised construction (large inputs): simplices as int64 arrays, one per dimension.

def _label_indices(flat: list) -> tuple[tuple, np.ndarray]:
    """The sorted distinct labels of a flat list, and each entry's position among them.

    Plain Python integers (the common case: refinements, files, generators) are sorted
    and numbered with numpy; any other labels through :func:`_sort_labels`.
    """
    if set(map(type, flat)) == {int}:
        try:
            values = np.array(flat, dtype=np.int64)
        except OverflowError:
            values = None
        if values is not None:
            distinct, inverse = np.unique(values, return_inverse=True)
            return tuple(distinct.tolist()), inverse.astype(np.int64).ravel()
    labels = _sort_labels(flat)
    position = {v: i for i, v in enumerate(labels)}
    return labels, np.fromiter(map(position.__getitem__, flat), dtype=np.int64,
                               count=len(flat))


def _facet_groups(indices: np.ndarray, sizes: np.ndarray) -> dict[int, np.ndarray]:
    """Split the concatenated vertex indices of the given sets by size: {size: array of
    shape (count, size) with sorted rows}; empty sets are dropped."""
    starts = np.concatenate([[0], np.cumsum(sizes)[:-1]]).astype(np.int64)
    groups = {}
    for width in np.unique(sizes).tolist():
        if width == 0:
            continue
        first = starts[sizes == width]
        rows = indices[first[:, None] + np.arange(width)]
        groups[width] = np.sort(rows, axis=1)
    return groups


def _unique_sorted_rows(rows: np.ndarray, n_vertices: int) -> np.ndarray:
    """The distinct rows of an int array of sorted vertex tuples, in lexicographic order."""
    if len(rows) == 0:
        return rows
    width = rows.shape[1]
    if max(n_vertices, 2) ** width < 2 ** 63:
        keys = _row_keys(rows, n_vertices)
        _, first = np.unique(keys, return_index=True)   # sorted keys = lexicographic rows
        return rows[first]
    rows = rows[np.lexsort(rows.T[::-1])]
    keep = np.ones(len(rows), dtype=bool)
    keep[1:] = np.any(rows[1:] != rows[:-1], axis=1)
    return rows[keep]


def _close_downward(n_vertices: int, groups: dict[int, np.ndarray]) -> list[np.ndarray]:
    """The downward closure of the given sets, one sorted array per dimension.

    Top-down: the k-simplices are the given sets with k + 1 vertices together with the
    codimension-one faces of the (k+1)-simplices, so every face is generated about as
    many times as it has cofaces (not once per superset, as enumerating all subsets
    would).  Every vertex 0..n-1 is a 0-simplex.
    """
    top = max(groups, default=1)
    levels: list[np.ndarray] = []
    above = np.zeros((0, top + 1), dtype=np.int64)
    for width in range(top, 0, -1):
        parts = [np.delete(above, i, axis=1) for i in range(width + 1)] if len(above) else []
        if width in groups:
            parts.append(groups[width])
        if width == 1:
            parts.append(np.arange(n_vertices, dtype=np.int64)[:, None])
        above = _unique_sorted_rows(np.concatenate(parts) if parts else
                                    np.zeros((0, width), dtype=np.int64), n_vertices)
        levels.append(above)
    levels.reverse()
    while levels and len(levels[-1]) == 0:
        levels.pop()
    return levels


# ------------------------------------------------------------------------------
# Canonical form by individualisation-refinement.

def _refine(partition: list[list[int]], incidences: list[list[tuple[int, ...]]]) -> list[list[int]]:
    """Refine an ordered partition of vertices until equitable with respect to facets.

    A vertex's signature is, for each facet containing it, the sorted tuple of the
    cells of the facet's vertices; vertices in one cell with different signature
    multisets are split, in a labelling-independent order.
    """
    while True:
        cell_of = {}
        for c, cell in enumerate(partition):
            for v in cell:
                cell_of[v] = c
        new_partition = []
        changed = False
        for cell in partition:
            if len(cell) == 1:
                new_partition.append(cell)
                continue
            groups: dict = {}
            for v in cell:
                signature = tuple(sorted(tuple(sorted(cell_of[w] for w in f))
                                         for f in incidences[v]))
                groups.setdefault(signature, []).append(v)
            if len(groups) > 1:
                changed = True
            for signature in sorted(groups):
                new_partition.append(groups[signature])
        partition = new_partition
        if not changed:
            return partition


def _canonical_form(K: Complex) -> tuple[tuple[int, ...], ...]:
    n = K.n_vertices
    facets = K.facets
    incidences = [[] for _ in range(n)]
    for f in facets:
        for v in f:
            incidences[v].append(f)
    facet_set = set(facets)

    def swappable(u: int, v: int) -> bool:
        def image(f):
            return tuple(sorted(v if w == u else u if w == v else w for w in f))
        return all(image(f) in facet_set for f in incidences[u] + incidences[v])

    best = None

    def encode(order: list[int]) -> tuple:
        position = {v: i for i, v in enumerate(order)}
        return tuple(sorted(tuple(sorted(position[v] for v in f)) for f in facets))

    def search(partition):
        nonlocal best
        partition = _refine(partition, incidences)
        if all(len(cell) == 1 for cell in partition):
            form = encode([cell[0] for cell in partition])
            if best is None or form < best:
                best = form
            return
        target = next(i for i, cell in enumerate(partition) if len(cell) > 1)
        cell = partition[target]
        representatives = []
        for v in cell:  # interchangeable vertices give the same leaves: branch on one
            if not any(swappable(u, v) for u in representatives):
                representatives.append(v)
        for v in representatives:
            rest = [u for u in cell if u != v]
            search(partition[:target] + [[v], rest] + partition[target + 1:])

    # initial cells: by the number of facets of each size containing the vertex
    groups: dict = {}
    for v in range(n):
        key = tuple(sorted(len(f) for f in incidences[v]))
        groups.setdefault(key, []).append(v)
    search([groups[k] for k in sorted(groups)])
    return best if best is not None else ()


def _mix(x: np.ndarray) -> np.ndarray:
    """A fixed bijective scrambling of 64-bit words (the finaliser of SplitMix64,
    G. L. Steele, D. Lea and C. H. Flood, OOPSLA 2014), applied elementwise."""
    x = x.astype(np.uint64, copy=True)
    x ^= x >> np.uint64(30)
    x *= np.uint64(0xBF58476D1CE4E5B9)
    x ^= x >> np.uint64(27)
    x *= np.uint64(0x94D049BB133111EB)
    x ^= x >> np.uint64(31)
    return x


def _refinement_invariant(K: Complex, rounds: int = 6) -> str:
    """Colour refinement on the vertex-simplex incidence: a digest of the multiset of
    vertex colours.

    A vertex starts with the size of its star.  Each round, a simplex is coloured by the
    sorted tuple of its vertices' colours, and a vertex by its own colour together with
    the multiset of the colours of the simplices in its star.  Colours are 64-bit words
    (tuples are folded in order through :func:`_mix`, multisets by wrapping sums of
    mixed words), so the result depends on the complex only up to isomorphism.  Every
    round is a few vectorised passes over the simplex arrays.
    """
    n = K.n_vertices
    start, members = K.vertex_star_arrays()
    colour = _mix(np.diff(start).astype(np.uint64))
    offsets = K.dimension_offsets()
    prime = np.uint64(0x100000001B3)
    for _ in range(rounds):
        simplex_colour = np.empty(len(K.simplices), dtype=np.uint64)
        for k in range(K.dim + 1):
            C = np.sort(colour[K.simplex_array(k)], axis=1)
            h = np.full(len(C), k + 1, dtype=np.uint64)
            for column in range(k + 1):
                h = _mix(h * prime + C[:, column])
            simplex_colour[offsets[k]:offsets[k + 1]] = h
        spread = _mix(simplex_colour[members] ^ np.uint64(0x9E3779B97F4A7C15))
        around = np.add.reduceat(spread, start[:-1]) if n else spread[:0]
        colour = _mix(colour * prime + _mix(around))
    return hashlib.sha256(np.sort(colour).astype("<u8").tobytes()).hexdigest()

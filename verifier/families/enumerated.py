"""Exhaustive families: every complex on few vertices (every small graph: :mod:`.graphs`).

``all-complexes``
    Every simplicial complex on at most 6 vertices, one per isomorphism class.  A
    complex on the vertex set {0..k-1} is stored as a *code*: the integer whose bit
    ``m`` is set when the vertex set with bitmask ``m`` is a simplex.  Its canonical
    code is the least code over all k! relabellings; two complexes are isomorphic
    exactly when their canonical codes agree.  The classes on exactly k vertices are
    generated level by level: start from k isolated vertices, add to every class
    each set all of whose facets are already present, keep the canonical codes of
    the results.  Every complex on k vertices is reached (remove a maximal simplex of
    dimension >= 1 and the rest is again a complex on the same k vertices).

    The empty complex is not a case: a complex here has at least one vertex.  The
    numbers of classes on exactly k = 1..6 vertices are 1, 2, 5, 20, 180, 16143 (OEIS
    A261005), and on at most n vertices 1, 3, 8, 28, 208, 16351, which is OEIS
    A003182(n) - 2 (A003182 counts antichains of subsets of an n-set up to
    permutation, among them the two that are no complex here: the empty antichain and
    the one made of the empty set).

``graphs``
    Moved to :mod:`.graphs` (the atlas up to 7 vertices, canonical augmentation from 8
    on); ``GRAPHS`` and ``ATLAS_COUNTS`` are re-exported here for older imports.

Case ids: ``all-complexes/<facets>`` spells the facets of the canonical
representative, for example ``all-complexes/01-02-12`` (the boundary of a triangle)
or ``all-complexes/0-1`` (two points); they are stable across runs, machines and
parameters.
"""

from __future__ import annotations

from functools import lru_cache
from itertools import permutations
from math import comb

import numpy as np

from ..complex import Complex
from .family import Family, FamilyError, FamilyType, Param
from .graphs import ATLAS_COUNTS, GRAPHS  # noqa: F401  (re-exported for older imports)

__all__ = ["ALL_COMPLEXES", "GRAPHS", "ATLAS_COUNTS", "classes_on", "canonical_facets",
           "MAX_EXHAUSTIVE_VERTICES"]

# 7 vertices would give A003182(7) - A003182(6) = 490013148 - 16353 classes.
MAX_EXHAUSTIVE_VERTICES = 6


# ------------------------------------------------------------ canonical codes
@lru_cache(maxsize=None)
def _relabel_weights(k: int) -> tuple[np.ndarray, np.ndarray]:
    """For every permutation p of range(k) and vertex set m: 2 ** p(m), split into the
    weights of bits 0..31 and of bits 32..63, as float64 matrices (2^k x k!)."""
    masks = np.arange(1 << k, dtype=np.int64)
    images = []
    for sigma in permutations(range(k)):
        image = np.zeros(1 << k, dtype=np.int64)
        for v in range(k):
            image |= ((masks >> v) & 1) << sigma[v]
        images.append(image)
    images = np.array(images).T                     # (2^k, k!)
    low = np.where(images < 32, np.ldexp(1.0, np.minimum(images, 31)), 0.0)
    high = np.where(images >= 32, np.ldexp(1.0, np.maximum(images - 32, 0)), 0.0)
    low[0] = high[0] = 0.0                          # the empty set is never a member
    return low, high


def _canonical_codes(codes: np.ndarray, k: int, chunk: int = 2048) -> np.ndarray:
    """The canonical code (least code over all relabellings) of each code, k <= 6.

    The code of the relabelled complex p(K) is sum over members m of 2 ** p(m); for
    all p at once this is the 0/1 membership matrix times the weight matrix.  Every
    product and partial sum is an integer below 2 ** 32, so the float64 products
    are exact whatever the summation order; the high and low halves are compared
    lexicographically.
    """
    low_w, high_w = _relabel_weights(k)
    bits = np.arange(1 << k, dtype=np.uint64)
    out = np.empty(len(codes), dtype=np.uint64)
    for start in range(0, len(codes), chunk):
        block = codes[start:start + chunk]
        member = ((block[:, None] >> bits) & np.uint64(1)).astype(np.float64)
        low = member @ low_w
        high = member @ high_w
        best_high = high.min(axis=1)
        best_low = np.where(high == best_high[:, None], low, np.inf).min(axis=1)
        out[start:start + chunk] = ((best_high.astype(np.uint64) << np.uint64(32))
                                    | best_low.astype(np.uint64))
    return out


@lru_cache(maxsize=None)
def _face_masks(k: int) -> tuple[int, ...]:
    """For each vertex set m: the code of its codimension-one faces (0 for |m| < 2)."""
    faces = []
    for m in range(1 << k):
        code = 0
        if bin(m).count("1") >= 2:
            for v in range(k):
                if m >> v & 1:
                    code |= 1 << (m & ~(1 << v))
        faces.append(code)
    return tuple(faces)


@lru_cache(maxsize=None)
def _classes(k: int, max_size: int) -> tuple[int, ...]:
    """Canonical codes of the complexes on exactly k vertices whose simplices have at
    most max_size vertices, ordered by number of simplices, then by code."""
    faces = _face_masks(k)
    level = np.array([sum(1 << (1 << v) for v in range(k))], dtype=np.uint64)
    found = [level]
    addable = [m for m in range(1 << k) if 2 <= bin(m).count("1") <= max_size]
    while len(level) and addable:
        children = []
        for m in addable:
            face, bit = np.uint64(faces[m]), np.uint64(1) << np.uint64(m)
            ok = ((level & face) == face) & ((level & bit) == 0)
            children.append(level[ok] | bit)
        candidates = np.concatenate(children)
        level = np.unique(_canonical_codes(candidates, k))   # sorted, distinct
        found.append(level)
    return tuple(int(c) for part in found for c in part)


@lru_cache(maxsize=None)
def _vertex_tuples(k: int) -> tuple[tuple[int, ...], ...]:
    """For each vertex set m (a bitmask), its vertices as a sorted tuple."""
    return tuple(tuple(v for v in range(k) if m >> v & 1) for m in range(1 << k))


def _members(code: int) -> list[int]:
    out, m = [], 0
    while code:
        if code & 1:
            out.append(m)
        code >>= 1
        m += 1
    return out


def _facet_tuples(code: int, k: int) -> list[tuple[int, ...]]:
    members = _members(code)
    tuples = _vertex_tuples(k)
    facets = [tuples[m] for m in members
              if not any(code >> (m | (1 << v)) & 1 for v in range(k) if not m >> v & 1)]
    return sorted(facets, key=lambda s: (len(s), s))


def _complex_of(code: int, k: int) -> Complex:
    tuples = _vertex_tuples(k)
    simplices = sorted((tuples[m] for m in _members(code)), key=lambda s: (len(s), s))
    return Complex(tuple(range(k)), tuple(simplices))


def _text_of(code: int, k: int) -> str:
    return "-".join("".join(str(v) for v in f) for f in _facet_tuples(code, k))


def _code_of(K: Complex) -> int:
    return sum(1 << sum(1 << v for v in s) for s in K.simplices)


def canonical_facets(K: Complex) -> str:
    """The facets of the least relabelling of K, spelled as in ``all-complexes`` ids.

    Definition: over all bijections of K's vertices onto 0..k-1, take the relabelled
    complex whose code (sum of 2 ** mask(s) over simplices s, mask(s) the bitmask of
    s) is least; list its facets by (dimension, lexicographic), each as its digits,
    joined by "-".  Two complexes give the same text iff they are isomorphic.

    Parameters: K -- a complex on 1..6 vertices.
    Returns: a string such as ``"01-02-12"``.  Raises FamilyError for more vertices.

    >>> canonical_facets(Complex.from_facets([["a", "b"], ["b", "c"], ["a", "c"]]))
    '01-02-12'
    >>> canonical_facets(Complex.from_facets([[5, 7], [9]]))
    '2-01'

    Notes: all k! relabellings are tried at once as one exact 0/1 x power-of-two
    matrix product (k! = 720 for k = 6).
    Reference: canonical forms by minimisation over the symmetric group -- B. D. McKay,
    "Isomorph-free exhaustive generation", J. Algorithms 26 (1998) 306-324 (the
    orderly-generation setting; from memory).
    """
    k = K.n_vertices
    if not 1 <= k <= MAX_EXHAUSTIVE_VERTICES:
        raise FamilyError(f"canonical facets are computed for complexes on 1 to "
                          f"{MAX_EXHAUSTIVE_VERTICES} vertices, this one has {k}")
    code = int(_canonical_codes(np.array([_code_of(K)], dtype=np.uint64), k)[0])
    return _text_of(code, k)


def classes_on(n_vertices: int, max_dim: int | None = None) -> tuple[Complex, ...]:
    """Every complex on exactly ``n_vertices`` vertices, one per isomorphism class.

    Definition: the complexes on the vertex set {0..n-1} (every vertex a simplex) of
    dimension at most ``max_dim``, each the least relabelling of its class (see
    :func:`canonical_facets`).

    Parameters: n_vertices -- 1..6; max_dim -- bound on the dimension, None for none.
    Returns: a tuple of Complex, ordered by number of simplices, then by code.

    >>> [K.facet_labels() for K in classes_on(2)]
    [[[0], [1]], [[0, 1]]]
    >>> len(classes_on(4))      # OEIS A261005(4)
    20

    Notes: level-by-level generation with deduplication by canonical code; about 4 s
    for 6 vertices (16,143 classes from 137,133 candidates), cached per process.
    Reference: OEIS A261005 (numbers of unlabeled simplicial complexes on n vertices).
    """
    if not 1 <= n_vertices <= MAX_EXHAUSTIVE_VERTICES:
        raise FamilyError(f"exhaustive lists go up to {MAX_EXHAUSTIVE_VERTICES} vertices, "
                          f"asked for {n_vertices}")
    size = n_vertices if max_dim is None else min(max_dim + 1, n_vertices)
    return tuple(_complex_of(code, n_vertices) for code in _classes(n_vertices, size))


@lru_cache(maxsize=None)
def _class_texts(k: int, max_size: int) -> tuple[str, ...]:
    return tuple(_text_of(code, k) for code in _classes(k, max_size))


class AllComplexes(Family):
    """Every complex on min_vertices..max_vertices vertices up to isomorphism."""

    def _sizes(self):
        lo, hi, d = (self.params["min_vertices"], self.params["max_vertices"],
                     self.params["max_dim"])
        return [(k, k if d is None else min(d + 1, k)) for k in range(lo, hi + 1)]

    def size(self) -> int:
        return sum(len(_classes(k, s)) for k, s in self._sizes())

    def case_ids(self):
        for k, s in self._sizes():
            for text in _class_texts(k, s):
                yield f"all-complexes/{text}"

    def __iter__(self):
        for k, s in self._sizes():      # straight from the enumeration, already canonical
            for code, text in zip(_classes(k, s), _class_texts(k, s)):
                yield f"all-complexes/{text}", _complex_of(code, k)

    def get(self, case_id) -> Complex:
        prefix = "all-complexes/"
        if not isinstance(case_id, str) or not case_id.startswith(prefix):
            raise self._foreign(case_id, "its ids look like 'all-complexes/01-02-12'")
        facets = []
        for token in case_id[len(prefix):].split("-"):
            if not token.isdigit() or list(token) != sorted(set(token)):
                raise self._foreign(case_id, "facets are increasing digit strings joined by '-'")
            facets.append(tuple(int(c) for c in token))
        vertices = sorted({v for f in facets for v in f})
        k = len(vertices)
        if vertices != list(range(k)) or not (
                self.params["min_vertices"] <= k <= self.params["max_vertices"]):
            raise self._foreign(case_id, f"it has the complexes on vertices 0..k-1, "
                                f"{self.params['min_vertices']} <= k <= "
                                f"{self.params['max_vertices']}")
        K = Complex._from_index_sets(tuple(range(k)), facets)
        if self.params["max_dim"] is not None and K.dim > self.params["max_dim"]:
            raise self._foreign(case_id, f"dimension {K.dim} > max_dim")
        if canonical_facets(K) != case_id[len(prefix):]:
            raise self._foreign(case_id, "not the canonical representative of its class")
        return K

    def f_bound(self):
        n, d = self.params["max_vertices"], self.params["max_dim"]
        top = n - 1 if d is None else min(d, n - 1)
        return tuple(comb(n, i + 1) for i in range(top + 1))


def _build_all_complexes(params, context):
    if params["min_vertices"] > params["max_vertices"]:
        raise context.error("min_vertices", f"must be at most max_vertices = "
                            f"{params['max_vertices']}; got {params['min_vertices']}")
    return AllComplexes("all-complexes", params)


ALL_COMPLEXES = FamilyType(
    name="all-complexes",
    description="every simplicial complex on at most n vertices (n <= 6), one per "
            "isomorphism class",
    params=(
        Param.integer("max_vertices", 1, MAX_EXHAUSTIVE_VERTICES,
                      "largest number of vertices (6 vertices: 16,143 classes, a few "
                      "seconds to enumerate)"),
        Param.integer("min_vertices", 1, MAX_EXHAUSTIVE_VERTICES,
                      "smallest number of vertices", default=1),
        Param.integer("max_dim", 0, None, "largest dimension; omit for no bound",
                      default=None),
    ),
    build=_build_all_complexes,
    reference="class counts: OEIS A261005 (exactly n vertices), A003182 (at most n)",
)

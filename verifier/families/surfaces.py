"""Exhaustive families of manifolds on few vertices: ``surfaces`` and ``spheres``.

``surfaces``
    Every triangulated closed (connected) surface on ``vertices`` vertices, 4 <= n <= 10,
    one per isomorphism class, optionally only those of a given Euler characteristic
    and/or orientability.  Numbers of classes for n = 4..10: 1, 1, 3, 9, 43, 655, 42426
    (F. H. Lutz's tables; T. Sulanke and F. H. Lutz, Eur. J. Combin. 30 (2009)
    1965-1979).
``spheres``
    Every triangulated 2-sphere on 4..12 vertices (OEIS A000109: 1, 1, 2, 5, 14, 50, 233,
    1249, 7595), or every combinatorial 3-sphere on 5..9 vertices (1, 2, 5, 39, 1296:
    A. Altshuler and L. Steinberg 1976; Sulanke-Lutz 2009).

The classes come from :mod:`.triangulations` (lexicographic enumeration and vertex
splitting; see there for the methods and references).

Case ids spell the canonically labelled facets (:func:`.triangulations.canonical_facets`)
in a compact code, each facet its vertex digits (0-9, then a-z), facets one after
another: ``surfaces/6:<code>`` (a surface on 6 vertices), ``spheres/2/12:<code>``,
``spheres/3/9:<code>``; for example ``spheres/2/4:012013023123`` is the boundary of the
tetrahedron.  ``get`` rebuilds a case from its id alone and refuses an id that is not
the canonical code of a member of the family.

Both families are planned in shards: ``"<n>/d<k>"`` holds the cases on n vertices whose
largest vertex degree is k (the generators produce each such part on its own); k runs
from the least possible largest degree (from the average degree) to n - 1.
``size()`` is the published number of classes when no filter is set (``surfaces``) and
always for ``spheres``; with an ``euler`` or ``orientable`` filter it is None (not
known without enumerating).
"""

from __future__ import annotations

import re
from math import comb

from ..complex import Complex
from .family import Family, FamilyError, FamilyType, Param, _Invalid
from .triangulations import (MAX_MANIFOLD3_VERTICES, MAX_SPHERE2_VERTICES,
                             MAX_SURFACE_VERTICES, canonical_facets, decode_facets,
                             encode_facets, is_orientable_surface, spheres_2, spheres_3,
                             surfaces)

__all__ = ["SURFACES", "SPHERES", "SURFACE_COUNTS", "SPHERE_COUNTS"]

# Published numbers of classes (checked against the generators in
# tests/test_triangulations.py, each with its source there).
SURFACE_COUNTS = {4: 1, 5: 1, 6: 3, 7: 9, 8: 43, 9: 655, 10: 42426}
SPHERE_COUNTS = {
    2: {4: 1, 5: 1, 6: 2, 7: 5, 8: 14, 9: 50, 10: 233, 11: 1249, 12: 7595},   # A000109
    3: {5: 1, 6: 2, 7: 5, 8: 39, 9: 1296},                                   # Altshuler-Steinberg
}
MIN_SPHERE_VERTICES = {2: 4, 3: 5}
MAX_SPHERE_VERTICES = {2: MAX_SPHERE2_VERTICES, 3: MAX_MANIFOLD3_VERTICES}

_SHARD = re.compile(r"(\d+)/d(\d+)")


def _optional_euler() -> Param:
    def check(value, context):
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, int) or value > 2:
            raise _Invalid()
        return value
    return Param("euler", "an integer", "euler <= 2",
                 "keep only the surfaces of this Euler characteristic; omit for all",
                 check, default=None)


def _optional_orientable() -> Param:
    def check(value, context):
        if value is None:
            return None
        if not isinstance(value, bool):
            raise _Invalid()
        return value
    return Param("orientable", "true or false", "",
                 "keep only the orientable (true) or non-orientable (false) surfaces; "
                 "omit for both", check, default=None)


def _closed_connected(K: Complex, dimension: int) -> bool:
    """Pure of the given dimension, every vertex link a sphere, connected."""
    from ..invariants.homology import betti
    from ..invariants.manifolds import is_closed_manifold

    return (K.dim == dimension and is_closed_manifold(K) and betti(K)[0] == 1)


class _Exhaustive(Family):
    """What the two families share: ids ``<prefix>/<n>:<code>``, shards ``<n>/d<k>``."""

    width = 3            # vertices per facet

    def _prefix(self) -> str:
        raise NotImplementedError

    def _range(self) -> tuple[int, int]:
        lo, hi = self.params["vertices"]
        return lo, hi

    def _degrees(self, n: int) -> range:
        """The largest vertex degrees of the shards on n vertices.  Those left out are
        empty: the largest degree is at least the average 2 f1 / n, and a closed
        surface has f1 = 3 (n - chi) >= 3n - 6."""
        return range(-(-(6 * n - 12) // n), n)

    def _classes(self, n: int, d: int):
        raise NotImplementedError

    def _keep(self, facets) -> bool:
        return True

    def _member(self, K: Complex) -> str | None:
        """None when K (canonically labelled, within the vertex range) belongs to the
        family, else the reason it does not."""
        raise NotImplementedError

    # ---- sharded planning
    def shards(self) -> list[str]:
        lo, hi = self._range()
        return [f"{n}/d{d}" for n in range(lo, hi + 1) for d in self._degrees(n)]

    def shard_cases(self, shard):
        match = _SHARD.fullmatch(shard) if isinstance(shard, str) else None
        lo, hi = self._range()
        if (not match or not lo <= int(match[1]) <= hi
                or int(match[2]) not in self._degrees(int(match[1]))):
            raise FamilyError(f"family {self.name!r}: no shard {shard!r}; its shards are "
                              f"'<n>/d<k>' (n vertices, largest vertex degree k) for "
                              f"{lo} <= n <= {hi}, e.g. {self.shards()[-1]!r}")
        n, d = int(match[1]), int(match[2])
        labels = tuple(range(n))
        for facets in self._classes(n, d):
            if self._keep(facets):
                yield (f"{self._prefix()}/{n}:{encode_facets(facets)}",
                       Complex._from_index_sets(labels, facets))

    def case_ids(self):
        for shard in self.shards():
            for case_id, _ in self.shard_cases(shard):
                yield case_id

    def __iter__(self):
        for shard in self.shards():
            yield from self.shard_cases(shard)

    def get(self, case_id) -> Complex:
        prefix = self._prefix() + "/"
        example = f"'{prefix}<n>:<facets>'"
        if not isinstance(case_id, str) or not case_id.startswith(prefix):
            raise self._foreign(case_id, f"its ids look like {example}")
        head, colon, code = case_id[len(prefix):].partition(":")
        if not colon or not head.isdigit() or head.startswith("0"):
            raise self._foreign(case_id, f"its ids look like {example}")
        n = int(head)
        lo, hi = self._range()
        if not lo <= n <= hi:
            raise self._foreign(case_id, f"it has the cases on {lo} to {hi} vertices, "
                                f"this id names {n}")
        facets = decode_facets(code, self.width)
        if facets is None:
            raise self._foreign(case_id, f"the facets are written as groups of "
                                f"{self.width} vertex digits (0-9, a-z)")
        if (any(list(f) != sorted(set(f)) for f in facets) or facets != sorted(set(facets))
                or sorted({v for f in facets for v in f}) != list(range(n))):
            raise self._foreign(case_id, f"the facets must be increasing, listed in "
                                f"increasing order, on the vertices 0..{n - 1}")
        K = Complex._from_index_sets(tuple(range(n)), facets)
        reason = self._member(K)
        if reason:
            raise self._foreign(case_id, reason)
        if list(canonical_facets(n, facets)) != facets:
            raise self._foreign(case_id, "not the canonical labelling of its class")
        if not self._keep(tuple(facets)):
            raise self._foreign(case_id, "outside the family's filters")
        return K


class Surfaces(_Exhaustive):
    """Every closed surface on the given numbers of vertices, optionally filtered."""

    def _prefix(self) -> str:
        return "surfaces"

    def _classes(self, n, d):
        return surfaces(n, d)

    def _keep(self, facets) -> bool:
        euler, orientable = self.params["euler"], self.params["orientable"]
        if euler is not None:
            n = len({v for f in facets for v in f})
            if n - len(facets) // 2 != euler:      # f1 = 3 f2 / 2: chi = f0 - f2 / 2
                return False
        return orientable is None or is_orientable_surface(facets) == orientable

    def _member(self, K):
        return None if _closed_connected(K, 2) else "not a closed connected surface"

    def size(self) -> int | None:
        if self.params["euler"] is not None or self.params["orientable"] is not None:
            return None
        lo, hi = self._range()
        return sum(SURFACE_COUNTS[n] for n in range(lo, hi + 1))

    def f_bound(self):
        n = self._range()[1]
        return (n, comb(n, 2), 2 * comb(n, 2) // 3)


class Spheres(_Exhaustive):
    """Every 2-sphere or every combinatorial 3-sphere on the given numbers of vertices."""

    def __init__(self, name, params, base=None):
        super().__init__(name, params, base)
        self.width = params["dimension"] + 1

    def _prefix(self) -> str:
        return f"spheres/{self.params['dimension']}"

    def _degrees(self, n: int) -> range:
        """As for surfaces; a 3-manifold has f1 >= 4n - 10 (D. Walkup, "The lower bound
        conjecture for 3- and 4-manifolds", Acta Math. 125 (1970) 75-107), so its largest
        degree is at least (8n - 20) / n."""
        if self.params["dimension"] == 2:
            return super()._degrees(n)
        return range(-(-(8 * n - 20) // n), n)

    def _classes(self, n, d):
        return spheres_2(n, d) if self.params["dimension"] == 2 else spheres_3(n, d)

    def _member(self, K):
        from ..invariants.manifolds import NotDecided, is_sphere

        dimension = self.params["dimension"]
        try:
            ok = K.dim == dimension and is_sphere(K)
        except NotDecided as error:
            return f"not recognised as a {dimension}-sphere: {error}"
        return None if ok else f"not a triangulated {dimension}-sphere"

    def size(self) -> int:
        lo, hi = self._range()
        return sum(SPHERE_COUNTS[self.params["dimension"]][n] for n in range(lo, hi + 1))

    def f_bound(self):
        n = self._range()[1]
        if self.params["dimension"] == 2:
            return (n, 3 * n - 6, 2 * n - 4)
        return (n, comb(n, 2), 2 * (comb(n, 2) - n), comb(n, 2) - n)


def _build_surfaces(params, context):
    return Surfaces("surfaces", params)


def _build_spheres(params, context):
    dimension = params["dimension"]
    lo, hi = params["vertices"]
    low, high = MIN_SPHERE_VERTICES[dimension], MAX_SPHERE_VERTICES[dimension]
    if not low <= lo <= hi <= high:
        raise context.error("vertices", f"for dimension {dimension} must be an integer n or "
                            f"a pair [lo, hi] with {low} <= lo <= hi <= {high}; got "
                            f"{context.spec.get('vertices')!r}")
    return Spheres("spheres", params)


SURFACES = FamilyType(
    name="surfaces",
    description="every triangulated closed surface on 4 to 10 vertices, one per "
            "isomorphism class (1, 1, 3, 9, 43, 655, 42426 for n = 4..10), optionally of "
            "one Euler characteristic and/or orientability",
    params=(
        Param.integer_range("vertices", 4, MAX_SURFACE_VERTICES,
                            "numbers of vertices (10 vertices: 42,426 classes, a few "
                            "seconds to generate)"),
        _optional_euler(),
        _optional_orientable(),
    ),
    build=_build_surfaces,
    reference="T. Sulanke and F. H. Lutz, Isomorphism-free lexicographic enumeration of "
              "triangulated surfaces and 3-manifolds, Eur. J. Combin. 30 (2009) 1965-1979 "
              "(method and counts); F. H. Lutz's tables of triangulated surfaces",
)

SPHERES = FamilyType(
    name="spheres",
    description="every triangulated 2-sphere on 4 to 12 vertices, or every combinatorial "
            "3-sphere on 5 to 9 vertices, one per isomorphism class",
    params=(
        Param.integer("dimension", 2, 3, "2 or 3"),
        Param.integer_range("vertices", 4, MAX_SPHERE2_VERTICES,
                            "numbers of vertices: 4..12 for dimension 2 (12 vertices: "
                            "7,595 classes), 5..9 for dimension 3 (9 vertices: 1,296)"),
    ),
    build=_build_spheres,
    reference="2-spheres: OEIS A000109, generated by vertex splitting (E. Steinitz and H. "
              "Rademacher 1934: contractible edges); 3-spheres: T. Sulanke and F. H. Lutz, "
              "Eur. J. Combin. 30 (2009) 1965-1979, counts of A. Altshuler and L. Steinberg "
              "(1976) and F. H. Lutz's tables",
)

"""A minimal counterexample written for a reader: vertices 1..n, and its catalog name.

The shrinker keeps the labels of the case it started from (a refined Klein bottle
shrinks to a projective plane on vertices 0, 3, 4, 5, 30, 47).  ``readable`` renumbers
the vertices 1..n in the order of the original labels, keeps the map back to them, and
names every catalog complex the counterexample is isomorphic to.

Recognition is exact: an isomorphism of simplicial complexes is a bijection of the
vertices that maps simplices onto simplices, decided by comparing canonical forms
(``Complex.canonical_form``), only among catalog complexes with the same f-vector and
at most ``CANONICAL_MAX_VERTICES`` vertices.

>>> K = Complex.from_facets([[10, 20], [20, 30], [10, 30]])
>>> readable({"K": K.facet_labels()})["K"]["facets"]
[[1, 2], [1, 3], [2, 3]]
>>> readable({"K": K.facet_labels()})["K"]["labels"]
[[1, 10], [2, 20], [3, 30]]
>>> readable({"K": K.facet_labels()})["K"]["isomorphic_to"][:2]
['simplex-boundary-2', 'sphere-1']
"""

from __future__ import annotations

from functools import lru_cache

from ..complex import CANONICAL_MAX_VERTICES, Complex

__all__ = ["readable", "recognise", "relabelled"]


def relabelled(K: Complex) -> tuple[list[list[int]], list[list]]:
    """The facets of K on vertices 1..n (in the order of K's labels) and the pairs
    [new label, original label]."""
    new = {label: position + 1 for position, label in enumerate(K.labels)}
    facets = sorted(sorted(new[v] for v in f) for f in K.facet_labels())
    return facets, [[new[v], v] for v in K.labels]


@lru_cache(maxsize=1)
def _catalog() -> tuple[tuple[str, Complex], ...]:
    """The catalog complexes small enough for canonical forms, recorded names first."""
    from ..families import catalog
    small = []
    for name in catalog.names():
        try:
            K = catalog.complex(name)
        except Exception:       # a constructed name over the size cap is not compared
            continue
        if K.n_vertices <= CANONICAL_MAX_VERTICES:
            small.append((name, K))
    return tuple(small)


def recognise(K: Complex) -> list[str]:
    """The catalog names of the complexes isomorphic to K (empty if K has more than
    ``CANONICAL_MAX_VERTICES`` vertices or matches none)."""
    if K.n_vertices > CANONICAL_MAX_VERTICES or K.n_vertices == 0:
        return []
    return [name for name, C in _catalog()
            if C.f_vector == K.f_vector and C.is_isomorphic(K)]


def readable(complexes: dict) -> dict:
    """variable -> {"facets": on 1..n, "labels": [[new, original], ...],
    "isomorphic_to": [catalog names]} for a counterexample's facet lists."""
    described = {}
    for variable, facets in complexes.items():
        if not facets:
            described[variable] = {"facets": [], "labels": [], "isomorphic_to": []}
            continue
        K = Complex.from_facets(facets)
        new_facets, labels = relabelled(K)
        described[variable] = {"facets": new_facets, "labels": labels,
                               "isomorphic_to": recognise(K)}
    return described


def describe(entry: dict) -> str:
    """One line: the relabelled facets, the catalog names, the label map if it moved."""
    text = str(entry["facets"])
    if entry["isomorphic_to"]:
        text += f", isomorphic to {entry['isomorphic_to'][0]}"
        if len(entry["isomorphic_to"]) > 1:
            text += f" (also {', '.join(entry['isomorphic_to'][1:])})"
    moved = [(new, old) for new, old in entry["labels"] if new != old]
    if moved:
        text += "; vertex labels " + ", ".join(f"{new}={old}" for new, old in entry["labels"])
    return text

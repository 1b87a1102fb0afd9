"""The catalog: classic triangulations by name, each with invariants from a named source.

Two kinds of names:

* **recorded** names -- the ``id`` of each entry of the reference data file
  ``data/triangulations.json`` (shipped as package data): facets transcribed from a
  publication or built from a standard recipe, with their published invariants and
  source.  Vertex labels are as in the file (1..n).
* **constructed** names -- infinite series built by :mod:`.constructions`, with the
  invariants the mathematics predicts:

  =============================  ===============================================
  ``sphere-<d>``                 boundary of the (d+1)-simplex, d >= 0
  ``ball-<d>``                   the d-simplex, d >= 0
  ``surface-orientable-<g>``     closed orientable surface of genus g >= 0
  ``surface-nonorientable-<k>``  closed non-orientable surface, k >= 1 cross-caps
  ``sphere-product-<a>-<b>``     S^a x S^b (staircase product), a, b >= 1
  ``torus-product-<n>``          the n-torus (S^1)^n (staircase product), n >= 1
  ``lens-<p>-<q>``               lens space L(p, q), p >= 2, 1 <= q < p, gcd 1
  =============================  ===============================================

>>> complex("torus-7").f_vector
(7, 21, 14)
>>> entry("surface-nonorientable-2")["betti_F2"]
[1, 2, 1]
"""

from __future__ import annotations

import copy
import difflib
import json
import re
from functools import lru_cache
from importlib import resources
from math import comb, factorial

from ..complex import Complex
from . import constructions

__all__ = ["CatalogError", "names", "recorded_names", "patterns", "entry", "complex",
           "MAX_SIMPLICES"]

# Constructed names whose complexes would have more simplices than this are refused.
MAX_SIMPLICES = 2_000_000


class CatalogError(KeyError, ValueError):
    """An unknown or malformed catalog name (the message lists the closest valid names)."""

    def __str__(self) -> str:  # KeyError would show the message with quotes
        return str(self.args[0]) if self.args else ""


# ---------------------------------------------------------------- recorded data
@lru_cache(maxsize=1)
def _data() -> dict[str, dict]:
    text = (resources.files("verifier.families") / "data" / "triangulations.json").read_text(
        encoding="utf-8")
    return {e["id"]: e for e in json.loads(text)["entries"]}


# ------------------------------------------------------------ constructed names
# pattern, builder, expected invariants, listed members, a cheap lower bound on the
# number of simplices (checked against MAX_SIMPLICES before anything is built)
_HUGE = MAX_SIMPLICES + 1
_RECIPES = (
    ("sphere-<d>", constructions.simplex_boundary, constructions.simplex_boundary_invariants,
     [(d,) for d in range(1, 5)], lambda d: 2 ** (min(d, 64) + 2) - 2),
    ("ball-<d>", constructions.simplex, constructions.simplex_invariants,
     [(d,) for d in range(1, 4)], lambda d: 2 ** (min(d, 64) + 1) - 1),
    ("surface-orientable-<g>", constructions.orientable_surface,
     constructions.orientable_surface_invariants, [(g,) for g in range(0, 4)],
     lambda g: 34 * g + 8),
    ("surface-nonorientable-<k>", constructions.nonorientable_surface,
     constructions.nonorientable_surface_invariants, [(k,) for k in range(1, 5)],
     lambda k: 23 * k + 8),
    ("sphere-product-<a>-<b>", constructions.sphere_product,
     constructions.sphere_product_invariants, [(1, 1), (1, 2)],
     lambda a, b: (a + 2) * (b + 2) * comb(a + b, a) if a + b <= 64 else _HUGE),
    ("torus-product-<n>", constructions.torus_product, constructions.torus_product_invariants,
     [(2,), (3,)], lambda n: 3 ** n * factorial(n) if n <= 64 else _HUGE),
    ("lens-<p>-<q>", constructions.lens_space, constructions.lens_space_invariants,
     [(2, 1), (3, 1), (5, 1), (5, 2)], lambda p, q: 408 * p + 16),
)


def _regex(pattern: str) -> re.Pattern:
    """``"lens-<p>-<q>"`` -> a regular expression with one group per parameter."""
    pieces = re.split(r"<[a-z]>", pattern)
    return re.compile("(0|[1-9][0-9]*)".join(re.escape(piece) for piece in pieces) + r"\Z")


_PARSERS = [(_regex(pattern), pattern, build, expected, size)
            for pattern, build, expected, _, size in _RECIPES]


def _instance(pattern: str, params: tuple[int, ...]) -> str:
    parts = iter(params)
    return re.sub(r"<[a-z]>", lambda _: str(next(parts)), pattern)


def names() -> list[str]:
    """The catalog's names: every recorded entry, then a default selection of
    constructed ones.

    Every recorded entry is listed; of the infinite constructed series (see
    :func:`patterns`) a few small members are listed, and any other valid member can be
    asked for by name.

    Returns: a list of strings, recorded ids first (in file order).

    >>> "projective-plane-6" in names(), "surface-orientable-2" in names()
    (True, True)

    Reference: the recorded entries name their sources in ``entry(name)["source"]``.
    """
    listed = list(_data())
    for pattern, _, _, examples, _ in _RECIPES:
        listed += [_instance(pattern, params) for params in examples]
    return listed


def recorded_names() -> list[str]:
    """The names of the recorded entries (facets transcribed or built from a standard
    recipe, in the data file), in file order; the other names of :func:`names` are
    constructed.

    >>> "torus-7" in recorded_names(), "sphere-2" in recorded_names()
    (True, False)
    """
    return list(_data())


def patterns() -> list[str]:
    """The templates of the constructed names, e.g. ``"surface-orientable-<g>"``.

    >>> "lens-<p>-<q>" in patterns()
    True
    """
    return [pattern for pattern, *_ in _RECIPES]


def _unknown(name) -> CatalogError:
    candidates = names() + patterns()
    close = difflib.get_close_matches(str(name), candidates, n=4, cutoff=0.5)
    hint = f"; did you mean {', '.join(repr(c) for c in close)}?" if close else ""
    return CatalogError(
        f"unknown catalog name {name!r}{hint} (`verifier show --list` lists the names; "
        f"constructed series: {', '.join(patterns())})")


def _parse(name: str):
    """(pattern, builder, expected, size, params) for a constructed name, or None."""
    for regex, pattern, build, expected, size in _PARSERS:
        match = regex.match(name)
        if match:
            return pattern, build, expected, size, tuple(int(x) for x in match.groups())
    return None


@lru_cache(maxsize=256)
def _constructed_entry(name: str) -> dict:
    pattern, _, expected, size, params = _parse(name)
    if size(*params) > MAX_SIMPLICES:
        raise CatalogError(
            f"catalog name {name!r}: more than the catalog's limit of {MAX_SIMPLICES} "
            "simplices; choose smaller parameters")
    try:
        record = expected(*params)
    except constructions.ConstructionError as error:
        raise CatalogError(f"catalog name {name!r}: {error}") from None
    if sum(record["f_vector"]) > MAX_SIMPLICES:
        raise CatalogError(
            f"catalog name {name!r}: {sum(record['f_vector'])} simplices, more than the "
            f"catalog's limit of {MAX_SIMPLICES}; choose smaller parameters")
    return {"id": name, **record, "facets": None}


def _resolve(name) -> tuple[str, dict]:
    if not isinstance(name, str):
        raise CatalogError(f"a catalog name must be a string, got {name!r}")
    data = _data()
    if name in data:
        return "recorded", data[name]
    if _parse(name) is not None:
        return "constructed", _constructed_entry(name)
    raise _unknown(name)


def entry(name: str) -> dict:
    """The record of a catalog name: its invariants and their source.

    For a recorded name, the entry of the reference data file (keys ``id, title,
    dimension, vertices, f_vector, euler, betti_Q, torsion, betti_F2, betti_F3,
    orientable, source, provenance, facets``, some entries also ``pi1_order``).  For a
    constructed name, a record with the same keys holding the invariants the recipe's
    mathematics predicts, and the facets of the complex the recipe builds (vertices
    1..n).  For a :class:`Complex` to compute with, use :func:`complex`.
    ``betti_Q[k]`` is the rank of H_k(K; Z), ``torsion[k]`` its invariant factors > 1.

    Parameters: name -- a catalog name (see :func:`names`, :func:`patterns`).
    Returns: a fresh dict (safe to modify).  Raises CatalogError for an unknown name.

    >>> entry("moebius-strip-5")["euler"]
    0
    >>> entry("sphere-3")["f_vector"]
    [5, 10, 10, 5]
    >>> entry("sphere-1")["facets"]
    [[1, 2], [1, 3], [2, 3]]

    Reference: each record's ``source`` field.
    """
    kind, record = _resolve(name)
    record = copy.deepcopy(record)
    if record.get("facets") is None:      # a constructed name: the recipe's facets
        record["facets"] = complex(name).facet_labels()
    return record


def complex(name: str) -> Complex:
    """The complex of a catalog name (built once, then cached).

    Definition: for a recorded name, the complex generated by the facets of the data
    file, with the file's vertex labels; for a constructed name, the recipe of
    :mod:`.constructions`, with vertices labelled 1..n.

    Parameters: name -- a catalog name.  Returns: an immutable Complex.  Raises
    CatalogError for an unknown name or parameters outside a series' range.

    >>> complex("sphere-1").facet_labels()
    [[1, 2], [1, 3], [2, 3]]

    Notes: constructed series are limited to MAX_SIMPLICES simplices.
    Reference: each record's ``source`` field (see :func:`entry`).
    """
    if not isinstance(name, str):
        raise CatalogError(f"a catalog name must be a string, got {name!r}")
    return _complex(name)


@lru_cache(maxsize=128)
def _complex(name: str) -> Complex:
    kind, record = _resolve(name)
    if kind == "recorded":
        return Complex.from_facets(record["facets"])
    _, build, _, _, params = _parse(name)
    return build(*params)

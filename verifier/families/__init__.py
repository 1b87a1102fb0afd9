"""Families of complexes: the generators the runner tests claims over (SPEC §5).

Interface (what the claim loader and the runner rely on)
--------------------------------------------------------
``FAMILIES``
    A plain dict, family name -> :class:`FamilyType`.  Adding a family means adding
    one entry: a name, a one-line description, a parameter table (:class:`Param`: name,
    type, valid range, meaning, default or required) and a builder returning a
    :class:`Family`.
``make_family(spec) -> Family``
    ``spec`` is the TOML table of a ``[[claim.over]]`` entry, e.g.
    ``{"family": "random-flag", "vertices": [6, 14], "edge_probability": 0.4,
    "count": 2000, "seed": 11}``.  The keys ``family`` and ``bind`` are not
    parameters (``bind`` is ignored here).  The key ``_base`` names the folder that
    relative paths are resolved against (the loader passes the claim file's folder;
    nested tables inherit it).
``FamilyError`` (a ValueError)
    Raised for an unknown family ("unknown family 'x'; did you mean 'y'?"), an
    unknown, missing, mistyped or out-of-range parameter (the message names the
    family, the parameter, what was given and what is valid), a request too large to
    run, and a case id that does not belong to the family.  Its ``key`` attribute is
    the path of keys inside the table (e.g. ``("of", "times")``) for the loader to
    turn into file:line:column.
``describe() -> list[dict]``
    One dict per family type: ``name``, ``description``, ``reference`` and
    ``parameters`` (each with ``name, type, valid, meaning, required, default``), for
    ``verifier families``.

A :class:`Family` has

* ``.name`` and ``.params`` (validated, defaults filled, JSON-serialisable);
* ``.spec()`` -- a canonical JSON-serialisable table; ``make_family(f.spec())``
  recreates the same family in any process;
* ``.size()`` -- the number of cases, or None when unknown without enumerating;
* ``.case_ids()`` -- a lazy iterator of stable string ids, in a deterministic order;
* ``.get(case_id)`` -- builds one case from its id alone, deterministically (workers
  call this);
* iteration -- yields ``(case_id, Complex)`` lazily.

Case ids are unique within a family and stable across runs and machines; to name a
case globally, pair it with the family's ``spec()``.  Examples:
``all-complexes/01-02-12``, ``graphs/G17``, ``graphs/9:c04082113`` (the 9-cycle),
``random-flag/s11/17`` (seed 11, case 17), ``catalog/torus-7``, ``file/octahedron.txt``,
``refine(2)/catalog/torus-7``, ``join/catalog/sphere-1|graphs/G3``.

The families
------------
================  =============================================================
all-complexes     every complex on <= 6 vertices up to isomorphism (:mod:`.enumerated`)
graphs            every graph on <= 11 vertices up to isomorphism (:mod:`.graphs`)
random-flag       flag complexes of G(n, p)                     (:mod:`.random_models`)
random-pure       random pure d-complexes
linial-meshulam   random 2-complexes Y(n, p)
random-geometric  flag complexes of random geometric graphs
catalog           classic triangulations by name                (:mod:`.named`)
cycles            the cycle graphs C_n                           (:mod:`.cycles`)
file              complexes read from files
refine, skeleton, cone, suspension, join, product   derived     (:mod:`.derived`)
================  =============================================================

>>> fam = make_family({"family": "catalog", "names": ["torus-7"]})
>>> [(case, K.f_vector) for case, K in fam]
[('catalog/torus-7', (7, 21, 14))]
>>> make_family({"family": "refine", "of": fam.spec(), "times": 1}).get(
...     "refine(1)/catalog/torus-7").f_vector
(42, 126, 84)
"""

from __future__ import annotations

from .cycles import CYCLES
from .derived import CONE, JOIN, PRODUCT, REFINE, SKELETON, SUSPENSION
from .enumerated import ALL_COMPLEXES
from .graphs import GRAPHS
from .family import (MAX_COUNT, MAX_RANDOM_VERTICES, MAX_SIMPLICES, Family, FamilyError,
                     FamilyType, Param, build_family, describe_types)
from .named import CATALOG, FILE
from .random_models import LINIAL_MESHULAM, RANDOM_FLAG, RANDOM_GEOMETRIC, RANDOM_PURE
from .surfaces import SPHERES, SURFACES

__all__ = ["FAMILIES", "FamilyError", "Family", "FamilyType", "Param", "make_family",
           "describe", "MAX_COUNT", "MAX_SIMPLICES", "MAX_RANDOM_VERTICES"]

FAMILIES: dict[str, FamilyType] = {
    kind.name: kind for kind in (
        ALL_COMPLEXES, GRAPHS, RANDOM_FLAG, RANDOM_PURE, LINIAL_MESHULAM,
        RANDOM_GEOMETRIC, CATALOG, CYCLES, FILE, REFINE, SKELETON, CONE, SUSPENSION, JOIN,
        PRODUCT, SURFACES, SPHERES)
}


def make_family(spec: dict) -> Family:
    """The family described by a ``[[claim.over]]`` table, validated.

    Definition: looks up ``spec["family"]`` in ``FAMILIES``, checks every other key
    against that family's parameter table (``bind`` and ``_base`` excepted), fills
    in defaults and builds the family.

    Parameters: spec -- a dict as read from TOML.
    Returns: a :class:`Family`.  Raises :class:`FamilyError` (see the module
    docstring for the messages).

    >>> make_family({"family": "graphs", "max_vertices": 3}).size()
    7
    >>> make_family({"family": "random-flg", "count": 1})
    Traceback (most recent call last):
    ...
    verifier.families.family.FamilyError: unknown family 'random-flg'; did you mean 'random-flag'?

    Notes: validation is cheap; enumeration happens only when cases are asked for.
    Reference: SPEC §3 and §5.
    """
    return build_family(FAMILIES, spec)


def describe() -> list[dict]:
    """The registry as data, for ``verifier families``: one dict per family.

    Definition: for each entry of ``FAMILIES``, its ``name``, ``description``,
    ``reference`` and ``parameters`` (``name, type, valid, meaning, required,
    default``).

    Returns: a list of plain dicts, in registry order.

    >>> [p["name"] for p in describe()[0]["parameters"]]
    ['max_vertices', 'min_vertices', 'max_dim']

    Reference: SPEC §5 ("``verifier families`` lists them with parameters").
    """
    return describe_types(FAMILIES)

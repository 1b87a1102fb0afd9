"""The family model shared by every generator: parameters, validation, case ids, seeds.

A *family type* (:class:`FamilyType`) is a registry entry: a name, a one-line description,
a table of parameters (:class:`Param`) and a builder.  Validating a claim file's
``[[claim.over]]`` table against that entry gives a *family* (:class:`Family`): an
immutable object that knows its parameters, enumerates its cases lazily, gives each
case a stable string id, and builds any single case from its id alone.

Everything here is plumbing; the families themselves live in
:mod:`.enumerated` (exhaustive lists), :mod:`.random_models` (seeded random
complexes), :mod:`.named` (catalog names and files) and :mod:`.derived`
(operations applied to other families).  The registry ``FAMILIES`` and the entry
point ``make_family`` are in :mod:`verifier.families`.

Errors: every mistake in a family table raises :class:`FamilyError` with a message
that names the family, the parameter, what was given and what is valid; its ``key``
attribute is the path of keys from the top-level table to the offending entry (for
example ``("of", "times")``), so that the claim loader can point at its line and
column.
"""

from __future__ import annotations

import copy
import difflib
import hashlib
import json
import random
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from typing import Any

from ..complex import Complex

__all__ = [
    "FamilyError", "Param", "FamilyType", "Family", "SeededFamily", "build_family",
    "describe_types", "case_random", "graph_complex", "flag_cliques",
    "flag_complex_of_masks", "REQUIRED", "MAX_COUNT",
    "MAX_SIMPLICES", "MAX_RANDOM_VERTICES", "MAX_NESTING",
]

# Limits that keep a request from running away (each named in the errors it causes).
MAX_COUNT = 10_000_000          # cases drawn by one random family
MAX_SIMPLICES = 1_000_000       # simplices of one generated or derived case
MAX_RANDOM_VERTICES = 200       # vertices of one random complex

MAX_NESTING = 16                # family tables inside one another (refine of join of ...)

# Keys of a family table that are not parameters of the family (those starting with '_'
# are written by the tool itself: the claim file's folder, the data files' hashes).
NOT_PARAMETERS = ("family", "bind", "_base", "_sha256")


class FamilyError(ValueError):
    """A family table is not valid, or a case id does not belong to a family.

    ``key`` is the path of keys from the top-level table to the entry at fault
    (``()`` for the table itself), for the loader to turn into file:line:column.
    """

    def __init__(self, message: str, key: tuple = ()):
        super().__init__(message)
        self.key = tuple(key)


class _TooDeep(FamilyError):
    """Family tables nested beyond MAX_NESTING (reported once, not once per level)."""


class _Invalid(Exception):
    """Raised by a parameter check; the framework turns it into a FamilyError.

    ``detail`` is added to the standard message ("must be ...; got ..."), or replaces
    it when ``whole`` is true; ``index`` is the position of the culprit inside a list.
    """

    def __init__(self, detail: str = "", whole: bool = False, index: int | None = None):
        super().__init__(detail)
        self.detail, self.whole, self.index = detail, whole, index


class _Required:
    def __repr__(self) -> str:
        return "required"


REQUIRED = _Required()


def _shown(value) -> str:
    """How a given value is quoted in an error message (TOML spelling where it differs)."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, dict):
        return "a table {" + ", ".join(f"{k} = {_shown(v)}" for k, v in value.items()) + "}"
    if isinstance(value, list):
        return "[" + ", ".join(_shown(v) for v in value) + "]"
    return repr(value)


def _suggestion(name: str, candidates) -> str:
    close = difflib.get_close_matches(str(name), list(candidates), n=1, cutoff=0.6)
    return f"; did you mean {close[0]!r}?" if close else ""


# ---------------------------------------------------------------- parameters
@dataclass(frozen=True)
class Param:
    """One parameter of a family type: its name, type and valid range in words, its
    meaning, its default (``REQUIRED`` if it must be given) and a check.

    ``check(value, context)`` returns the validated, normalised (JSON-serialisable)
    value or raises ``_Invalid``; ``context`` is the :class:`_Context` of the table
    being validated (used by parameters that are themselves family tables).
    """

    name: str
    type: str
    valid: str
    meaning: str
    check: Callable[[Any, "_Context"], Any]
    default: Any = REQUIRED

    @property
    def required(self) -> bool:
        return self.default is REQUIRED

    def describe(self) -> dict:
        """The row of the ``verifier families`` table for this parameter."""
        return {"name": self.name, "type": self.type, "valid": self.valid,
                "meaning": self.meaning, "required": self.required,
                "default": None if self.required else copy.deepcopy(self.default)}

    # ---- constructors for the usual kinds of parameter
    @classmethod
    def integer(cls, name: str, low: int, high: int | None, meaning: str,
                default: Any = REQUIRED) -> "Param":
        """An integer parameter with ``low <= value <= high`` (no upper bound if None)."""
        valid = f"{low} <= {name}" + (f" <= {high}" if high is not None else "")

        def check(value, context):
            if isinstance(value, bool) or not isinstance(value, int):
                raise _Invalid()
            if value < low or (high is not None and value > high):
                raise _Invalid()
            return value
        return cls(name, "an integer", valid, meaning, check, default)

    @classmethod
    def integer_range(cls, name: str, low: int, high: int, meaning: str,
                      default: Any = REQUIRED) -> "Param":
        """An integer n or a pair [lo, hi]; normalised to the list [lo, hi]."""
        valid = f"{low} <= lo <= hi <= {high}"

        def check(value, context):
            def whole(x):
                return not isinstance(x, bool) and isinstance(x, int)
            if whole(value):
                value = [value, value]
            if not (isinstance(value, list) and len(value) == 2 and all(map(whole, value))):
                raise _Invalid()
            lo, hi = value
            if not low <= lo <= hi <= high:
                raise _Invalid()
            return [lo, hi]
        return cls(name, "an integer n or a pair [lo, hi]", valid, meaning, check, default)

    @classmethod
    def number(cls, name: str, low: float, high: float, meaning: str, *,
               low_open: bool = False, default: Any = REQUIRED) -> "Param":
        """A real number (integer or float in the file) with ``low <(=) value <= high``."""
        valid = f"{low} {'<' if low_open else '<='} {name} <= {high}"

        def check(value, context):
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise _Invalid()
            if value != value or value > high or value < low or (low_open and value == low):
                raise _Invalid()
            return float(value)
        return cls(name, "a number", valid, meaning, check, default)

    @classmethod
    def choice(cls, name: str, options: tuple[str, ...], meaning: str,
               default: Any = REQUIRED) -> "Param":
        """One of a few strings."""
        listed = ", ".join(repr(o) for o in options)

        def check(value, context):
            if value not in options or not isinstance(value, str):
                raise _Invalid(_suggestion(value, options).lstrip("; ") if
                               isinstance(value, str) else "")
            return value
        return cls(name, "one of " + listed, "", meaning, check, default)

    @classmethod
    def text(cls, name: str, meaning: str, default: Any = REQUIRED) -> "Param":
        """A non-empty string."""
        def check(value, context):
            if not isinstance(value, str) or not value:
                raise _Invalid()
            return value
        return cls(name, "a non-empty string", "", meaning, check, default)

    @classmethod
    def family(cls, name: str, meaning: str) -> "Param":
        """Another family, given as an inline table; normalised to its canonical spec
        (the built family is in ``context.built[name]`` for the builder)."""
        def check(value, context):
            return context.make(value, name).spec()
        return cls(name, "a family table", "e.g. { family = \"catalog\" }", meaning, check)


# ---------------------------------------------------------------- family types
@dataclass(frozen=True)
class FamilyType:
    """A registry entry: what ``verifier families`` lists and how a family is built.

    ``build(params, context)`` receives the validated parameters (defaults filled;
    family-valued parameters as canonical specs, the built :class:`Family` objects in
    ``context.built``) and returns the :class:`Family`.  Cross-parameter checks raise
    ``context.error(...)``.
    """

    name: str
    description: str
    params: tuple[Param, ...]
    build: Callable[[dict, "_Context"], "Family"]
    reference: str = ""

    def describe(self) -> dict:
        """Name, description, reference and the parameter table, as plain data."""
        return {"name": self.name, "description": self.description,
                "reference": self.reference,
                "parameters": [p.describe() for p in self.params]}


@dataclass
class _Context:
    """What a builder may use while validating one table."""

    registry: dict
    family: str
    base: str | None
    key: tuple = ()
    built: dict = field(default_factory=dict)
    spec: dict = field(default_factory=dict)     # the table as given (hidden keys included)

    def make(self, spec, parameter: str) -> "Family":
        """Build a nested family given as the value of ``parameter``."""
        try:
            inner = build_family(self.registry, spec, self.base, self.key + (parameter,))
        except _TooDeep:
            raise
        except FamilyError as error:
            raise FamilyError(f"family {self.family!r}, parameter {parameter!r}: {error}",
                              error.key) from None
        self.built[parameter] = inner
        return inner

    def error(self, parameter: str | None, message: str) -> FamilyError:
        """A FamilyError about ``parameter`` (or the whole table if None)."""
        where = f"family {self.family!r}" + (f", parameter {parameter!r}" if parameter else "")
        return FamilyError(f"{where}: {message}",
                           self.key + ((parameter,) if parameter else ()))


def build_family(registry: dict, spec, base: str | None = None, key: tuple = ()) -> "Family":
    """Validate a family table against ``registry`` and build the family.

    Definition: looks up ``spec["family"]`` in the registry, rejects keys that are not
    parameters (``family``, ``bind`` and ``_base`` are not), checks each given value,
    fills in defaults, and hands the result to the entry's builder.

    Parameters: registry -- name -> FamilyType; spec -- the table (a dict); base -- the
    folder relative paths are resolved against (overridden by the table's ``_base``);
    key -- where this table sits inside the top-level table (for error locations).
    Returns: a :class:`Family`.  Raises: :class:`FamilyError`.

    >>> from verifier.families import FAMILIES
    >>> build_family(FAMILIES, {"family": "graphs", "max_vertices": 2}).params
    {'max_vertices': 2, 'min_vertices': 1, 'as': '1-dimensional'}

    Notes: ``make_family`` is this function with the package's registry.
    Reference: SPEC §3 (claim files) and §5 (families).
    """
    if not isinstance(spec, dict):
        raise FamilyError(f"a family is given as a table such as {{ family = \"catalog\" }}, "
                          f"got {_shown(spec)}", key)
    if len(key) > MAX_NESTING:
        raise _TooDeep(f"family tables are nested more than {MAX_NESTING} deep (at "
                       f"{'.'.join(map(str, key[:3]))}...)", key[:1])
    if "family" not in spec:
        raise FamilyError("the table has no 'family' key; known families: "
                          + ", ".join(registry), key)
    name = spec["family"]
    if not isinstance(name, str) or name not in registry:
        hint = _suggestion(name, registry) if isinstance(name, str) else ""
        if not hint:
            hint = "; known families: " + ", ".join(registry)
        raise FamilyError(f"unknown family {_shown(name)}{hint}", key + ("family",))
    kind: FamilyType = registry[name]
    if "_base" in spec:
        base = spec["_base"]
        if not isinstance(base, str):
            raise FamilyError(f"family {name!r}: '_base' must be a folder path, got "
                              f"{_shown(base)}", key + ("_base",))
    context = _Context(registry, name, base, key, spec=spec)
    names = [p.name for p in kind.params]
    for given in spec:
        if given not in NOT_PARAMETERS and given not in names:
            listed = ", ".join(names) if names else "none"
            raise FamilyError(f"family {name!r}: unknown parameter {given!r}"
                              f"{_suggestion(given, names)} (parameters: {listed})",
                              key + (given,))
    params = {}
    for p in kind.params:
        if p.name not in spec:
            if p.required:
                raise FamilyError(
                    f"family {name!r}: missing required parameter {p.name!r} ({p.type}"
                    f"{', ' + p.valid if p.valid else ''}: {p.meaning})", key)
            params[p.name] = copy.deepcopy(p.default)
            continue
        value = spec[p.name]
        try:
            params[p.name] = p.check(value, context)
        except _Invalid as bad:
            where = key + (p.name,) + (() if bad.index is None else (bad.index,))
            if bad.whole:
                raise FamilyError(f"family {name!r}, parameter {p.name!r}: {bad.detail}",
                                  where) from None
            valid = f", {p.valid}" if p.valid else ""
            detail = f" ({bad.detail})" if bad.detail else ""
            raise FamilyError(f"family {name!r}: parameter {p.name!r} must be {p.type}"
                              f"{valid}; got {_shown(value)}{detail}", where) from None
    return kind.build(params, context)


def describe_types(registry: dict) -> list[dict]:
    """The registry as plain data: one dict per family type.

    Definition: ``[kind.describe() for kind in registry.values()]``, each with
    ``name, description, reference, parameters``.

    >>> from verifier.families import FAMILIES
    >>> describe_types(FAMILIES)[1]["parameters"][2]["default"]
    '1-dimensional'

    Reference: SPEC §5.
    """
    return [kind.describe() for kind in registry.values()]


# ---------------------------------------------------------------- families
class Family:
    """A validated family: an immutable, lazily enumerated collection of complexes.

    Attributes: ``name`` (the registry name), ``params`` (validated, defaults filled,
    JSON-serialisable; nested families appear as their canonical specs).

    Subclasses implement :meth:`size`, :meth:`case_ids` and :meth:`get`, and may
    override :meth:`f_bound`.
    """

    def __init__(self, name: str, params: dict, base: str | None = None):
        self.name = name
        self.params = params
        self._base = base

    # ---- the interface the runner uses
    def spec(self) -> dict:
        """A canonical JSON-serialisable table that recreates this family via make_family
        (parameters left unset, whose value is None, are omitted, as in TOML)."""
        table = {"family": self.name}
        table.update(copy.deepcopy({k: v for k, v in self.params.items() if v is not None}))
        if self._uses_base() and self._base is not None:
            table["_base"] = self._base
        return table

    def size(self) -> int | None:
        """The number of cases, or None when it is not known without enumerating."""
        raise NotImplementedError

    def case_ids(self) -> Iterator[str]:
        """The stable ids of the cases, lazily, in the family's deterministic order."""
        raise NotImplementedError

    def get(self, case_id: str) -> Complex:
        """The case with this id, built deterministically from the id alone."""
        raise NotImplementedError

    def __iter__(self) -> Iterator[tuple[str, Complex]]:
        for case_id in self.case_ids():
            yield case_id, self.get(case_id)

    # ---- sharded planning (exhaustive families too large to list in one process)
    def shards(self) -> list[str] | None:
        """The names of this family's shards, in a fixed order, or None when the family
        is planned case by case (the default).

        A sharded family splits its cases into deterministic, disjoint shards whose
        union is the family; each shard is generated on its own (in any process, from
        the family's spec and the shard name alone) by :meth:`shard_cases`.  The
        runner then never lists all case ids in one place: every worker generates and
        evaluates its own shard.  Shard names are short, stable strings."""
        return None

    def shard_cases(self, shard: str) -> Iterator[tuple[str, Complex]]:
        """The cases of one shard, ``(case_id, Complex)``, in a fixed order; each id is
        one that :meth:`get` rebuilds on its own.  Raises FamilyError for a name that is
        not one of :meth:`shards`."""
        raise self._foreign(shard, "this family is not planned in shards")

    # ---- helpers for derived families and guards
    def f_bound(self) -> tuple[int, ...] | None:
        """An f-vector that bounds every case's f-vector entrywise, or None if unknown."""
        return None

    def _uses_base(self) -> bool:
        return False

    def _foreign(self, case_id, what: str = "") -> FamilyError:
        note = f" ({what})" if what else ""
        return FamilyError(f"case id {case_id!r} does not belong to family {self.name!r}"
                           f"{note}")

    def __repr__(self) -> str:
        inner = ", ".join(f"{k}={v!r}" for k, v in self.params.items())
        return f"<family {self.name}: {inner}>"

    def __eq__(self, other) -> bool:
        return isinstance(other, Family) and self.spec() == other.spec()

    def __hash__(self) -> int:
        return hash(json.dumps(self.spec(), sort_keys=True))


def case_random(family: str, seed: int, number: int) -> random.Random:
    """The random generator of case ``number`` of a seeded family.

    Definition: ``random.Random(s)`` with ``s`` the first 128 bits of
    SHA-256(``"<family>/<seed>/<number>"``), so that one case is reproduced without
    generating the others, on any machine, and different families with the same
    seed draw independent streams.

    Parameters: family -- the family name; seed -- the family's seed; number -- the
    case number.  Returns: a fresh ``random.Random``.

    >>> case_random("random-flag", 11, 3).random() == case_random("random-flag", 11, 3).random()
    True

    Notes: ``random.Random`` seeded with an integer is stable across Python versions
    and platforms (Mersenne Twister, documented reproducibility of ``seed``).
    Reference: Python library documentation, ``random`` -- "Notes on Reproducibility".
    """
    digest = hashlib.sha256(f"{family}/{seed}/{number}".encode()).digest()
    return random.Random(int.from_bytes(digest[:16], "big"))


class SeededFamily(Family):
    """A family of ``count`` random cases with ids ``"<name>/s<seed>/<number>"``;
    subclasses implement ``sample(rng, number)``."""

    def size(self) -> int:
        return self.params["count"]

    def case_ids(self) -> Iterator[str]:
        prefix = f"{self.name}/s{self.params['seed']}/"
        return (prefix + str(i) for i in range(self.params["count"]))

    def number_of(self, case_id) -> int:
        """The case number encoded in an id of this family (FamilyError if foreign)."""
        prefix = f"{self.name}/s{self.params['seed']}/"
        if not isinstance(case_id, str) or not case_id.startswith(prefix):
            raise self._foreign(case_id, f"its ids look like '{prefix}0'")
        tail = case_id[len(prefix):]
        if not tail.isdigit() or (tail != "0" and tail.startswith("0")):
            raise self._foreign(case_id, f"its ids look like '{prefix}0'")
        number = int(tail)
        if number >= self.params["count"]:
            raise self._foreign(case_id, f"it has cases 0..{self.params['count'] - 1}")
        return number

    def get(self, case_id: str) -> Complex:
        number = self.number_of(case_id)
        return self.sample(case_random(self.name, self.params["seed"], number), number)

    def sample(self, rng: random.Random, number: int) -> Complex:
        raise NotImplementedError


# ---------------------------------------------------------------- shared builders
MASK_CLIQUES_MAX_VERTICES = 62   # graphs up to this order: cliques by vertex bitmasks


def graph_complex(n: int, edges, flag: bool, where: str) -> Complex:
    """The graph on vertices ``0..n-1`` with the given edges, as a complex.

    Definition: with ``flag=False`` the 1-dimensional complex (vertices and edges);
    with ``flag=True`` the flag (clique) complex, whose simplices are the vertex sets
    of the complete subgraphs.

    Parameters: n -- number of vertices; edges -- pairs of vertices in ``range(n)``;
    flag -- which complex; where -- the case, named in errors.
    Returns: a Complex with vertex labels ``0..n-1``.  Raises FamilyError when the
    flag complex would have more than MAX_SIMPLICES simplices.

    >>> graph_complex(3, [(0, 1), (1, 2), (0, 2)], flag=True, where="example").f_vector
    (3, 3, 1)

    Notes: for graphs on at most ``MASK_CLIQUES_MAX_VERTICES`` vertices whose edges all
    join two distinct vertices of ``range(n)``, the cliques are listed by
    :func:`flag_cliques` (vertex bitmasks, no graph object); otherwise by networkx
    ``enumerate_all_cliques`` (:func:`_flag_cliques_networkx`, also the reference the
    tests compare with).  Either way the cliques are counted as they come, so a huge
    clique complex is refused before it is built.
    Reference: flag complexes -- M. Kahle, "Topology of random clique complexes",
    Discrete Math. 309 (2009) 1658-1671.
    """
    if flag and n <= MASK_CLIQUES_MAX_VERTICES:
        above = _upper_neighbours(n, edges)
        if above is not None:
            cliques, masks = flag_cliques(above, where)
            return Complex._with_vertex_masks(tuple(range(n)), tuple(cliques), masks)
    pairs = sorted({(min(u, v), max(u, v)) for u, v in edges})
    if not flag:
        simplices = [(v,) for v in range(n)] + pairs
        return Complex(tuple(range(n)), tuple(simplices))
    return Complex(tuple(range(n)), tuple(_flag_cliques_networkx(n, pairs, where)))


def flag_complex_of_masks(above: list[int], where: str) -> Complex:
    """The flag complex of the graph on ``0..n-1`` given by upper neighbourhoods.

    Definition: ``above[u]`` is the bitmask (sum of 2^v) of the neighbours v > u of
    vertex u, n = len(above) <= ``MASK_CLIQUES_MAX_VERTICES``; the result is
    ``graph_complex(n, edges, True, where)`` for the same graph, built without an edge
    list (for generators that hold graphs as bitmasks).

    >>> flag_complex_of_masks([0b110, 0b100, 0], "example").f_vector   # a triangle
    (3, 3, 1)

    Raises FamilyError (naming ``where``) for a mask with a bit outside v > u or beyond
    the limit of vertices, and, like :func:`graph_complex`, past MAX_SIMPLICES.
    """
    n = len(above)
    if n > MASK_CLIQUES_MAX_VERTICES:
        raise FamilyError(f"{where}: a graph given by bitmasks may have at most "
                          f"{MASK_CLIQUES_MAX_VERTICES} vertices; it has {n}")
    for u, mask in enumerate(above):
        if type(mask) is not int or mask < 0 or mask >> n or mask & ((2 << u) - 1):
            raise FamilyError(f"{where}: the neighbours above vertex {u} must be a bitmask "
                              f"of vertices {u + 1}..{n - 1}; got {mask!r}")
    cliques, masks = flag_cliques(list(above), where)
    return Complex._with_vertex_masks(tuple(range(n)), tuple(cliques), masks)


def _upper_neighbours(n: int, edges) -> list[int] | None:
    """For each vertex u of ``range(n)``, the bitmask of its neighbours v > u; None when
    an edge is a loop or leaves ``range(n)`` (the general path then decides)."""
    above = [0] * n
    for u, v in edges:
        if u > v:
            u, v = v, u
        if not (type(u) is int and type(v) is int and 0 <= u < v < n):
            return None
        above[u] |= 1 << v
    return above


def flag_cliques(above: list[int], where: str = "") -> tuple[list[tuple[int, ...]], list[int]]:
    """The cliques of a graph given by bitmasks, ordered by (size, lexicographic).

    Definition: ``above[u]`` is the set of neighbours v > u of vertex u, as the bitmask
    sum of 2^v; a clique is a non-empty vertex set any two of whose vertices are
    adjacent.  Returns the cliques as sorted tuples and, in the same order, their
    vertex bitmasks.

    >>> flag_cliques([0b110, 0b100, 0])[0]     # the triangle on 0, 1, 2
    [(0,), (1,), (2,), (0, 1), (0, 2), (1, 2), (0, 1, 2)]

    Notes: level by level: a (k+1)-clique is a k-clique C extended by a vertex w of
    the common upper neighbourhood of C (the bitwise AND of ``above`` over C, whose
    vertices all exceed max C).  Extending the k-cliques in lexicographic order by w
    ascending lists the (k+1)-cliques in lexicographic order, so no sorting is needed;
    the work is proportional to the number of cliques.  Raises FamilyError naming
    ``where`` once there are more than MAX_SIMPLICES cliques.
    Reference: growing cliques level by level inside the common neighbourhood is the
    method of Y. Zhang, F. N. Abu-Khzam, N. E. Baldwin, E. J. Chesler, M. A. Langston and
    N. F. Samatova, "Genome-scale computational approaches to memory-intensive
    applications in systems biology", Proc. ACM/IEEE SC 2005, doi:10.1109/SC.2005.29
    (the method networkx's enumerate_all_cliques adapts, per its documentation).
    """
    n = len(above)
    cliques: list[tuple[int, ...]] = [(v,) for v in range(n)]
    masks = [1 << v for v in range(n)]
    level = [((v,), 1 << v, above[v]) for v in range(n) if above[v]]
    while level:
        following = []
        for clique, mask, common in level:
            while common:
                low = common & -common
                w = low.bit_length() - 1
                common ^= low
                grown = clique + (w,)
                cliques.append(grown)
                masks.append(mask | low)
                rest = common & above[w]
                if rest:
                    following.append((grown, mask | low, rest))
            if len(cliques) > MAX_SIMPLICES:     # at most n added since the last look
                raise _too_many_cliques(where)
        level = following
    if len(cliques) > MAX_SIMPLICES:
        raise _too_many_cliques(where)
    return cliques, masks


def _too_many_cliques(where: str) -> FamilyError:
    return FamilyError(f"{where}: the flag complex has more than {MAX_SIMPLICES} "
                       "simplices (the limit for one case); ask for fewer vertices or "
                       "sparser graphs")


def _flag_cliques_networkx(n: int, pairs: list[tuple[int, int]], where: str) -> list[tuple]:
    """The cliques of the graph on ``range(n)`` with the given edges, by networkx
    ``enumerate_all_cliques``, sorted by (size, lexicographic): the general path of
    :func:`graph_complex` and the reference its bitmask path is tested against."""
    import networkx as nx

    graph = nx.Graph()
    graph.add_nodes_from(range(n))
    graph.add_edges_from(pairs)
    cliques = []
    for clique in nx.enumerate_all_cliques(graph):
        cliques.append(tuple(sorted(clique)))
        if len(cliques) > MAX_SIMPLICES:
            raise _too_many_cliques(where)
    cliques.sort(key=lambda s: (len(s), s))
    return cliques

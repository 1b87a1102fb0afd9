"""The family ``graphs``: every graph on min_vertices..max_vertices vertices up to
isomorphism (max_vertices <= 11), as a 1-dimensional complex or as its flag complex.

Sources.  Graphs on at most 7 vertices come from the graph atlas of R. C. Read and
R. J. Wilson, "An Atlas of Graphs" (Oxford, 1998), as shipped by networkx (the graph
without vertices is left out); their ids are ``graphs/G<number in the atlas>``.  Graphs
on 8 to 11 vertices come from our own canonical augmentation
(:mod:`.graph_generation`; B. D. McKay, J. Algorithms 26 (1998) 306-324); their ids
spell the canonical form: ``graphs/<n>:<code in hexadecimal>``, the code being the
upper triangle of the canonical adjacency matrix read column by column (bit
``j (j - 1) / 2 + i`` for the edge {i, j}, i < j), written with exactly
ceil(n (n - 1) / 8) lowercase hexadecimal digits.  For example ``graphs/8:0000000``
is the graph with 8 vertices and no edge.  An id alone rebuilds its graph; an id whose
code is not the canonical code of its graph is refused.

Sizes (exact, from the published counts): OEIS A000088 graphs and OEIS A001349
connected graphs on n unlabeled nodes; the tests check that the generator reproduces
them.

Shards.  Up to 7 vertices the family is planned case by case (``shards()`` is None).
From 8 vertices on it is planned in shards, named without generating anything:
``<n>/all`` for the atlas graphs on n <= 7 vertices, and for n >= 8
``<n>/p<first>-<last>``, the children of the parents number first..last of the list of
graphs on n - 1 vertices (the block sizes below give about 20,000 graphs a shard on
average).  With ``connected = true`` the same shards yield only the connected graphs.

``connected = false`` is not recorded in ``params`` (nor in ``spec()``), so that tables
written before the parameter existed keep their canonical spec.
"""

from __future__ import annotations

import re
from functools import lru_cache
from math import comb

from ..complex import Complex
from .family import Family, FamilyType, Param, _Invalid, graph_complex
from .graph_generation import (A000088, A001349, MAX_GENERATED_VERTICES, canonical_code,
                               children_of, code_edges, is_connected)

__all__ = ["GRAPHS", "ATLAS_COUNTS", "MAX_ATLAS_VERTICES", "PARENT_BLOCKS", "graph_id",
           "Graphs"]

MAX_ATLAS_VERTICES = 7
# graphs per number of vertices in the atlas, n = 0..7 (OEIS A000088); the atlas lists
# graphs by number of vertices, so the graphs on n vertices are a range of atlas numbers
# and planning needs no atlas (tests/test_families.py checks these ranges against it)
ATLAS_COUNTS = A000088[:MAX_ATLAS_VERTICES + 1]
# parents per shard for n vertices: A000088(n) / A000088(n - 1) is about 11.8, 22.2,
# 43.7, 84.9 children a parent for n = 8..11, so about 12,000 to 22,000 graphs a shard
PARENT_BLOCKS = {8: A000088[7], 9: 1000, 10: 500, 11: 250}

_GENERATED_ID = re.compile(r"graphs/([1-9][0-9]?):([0-9a-f]+)")
_SHARD = re.compile(r"([1-9][0-9]?)/(all|p([0-9]+)-([0-9]+))")


def _digits(n: int) -> int:
    """Hexadecimal digits of the code of a graph on n vertices."""
    return -(-comb(n, 2) // 4)


def graph_id(n: int, code: int) -> str:
    """The case id of a generated graph (n >= 8) from its canonical code.

    Definition: ``"graphs/<n>:"`` followed by the code in lowercase hexadecimal, padded
    with zeros to ceil(n (n - 1) / 8) digits.

    >>> graph_id(8, 0), graph_id(9, 2 ** 36 - 1)
    ('graphs/8:0000000', 'graphs/9:fffffffff')

    Reference: this project's encoding (see the module docstring).
    """
    return f"graphs/{n}:{code:0{_digits(n)}x}"


@lru_cache(maxsize=1)
def _atlas():
    import networkx as nx

    return tuple(nx.graph_atlas_g())


@lru_cache(maxsize=None)
def _connected_atlas_numbers() -> frozenset:
    import networkx as nx

    return frozenset(i for i, g in enumerate(_atlas())
                     if g.number_of_nodes() and nx.is_connected(g))


def _atlas_numbers(n: int) -> range:
    """The atlas numbers of the graphs on n <= 7 vertices."""
    return range(sum(ATLAS_COUNTS[:n]), sum(ATLAS_COUNTS[:n + 1]))


def _blocks(n: int) -> list[tuple[int, int]]:
    """The parent blocks (first, last) of the shards on n >= 8 vertices."""
    parents, block = A000088[n - 1], PARENT_BLOCKS[n]
    return [(first, min(first + block, parents) - 1) for first in range(0, parents, block)]


def _block_name(n: int, first: int, last: int) -> str:
    width = len(str(A000088[n - 1] - 1))
    return f"{n}/p{first:0{width}d}-{last:0{width}d}"


class Graphs(Family):
    """Every graph on min_vertices..max_vertices vertices, optionally only the connected
    ones, as a 1-dimensional complex or its flag complex."""

    @property
    def _connected(self) -> bool:
        return self.params.get("connected", False)

    def _vertex_counts(self) -> range:
        return range(self.params["min_vertices"], self.params["max_vertices"] + 1)

    def _flag(self) -> bool:
        return self.params["as"] == "flag"

    def size(self) -> int:
        counts = A001349 if self._connected else A000088
        return sum(counts[n] for n in self._vertex_counts())

    # ---- planning
    def shards(self) -> list[str] | None:
        if self.params["max_vertices"] <= MAX_ATLAS_VERTICES:
            return None
        names = []
        for n in self._vertex_counts():
            if n <= MAX_ATLAS_VERTICES:
                names.append(f"{n}/all")
            else:
                names.extend(_block_name(n, first, last) for first, last in _blocks(n))
        return names

    def _shard_of(self, shard) -> tuple[int, int, int]:
        """(n, first, last) of a shard name; (n, -1, -1) for an atlas shard."""
        match = _SHARD.fullmatch(shard) if isinstance(shard, str) else None
        if self.params["max_vertices"] <= MAX_ATLAS_VERTICES:
            raise self._foreign(shard, "this family is planned case by case, not in shards "
                                "(max_vertices <= 7)")
        low, high = self.params["min_vertices"], self.params["max_vertices"]
        form = "its shards are '<n>/all' for n <= 7 and '<n>/p<first>-<last>' for n >= 8"
        if match is None or not low <= int(match[1]) <= high:
            raise self._foreign(shard, f"{form}, with {low} <= n <= {high}")
        n = int(match[1])
        if n <= MAX_ATLAS_VERTICES:
            if match[2] != "all":
                raise self._foreign(shard, f"{form}; graphs on {n} vertices are the shard "
                                    f"'{n}/all'")
            return n, -1, -1
        if match[2] == "all":
            raise self._foreign(shard, f"{form}; graphs on {n} vertices are cut into blocks "
                                f"of {PARENT_BLOCKS[n]} parents")
        first, last = int(match[3]), int(match[4])
        block = PARENT_BLOCKS[n]
        if (first % block or first >= A000088[n - 1]
                or last != min(first + block, A000088[n - 1]) - 1
                or shard != _block_name(n, first, last)):
            raise self._foreign(shard, f"{form}; on {n} vertices a block starts at a "
                                f"multiple of {block} below {A000088[n - 1]}, e.g. "
                                f"{_block_name(n, *_blocks(n)[0])!r}")
        return n, first, last

    def shard_cases(self, shard):
        n, first, last = self._shard_of(shard)
        flag = self._flag()
        if first < 0:
            for i in self._atlas_numbers_on(n):
                case_id = f"graphs/G{i}"
                graph = _atlas()[i]
                yield case_id, graph_complex(n, graph.edges(), flag, case_id)
            return
        for code in children_of(n, first, last + 1, connected=self._connected):
            case_id = graph_id(n, code)
            yield case_id, graph_complex(n, code_edges(n, code), flag, case_id)

    def _atlas_numbers_on(self, n: int):
        numbers = _atlas_numbers(n)
        if not self._connected:
            return numbers
        keep = _connected_atlas_numbers()
        return [i for i in numbers if i in keep]

    def case_ids(self):
        shards = self.shards()
        if shards is None:
            for n in self._vertex_counts():
                yield from (f"graphs/G{i}" for i in self._atlas_numbers_on(n))
            return
        for shard in shards:
            n, first, last = self._shard_of(shard)
            if first < 0:
                yield from (f"graphs/G{i}" for i in self._atlas_numbers_on(n))
            else:
                yield from (graph_id(n, code) for code in
                            children_of(n, first, last + 1, connected=self._connected))

    def __iter__(self):
        shards = self.shards()
        if shards is None:
            yield from super().__iter__()
            return
        for shard in shards:
            yield from self.shard_cases(shard)

    # ---- one case from its id
    def get(self, case_id) -> Complex:
        low, high = self.params["min_vertices"], self.params["max_vertices"]
        forms = "its ids are 'graphs/G<number in the atlas>' for graphs on at most 7 " \
                "vertices and 'graphs/<n>:<canonical code in hexadecimal>' for 8 to 11"
        if not isinstance(case_id, str):
            raise self._foreign(case_id, forms)
        if case_id.startswith("graphs/G"):
            tail = case_id[len("graphs/G"):]
            if not tail.isdigit() or int(tail) >= len(_atlas()):
                raise self._foreign(case_id, forms)
            graph = _atlas()[int(tail)]
            n = graph.number_of_nodes()
            if not low <= n <= high:
                raise self._foreign(case_id, f"graph G{tail} has {n} vertices")
            if self._connected and int(tail) not in _connected_atlas_numbers():
                raise self._foreign(case_id, f"graph G{tail} is not connected")
            return graph_complex(n, graph.edges(), self._flag(), case_id)
        match = _GENERATED_ID.fullmatch(case_id)
        if match is None:
            raise self._foreign(case_id, forms)
        n, text = int(match[1]), match[2]
        if not MAX_ATLAS_VERTICES < n <= MAX_GENERATED_VERTICES:
            raise self._foreign(case_id, f"{forms}; {n} vertices is outside 8..11")
        if not low <= n <= high:
            raise self._foreign(case_id, f"it has graphs on {low} to {high} vertices, this "
                                f"one has {n}")
        if len(text) != _digits(n):
            raise self._foreign(case_id, f"the code of a graph on {n} vertices has "
                                f"{_digits(n)} hexadecimal digits, this one {len(text)}")
        code = int(text, 16)
        if code >> comb(n, 2):
            raise self._foreign(case_id, f"the code has bits beyond the {comb(n, 2)} vertex "
                                f"pairs of {n} vertices")
        if canonical_code(n, code) != code:
            raise self._foreign(case_id, "not the canonical form of its graph; the canonical "
                                f"id is {graph_id(n, canonical_code(n, code))!r}")
        if self._connected and not is_connected(n, code):
            raise self._foreign(case_id, "the graph is not connected")
        return graph_complex(n, code_edges(n, code), self._flag(), case_id)

    def f_bound(self):
        n = self.params["max_vertices"]
        top = n if self._flag() else min(n, 2)
        return tuple(comb(n, i + 1) for i in range(top))


def _boolean(name: str, meaning: str, default: bool) -> Param:
    """A true/false parameter."""
    def check(value, context):
        if not isinstance(value, bool):
            raise _Invalid()
        return value
    return Param(name, "a boolean", "true or false", meaning, check, default)


def _build_graphs(params, context):
    if params["min_vertices"] > params["max_vertices"]:
        raise context.error("min_vertices", f"must be at most max_vertices = "
                            f"{params['max_vertices']}; got {params['min_vertices']}")
    if not params["connected"]:
        del params["connected"]          # the spec of a table without it stays the same
    return Graphs("graphs", params)


GRAPHS = FamilyType(
    name="graphs",
    description="every graph on at most n vertices (n <= 11) up to isomorphism, as a "
            "1-dimensional complex or as its flag complex; the graph atlas up to 7 "
            "vertices, our canonical augmentation from 8 on, in shards",
    params=(
        Param.integer("max_vertices", 1, MAX_GENERATED_VERTICES,
                      "largest number of vertices: up to 7 the graph atlas (1,252 graphs, "
                      "planned case by case); 8 vertices 12,346 graphs, 9: 274,668 (about "
                      "7 s to generate), 10: 12,005,168 (about 3.5 min on one core over "
                      "550 shards); "
                      "11: 1,018,997,864 graphs in 48,021 shards, only sensible on a "
                      "cluster (each worker first generates the 12,005,168 graphs on 10 "
                      "vertices)", default=7),
        Param.integer("min_vertices", 1, MAX_GENERATED_VERTICES,
                      "smallest number of vertices", default=1),
        Param.choice("as", ("1-dimensional", "flag"),
                     "the graph itself, or its flag (clique) complex",
                     default="1-dimensional"),
        _boolean("connected", "only the connected graphs when true", default=False),
    ),
    build=_build_graphs,
    reference="R. C. Read and R. J. Wilson, An Atlas of Graphs, Oxford 1998 (up to 7 "
              "vertices); B. D. McKay, Isomorph-free exhaustive generation, J. Algorithms "
              "26 (1998) 306-324 (8 to 11 vertices); counts per number of vertices: OEIS "
              "A000088, connected: OEIS A001349",
)

"""Complexes read from data files, with every size checked before anything is built.

A facet file may describe far more than it weighs: one line of 22 vertices is a simplex
with 2^22 - 1 = 4,194,303 faces.  :func:`complex_from_bytes` therefore parses the facets,
predicts the number of simplices of their closure (the bound ``sum over facets of
2^|f| - 1``; when the bound is over the cap, the exact count, found by enumerating faces
and stopping as soon as the cap is passed) and refuses a complex over the cap before
building it.  Graph files (GraphML, edge lists) are parsed by networkx from the bytes
already read; a file that does not parse is an error, never an empty or one-vertex
complex, and a flag complex is counted clique by clique against the same cap.

Formats (by suffix, case-insensitive):

========================  ===================================================
``.json``                 a list of facets, or ``{"facets": [...]}``
``.graphml``              a graph (networkx ``read_graphml``)
``.edgelist``             a graph, one edge "u v" per line (``read_edgelist``)
anything else             text: one facet per line, labels separated by spaces
                          or commas, ``#`` starts a comment
========================  ===================================================

Labels that look like integers become integers.

>>> complex_from_bytes(b"1 2 3\\n3 4\\n", "two.txt").f_vector
(4, 4, 1)
>>> complex_from_bytes(b" ".join(str(i).encode() for i in range(22)), "big.txt")
Traceback (most recent call last):
...
verifier.families.datafiles.DataFileError: big.txt:1: a facet of 22 vertices has 4,194,303 faces, more than the 1,000,000 simplices allowed for one complex
"""

from __future__ import annotations

import io
import re
from itertools import combinations

from ..complex import Complex, ComplexError
from ..userfiles import UnreadableFile, parse_json
from .family import MAX_SIMPLICES

__all__ = ["DataFileError", "complex_from_bytes", "count_simplices", "MAX_DATA_BYTES",
           "FACET_SUFFIXES", "GRAPH_SUFFIXES"]

FACET_SUFFIXES = (".txt", ".json")
GRAPH_SUFFIXES = (".graphml", ".edgelist")
MAX_DATA_BYTES = 64 * 1024 * 1024     # bytes of one data file
COUNTING_WORK = 40_000_000            # face visits spent on an exact count at most

_INTEGER = re.compile(r"-?[0-9]{1,30}")


class DataFileError(ValueError):
    """A data file cannot become a complex: the message names the file and the fault."""


def _label(token: str):
    return int(token) if _INTEGER.fullmatch(token) else token


def count_simplices(facets: list[tuple], cap: int, where) -> int:
    """The number of simplices of the closure of ``facets``, refused above ``cap``.

    ``facets`` are tuples of distinct hashable labels; ``where(i)`` names facet ``i`` in a
    message.  Returns an upper bound (``sum 2^|f| - 1``) when that is within the cap, else
    the exact count; raises DataFileError when the complex would have more than ``cap``
    simplices, or when counting would take more than ``COUNTING_WORK`` face visits.

    >>> count_simplices([(1, 2), (2, 3)], 10, str)
    6
    >>> count_simplices([(1, 2), (2, 3)], 4, str)
    Traceback (most recent call last):
    ...
    verifier.families.datafiles.DataFileError: the facets span more than 4 simplices (the limit for one complex)
    """
    bound = 0
    for i, facet in enumerate(facets):
        size = len(facet)
        if size >= 64 or (1 << size) - 1 > cap:
            raise DataFileError(f"{where(i)}: a facet of {size} vertices has "
                                f"{(1 << size) - 1:,} faces, more than the {cap:,} "
                                "simplices allowed for one complex")
        bound += (1 << size) - 1
    if bound <= cap:
        return bound
    seen: set = set()
    work = 0
    for facet in sorted((tuple(sorted(map(repr, f))) for f in facets), key=len, reverse=True):
        if facet in seen:
            continue
        work += (1 << len(facet)) - 1
        if work > COUNTING_WORK:
            raise DataFileError(f"the facets span up to {bound:,} simplices; counting them "
                                f"exactly is too costly, and at most {cap:,} are allowed "
                                "for one complex")
        for k in range(len(facet), 0, -1):
            seen.update(combinations(facet, k))
        if len(seen) > cap:
            raise DataFileError(f"the facets span more than {cap:,} simplices (the limit "
                                "for one complex)")
    return len(seen)


def _facets_of_text(text: str, name: str) -> tuple[list, list]:
    facets, lines = [], []
    for lineno, line in enumerate(text.splitlines(), start=1):
        body = line.split("#", 1)[0].replace(",", " ").strip()
        if not body:
            continue
        labels = [_label(t) for t in body.split()]
        if len(set(labels)) != len(labels):
            raise DataFileError(f"{name}:{lineno}: repeated vertex in {labels!r}")
        facets.append(tuple(labels))
        lines.append(f"{name}:{lineno}")
    return facets, lines


def _facets_of_json(text: str, name: str) -> tuple[list, list]:
    try:
        data = parse_json(text, name, "facet file")
    except UnreadableFile as error:
        raise DataFileError(str(error)) from None
    facets = data.get("facets") if isinstance(data, dict) else data
    if not isinstance(facets, list):
        raise DataFileError(f"{name}: expected a list of facets or {{\"facets\": [...]}}")
    for i, facet in enumerate(facets):
        if not isinstance(facet, list) or not all(
                isinstance(v, (int, str)) and not isinstance(v, bool) for v in facet):
            shown = repr(facet)
            raise DataFileError(f"{name}: facet {i} must be a list of integer or string "
                                f"labels, got {shown[:60] + ('...' if len(shown) > 60 else '')}")
        if len(set(facet)) != len(facet):
            raise DataFileError(f"{name}: facet {i}: repeated vertex in {facet!r}"[:200])
    return [tuple(f) for f in facets], [f"{name}: facet {i}" for i in range(len(facets))]


def _graph(data: bytes, name: str, suffix: str):
    import networkx as nx

    try:
        if suffix == ".graphml":
            graph = nx.read_graphml(io.BytesIO(data))
        else:
            graph = nx.read_edgelist(io.BytesIO(data), data=False)
    except Exception as error:  # noqa: BLE001 - third-party parsers raise many kinds
        detail = str(error).splitlines()[0][:120] if str(error) else type(error).__name__
        raise DataFileError(f"{name}: not a valid {suffix[1:]} graph ({detail})") from None
    if suffix == ".graphml" and graph.number_of_nodes() == 0:
        raise DataFileError(f"{name}: the GraphML file holds no node")
    names = {v: _label(v) if isinstance(v, str) else v for v in graph.nodes()}
    return nx.relabel_nodes(graph, names)


def _graph_complex(graph, flag: bool, name: str, cap: int) -> Complex:
    import networkx as nx

    if any(u == v for u, v in graph.edges()):
        raise DataFileError(f"{name}: the graph has a self-loop; simplicial complexes have "
                            "none")
    if not flag:
        count = graph.number_of_nodes() + nx.Graph(graph).number_of_edges()
        if count > cap:
            raise DataFileError(f"{name}: the graph has {count:,} vertices and edges, more "
                                f"than the {cap:,} simplices allowed for one complex")
        return Complex.from_facets([[v] for v in graph.nodes()]
                                   + [list(e) for e in graph.edges()])
    cliques = []
    for clique in nx.enumerate_all_cliques(nx.Graph(graph)):
        cliques.append(clique)
        if len(cliques) > cap:
            raise DataFileError(f"{name}: the flag complex of the graph has more than "
                                f"{cap:,} simplices (the limit for one complex)")
    return Complex.from_facets(cliques)


def complex_from_bytes(data: bytes, name: str, *, flag: bool = False,
                       cap: int = MAX_SIMPLICES) -> Complex:
    """The complex a data file describes (see the module docstring for the formats).

    Parameters: data -- the file's bytes (read with :func:`verifier.userfiles.read_bytes`);
    name -- the file's name, used for its suffix and in messages; flag -- graphs become
    flag complexes instead of 1-dimensional ones; cap -- the most simplices allowed.
    Raises DataFileError (names the file, and the line or facet where it can).
    """
    suffix = "." + name.rsplit(".", 1)[-1].lower() if "." in name else ""
    if suffix in GRAPH_SUFFIXES:
        K = _graph_complex(_graph(data, name, suffix), flag, name, cap)
    else:
        try:
            text = data.decode("utf-8")
        except UnicodeDecodeError as error:
            raise DataFileError(f"{name}: not UTF-8 text (byte {error.start + 1})") from None
        facets, places = (_facets_of_json if suffix == ".json" else _facets_of_text)(text, name)
        try:
            count_simplices(facets, cap, lambda i: places[i])
        except DataFileError as error:
            message = str(error)
            raise DataFileError(message if message.startswith(name) else f"{name}: {message}") \
                from None
        try:
            K = Complex.from_facets(facets)
        except ComplexError as error:
            raise DataFileError(f"{name}: {error}") from None
    if K.n_vertices == 0:
        raise DataFileError(f"{name}: the file holds no vertex")
    return K

"""Families of complexes given by name: catalog names, and files.

``catalog``
    Classic triangulations by name (:mod:`verifier.families.catalog`).  ``names``
    lists them; omitted, it means every *recorded* name (the entries of the
    reference data file, which come with published invariants), filled in at
    validation so that the family's spec stays the same when the catalog grows.
    Case ids: ``catalog/<name>``.

``file``
    Complexes read from files: one file, or every file of a folder (not its
    sub-folders) with a known suffix, in sorted order.

    ========================  ===================================================
    ``.txt`` (any other)      one facet per line (see ``Complex.from_file``)
    ``.json``                 a list of facets, or ``{"facets": [...]}``
    ``.graphml``              a graph (networkx ``read_graphml``)
    ``.edgelist``             a graph, one edge "u v" per line (networkx
                              ``read_edgelist``)
    ========================  ===================================================

    Graphs become 1-dimensional complexes or flag complexes (parameter ``as``);
    vertex names that look like integers become integers.  A relative ``path`` is
    resolved against the folder given as ``_base`` in the table (the claim loader
    passes the claim file's folder), else against the working directory; the
    family's spec records that folder as ``_base``.  Case ids: ``file/<file name>``.
"""

from __future__ import annotations

import os
import re
from pathlib import Path

from ..complex import Complex, ComplexError
from . import catalog
from .family import Family, FamilyError, FamilyType, Param, _Invalid

__all__ = ["CATALOG", "FILE", "FACET_SUFFIXES", "GRAPH_SUFFIXES"]

FACET_SUFFIXES = (".txt", ".json")
GRAPH_SUFFIXES = (".graphml", ".edgelist")


# ------------------------------------------------------------------ catalog
def _recorded_names() -> list[str]:
    return [name for name in catalog.names() if catalog.entry(name)["facets"] is not None]


def _check_names(value, context):
    if not isinstance(value, list) or not value or not all(isinstance(v, str) for v in value):
        raise _Invalid()
    for i, name in enumerate(value):
        try:
            catalog.entry(name)
        except catalog.CatalogError as error:
            raise _Invalid(str(error), whole=True, index=i) from None
        if name in value[:i]:
            raise _Invalid(f"{name!r} is listed twice", whole=True, index=i)
    return list(value)


class CatalogFamily(Family):
    """The catalog complexes with the listed names."""

    def size(self) -> int:
        return len(self.params["names"])

    def case_ids(self):
        return (f"catalog/{name}" for name in self.params["names"])

    def get(self, case_id) -> Complex:
        if (not isinstance(case_id, str) or not case_id.startswith("catalog/")
                or case_id[len("catalog/"):] not in self.params["names"]):
            raise self._foreign(case_id, "its ids are 'catalog/<name>' for the listed names")
        return catalog.complex(case_id[len("catalog/"):])

    def f_bound(self):
        vectors = [catalog.entry(name)["f_vector"] for name in self.params["names"]]
        top = max(len(f) for f in vectors)
        return tuple(max(f[i] if i < len(f) else 0 for f in vectors) for i in range(top))


def _build_catalog(params, context):
    if params["names"] is None:
        params["names"] = _recorded_names()
    return CatalogFamily("catalog", params)


CATALOG = FamilyType(
    name="catalog",
    description="classic triangulations by name (spheres, surfaces, projective planes, "
            "lens spaces, ...)",
    params=(Param("names", "a non-empty list of catalog names", "",
                  "which triangulations; omit for every recorded name", _check_names,
                  default=None),),
    build=_build_catalog,
    reference="each name's source: catalog.entry(name)['source']",
)


# --------------------------------------------------------------------- files
def _integer_names(labels):
    return {v: int(v) if isinstance(v, str) and re.fullmatch(r"-?[0-9]+", v) else v
            for v in labels}


def _read_graph(path: Path):
    import networkx as nx

    try:
        if path.suffix.lower() == ".graphml":
            graph = nx.read_graphml(path)
        else:
            graph = nx.read_edgelist(path, data=False)
    except Exception as error:  # third-party parsers raise many kinds of errors
        raise FamilyError(f"{path}: cannot read the graph ({type(error).__name__}: "
                          f"{error})") from None
    return nx.relabel_nodes(graph, _integer_names(graph.nodes()))


class FileFamily(Family):
    """The complexes stored in one file or in the files of a folder."""

    def __init__(self, name, params, base, root: Path, files: tuple[str, ...]):
        super().__init__(name, params, base)
        self._root = root           # the folder the file names are relative to
        self._files = files

    def _uses_base(self) -> bool:
        return True

    def size(self) -> int:
        return len(self._files)

    def case_ids(self):
        return (f"file/{name}" for name in self._files)

    def get(self, case_id) -> Complex:
        if (not isinstance(case_id, str) or not case_id.startswith("file/")
                or case_id[len("file/"):] not in self._files):
            raise self._foreign(case_id, "its ids are 'file/<file name>' for the files found")
        path = self._root / case_id[len("file/"):]
        try:
            if path.suffix.lower() in GRAPH_SUFFIXES:
                graph = _read_graph(path)
                K = Complex.from_graph(graph, flag=self.params["as"] == "flag")
            else:
                K = Complex.from_file(path)
        except ComplexError as error:
            raise FamilyError(f"case {case_id!r}: {error}") from None
        if K.n_vertices == 0:
            raise FamilyError(f"case {case_id!r}: {path} holds no vertex")
        return K


def _build_file(params, context):
    base = Path(context.base) if context.base is not None else Path(os.getcwd())
    given = Path(params["path"])
    path = given if given.is_absolute() else base / given
    known = FACET_SUFFIXES + GRAPH_SUFFIXES
    if path.is_dir():
        files = tuple(sorted(p.name for p in path.iterdir()
                             if p.is_file() and p.suffix.lower() in known))
        if not files:
            raise context.error("path", f"folder {str(path)!r} has no file ending in "
                                + ", ".join(known))
        root = path
    elif path.is_file():
        files, root = (path.name,), path.parent
    else:
        raise context.error("path", f"no file or folder {str(path)!r}"
                            + ("" if given.is_absolute() else
                               f" ({params['path']!r} relative to {str(base)!r})"))
    return FileFamily("file", params, str(base), root, files)


FILE = FamilyType(
    name="file",
    description="complexes read from a file or a folder of files (facet lists as text or "
            "JSON; graphs as GraphML or edge lists)",
    params=(Param.text("path", "a file, or a folder whose .txt/.json/.graphml/.edgelist "
                       "files are read; relative to the claim file's folder"),
            Param.choice("as", ("1-dimensional", "flag"),
                         "how graph files become complexes (facet files ignore it)",
                         default="1-dimensional")),
    build=_build_file,
    reference="file formats: Complex.from_file; networkx read_graphml, read_edgelist",
)

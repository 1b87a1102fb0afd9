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

    Formats, and the sizes checked before a complex is built, are those of
    :mod:`verifier.families.datafiles` (facet lists as text or JSON, GraphML, edge
    lists).  Graphs become 1-dimensional complexes or flag complexes (parameter ``as``).

    Where data may come from: a relative ``path`` is resolved against the folder given as
    ``_base`` in the table (the claim loader passes the claim file's folder), else against
    the working directory, and must stay inside that folder once ``..`` and symbolic links
    are resolved; an absolute path, or one leading elsewhere, is refused unless it lies in a
    folder the user allowed (``verifier run --data-folder DIR``, see
    :func:`data_folders`).  Only regular files are read (no FIFO, device or socket), each
    at most ``MAX_DATA_BYTES``.  Every file is read, checked and hashed when the family is
    built, so a bad file is an error when the claims load, not a failed case; the family's
    spec records each file's SHA-256 under ``_sha256`` (given back, it names the files and
    they must still have those hashes: this is how a certificate's data is re-checked).
    Case ids: ``file/<file name>``.
"""

from __future__ import annotations

import hashlib
import os
from contextlib import contextmanager
from pathlib import Path

from ..complex import Complex
from ..userfiles import UnreadableFile, inside, read_bytes
from . import catalog
from .datafiles import (FACET_SUFFIXES, GRAPH_SUFFIXES, MAX_DATA_BYTES, DataFileError,
                        complex_from_bytes)
from .family import Family, FamilyError, FamilyType, Param, _Invalid

__all__ = ["CATALOG", "FILE", "FACET_SUFFIXES", "GRAPH_SUFFIXES", "data_folders",
           "allowed_folders", "DataChanged"]


# ------------------------------------------------------------------ catalog
def _recorded_names() -> list[str]:
    return catalog.recorded_names()


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
DATA_FOLDERS_VARIABLE = "VERIFIER_DATA_FOLDERS"


def allowed_folders() -> tuple[str, ...]:
    """The folders the user allowed data files to come from (besides the claim file's own
    folder), resolved: ``verifier run --data-folder DIR`` puts them in the environment
    variable ``VERIFIER_DATA_FOLDERS`` (separated by ``os.pathsep``) for the length of
    the run, so that worker processes rebuilding the claims see the same allowance."""
    value = os.environ.get(DATA_FOLDERS_VARIABLE, "")
    return tuple(os.path.realpath(p) for p in value.split(os.pathsep) if p)


@contextmanager
def data_folders(folders):
    """Allow ``folders`` (and the claim files' own folders) as sources of data files while
    the block runs; the previous allowance is restored afterwards."""
    previous = os.environ.get(DATA_FOLDERS_VARIABLE)
    joined = os.pathsep.join(os.path.realpath(str(f)) for f in folders)
    if joined:
        os.environ[DATA_FOLDERS_VARIABLE] = joined
    else:
        os.environ.pop(DATA_FOLDERS_VARIABLE, None)
    try:
        yield
    finally:
        if previous is None:
            os.environ.pop(DATA_FOLDERS_VARIABLE, None)
        else:
            os.environ[DATA_FOLDERS_VARIABLE] = previous


class DataChanged(FamilyError):
    """A data file no longer has the SHA-256 a family's spec records for it."""


def _sha256(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


class FileFamily(Family):
    """The complexes stored in one file or in the files of a folder.

    The files were read, checked and hashed when the family was built; ``get`` reads a
    file again and refuses it if its content changed since."""

    def __init__(self, name, params, base, root: str, hashes: dict[str, str]):
        super().__init__(name, params, base)
        self._root = root           # the resolved folder the file names are relative to
        self._hashes = hashes       # file name -> SHA-256 of its content

    def _uses_base(self) -> bool:
        return True

    def spec(self) -> dict:
        table = super().spec()
        table["_sha256"] = dict(self._hashes)
        return table

    def size(self) -> int:
        return len(self._hashes)

    def case_ids(self):
        return (f"file/{name}" for name in sorted(self._hashes))

    def get(self, case_id) -> Complex:
        if (not isinstance(case_id, str) or not case_id.startswith("file/")
                or case_id[len("file/"):] not in self._hashes):
            raise self._foreign(case_id, "its ids are 'file/<file name>' for the files found")
        name = case_id[len("file/"):]
        K, digest = _read_data(os.path.join(self._root, name), name, self.params["as"])
        if digest != self._hashes[name]:
            raise FamilyError(f"case {case_id!r}: the data file {name!r} changed after the "
                              "claims were loaded")
        return K


def _read_data(path: str, name: str, kind: str) -> tuple[Complex, str]:
    try:
        data = read_bytes(path, "data file", MAX_DATA_BYTES)
        return complex_from_bytes(data, path, flag=kind == "flag"), _sha256(data)
    except (UnreadableFile, DataFileError) as error:
        message = str(error)
        raise FamilyError(message if message.startswith(path) else f"{path}: {message}") \
            from None


def _inside_allowed(real: str, roots: tuple[str, ...]) -> bool:
    return any(inside(real, root) for root in roots)


def _build_file(params, context):
    base = os.path.realpath(context.base if context.base is not None else os.getcwd())
    given = params["path"]
    allowed = allowed_folders()
    roots = (base,) + allowed
    hint = ("; data files must lie inside the claim file's folder, or in a folder allowed "
            "with --data-folder")
    if "\x00" in given:
        raise context.error("path", f"{given!r} is not a valid path")
    if os.path.isabs(given) and not _inside_allowed(os.path.realpath(given), allowed):
        raise context.error("path", f"absolute path {given!r} refused{hint}")
    shown = str(Path(base) / given)            # as the user would spell it, in messages
    path = os.path.realpath(shown)
    if not _inside_allowed(path, roots):
        raise context.error("path", f"{given!r} leads to {path!r}, outside {base!r}{hint}")
    known = FACET_SUFFIXES + GRAPH_SUFFIXES
    recorded = context.spec.get("_sha256") if isinstance(context.spec, dict) else None
    if recorded is not None:
        if not (isinstance(recorded, dict) and recorded and all(
                isinstance(k, str) and isinstance(v, str) and k == os.path.basename(k)
                and k not in ("", ".", "..") for k, v in recorded.items())):
            raise context.error(None, "'_sha256' must map plain file names to their SHA-256")
    if os.path.isdir(path):
        root = path
        names = sorted(recorded) if recorded is not None else sorted(
            entry for entry in os.listdir(path)
            if os.path.splitext(entry)[1].lower() in known
            and not os.path.isdir(os.path.join(path, entry)))
        if not names:
            raise context.error("path", f"folder {shown!r} has no file ending in "
                                + ", ".join(known))
    elif os.path.exists(path):
        root, names = os.path.dirname(path), [os.path.basename(path)]
    else:
        raise context.error("path", f"no file or folder {shown!r}"
                            + ("" if os.path.isabs(given) else
                               f" ({given!r} relative to {base!r})"))
    hashes = {}
    for name in names:
        full = os.path.join(root, name)
        real = os.path.realpath(full)
        if not _inside_allowed(real, roots):
            raise context.error("path", f"{full!r} is a link to {real!r}, outside {base!r}"
                                + hint)
        try:
            _K, digest = _read_data(full, name, params["as"])
        except FamilyError as error:
            raise context.error("path", str(error)) from None
        if recorded is not None and recorded.get(name) != digest:
            raise DataChanged(f"the data file {name!r} differs from the one the claim was run "
                              f"with (SHA-256 {digest[:16]}..., recorded "
                              f"{str(recorded.get(name))[:16]}...)", context.key + ("path",))
        hashes[name] = digest
    return FileFamily("file", params, context.base, root, hashes)


FILE = FamilyType(
    name="file",
    description="complexes read from a file or a folder of files (facet lists as text or "
            "JSON; graphs as GraphML or edge lists)",
    params=(Param.text("path", "a file, or a folder whose .txt/.json/.graphml/.edgelist "
                       "files are read; relative to the claim file's folder, and inside it "
                       "unless another folder is allowed with --data-folder"),
            Param.choice("as", ("1-dimensional", "flag"),
                         "how graph files become complexes (facet files ignore it)",
                         default="1-dimensional")),
    build=_build_file,
    reference="file formats: verifier.families.datafiles; networkx read_graphml, "
              "read_edgelist",
)

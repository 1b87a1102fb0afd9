"""The values of the claim language and their static types.

Runtime values are plain: ``int``/``Fraction`` (numbers), ``bool``, a
:class:`~verifier.complex.Complex`, a simplex as a sorted tuple of the complex's vertex
labels, a ``frozenset`` of simplices, a tuple (list), a polynomial, and
:class:`Indexed` -- a matrix whose rows and columns may be named by simplices, so that
``M[x, y]`` works with simplices as well as with integers.

Static types are short strings: ``number ball bool complex simplex set matrix poly`` and
``list[T]``; ``any`` matches everything.  A parameter may accept several types.  A
``ball`` is a certified number (:class:`~verifier.claims.enclosure.Enclosure`): a
rectangle with exact rational corners proved to contain the value; exact numbers are
accepted wherever a ball is.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from fractions import Fraction

from .enclosure import Enclosure

__all__ = ["Indexed", "TYPES", "element_type", "type_of", "compatible", "describe_value"]

MAX_SHOWN_ENTRIES = 400   # larger matrices are described by shape and digest

TYPES = ("number", "ball", "bool", "complex", "simplex", "set", "matrix", "poly", "list", "any")


def element_type(t: str) -> str | None:
    """The type of the items of an iterable type, or None if t is not iterable."""
    if t == "set":
        return "simplex"
    if t.startswith("list"):
        return t[5:-1] if t.startswith("list[") else "any"
    if t == "complex":
        return "simplex"
    if t == "any":
        return "any"
    return None


def compatible(actual: str, accepted: tuple[str, ...]) -> bool:
    """Can a value of static type ``actual`` be passed where ``accepted`` is expected?"""
    if actual == "any" or "any" in accepted:
        return True
    if actual == "number" and "ball" in accepted:   # an exact number is a degenerate ball
        return True
    base = actual.split("[", 1)[0]
    if base == "list" and "simplex" in accepted:   # a literal tuple of labels names a simplex
        return True
    return actual in accepted or base in accepted


@dataclass(frozen=True)
class Indexed:
    """A matrix with optional row and column keys (simplices), for ``M[x, y]``.

    ``matrix`` is any exact matrix object of the active backend (it supports ``+ - @``,
    ``scale``, ``**``, ``==``, ``.T``, ``trace()``, ``total()``, ``shape`` and
    ``[i, j]``).
    """
    matrix: object
    rows: tuple | None = None
    cols: tuple | None = None

    def position(self, key, axis: int) -> int:
        keys = self.rows if axis == 0 else self.cols
        size = self.matrix.shape[axis]
        if isinstance(key, bool):
            raise KeyError(f"cannot index a matrix by {key!r}")
        if isinstance(key, int):
            if not -size <= key < size:
                raise KeyError(f"index {key} outside 0..{size - 1}")
            return key % size
        if keys is None:
            raise KeyError("this matrix has no simplex names; index it by integers")
        if not hasattr(self, "_lookup"):
            object.__setattr__(self, "_lookup", ({k: i for i, k in enumerate(self.rows or ())},
                                                 {k: i for i, k in enumerate(self.cols or ())}))
        found = self._lookup[axis].get(tuple(key) if isinstance(key, (tuple, list)) else key)
        if found is None:
            raise KeyError(f"{key!r} does not name a {'row' if axis == 0 else 'column'}")
        return found

    def same_keys(self, other: "Indexed"):
        """Keys for the result of combining two matrices entrywise."""
        return (self.rows if self.rows == other.rows else None,
                self.cols if self.cols == other.cols else None)


def type_of(value) -> str:
    """The static type of a runtime value (for bound variables and error messages)."""
    from ..complex import Complex
    if isinstance(value, bool):
        return "bool"
    if isinstance(value, (int, Fraction)):
        return "number"
    if isinstance(value, Enclosure):
        return "ball"
    if isinstance(value, Complex):
        return "complex"
    if isinstance(value, Indexed):
        return "matrix"
    if isinstance(value, frozenset):
        return "set"
    if isinstance(value, tuple):
        return "list"
    return "any"


def describe_value(value) -> str:
    """An exact, readable text of a value (for certificates and reports)."""
    from ..complex import Complex
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, Fraction)):
        return str(value)
    if isinstance(value, Enclosure):
        return value.text()
    if isinstance(value, Complex):
        return f"complex with facets {value.facet_labels()}"
    if isinstance(value, Indexed):
        n, m = value.matrix.shape
        rows = value.matrix.rows()
        text = "[" + ", ".join("[" + ", ".join(str(x) for x in r) + "]" for r in rows) + "]"
        if n * m <= MAX_SHOWN_ENTRIES:
            return text
        digest = hashlib.sha256(text.encode()).hexdigest()[:16]
        return f"<{n}x{m} matrix, sha256 {digest}..., entry sum {value.matrix.total()}>"
    if isinstance(value, frozenset):
        return "{" + ", ".join(str(list(x)) for x in sorted(value, key=lambda s: (len(s), repr(s)))) + "}"
    if hasattr(value, "poly"):          # a characteristic polynomial computed lazily
        return str(value.poly)
    if isinstance(value, tuple):
        return "(" + ", ".join(describe_value(v) for v in value) + ")"
    return str(value)

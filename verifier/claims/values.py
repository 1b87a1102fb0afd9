"""The values of the claim language and their static types.

Runtime values are plain: ``int``/``Fraction`` (numbers), ``bool``, a
:class:`~verifier.complex.Complex`, a simplex as a sorted tuple of the complex's vertex
labels, a ``frozenset`` of simplices, a tuple (list), a polynomial, and
:class:`Indexed` -- a matrix whose rows and columns may be named by simplices, so that
``M[x, y]`` works with simplices as well as with integers.

Static types are short strings: ``number ball bool complex simplex set matrix poly``,
``list[T]`` (items of one type T) and ``tuple[T1,T2,...]`` (items whose types differ,
known by position).  Every expression has exactly one static type: there is no type
that matches everything, so a statement that type-checks cannot meet a value of the
wrong kind at run time.  A parameter may accept several types.  A
``ball`` is a certified number (:class:`~verifier.claims.enclosure.Enclosure`): a
rectangle with exact rational corners proved to contain the value; exact numbers are
accepted wherever a ball is.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from fractions import Fraction

from .enclosure import Enclosure

__all__ = ["Indexed", "TYPES", "EMPTY", "element_type", "type_of", "compatible", "unify",
           "list_type", "tuple_items", "split_types", "is_list", "describe_value"]

MAX_SHOWN_ENTRIES = 400   # larger matrices are described by shape and digest

TYPES = ("number", "ball", "bool", "complex", "simplex", "set", "matrix", "poly", "list[T]",
         "tuple[T1,T2,...]")
EMPTY = "list[empty]"     # the type of the literal () or []: it fits any list


def split_types(inner: str) -> list[str]:
    """The comma-separated types inside ``tuple[...]``, split at the top level only.

    >>> split_types("number,list[number]")
    ['number', 'list[number]']
    """
    parts, depth, start = [], 0, 0
    for i, char in enumerate(inner):
        if char == "[":
            depth += 1
        elif char == "]":
            depth -= 1
        elif char == "," and depth == 0:
            parts.append(inner[start:i])
            start = i + 1
    parts.append(inner[start:])
    return [p for p in parts if p]


def tuple_items(t: str) -> list[str] | None:
    """The item types of a heterogeneous ``tuple[T1,T2,...]`` type, or None."""
    if t.startswith("tuple[") and t.endswith("]"):
        return split_types(t[6:-1])
    return None


def is_list(t: str) -> bool:
    """True for every list type: ``list[T]``, ``tuple[...]`` and the empty list."""
    return t.startswith("list[") or t.startswith("tuple[")


def unify(a: str, b: str) -> str | None:
    """The common type of two values that may stand in the same place (branches of
    ``if ... else``, items of one list, sides of ``==``), or None if there is none.

    >>> unify("number", "ball"), unify("list[empty]", "list[simplex]")
    ('ball', 'list[simplex]')
    >>> unify("complex", "number") is None
    True
    """
    if a == b:
        return a
    if {a, b} == {"number", "ball"}:
        return "ball"
    if a == EMPTY and is_list(b):
        return b
    if b == EMPTY and is_list(a):
        return a
    other = a if b == "simplex" else b
    if "simplex" in (a, b) and is_list(other) and names_labels(other):
        return "simplex"          # a literal tuple of labels names a simplex
    if is_list(a) and is_list(b):
        items_a, items_b = tuple_items(a), tuple_items(b)
        if items_a is not None and items_b is not None:
            if len(items_a) != len(items_b):
                return None
            joined = [unify(x, y) for x, y in zip(items_a, items_b)]
            return None if None in joined else f"tuple[{','.join(joined)}]"
        item_a, item_b = element_type(a), element_type(b)
        if item_a is None or item_b is None:
            return None
        item = unify(item_a, item_b)
        return None if item is None else f"list[{item}]"
    return None


def list_type(items: list[str]) -> str:
    """The type of a literal list with items of these types: ``list[T]`` when they have
    a common type T, else ``tuple[...]`` (positions known), ``list[empty]`` when empty."""
    if not items:
        return EMPTY
    common = items[0]
    for t in items[1:]:
        common = unify(common, t)
        if common is None:
            return f"tuple[{','.join(items)}]"
    return f"list[{common}]"


def element_type(t: str) -> str | None:
    """The type of the items of an iterable type, or None if t is not iterable (or its
    items have no common type).

    >>> element_type("set"), element_type("list[number]"), element_type("tuple[number,bool]")
    ('simplex', 'number', None)
    """
    if t in ("set", "complex"):
        return "simplex"
    if t == EMPTY:
        return None
    if t.startswith("list[") and t.endswith("]"):
        return t[5:-1]
    items = tuple_items(t)
    if items:
        common = items[0]
        for item in items[1:]:
            common = unify(common, item)
            if common is None:
                return None
        return common
    return None


def names_labels(t: str) -> bool:
    """Can a literal list of type t name a simplex: are its items vertex labels (numbers,
    or tuples of numbers such as the labels of a product)?"""
    if t == "number":
        return True
    if not is_list(t) or t == EMPTY:
        return False
    items = tuple_items(t) or [element_type(t)]
    return all(item is not None and names_labels(item) for item in items)


def compatible(actual: str, accepted: tuple[str, ...]) -> bool:
    """Can a value of static type ``actual`` be passed where ``accepted`` is expected?

    ``list`` in ``accepted`` takes any list; ``list[T]`` takes lists whose items fit T;
    a ``simplex`` may be written as a literal tuple of labels.

    >>> compatible("number", ("ball",)), compatible("list[number]", ("simplex",))
    (True, True)
    >>> compatible("list[number]", ("complex",))
    False
    """
    if actual in accepted:
        return True
    if actual == "number" and "ball" in accepted:   # an exact number is a degenerate ball
        return True
    if is_list(actual):
        if "list" in accepted or ("simplex" in accepted and names_labels(actual)):
            return True
        for wanted in accepted:
            if wanted.startswith("list[") and unify(actual, wanted) == wanted:
                return True
    return False


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


MAX_SHOWN_BITS = 13_000     # longer integers (about 3,900 digits) are described by a digest
MAX_DIGESTED_ENTRIES = 4_000_000   # larger matrices are described by shape and entry sum


def _too_long(x) -> bool:
    if isinstance(x, Fraction):
        return x.numerator.bit_length() > MAX_SHOWN_BITS or \
            x.denominator.bit_length() > MAX_SHOWN_BITS
    return isinstance(x, int) and x.bit_length() > MAX_SHOWN_BITS


def _integer_bytes(x: int) -> bytes:
    return x.to_bytes((x.bit_length() + 8) // 8, "big", signed=True)


def _number_text(x) -> str:
    """The exact text of a number; an integer too long to print in full is named by its
    size and a digest of its bytes (still exact: equal digests, equal numbers).

    >>> _number_text(Fraction(-3, 4))
    '-3/4'
    >>> _number_text(2 ** 20000)[:31]
    '<integer of 20001 bits, sha256 '
    """
    if not _too_long(x):
        return str(x)
    if isinstance(x, Fraction) and x.denominator != 1:
        return f"{_number_text(x.numerator)}/{_number_text(x.denominator)}"
    x = int(x)
    digest = hashlib.sha256(_integer_bytes(x)).hexdigest()[:16]
    return f"<integer of {x.bit_length()} bits, sha256 {digest}...>"


def _poly_text(poly) -> str:
    coeffs = list(poly.coeffs)
    if not any(_too_long(c) for c in coeffs):
        return str(poly)
    h = hashlib.sha256()
    for c in coeffs:
        h.update(_number_text(c).encode() + b";")
        if isinstance(c, Fraction):
            h.update(_integer_bytes(c.numerator) + b"/" + _integer_bytes(c.denominator))
        else:
            h.update(_integer_bytes(int(c)))
    return (f"<polynomial of degree {len(coeffs) - 1} with coefficients too long to show, "
            f"sha256 {h.hexdigest()[:16]}...>")


def describe_value(value) -> str:
    """An exact, readable text of a value (for certificates and reports)."""
    from ..complex import Complex
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, Fraction)):
        return _number_text(value)
    if isinstance(value, Enclosure):
        return value.text()
    if isinstance(value, Complex):
        return f"complex with facets {value.facet_labels()}"
    if isinstance(value, Indexed):
        n, m = value.matrix.shape
        if n * m > MAX_DIGESTED_ENTRIES:
            return f"<{n}x{m} matrix, entry sum {_number_text(value.matrix.total())}>"
        rows = value.matrix.rows()
        text = "[" + ", ".join("[" + ", ".join(_number_text(x) for x in r) + "]"
                               for r in rows) + "]"
        if n * m <= MAX_SHOWN_ENTRIES:
            return text
        digest = hashlib.sha256(text.encode()).hexdigest()[:16]
        return (f"<{n}x{m} matrix, sha256 {digest}..., entry sum "
                f"{_number_text(value.matrix.total())}>")
    if isinstance(value, frozenset):
        return "{" + ", ".join(str(list(x)) for x in sorted(value, key=lambda s: (len(s), repr(s)))) + "}"
    if hasattr(value, "poly"):          # a characteristic polynomial computed lazily
        return _poly_text(value.poly)
    if hasattr(value, "coeffs"):
        return _poly_text(value)
    if isinstance(value, tuple):
        return "(" + ", ".join(describe_value(v) for v in value) + ")"
    return str(value)

"""Derived families: an operation of :mod:`verifier.operations` applied to the cases
of other families.

=================  ==================================  ===============================
family             parameters                          case id
=================  ==================================  ===============================
``refine``         ``of``, ``times`` (default 1)       ``refine(<times>)/<id of of>``
``skeleton``       ``of``, ``k``                       ``skeleton(<k>)/<id of of>``
``cone``           ``of``                              ``cone/<id of of>``
``suspension``     ``of``                              ``suspension/<id of of>``
``join``           ``left``, ``right``, ``max_cases``  ``join/<left id>|<right id>``
``product``        ``left``, ``right``, ``max_cases``  ``product/<left id>|<right id>``
=================  ==================================  ===============================

In a two-family id, a ``|`` or ``\\`` inside either part is written ``\\|`` or
``\\\\``.  The pairs of a join or product are taken in order of i + j (i-th case
of ``left``, j-th of ``right``), so that capping at ``max_cases`` samples both
families evenly and works for families of unknown size.

Size guards: the f-vector of every result is computed exactly from the f-vectors
of the inputs before anything is built (the formulas of :mod:`verifier.sizes`, each
checked against the operations in the tests).  A family whose largest cases would exceed
``MAX_SIMPLICES`` simplices is refused when it is made, if the inner family knows
a bound (:meth:`Family.f_bound`); otherwise the single case is refused when built.
"""

from __future__ import annotations

from .. import operations as ops
from ..sizes import (cone_f_vector, join_f_vector, product_f_vector, refined_f_vector,
                     suspension_f_vector)
from ..complex import Complex
from .family import MAX_COUNT, MAX_SIMPLICES, Family, FamilyError, FamilyType, Param

__all__ = ["REFINE", "SKELETON", "CONE", "SUSPENSION", "JOIN", "PRODUCT",
           "refined_f_vector", "product_f_vector", "join_f_vector", "cone_f_vector",
           "suspension_f_vector"]


def _skeleton_f_vector(f, k):
    return tuple(f[:k + 1])


# ------------------------------------------------------------ one-family operations
class Derived(Family):
    """An operation applied to every case of one family."""

    def __init__(self, name, params, inner: Family, prefix: str, apply, transform):
        super().__init__(name, params)
        self.inner, self.prefix = inner, prefix
        self._apply, self._transform = apply, transform

    def size(self):
        return self.inner.size()

    def case_ids(self):
        return (f"{self.prefix}/{case}" for case in self.inner.case_ids())

    def get(self, case_id) -> Complex:
        head = self.prefix + "/"
        if not isinstance(case_id, str) or not case_id.startswith(head):
            raise self._foreign(case_id, f"its ids start with {head!r}")
        K = self.inner.get(case_id[len(head):])
        _guard(case_id, self._transform(K.f_vector))
        try:
            return self._apply(K)
        except ops.OperationError as error:
            raise FamilyError(f"case {case_id!r}: {error}") from None

    def f_bound(self):
        bound = self.inner.f_bound()
        return None if bound is None else self._transform(bound)


def _guard(case_id: str, f: tuple[int, ...]) -> None:
    if sum(f) > MAX_SIMPLICES:
        raise FamilyError(f"case {case_id!r}: the result would have {sum(f)} simplices "
                          f"(f-vector {list(f)}), more than the limit of {MAX_SIMPLICES} "
                          "per case")


def _check_bound(context, parameter: str, family: Family, what: str) -> None:
    bound = family.f_bound()
    if bound is not None and sum(bound) > MAX_SIMPLICES:
        raise context.error(parameter, f"{what} would have up to {sum(bound)} simplices "
                            f"(f-vector at most {list(bound)}), more than the limit of "
                            f"{MAX_SIMPLICES} per case")


def _unary(name, description, extra, prefix, apply, transform, reference, bound_parameter="of"):
    def build(params, context):
        inner = context.built["of"]
        family = Derived(name, params, inner, prefix(params), lambda K: apply(K, params),
                         lambda f: transform(f, params))
        _check_bound(context, bound_parameter, family, f"the largest cases of {name}")
        return family
    return FamilyType(name=name, description=description,
                      params=(Param.family("of", "the family whose cases are transformed"),)
                      + extra,
                      build=build, reference=reference)


REFINE = _unary(
    "refine", "barycentric refinements of the cases of another family",
    (Param.integer("times", 0, 10, "how many times to refine", default=1),),
    lambda p: f"refine({p['times']})",
    lambda K, p: ops.refine(K, p["times"]),
    lambda f, p: refined_f_vector(f, p["times"]),
    "J. R. Munkres, Elements of Algebraic Topology, Addison-Wesley 1984, section 15",
    bound_parameter="times")

SKELETON = _unary(
    "skeleton", "k-skeletons of the cases of another family",
    (Param.integer("k", 0, None, "the dimension k to keep"),),
    lambda p: f"skeleton({p['k']})",
    lambda K, p: ops.skeleton(K, p["k"]),
    lambda f, p: _skeleton_f_vector(f, p["k"]),
    "common practice, no source")

CONE = _unary(
    "cone", "cones over the cases of another family (one new vertex labelled 'apex')",
    (), lambda p: "cone",
    lambda K, p: ops.cone(K),
    lambda f, p: cone_f_vector(f),
    "J. Matoušek, Using the Borsuk-Ulam Theorem, Springer 2003, section 4.2")

SUSPENSION = _unary(
    "suspension", "suspensions of the cases of another family (new vertices 'north', "
    "'south')",
    (), lambda p: "suspension",
    lambda K, p: ops.suspension(K),
    lambda f, p: suspension_f_vector(f),
    "J. Matoušek, Using the Borsuk-Ulam Theorem, Springer 2003, section 4.2")


# ------------------------------------------------------------ two-family operations
def _escape(case_id: str) -> str:
    return case_id.replace("\\", "\\\\").replace("|", "\\|")


def _split(text: str) -> tuple[str, str] | None:
    """The two parts of ``<left>|<right>`` (escapes undone), or None."""
    parts, current, i = [], [], 0
    while i < len(text):
        c = text[i]
        if c == "\\" and i + 1 < len(text):
            current.append(text[i + 1])
            i += 2
            continue
        if c == "|" and not parts:
            parts.append("".join(current))
            current = []
        else:
            current.append(c)
        i += 1
    parts.append("".join(current))
    return (parts[0], parts[1]) if len(parts) == 2 else None


def _diagonal_pairs(left, right):
    """Pairs (a, b) of items of two iterables, in order of i + j, lazily."""
    first, second = [], []
    left, right = iter(left), iter(right)
    left_done = right_done = False
    d = 0
    while True:
        while not left_done and len(first) <= d:
            try:
                first.append(next(left))
            except StopIteration:
                left_done = True
        while not right_done and len(second) <= d:
            try:
                second.append(next(right))
            except StopIteration:
                right_done = True
        if (left_done and not first) or (right_done and not second):
            return
        if left_done and right_done and d > len(first) + len(second) - 2:
            return
        for i in range(max(0, d - len(second) + 1), min(d, len(first) - 1) + 1):
            yield first[i], second[d - i]
        d += 1


class Combined(Family):
    """An operation applied to pairs of cases of two families, capped at max_cases."""

    def __init__(self, name, params, left: Family, right: Family, apply, transform):
        super().__init__(name, params)
        self.left, self.right = left, right
        self._apply, self._transform = apply, transform

    def size(self):
        a, b = self.left.size(), self.right.size()
        return None if a is None or b is None else min(self.params["max_cases"], a * b)

    def case_ids(self):
        pairs = _diagonal_pairs(self.left.case_ids(), self.right.case_ids())
        for count, (a, b) in enumerate(pairs):
            if count >= self.params["max_cases"]:
                return
            yield f"{self.name}/{_escape(a)}|{_escape(b)}"

    def get(self, case_id) -> Complex:
        head = self.name + "/"
        parts = (_split(case_id[len(head):])
                 if isinstance(case_id, str) and case_id.startswith(head) else None)
        if parts is None:
            raise self._foreign(case_id, f"its ids look like '{head}<left id>|<right id>'")
        K, H = self.left.get(parts[0]), self.right.get(parts[1])
        _guard(case_id, self._transform(K.f_vector, H.f_vector))
        return self._apply(K, H)

    def f_bound(self):
        a, b = self.left.f_bound(), self.right.f_bound()
        return None if a is None or b is None else self._transform(a, b)


def _binary(name, description, apply, transform, reference):
    def build(params, context):
        family = Combined(name, params, context.built["left"], context.built["right"],
                          apply, transform)
        _check_bound(context, None, family, f"the largest cases of {name}")
        return family
    return FamilyType(
        name=name, description=description,
        params=(Param.family("left", "the family of first factors"),
                Param.family("right", "the family of second factors"),
                Param.integer("max_cases", 1, MAX_COUNT, "at most this many pairs, taken in "
                              "order of i + j", default=10_000)),
        build=build, reference=reference)


JOIN = _binary(
    "join", "joins K * H of a case K of one family with a case H of another",
    ops.join, join_f_vector,
    "J. Matoušek, Using the Borsuk-Ulam Theorem, Springer 2003, section 4.2")

PRODUCT = _binary(
    "product", "products K x H (order complex of the product of face posets) of cases "
    "of two families",
    ops.product, product_f_vector,
    "A. Björner, Topological methods, Handbook of Combinatorics, Elsevier 1995, "
    "section 10")

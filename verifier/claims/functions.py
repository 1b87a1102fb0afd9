"""The function table of the claim language: one entry per function.

Each entry gives the name, the parameters with their accepted types, the result type,
the implementation (an adapter over :mod:`verifier.invariants`, :mod:`verifier.operations`
and :mod:`verifier.exact`), the function whose docstring documents it, and the source.
``verifier functions`` prints this table.  To add a function: write the invariant (with its
docstring), then add one ``Function(...)`` line to ``TABLE`` below.

Adapters translate between the language's values (simplices as tuples of vertex labels)
and the library's (simplices as tuples of vertex indices).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Callable

from .. import exact, invariants as inv, operations as ops
from ..complex import Complex
from .errors import EvaluationError
from .values import Indexed

__all__ = ["Param", "Function", "TABLE", "FUNCTIONS", "REQUIRED"]

REQUIRED = object()


@dataclass(frozen=True)
class Param:
    name: str
    types: tuple[str, ...]
    default: object = REQUIRED


@dataclass(frozen=True)
class Function:
    """One function of the claim language."""
    name: str
    params: tuple[Param, ...]
    returns: str
    impl: Callable
    documented_by: Callable | None = None
    source: str = ""
    summary_text: str = ""
    combinatorial: bool = field(default=False)  # no exact linear algebra inside

    @property
    def summary(self) -> str:
        """One line: from the documenting function's docstring unless given."""
        if self.summary_text:
            return self.summary_text
        doc = (self.documented_by.__doc__ or "") if self.documented_by else ""
        return doc.strip().splitlines()[0] if doc.strip() else ""

    def signature(self) -> str:
        parts = []
        for p in self.params:
            text = f"{p.name}: {'|'.join(p.types)}"
            if p.default is not REQUIRED:
                text += f" = {p.default!r}"
            parts.append(text)
        return f"{self.name}({', '.join(parts)}) -> {self.returns}"


def P(name, *types, default=REQUIRED) -> Param:
    return Param(name, types, default)


# ------------------------------------------------------------------ adapters
def _simplex(K: Complex, x) -> tuple[int, ...]:
    try:
        return K.simplex_of(x)
    except (KeyError, TypeError):
        raise EvaluationError(f"{list(x)!r} is not a simplex of the complex") from None


def _labels(K: Complex, simplices) -> tuple:
    return tuple(K.label_of(s) for s in simplices)


def _keyed(K: Complex, matrix) -> Indexed:
    keys = _labels(K, K.simplices)
    return Indexed(matrix, keys, keys)


def _positions_to_set(K: Complex, positions) -> frozenset:
    return frozenset(K.label_of(K.simplices[j]) for j in positions)


def _dim(x):
    return x.dim if isinstance(x, Complex) else len(x) - 1


def _size(x):
    if isinstance(x, Complex):
        return len(x.simplices)
    if isinstance(x, Indexed):
        return x.matrix.shape[0]
    return len(x)


def _euler(x):
    return inv.euler(x)


def _matrix(M: Indexed):
    return M.matrix


def _boundary_matrix(K: Complex, k: int) -> Indexed:
    if not isinstance(k, int) or k < 0:
        raise EvaluationError(f"boundary_matrix needs a dimension k >= 0, got {k}")
    rows = _labels(K, [s for s in K.simplices if len(s) == k])
    cols = _labels(K, [s for s in K.simplices if len(s) == k + 1])
    return Indexed(inv.boundary_matrix(K, k), rows, cols)


def _identity(n):
    if isinstance(n, Complex):
        return _keyed(n, exact.Matrix.identity(len(n.simplices)))
    if not isinstance(n, int) or n < 0:
        raise EvaluationError(f"identity needs a size n >= 0 or a complex, got {n}")
    return Indexed(exact.Matrix.identity(n))


def _transpose(M: Indexed) -> Indexed:
    return Indexed(M.matrix.T, M.cols, M.rows)


def _abs(x):
    if isinstance(x, Indexed):
        return Indexed(x.matrix.entrywise_abs(), x.rows, x.cols)
    return abs(x)


def _betti(K: Complex, k=None, p: int = 0):
    if p and not _is_prime(p):
        raise EvaluationError(f"betti over Z/p needs a prime p, got {p}")
    numbers = inv.betti(K, k, p=p)
    return tuple(numbers) if k is None else numbers


def _is_prime(p: int) -> bool:
    return p >= 2 and all(p % d for d in range(2, int(p ** 0.5) + 1))


def _signature(M: Indexed) -> tuple:
    return tuple(exact.signature(M.matrix))


def _charpoly(M: Indexed):
    return CharPoly(M.matrix)


class CharPoly:
    """The characteristic polynomial of a matrix, computed only when its coefficients are
    needed: ``is_reciprocal`` of a large matrix's charpoly uses the randomized test
    instead (its evidence level is recorded by the evaluator)."""

    def __init__(self, matrix):
        self.matrix = matrix
        self._poly = None

    @property
    def poly(self):
        if self._poly is None:
            self._poly = exact.charpoly(self.matrix)
        return self._poly


def _poly(p):
    return p.poly if isinstance(p, CharPoly) else p


def _is_reciprocal(p, ctx=None):
    if isinstance(p, CharPoly) and p._poly is None:
        verdict = exact.charpoly_is_reciprocal(p.matrix)
        if ctx is not None:
            ctx.note_evidence(verdict.evidence, verdict.error_bound)
        return verdict.value
    return _poly(p).is_reciprocal()


def _multiplicity(M: Indexed, value) -> int:
    return exact.multiplicity(M.matrix, value)


def _zeta(M: Indexed, s: int):
    if not isinstance(s, int):
        raise EvaluationError(f"zeta is evaluated at integers only, got {s}")
    return inv.zeta(M.matrix, s)


def _star(K: Complex, x) -> frozenset:
    return _positions_to_set(K, ops.star(K, _simplex(K, x)))


def _closed_star(K, x):
    return ops.closed_star(K, _simplex(K, x))


def _link(K, x):
    return ops.link(K, _simplex(K, x))


def _unit_sphere(K, x):
    return ops.unit_sphere(K, _simplex(K, x))


def _interior(K):
    return _positions_to_set(K, ops.interior(K))


def _refine(K, times=1):
    if not isinstance(times, int) or not 0 <= times <= 4:
        raise EvaluationError(f"refine takes 0 to 4 refinements, got {times}")
    return ops.refine(K, times)


def _skeleton(K, k):
    return ops.skeleton(K, k)


def _union(a, b):
    if isinstance(a, Complex) and isinstance(b, Complex):
        return ops.disjoint_union(a, b)
    if isinstance(a, frozenset) and isinstance(b, frozenset):
        return a | b
    raise EvaluationError("union takes two complexes (disjoint union) or two sets of simplices")


def _vertex(K: Complex, v) -> int:
    simplex = _simplex(K, v)
    if len(simplex) != 1:
        raise EvaluationError(f"{list(v)!r} is not a vertex")
    return simplex[0]


def _curvature(K, v):
    return inv.curvature(K, _vertex(K, v))


def _index(K, v):
    return inv.index(K, list(range(K.n_vertices)), _vertex(K, v))


def _f_vector(K):
    return tuple(K.f_vector)


def _simplices(K):
    return inv.simplices(K)


def _vertices(K):
    return tuple((v,) for v in K.labels)


def _facets(K):
    return inv.facets(K)


def _omega(x):
    return inv.omega(tuple(x))


def _det(M):
    return exact.det(M.matrix)


def _trace(M):
    return M.matrix.trace()


def _rank(M):
    return exact.rank(M.matrix)


def _kernel_dim(M):
    return exact.kernel_dim(M.matrix)


def _positive(M):
    return exact.signature(M.matrix)[0]


def _negative(M):
    return exact.signature(M.matrix)[1]


def _with_keys(build):
    return lambda K: _keyed(K, build(K))


C = "complex"
M = "matrix"
N = "number"
S = "simplex"

TABLE: list[Function] = [
    # counting
    Function("simplices", (P("K", C),), "list[simplex]", _simplices, inv.simplices,
             "definition", combinatorial=True),
    Function("vertices", (P("K", C),), "list[simplex]", _vertices, inv.vertices,
             "definition", combinatorial=True),
    Function("facets", (P("K", C),), "list[simplex]", _facets, inv.facets, "definition",
             combinatorial=True),
    Function("dim", (P("x", C, S),), N, _dim, inv.dim, "definition", combinatorial=True),
    Function("size", (P("x", C, "set", "list", M),), N, _size, inv.size, "definition",
             summary_text="Number of simplices of a complex, elements of a set or list, "
                          "or rows of a matrix.", combinatorial=True),
    Function("f_vector", (P("K", C),), "list[number]", _f_vector, inv.f_vector, "definition",
             combinatorial=True),
    Function("omega", (P("x", S),), N, _omega, inv.omega, "(-1)^dim x", combinatorial=True),
    Function("euler", (P("x", C, "set", "list"),), N, _euler, inv.euler,
             "Euler (1758), Poincare (1895)", combinatorial=True),
    Function("wu", (P("K", C),), N, inv.wu, inv.wu,
             "W. Wu, Colloq. Math. 7 (1959); O. Knill, arXiv:1601.04533", combinatorial=True),
    # matrices of a complex
    Function("connection", (P("K", C),), M, _with_keys(inv.connection), inv.connection,
             "O. Knill, arXiv:1612.08229 (2016)"),
    Function("green", (P("K", C),), M, _with_keys(inv.green), inv.green,
             "O. Knill, Linear Algebra Appl. 600 (2020) 96-129"),
    Function("hodge", (P("K", C),), M, _with_keys(inv.hodge), inv.hodge,
             "O. Knill, arXiv:1301.1408 (2013)"),
    Function("signless_hodge", (P("K", C),), M, _with_keys(inv.signless_hodge),
             inv.signless_hodge, "O. Knill, arXiv:1803.01464 (2018)"),
    Function("dirac", (P("K", C),), M, _with_keys(inv.dirac), inv.dirac,
             "O. Knill, arXiv:1301.1408 (2013)"),
    Function("boundary_matrix", (P("K", C), P("k", N)), M, _boundary_matrix,
             inv.boundary_matrix, "Munkres, Elements of Algebraic Topology (1984) §5"),
    Function("identity", (P("n", N, C),), M, _identity, None, "definition",
             summary_text="The identity matrix of order n, or indexed by the simplices of K."),
    # linear algebra
    Function("transpose", (P("M", M),), M, _transpose, None, "definition",
             summary_text="The transpose of a matrix."),
    Function("abs", (P("x", N, M),), "any", _abs, None, "definition",
             summary_text="Absolute value of a number, or of every entry of a matrix."),
    Function("det", (P("M", M),), N, _det, inv.det, "exact elimination"),
    Function("trace", (P("M", M),), N, _trace, inv.trace, "definition"),
    Function("rank", (P("M", M),), N, _rank, inv.rank, "exact rank over Q"),
    Function("kernel_dim", (P("M", M),), N, _kernel_dim, inv.kernel_dim, "exact rank over Q"),
    Function("charpoly", (P("M", M),), "poly", _charpoly, inv.charpoly, "det(xI - M)"),
    Function("is_reciprocal", (P("p", "poly"),), "bool", _is_reciprocal, inv.is_reciprocal,
             "p(x) = +-x^n p(1/x)"),
    Function("signature", (P("M", M),), "list[number]", _signature, inv.signature,
             "Sylvester's law of inertia; O. Knill, arXiv:1711.09527 (2017)"),
    Function("positive", (P("M", M),), N, _positive, inv.positive, "Sylvester's law of inertia"),
    Function("negative", (P("M", M),), N, _negative, inv.negative, "Sylvester's law of inertia"),
    Function("multiplicity", (P("M", M), P("value", N)), N, _multiplicity, inv.multiplicity,
             "exact nullity / root multiplicity"),
    Function("zeta", (P("M", M), P("s", N)), N, _zeta, inv.zeta, "tr M^-s"),
    # topology
    Function("betti", (P("K", C), P("k", N, default=None), P("p", N, default=0)), "any",
             _betti, inv.betti, "Munkres (1984) §5, §7"),
    Function("is_manifold", (P("K", C),), "bool", inv.is_manifold, inv.is_manifold,
             "links are spheres or balls (Munkres 1984 §35)", combinatorial=True),
    Function("is_manifold_with_boundary", (P("K", C),), "bool", inv.is_manifold_with_boundary,
             inv.is_manifold_with_boundary, "Munkres (1984) §35", combinatorial=True),
    Function("is_closed_manifold", (P("K", C),), "bool", inv.is_closed_manifold,
             inv.is_closed_manifold, "Munkres (1984) §35", combinatorial=True),
    Function("curvature", (P("K", C), P("v", S)), N, _curvature, inv.curvature,
             "N. Levitt, Discrete Comput. Geom. 7 (1992) 59-67", combinatorial=True),
    Function("index", (P("K", C), P("v", S)), N, _index, inv.index,
             "O. Knill, arXiv:1201.1162 (2012); f = the vertex order", combinatorial=True),
    # local pieces and operations
    Function("star", (P("K", C), P("x", S)), "set", _star, ops.star, "definition",
             combinatorial=True),
    Function("closed_star", (P("K", C), P("x", S)), C, _closed_star, ops.closed_star,
             "definition", combinatorial=True),
    Function("link", (P("K", C), P("x", S)), C, _link, ops.link, "Munkres (1984) §2",
             combinatorial=True),
    Function("unit_sphere", (P("K", C), P("x", S)), C, _unit_sphere, ops.unit_sphere,
             "definition", combinatorial=True),
    Function("boundary", (P("K", C),), C, ops.boundary, ops.boundary, "definition",
             combinatorial=True),
    Function("interior", (P("K", C),), "set", _interior, ops.interior, "definition",
             combinatorial=True),
    Function("refine", (P("K", C), P("times", N, default=1)), C, _refine, ops.refine,
             "barycentric refinement", combinatorial=True),
    Function("join", (P("A", C), P("B", C)), C, ops.join, ops.join, "definition",
             combinatorial=True),
    Function("cone", (P("K", C),), C, ops.cone, ops.cone, "definition", combinatorial=True),
    Function("suspension", (P("K", C),), C, ops.suspension, ops.suspension, "definition",
             combinatorial=True),
    Function("product", (P("A", C), P("B", C)), C, ops.product, ops.product,
             "order complex of the product of face posets", combinatorial=True),
    Function("skeleton", (P("K", C), P("k", N)), C, _skeleton, ops.skeleton, "definition",
             combinatorial=True),
    Function("union", (P("A", C, "set"), P("B", C, "set")), "any", _union, ops.disjoint_union,
             "definition", summary_text="Disjoint union of two complexes, or union of two "
                                        "sets of simplices.", combinatorial=True),
]

# the quantifiers all/any/sum/count are syntax (they take generators), described here for
# `verifier functions`
QUANTIFIERS = {
    "all": "True when the condition holds for every generated item (all(P for x in S)).",
    "any": "True when the condition holds for some generated item.",
    "sum": "Sum of generated numbers, of a list, or of all entries of a matrix.",
    "count": "Number of generated items (after if-filters) whose value is true.",
}

FUNCTIONS: dict[str, Function] = {f.name: f for f in TABLE}

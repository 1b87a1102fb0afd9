"""The main backend of the claim language: adapters over the library.

Each function of the table (:mod:`verifier.claims.functions`) is implemented here by the
adapter whose name the table gives; adapters translate between the language's values
(simplices as tuples of vertex labels, :class:`~verifier.claims.values.Indexed` matrices)
and the library's (simplices as tuples of vertex indices, :class:`verifier.exact.Matrix`).
The independent backend (:mod:`verifier.independent.claims`) provides the same names.
"""

from __future__ import annotations

from fractions import Fraction

from .. import energy, exact, invariants as inv, operations as ops
from ..complex import Complex
from .enclosure import (Count, Enclosure, enclosure_list, free_energy_value,
                        imaginary_part, real_part, probability_vector,
                        rounded_points, zeta_value)
from .errors import EvaluationError, Undecided
from .values import Indexed

BITS = 128       # the starting precision of certified values (the independent backend
                 # starts elsewhere, so a re-check never repeats the same computation)


def _simplex(K: Complex, x) -> tuple[int, ...]:
    try:
        return K.simplex_of(x)
    except (KeyError, TypeError):
        raise EvaluationError(f"{list(x)!r} is not a simplex of the complex") from None


def _labels(K: Complex, simplices) -> tuple:
    return tuple(K.label_of(s) for s in simplices)


def _keyed(K: Complex, matrix) -> Indexed:
    labels = K.labels
    if all(type(v) is int and v == i for i, v in enumerate(labels)):
        keys = K.simplices          # labels 0..n-1: every simplex is its own label tuple
    else:
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
    if isinstance(x, Enclosure):
        return x.modulus()
    return abs(x)


def _betti(K: Complex, k=None, p: int = 0):
    if not (isinstance(p, int) and (p == 0 or exact.is_prime(p))):
        raise EvaluationError(f"betti over Z/p needs a prime p, got {p}")
    numbers = inv.betti(K, k, p=p)
    return tuple(numbers) if k is None else numbers


def _homology(K: Complex) -> tuple:
    return inv.homology(K)


def _torsion(K: Complex, k) -> tuple:
    if not isinstance(k, int):
        raise EvaluationError(f"torsion needs an integer degree, got {k}")
    return inv.torsion(K, k)


def _signature(M: Indexed) -> tuple:
    return tuple(exact.signature(M.matrix))


def _charpoly(M: Indexed):
    if M.matrix.shape[0] != M.matrix.shape[1]:
        raise EvaluationError(f"charpoly needs a square matrix, got {M.matrix.shape[0]}x"
                              f"{M.matrix.shape[1]}")
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


def _zeta(M: Indexed, s, t=0):
    if t == 0 and isinstance(s, int):
        return inv.zeta(M.matrix, s)
    poly = _spectral_poly(M, "zeta")
    if poly.coeffs[0] == 0:
        raise EvaluationError("zeta: matrix is singular (0 is an eigenvalue)")
    return zeta_value(poly.coeffs, s, t, _certain(lambda b: exact.zeta_ball(poly, (s, t), b)),
                      BITS)


_POLYS: dict = {}     # id(matrix) -> (matrix, characteristic polynomial), a few recent ones


def _spectral_poly(M: Indexed, name: str):
    """The exact characteristic polynomial of a symmetric integer matrix (cached)."""
    matrix = M.matrix
    hit = _POLYS.get(id(matrix))
    if hit is not None and hit[0] is matrix:
        return hit[1]
    if not matrix.is_square:
        raise EvaluationError(f"{name} needs a square matrix, got {matrix.shape[0]}x"
                              f"{matrix.shape[1]}")
    if not matrix.is_integer() or not matrix.is_symmetric():
        raise EvaluationError(f"{name} needs a symmetric integer matrix (real eigenvalues)")
    poly = exact.charpoly(matrix)
    if len(_POLYS) >= 8:
        _POLYS.pop(next(iter(_POLYS)))
    _POLYS[id(matrix)] = (matrix, poly)
    return poly


def _certain(compute):
    """``compute`` with the exact layer's "undecided" turned into the language's."""
    def run(*args, **options):
        try:
            return compute(*args, **options)
        except exact.Undecided as error:
            raise Undecided(str(error)) from None
    return run


def _eigenvalue_enclosures(M: Indexed):
    poly = _spectral_poly(M, "eigenvalue_enclosures")
    return enclosure_list(lambda bits: exact.eigenvalue_enclosures(poly, bits), BITS)


def _zeros_in_box(M: Indexed, re_lo, re_hi, im_lo, im_hi):
    poly, details = _spectral_poly(M, "zeros_in_box"), {}
    n = _certain(exact.zeros_in_box)(poly, re_lo, re_hi, im_lo, im_hi, BITS, details=details)
    return Count(n, details["bits"])


def _zeros_on_axis(M: Indexed, t_lo, t_hi):
    poly, details = _spectral_poly(M, "zeros_on_axis"), {}
    n = _certain(exact.zeros_on_axis)(poly, t_lo, t_hi, BITS, details=details)
    return Count(n, details["bits"])


def _interaction(V) -> list[list]:
    """The rows of an interaction matrix: a symmetric matrix, or a complex's Green function."""
    matrix = inv.green(V) if isinstance(V, Complex) else V.matrix
    rows = matrix.rows()
    if len(rows) != matrix.shape[1] or not matrix.is_symmetric():
        raise EvaluationError("the interaction matrix must be square and symmetric")
    return rows


def _free_energy(V, p, T):
    rows = _interaction(V)
    p = probability_vector(p, len(rows))
    U = sum(p[x] * rows[x][y] * p[y] for x in range(len(p)) if p[x]
            for y in range(len(p)) if p[y])
    return free_energy_value(Fraction(U), p, T, lambda bits: exact.entropy_ball(p, bits), BITS)


def _critical_points(V, T):
    if Fraction(T) <= 0:
        raise EvaluationError(f"critical_points needs a temperature T > 0, got {T}")
    found = energy.critical_points(_interaction(V), Fraction(T))
    return rounded_points(c.p for c in found)


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


def _range(n):
    if not isinstance(n, int) or isinstance(n, bool) or not 0 <= n <= 10_000:
        raise EvaluationError(f"range needs an integer from 0 to 10000, got {n}")
    return tuple(range(n))


def _with_keys(build):
    return lambda K: _keyed(K, build(K))




IMPLEMENTATIONS = {
    "simplices": _simplices, "vertices": _vertices, "facets": _facets, "dim": _dim,
    "size": _size, "f_vector": _f_vector, "omega": _omega, "range": _range, "euler": _euler, "wu": inv.wu,
    "connection": _with_keys(inv.connection), "green": _with_keys(inv.green),
    "hodge": _with_keys(inv.hodge), "signless_hodge": _with_keys(inv.signless_hodge),
    "dirac": _with_keys(inv.dirac), "boundary_matrix": _boundary_matrix,
    "identity": _identity, "transpose": _transpose, "abs": _abs, "det": _det,
    "trace": _trace, "rank": _rank, "kernel_dim": _kernel_dim, "charpoly": _charpoly,
    "is_reciprocal": _is_reciprocal, "signature": _signature, "positive": _positive,
    "negative": _negative, "multiplicity": _multiplicity, "zeta": _zeta, "betti": _betti,
    "homology": _homology, "torsion": _torsion,
    "is_manifold": inv.is_manifold, "is_manifold_with_boundary": inv.is_manifold_with_boundary,
    "is_closed_manifold": inv.is_closed_manifold,
    "is_sphere": inv.is_sphere, "is_ball": inv.is_ball,
    "h_vector": inv.h_vector, "curvature": _curvature, "index": _index,
    "star": _star, "closed_star": _closed_star, "link": _link, "unit_sphere": _unit_sphere,
    "boundary": ops.boundary, "interior": _interior, "refine": _refine, "join": ops.join,
    "cone": ops.cone, "suspension": ops.suspension, "product": ops.product,
    "skeleton": _skeleton, "union": _union,
    "eigenvalue_enclosures": _eigenvalue_enclosures, "zeros_in_box": _zeros_in_box,
    "zeros_on_axis": _zeros_on_axis, "re": real_part, "im": imaginary_part,
    "free_energy": _free_energy,
    "critical_points": _critical_points,
}

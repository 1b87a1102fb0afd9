"""The independent certified numerics (verifier.independent.certified) against references.

Three kinds of checks: (1) every enclosure contains a high-precision reference value
computed with mpmath at 60 digits (mpmath.eigsy for eigenvalues, a direct mpmath sum for
zeta values, mpmath.log for entropies); (2) agreement with the main backend
(verifier.exact.certified, python-flint arb/acb -- imported only here, never by the
module under test); (3) facts derived by hand, each with its reasoning.  Finally, the
module must run in a process that never loads python-flint.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time
from fractions import Fraction
from pathlib import Path

import mpmath
import pytest

from verifier.claims.errors import Undecided
from verifier.complex import Complex
from verifier.independent import certified as ind
from verifier.independent.claims import connection, refine
from verifier.independent.matrix import Matrix, Poly, charpoly

ROOT = Path(__file__).resolve().parent.parent


# ------------------------------------------------------------------ helpers
def _connection(facets) -> Matrix:
    return connection(Complex.from_facets(facets)).matrix


def _refined_cycle_square(n: int) -> Poly:
    """Characteristic polynomial of L^2, L the connection matrix of the barycentric
    refinement of the n-cycle (2n vertices and 2n edges: 4n simplices)."""
    L = connection(refine(Complex.from_facets([[i, (i + 1) % n] for i in range(n)]))).matrix
    return charpoly(L @ L)


def _main_poly(P: Poly):
    from verifier.exact.poly import Poly as MainPoly
    return MainPoly(list(P.coeffs))


def _reference_eigenvalues(M: Matrix) -> list:
    with mpmath.workdps(60):
        values = mpmath.eigsy(mpmath.matrix(M.rows()), eigvals_only=True)
        return sorted(values[i] for i in range(len(values)))


def _reference_zeta(M: Matrix, s_re: Fraction, s_im: Fraction):
    with mpmath.workdps(60):
        s = mpmath.mpc(mpmath.mpf(s_re.numerator) / s_re.denominator,
                       mpmath.mpf(s_im.numerator) / s_im.denominator)
        # mpmath.power uses the principal branch: log(lambda) = log|lambda| + i pi, lambda < 0
        return mpmath.fsum(mpmath.power(lam, -s) for lam in _reference_eigenvalues(M))


def _contains(interval, value, tol=mpmath.mpf(10) ** -45) -> bool:
    """value (accurate to ~1e-55) lies in the interval, up to the reference's accuracy."""
    lo, hi = interval
    with mpmath.workdps(60):
        lo = mpmath.mpf(lo.numerator) / lo.denominator
        hi = mpmath.mpf(hi.numerator) / hi.denominator
        return lo - tol <= value <= hi + tol


def _meets(a, b) -> bool:
    return a[0] <= b[1] and b[0] <= a[1]


EDGE = Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]])
SMALL = {
    "edge": EDGE,
    "path3": _connection([[1, 2], [2, 3]]),
    "triangle": _connection([[1, 2, 3]]),
    "repeated": Matrix.from_rows([[2, 1, 1, 0], [1, 2, 1, 0], [1, 1, 2, 0], [0, 0, 0, 1]]),
}


@pytest.fixture(scope="module")
def cycle6() -> Poly:
    return _refined_cycle_square(6)


# ------------------------------------------------------------------ eigenvalues
@pytest.mark.parametrize("name", sorted(SMALL))
def test_eigenvalue_enclosures_contain_mpmath_eigsy(name):
    # Reference: mpmath.eigsy at 60 digits (independent reference library).
    M = SMALL[name]
    bits = 100
    found = ind.eigenvalue_enclosures(charpoly(M), bits)
    reference = _reference_eigenvalues(M)
    assert len(found) == M.shape[0]
    for (lo, hi), value in zip(found, reference):
        assert _contains((lo, hi), value)
        assert hi - lo <= Fraction(max(1, abs(lo), abs(hi)), 2 ** bits)
    assert all(a[0] <= b[0] for a, b in zip(found, found[1:]))


def test_edge_spectrum_from_memory():
    # From memory: the connection matrix of an edge has eigenvalues 1 - sqrt 2, 1, 1 + sqrt 2;
    # the rational eigenvalue 1 comes out as the exact point interval (1, 1).
    (a, b), (c, d), (e, f) = ind.eigenvalue_enclosures(charpoly(EDGE), 64)
    assert (c, d) == (1, 1)
    assert b < 0 and (1 - b) ** 2 <= 2 <= (1 - a) ** 2      # a <= 1 - sqrt 2 <= b
    assert e > 1 and (e - 1) ** 2 <= 2 <= (f - 1) ** 2      # e <= 1 + sqrt 2 <= f


def test_repeated_eigenvalues_are_repeated():
    # J + I (3x3, J all ones) has eigenvalues 1, 1, 4 (common practice, no source),
    # plus the eigenvalue 1 of the 1x1 block: 1 with multiplicity 3.
    found = ind.eigenvalue_enclosures(charpoly(SMALL["repeated"]), 32)
    assert found == [(1, 1)] * 3 + [(4, 4)]


def test_refined_cycle_spectrum_matches_eigsy_and_main_backend(cycle6):
    # References: mpmath.eigsy at 60 digits, and the main backend (python-flint arb).
    from verifier.exact import certified as main
    L = connection(refine(Complex.from_facets([[i, (i + 1) % 6] for i in range(6)]))).matrix
    M = L @ L
    found = ind.eigenvalue_enclosures(cycle6, 160)
    for interval, value in zip(found, _reference_eigenvalues(M)):
        assert _contains(interval, value)
    theirs = main.eigenvalue_enclosures(_main_poly(cycle6), prec=160)
    assert len(found) == len(theirs) == 24
    assert all(_meets(a, b) for a, b in zip(found, theirs))


def test_non_real_roots_and_bad_input_are_refused():
    with pytest.raises(ValueError, match="non-real"):
        ind.eigenvalue_enclosures(Poly([1, 0, 1]), 32)          # x^2 + 1
    with pytest.raises(ValueError, match="bits"):
        ind.eigenvalue_enclosures(Poly([1, 1]), 8)
    with pytest.raises(ValueError, match="bits"):
        ind.eigenvalue_enclosures(Poly([1, 1]), 32.0)
    with pytest.raises(ValueError, match="integer coefficients"):
        ind.eigenvalue_enclosures(Poly([Fraction(1, 2), 1]), 32)
    with pytest.raises(ValueError, match="zero polynomial"):
        ind.eigenvalue_enclosures(Poly([]), 32)
    with pytest.raises(ValueError, match="Poly"):
        ind.eigenvalue_enclosures([1, 1], 32)


def test_zero_eigenvalue_is_enclosed_exactly():
    # x^3 - x has the roots -1, 0, 1 (common practice, no source).
    assert ind.eigenvalue_enclosures(Poly([0, -1, 0, 1]), 32) == [(-1, -1), (0, 0), (1, 1)]


# ------------------------------------------------------------------ zeta values
@pytest.mark.parametrize("name", sorted(SMALL))
@pytest.mark.parametrize("s", [(Fraction(1, 3), Fraction(2)), (Fraction(-1, 2), Fraction(5, 7)),
                               (Fraction(2), Fraction(0))])
def test_zeta_enclosure_contains_mpmath_sum_and_meets_main_backend(name, s):
    # References: a direct mpmath sum of lambda^(-s) at 60 digits over mpmath.eigsy
    # eigenvalues (principal branch); the main backend's zeta_ball (python-flint acb).
    from verifier.exact import certified as main
    M = SMALL[name]
    P = charpoly(M)
    bits = 120
    (re_lo, re_hi), (im_lo, im_hi) = ind.zeta_enclosure(P, s[0], s[1], bits)
    value = _reference_zeta(M, *s)
    assert _contains((re_lo, re_hi), value.real) and _contains((im_lo, im_hi), value.imag)
    assert re_hi - re_lo < Fraction(1, 2 ** (bits - 16)) and im_hi - im_lo < Fraction(1, 2 ** (bits - 16))
    theirs = main.zeta_ball(_main_poly(P), s, prec=bits)
    assert _meets((re_lo, re_hi), theirs[0]) and _meets((im_lo, im_hi), theirs[1])


def test_zeta_needs_an_invertible_matrix():
    with pytest.raises(ValueError, match="0 is an eigenvalue"):
        ind.zeta_enclosure(Poly([0, -1, 0, 1]), 1, 0, 32)
    with pytest.raises(ValueError, match="s_im"):
        ind.zeta_enclosure(Poly([1, 1]), 1, 0.5, 32)


# ------------------------------------------------------------------ zero counts
def test_refined_six_cycle_zero_counts_agree_with_main_backend(cycle6):
    # Reference: the main backend (arb/acb argument principle); the brief reports 16, 16, 18.
    from verifier.exact import certified as main
    theirs = _main_poly(cycle6)
    half = Fraction(1, 2)
    start = time.perf_counter()
    box = ind.zeros_in_box(cycle6, -half, half, 0, 20, 160)
    on_axis = ind.zeros_on_axis(cycle6, 0, 20, 160)
    wide = ind.zeros_in_box(cycle6, -1, 1, 0, 20, 160)
    elapsed = time.perf_counter() - start
    assert box == main.zeros_in_box(theirs, -half, half, 0, 20, prec=160)
    assert on_axis == main.zeros_on_axis(theirs, 0, 20, prec=160)
    assert wide == main.zeros_in_box(theirs, -1, 1, 0, 20, prec=160)
    assert (box, on_axis, wide) == (16, 16, 18)
    # Consistency (common practice): the axis zeros with 0 < t < 20 lie in the open box
    # (f(0) = 24 != 0), and the narrow box lies in the wide one.
    assert on_axis <= box <= wide
    assert elapsed < 20


def test_off_axis_pair_of_the_refined_six_cycle(cycle6):
    # The main backend reports an off-axis pair near +-0.751 + 8.549 i (from the brief);
    # P is reciprocal, so zeta(s) = zeta(-s) [Knill, arXiv:1803.01464] and the pair is
    # symmetric.  Each small box holds one zero, as the main backend also finds.
    from verifier.exact import certified as main
    theirs = _main_poly(cycle6)
    right = (Fraction(7, 10), Fraction(8, 10), Fraction(85, 10), Fraction(86, 10))
    left = (-right[1], -right[0], right[2], right[3])
    for box in (right, left):
        assert ind.zeros_in_box(cycle6, *box, 160) == 1
        assert main.zeros_in_box(theirs, *box, prec=160) == 1


def test_refined_eight_cycle_agrees_with_main_backend():
    # Reference: the main backend; the brief asks for under ~20 s here.
    from verifier.exact import certified as main
    P = _refined_cycle_square(8)
    theirs = _main_poly(P)
    half = Fraction(1, 2)
    start = time.perf_counter()
    box = ind.zeros_in_box(P, -half, half, 0, 20, 160)
    on_axis = ind.zeros_on_axis(P, 0, 20, 160)
    elapsed = time.perf_counter() - start
    assert box == main.zeros_in_box(theirs, -half, half, 0, 20, prec=160)
    assert on_axis == main.zeros_on_axis(theirs, 0, 20, prec=160)
    assert on_axis <= box
    assert elapsed < 20


PHI2 = Poly([1, -3, 1])                        # roots phi^2, phi^-2 (phi the golden ratio)
DOUBLE = Poly([1, -2, 1]) * PHI2               # roots 1, 1, phi^2, phi^-2


def test_simple_zeros_of_a_hyperbolic_cosine():
    # zeta = phi^(-2s) + phi^(2s) = 2 cosh(2 s log phi): simple zeros exactly at
    # s = i pi (2k + 1) / (4 log phi) = i * 1.632..., i * 4.897..., all on the axis
    # (common practice, no source; log phi from mpmath).
    t1 = mpmath.pi / (4 * mpmath.log(mpmath.phi))
    assert 1.63 < t1 < 1.64 and 4.89 < 3 * t1 < 4.90
    assert ind.zeros_on_axis(PHI2, 0, 5, 64) == 2
    assert ind.zeros_on_axis(PHI2, 0, Fraction(163, 100), 64) == 0
    assert ind.zeros_on_axis(PHI2, 0, Fraction(164, 100), 64) == 1
    assert ind.zeros_in_box(PHI2, -1, 1, 0, 5, 64) == 2
    assert ind.zeros_in_box(PHI2, Fraction(1, 100), 1, 0, 5, 64) == 0


def test_zero_just_beyond_an_endpoint_is_not_counted():
    # Q = (x - 1)(x^2 - 3x + 1), roots 1, phi^2, phi^-2, is reciprocal up to sign;
    # f(t) = 1 + 2 cos(2 t log phi) has its first zero where the cosine is -1/2, at
    # t = pi / (3 log phi) = 2.17616... (common practice; value from mpmath).  Segments
    # ending just before / after it: the last piece has f small and one sign there.
    Q = Poly([-1, 1]) * PHI2
    z = mpmath.pi / (3 * mpmath.log(mpmath.phi))
    assert 2.17616 < z < 2.17617
    assert ind.zeros_on_axis(Q, 0, Fraction(217616, 100000), 64) == 0
    assert ind.zeros_on_axis(Q, Fraction(217617, 100000), 3, 64) == 0
    assert ind.zeros_on_axis(Q, 0, Fraction(217617, 100000), 64) == 1
    assert ind.zeros_in_box(Q, -1, 1, 0, Fraction(217616, 100000), 64) == 0
    assert ind.zeros_in_box(Q, -1, 1, 0, Fraction(217617, 100000), 64) == 1


def test_double_zero_is_counted_twice_in_a_box_and_undecided_on_the_axis():
    # zeta = 2 + 2 cosh(2 s log phi) = 4 cosh^2(s log phi): double zeros at
    # s = i pi (2k + 1) / (2 log phi) = i * 3.264..., i * 9.79... (common practice).
    # The argument principle counts the first one twice; on the axis f(t) = 2 + 2 cos(...)
    # touches 0 without a sign change, so no certified count exists.
    from verifier.exact import certified as main
    assert ind.zeros_in_box(DOUBLE, -1, 1, 0, 5, 64) == 2
    assert main.zeros_in_box(_main_poly(DOUBLE), -1, 1, 0, 5, prec=64) == 2
    with pytest.raises(Undecided, match=r"\[0, 5\].*256 bits"):
        ind.zeros_on_axis(DOUBLE, 0, 5, 64, max_bits=256)
    assert ind.zeros_on_axis(DOUBLE, 0, 3, 64) == 0          # the double zero is at 3.26


def test_box_whose_side_runs_through_a_zero_is_undecided():
    # The left side Re s = 0 of [0, 1] x [0, 5] passes through the zero i * 1.632... of
    # 2 cosh(2 s log phi) (see above): the argument principle cannot apply.
    with pytest.raises(Undecided, match=r"\[0, 1\] x \[0, 5\].*256 bits"):
        ind.zeros_in_box(PHI2, 0, 1, 0, 5, 64, max_bits=256)


def test_zero_counting_refuses_bad_input():
    with pytest.raises(ValueError, match="empty rectangle"):
        ind.zeros_in_box(PHI2, 1, 1, 0, 5, 64)
    with pytest.raises(ValueError, match="0 is an eigenvalue"):
        ind.zeros_in_box(Poly([0, -1, 0, 1]), -1, 1, 0, 5, 64)
    with pytest.raises(ValueError, match="not closed under lambda -> 1/lambda"):
        ind.zeros_on_axis(Poly([2, -3, 1]), 0, 5, 64)            # roots 1, 2
    with pytest.raises(ValueError, match="positive"):
        ind.zeros_on_axis(Poly([1, 3, 1]), 0, 5, 64)             # roots -phi^2, -phi^-2
    with pytest.raises(ValueError, match="t_lo < t_hi"):
        ind.zeros_on_axis(PHI2, 2, 1, 64)
    with pytest.raises(ValueError, match="max_bits"):
        ind.zeros_on_axis(PHI2, 0, 1, 64, max_bits=4)


# ------------------------------------------------------------------ entropy
@pytest.mark.parametrize("p, reference", [
    ([Fraction(1, 2), Fraction(1, 2)], lambda: mpmath.log(2)),
    ([Fraction(1, 3)] * 3, lambda: mpmath.log(3)),
    ([Fraction(1, 4), Fraction(3, 4), 0],
     lambda: -(mpmath.mpf(1) / 4) * mpmath.log(mpmath.mpf(1) / 4)
     - (mpmath.mpf(3) / 4) * mpmath.log(mpmath.mpf(3) / 4)),
])
def test_entropy_encloses_mpmath_value_and_meets_main_backend(p, reference):
    # References: mpmath.log at 60 digits; the main backend's entropy_ball (arb).
    from verifier.exact import certified as main
    lo, hi = ind.entropy_enclosure(p, 100)
    with mpmath.workdps(60):
        assert _contains((lo, hi), reference())
    assert 0 < hi - lo < Fraction(1, 2 ** 90)
    assert _meets((lo, hi), main.entropy_ball(p, prec=100))


def test_entropy_of_point_masses_is_exactly_zero_and_bad_input_is_refused():
    # 0 log 0 = 0 and 1 log 1 = 0 (Shannon 1948 convention).
    assert ind.entropy_enclosure([0, 1, 0], 32) == (0, 0)
    assert ind.entropy_enclosure([Fraction(1)], 32) == (0, 0)
    with pytest.raises(ValueError, match=r"p\[1\]"):
        ind.entropy_enclosure([Fraction(3, 2), Fraction(-1, 2)], 32)
    with pytest.raises(ValueError, match=r"p\[0\]"):
        ind.entropy_enclosure([0.5, Fraction(1, 2)], 32)


# ------------------------------------------------------------------ critical points
@pytest.mark.parametrize("T", [Fraction(1, 10), Fraction(1), Fraction(3)])
def test_identity_interaction_has_only_the_uniform_minimum(T):
    # V = I: F_T(p) = sum p^2 + T sum p log p has Hessian 2 I + T diag(1/p) > 0, so F_T
    # is strictly convex on the simplex and has one critical point; by symmetry under
    # permutations it is the uniform point, a minimum (common practice, no source).
    points = ind.critical_points([[1, 0, 0], [0, 1, 0], [0, 0, 1]], T)
    assert len(points) == 1
    p, kind = points[0]
    assert kind == "minimum" and max(abs(x - 1 / 3) for x in p) < 1e-9


def test_two_state_antiferro_interaction_splits_below_temperature_one():
    # V = [[0, 1], [1, 0]], p = (x, 1 - x): F(x) = 2 x (1 - x) + T (x log x + (1-x) log(1-x)),
    # F'(x) = 2 - 4x + T log(x / (1 - x)), F''(x) = -4 + T / (x (1 - x)) (derived by hand).
    # F'(1/2) = 0 always; F''(1/2) = 4 (T - 1).  For T < 1: F' -> -oo at 0+, F' rises while
    # x (1 - x) < T/4 and falls after, reaching 0 at 1/2, so F' has exactly one zero x0 in
    # (0, 1/2): two symmetric minima (x0, 1 - x0), (1 - x0, x0) and the uniform point, a
    # maximum along the one-dimensional simplex, with the larger F.  For T > 1, F'' > 0:
    # only the uniform minimum.
    T = Fraction(1, 2)
    points = ind.critical_points([[0, 1], [1, 0]], T)
    assert [kind for _, kind in points] == ["minimum", "minimum", "maximum"]
    # Reference for x0: mpmath.findroot (bisection) on F'(x) = 0 in [1e-6, 0.4], where
    # F'(1e-6) < 0 < F'(0.4) and F' has no other zero (see above).
    x0 = mpmath.findroot(lambda x: 2 - 4 * x + mpmath.mpf(1) / 2 * mpmath.log(x / (1 - x)),
                         (mpmath.mpf("1e-6"), mpmath.mpf("0.4")), solver="bisect")
    minima = sorted(min(p) for p, _ in points[:2])
    assert all(abs(m - float(x0)) < 1e-9 for m in minima)
    assert max(abs(x - 0.5) for x in points[2][0]) < 1e-12
    hot = ind.critical_points([[0, 1], [1, 0]], Fraction(2))
    assert len(hot) == 1 and hot[0][1] == "minimum"
    assert points == ind.critical_points([[0, 1], [1, 0]], T)          # deterministic


def test_critical_points_refuse_bad_input():
    with pytest.raises(ValueError, match="temperature"):
        ind.critical_points([[1, 0], [0, 1]], 0)
    with pytest.raises(ValueError, match="temperature"):
        ind.critical_points([[1, 0], [0, 1]], Fraction(-1))
    with pytest.raises(ValueError, match="square"):
        ind.critical_points([[1, 0], [0, 1, 2]], 1)
    with pytest.raises(ValueError, match="symmetric"):
        ind.critical_points([[1, 2], [0, 1]], 1)


# ------------------------------------------------------------------ independence
def test_module_runs_without_python_flint():
    # SPEC: the independent backend must never load python-flint, verifier.exact,
    # verifier.invariants, verifier.operations, verifier.claims.backend or verifier.energy.
    program = (
        "import sys\n"
        "from verifier.independent import certified as c\n"
        "from verifier.independent.matrix import Poly\n"
        "P = Poly([1, -3, 1])\n"
        "c.eigenvalue_enclosures(P, 64); c.zeta_enclosure(P, 1, 1, 64)\n"
        "assert c.zeros_in_box(P, -1, 1, 0, 5, 64) == 2\n"
        "assert c.zeros_on_axis(P, 0, 5, 64) == 2\n"
        "c.entropy_enclosure([1, 1], 64); c.critical_points([[0, 1], [1, 0]], 1)\n"
        "bad = ['flint', 'verifier.exact', 'verifier.invariants', 'verifier.operations',\n"
        "       'verifier.claims.backend', 'verifier.energy']\n"
        "print('flint' in sys.modules, [m for m in bad if m in sys.modules])\n")
    env = dict(os.environ, SYMPY_GROUND_TYPES="python",
               PYTHONPATH=os.pathsep.join([str(ROOT), os.environ.get("PYTHONPATH", "")]))
    done = subprocess.run([sys.executable, "-c", program], capture_output=True, text=True,
                          env=env, cwd=str(ROOT), timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "False []"


def test_module_source_imports_nothing_forbidden():
    # SPEC (independence): a static check of the import statements of the module, which
    # also covers imports on code paths the subprocess run above does not reach.
    import ast
    forbidden = {"flint", "verifier.exact", "verifier.invariants", "verifier.operations",
                 "verifier.claims.backend", "verifier.energy"}
    tree = ast.parse((ROOT / "verifier" / "independent" / "certified.py").read_text())
    imported = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            imported |= {alias.name for alias in node.names}
        elif isinstance(node, ast.ImportFrom):
            base = node.module or ""
            if node.level:
                parent = "verifier.independent".rsplit(".", node.level - 1)[0]
                base = f"{parent}.{base}" if base else parent
            imported |= {base} | {f"{base}.{alias.name}" for alias in node.names}
    assert "verifier.claims.errors.Undecided" in imported     # the check sees relative imports
    assert not {name for name in imported
                for f in forbidden if name == f or name.startswith(f + ".")}

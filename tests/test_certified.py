"""Checks of verifier.exact.certified (ball-arithmetic enclosures) against independent references.

python-flint is never checked against itself.  References used here:
- mpmath at 60 significant digits (``mpmath.eigsy`` for eigenvalues, ``mpmath.exp``/``log``
  for zeta values, ``mpmath.findroot`` and a densely sampled argument principle for zeros);
- sympy's exact real roots (``Poly.all_roots``, CRootOf, evaluated with ``evalf(50)``), run in
  a separate process with ``SYMPY_GROUND_TYPES=python`` so that python-flint is not involved;
- exact rational traces tr(M^-k) from verifier.exact.Matrix (an exact path, no balls).
A reference value x computed to d digits is compared with the enclosure widened by
10^-(d-5), to absorb the rounding of the reference itself; that slack is far below the
enclosure widths (about 2^-100 relative and less), so the containment checks are not loose.
"""

from __future__ import annotations

import json
import os
import random
import subprocess
import sys
from fractions import Fraction

import mpmath
import pytest

from verifier.complex import Complex
from verifier.exact import Matrix, charpoly_of_square
from verifier.exact.certified import (Ball, Undecided, compare, eigenvalue_enclosures,
                                      zeros_in_box, zeros_on_axis, zeta_ball)
from verifier.invariants import connection
from verifier.operations import refine

DPS = 60


def _cycle(n: int) -> Complex:
    return Complex.from_facets([[i, (i + 1) % n] for i in range(n)])


def _refined_cycle_square() -> Matrix:
    """L^2 for L the connection matrix of the refined 6-cycle (24 simplices)."""
    L = connection(refine(_cycle(6)))
    return L @ L


def _random_symmetric(rng: random.Random, n: int) -> Matrix:
    rows = [[0] * n for _ in range(n)]
    for i in range(n):
        for j in range(i, n):
            rows[i][j] = rows[j][i] = rng.randint(-3, 3)
    return Matrix.from_rows(rows)


SMALL = {
    "edge L": connection(Complex.from_facets([[1, 2]])),
    "triangle L": connection(Complex.from_facets([[0, 1, 2]])),
    "identity 3 (triple eigenvalue)": Matrix.identity(3),
    "block with repeated eigenvalues": Matrix.from_rows([[2, 1, 0, 0], [1, 2, 0, 0],
                                                         [0, 0, 2, 1], [0, 0, 1, 2]]),
    "path P3 L": connection(Complex.from_facets([[0, 1], [1, 2]])),
}


def _mp_eigenvalues(M: Matrix) -> list:
    with mpmath.workdps(DPS):
        values = mpmath.eigsy(mpmath.matrix(M.rows()), eigvals_only=True)
        return sorted(values[i] for i in range(M.shape[0]))


def _contains(interval, x, digits: int) -> bool:
    lo, hi = interval
    slack = mpmath.mpf(10) ** (-(digits - 5))
    with mpmath.workdps(digits + 10):
        return mpmath.mpf(lo.numerator) / lo.denominator - slack <= x <= \
            mpmath.mpf(hi.numerator) / hi.denominator + slack


# ------------------------------------------------------------------ eigenvalues
@pytest.mark.parametrize("name", sorted(SMALL) + ["refined 6-cycle L^2"])
def test_eigenvalue_enclosures_contain_mpmath_eigsy(name):
    # Reference: mpmath.eigsy (Jacobi eigenvalue iteration) at 60 digits, independent of flint.
    M = _refined_cycle_square() if name.startswith("refined") else SMALL[name]
    enclosures = eigenvalue_enclosures(M, prec=128)
    reference = _mp_eigenvalues(M)
    assert len(enclosures) == M.shape[0]
    assert all(lo <= hi for lo, hi in enclosures)
    assert [lo for lo, _ in enclosures] == sorted(lo for lo, _ in enclosures)
    for interval, x in zip(enclosures, reference):
        assert _contains(interval, x, DPS)
        assert interval[1] - interval[0] <= Fraction(1, 2 ** 100) * (1 + abs(interval[0]))


def test_eigenvalue_enclosures_on_random_symmetric_matrices():
    # Quantifies over 12 seeded random symmetric integer matrices of order 2..7, entries in
    # [-3, 3] (singular ones and repeated eigenvalues included); reference mpmath.eigsy, 60 digits.
    rng = random.Random(6)
    for _ in range(12):
        M = _random_symmetric(rng, rng.randint(2, 7))
        for interval, x in zip(eigenvalue_enclosures(M, prec=96), _mp_eigenvalues(M)):
            assert _contains(interval, x, DPS)


SYMPY_SCRIPT = r"""
import json, sys
import sympy
x = sympy.Symbol("x")
out = {}
for name, rows in json.loads(sys.stdin.read()).items():
    p = sympy.Poly(sympy.Matrix(rows).charpoly(x).as_expr(), x)
    out[name] = [str(r.evalf(50)) for r in p.all_roots()]
print(json.dumps(out))
"""


def test_eigenvalue_enclosures_contain_sympy_exact_roots():
    # Reference: sympy's exact real roots (CRootOf via Poly.all_roots, with multiplicity)
    # evaluated to 50 digits, in a separate process with SYMPY_GROUND_TYPES=python.
    env = dict(os.environ, SYMPY_GROUND_TYPES="python")
    data = json.dumps({name: M.rows() for name, M in SMALL.items()})
    done = subprocess.run([sys.executable, "-c", SYMPY_SCRIPT], input=data, text=True,
                          capture_output=True, env=env, timeout=120, check=True)
    roots = json.loads(done.stdout)
    for name, M in SMALL.items():
        enclosures = eigenvalue_enclosures(M, prec=128)
        with mpmath.workdps(DPS):
            reference = sorted(mpmath.mpf(r) for r in roots[name])
        assert len(reference) == len(enclosures) == M.shape[0]
        for interval, r in zip(enclosures, reference):
            assert _contains(interval, r, 50), (name, interval, r)


def test_exact_rational_eigenvalue_is_an_exact_enclosure():
    # Hand computation: the edge's connection matrix [[1,0,1],[0,1,1],[1,1,1]] has
    # eigenvalues 1 - sqrt 2, 1, 1 + sqrt 2 (the eigenvector (1, -1, 0) gives 1).
    enclosures = eigenvalue_enclosures(SMALL["edge L"], prec=64)
    assert enclosures[1] == (1, 1)
    assert enclosures[0][0] < 1 - Fraction(1414, 1000) < enclosures[0][1] + Fraction(1, 10 ** 3)
    assert eigenvalue_enclosures(Matrix.identity(3)) == [(1, 1)] * 3


def test_enclosures_from_a_characteristic_polynomial_match_the_matrix():
    # Reference: charpoly_of_square (Graeffe root squaring, exact) gives det(x - L^2) without
    # forming L^2; the enclosures must contain the same mpmath.eigsy eigenvalues of L^2
    # (60 digits).  Also: each root interval of the polynomial form is disjoint from the next.
    L = connection(refine(_cycle(6)))
    from_poly = eigenvalue_enclosures(charpoly_of_square(L), prec=128)
    for interval, x in zip(from_poly, _mp_eigenvalues(L @ L)):
        assert _contains(interval, x, DPS)
    distinct = sorted(set(from_poly))
    assert all(a[1] < b[0] for a, b in zip(distinct, distinct[1:]))


# ------------------------------------------------------------------ zeta values
def _mp_zeta(M: Matrix, s) -> mpmath.mpc:
    with mpmath.workdps(DPS):
        s = mpmath.mpc(*(mpmath.mpf(Fraction(c).numerator) / Fraction(c).denominator for c in s))
        # principal branch, as mpmath's power of a negative real uses log|x| + i pi
        return mpmath.fsum(mpmath.power(mpmath.mpc(lam), -s) for lam in _mp_eigenvalues(M))


@pytest.mark.parametrize("s", [(2, 0), (Fraction(1, 2), 3), (-1, Fraction(17, 4)), (0, 12),
                               (Fraction(-3, 7), Fraction(-5, 2))])
@pytest.mark.parametrize("name", ["refined 6-cycle L^2", "triangle L", "path P3 L"])
def test_zeta_ball_contains_mpmath_value(name, s):
    # Reference: mpmath at 60 digits, sum of lambda^(-s) over mpmath.eigsy eigenvalues
    # (principal branch for negative lambda, mpmath.power convention).
    M = _refined_cycle_square() if name.startswith("refined") else SMALL[name]
    re, im = zeta_ball(M, s, prec=160)
    value = _mp_zeta(M, s)
    assert _contains(re, value.real, DPS) and _contains(im, value.imag, DPS)
    assert re[1] - re[0] < Fraction(1, 2 ** 100) * (1 + abs(re[0]))


def test_zeta_ball_at_integers_contains_the_exact_trace():
    # Reference: zeta_K(k) = tr M^-k exactly, by exact rational inversion (verifier.exact.Matrix).
    M = _refined_cycle_square()
    for k in (1, 2, 3, -2):
        exact = (M ** (-k)).trace()
        (lo, hi), (ilo, ihi) = zeta_ball(M, k)
        assert lo <= exact <= hi and ilo <= 0 <= ihi


def test_functional_equation_is_undecided_not_passed():
    # Knill, arXiv:1803.01464 (2018): for a 1-dimensional complex the spectrum of L^2 is
    # closed under lambda -> 1/lambda, so zeta(s) = zeta(-s).  Both sides are equal, hence
    # a certified comparison of balls must say "undecided" at every precision.
    M = _refined_cycle_square()
    s, minus_s = (Fraction(1, 3), Fraction(7, 2)), (Fraction(-1, 3), Fraction(-7, 2))
    for part in (0, 1):
        a = lambda prec, part=part: zeta_ball(M, s, prec)[part]
        b = lambda prec, part=part: zeta_ball(M, minus_s, prec)[part]
        assert compare(a, b) == "undecided"
    # zeta(2) against the same number computed differently (exact trace of M^-2).
    exact = (M ** (-2)).trace()
    assert compare(lambda prec: zeta_ball(M, 2, prec)[0], exact) == "undecided"
    # ... while a true strict inequality is decided: zeta(2) > zeta(2) - 2^-200.
    assert compare(lambda prec: zeta_ball(M, 2, prec)[0], exact - Fraction(1, 2 ** 200)) == "greater"
    assert compare(exact - 1, lambda prec: zeta_ball(M, 2, prec)[0]) == "less"


def test_compare_on_plain_intervals():
    # Common practice, no source: interval order; overlapping intervals are never "equal".
    assert compare((0, 1), (2, 3)) == "less"
    assert compare(Ball(5, 1), (2, 3)) == "greater"
    assert compare(Ball(2, 1), Ball(2, 1)) == "undecided"
    assert compare(3, 3) == "undecided"


# ------------------------------------------------------------------ zeros
def _mp_winding(M: Matrix, corners, samples: int = 800) -> int:
    """Independent count: argument principle in mpmath (30 digits), boundary sampled densely
    and principal arguments of successive ratios summed (not rigorous; a reference only)."""
    with mpmath.workdps(30):
        logs = [mpmath.log(lam) for lam in _mp_eigenvalues(M)]
        zeta = lambda s: mpmath.fsum(mpmath.exp(-s * l) for l in logs)
        total, previous = mpmath.mpf(0), None
        points = [mpmath.mpc(*c) for c in corners]
        for a, b in zip(points, points[1:] + points[:1]):
            for k in range(samples):
                value = zeta(a + (b - a) * k / samples)
                if previous is not None:
                    total += mpmath.arg(value / previous)
                previous = value
        total += mpmath.arg(zeta(points[0]) / previous)
        return int(mpmath.nint(total / (2 * mpmath.pi)))


def _mp_axis_sign_changes(M: Matrix, t_lo, t_hi, samples: int = 2000) -> int:
    """Independent count: sign changes of Re zeta(i t) on a uniform grid, mpmath 30 digits."""
    with mpmath.workdps(30):
        logs = [mpmath.log(lam) for lam in _mp_eigenvalues(M)]
        values = [mpmath.fsum(mpmath.cos(t * l) for l in logs)
                  for t in (t_lo + (t_hi - t_lo) * mpmath.mpf(k) / samples for k in range(samples + 1))]
        return sum(1 for u, v in zip(values, values[1:]) if u * v < 0)


def test_zeros_of_refined_cycle_zeta_on_axis_and_in_narrow_box():
    # Knill, arXiv:1803.01464 (2018): L^2 of a 1-dimensional complex has reciprocal spectrum,
    # so zeta(i t) is real.  References for the counts: sign changes of zeta(i t) on a
    # 2000-point grid and the argument principle sampled densely, both in mpmath.
    M = _refined_cycle_square()
    on_axis = zeros_on_axis(M, 0, 20)
    assert on_axis == _mp_axis_sign_changes(M, 0, 20) == 16
    narrow = zeros_in_box(M, Fraction(-1, 2), Fraction(1, 2), 0, 20)
    assert narrow == on_axis
    assert narrow == _mp_winding(M, [(-0.5, 0), (0.5, 0), (0.5, 20), (-0.5, 20)])
    # Symmetric about the real axis too: zeta(conj s) = conj zeta(s).
    assert zeros_in_box(M, Fraction(-1, 2), Fraction(1, 2), -20, 20) == 2 * on_axis


def test_wider_box_catches_an_off_axis_pair():
    # Found while testing: for the refined 6-cycle the box [-1, 1] x [0, 20] holds two zeros
    # off the imaginary axis, near +-0.751 + 8.549 i.  Independent references:
    # mpmath.findroot started at 0.75 + 8.55 i, and the sampled argument principle (mpmath).
    M = _refined_cycle_square()
    wide = zeros_in_box(M, -1, 1, 0, 20)
    assert wide == _mp_winding(M, [(-1, 0), (1, 0), (1, 20), (-1, 20)]) == 18
    with mpmath.workdps(30):
        logs = [mpmath.log(lam) for lam in _mp_eigenvalues(M)]
        root = mpmath.findroot(lambda s: mpmath.fsum(mpmath.exp(-s * l) for l in logs),
                               mpmath.mpc(0.75, 8.55))
    assert 0.7 < root.real < 0.8 and 8.5 < root.imag < 8.6
    assert zeros_in_box(M, Fraction(1, 2), 1, 8, 9) == 1     # the off-axis zero itself
    assert zeros_in_box(M, -1, 1, 0, Fraction(17, 2)) == zeros_on_axis(M, 0, Fraction(17, 2)) == 7


def test_zero_on_the_boundary_is_undecided():
    # The left side Re s = 0 of this box passes through zeros of zeta (they lie on the axis,
    # Knill arXiv:1803.01464 reciprocity + the counts above), so no winding number exists.
    M = _refined_cycle_square()
    with pytest.raises(Undecided, match="not certified at 256 bits"):
        zeros_in_box(M, 0, 1, 0, 5, max_prec=256)


def test_zeros_of_two_term_zeta_by_hand():
    # Hand computation: [[2,1],[1,1]] has eigenvalues phi^2, phi^-2 (phi the golden ratio),
    # so zeta(i t) = 2 cos(2 t log phi), with zeros at t = (k + 1/2) pi / (2 log phi):
    # 1.632, 4.897, 8.161, ... ; on [0, 10] there are 3.
    M = Matrix.from_rows([[2, 1], [1, 1]])
    assert zeros_on_axis(M, 0, 10) == 3
    assert zeros_in_box(M, -2, 2, 0, 10) == 3     # zeta = 2 cosh(2 s log phi) has no others


# ------------------------------------------------------------------ bad input
def test_bad_input_is_reported_clearly():
    # Common practice, no source: clear error types naming what is wrong.
    with pytest.raises(ValueError, match="symmetric"):
        eigenvalue_enclosures(Matrix.from_rows([[1, 2], [0, 1]]))
    with pytest.raises(TypeError, match="exact rational"):
        zeta_ball(Matrix.identity(2), 0.5)
    with pytest.raises(ValueError, match="invertible"):
        zeta_ball(Matrix.from_rows([[1, 1], [1, 1]]), 2)
    with pytest.raises(ValueError, match="lambda -> 1/lambda"):
        zeros_on_axis(Matrix.from_rows([[2, 0], [0, 3]]), 0, 1)
    with pytest.raises(ValueError, match="empty rectangle"):
        zeros_in_box(Matrix.identity(2), 1, 0, 0, 1)
    with pytest.raises(TypeError, match="Matrix or Poly"):
        eigenvalue_enclosures([[1, 0], [0, 1]])

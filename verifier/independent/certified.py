"""Certified spectral numerics for the independent backend, without python-flint.

This is the second implementation of the certified numbers of the project (evidence
level ``certified``): eigenvalue enclosures, the spectral zeta function
zeta_P(s) = sum_lambda lambda^(-s) of a characteristic polynomial P, zero counts of
zeta_P, and the entropy -sum p log p.  Certificates are re-checked with it in a process
that never loads python-flint, so it shares no code with :mod:`verifier.exact` and uses
other methods:

* the real roots of P are isolated **exactly**: sympy's square-free factorisation and
  its rational isolating intervals (``Poly.intervals`` / ``refine_root``, continued
  fractions) only *propose*; every interval is then confirmed here in integer
  arithmetic (the factorisation multiplies back to P; a factor of degree d gets d
  pairwise disjoint intervals, each showing a sign change of the factor or an exact
  rational root, so each contains exactly one simple root of it);
* values are computed with mpmath's interval arithmetic ``mpmath.iv`` [MP], started from
  rigorous input intervals (a rational p/q enters as ``iv.mpf(p) / iv.mpf(q)``, which
  rounds outward), so every interval it returns contains the true value [MO];
* zeros are counted with derivative bounds instead of interval evaluation over whole
  pieces: on a segment [a, b] of length R, |zeta_P'| <= M := max(A(a), A(b)) with
  A(s) = sum m |log lambda| |lambda^(-s)| (each |lambda^(-s)| is the exponential of a
  linear function of s, so A is convex along the segment); then
  |zeta(s) - zeta(a)| + |zeta(s) - zeta(b)| <= M R on the segment, i.e. its image lies in
  the ellipse with foci zeta(a), zeta(b) and major axis M R.  When
  |zeta(a)| + |zeta(b)| > M R the ellipse misses 0, lies in an open half-plane through
  0, and the argument changes along the piece by Arg(zeta(b) / zeta(a)) exactly
  (argument principle [HE]).  The one-dimensional analogue certifies the zeros of
  zeta_P(i t) on the imaginary axis.

Every result is exact: ``int``, ``fractions.Fraction`` or pairs of Fractions (interval
endpoints read exactly from the binary endpoints of mpmath's intervals).  A question the
largest precision cannot settle raises :class:`verifier.claims.errors.Undecided`; it is
never answered yes or no.  :func:`critical_points` alone is floating-point exploration;
its results are float evidence.

Public names: :func:`eigenvalue_enclosures`, :func:`zeta_enclosure`,
:func:`zeros_in_box`, :func:`zeros_on_axis`, :func:`entropy_enclosure`,
:func:`critical_points`.

References
----------
[MO] R. E. Moore, R. B. Kearfott, M. J. Cloud, "Introduction to Interval Analysis",
     SIAM 2009 (interval arithmetic, outward rounding, Lipschitz/mean-value forms).
[MP] mpmath documentation, "Interval arithmetic (mpmath.iv)".
[SY] SymPy documentation, "Poly.intervals", "Poly.refine_root", "Poly.sqf_list".
[HE] P. Henrici, "Applied and Computational Complex Analysis", vol. 1, Wiley 1974, §4.6
     (argument principle).
[ZK] O. Knill, "The zeta function for circular graphs", arXiv:1312.4239 (2013).
[SH] C. E. Shannon, "A mathematical theory of communication", Bell System Tech. J. 27
     (1948) 379-423 (entropy).
[NW] J. Nocedal, S. Wright, "Numerical Optimization", 2nd ed., Springer 2006, ch. 12
     (Lagrange conditions, Hessian on the tangent space).
"""

from __future__ import annotations

import math
import os
from contextlib import contextmanager
from fractions import Fraction
from functools import lru_cache
from numbers import Rational

import numpy as np
import mpmath
from mpmath import iv, libmp
from mpmath.libmp import libmpi

from ..claims.errors import Undecided
from .matrix import Poly

__all__ = ["eigenvalue_enclosures", "zeta_enclosure", "zeros_in_box", "zeros_on_axis",
           "entropy_enclosure", "critical_points", "MAX_BITS"]

MAX_BITS = 1024        # the precision ladder doubles from ``bits`` until it reaches this
_GUARD = 12            # extra bits for root enclosures and working precision
_MAX_PIECES = 20000    # pieces of a contour or segment, per precision

Interval = tuple[Fraction, Fraction]


# ------------------------------------------------------------------ input checking
def _check_bits(bits, what: str = "bits") -> int:
    if isinstance(bits, bool) or not isinstance(bits, int) or bits < 16:
        raise ValueError(f"{what} must be an integer number of bits >= 16, got {bits!r}")
    return bits


def _rational(x, what: str) -> Fraction:
    if isinstance(x, bool) or not isinstance(x, Rational):
        raise ValueError(f"{what} must be an exact rational (int or Fraction), got {x!r}")
    return Fraction(x)


def _coefficients(poly) -> tuple[int, ...]:
    if not isinstance(poly, Poly):
        raise ValueError(f"poly must be a verifier.independent.matrix.Poly, got "
                         f"{type(poly).__name__}")
    if poly.degree < 0:
        raise ValueError("poly is the zero polynomial, which has no spectrum")
    if any(not isinstance(c, int) for c in poly.coeffs):
        raise ValueError(f"poly must have integer coefficients, got {poly}")
    return tuple(poly.coeffs)


def _ladder(bits: int, max_bits: int) -> list[int]:
    out = [bits]
    while out[-1] < max_bits:
        out.append(min(2 * out[-1], max_bits))
    return out


# ------------------------------------------------------------------ interval helpers
@contextmanager
def _precision(bits: int):
    """Run a block with mpmath.iv at ``bits`` bits, restoring the caller's precision."""
    saved = iv.prec
    iv.prec = bits
    try:
        yield
    finally:
        iv.prec = saved


class _NotFinite(ArithmeticError):
    """An interval endpoint is infinite or not a number (overflow)."""


def _iv(x: Fraction):
    """An mpmath interval containing the rational x (outward rounding of p and of p/q)."""
    if x.denominator == 1:
        return iv.mpf(x.numerator)
    return iv.mpf(x.numerator) / iv.mpf(x.denominator)


def _hull(lo: Fraction, hi: Fraction):
    """An mpmath interval containing [lo, hi]."""
    if lo == hi:
        return _iv(lo)
    return iv.make_mpf((_iv(lo)._mpi_[0], _iv(hi)._mpi_[1]))


def _raw_fraction(v) -> Fraction:
    """The exact value of a finite binary floating-point number (mpmath raw tuple)."""
    sign, man, exp, _ = v
    if not man:
        if v == libmp.fzero:
            return Fraction(0)
        raise _NotFinite("an interval endpoint is infinite or undefined")
    value = Fraction(man << exp) if exp >= 0 else Fraction(man, 1 << -exp)
    return -value if sign else value


def _endpoints(x) -> Interval:
    a, b = x._mpi_
    return _raw_fraction(a), _raw_fraction(b)


def _finite(v) -> bool:
    return bool(v[1]) or v == libmp.fzero


def _lower_positive(x) -> bool:
    """The interval x lies in (0, oo): its lower endpoint is finite and positive."""
    a = x._mpi_[0]
    return _finite(a) and _finite(x._mpi_[1]) and libmp.mpf_sign(a) > 0


def _sign(x) -> int:
    """+1 or -1 if the interval x excludes 0 (certified sign), 0 if undecided."""
    a, b = x._mpi_
    if not (_finite(a) and _finite(b)):
        return 0
    if libmp.mpf_sign(a) > 0:
        return 1
    if libmp.mpf_sign(b) < 0:
        return -1
    return 0


def _upper_point(x):
    """The upper endpoint of x as a point interval."""
    b = x._mpi_[1]
    return iv.make_mpf((b, b))


def _modulus_lower(re, im):
    """A point interval holding a lower bound of |re + i im| (0 when undecided)."""
    a = (re ** 2 + im ** 2)._mpi_[0]
    if not _finite(a) or libmp.mpf_sign(a) <= 0:
        return iv.mpf(0)
    root = iv.sqrt(iv.make_mpf((a, a)))._mpi_[0]
    return iv.make_mpf((root, root))


# ------------------------------------------------------------------ exact root isolation
def _value_sign(coeffs: list[int], x: Fraction) -> int:
    """The sign of f(x) for an integer polynomial f (coefficients constant term first),
    from the integer q^d f(p/q)."""
    p, q = x.numerator, x.denominator
    acc, qpow = 0, 1
    for c in reversed(coeffs):        # Horner on q^d f(p/q) = sum c_k p^k q^(d-k)
        acc = acc * p + c * qpow
        qpow *= q
    return (acc > 0) - (acc < 0)


def _bisect(r: list, bits: int, good) -> None:
    """Shrink the isolating interval r[3..4] of a root of the square-free factor r[1]
    until ``good(r, bits)``, by bisection with exact signs (the factor changes sign
    across a simple root; an exact rational root ends the search)."""
    fc = r[1]
    lo, hi = r[3], r[4]
    if lo == hi:
        return
    s_lo, s_hi = _value_sign(fc, lo), _value_sign(fc, hi)
    if s_lo == 0 or s_hi == 0:
        # an endpoint is an exact root (isolated by a neighbouring interval, e.g. [1, 1]
        # next to [1, 2]); the root of this interval is inside it: move the endpoint in
        # until the sign there is nonzero and opposite to the other end's
        if s_lo == 0 and s_hi == 0:
            raise ArithmeticError(f"two exact roots of {Poly(fc)} bound [{lo}, {hi}]")
        for k in range(1, 4 * (bits + 64)):
            step = (hi - lo) / 2 ** k
            if s_lo == 0:
                moved, s_moved = lo + step, _value_sign(fc, lo + step)
                if s_moved == -s_hi:
                    r[3], lo, s_lo = moved, moved, s_moved
                    break
            else:
                moved, s_moved = hi - step, _value_sign(fc, hi - step)
                if s_moved == -s_lo:
                    r[4], hi, s_hi = moved, moved, s_moved
                    break
        else:
            raise ArithmeticError(f"no root of {Poly(fc)} inside ({lo}, {hi})")
    if s_lo == s_hi:
        raise ArithmeticError(f"no sign change of {Poly(fc)} on [{lo}, {hi}]")
    steps = 0
    while not good(r, bits):
        if steps in (4, 16, 40) and r[3] * r[4] > 0 and _newton_step(r, bits, s_lo):
            continue                       # a proposal, accepted only on a sign change
        steps += 1
        if steps > 100 * (bits + 64):
            raise ArithmeticError("root refinement does not converge")
        mid = (r[3] + r[4]) / 2
        s_mid = _value_sign(fc, mid)
        if s_mid == 0:
            r[3] = r[4] = mid
            return
        if s_mid == s_lo:
            r[3] = mid
        else:
            r[4] = mid


def _newton_step(r: list, bits: int, s_lo: int) -> bool:
    """Propose a narrow interval by Newton's method in mpmath floating point; keep it only
    if it lies inside the current one and the factor changes sign across it (exactly)."""
    fc = r[1]
    mid = (r[3] + r[4]) / 2
    # cancellation in Horner's scheme near a root costs about the coefficients' size
    with mpmath.workprec(bits + 64 + max(abs(c).bit_length() for c in fc)):
        x = mpmath.mpf(mid.numerator) / mid.denominator
        coefficients = [mpmath.mpf(c) for c in reversed(fc)]
        previous = None
        for iteration in range(40):
            fx, dfx = mpmath.polyval(coefficients, x, derivative=True)
            if dfx == 0:
                return False
            step = fx / dfx
            x -= step
            if abs(step) <= abs(x) * mpmath.ldexp(1, -(bits + 16)):
                break
            if previous is not None and abs(step) > previous / 2 and iteration > 8:
                break                      # rounding noise, not convergence: the check decides
            previous = abs(step)
        if not mpmath.isfinite(x):
            return False
        centre = _raw_fraction(x._mpf_)
    delta = abs(centre) / 2 ** (bits + 2)
    a, b = centre - delta, centre + delta
    if delta == 0 or not (r[3] <= a and b <= r[4]):
        return False
    if _value_sign(fc, a) != s_lo or _value_sign(fc, b) != -s_lo:
        return False
    r[3], r[4] = a, b
    return True


def _sympy_fraction(r) -> Fraction:
    return Fraction(int(r.p), int(r.q))


class _Spectrum:
    """The real roots of an integer polynomial, isolated exactly, with multiplicities.

    ``roots`` holds one entry [factor, coefficients, multiplicity, lo, hi] per distinct
    root, sorted; :meth:`refine` shrinks the intervals and re-proves them.
    """

    def __init__(self, coeffs: tuple[int, ...]):
        # sympy with its default ground types would run on python-flint: never here (a
        # process that imported sympy earlier keeps its choice; re-check processes set it)
        os.environ.setdefault("SYMPY_GROUND_TYPES", "python")
        from sympy import Poly as SymPoly
        from sympy import symbols
        x = symbols("x")
        self.coeffs = coeffs
        self.degree = len(coeffs) - 1
        if self.degree == 0:
            self.roots, self.bits = [], None
            return
        P = SymPoly(list(reversed(coeffs)), x, domain="ZZ")
        lead, factors = P.sqf_list()
        product = Poly([int(lead)])
        found = []
        real = 0
        for f, k in factors:
            fc = [int(c) for c in reversed(f.all_coeffs())]
            product = product * Poly(fc) ** int(k)
            intervals = f.intervals()
            real += len(intervals) * int(k)
            for (a, b), _ in intervals:
                found.append([f, fc, int(k), _sympy_fraction(a), _sympy_fraction(b)])
        if product.coeffs != coeffs:
            raise ArithmeticError("the square-free factorisation does not multiply back to "
                                  "the polynomial")
        if real != self.degree:
            raise ValueError(f"the polynomial {Poly(list(coeffs))} has {self.degree - real} "
                             f"non-real roots (only {real} of its {self.degree} roots, "
                             f"counted with multiplicity, are real); it is not the "
                             f"characteristic polynomial of a symmetric matrix")
        found.sort(key=lambda r: r[3])
        self.roots, self.bits = found, None

    @staticmethod
    def _good(r, bits: int) -> bool:
        lo, hi = r[3], r[4]
        if lo == hi:
            return True
        if lo <= 0 <= hi:
            return False
        return hi - lo <= Fraction(min(abs(lo), abs(hi)), 2 ** bits)

    def refine(self, bits: int) -> None:
        """Shrink every interval to relative width <= 2^-bits (excluding 0 unless the
        root is 0) and prove the result (see :func:`eigenvalue_enclosures`)."""
        if self.bits is not None and self.bits >= bits:
            return
        for _ in range(200):
            for r in self.roots:
                _bisect(r, bits, self._good)
            self.roots.sort(key=lambda r: r[3])
            overlapping = {i for i in range(len(self.roots) - 1)
                           if not self.roots[i][4] < self.roots[i + 1][3]}
            if not overlapping:
                break
            bits += 8          # distinct roots: a finer isolation separates them
        else:
            raise ArithmeticError("root enclosures of different factors keep overlapping")
        self._prove()
        self.bits = bits

    def _prove(self) -> None:
        """Exact confirmation of the isolation (independent of how it was found)."""
        per_factor: dict[tuple, int] = {}
        for i, (f, fc, k, lo, hi) in enumerate(self.roots):
            if i + 1 < len(self.roots) and not hi < self.roots[i + 1][3]:
                raise ArithmeticError("root enclosures overlap")
            if lo == hi:
                ok = _value_sign(fc, lo) == 0
            else:
                ok = lo < hi and _value_sign(fc, lo) * _value_sign(fc, hi) < 0
            if not ok:
                raise ArithmeticError(f"no certified root of {Poly(fc)} in [{lo}, {hi}]")
            per_factor[tuple(fc)] = per_factor.get(tuple(fc), 0) + 1
        for fc, count in per_factor.items():
            if count != len(fc) - 1:
                raise ArithmeticError(f"{count} enclosures for {Poly(list(fc))}, "
                                      f"expected {len(fc) - 1}")

    def distinct(self, bits: int) -> list[tuple[Fraction, Fraction, int]]:
        """[(lo, hi, multiplicity)] for every distinct real root, sorted, proved."""
        self.refine(bits)
        return [(r[3], r[4], r[2]) for r in self.roots]

    def positive(self) -> bool:
        """All roots > 0 (after :meth:`refine`, every interval excludes 0 or is (0, 0))."""
        self.refine(self.bits or 16)
        return all(r[3] > 0 for r in self.roots)


@lru_cache(maxsize=16)
def _spectrum(coeffs: tuple[int, ...]) -> _Spectrum:
    return _Spectrum(coeffs)


# ------------------------------------------------------------------ public: eigenvalues
def eigenvalue_enclosures(poly, bits: int) -> list[Interval]:
    """Proved rational intervals around the roots of P (the eigenvalues), sorted.

    ``poly`` is a :class:`~verifier.independent.matrix.Poly` with integer coefficients and
    only real roots (a characteristic polynomial of a symmetric integer matrix).  Returns
    one interval ``(lo, hi)`` per root, repeated according to its multiplicity, sorted;
    the i-th smallest root lies in the i-th interval, and
    hi - lo <= 2^-bits * max(1, |lambda|) (rational roots come out as (r, r)).

    >>> from verifier.independent.matrix import Matrix, charpoly
    >>> P = charpoly(Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]]))  # L of an edge
    >>> [(float(lo), float(hi)) for lo, hi in eigenvalue_enclosures(P, 20)][1]
    (1.0, 1.0)

    Method: sympy's square-free factorisation and continued-fraction isolation propose
    intervals [SY]; they are accepted only after an exact check: the factors multiply
    back to P, and each factor of degree d has d disjoint intervals, each with a sign
    change of the factor (integer arithmetic) or an exact rational root -- so each holds
    exactly one simple root of the factor.  Raises ``ValueError`` when P has non-real
    roots.  Reference: [SY]; Descartes/Vincent isolation as in sympy.
    """
    bits = _check_bits(bits)
    out: list[Interval] = []
    for lo, hi, m in _spectrum(_coefficients(poly)).distinct(bits):
        out.extend([(lo, hi)] * m)
    return out


# ------------------------------------------------------------------ zeta evaluation
def _cos_sin(x):
    """(cos x, sin x) for an interval x, in one call of mpmath's interval routine."""
    c, s = libmpi.mpi_cos_sin(x._mpi_, iv.prec)
    return iv.make_mpf(c), iv.make_mpf(s)


class _Zeta:
    """zeta_P at exact points, with the growth bound A(s), at one working precision.

    Must be used inside ``_precision(bits)``.  For lambda > 0 the modulus
    |lambda^(-s)| = exp(-sigma l) depends on sigma only and the phase -t l on t only, so
    both are cached along the horizontal and vertical sides of a contour.
    """

    def __init__(self, coeffs: tuple[int, ...], bits: int):
        if coeffs[0] == 0:
            raise ValueError("zeta_P needs P(0) != 0: 0 is an eigenvalue, and 0^(-s) is "
                             "undefined")
        self.bits = bits
        pi = +iv.pi
        self.positive, self.negative = [], []
        for lo, hi, m in _spectrum(coeffs).distinct(bits + _GUARD):
            if lo > 0:
                ell = iv.log(_hull(lo, hi))
                self.positive.append((ell, m, m * abs(ell)))
            else:          # hi < 0 (proved: 0 is not a root, intervals exclude it)
                ell = iv.log(_hull(-hi, -lo))
                self.negative.append((ell, m, m * iv.sqrt(ell ** 2 + pi ** 2)))
        self.pi = pi
        self._moduli: dict = {}
        self._phases: dict = {}
        self._points: dict = {}

    def _modulus(self, sigma: Fraction):
        if sigma not in self._moduli:
            s = _iv(sigma)
            self._moduli[sigma] = [iv.exp(-(s * ell)) for ell, _, _ in self.positive]
        return self._moduli[sigma]

    def _phase(self, t: Fraction):
        if t not in self._phases:
            s = _iv(t)
            self._phases[t] = [_cos_sin(s * ell) for ell, _, _ in self.positive]
        return self._phases[t]

    def value(self, sigma: Fraction, t: Fraction):
        """(Re zeta, Im zeta, A) as intervals at s = sigma + i t."""
        key = (sigma, t)
        if key in self._points:
            return self._points[key]
        re = im = growth = iv.mpf(0)
        if self.positive:
            for (ell, m, mabs), mod, (c, s) in zip(self.positive, self._modulus(sigma),
                                                   self._phase(t)):
                w = m * mod
                re += w * c
                im -= w * s            # lambda^(-s) = e^(-sigma l) (cos(t l) - i sin(t l))
                growth += mabs * mod
        if self.negative:
            sig, tt = _iv(sigma), _iv(t)
            for ell, m, mabs in self.negative:
                # log lambda = l + i pi: lambda^(-s) = e^(t pi - sigma l) e^(-i (t l + sigma pi))
                mod = iv.exp(tt * self.pi - sig * ell)
                phase = tt * ell + sig * self.pi
                w = m * mod
                re += w * iv.cos(phase)
                im -= w * iv.sin(phase)
                growth += mabs * mod
        self._points[key] = (re, im, growth)
        return self._points[key]

    def axis(self, t: Fraction):
        """(f(t), f'(t)) for f(t) = sum m cos(t l) (lambda > 0 only)."""
        f = df = iv.mpf(0)
        for (ell, m, _), (c, s) in zip(self.positive, self._phase(t)):
            f += m * c
            df -= (m * ell) * s
        return f, df


def zeta_enclosure(poly, s_re, s_im, bits: int) -> tuple[Interval, Interval]:
    """A proved enclosure of zeta_P(s) = sum_lambda lambda^(-s), s = s_re + i s_im.

    The sum runs over the roots lambda of P with multiplicity; lambda^(-s) =
    exp(-s log lambda) with the principal branch log lambda = log|lambda| + i pi for
    lambda < 0.  P must have only real roots and P(0) != 0 (else ``ValueError``).
    Returns ``((re_lo, re_hi), (im_lo, im_hi))`` with exact rational endpoints, of width
    about 2^-bits times the size of the terms.

    >>> zeta_enclosure(Poly([1, -2, 1]), 3, 5, 20)      # (x - 1)^2: zeta = 2
    ((Fraction(2, 1), Fraction(2, 1)), (Fraction(0, 1), Fraction(0, 1)))

    Method: the proved root intervals (:func:`eigenvalue_enclosures`) enter mpmath.iv
    [MP]; log, exp, cos and sin of intervals at ``bits + 12`` bits.  References: [ZK], [MO].
    """
    bits = _check_bits(bits)
    sigma, t = _rational(s_re, "s_re"), _rational(s_im, "s_im")
    coeffs = _coefficients(poly)
    with _precision(bits + _GUARD):
        re, im, _ = _Zeta(coeffs, bits + _GUARD).value(sigma, t)
        try:
            return _endpoints(re), _endpoints(im)
        except _NotFinite:
            raise ValueError(f"zeta_P({sigma} + {t} i) overflows the working range") from None


# ------------------------------------------------------------------ zero counting
class _TooMany(Exception):
    pass


def _winding(zeta: _Zeta, corners, min_length: Fraction) -> int | None:
    """The winding number of zeta around the polygon ``corners`` (axis-parallel sides),
    or None if not certified at this precision."""
    total = iv.mpf(0)
    pieces = 0
    for a, b in zip(corners, corners[1:] + corners[:1]):
        stack = [(a, b)]
        while stack:
            p, q = stack.pop()
            pieces += 1
            if pieces > _MAX_PIECES:
                raise _TooMany
            re_p, im_p, grow_p = zeta.value(*p)
            re_q, im_q, grow_q = zeta.value(*q)
            length = abs(q[0] - p[0]) + abs(q[1] - p[1])
            bound = _upper_point(grow_p) if libmp.mpf_ge(grow_p._mpi_[1], grow_q._mpi_[1]) \
                else _upper_point(grow_q)
            margin = _modulus_lower(re_p, im_p) + _modulus_lower(re_q, im_q) - bound * _iv(length)
            if _lower_positive(margin):
                # the image of the piece lies in an ellipse missing 0, so the change of
                # the argument is Arg(zeta(q) / zeta(p)) = Arg(zeta(q) conj(zeta(p)))
                ratio_re = re_q * re_p + im_q * im_p
                ratio_im = im_q * re_p - re_q * im_p
                # atan2 only where Arg is continuous on the whole box: off (-oo, 0]
                if _sign(ratio_im) != 0 or _lower_positive(ratio_re):
                    change = iv.atan2(ratio_im, ratio_re)
                    lo, hi = change._mpi_
                    if _finite(lo) and _finite(hi) and libmp.mpf_le(lo, hi) and \
                            libmp.mpf_lt(libmp.mpf_sub(hi, lo, 53, libmp.round_ceiling),
                                         libmp.from_int(1)):
                        total += change
                        continue
            if length < min_length:
                return None
            mid = ((p[0] + q[0]) / 2, (p[1] + q[1]) / 2)
            stack.append((mid, q))
            stack.append((p, mid))
    try:
        lo, hi = _endpoints(total / (2 * iv.pi))
    except _NotFinite:
        return None
    n = math.ceil(lo)
    return n if n <= hi < n + 1 else None


def zeros_in_box(poly, re_lo, re_hi, im_lo, im_hi, bits: int, max_bits: int = MAX_BITS,
                 details: dict | None = None) -> int:
    """The number of zeros of zeta_P, with multiplicity, in an open rectangle; proved.

    zeta_P(s) = sum_lambda lambda^(-s) (see :func:`zeta_enclosure`) is entire; by the
    argument principle [HE] the number of its zeros in re_lo < Re s < re_hi,
    im_lo < Im s < im_hi is the winding number of zeta_P along the boundary.

    Parameters: ``poly`` as in :func:`eigenvalue_enclosures` with P(0) != 0; the sides as
    exact rationals; ``bits`` the starting precision, doubled up to ``max_bits``;
    ``details``, if a dict, receives the precision that settled the count (``"bits"``).
    Returns an int.  Raises ``ValueError`` for an empty box or P(0) = 0, and
    :class:`~verifier.claims.errors.Undecided` when the count is not certified at
    ``max_bits`` (a zero on or extremely near the boundary, or more than 20000 pieces).

    >>> zeros_in_box(Poly([2, -5, 2]), -1, 1, 0, 4, 32)   # 2^s + 2^-s: one zero, i pi/(2 log 2)
    1

    Method: each side is bisected until, on every piece [a, b] of length R,
    |zeta(a)| + |zeta(b)| > R max(A(a), A(b)) with A(s) = sum m |log lambda| |lambda^(-s)|
    >= |zeta'| (A is convex along the piece): the image of the piece then lies in an
    ellipse that misses 0, so the argument changes by Arg(zeta(b)/zeta(a)) in (-pi, pi),
    enclosed with ``iv.atan2``.  The interval sum divided by 2 pi must contain exactly
    one integer.  Cost: about (boundary length) x A / |zeta| point evaluations, each one
    cos and sin per distinct root.  References: [HE], [MO], [MP], [ZK].
    """
    bits = _check_bits(bits)
    max_bits = _check_bits(max_bits, "max_bits")
    re_lo, re_hi = _rational(re_lo, "re_lo"), _rational(re_hi, "re_hi")
    im_lo, im_hi = _rational(im_lo, "im_lo"), _rational(im_hi, "im_hi")
    if not (re_lo < re_hi and im_lo < im_hi):
        raise ValueError(f"zeros_in_box: empty rectangle [{re_lo}, {re_hi}] x [{im_lo}, {im_hi}]")
    coeffs = _coefficients(poly)
    if coeffs[0] == 0:
        raise ValueError("zeros_in_box: P(0) = 0, so 0 is an eigenvalue and zeta_P is undefined")
    corners = [(re_lo, im_lo), (re_hi, im_lo), (re_hi, im_hi), (re_lo, im_hi)]
    size = max(re_hi - re_lo, im_hi - im_lo)
    for p in _ladder(bits, max_bits):
        with _precision(p):
            try:
                n = _winding(_Zeta(coeffs, p), corners, size / 2 ** (p // 4))
            except _TooMany:
                raise Undecided(f"zeros_in_box: the boundary of [{re_lo}, {re_hi}] x "
                                f"[{im_lo}, {im_hi}] needs more than {_MAX_PIECES} pieces "
                                f"at {p} bits") from None
        if n is not None:
            if details is not None:
                details["bits"] = p
            return n
    raise Undecided(f"zeros_in_box: the number of zeros of zeta_P in [{re_lo}, {re_hi}] x "
                    f"[{im_lo}, {im_hi}] is not certified at {max_bits} bits (a zero on or "
                    f"very near the boundary)")


def _axis_count(zeta: _Zeta, t_lo: Fraction, t_hi: Fraction, min_length: Fraction) -> int | None:
    """Zeros of f(t) = sum m cos(t l) on [t_lo, t_hi], each proved simple; None if not
    certified at this precision."""
    first1 = second1 = iv.mpf(0)
    for ell, m, mabs in zeta.positive:
        first1 += mabs                   # |f'| <= sum m |l|
        second1 += mabs * abs(ell)       # |f''| <= sum m l^2
    first, second = _upper_point(first1), _upper_point(second1)
    cache: dict = {}

    def at(t):
        if t not in cache:
            cache[t] = zeta.axis(t)
        return cache[t]

    if _sign(at(t_lo)[0]) == 0 or _sign(at(t_hi)[0]) == 0:
        return None
    count, pieces, stack = 0, 0, [(t_lo, t_hi)]
    while stack:
        a, b = stack.pop()
        pieces += 1
        if pieces > _MAX_PIECES:
            raise _TooMany
        (fa, da), (fb, db) = at(a), at(b)
        length = _iv(b - a)
        sa, sb = _sign(fa), _sign(fb)
        # no zero: f(t) >= f(a) - M1 (t - a) and f(t) >= f(b) - M1 (b - t), summed; or,
        # by Taylor from one end, |f(t) - f(a)| <= |f'(a)| (t - a) + M2 (t - a)^2 / 2
        if sa != 0 and sa == sb and (
                _lower_positive(sa * (fa + fb) - first * length)
                or _lower_positive(sa * fa - abs(da) * length - second * length * length / 2)
                or _lower_positive(sb * fb - abs(db) * length - second * length * length / 2)):
            continue
        # monotone: f' keeps one sign (same argument for f'), so one zero iff sign change
        ga, gb = _sign(da), _sign(db)
        if sa != 0 and sb != 0 and ga != 0 and ga == gb \
                and _lower_positive(ga * (da + db) - second * length):
            count += sa != sb
            continue
        if b - a < min_length:
            return None
        mid = (a + b) / 2
        stack.append((mid, b))
        stack.append((a, mid))
    return count


def zeros_on_axis(poly, t_lo, t_hi, bits: int, max_bits: int = MAX_BITS,
                  details: dict | None = None) -> int:
    """The number of zeros of zeta_P on the segment {i t : t_lo <= t <= t_hi}; proved.

    For P reciprocal (coefficients equal to the reversed ones up to sign) with only
    positive roots, the roots are closed under lambda -> 1/lambda, so
    f(t) = zeta_P(i t) = sum_lambda cos(t log lambda) is real [ZK].  Every zero counted
    is proved simple (f' != 0 there), so the count is also the number of zeros of zeta_P
    with multiplicity on the segment.

    Parameters: ``poly`` as in :func:`eigenvalue_enclosures`; ``t_lo < t_hi`` exact
    rationals; ``bits`` / ``max_bits`` / ``details`` as in :func:`zeros_in_box`.  Returns
    an int.
    Raises ``ValueError`` if P is not reciprocal or has a root <= 0, and
    :class:`~verifier.claims.errors.Undecided` for a zero at an endpoint, a multiple zero,
    zeros not separated at ``max_bits``, or more than 20000 pieces.

    >>> zeros_on_axis(Poly([1, -3, 1]), 0, 2, 32)     # 2 cos(2 t log phi): zero at 1.63
    1

    Method: bisection of [t_lo, t_hi]; a piece [a, b] has no zero when f(a), f(b) have one
    sign and |f(a)| + |f(b)| > (b - a) sum m |l| (mean-value bound [MO]); it has exactly
    one simple zero or none, according to the signs of f(a) and f(b), when f'(a), f'(b)
    have one sign and |f'(a)| + |f'(b)| > (b - a) sum m l^2.  Values by mpmath.iv [MP].
    References: [ZK], [MO], [MP].
    """
    bits = _check_bits(bits)
    max_bits = _check_bits(max_bits, "max_bits")
    t_lo, t_hi = _rational(t_lo, "t_lo"), _rational(t_hi, "t_hi")
    if not t_lo < t_hi:
        raise ValueError(f"zeros_on_axis: need t_lo < t_hi, got [{t_lo}, {t_hi}]")
    coeffs = _coefficients(poly)
    if coeffs[0] == 0:
        raise ValueError("zeros_on_axis: P(0) = 0, so 0 is an eigenvalue and zeta_P is undefined")
    if not poly.is_reciprocal():
        raise ValueError("zeros_on_axis: the spectrum is not closed under lambda -> 1/lambda, "
                         "so zeta_K is not real on the imaginary axis")
    if not _spectrum(coeffs).positive():
        raise ValueError("zeros_on_axis: P has a root <= 0; all roots must be positive")
    for p in _ladder(bits, max_bits):
        with _precision(p):
            try:
                n = _axis_count(_Zeta(coeffs, p), t_lo, t_hi, (t_hi - t_lo) / 2 ** (p // 4))
            except _TooMany:
                raise Undecided(f"zeros_on_axis: [{t_lo}, {t_hi}] needs more than "
                                f"{_MAX_PIECES} pieces at {p} bits") from None
        if n is not None:
            if details is not None:
                details["bits"] = p
            return n
    raise Undecided(f"zeros_on_axis: the zeros of zeta_P(i t) on [{t_lo}, {t_hi}] are not "
                    f"certified at {max_bits} bits (a zero at an endpoint, a multiple zero, "
                    f"or zeros not separated)")


# ------------------------------------------------------------------ entropy
def entropy_enclosure(p, bits: int) -> Interval:
    """A proved enclosure of the entropy S(p) = -sum_x p_x log p_x (0 log 0 = 0).

    Parameters: ``p`` a sequence of exact non-negative rationals (int or Fraction);
    ``bits`` the working precision.  Returns ``(lo, hi)`` with exact rational endpoints;
    exactly ``(0, 0)`` when every p_x is 0 or 1.

    >>> lo, hi = entropy_enclosure([Fraction(1, 2), Fraction(1, 2)], 40)    # log 2
    >>> round(float(lo), 12), 0 < hi - lo < Fraction(1, 2**40)
    (0.69314718056, True)
    >>> entropy_enclosure([0, 1, 0], 40)
    (Fraction(0, 1), Fraction(0, 1))

    Method: each p_x enters mpmath.iv as an outward-rounded interval; -p log p by interval
    log and products at ``bits + 12`` bits [MP].  Reference: [SH], [MO].
    """
    bits = _check_bits(bits)
    values = [_rational(x, f"p[{i}]") for i, x in enumerate(p)]
    for i, x in enumerate(values):
        if x < 0:
            raise ValueError(f"entropy needs non-negative entries, but p[{i}] = {x}")
    terms = [x for x in values if x not in (0, 1)]
    if not terms:
        return Fraction(0), Fraction(0)
    with _precision(bits + _GUARD):
        total = iv.mpf(0)
        for x in terms:
            a = _iv(x)
            total -= a * iv.log(a)
        return _endpoints(total)


# ------------------------------------------------------------------ critical points (float)
def _float_matrix(rows) -> np.ndarray:
    if not isinstance(rows, (list, tuple)) or not rows:
        raise ValueError("critical_points: V must be a non-empty list of rows")
    n = len(rows)
    for i, row in enumerate(rows):
        if not isinstance(row, (list, tuple)) or len(row) != n:
            raise ValueError(f"critical_points: V must be square; row {i} has "
                             f"{len(row) if isinstance(row, (list, tuple)) else 'no'} "
                             f"entries, expected {n}")
        for j, x in enumerate(row):
            if isinstance(x, bool) or not isinstance(x, (Rational, float)) or \
                    (isinstance(x, float) and not math.isfinite(x)):
                raise ValueError(f"critical_points: V[{i}][{j}] = {x!r} is not a finite number")
    for i in range(n):
        for j in range(i):
            if rows[i][j] != rows[j][i]:
                raise ValueError(f"critical_points: V must be symmetric, but V[{i}][{j}] = "
                                 f"{rows[i][j]} and V[{j}][{i}] = {rows[j][i]}")
    return np.array([[float(x) for x in row] for row in rows])


def _newton(V: np.ndarray, T: float, p0: np.ndarray, steps: int = 100):
    """Newton's method with backtracking on the Lagrange system in u = log p:
    2 V e^u + T (u + 1) - mu = 0, sum e^u = 1.  Returns p or None."""
    n = len(p0)
    u = np.log(np.clip(p0, 1e-300, None) / np.clip(p0, 1e-300, None).sum())
    mu = float(np.mean(2 * V @ np.exp(u) + T * (u + 1)))

    def residual(u, mu):
        p = np.exp(u)
        return np.concatenate([2 * V @ p + T * (u + 1) - mu, [p.sum() - 1]])

    r = residual(u, mu)
    norm = float(np.max(np.abs(r)))
    scale = 1 + T + float(np.max(np.abs(V)))
    for _ in range(steps):
        if norm < 1e-13 * scale:
            break
        p = np.exp(u)
        J = np.zeros((n + 1, n + 1))
        J[:n, :n] = 2 * V * p[None, :] + T * np.eye(n)
        J[:n, n] = -1
        J[n, :n] = p
        try:
            step = np.linalg.solve(J, -r)
        except np.linalg.LinAlgError:
            step = np.linalg.lstsq(J, -r, rcond=None)[0]
        alpha = 1.0
        while alpha > 1e-10:
            u_new, mu_new = u + alpha * step[:n], mu + alpha * step[n]
            if np.all(u_new < 50):
                with np.errstate(over="ignore", invalid="ignore"):
                    r_new = residual(u_new, mu_new)
                norm_new = float(np.max(np.abs(r_new)))
                if math.isfinite(norm_new) and norm_new < norm:
                    break
            alpha /= 2
        else:
            return None
        u, mu, r, norm = u_new, mu_new, r_new, norm_new
    if not norm < 1e-10 * scale:
        return None
    p = np.exp(u)
    return p / p.sum()


def _fixed_point(V: np.ndarray, T: float, p: np.ndarray, steps: int = 300,
                 damping: float = 0.3) -> np.ndarray:
    """Damped iteration p <- (1 - d) p + d q, q_x proportional to exp(-2 (V p)_x / T)."""
    for _ in range(steps):
        e = -2 * (V @ p) / T
        q = np.exp(e - e.max())
        p = (1 - damping) * p + damping * q / q.sum()
    return p


def _kind(V: np.ndarray, T: float, p: np.ndarray) -> str:
    """Inertia of the Hessian H = 2V + T diag(1/p) on {sum v = 0}.

    Basis e_x - e_k (k the largest coordinate, so p_k >= 1/n), then the diagonal
    congruence by sqrt(p_x): same signs (Sylvester's law of inertia), and every entry is
    at most T (n + 1) + 8 max|V| in size, which scales the tolerance for "degenerate"."""
    n = len(p)
    k = int(np.argmax(p))
    H = 2 * V + T * np.diag(1 / p)
    others = [x for x in range(n) if x != k]
    B = np.zeros((n, n - 1))
    for col, x in enumerate(others):
        B[x, col], B[k, col] = 1.0, -1.0
    S = np.sqrt(p[others])
    M = (B.T @ H @ B) * S[:, None] * S[None, :]
    ev = np.linalg.eigvalsh((M + M.T) / 2)
    tol = 1e-9 * (T * (n + 1) + 8 * float(np.max(np.abs(V))))
    if np.any(np.abs(ev) <= tol):
        return "degenerate"
    if np.all(ev > 0):
        return "minimum"
    if np.all(ev < 0):
        return "maximum"
    return "saddle"


def critical_points(rows, T) -> list[tuple[list[float], str]]:
    """Critical points of F_T(p) = sum V[x][y] p_x p_y - T S(p) on the open simplex (float).

    Definition: p with all p_x > 0 and sum p = 1 is critical when the Lagrange conditions
    2 (V p)_x + T (log p_x + 1) = mu hold for every x and one mu [NW]; S is the entropy
    (:func:`entropy_enclosure`).  Each is classified by the Hessian 2 V + T diag(1/p) on
    the tangent space {sum v = 0}: "minimum" (positive definite), "maximum" (negative
    definite), "saddle" (both signs), "degenerate" (an eigenvalue numerically 0).

    Parameters: ``rows`` a square symmetric list of lists of numbers (V); ``T > 0``.
    Returns ``[(p as a list of floats, kind)]`` sorted by F_T ascending.  Floating-point
    exploration only (float evidence): critical points no start reaches are missed.

    >>> [(round(p[0], 6), kind) for p, kind in critical_points([[1, 0], [0, 1]], 1)]
    [(0.5, 'minimum')]

    Method: starts at the uniform point, near each vertex of the simplex, and at 60
    seeded Dirichlet samples (numpy generator, seed 20240613: deterministic); from each
    start and from its image under 300 damped steps of p -> softmax(-2 V p / T), Newton's
    method with backtracking on the Lagrange system in u = log p (so p stays positive).
    Solutions with residual below 1e-10 are kept, merged when closer than 1e-7 (max
    norm).  Cost: O(starts n^3).  Reference: [NW].
    """
    V = _float_matrix(rows)
    if isinstance(T, bool) or not isinstance(T, (Rational, float)):
        raise ValueError(f"critical_points: the temperature T must be a number, got {T!r}")
    T = float(T)
    if not (T > 0 and math.isfinite(T)):
        raise ValueError(f"critical_points: the temperature T must be positive and finite, "
                         f"got {T}")
    n = V.shape[0]
    if n == 1:
        return [([1.0], "minimum")]
    rng = np.random.default_rng(20240613)
    starts = [np.full(n, 1.0 / n)]
    for x in range(n):
        corner = np.full(n, 1e-3 / (n - 1))
        corner[x] = 1 - 1e-3
        starts.append(corner)
    for k in range(60):
        starts.append(rng.dirichlet(np.full(n, 1.0 if k % 2 else 0.3)))
    found: list[tuple[float, np.ndarray]] = []
    for start in starts:
        start = np.clip(start, 1e-12, None)
        start = start / start.sum()
        for initial in (start, _fixed_point(V, T, start)):
            p = _newton(V, T, initial)
            if p is None or not np.all(p > 0):
                continue
            if any(np.max(np.abs(p - q)) < 1e-7 for _, q in found):
                continue
            F = float(p @ V @ p + T * np.sum(p * np.log(p)))
            found.append((F, p))
    found.sort(key=lambda item: item[0])
    return [([float(x) for x in p], _kind(V, T, p)) for _, p in found]

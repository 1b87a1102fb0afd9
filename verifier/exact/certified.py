"""Certified numerics: rigorous enclosures for spectra and spectral zeta functions.

Evidence level ``certified`` (SPEC §6): every number returned here is an interval with
exact rational endpoints that is *proved* to contain the true value, computed with
python-flint's ball arithmetic (arb/acb) and, for eigenvalues, confirmed by an exact
rational sign check.  Nothing above this package sees a python-flint type: results are
``fractions.Fraction`` pairs, :class:`Ball`, ints, or the strings of :func:`compare`.

Public names
------------
- :class:`Ball`, :class:`Undecided`
- :func:`eigenvalue_enclosures`
- :func:`zeta_ball`
- :func:`compare`
- :func:`zeros_in_box`
- :func:`zeros_on_axis`
- :func:`entropy_ball`

A question that cannot be settled at the maximum precision raises :class:`Undecided`
(or, for :func:`compare`, returns ``"undecided"``); it is never turned into a yes or no.

References
----------
[AR] F. Johansson, "Arb: efficient arbitrary-precision midpoint-radius interval
     arithmetic", IEEE Transactions on Computers 66 (2017) 1281-1292.
[HY] O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018).
[ZK] O. Knill, "The zeta function for circular graphs", arXiv:1312.4239 (2013).
[HE] P. Henrici, "Applied and Computational Complex Analysis", vol. 1, Wiley 1974,
     §4.6 (argument principle and winding numbers).
"""

from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from numbers import Rational

from flint import acb, arb, ctx, fmpq, fmpz_poly

from .matrix import Matrix
from .poly import Poly

__all__ = ["Ball", "Undecided", "eigenvalue_enclosures", "zeta_ball", "compare",
           "zeros_in_box", "zeros_on_axis", "entropy_ball"]

PRECISIONS = (64, 128, 256, 512, 1024)   # the ladder tried by the adaptive routines
_MAX_PIECES = 20000                       # per contour / segment, per precision


class Undecided(ArithmeticError):
    """A certified question could not be settled at the maximum precision tried."""


@dataclass(frozen=True)
class Ball:
    """A closed real interval [mid - rad, mid + rad] with exact rational mid and rad."""

    mid: Fraction
    rad: Fraction

    def __post_init__(self):
        object.__setattr__(self, "mid", Fraction(self.mid))
        object.__setattr__(self, "rad", Fraction(self.rad))
        if self.rad < 0:
            raise ValueError(f"Ball radius {self.rad} is negative")

    @property
    def lo(self) -> Fraction:
        return self.mid - self.rad

    @property
    def hi(self) -> Fraction:
        return self.mid + self.rad

    def interval(self) -> tuple[Fraction, Fraction]:
        return (self.lo, self.hi)

    def contains(self, x) -> bool:
        """True if the exact rational (or float, read exactly) x lies in the ball."""
        return self.lo <= Fraction(x) <= self.hi


# ------------------------------------------------------------------ conversions
def _arf_fraction(x) -> Fraction:
    man, exp = x.man_exp()
    man, exp = int(man), int(exp)
    return Fraction(man * 2 ** exp) if exp >= 0 else Fraction(man, 2 ** -exp)


def _arb_interval(x) -> tuple[Fraction, Fraction]:
    """Exact rational endpoints of an arb ball (mid and rad are dyadic, so this is exact)."""
    mid, rad = _arf_fraction(x.mid()), _arf_fraction(x.rad())
    return (mid - rad, mid + rad)


def _rational(x, what: str) -> Fraction:
    if isinstance(x, bool) or isinstance(x, float) or not isinstance(x, (Rational, str)):
        raise TypeError(f"{what} must be an exact rational (int, Fraction or 'p/q' string), "
                        f"got {x!r}")
    try:
        return Fraction(x)
    except (ValueError, ZeroDivisionError) as error:
        raise ValueError(f"{what}: cannot read {x!r} as a rational number") from error


def _complex_point(s, what: str = "s") -> tuple[Fraction, Fraction]:
    if isinstance(s, tuple):
        if len(s) != 2:
            raise ValueError(f"{what} must be a pair (re, im), got {len(s)} entries")
        return _rational(s[0], f"{what}.re"), _rational(s[1], f"{what}.im")
    return _rational(s, what), Fraction(0)


def _fmpq(x: Fraction):
    return fmpq(x.numerator, x.denominator)


def _arb_span(a: Fraction, b: Fraction):
    """An arb ball containing the closed interval between a and b."""
    if a == b:
        return arb(_fmpq(a))
    return arb(_fmpq(a)).union(arb(_fmpq(b)))


class _Prec:
    """Set python-flint's working precision for a block and restore it afterwards."""

    def __init__(self, bits: int):
        self.bits = bits

    def __enter__(self):
        self.saved = ctx.prec
        ctx.prec = self.bits

    def __exit__(self, *exc):
        ctx.prec = self.saved


# ------------------------------------------------------------------ the spectrum
class _Spectrum:
    """Exact factorised characteristic polynomial plus certified root balls per precision."""

    def __init__(self, source):
        if isinstance(source, Matrix):
            if not source.is_square:
                raise ValueError(f"certified spectrum needs a square matrix, got shape {source.shape}")
            if not source.is_integer():
                raise ValueError("certified spectrum needs an integer matrix")
            if not source.is_symmetric():
                raise ValueError("certified spectrum needs a symmetric matrix (real eigenvalues)")
            from .linalg import charpoly
            poly = charpoly(source)
        elif isinstance(source, Poly):
            poly = source
            if any(not isinstance(c, int) for c in poly.coeffs):
                raise ValueError("certified spectrum needs a polynomial with integer coefficients")
        else:
            raise TypeError(f"expected a verifier.exact.Matrix or Poly, got {type(source).__name__}")
        if poly.degree < 0:
            raise ValueError("the zero polynomial has no spectrum")
        self.degree = poly.degree
        _, factors = fmpz_poly(list(poly.coeffs)).factor()
        self.factors = [(f, int(m)) for f, m in factors]
        self._roots: dict[int, list] = {}
        self._logs: dict[int, list] = {}

    def roots(self, prec: int) -> list:
        """[(arb ball, multiplicity)] for every distinct eigenvalue, sorted; certified."""
        if prec not in self._roots:
            out = []
            with _Prec(prec):
                for f, m in self.factors:
                    balls = [c for c, _ in f.complex_roots()]
                    if any(not c.imag.is_zero() for c in balls):
                        raise ValueError("the characteristic polynomial has non-real roots; "
                                         "is the matrix symmetric?")
                    balls = sorted((c.real for c in balls), key=lambda b: _arb_interval(b)[0])
                    _check_isolation(f, [_arb_interval(b) for b in balls])
                    out.extend((b, m) for b in balls)
            out.sort(key=lambda bm: _arb_interval(bm[0])[0])
            self._roots[prec] = out
        return self._roots[prec]

    def logs(self, prec: int) -> list:
        """[(acb log lambda on the principal branch, multiplicity)]; zero eigenvalue rejected."""
        if prec not in self._logs:
            out = []
            with _Prec(prec):
                for ball, m in self.roots(prec):
                    if ball.contains(0):
                        raise ValueError(f"zeta_K(s) needs an invertible matrix: 0 is an "
                                         f"eigenvalue of multiplicity {m}")
                    if ball > 0:
                        out.append((acb(ball.log()), m))
                    else:   # principal branch: log(lambda) = log|lambda| + i pi
                        out.append((acb((-ball).log(), arb.pi()), m))
            self._logs[prec] = out
        return self._logs[prec]

    def is_reciprocal(self) -> bool:
        product = fmpz_poly([1])
        for f, m in self.factors:
            product *= f ** m
        c = [int(x) for x in product.coeffs()]
        return c == c[::-1] or c == [-x for x in c[::-1]]


def _check_isolation(f, intervals) -> None:
    """Exact confirmation: disjoint intervals, one per root, each with a sign change of f.

    f is irreducible (hence squarefree), so deg f disjoint intervals each showing a sign
    change (or an exact rational root, for a linear f) contain exactly one root each.
    """
    if len(intervals) != f.degree():
        raise ArithmeticError("root isolation returned the wrong number of roots")
    for (lo, hi), nxt in zip(intervals, intervals[1:] + [None]):
        if nxt is not None and not hi < nxt[0]:
            raise ArithmeticError("root enclosures overlap")
        a, b = f(_fmpq(lo)), f(_fmpq(hi))
        if f.degree() == 1:
            ok = a * b <= 0
        else:
            ok = a * b < 0
        if not ok:
            raise ArithmeticError(f"no certified sign change of {f} on [{lo}, {hi}]")


def _spectrum(source) -> _Spectrum:
    return source if isinstance(source, _Spectrum) else _Spectrum(source)


def _check_prec(prec) -> int:
    if isinstance(prec, bool) or not isinstance(prec, int) or prec < 16:
        raise ValueError(f"prec must be an integer number of bits >= 16, got {prec!r}")
    return prec


# ------------------------------------------------------------------ public API
def eigenvalue_enclosures(M, prec: int = 128) -> list[tuple[Fraction, Fraction]]:
    """Certified intervals with exact rational endpoints around the eigenvalues of M.

    For a symmetric integer matrix M (or an integer characteristic polynomial given as a
    :class:`Poly` with only real roots), returns one interval [lo, hi] per eigenvalue,
    repeated according to its algebraic multiplicity, sorted by ``lo``; the i-th smallest
    eigenvalue lies in the i-th interval.

    Parameters: ``M`` a :class:`Matrix` (square, integer, symmetric) or a :class:`Poly`;
    ``prec`` the working precision in bits (interval widths are about 2^-prec relative).
    Returns: a list of ``(Fraction, Fraction)`` pairs.

    >>> M = Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]])   # L of an edge
    >>> [(float(lo), float(hi)) for lo, hi in eigenvalue_enclosures(M, prec=30)][1]
    (1.0, 1.0)

    Method: the exact characteristic polynomial (flint, integer) is factored into
    irreducibles; each factor's roots are isolated by arb's rigorous complex root finder
    [AR], which marks real roots as exactly real; the enclosures are then confirmed in
    exact rationals (disjoint intervals, deg f of them, each with a sign change of the
    irreducible f), so the flint step only proposes.  Cost: charpoly O(n^3)-ish plus
    root isolation, polynomial in n and prec.  Reference: [AR].
    """
    prec = _check_prec(prec)
    out = []
    for ball, m in _spectrum(M).roots(prec):
        out.extend([_arb_interval(ball)] * m)
    return out


def _zeta_acb(logs, s):
    """sum m * exp(-s log lambda) in acb (s an acb ball, possibly wide)."""
    total = acb(0)
    for log_lam, m in logs:
        total += m * (-s * log_lam).exp()
    return total


def _acb_point(re: Fraction, im: Fraction):
    return acb(arb(_fmpq(re)), arb(_fmpq(im)))


def zeta_ball(M, s, prec: int = 128) -> tuple[tuple[Fraction, Fraction], tuple[Fraction, Fraction]]:
    """A certified enclosure of the spectral zeta value zeta_K(s) = sum_lambda lambda^(-s).

    The sum runs over the eigenvalues lambda of M with multiplicity; lambda^(-s) =
    exp(-s log lambda) with the principal branch log lambda = log|lambda| + i*pi for
    lambda < 0.  M must be invertible.  zeta_K is entire in s.

    Parameters: ``M`` as in :func:`eigenvalue_enclosures`; ``s`` an int, Fraction, 'p/q'
    string, or a pair ``(re, im)`` of those; ``prec`` the working precision in bits.
    Returns: ``((re_lo, re_hi), (im_lo, im_hi))``, exact rationals, containing zeta_K(s).

    >>> I2 = Matrix.from_rows([[1, 0], [0, 1]])     # two eigenvalues 1: zeta = 2
    >>> zeta_ball(I2, (3, 5))
    ((Fraction(2, 1), Fraction(2, 1)), (Fraction(0, 1), Fraction(0, 1)))

    Method: acb arithmetic [AR] started from the certified eigenvalue balls, so every
    rounding and the width of each eigenvalue ball are carried into the result.  Cost: one
    complex exponential per distinct eigenvalue.  References: [AR], [ZK].
    """
    prec = _check_prec(prec)
    re, im = _complex_point(s)
    spectrum = _spectrum(M)
    with _Prec(prec):
        value = _zeta_acb(spectrum.logs(prec), _acb_point(re, im))
    return _arb_interval(value.real), _arb_interval(value.imag)


def entropy_ball(p, prec: int = 128) -> tuple[Fraction, Fraction]:
    """A certified enclosure of the entropy S(p) = -sum_x p_x log p_x (0 log 0 = 0).

    Parameters: ``p`` a sequence of exact non-negative rationals; ``prec`` bits.
    Returns ``(lo, hi)``, exact rationals; exactly ``(0, 0)`` when every p_x is 0 or 1.

    >>> lo, hi = entropy_ball([Fraction(1, 2), Fraction(1, 2)], prec=40)   # log 2
    >>> lo < Fraction(693147180559945, 10**15) < hi, float(hi - lo) < 1e-10
    (True, True)

    Method: arb logarithms of the exact rationals [AR].  Reference: C. E. Shannon, Bell
    System Tech. J. 27 (1948) 379-423.
    """
    prec = _check_prec(prec)
    values = [_rational(x, f"p[{i}]") for i, x in enumerate(p)]
    if any(x < 0 for x in values):
        raise ValueError("entropy needs non-negative entries")
    with _Prec(prec):
        total = arb(0)
        for x in values:
            if x not in (0, 1):
                a = arb(_fmpq(x))
                total -= a * a.log()
    return _arb_interval(total)


def _as_interval(x, what: str) -> tuple[Fraction, Fraction]:
    if isinstance(x, Ball):
        return x.interval()
    if isinstance(x, tuple) and len(x) == 2:
        lo, hi = _rational(x[0], f"{what}.lo"), _rational(x[1], f"{what}.hi")
        if lo > hi:
            raise ValueError(f"{what}: interval ({lo}, {hi}) has lo > hi")
        return lo, hi
    return (_rational(x, what),) * 2


def compare(a, b, max_prec: int = PRECISIONS[-1]) -> str:
    """Certified order of two real quantities: ``"less"``, ``"greater"`` or ``"undecided"``.

    ``a`` and ``b`` are each an exact rational, a :class:`Ball`, an interval ``(lo, hi)``,
    or a callable ``prec -> interval`` that recomputes the quantity at a given precision.
    Callables are evaluated at 64, 128, 256, ... bits up to ``max_prec``; the answer is
    ``"less"`` as soon as a's interval lies strictly below b's, ``"greater"`` symmetrically,
    and ``"undecided"`` if the intervals still overlap at ``max_prec``.  Equality is never
    concluded from balls.

    >>> compare((0, 1), (2, 3)), compare(Ball(1, 1), (2, 3))
    ('less', 'undecided')

    Cost: one evaluation per precision step.  Reference: [AR] (ball semantics).
    """
    precisions = [p for p in PRECISIONS if p <= max_prec] or [max_prec]
    for prec in precisions:
        lo_a, hi_a = _as_interval(a(prec) if callable(a) else a, "a")
        lo_b, hi_b = _as_interval(b(prec) if callable(b) else b, "b")
        if hi_a < lo_b:
            return "less"
        if lo_a > hi_b:
            return "greater"
        if not (callable(a) or callable(b)):
            break
    return "undecided"


# ------------------------------------------------------------------ zero counting
def _winding(logs, corners, prec: int, min_width: Fraction) -> int | None:
    """Winding number of zeta around the closed polygon ``corners``; None if not certified."""
    directions = [acb(1), acb(0, 1), acb(-1), acb(0, -1)]
    total = arb(0)
    point_cache: dict = {}

    def point(z):
        if z not in point_cache:
            point_cache[z] = _zeta_acb(logs, _acb_point(*z))
        return point_cache[z]

    pieces = 0
    for a, b in zip(corners, corners[1:] + corners[:1]):
        stack = [(a, b)]
        while stack:
            p, q = stack.pop()
            pieces += 1
            if pieces > _MAX_PIECES:
                return None
            segment = acb(_arb_span(p[0], q[0]), _arb_span(p[1], q[1]))
            values = _zeta_acb(logs, segment)
            chosen = None
            for d in directions:
                if (values / d).real > 0:   # the whole range lies in the half-plane Re(z/d) > 0
                    zp, zq = point(p) / d, point(q) / d
                    if zp.real > 0 and zq.real > 0:
                        chosen = (zp, zq)
                        break
            if chosen is not None:
                total += chosen[1].arg() - chosen[0].arg()   # |change| < pi, args in (-pi/2, pi/2)
                continue
            if max(abs(q[0] - p[0]), abs(q[1] - p[1])) < min_width:
                return None
            mid = ((p[0] + q[0]) / 2, (p[1] + q[1]) / 2)
            stack.append((mid, q))
            stack.append((p, mid))
    n = (total / (2 * arb.pi())).unique_fmpz()
    return None if n is None else int(n)


def zeros_in_box(M, re_lo, re_hi, im_lo, im_hi, prec: int = 128,
                 max_prec: int = PRECISIONS[-1], details: dict | None = None) -> int:
    """The number of zeros of zeta_K (with multiplicity) in the open rectangle, certified.

    zeta_K(s) = sum_lambda lambda^(-s) (see :func:`zeta_ball`) is entire, so by the
    argument principle the number of zeros inside the rectangle re_lo < Re s < re_hi,
    im_lo < Im s < im_hi equals the winding number of zeta_K along its boundary.

    Parameters: ``M`` as in :func:`eigenvalue_enclosures` (invertible); the four sides as
    exact rationals with re_lo < re_hi, im_lo < im_hi; ``prec`` the starting precision,
    raised by doubling up to ``max_prec``; ``details``, if given a dict, receives the
    precision that settled the count under ``"bits"``.  Returns an int.  Raises
    :class:`Undecided` when a zero lies on (or too close to) the boundary at ``max_prec``.

    >>> zeros_in_box(Matrix.from_rows([[2, 0], [0, 3]]), -1, 1, -1, 1)   # 2^-s + 3^-s
    0

    Method: the boundary is walked counterclockwise and bisected until, on each piece,
    the acb enclosure of zeta over the whole piece lies in one of the half-planes
    Re z > 0, Im z > 0, Re z < 0, Im z < 0; the argument then changes by less than pi on
    the piece and equals the difference of the endpoint arguments measured in that
    half-plane.  The arb sum of the changes divided by 2 pi must contain exactly one
    integer.  Cost: adaptive, roughly proportional to the boundary length times the
    largest |log lambda|.  References: [HE], [AR].
    """
    prec = _check_prec(prec)
    re_lo, re_hi = _rational(re_lo, "re_lo"), _rational(re_hi, "re_hi")
    im_lo, im_hi = _rational(im_lo, "im_lo"), _rational(im_hi, "im_hi")
    if not (re_lo < re_hi and im_lo < im_hi):
        raise ValueError(f"zeros_in_box: empty rectangle [{re_lo}, {re_hi}] x [{im_lo}, {im_hi}]")
    spectrum = _spectrum(M)
    corners = [(re_lo, im_lo), (re_hi, im_lo), (re_hi, im_hi), (re_lo, im_hi)]
    size = max(re_hi - re_lo, im_hi - im_lo)
    for p in [prec] + [q for q in PRECISIONS if prec < q <= max_prec]:
        with _Prec(p):
            n = _winding(spectrum.logs(p), corners, p, size / 2 ** (p // 4))
        if n is not None:
            if details is not None:
                details["bits"] = p
            return n
    raise Undecided(f"zeros_in_box: the winding number of zeta_K around "
                    f"[{re_lo}, {re_hi}] x [{im_lo}, {im_hi}] is not certified at {max_prec} bits "
                    f"(a zero on or very near the boundary, or more than {_MAX_PIECES} pieces needed)")


def _axis_count(logs, t_lo: Fraction, t_hi: Fraction, min_width: Fraction) -> int | None:
    """Zeros of f(t) = zeta(i t) on [t_lo, t_hi] (all certified simple); None if undecided."""
    cache: dict = {}

    def sign(t):
        if t not in cache:
            v = _zeta_acb(logs, _acb_point(Fraction(0), t)).real
            cache[t] = 1 if v > 0 else -1 if v < 0 else 0
        return cache[t]

    if sign(t_lo) == 0 or sign(t_hi) == 0:
        return None
    count, stack, pieces = 0, [(t_lo, t_hi)], 0
    while stack:
        a, b = stack.pop()
        pieces += 1
        if pieces > _MAX_PIECES:
            return None
        s = acb(0, _arb_span(a, b))
        values = _zeta_acb(logs, s)
        if not values.real.contains(0):
            continue                       # no zero on [a, b]
        slope = acb(0)
        for log_lam, m in logs:            # d/dt zeta(i t) = sum -i m log(lambda) lambda^(-i t)
            slope += m * acb(0, -1) * log_lam * (-s * log_lam).exp()
        if not slope.real.contains(0) and sign(a) != 0 and sign(b) != 0:
            count += sign(a) != sign(b)     # monotone: exactly one zero iff the sign changes
            continue
        if b - a < min_width:
            return None
        mid = (a + b) / 2
        stack.append((mid, b))
        stack.append((a, mid))
    return count


def zeros_on_axis(M, t_lo, t_hi, prec: int = 128, max_prec: int = PRECISIONS[-1],
                  details: dict | None = None) -> int:
    """The number of zeros of zeta_K on the segment {i t : t_lo <= t <= t_hi}, certified.

    For a positive definite M whose spectrum is closed under lambda -> 1/lambda (the
    characteristic polynomial is reciprocal, e.g. L^2 for a 1-dimensional complex [HY]),
    f(t) = zeta_K(i t) = sum_lambda cos(t log lambda) is real, and zeros_on_axis counts
    its zeros on [t_lo, t_hi].  Every zero counted is certified to be simple, so the count
    also counts zeros of zeta_K with multiplicity on that segment.

    Parameters: ``M`` as in :func:`eigenvalue_enclosures`; ``t_lo < t_hi`` exact rationals;
    ``prec``/``max_prec``/``details`` as in :func:`zeros_in_box`.  Returns an int.  Raises
    ``ValueError`` if the spectrum is not positive and reciprocal, :class:`Undecided` if a
    zero sits at an endpoint, is multiple, or is not separated at ``max_prec``.

    >>> zeros_on_axis(Matrix.from_rows([[2, 1], [1, 1]]), 0, 2)   # 2 cos(t log phi^2)
    1

    Method: bisection of [t_lo, t_hi]; a piece is settled when the acb enclosure of f on
    it excludes 0 (no zero), or when the enclosure of f' excludes 0 and the signs at both
    ends are certified (one zero iff they differ).  Cost: adaptive, as for
    :func:`zeros_in_box`.  References: [ZK], [HY], [AR].
    """
    prec = _check_prec(prec)
    t_lo, t_hi = _rational(t_lo, "t_lo"), _rational(t_hi, "t_hi")
    if not t_lo < t_hi:
        raise ValueError(f"zeros_on_axis: need t_lo < t_hi, got [{t_lo}, {t_hi}]")
    spectrum = _spectrum(M)
    if not spectrum.is_reciprocal():
        raise ValueError("zeros_on_axis: the spectrum is not closed under lambda -> 1/lambda, "
                         "so zeta_K is not real on the imaginary axis")
    if any(_arb_interval(b)[0] <= 0 for b, _ in spectrum.roots(prec)):   # certified enclosures
        raise ValueError("zeros_on_axis: the spectrum must be positive")
    for p in [prec] + [q for q in PRECISIONS if prec < q <= max_prec]:
        with _Prec(p):
            n = _axis_count(spectrum.logs(p), t_lo, t_hi, (t_hi - t_lo) / 2 ** (p // 4))
        if n is not None:
            if details is not None:
                details["bits"] = p
            return n
    raise Undecided(f"zeros_on_axis: the zeros of zeta_K(i t) on [{t_lo}, {t_hi}] are not "
                    f"certified at {max_prec} bits (a zero at an endpoint, a multiple zero, or more "
                    f"than {_MAX_PIECES} pieces needed)")

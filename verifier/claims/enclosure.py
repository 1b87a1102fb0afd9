"""Certified numbers of the claim language: enclosures, and decisions that may be undecided.

Some quantities a claim may name are not rational: the spectral zeta value
zeta_A(s) = sum_lambda lambda^(-s) at a non-integer or complex s, or an entropy
-sum p log p.  A backend returns such a quantity as an :class:`Enclosure`: a rectangle
[re_lo, re_hi] x [im_lo, im_hi] with exact rational corners that is *proved* (by ball
arithmetic) to contain the true value, together with the precision that produced it and a
way to recompute it at a higher precision.  Arithmetic on enclosures is interval
arithmetic in exact rationals, rounded outward, so its results are proved as well.

Deciding a comparison (evidence level ``certified``, SPEC §6):

* two values are **different** when their enclosures are disjoint at some precision of the
  ladder 128, 256, 512, 1024 bits;
* two values are **equal** only by an exact argument: both are rational points, or their
  exact names (:class:`Formal`, linear combinations of named zeta values with rational
  coefficients) agree.  The one identity used for zeta values is
  zeta_P(s) = zeta_P*(-s), where P is the characteristic polynomial and P* its reciprocal
  polynomial (whose roots are the 1/lambda); so zeta_A(s) = zeta_A(-s) is proved exactly
  when the characteristic polynomial of A is reciprocal [HY];
* an order ``a < b`` is decided when the enclosure of a - b lies on one side of 0;
* anything else raises :class:`~verifier.claims.errors.Undecided`: never a yes or a no.

>>> third = Enclosure((Fraction(1, 3) - Fraction(1, 10**9), Fraction(1, 3) + Fraction(1, 10**9)))
>>> decide_equal(third, Fraction(1, 2)), decide_sign(third - Fraction(1, 4))
(False, 1)
>>> decide_equal(third, Fraction(1, 3))
Traceback (most recent call last):
...
verifier.claims.errors.Undecided: the two values agree to within 1/500000000 at 0 bits, and no exact argument shows them equal

References
----------
[AR] F. Johansson, "Arb: efficient arbitrary-precision midpoint-radius interval
     arithmetic", IEEE Trans. Computers 66 (2017) 1281-1292 (ball semantics).
[MO] R. E. Moore, R. B. Kearfott, M. J. Cloud, "Introduction to Interval Analysis",
     SIAM 2009, ch. 2-3 (interval arithmetic, outward rounding).
[HY] O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from fractions import Fraction
from math import isqrt
from typing import Callable

from .errors import EvaluationError, Undecided

__all__ = ["Enclosure", "Count", "Formal", "LADDER", "MAX_BITS", "decide_equal", "decide_sign",
           "zeta_term", "interval_text", "lift", "real_part", "imaginary_part", "zeta_value", "enclosure_list",
           "probability_vector", "free_energy_value", "rounded_points", "consistent",
           "consistent_values"]

LADDER = (128, 256, 512, 1024)      # precisions (bits) tried before a decision is undecided
MAX_BITS = LADDER[-1]
_GUARD = 32                         # extra bits kept by outward rounding of derived values

Interval = tuple[Fraction, Fraction]
_ZERO = (Fraction(0), Fraction(0))


# --------------------------------------------------------------- exact names
class Formal:
    """An exact name of a number: sum of rational coefficients times named terms.

    A term is a hashable key; ``Formal.ONE`` is the key of the rational constant 1.  Two
    numbers with equal formal names are equal; unequal names prove nothing.
    """

    ONE = ("1",)
    __slots__ = ("terms",)

    def __init__(self, terms: dict):
        self.terms = {k: Fraction(v) for k, v in terms.items() if v != 0}

    @classmethod
    def constant(cls, c) -> "Formal":
        return cls({cls.ONE: c})

    def __add__(self, other: "Formal") -> "Formal":
        terms = dict(self.terms)
        for k, v in other.terms.items():
            terms[k] = terms.get(k, 0) + v
        return Formal(terms)

    def scale(self, c) -> "Formal":
        return Formal({k: c * v for k, v in self.terms.items()})

    def __sub__(self, other: "Formal") -> "Formal":
        return self + other.scale(-1)

    def part(self, which: str) -> "Formal":
        """The formal real ("re") or imaginary ("im") part (terms wrapped, constants kept)."""
        if which == "im":
            return Formal({(which, k): v for k, v in self.terms.items() if k != Formal.ONE})
        return Formal({(k if k == Formal.ONE else (which, k)): v for k, v in self.terms.items()})

    def is_zero(self) -> bool:
        return not self.terms

    def constant_value(self):
        """The rational value when the name is a constant, else None."""
        if set(self.terms) <= {Formal.ONE}:
            return self.terms.get(Formal.ONE, Fraction(0))
        return None


def zeta_term(coeffs, s_re, s_im) -> Formal:
    """The exact name of zeta_P(s) = sum over the roots lambda of P of lambda^(-s).

    ``coeffs`` are P's coefficients from the constant term up (P(0) != 0).  The reciprocal
    polynomial P*(x) = x^n P(1/x) / P(0) has the roots 1/lambda, so zeta_P(s) = zeta_P*(-s);
    the name is the smaller of the two spellings, hence equal for both sides of that
    identity.

    >>> p = (1, -3, 1)                          # roots phi^2 and phi^-2: reciprocal
    >>> zeta_term(p, 1, 2).terms == zeta_term(p, -1, -2).terms
    True
    """
    coeffs = tuple(Fraction(c) for c in coeffs)
    lead, const = coeffs[-1], coeffs[0]
    if const == 0:
        raise ValueError("zeta_P needs P(0) != 0")
    monic = tuple(c / lead for c in coeffs)
    reverse = tuple(c / const for c in coeffs[::-1])
    s = (Fraction(s_re), Fraction(s_im))
    key = min((monic, s), (reverse, (-s[0], -s[1])))
    return Formal({("zeta",) + key: 1})


# ------------------------------------------------------------- rationals
def _down(x: Fraction, bits: int) -> Fraction:
    scale = 1 << bits
    return Fraction((x.numerator * scale) // x.denominator, scale)


def _up(x: Fraction, bits: int) -> Fraction:
    scale = 1 << bits
    return Fraction(-((-x.numerator * scale) // x.denominator), scale)


def _outward(iv: Interval, bits: int) -> Interval:
    """The interval rounded outward to dyadic endpoints (keeps sizes bounded)."""
    lo, hi = iv
    if lo.denominator.bit_length() <= bits and hi.denominator.bit_length() <= bits:
        return iv
    return (_down(lo, bits), _up(hi, bits))


def _add(a: Interval, b: Interval) -> Interval:
    return (a[0] + b[0], a[1] + b[1])


def _neg(a: Interval) -> Interval:
    return (-a[1], -a[0])


def _mul(a: Interval, b: Interval) -> Interval:
    products = (a[0] * b[0], a[0] * b[1], a[1] * b[0], a[1] * b[1])
    return (min(products), max(products))


def _square(a: Interval) -> Interval:
    lo, hi = sorted((abs(a[0]), abs(a[1])))
    return (Fraction(0) if a[0] <= 0 <= a[1] else lo * lo, hi * hi)


def _sqrt(iv: Interval, bits: int) -> Interval:
    """Outward dyadic bounds of sqrt over a non-negative interval."""
    scale = 1 << (2 * bits)
    lo, hi = iv
    low = isqrt((lo.numerator * scale) // lo.denominator) if lo > 0 else 0
    top = -((-hi.numerator * scale) // hi.denominator)     # ceil(hi * 4^bits)
    high = isqrt(top)
    if high * high < top:
        high += 1
    return (Fraction(low, 1 << bits), Fraction(high, 1 << bits))


def interval_text(iv: Interval, digits: int | None = None, max_digits: int = 400) -> str:
    """``[lo, hi]`` with decimal endpoints rounded outward, so the text still encloses.

    The number of decimals shows the width of the interval plus three digits (at most
    ``max_digits``: a shorter text is a wider, still valid, enclosure).

    >>> interval_text((Fraction(1, 3), Fraction(1, 3) + Fraction(1, 10**6)))
    '[0.333333333, 0.333334334]'
    >>> interval_text((Fraction(2), Fraction(2)))
    '2'
    """
    lo, hi = iv
    if lo == hi and digits is None:
        return str(lo)
    if digits is None:
        width = hi - lo
        digits = 3
        while Fraction(1, 10 ** digits) > width / 1000 and digits < max_digits:
            digits += 1
    scale = 10 ** digits
    low = (lo.numerator * scale) // lo.denominator
    high = -((-hi.numerator * scale) // hi.denominator)
    return f"[{_decimal(low, digits)}, {_decimal(high, digits)}]"


def _decimal(n: int, digits: int) -> str:
    sign = "-" if n < 0 else ""
    text = str(abs(n)).rjust(digits + 1, "0")
    whole, part = text[:-digits], text[-digits:].rstrip("0")
    return f"{sign}{whole}.{part}" if part else f"{sign}{whole}"


# --------------------------------------------------------------- enclosures
@dataclass(frozen=True, eq=False)
class Enclosure:
    """A certified complex number: the true value lies in ``re`` x ``im`` (exact rationals).

    ``bits`` is the working precision that produced it (0 for an exact value);
    ``recompute(bits)`` returns the same quantity enclosed at a higher precision (None when
    the enclosure cannot be improved); ``form`` is its exact name when one is known.
    """

    re: Interval
    im: Interval = _ZERO
    bits: int = 0
    recompute: Callable[[int], "Enclosure"] | None = field(default=None, repr=False)
    form: Formal | None = field(default=None, repr=False)

    def __post_init__(self):
        re = (Fraction(self.re[0]), Fraction(self.re[1]))
        im = (Fraction(self.im[0]), Fraction(self.im[1]))
        if re[0] > re[1] or im[0] > im[1]:
            raise ValueError(f"an enclosure needs lo <= hi, got {re} x {im}")
        object.__setattr__(self, "re", re)
        object.__setattr__(self, "im", im)

    # ---- construction
    @classmethod
    def exact(cls, c) -> "Enclosure":
        """The rational c as a (degenerate) enclosure."""
        c = Fraction(c)
        return cls((c, c), _ZERO, 0, None, Formal.constant(c))

    def at(self, bits: int) -> "Enclosure":
        """The same quantity enclosed at ``bits`` (itself when it cannot do better)."""
        if self.recompute is None or bits <= self.bits:
            return self
        return self.recompute(bits)

    # ---- properties
    @property
    def is_real(self) -> bool:
        """Known to be real: the imaginary enclosure is exactly {0}."""
        return self.im == _ZERO

    @property
    def is_point(self) -> bool:
        return self.re[0] == self.re[1] and self.im[0] == self.im[1]

    def contains(self, re, im=0) -> bool:
        return self.re[0] <= Fraction(re) <= self.re[1] and self.im[0] <= Fraction(im) <= self.im[1]

    def width(self) -> Fraction:
        return max(self.re[1] - self.re[0], self.im[1] - self.im[0])

    def text(self) -> str:
        """Exact text: ``[lo, hi]`` for a real value, ``[lo, hi] + [lo, hi]i`` otherwise,
        followed by the precision; decimals rounded outward."""
        if self.is_point and self.bits == 0:
            return _number_text(self.re[0]) if self.is_real else \
                f"{_number_text(self.re[0])} + {_number_text(self.im[0])}i"
        shown = (self.bits * 30103) // 100000 + 4     # about the digits the precision carries
        body = interval_text(self.re, max_digits=shown)
        if not self.is_real:
            body += f" + {interval_text(self.im, max_digits=shown)}i"
        return f"{body} @{self.bits} bits"

    def __repr__(self):
        return f"Enclosure({self.text()})"

    # ---- arithmetic (interval arithmetic in exact rationals, rounded outward)
    def _combine(self, other, rule, form) -> "Enclosure":
        other = lift(other)
        bits = max(self.bits, other.bits)
        re, im = rule(self, other)
        guard = max(bits, 64) + _GUARD
        if self.recompute is None and other.recompute is None:
            recompute = None
        else:
            a, b = self, other
            recompute = lambda p: a.at(p)._combine(b.at(p), rule, form)  # noqa: E731
        return Enclosure(_outward(re, guard), _outward(im, guard), bits, recompute,
                         form(self.form, other.form))

    def __add__(self, other):
        if not _operand(other):
            return NotImplemented
        return self._combine(other, lambda a, b: (_add(a.re, b.re), _add(a.im, b.im)),
                             lambda f, g: f + g if f is not None and g is not None else None)

    __radd__ = __add__

    def __neg__(self):
        return self.scale(-1)

    def __sub__(self, other):
        if not _operand(other):
            return NotImplemented
        return self + (-lift(other))

    def __rsub__(self, other):
        return lift(other) - self

    def __mul__(self, other):
        if not _operand(other):
            return NotImplemented
        return self._combine(other, _complex_mul, _form_product)

    __rmul__ = __mul__

    def scale(self, c) -> "Enclosure":
        c = Fraction(c)
        return Enclosure(_mul(self.re, (c, c)), _mul(self.im, (c, c)), self.bits,
                         None if self.recompute is None else (lambda p: self.at(p).scale(c)),
                         None if self.form is None else self.form.scale(c))

    def __truediv__(self, other):
        if not _operand(other):
            return NotImplemented
        other = lift(other)
        if other.is_point and other.is_real:
            if other.re[0] == 0:
                raise EvaluationError("division by zero")
            return self.scale(1 / other.re[0])
        return self * other.reciprocal()

    def __rtruediv__(self, other):
        return lift(other) * self.reciprocal()

    def reciprocal(self) -> "Enclosure":
        """1/z = conj(z) / |z|^2, defined when the enclosure excludes 0."""
        norm = _add(_square(self.re), _square(self.im))
        if norm[0] <= 0:
            raise Undecided(f"cannot divide by {self.text()}: the enclosure contains 0")
        inverse = (1 / norm[1], 1 / norm[0])
        re, im = _mul(self.re, inverse), _mul(_neg(self.im), inverse)
        guard = max(self.bits, 64) + _GUARD
        return Enclosure(_outward(re, guard), _outward(im, guard), self.bits,
                         None if self.recompute is None else (lambda p: self.at(p).reciprocal()),
                         None)

    def __pow__(self, k: int):
        if isinstance(k, bool) or not isinstance(k, int):
            raise EvaluationError("an enclosure is raised to integer powers only")
        if k < 0:
            return (self ** -k).reciprocal()
        result = Enclosure.exact(1)
        for _ in range(k):
            result = result * self
        return result

    def real(self) -> "Enclosure":
        return Enclosure(self.re, _ZERO, self.bits,
                         None if self.recompute is None else (lambda p: self.at(p).real()),
                         None if self.form is None else self.form.part("re"))

    def imag(self) -> "Enclosure":
        return Enclosure(self.im, _ZERO, self.bits,
                         None if self.recompute is None else (lambda p: self.at(p).imag()),
                         None if self.form is None else self.form.part("im"))

    def modulus(self) -> "Enclosure":
        """|z|, enclosed through sqrt(re^2 + im^2) with outward-rounded square roots."""
        if self.is_real:
            lo, hi = self.re
            re = (lo, hi) if lo >= 0 else (-hi, -lo) if hi <= 0 else (Fraction(0), max(-lo, hi))
        else:
            re = _sqrt(_add(_square(self.re), _square(self.im)), max(self.bits, 64) + _GUARD)
        constant = None if self.form is None else self.form.constant_value()
        form = Formal.constant(abs(constant)) if constant is not None and self.is_real else None
        return Enclosure(re, _ZERO, self.bits,
                         None if self.recompute is None else (lambda p: self.at(p).modulus()),
                         form)


class Count(int):
    """A certified integer (e.g. a number of zeros) that remembers the precision (bits)
    that settled it; in arithmetic it is a plain int."""

    def __new__(cls, value: int, bits: int):
        count = super().__new__(cls, value)
        count.bits = bits
        return count

    def text(self) -> str:
        return f"{int(self)} @{self.bits} bits"


def _number_text(x: Fraction) -> str:
    return str(x.numerator) if x.denominator == 1 else str(x)


def _operand(x) -> bool:
    return isinstance(x, Enclosure) or (isinstance(x, (int, Fraction)) and not isinstance(x, bool))


def real_part(z):
    """Re z for a rational or an enclosure (the claim language's ``re``)."""
    return z.real() if isinstance(z, Enclosure) else z


def imaginary_part(z):
    """Im z for a rational (0) or an enclosure (the claim language's ``im``)."""
    return z.imag() if isinstance(z, Enclosure) else 0


def lift(x) -> Enclosure:
    """An enclosure of x (a rational number or an enclosure)."""
    if isinstance(x, Enclosure):
        return x
    if isinstance(x, (int, Fraction)) and not isinstance(x, bool):
        return Enclosure.exact(x)
    raise EvaluationError(f"expected a number or a certified number, got {type(x).__name__}")


def _complex_mul(a: Enclosure, b: Enclosure):
    re = _add(_mul(a.re, b.re), _neg(_mul(a.im, b.im)))
    im = _add(_mul(a.re, b.im), _mul(a.im, b.re))
    return re, im


def _form_product(f: Formal | None, g: Formal | None) -> Formal | None:
    if f is None or g is None:
        return None
    if (c := f.constant_value()) is not None:
        return g.scale(c)
    if (c := g.constant_value()) is not None:
        return f.scale(c)
    return None


# ---------------------------------------------------------------- decisions
def _ladder(start: int):
    return [b for b in LADDER if b > start]


def _disjoint(a: Enclosure, b: Enclosure) -> bool:
    return (a.re[1] < b.re[0] or b.re[1] < a.re[0] or
            a.im[1] < b.im[0] or b.im[1] < a.im[0])


def decide_equal(a, b) -> bool:
    """Certified equality of two numbers (rationals or enclosures).

    True only by an exact argument (equal rational points, or equal exact names);
    False when the enclosures are disjoint at some precision of :data:`LADDER`; otherwise
    raises :class:`~verifier.claims.errors.Undecided`.
    """
    a, b = lift(a), lift(b)
    if a.form is not None and b.form is not None and (a.form - b.form).is_zero():
        return True
    steps = [max(a.bits, b.bits)] + _ladder(max(a.bits, b.bits))
    for bits in steps:
        x, y = a.at(bits), b.at(bits)
        if _disjoint(x, y):
            return False
        if x.is_point and y.is_point:
            return x.re == y.re and x.im == y.im
        if x.recompute is None and y.recompute is None:
            break
    width = max(x.width(), y.width())
    raise Undecided(f"the two values agree to within {_magnitude(width)} at "
                    f"{max(x.bits, y.bits)} bits, and no exact argument shows them equal")


def _magnitude(x: Fraction) -> str:
    """A short upper bound of a width: '1/500000000' when short, else '1e-k'.

    >>> _magnitude(Fraction(3, 10**400))
    '1e-399'
    """
    x = Fraction(x)
    if x == 0 or len(str(x)) <= 12:
        return str(x)
    k = len(str(x.denominator)) - len(str(x.numerator))
    while k > -400 and Fraction(1, 10) ** k < x:
        k -= 1
    return f"1e-{k}" if k > 0 else f"1e{-k}"


def decide_sign(d) -> int:
    """The certified sign (-1, 0, 1) of a real number given as a rational or an enclosure.

    0 only by an exact argument; raises :class:`~verifier.errors.EvaluationError` when the
    value is certainly not real, and :class:`Undecided` when no precision of
    :data:`LADDER` separates it from 0.
    """
    d = lift(d)
    if d.form is not None and d.form.is_zero():
        return 0
    for bits in [d.bits] + _ladder(d.bits):
        x = d.at(bits)
        if x.im[0] > 0 or x.im[1] < 0:
            raise EvaluationError(f"an order needs real numbers; {x.text()} is not real")
        if x.is_real:
            if x.re[0] > 0:
                return 1
            if x.re[1] < 0:
                return -1
            if x.is_point:
                return 0
        if x.recompute is None:
            break
    raise Undecided(f"the sign of {x.text()} is not decided at {x.bits} bits "
                    "(the enclosure contains 0)")


# ------------------------------------------------- values built by the backends
def zeta_value(coeffs, s, t, ball: Callable[[int], tuple[Interval, Interval]],
               bits: int) -> Enclosure:
    """The enclosure of zeta_P(s + i t), from a backend's ``ball(bits) -> (re, im)``.

    ``coeffs`` are the characteristic polynomial's coefficients (constant term first):
    they give the exact name :func:`zeta_term`, identical in every backend.
    """
    form = zeta_term(coeffs, s, t)

    def at(p: int) -> Enclosure:
        re, im = ball(p)
        return Enclosure(re, im, p, at, form)

    return at(bits)


def enclosure_list(intervals: Callable[[int], list[Interval]], bits: int) -> tuple:
    """Real enclosures from a backend's ``intervals(bits)`` (e.g. sorted eigenvalues);
    each recomputes the whole list at a higher precision and keeps its own entry."""
    first = intervals(bits)

    def item(i: int, p: int, iv: Interval) -> Enclosure:
        return Enclosure(iv, _ZERO, p, lambda q: item(i, q, intervals(q)[i]))

    return tuple(item(i, bits, iv) for i, iv in enumerate(first))


def probability_vector(p, n: int) -> tuple[Fraction, ...]:
    """p as exact rationals, checked: n entries, each >= 0, summing to 1."""
    if not isinstance(p, tuple):
        raise EvaluationError("free_energy: p must be a list of exact rationals")
    if len(p) != n:
        raise EvaluationError(f"free_energy: p has {len(p)} entries, the matrix has order {n}")
    values = []
    for i, x in enumerate(p):
        if isinstance(x, bool) or not isinstance(x, (int, Fraction)):
            raise EvaluationError(f"free_energy: p[{i}] is not an exact rational number")
        if x < 0:
            raise EvaluationError(f"free_energy: p[{i}] = {x} is negative")
        values.append(Fraction(x))
    if sum(values) != 1:
        raise EvaluationError(f"free_energy: the entries of p sum to {sum(values)}, not 1")
    return tuple(values)


def free_energy_value(U: Fraction, p: tuple, T, entropy: Callable[[int], Interval], bits: int):
    """F_T(p) = U - T S(p) given the exact energy U and a backend's enclosure of S(p).

    Exact (a rational) when T = 0 or p is a point mass (S = 0); otherwise an enclosure
    named exactly by U and the multiset of the p's (S depends on nothing else).
    """
    T = Fraction(T)
    if T < 0:
        raise EvaluationError(f"free_energy: the temperature must be >= 0, got {T}")
    if T == 0 or all(x in (0, 1) for x in p):
        return U.numerator if isinstance(U, Fraction) and U.denominator == 1 else U
    form = Formal({Formal.ONE: U, ("entropy",) + tuple(sorted(p)): -T})

    def at(q: int) -> Enclosure:
        lo, hi = entropy(q)
        return Enclosure((U - T * hi, U - T * lo), _ZERO, q, at, form)

    return at(bits)


def rounded_points(points) -> tuple:
    """Floating-point points as exact decimals with 6 places (labelled float evidence)."""
    return tuple(tuple(Fraction(round(float(x) * 10**6), 10**6) for x in point)
                 for point in points)


# ------------------------------------------------------------ re-checking texts
_TOKEN = re.compile(r"\[(-?\d+(?:\.\d+)?), (-?\d+(?:\.\d+)?)\]|(-?\d+(?:/\d+)?(?:\.\d+)?)")


def _tokens(text: str) -> list[Interval]:
    text = re.sub(r"@\d+ bits", "", text)
    out = []
    for m in _TOKEN.finditer(text):
        if m.group(1) is not None:
            out.append((Fraction(m.group(1)), Fraction(m.group(2))))
        else:
            x = Fraction(m.group(3))
            out.append((x, x))
    return out


def consistent(a: str, b: str) -> bool:
    """Can two value texts describe the same value?  Texts of certified values (they name
    their precision, ``@N bits``) are compared number by number: each pair of intervals
    must intersect, since both contain the true value.  Any other texts must be equal.

    >>> consistent("[1.41, 1.42] @128 bits", "[1.414, 1.415] @160 bits")
    True
    >>> consistent("[1.41, 1.42] @128 bits", "[1.43, 1.44] @160 bits"), consistent("16", "17")
    (False, False)
    """
    if " bits" not in a and " bits" not in b:
        return a == b
    ta, tb = _tokens(a), _tokens(b)
    return len(ta) == len(tb) and all(x[0] <= y[1] and y[0] <= x[1] for x, y in zip(ta, tb))


def consistent_values(recorded: list, recomputed: list) -> str | None:
    """None when two lists of certified values (``{"function", "value", ...}``, in the
    order met) agree; otherwise the first disagreement, in words."""
    if len(recorded) != len(recomputed):
        return (f"{len(recorded)} certified values recorded, {len(recomputed)} recomputed")
    for old, new in zip(recorded, recomputed):
        if old.get("function") != new.get("function") or \
                not consistent(str(old.get("value")), str(new.get("value"))):
            return (f"{old.get('function')} at {old.get('at')}: recorded {old.get('value')}, "
                    f"recomputed {new.get('value')}")
    return None

"""Exact univariate polynomials with integer or rational coefficients.

Plain Python (ints and ``fractions.Fraction``): the rest of the code never sees a
backend's polynomial type.
"""

from __future__ import annotations

from fractions import Fraction
from numbers import Rational

__all__ = ["Poly"]


def _normal(c):
    if isinstance(c, Fraction) and c.denominator == 1:
        return int(c.numerator)
    return c


class Poly:
    """An exact polynomial in one variable ``x``, coefficients from the constant term up.

    >>> p = Poly([1, -3, 1])          # x^2 - 3x + 1
    >>> p.degree, p(2), p.is_reciprocal()
    (2, -1, True)
    >>> str(p)
    'x^2 - 3*x + 1'
    """

    __slots__ = ("coeffs",)

    def __init__(self, coeffs):
        coeffs = list(coeffs)
        for c in coeffs:
            if isinstance(c, float) or not isinstance(c, Rational):
                raise TypeError(f"polynomial coefficient {c!r} is not an exact rational number")
        coeffs = [_normal(Fraction(c) if not isinstance(c, (int, Fraction)) else c) for c in coeffs]
        while coeffs and coeffs[-1] == 0:
            coeffs.pop()
        object.__setattr__(self, "coeffs", tuple(coeffs))

    def __setattr__(self, name, value):
        raise AttributeError("Poly is immutable")

    def __delattr__(self, name):
        raise AttributeError("Poly is immutable")

    def __reduce__(self):
        """Pickled through the constructor (an immutable object has no state to set)."""
        return (Poly, (self.coeffs,))

    @property
    def degree(self) -> int:
        """Degree; -1 for the zero polynomial."""
        return len(self.coeffs) - 1

    def __call__(self, x):
        value = 0
        for c in reversed(self.coeffs):
            value = value * x + c
        return _normal(value) if isinstance(value, Fraction) else value

    def __eq__(self, other) -> bool:
        if isinstance(other, Rational):
            other = Poly([other])
        return isinstance(other, Poly) and self.coeffs == other.coeffs

    def __hash__(self):
        return hash(self.coeffs)

    def _lift(self, other):
        return other if isinstance(other, Poly) else Poly([other])

    def __add__(self, other):
        other = self._lift(other)
        n = max(len(self.coeffs), len(other.coeffs))
        a = self.coeffs + (0,) * (n - len(self.coeffs))
        b = other.coeffs + (0,) * (n - len(other.coeffs))
        return Poly([x + y for x, y in zip(a, b)])

    __radd__ = __add__

    def __neg__(self):
        return Poly([-c for c in self.coeffs])

    def __sub__(self, other):
        return self + (-self._lift(other))

    def __rsub__(self, other):
        return self._lift(other) - self

    def __mul__(self, other):
        other = self._lift(other)
        if not self.coeffs or not other.coeffs:
            return Poly([])
        out = [0] * (len(self.coeffs) + len(other.coeffs) - 1)
        for i, a in enumerate(self.coeffs):
            if a:
                for j, b in enumerate(other.coeffs):
                    out[i + j] += a * b
        return Poly(out)

    __rmul__ = __mul__

    def __pow__(self, k: int):
        if not isinstance(k, int) or k < 0:
            raise ValueError("a polynomial power needs a non-negative integer exponent")
        result, base = Poly([1]), self
        while k:
            if k & 1:
                result = result * base
            base = base * base
            k >>= 1
        return result

    def reversed(self) -> "Poly":
        """x^deg p(1/x): the coefficients in reverse order."""
        return Poly(self.coeffs[::-1])

    def is_reciprocal(self) -> bool:
        """True when p(x) = ±x^n p(1/x) with n = deg p, i.e. the coefficient list is
        palindromic or anti-palindromic.  The zero polynomial is not reciprocal.

        >>> Poly([1, 0, -1]).is_reciprocal(), Poly([2, 1]).is_reciprocal()
        (True, False)
        """
        c = self.coeffs
        if not c or c[0] == 0:
            return False
        r = c[::-1]
        return c == r or c == tuple(-x for x in r)

    def root_multiplicity(self, r) -> int:
        """Multiplicity of the exact rational number r as a root (0 if not a root)."""
        if not self.coeffs:
            raise ValueError("every number is a root of the zero polynomial")
        r = Fraction(r)
        count, coeffs = 0, list(self.coeffs)
        while coeffs:
            # synthetic division by (x - r)
            quotient, carry = [], Fraction(0)
            for c in reversed(coeffs):
                carry = carry * r + c
                quotient.append(carry)
            remainder = quotient.pop()
            if remainder != 0:
                break
            count += 1
            coeffs = list(reversed(quotient))
        return count

    def sign_changes(self) -> int:
        """Number of sign changes in the coefficient sequence (zeros skipped)."""
        signs = [1 if c > 0 else -1 for c in self.coeffs if c != 0]
        return sum(1 for a, b in zip(signs, signs[1:]) if a != b)

    def compose_neg(self) -> "Poly":
        """p(-x)."""
        return Poly([c if i % 2 == 0 else -c for i, c in enumerate(self.coeffs)])

    def to_json(self) -> list[str]:
        """Coefficients as exact strings, constant term first."""
        return [str(c) for c in self.coeffs]

    def __repr__(self):
        return f"Poly({list(self.coeffs)!r})"

    def __str__(self):
        if not self.coeffs:
            return "0"
        terms = []
        for k in range(self.degree, -1, -1):
            c = self.coeffs[k]
            if c == 0:
                continue
            sign = "-" if c < 0 else "+"
            a = -c if c < 0 else c
            if k == 0:
                body = str(a)
            else:
                power = "x" if k == 1 else f"x^{k}"
                body = power if a == 1 else f"{a}*{power}"
            terms.append((sign, body))
        first_sign, first = terms[0]
        text = ("-" if first_sign == "-" else "") + first
        for sign, body in terms[1:]:
            text += f" {sign} {body}"
        return text

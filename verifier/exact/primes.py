"""Primality, for the coefficient fields Z/p of homology and ranks.

>>> is_prime(2), is_prime(91), is_prime(2**127 - 1)
(True, False, True)
"""

from __future__ import annotations

import flint

__all__ = ["is_prime"]


def is_prime(p: int) -> bool:
    """True when the integer p is a prime (python-flint's deterministic test below 2^64,
    and its BPSW test with a proof attempt above)."""
    return isinstance(p, int) and p >= 2 and bool(flint.fmpz(p).is_prime())

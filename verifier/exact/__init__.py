"""Exact arithmetic: the only part of the project that talks to python-flint.

Everything above this package sees :class:`Matrix`, :class:`Poly`, :class:`Verdict`,
Python ints and ``fractions.Fraction``, never a python-flint type.
"""

from .linalg import (Verdict, charpoly, charpoly_is_reciprocal, charpoly_of_square, det,
                     inverse, inverse_many, invariant_factors, is_inverse, kernel_dim, multiplicity, rank,
                     rank_mod, signature, unit_ldl, verified_inverse_batch)
from .certified import (Ball, Undecided, compare, eigenvalue_enclosures, entropy_ball,
                        zeros_in_box, zeros_on_axis, zeta_ball)
from .matrix import ExactError, Matrix
from .morse import MorseReduction, reduce_chain_complex, reduce_face_table
from .primes import is_prime
from .lattice import hermite_rows, integer_kernel
from .poly import Poly

__all__ = [
    "Ball", "Undecided", "compare", "eigenvalue_enclosures", "entropy_ball", "zeros_in_box",
    "zeros_on_axis",
    "zeta_ball", "MorseReduction", "reduce_chain_complex", "reduce_face_table", "is_prime",
    "hermite_rows", "integer_kernel",
    "Matrix", "Poly", "Verdict", "ExactError", "charpoly", "charpoly_is_reciprocal",
    "charpoly_of_square", "det", "inverse", "inverse_many", "invariant_factors", "is_inverse", "kernel_dim",
    "multiplicity", "rank", "rank_mod", "signature", "unit_ldl", "verified_inverse_batch",
]

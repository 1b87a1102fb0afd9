"""Invariants of finite abstract simplicial complexes, computed exactly.

Each function is small and pure: it takes an immutable :class:`~verifier.complex.Complex`
(or a matrix / polynomial built from one) and returns an exact value -- an ``int``, a
``fractions.Fraction``, a tuple, or a :class:`~verifier.exact.Matrix` /
:class:`~verifier.exact.Poly`.  Matrices are indexed by ``K.simplices`` (ordered by
dimension, then lexicographically).

Notation: for a simplex x with k+1 vertices, dim x = k and omega(x) = (-1)^k.
St(x) = {z in K : x subset of z} is the (open) star; chi(A) = sum of omega over a set A.

The package has one module per concept: ``counting`` (f-vector, Euler and Wu
characteristics), ``connection`` (connection matrix, Green function), ``hodge`` (boundary,
Dirac and Hodge operators), ``homology`` (integer homology by discrete Morse reduction,
Betti numbers, torsion), ``spectra`` (exact spectral invariants of matrices), ``geometry``
(curvature, Poincare-Hopf indices) and ``manifolds`` (manifold, sphere and ball tests).
Everything public is re-exported here: ``from verifier.invariants import euler``.

References
----------
.. [EC]  L. Euler (1758); H. Poincare (1895): chi = sum_k (-1)^k f_k = sum_k (-1)^k b_k.
.. [Wu]  W. Wu, "Topologie combinatoire et invariants combinatoires",
         Colloq. Math. 7 (1959) 1-8.
.. [GB]  O. Knill, "Gauss-Bonnet for multi-linear valuations", arXiv:1601.04533 (2016).
.. [FD]  O. Knill, "On Fredholm determinants in topology", arXiv:1612.08229 (2016).
.. [HE]  O. Knill, "One can hear the Euler characteristic of a simplicial complex",
         arXiv:1711.09527 (2017).
.. [EN]  O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
         96-129, arXiv:1907.03369.
.. [HY]  O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018).
.. [MS]  O. Knill, "The McKean-Singer formula in graph theory", arXiv:1301.1408 (2013).
.. [LE]  N. Levitt, "The Euler characteristic is the unique locally determined numerical
         homotopy invariant of finite complexes", Discrete Comput. Geom. 7 (1992) 59-67.
.. [PH]  O. Knill, "A graph theoretical Poincare-Hopf theorem", arXiv:1201.1162 (2012).
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
"""

from __future__ import annotations

from .connection import connection, fredholm, green, green_by_inversion, green_many
from .counting import (dim, euler, f_vector, facets, h_vector, omega, simplices, size,
                       vertices, wu)
from .geometry import curvature, index, indices
from .hodge import (boundary_matrix, dirac, exterior_derivative, hodge, signless_dirac,
                    signless_hodge)
from .homology import (betti, format_homology, homology, homology_witness, morse_reduction,
                       torsion)
from .manifolds import (NotDecided, is_ball, is_closed_manifold, is_manifold,
                        is_manifold_with_boundary, is_sphere)
from .spectra import (charpoly, det, is_reciprocal, kernel_dim, multiplicity, negative,
                      positive, rank, signature, trace, zeta)

__all__ = [
    "simplices", "vertices", "facets", "omega", "dim", "size", "f_vector", "h_vector",
    "euler", "wu",
    "connection", "green", "green_many", "green_by_inversion", "fredholm", "boundary_matrix",
    "exterior_derivative", "dirac", "hodge", "signless_dirac", "signless_hodge", "betti",
    "homology", "torsion", "homology_witness", "morse_reduction", "format_homology",
    "charpoly", "is_reciprocal", "det", "trace", "rank", "kernel_dim", "positive", "negative",
    "signature", "multiplicity", "zeta", "curvature", "index", "indices", "is_closed_manifold",
    "is_manifold_with_boundary", "is_manifold", "is_sphere", "is_ball", "NotDecided",
]

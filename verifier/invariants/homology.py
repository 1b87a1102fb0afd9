"""Integer homology, Betti numbers over Q and Z/p, torsion -- by discrete Morse reduction.

The simplicial chain complex of K (the k-simplices as basis of C_k, boundary
d[v_0..v_k] = sum_i (-1)^i [v_0..^v_i..v_k]) is first reduced to its Morse complex by an
acyclic matching built from coreductions (:mod:`verifier.exact.morse`, [F], [MB]); that
small complex has the same homology over Z.  The Smith normal form of its boundary
matrices then gives everything at once: if D_k has the nonzero invariant factors
d_1 | d_2 | ... and c_k is the number of critical k-cells, then

    H_k(K; Z) = Z^(c_k - r_k - r_(k+1))  +  sum over d_i > 1 of D_(k+1) of Z/d_i,

with r_k the number of nonzero invariant factors of D_k, and over a field Z/p the rank of
D_k is the number of invariant factors not divisible by p [MU, §11].  So ``betti`` over Q
or any Z/p, ``torsion`` and ``homology`` share one reduction, cached on the complex.

Part of :mod:`verifier.invariants` (see its docstring for the conventions).

References
----------
.. [MU]  J. R. Munkres, "Elements of Algebraic Topology", Addison-Wesley (1984).
.. [F]   R. Forman, "Morse theory for cell complexes", Adv. Math. 134 (1998) 90-145.
.. [MB]  M. Mrozek and B. Batko, "Coreduction homology algorithm", Discrete Comput. Geom.
         42 (2009) 577-598.
"""

from __future__ import annotations

import numpy as np

from .. import exact
from ..complex import Complex
from ..exact import ExactError, Matrix
from ..exact.morse import MorseReduction, reduce_face_table

__all__ = ["betti", "homology", "torsion", "homology_witness", "morse_reduction",
           "format_homology"]


def morse_reduction(K: Complex) -> MorseReduction:
    """The discrete Morse reduction of the simplicial chain complex of K (cached).

    Cells are the simplices in simplex order; the matching comes from coreductions and
    the Morse boundaries from the gradient flow ([F], [MB]; see :mod:`verifier.exact.morse`).

    >>> R = morse_reduction(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))   # a circle
    >>> [int(d) for d in R.dims[R.critical]]
    [0, 1]
    """
    def compute():
        n = len(K.simplices)
        offsets = K.dimension_offsets()
        sizes = np.diff(np.asarray(offsets, dtype=np.int64))
        dims = np.repeat(np.arange(len(sizes), dtype=np.int64), sizes)
        counts = np.where(dims > 0, dims + 1, 0)
        face_ptr = np.zeros(n + 1, dtype=np.int64)
        np.cumsum(counts, out=face_ptr[1:])
        tables = [K.face_positions(k).ravel() for k in range(1, len(sizes))]
        face_idx = np.concatenate(tables) if tables else np.zeros(0, dtype=np.int64)
        signs = [np.tile(1 - 2 * (np.arange(k + 1) % 2), int(sizes[k]))
                 for k in range(1, len(sizes))]
        face_sgn = np.concatenate(signs) if signs else np.zeros(0, dtype=np.int64)
        return reduce_face_table(n, dims, face_ptr, face_idx, face_sgn)
    return K._cached("morse_reduction", compute)


def _smith(K: Complex) -> tuple[list[int], dict[int, list[int]]]:
    """(c_k for k = 0..dim, {k: nonzero invariant factors of the Morse boundary D_k})."""
    def compute():
        R = morse_reduction(K)
        critical = np.asarray(R.critical, dtype=np.int64)
        counts = [int(np.count_nonzero(R.dims[critical] == k)) for k in range(K.dim + 1)]
        factors = {}
        for k, entries in R.boundaries.items():
            shape = (counts[k - 1], counts[k])
            rows, cols = zip(*entries)
            D = Matrix.from_entries(shape, list(rows), list(cols), list(entries.values()))
            factors[k] = exact.invariant_factors(D)
        return counts, factors
    return K._cached("morse_smith", compute)


def _check_prime(p) -> None:
    if not isinstance(p, int) or isinstance(p, bool) or p < 0 or (p != 0 and not exact.is_prime(p)):
        raise ExactError(f"p must be 0 (rational coefficients) or a prime, got {p!r}")


def homology(K: Complex) -> tuple[tuple[int, tuple[int, ...]], ...]:
    """The integer homology of K: for k = 0..dim K the pair (free rank of H_k(K; Z),
    torsion coefficients d_1 | d_2 | ... of H_k, each > 1, increasing).

    Unreduced simplicial homology [MU, §5, §11], computed from the Morse complex of a
    coreduction matching and the Smith normal form of its boundaries (module docstring).

    >>> homology(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))        # a circle
    ((1, ()), (1, ()))

    The six-vertex real projective plane has H_1 = Z/2:

    >>> RP2 = [[1,2,3],[1,3,4],[1,4,5],[1,5,6],[1,2,6],[2,3,5],[2,4,5],[2,4,6],[3,4,6],[3,5,6]]
    >>> homology(Complex.from_facets(RP2))
    ((1, ()), (0, (2,)), (0, ()))

    Notes: linear time for the matching and the flow of each critical cell; the Smith
    normal form runs on the Morse complex only.  References: [MU], [F], [MB].
    """
    counts, factors = _smith(K)
    result = []
    for k in range(K.dim + 1):
        r_k = len(factors.get(k, ()))
        above = factors.get(k + 1, [])
        free = counts[k] - r_k - len(above)
        result.append((free, tuple(d for d in above if d > 1)))
    return tuple(result)


def torsion(K: Complex, k: int) -> tuple[int, ...]:
    """The torsion coefficients of H_k(K; Z): its invariant factors greater than 1, in
    increasing order (empty outside 0..dim K).

    >>> RP2 = [[1,2,3],[1,3,4],[1,4,5],[1,5,6],[1,2,6],[2,3,5],[2,4,5],[2,4,6],[3,4,6],[3,5,6]]
    >>> torsion(Complex.from_facets(RP2), 1)
    (2,)

    References: [MU, §11].
    """
    if not isinstance(k, int) or isinstance(k, bool):
        raise ExactError(f"torsion needs an integer degree k, got {k!r}")
    _, factors = _smith(K)
    return tuple(d for d in factors.get(k + 1, []) if d > 1) if 0 <= k <= K.dim else ()


def betti(K: Complex, k: int | None = None, p: int = 0):
    """Betti numbers b_k = dim H_k(K; F) over F = Q (p = 0) or F = Z/p (p prime).

    Unreduced homology: b_0 is the number of connected components.  Returns the tuple
    (b_0, ..., b_dim) when k is None, else b_k (0 outside 0..dim).  Over Z/p the rank of
    each Morse boundary is the number of its invariant factors not divisible by p, which
    is the universal coefficient theorem in matrix form [MU, §11, §55].

    >>> betti(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    (1, 1)
    >>> RP2 = [[1,2,3],[1,3,4],[1,4,5],[1,5,6],[1,2,6],[2,3,5],[2,4,5],[2,4,6],[3,4,6],[3,5,6]]
    >>> betti(Complex.from_facets(RP2)), betti(Complex.from_facets(RP2), p=2)
    ((1, 0, 0), (1, 1, 1))

    References: [MU] §5, §7, §11.
    """
    _check_prime(p)
    counts, factors = _smith(K)

    def rank(j: int) -> int:
        return sum(1 for d in factors.get(j, ()) if p == 0 or d % p)

    numbers = tuple(counts[j] - rank(j) - rank(j + 1) for j in range(K.dim + 1))
    if k is None:
        return numbers
    return numbers[k] if 0 <= k < len(numbers) else 0


def homology_witness(K: Complex) -> dict:
    """What lets an independent checker confirm :func:`homology` without searching for a
    matching: the matched pairs, the critical simplices, the Morse boundaries and the
    claimed homology, as plain JSON-able data (scheme ``"morse/1"``).

    Positions refer to ``K.simplices``.  ``boundaries[str(k)]`` lists [i, j, value] with
    i indexing the critical (k-1)-simplices and j the critical k-simplices, each in
    ascending position order.  Verified flint-free by :mod:`verifier.independent.homology`.

    >>> w = homology_witness(Complex.from_facets([[1, 2], [2, 3], [1, 3]]))
    >>> w["scheme"], len(w["pairs"]) // 2, w["critical"], w["homology"]
    ('morse/1', 2, [0, 5], [[1, []], [1, []]])
    """
    R = morse_reduction(K)
    return {
        "scheme": "morse/1",
        "size": len(K.simplices),
        "pairs": [int(x) for x in R.pairs().ravel()],
        "critical": list(R.critical),
        "boundaries": {str(k): [[i, j, v] for (i, j), v in sorted(entries.items())]
                       for k, entries in sorted(R.boundaries.items())},
        "homology": [[free, list(t)] for free, t in homology(K)],
    }


def format_homology(groups: tuple[tuple[int, tuple[int, ...]], ...]) -> list[str]:
    """Each homology group as mathematicians write it, one line per degree:
    ``H_1 = Z^2 + Z/2``, ``H_2 = 0``.

    >>> format_homology(((1, ()), (2, (2,)), (0, ())))
    ['H_0 = Z', 'H_1 = Z^2 + Z/2', 'H_2 = 0']
    """
    lines = []
    for k, (free, tors) in enumerate(groups):
        parts = ([f"Z^{free}" if free > 1 else "Z"] if free else []) + [f"Z/{d}" for d in tors]
        lines.append(f"H_{k} = " + (" + ".join(parts) if parts else "0"))
    return lines

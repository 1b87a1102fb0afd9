"""Integer relations: the lattice of integer vectors in the kernel of a rational matrix.

Public names: :func:`integer_kernel` (an LLL-reduced basis of ker(A) ∩ Z^n) and
:func:`hermite_rows` (the Hermite normal form of an integer row basis, a canonical name
for the lattice it spans).  Both take and return plain Python integers (or fractions as
input); python-flint stays inside this module.

References
----------
[1] A. K. Lenstra, H. W. Lenstra, L. Lovász, Factoring polynomials with rational
    coefficients, Math. Ann. 261 (1982) 515-534 (the LLL reduction).
[2] H. Cohen, A Course in Computational Algebraic Number Theory, Springer GTM 138
    (1993), §2.4.3 and §2.7.2 (Hermite normal form; integral kernels through an
    LLL-reduced embedding).
"""

from __future__ import annotations

from fractions import Fraction
from math import lcm

import flint

__all__ = ["integer_kernel", "hermite_rows"]


def _integer_rows(rows) -> list[list[int]]:
    """Distinct nonzero rows, each multiplied by the lcm of its denominators (the kernel
    of a matrix does not change when a row is scaled, repeated or dropped)."""
    distinct = list(dict.fromkeys(tuple(row) for row in rows))
    if not all(type(x) is int for row in distinct for x in row):
        scaled = []
        for row in distinct:
            values = [Fraction(x) for x in row]
            scale = lcm(*(x.denominator for x in values)) if values else 1
            scaled.append(tuple(int(x * scale) for x in values))
        distinct = list(dict.fromkeys(scaled))
    return [list(row) for row in distinct if any(row)]


def integer_kernel(rows, columns: int) -> list[list[int]]:
    """An LLL-reduced basis of the lattice of integer vectors x with A x = 0.

    Definition: A is the matrix with the given rows (integers or fractions, each of
    length ``columns``); the result spans ker(A) ∩ Z^n (the *saturated* lattice of
    integer relations among the columns), and is LLL-reduced with δ = 0.99, so its
    vectors are short.

    Parameters: rows -- an iterable of equal-length sequences of ints/Fractions;
    columns -- n, the number of columns (needed when there are no rows).
    Returns: a list of integer vectors (lists of Python ints), n - rank(A) of them.

    >>> integer_kernel([[1, 1, 1], [2, 3, 4]], 3)
    [[1, -2, 1]]
    >>> integer_kernel([[2, 4]], 2)         # saturated: (2, -1), not a multiple of it
    [[-2, 1]]
    >>> integer_kernel([], 2)
    [[1, 0], [0, 1]]

    Method: duplicate rows are dropped and rows are scaled to integers; the reduced row
    echelon form of what remains (python-flint, exact) keeps rank(A) independent rows
    R.  The lattice spanned by the rows (e_j, W·R e_j), j = 1..n, is LLL-reduced [1];
    for W large enough its first n - rank vectors have a zero tail and their heads are
    a basis of ker(A) ∩ Z^n [2, §2.7.2].  The count of zero tails is checked (W is
    raised until it is right), and every returned vector is checked to satisfy
    R x = 0 exactly.
    """
    n = int(columns)
    if n == 0:
        return []
    distinct = [list(row) for row in dict.fromkeys(map(tuple, rows)) if any(row)]
    try:                                            # integers: straight to python-flint
        matrix = flint.fmpz_mat(distinct) if distinct else None
    except TypeError:                               # fractions: scale each row first
        distinct = _integer_rows(distinct)
        matrix = flint.fmpz_mat(distinct) if distinct else None
    if matrix is None:
        return [[int(i == j) for j in range(n)] for i in range(n)]
    reduced, _denominator, rank = matrix.rref()
    rank = int(rank)
    echelon = [[int(reduced[i, j]) for j in range(n)] for i in range(rank)]
    if rank == n:
        return []
    height = max(abs(x) for row in echelon for x in row)
    weight = max(2, height) * 2 ** (n + 4)
    for _attempt in range(8):
        basis = flint.fmpz_mat([[int(i == j) for j in range(n)]
                                + [weight * echelon[r][i] for r in range(rank)]
                                for i in range(n)])
        lll = basis.lll(delta=0.99).tolist()
        zero_tail = [[int(x) for x in row[:n]] for row in lll
                     if all(int(x) == 0 for x in row[n:])]
        if len(zero_tail) == n - rank:
            break
        weight *= 2 ** 16
    else:                                           # pragma: no cover - not reached
        raise ArithmeticError("integer_kernel: the LLL embedding did not separate the "
                              "kernel; this is a bug")
    for vector in zero_tail:                        # the check: R x = 0 exactly
        if any(sum(a * b for a, b in zip(row, vector)) for row in echelon):
            raise ArithmeticError("integer_kernel: a proposed kernel vector fails R x = 0")
    return zero_tail


def hermite_rows(vectors) -> list[list[int]]:
    """The Hermite normal form of the lattice spanned by integer row vectors.

    Definition: the unique row-style Hermite normal form (upper echelon, positive
    pivots, entries above each pivot reduced modulo it) of the matrix with the given
    rows, zero rows removed; two sets of vectors span the same lattice of Z^n exactly
    when their forms are equal [2, §2.4.3].

    Parameters: vectors -- a non-empty list of equal-length integer sequences.
    Returns: a list of lists of Python ints (one per basis vector of the lattice).

    >>> hermite_rows([[2, 4], [1, 3]])
    [[1, 1], [0, 2]]
    >>> hermite_rows([[1, 3], [2, 4]]) == hermite_rows([[1, 1], [0, 2]])
    True

    Method: python-flint's ``fmpz_mat.hnf``.
    """
    rows = [[int(x) for x in v] for v in vectors]
    if not rows:
        return []
    form = flint.fmpz_mat(rows).hnf().tolist()
    return [[int(x) for x in row] for row in form if any(int(x) for x in row)]

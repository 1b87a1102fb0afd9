"""Exact matrices and polynomials over Q in plain Python, for the independent backend.

:class:`Matrix` is an immutable dense matrix whose entries are Python ``int`` or
``fractions.Fraction``; :class:`Poly` is an exact polynomial in one variable.  They are
what the independent backend of the claim language (:mod:`verifier.independent.claims`)
computes with, so that a claim can be evaluated without python-flint: nothing here
imports ``flint``, ``sympy`` or any other module of ours.

The linear algebra is written from the textbook definitions, on sparse rows:

* :func:`inverse`, :func:`det`, :func:`rank`, :func:`kernel_dim` -- Gauss-Jordan and
  Gaussian elimination over Q (entries stay integers while every pivot is +-1, and
  become Fractions otherwise); every inverse is accepted only after ``A @ G == I``;
* :func:`rank_mod` -- Gaussian elimination over the field Z/p;
* :func:`charpoly` -- reduction to upper Hessenberg form modulo many primes (numpy int64
  arrays, every product below 2^62 so the arithmetic is exact), the Hessenberg
  recurrence, and the Chinese remainder theorem with a proven Hadamard bound on the
  coefficients, so the result is exact;
* :func:`signature` -- Sylvester's law of inertia by congruence elimination
  (:func:`verifier.independent.compute.inertia`);
* :func:`multiplicity` -- nullity of ``A - c I`` for symmetric A, root multiplicity in
  the characteristic polynomial otherwise.

Error messages for impossible requests (wrong shapes, a singular matrix) are the ones
the main backend (:mod:`verifier.exact`) gives, so that a claim that cannot be
evaluated fails with the same words under both backends.
"""

from __future__ import annotations

from fractions import Fraction
from math import isqrt
from numbers import Rational

__all__ = ["Matrix", "Poly", "MatrixError", "det", "rank", "rank_mod", "kernel_dim",
           "inverse", "charpoly", "signature", "multiplicity", "is_symmetric"]


class MatrixError(ArithmeticError):
    """An exact computation is impossible as asked (singular matrix, wrong shape, ...)."""


def _normal(x):
    """An int for an integral Fraction, the value itself otherwise."""
    if type(x) is Fraction and x.denominator == 1:
        return x.numerator
    return x


def _entry(x):
    if isinstance(x, bool) or not isinstance(x, Rational):
        raise MatrixError(f"matrix entry {x!r} is not an exact rational number")
    if isinstance(x, int):
        return int(x)
    return _normal(Fraction(x))


def _divide(a, b):
    """a / b exactly (b nonzero); quick for the unit pivots +1 and -1."""
    if b == 1:
        return a
    if b == -1:
        return -a
    return _normal(Fraction(a) / b)


# ---------------------------------------------------------------------- matrix
class Matrix:
    """An immutable exact rational matrix held as a tuple of rows.

    Supports ``+ - @`` (and ``*`` with a matrix or a number), unary minus,
    :meth:`scale`, ``** k`` (a negative power is the exact inverse power), ``==``
    (only against another :class:`Matrix`), ``.T``, :meth:`trace`, :meth:`total`,
    ``.shape``, ``M[i, j]``, :meth:`rows` and :meth:`entrywise_abs`.

    >>> A = Matrix.from_rows([[2, 1], [1, 1]])
    >>> (A ** -1).rows()
    [[1, -1], [-1, 2]]
    >>> A @ A ** -1 == Matrix.identity(2)
    True
    >>> A.scale(Fraction(1, 2))[0, 1]
    Fraction(1, 2)
    """

    __slots__ = ("shape", "_rows", "_support")

    def __init__(self, shape, rows):
        """Low-level constructor: ``rows`` a tuple of tuples of normalised entries.
        Use :meth:`from_rows`, :meth:`identity` or :meth:`zeros`."""
        object.__setattr__(self, "shape", (int(shape[0]), int(shape[1])))
        object.__setattr__(self, "_rows", rows)
        object.__setattr__(self, "_support", None)

    def __setattr__(self, name, value):
        raise AttributeError("Matrix is immutable")

    def __delattr__(self, name):
        raise AttributeError("Matrix is immutable")

    def __reduce__(self):
        """Pickled through the constructor (an immutable object has no state to set)."""
        return (Matrix, (self.shape, self._rows))

    # ------------------------------------------------------------ builders
    @classmethod
    def from_rows(cls, rows, columns: int | None = None) -> "Matrix":
        """From a list of equal-length lists of ints / Fractions (``columns`` gives the
        width of a matrix without rows)."""
        rows = [tuple(_entry(x) for x in r) for r in rows]
        m = len(rows[0]) if rows else (columns or 0)
        if any(len(r) != m for r in rows):
            raise MatrixError("rows of different lengths")
        return cls((len(rows), m), tuple(rows))

    @classmethod
    def identity(cls, n: int) -> "Matrix":
        return cls((n, n), tuple(tuple(1 if i == j else 0 for j in range(n)) for i in range(n)))

    @classmethod
    def zeros(cls, n: int, m: int | None = None) -> "Matrix":
        m = n if m is None else m
        return cls((n, m), tuple((0,) * m for _ in range(n)))

    @classmethod
    def from_sparse(cls, shape, rows: list[dict]) -> "Matrix":
        """From one dict {column: entry} per row (entries already normalised)."""
        n, m = shape
        out = []
        for row in rows:
            dense = [0] * m
            for j, x in row.items():
                dense[j] = x
            out.append(tuple(dense))
        return cls((n, m), tuple(out))

    # ---------------------------------------------------------- inspection
    def __getitem__(self, position):
        i, j = position
        n, m = self.shape
        if not (-n <= i < n and -m <= j < m):
            raise IndexError(f"entry ({i}, {j}) outside a {n}x{m} matrix")
        return self._rows[i % n][j % m]

    def rows(self) -> list[list]:
        """All entries as a list of lists of ints / Fractions."""
        return [list(r) for r in self._rows]

    def sparse_rows(self) -> list[dict]:
        """Each row as a dict {column: nonzero entry}."""
        if self._support is None:
            object.__setattr__(self, "_support", tuple(
                tuple((j, x) for j, x in enumerate(r) if x) for r in self._rows))
        return [dict(r) for r in self._support]

    def _nonzeros(self):
        if self._support is None:
            self.sparse_rows()
        return self._support

    @property
    def is_square(self) -> bool:
        return self.shape[0] == self.shape[1]

    def is_integer(self) -> bool:
        return all(isinstance(x, int) for r in self._rows for x in r)

    # ---------------------------------------------------------- arithmetic
    def _check(self, other) -> "Matrix":
        if not isinstance(other, Matrix):
            raise TypeError(f"cannot combine a matrix with {type(other).__name__}")
        return other

    def __add__(self, other):
        other = self._check(other)
        if self.shape != other.shape:
            raise MatrixError(f"shapes {self.shape} and {other.shape} differ")
        return Matrix(self.shape, tuple(tuple(_normal(a + b) for a, b in zip(r, s))
                                        for r, s in zip(self._rows, other._rows)))

    def __neg__(self):
        return Matrix(self.shape, tuple(tuple(-a for a in r) for r in self._rows))

    def __sub__(self, other):
        return self + (-self._check(other))

    def scale(self, c) -> "Matrix":
        """c times the matrix, for an exact rational c."""
        if isinstance(c, bool) or not isinstance(c, Rational):
            raise TypeError(f"cannot scale a matrix by {c!r}")
        c = _normal(Fraction(c))
        return Matrix(self.shape, tuple(tuple(_normal(c * a) for a in r) for r in self._rows))

    def __mul__(self, other):
        if isinstance(other, Matrix):
            return self @ other
        return self.scale(other)

    def __rmul__(self, other):
        return self.scale(other)

    def __matmul__(self, other):
        other = self._check(other)
        if self.shape[1] != other.shape[0]:
            raise MatrixError(f"cannot multiply {self.shape} by {other.shape}")
        width = other.shape[1]
        right = other._nonzeros()
        out = []
        for row in self._nonzeros():
            acc = [0] * width
            for k, a in row:
                for j, b in right[k]:
                    acc[j] += a * b
            out.append(tuple(x if type(x) is int else _normal(x) for x in acc))
        return Matrix((self.shape[0], width), tuple(out))

    def __pow__(self, k: int):
        """Matrix power by repeated squaring; a negative power is the inverse to -k."""
        if isinstance(k, bool) or not isinstance(k, int):
            raise MatrixError("a matrix power needs an integer exponent")
        if not self.is_square:
            raise MatrixError("only a square matrix has powers")
        base = self if k >= 0 else inverse(self)
        k = abs(k)
        result = Matrix.identity(self.shape[0])
        while k:
            if k & 1:
                result = result @ base
            k >>= 1
            if k:
                base = base @ base
        return result

    @property
    def T(self) -> "Matrix":
        n, m = self.shape
        return Matrix((m, n), tuple(tuple(self._rows[i][j] for i in range(n)) for j in range(m)))

    def __eq__(self, other) -> bool:
        return isinstance(other, Matrix) and self.shape == other.shape \
            and self._rows == other._rows

    __hash__ = None

    def trace(self):
        if not self.is_square:
            raise MatrixError("trace of a non-square matrix")
        return _normal(sum((self._rows[i][i] for i in range(self.shape[0])), 0))

    def total(self):
        """The sum of all entries."""
        return _normal(sum((x for r in self._rows for x in r), 0))

    def entrywise_abs(self) -> "Matrix":
        """The matrix of absolute values of the entries."""
        return Matrix(self.shape, tuple(tuple(abs(a) for a in r) for r in self._rows))

    def __repr__(self):
        n, m = self.shape
        if n * m <= 64:
            return f"Matrix({self.rows()!r})"
        return f"Matrix(<{n}x{m}>)"


def _square(A: Matrix, what: str):
    if not A.is_square:
        raise MatrixError(f"{what} needs a square matrix, got {A.shape[0]}x{A.shape[1]}")


def is_symmetric(A: Matrix) -> bool:
    """True when A is square and equal to its transpose.

    >>> is_symmetric(Matrix.from_rows([[1, 2], [2, 0]])), is_symmetric(Matrix.from_rows([[0, 1]]))
    (True, False)
    """
    n, m = A.shape
    rows = A._rows
    return n == m and all(rows[i][j] == rows[j][i] for i in range(n) for j in range(i))


# ---------------------------------------------------------------- elimination
def _choose(candidates, column: int, rows: list[dict]) -> int:
    """A pivot row among ``candidates``: a unit entry if there is one (keeps integers
    integral), else the shortest row (limits fill-in); ties by position."""
    best, best_key = None, None
    for r in candidates:
        value = rows[r][column]
        key = (0 if value in (1, -1) else 1, len(rows[r]), r)
        if best_key is None or key < best_key:
            best, best_key = r, key
    return best


def _forward(rows: list[dict], width: int, *, jordan: bool = False, extra=None):
    """Gaussian (or Gauss-Jordan) elimination over Q on sparse rows, in place.

    Columns are taken in order; in each, a pivot is chosen among the rows not yet used
    and the column is cleared in the other unused rows (in every other row when
    ``jordan``).  ``extra`` (one dict per row) receives the same row operations.
    Returns the list of (column, pivot row, pivot value) in column order.
    """
    holders: dict[int, set[int]] = {}
    for i, row in enumerate(rows):
        for j in row:
            holders.setdefault(j, set()).add(i)
    unused = set(range(len(rows)))
    pivots = []
    for c in range(width):
        candidates = holders.get(c, set()) & unused
        if not candidates:
            continue
        r = _choose(sorted(candidates), c, rows)
        unused.discard(r)
        prow, p = rows[r], rows[r][c]
        if jordan and p != 1:      # normalise the pivot row to a pivot 1
            for target in (rows, extra):
                if target is None:
                    continue
                target[r] = {j: _divide(x, p) for j, x in target[r].items()}
            prow, p = rows[r], 1
        pivots.append((c, r, p))
        targets = (holders[c] - {r}) if jordan else (candidates - {r})
        for i in sorted(targets):
            row = rows[i]
            factor = _divide(row[c], p)
            for j, x in prow.items():
                value = _normal(row.get(j, 0) - factor * x)
                if value:
                    if j not in row:
                        holders.setdefault(j, set()).add(i)
                    row[j] = value
                else:
                    row.pop(j, None)
                    holders[j].discard(i)
            if extra is not None:
                erow = extra[i]
                for j, x in extra[r].items():
                    value = _normal(erow.get(j, 0) - factor * x)
                    if value:
                        erow[j] = value
                    else:
                        erow.pop(j, None)
    return pivots


def rank(A: Matrix) -> int:
    """The rank of A over Q.

    The largest number of linearly independent rows, read off as the number of pivots
    of Gaussian elimination.

    Parameters: ``A`` -- a :class:`Matrix`.  Returns: an int.

    >>> rank(Matrix.from_rows([[1, -1, 0], [0, 1, -1], [1, 0, -1]]))
    2

    Notes: sparse elimination over Q, O(n m min(n, m)) at worst.
    Reference: common practice (Gaussian elimination), no source.
    """
    if 0 in A.shape:
        return 0
    return len(_forward(A.sparse_rows(), A.shape[1]))


def kernel_dim(A: Matrix) -> int:
    """The dimension of the null space of A over Q: columns minus rank.

    >>> kernel_dim(Matrix.from_rows([[1, 1], [1, 1]]))
    1

    Reference: rank-nullity theorem (common practice, no source).
    """
    return A.shape[1] - rank(A)


def rank_mod(A: Matrix, p: int) -> int:
    """The rank of an integer matrix over the field Z/p, p prime.

    >>> A = Matrix.from_rows([[1, 1, 0], [0, 1, 1], [1, 0, 1]])
    >>> rank_mod(A, 2), rank_mod(A, 3)
    (2, 3)

    Notes: Gaussian elimination modulo p (:func:`verifier.independent.compute.rank_mod_p`).
    Reference: common practice (Gaussian elimination over a finite field), no source.
    """
    from .compute import rank_mod_p
    if not A.is_integer():
        raise MatrixError("rank over Z/p needs an integer matrix")
    return rank_mod_p(A.sparse_rows(), p)


def det(A: Matrix):
    """The determinant of a square matrix, exactly (int or Fraction).

    det A = sign(sigma) times the product of the pivots of Gaussian elimination, sigma
    the permutation that takes each column to its pivot row.

    >>> det(Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]]))
    -1
    >>> det(Matrix.from_rows([[0, 2], [3, 0]])), det(Matrix.zeros(0))
    (-6, 1)

    Notes: sparse elimination over Q, O(n^3) at worst.
    Reference: common practice (Gaussian elimination), no source.
    """
    _square(A, "det")
    n = A.shape[0]
    if n == 0:
        return 1
    pivots = _forward(A.sparse_rows(), n)
    if len(pivots) < n:
        return 0
    value = 1
    target = [0] * n
    for c, r, p in pivots:
        value = _normal(value * p)
        target[c] = r
    seen, cycles = [False] * n, 0
    for start in range(n):
        if not seen[start]:
            cycles += 1
            j = start
            while not seen[j]:
                seen[j] = True
                j = target[j]
    return value if (n - cycles) % 2 == 0 else -value


def inverse(A: Matrix) -> Matrix:
    """The exact inverse of a square matrix, checked: ``A @ G == I``.

    Gauss-Jordan elimination on [A | I] over Q; the row that ends with its pivot in
    column c holds row c of the inverse.

    >>> inverse(Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]])).rows()
    [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]

    Raises :class:`MatrixError` ("matrix is singular") when A is not invertible.
    Notes: sparse elimination, O(n^3) at worst; integer arithmetic while pivots are +-1.
    Reference: common practice (Gauss-Jordan elimination), no source.
    """
    _square(A, "inverse")
    n = A.shape[0]
    rows = A.sparse_rows()
    right = [{i: 1} for i in range(n)]
    pivots = _forward(rows, n, jordan=True, extra=right)
    if len(pivots) < n:
        raise MatrixError("matrix is singular")
    result = [None] * n
    for c, r, _ in pivots:
        result[c] = right[r]
    G = Matrix.from_sparse((n, n), result)
    if A @ G != Matrix.identity(n):
        raise MatrixError("exact inverse failed its check A*G = I")  # our bug, not the user's
    return G


def signature(A: Matrix) -> tuple[int, int, int]:
    """(positive, negative, zero) eigenvalue counts of a symmetric rational matrix.

    By Sylvester's law of inertia the counts are invariant under congruence, and are
    read off from a congruent diagonal matrix.

    >>> signature(Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]]))
    (2, 1, 0)

    Notes: congruence elimination with a correct treatment of zero diagonals
    (:func:`verifier.independent.compute.inertia`), O(n^3).
    Reference: J. J. Sylvester, Philos. Mag. 4 (1852) (law of inertia).
    """
    _square(A, "signature")
    if not is_symmetric(A):
        raise MatrixError("signature needs a symmetric matrix")
    from .compute import inertia
    return inertia(A.rows())


def multiplicity(A: Matrix, value) -> int:
    """The algebraic multiplicity of the rational number ``value`` as an eigenvalue of A.

    For symmetric A it equals the nullity of A - value I (A is diagonalisable); otherwise
    it is the multiplicity of ``value`` as a root of the characteristic polynomial.

    >>> multiplicity(Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]]), 1)
    1
    >>> multiplicity(Matrix.from_rows([[0, 1], [0, 0]]), 0)      # a Jordan block
    2

    Reference: spectral theorem for symmetric matrices (common practice, no source).
    """
    _square(A, "multiplicity")
    value = Fraction(value)
    if is_symmetric(A):
        return kernel_dim(A - Matrix.identity(A.shape[0]).scale(value))
    return charpoly(A).root_multiplicity(value)


# ------------------------------------------------------------------ charpoly
def _is_prime(n: int) -> bool:
    """Deterministic Miller-Rabin for n < 3,215,031,751 with bases 2, 3, 5, 7
    (C. Pomerance, J. L. Selfridge, S. S. Wagstaff, Math. Comp. 35 (1980) 1003-1026)."""
    if n < 2:
        return False
    for q in (2, 3, 5, 7):
        if n % q == 0:
            return n == q
    d, s = n - 1, 0
    while d % 2 == 0:
        d, s = d // 2, s + 1
    for a in (2, 3, 5, 7):
        x = pow(a, d, n)
        if x in (1, n - 1):
            continue
        for _ in range(s - 1):
            x = x * x % n
            if x == n - 1:
                break
        else:
            return False
    return True


_PRIMES: dict[int, list[int]] = {}


def _primes(bits: int, count: int) -> list[int]:
    """The ``count`` largest primes below 2^bits (cached)."""
    found = _PRIMES.setdefault(bits, [])
    candidate = found[-1] - 2 if found else (1 << bits) - 1
    while len(found) < count:
        if _is_prime(candidate):
            found.append(candidate)
        candidate -= 2
    return found[:count]


def _prime_bits(n: int) -> int:
    """Prime size for order n: with p < 2^b, a sum of n products of residues plus one
    residue stays below n p^2 + p < 2^63, so int64 arithmetic never overflows."""
    return min(25, (62 - n.bit_length()) // 2)


def _charpoly_mod(B, primes: list[int]):
    """Coefficients (constant first) of det(xI - B) modulo each prime, as a
    (primes, n + 1) int64 array; B is an n x n int64 array, primes below 2^_prime_bits(n).

    For every prime at once: similarity transforms bring B to upper Hessenberg form H
    over Z/p (pivot row swapped in where a pivot vanishes); then det(xI - H) follows
    from the recurrence over its leading principal blocks.  Every intermediate value
    is below 2^63 (see :func:`_prime_bits`), so the int64 arithmetic is exact.
    """
    import numpy as np

    n, k = B.shape[0], len(primes)
    p1 = np.array(primes, dtype=np.int64)[:, None]
    p2 = p1[:, :, None]
    H = B[None, :, :] % p2
    for c in range(n - 2):
        for q in np.flatnonzero(H[:, c + 1, c] == 0).tolist():
            below = np.flatnonzero(H[q, c + 2:, c])
            if len(below):                   # swap rows and columns r, c+1 (a similarity)
                r = c + 2 + int(below[0])
                H[q, [c + 1, r], :] = H[q, [r, c + 1], :]
                H[q, :, [c + 1, r]] = H[q, :, [r, c + 1]]
        pivots = H[:, c + 1, c].tolist()
        inverses = np.array([pow(x, p - 2, p) if x else 0 for x, p in zip(pivots, primes)],
                            dtype=np.int64)
        u = H[:, c + 2:, c] * inverses[:, None] % p1           # multipliers, per prime
        if not u.any():
            continue
        # rows i > c+1: row_i -= u_i row_(c+1); then column c+1 += sum_i u_i column_i
        H[:, c + 2:, c:] = (H[:, c + 2:, c:] - u[:, :, None] * H[:, c + 1, None, c:]) % p2
        H[:, :, c + 1] = (H[:, :, c + 1] + np.matmul(H[:, :, c + 2:], u[:, :, None])[:, :, 0]) % p1
    # P[m] = det(xI - H[:m, :m]), constant term first; with 0-based j = m - 1:
    # P[m] = (x - h_jj) P[m-1] - sum_{i<j} h_ij (h_(i+1)i ... h_j(j-1)) P[i]
    P = np.zeros((k, n + 1, n + 1), dtype=np.int64)
    P[:, 0, 0] = 1
    weights = np.zeros((k, n), dtype=np.int64)  # products of subdiagonal entries
    for m in range(1, n + 1):
        j = m - 1
        previous = P[:, m - 1, :m]
        value = np.zeros((k, m + 1), dtype=np.int64)
        value[:, 1:] = previous
        value[:, :m] = (value[:, :m] - H[:, j, j, None] * previous) % p1
        if j > 0:
            sub = H[:, j, j - 1, None]
            weights[:, :j - 1] = weights[:, :j - 1] * sub % p1
            weights[:, j - 1] = sub[:, 0]
            t = H[:, :j, j] * weights[:, :j] % p1
            value[:, :m] = (value[:, :m] - np.matmul(t[:, None, :], P[:, :j, :m])[:, 0, :]) % p1
        P[:, m, :m + 1] = value
    return P[:, n, :]


def charpoly(A: Matrix) -> "Poly":
    """The characteristic polynomial det(xI - A) of a square rational matrix, exactly.

    Parameters: ``A`` -- a square :class:`Matrix`.  Returns: a :class:`Poly`, monic of
    degree n (``Poly([1])`` for the 0x0 matrix).

    >>> str(charpoly(Matrix.from_rows([[1, 0, 1], [0, 1, 1], [1, 1, 1]])))
    'x^3 - 3*x^2 + x + 1'
    >>> str(charpoly(Matrix.from_rows([[Fraction(1, 2), 0], [0, 3]])))
    'x^2 - 7/2*x + 3/2'

    Notes: the indices are first split into the connected components of the nonzero
    pattern (a permutation similarity makes A block diagonal, and the characteristic
    polynomial is the product over the blocks).  For each block, with d the common
    denominator, B = dA is integral and
    det(xI - A) = d^-n det(dx I - B).  The coefficient of x^(n-k) in det(xI - B) is
    +- a sum of principal k x k minors, each at most the product of the Euclidean
    norms of its rows (Hadamard), so every coefficient is at most
    C = prod_i (1 + |row_i|).  The characteristic polynomial is computed modulo primes
    (Hessenberg reduction and recurrence, numpy int64, all primes in one batch) until
    their product exceeds 2C, then lifted by the Chinese remainder theorem to the
    symmetric range, which recovers every coefficient exactly.  O(n^3) per prime; the
    result is also checked against the trace.
    References: H. Cohen, A Course in Computational Algebraic Number Theory, Springer
    1993, sec. 2.2.4 (Hessenberg method); J. Hadamard, Bull. Sci. Math. 17 (1893)
    (determinant bound).
    """
    _square(A, "charpoly")
    n = A.shape[0]
    if n == 0:
        return Poly([1])
    blocks = _blocks(A)
    if len(blocks) > 1:      # a permutation similarity makes A block diagonal
        result = Poly([1])
        for block in blocks:
            rows = A._rows
            result = result * _charpoly(Matrix((len(block), len(block)), tuple(
                tuple(rows[i][j] for j in block) for i in block)))
        return result
    return _charpoly(A)


def _blocks(A: Matrix) -> list[list[int]]:
    """The index sets of the connected components of the graph with an edge i - j
    wherever A[i, j] or A[j, i] is nonzero, each sorted, in order of their least index."""
    n = A.shape[0]
    parent = list(range(n))

    def root(i):
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for i, row in enumerate(A._nonzeros()):
        for j, _ in row:
            a, b = root(i), root(j)
            if a != b:
                parent[max(a, b)] = min(a, b)
    groups: dict[int, list[int]] = {}
    for i in range(n):
        groups.setdefault(root(i), []).append(i)
    return [groups[r] for r in sorted(groups)]


def _charpoly(A: Matrix) -> "Poly":
    """det(xI - A) for a nonempty square matrix by the multimodular method (see
    :func:`charpoly`)."""
    import numpy as np

    n = A.shape[0]
    d = 1
    for row in A._rows:
        for x in row:
            if isinstance(x, Fraction):
                d = d * x.denominator // _gcd(d, x.denominator)
    B = [[int(x * d) for x in row] for row in A._rows]
    bound = 1
    for row in B:
        bound *= 2 + isqrt(sum(x * x for x in row))   # >= 1 + |row|_2
    bits = _prime_bits(n)
    count = 1 + (2 * bound).bit_length() // (bits - 1)  # primes above 2^(bits-1) each
    primes = _primes(bits, count)
    residues = []
    for start in range(0, count, 16):                  # 16 primes per batch bounds memory
        chunk = primes[start:start + 16]
        if max(abs(x) for row in B for x in row) < (1 << 62):
            array = np.array(B, dtype=np.int64)
            local = _charpoly_mod(array, chunk)
        else:
            local = None
        for q, p in enumerate(chunk):
            if local is None:
                reduced = np.array([[x % p for x in row] for row in B], dtype=np.int64)
                residues.append((p, _charpoly_mod(reduced, [p])[0].tolist()))
            else:
                residues.append((p, local[q].tolist()))
    modulus, values = 1, [0] * (n + 1)
    for p, local in residues:                          # Chinese remainder theorem
        shift = pow(modulus, p - 2, p)
        values = [r + modulus * ((c - r) * shift % p) for r, c in zip(values, local)]
        modulus *= p
    if modulus <= 2 * bound:
        raise MatrixError("too few primes for the coefficient bound")  # our bug
    half = modulus // 2
    coeffs = [r - modulus if r > half else r for r in values]
    # back from B = dA: det(xI - A) = d^-n det(d x I - B), coefficient k gets d^(k - n)
    result = Poly([Fraction(c) * Fraction(d) ** (k - n) for k, c in enumerate(coeffs)])
    if result.coeffs[-1] != 1 or -result.coeffs[-2] != A.trace():
        raise MatrixError("characteristic polynomial failed its trace check")  # our bug
    return result


def _gcd(a: int, b: int) -> int:
    while b:
        a, b = b, a % b
    return a


# ----------------------------------------------------------------- polynomial
class Poly:
    """An exact polynomial in ``x`` with int / Fraction coefficients, constant term first.

    The same value semantics and text as the main backend's polynomial, so that the
    two backends describe a characteristic polynomial with identical words.

    >>> p = Poly([1, -3, 1])
    >>> p.degree, p(2), p.is_reciprocal(), str(p)
    (2, -1, True, 'x^2 - 3*x + 1')
    """

    __slots__ = ("coeffs",)

    def __init__(self, coeffs):
        coeffs = list(coeffs)
        for c in coeffs:
            if not isinstance(c, Rational):
                raise TypeError(f"polynomial coefficient {c!r} is not an exact rational number")
        coeffs = [_normal(c if isinstance(c, (int, Fraction)) else Fraction(c)) for c in coeffs]
        while coeffs and coeffs[-1] == 0:
            coeffs.pop()
        object.__setattr__(self, "coeffs", tuple(coeffs))

    def __setattr__(self, name, value):
        raise AttributeError("Poly is immutable")

    def __reduce__(self):
        """Pickled through the constructor (an immutable object has no state to set)."""
        return (Poly, (self.coeffs,))

    def __delattr__(self, name):
        raise AttributeError("Poly is immutable")

    @property
    def degree(self) -> int:
        """Degree; -1 for the zero polynomial."""
        return len(self.coeffs) - 1

    def __call__(self, x):
        value = 0
        for c in reversed(self.coeffs):
            value = value * x + c
        return _normal(value)

    def __eq__(self, other) -> bool:
        if isinstance(other, Rational):
            other = Poly([other])
        return isinstance(other, Poly) and self.coeffs == other.coeffs

    def __hash__(self):
        return hash(self.coeffs)

    @staticmethod
    def _lift(other) -> "Poly":
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
        if isinstance(k, bool) or not isinstance(k, int) or k < 0:
            raise ValueError("a polynomial power needs a non-negative integer exponent")
        result, base = Poly([1]), self
        while k:
            if k & 1:
                result = result * base
            k >>= 1
            if k:
                base = base * base
        return result

    def is_reciprocal(self) -> bool:
        """True when p(x) = +-x^n p(1/x), n = deg p: the coefficient list read backwards
        is the list or its negative.  The zero polynomial and polynomials with p(0) = 0
        are not reciprocal.

        >>> Poly([1, 0, -1]).is_reciprocal(), Poly([2, 1]).is_reciprocal()
        (True, False)
        """
        c = self.coeffs
        if not c or c[0] == 0:
            return False
        backwards = c[::-1]
        return c == backwards or c == tuple(-x for x in backwards)

    def root_multiplicity(self, r) -> int:
        """How many times the rational number r is a root (0 if it is not a root).

        >>> Poly([0, 0, 1, 1]).root_multiplicity(0), Poly([1, -2, 1]).root_multiplicity(1)
        (2, 2)
        """
        if not self.coeffs:
            raise ValueError("every number is a root of the zero polynomial")
        r = Fraction(r)
        count, coeffs = 0, list(self.coeffs)
        while len(coeffs) > 1:
            quotient, carry = [], Fraction(0)      # synthetic division by (x - r)
            for c in reversed(coeffs):
                carry = carry * r + c
                quotient.append(carry)
            if quotient.pop() != 0:
                break
            count += 1
            coeffs = quotient[::-1]
        return count

    def __repr__(self):
        return f"Poly({list(self.coeffs)!r})"

    def __str__(self):
        if not self.coeffs:
            return "0"
        text = ""
        for k in range(self.degree, -1, -1):
            c = self.coeffs[k]
            if c == 0:
                continue
            size = -c if c < 0 else c
            body = str(size) if k == 0 else (("x" if k == 1 else f"x^{k}") if size == 1
                                             else f"{size}*" + ("x" if k == 1 else f"x^{k}"))
            if not text:
                text = ("-" if c < 0 else "") + body
            else:
                text += (" - " if c < 0 else " + ") + body
        return text

"""The exact matrix type that the rest of the project sees.

A ``Matrix`` is an immutable matrix over the rationals.  It keeps one of two
representations and converts between them on demand:

* a sparse integer form (scipy CSR with int64 entries), used while every entry is
  an integer of absolute value below 2^62 and every operation provably stays below
  that bound (the bound is checked with Python integers before each operation, so
  int64 arithmetic is exact whenever it is used);
* a dense rational form held by python-flint (``fmpq_mat``), used for everything
  else.

Entries come out as Python ``int`` or ``fractions.Fraction``; no backend type leaks.
"""

from __future__ import annotations

from fractions import Fraction
from numbers import Rational

import flint
import numpy as np
import scipy.sparse as sp

__all__ = ["Matrix", "ExactError", "SAFE"]

SAFE = 1 << 62  # int64 arithmetic is exact on operands and results of absolute value < SAFE


class ExactError(ArithmeticError):
    """An exact computation is impossible as asked (singular matrix, wrong shape, ...)."""


def _to_python(x):
    """An int or Fraction from any flint or numpy scalar."""
    if isinstance(x, flint.fmpq):
        n, d = int(x.p), int(x.q)
        return n if d == 1 else Fraction(n, d)
    return int(x)


class Matrix:
    """An immutable exact rational matrix.

    >>> M = Matrix.from_rows([[2, 1], [1, 1]])
    >>> (M @ M.inverse()) == Matrix.identity(2)
    True
    >>> M.inverse().rows()
    [[1, -1], [-1, 2]]
    >>> Matrix.from_rows([[1, 2], [3, 4]]).inverse()[0, 0]
    -2
    """

    __slots__ = ("shape", "_sparse", "_dense", "provenance")

    def __init__(self, shape, sparse=None, dense=None, provenance: str = ""):
        object.__setattr__(self, "shape", (int(shape[0]), int(shape[1])))
        object.__setattr__(self, "_sparse", sparse)
        object.__setattr__(self, "_dense", dense)
        object.__setattr__(self, "provenance", provenance)

    def __setattr__(self, name, value):
        raise AttributeError("Matrix is immutable")

    def with_provenance(self, text: str) -> "Matrix":
        """The same matrix, recording how it was obtained."""
        return Matrix(self.shape, self._sparse, self._dense, text)

    # ------------------------------------------------------------ constructors
    @classmethod
    def from_rows(cls, rows) -> "Matrix":
        """From a list of equal-length lists of ints / Fractions."""
        rows = [list(r) for r in rows]
        n = len(rows)
        m = len(rows[0]) if rows else 0
        if any(len(r) != m for r in rows):
            raise ExactError("rows of different lengths")
        flat = [x for r in rows for x in r]
        for x in flat:
            if not isinstance(x, Rational) or isinstance(x, bool):
                raise ExactError(f"matrix entry {x!r} is not an exact rational number")
        if all(isinstance(x, int) or (isinstance(x, Fraction) and x.denominator == 1) for x in flat) \
                and all(abs(int(x)) < SAFE for x in flat):
            array = np.array([[int(x) for x in r] for r in rows], dtype=np.int64).reshape(n, m)
            return cls((n, m), sparse=sp.csr_array(array))
        return cls((n, m), dense=flint.fmpq_mat(n, m, [flint.fmpq(Fraction(x).numerator,
                                                                   Fraction(x).denominator)
                                                       for x in flat]))

    @classmethod
    def from_entries(cls, shape, rows, cols, values) -> "Matrix":
        """Sparse constructor from coordinate lists of integers (repeated positions add up)."""
        values = [int(v) for v in values]
        if sum(abs(v) for v in values) >= SAFE:
            total = {}
            for i, j, v in zip(rows, cols, values):
                total[(i, j)] = total.get((i, j), 0) + v
            dense = [[0] * shape[1] for _ in range(shape[0])]
            for (i, j), v in total.items():
                dense[i][j] = v
            return cls.from_rows(dense)
        array = sp.coo_array((np.array(values, dtype=np.int64),
                              (np.array(rows, dtype=np.int64), np.array(cols, dtype=np.int64))),
                             shape=shape).tocsr()
        array.sum_duplicates()
        array.eliminate_zeros()
        return cls(shape, sparse=array)

    @classmethod
    def from_scipy(cls, array) -> "Matrix":
        """From a scipy sparse integer array (entries must be below 2^62 in absolute value)."""
        array = sp.csr_array(array, dtype=np.int64)
        if array.nnz and int(abs(array).max()) >= SAFE:
            raise ExactError("entries too large for the sparse form")
        array.eliminate_zeros()
        return cls(array.shape, sparse=array)

    @classmethod
    def identity(cls, n: int) -> "Matrix":
        return cls((n, n), sparse=sp.identity(n, dtype=np.int64, format="csr"))

    @classmethod
    def zeros(cls, n: int, m: int | None = None) -> "Matrix":
        m = n if m is None else m
        return cls((n, m), sparse=sp.csr_array((n, m), dtype=np.int64))

    @classmethod
    def _from_flint(cls, M) -> "Matrix":
        """From an fmpz_mat or fmpq_mat; the sparse form is used when it fits."""
        if isinstance(M, flint.fmpz_mat):
            values = [int(x) for x in M.entries()]
            if all(abs(v) < SAFE for v in values):
                array = np.array(values, dtype=np.int64).reshape(M.nrows(), M.ncols())
                return cls((M.nrows(), M.ncols()), sparse=sp.csr_array(array))
            return cls((M.nrows(), M.ncols()), dense=flint.fmpq_mat(M))
        if all(x.q == 1 for x in M.entries()):
            return cls._from_flint(flint.fmpz_mat(M.nrows(), M.ncols(),
                                                   [x.p for x in M.entries()]))
        return cls((M.nrows(), M.ncols()), dense=M)

    # ------------------------------------------------------------- inspection
    @property
    def is_sparse(self) -> bool:
        """True when the matrix is held in the exact int64 sparse form."""
        return self._sparse is not None

    def is_integer(self) -> bool:
        if self._sparse is not None:
            return True
        return all(x.q == 1 for x in self._dense.entries())

    @property
    def is_square(self) -> bool:
        return self.shape[0] == self.shape[1]

    def __getitem__(self, position):
        i, j = position
        n, m = self.shape
        if not (-n <= i < n and -m <= j < m):
            raise IndexError(f"entry ({i}, {j}) outside a {n}x{m} matrix")
        i, j = i % n, j % m
        if self._sparse is not None:
            return int(self._sparse[i, j])
        return _to_python(self._dense[i, j])

    def rows(self) -> list[list]:
        """All entries as a list of lists of ints / Fractions."""
        if self._sparse is not None:
            return [[int(x) for x in row] for row in self._sparse.toarray()]
        n, m = self.shape
        flat = [_to_python(x) for x in self._dense.entries()]
        return [flat[i * m:(i + 1) * m] for i in range(n)]

    def sparse_rows(self) -> list[dict[int, int]]:
        """Each row as a dict {column: nonzero entry}."""
        if self._sparse is None:
            return [{j: x for j, x in enumerate(r) if x != 0} for r in self.rows()]
        A = self._sparse
        out = []
        for i in range(self.shape[0]):
            lo, hi = A.indptr[i], A.indptr[i + 1]
            out.append(dict(zip(A.indices[lo:hi].tolist(), A.data[lo:hi].tolist())))
        return out

    def nnz(self) -> int:
        """Number of nonzero entries."""
        if self._sparse is not None:
            return int(self._sparse.count_nonzero())
        return sum(1 for x in self._dense.entries() if x != 0)

    def max_abs(self) -> int | Fraction:
        if self._sparse is not None:
            return int(abs(self._sparse).max()) if self._sparse.nnz else 0
        return max((abs(_to_python(x)) for x in self._dense.entries()), default=0)

    def _row_abs_bound(self) -> int:
        """max_i sum_j |M[i, j]| (an int; only for the sparse form)."""
        A = self._sparse
        return int(abs(A).sum(axis=1).max()) if A.nnz else 0

    # ---------------------------------------------------------- backend views
    def to_fmpz(self):
        """python-flint integer matrix (inside ``exact/`` only)."""
        if self._sparse is not None:
            n, m = self.shape
            return flint.fmpz_mat(self._sparse.toarray().tolist()) if n and m else flint.fmpz_mat(n, m)
        if not self.is_integer():
            raise ExactError("matrix has non-integer entries")
        return flint.fmpz_mat(self.shape[0], self.shape[1], [x.p for x in self._dense.entries()])

    def to_fmpq(self):
        """python-flint rational matrix (inside ``exact/`` only)."""
        if self._dense is not None:
            return self._dense
        return flint.fmpq_mat(self.to_fmpz())

    def to_scipy(self):
        """The int64 sparse form (raises if the matrix does not fit it)."""
        if self._sparse is None:
            raise ExactError("matrix is not held in the int64 sparse form")
        return self._sparse

    # ------------------------------------------------------------- arithmetic
    def _coerce(self, other) -> "Matrix":
        if isinstance(other, Matrix):
            return other
        raise TypeError(f"cannot combine a matrix with {type(other).__name__}")

    def _same_shape(self, other):
        if self.shape != other.shape:
            raise ExactError(f"shapes {self.shape} and {other.shape} differ")

    def __add__(self, other):
        other = self._coerce(other)
        self._same_shape(other)
        if self._sparse is not None and other._sparse is not None \
                and self.max_abs() + other.max_abs() < SAFE:
            return Matrix(self.shape, sparse=(self._sparse + other._sparse).tocsr())
        return Matrix._from_flint(self.to_fmpq() + other.to_fmpq())

    def __neg__(self):
        if self._sparse is not None:
            return Matrix(self.shape, sparse=-self._sparse)
        return Matrix(self.shape, dense=-self._dense)

    def __sub__(self, other):
        return self + (-self._coerce(other))

    def scale(self, c) -> "Matrix":
        """c times the matrix, for an exact rational c."""
        if not isinstance(c, Rational) or isinstance(c, bool):
            raise TypeError(f"cannot scale a matrix by {c!r}")
        c = Fraction(c)
        if self._sparse is not None and c.denominator == 1 \
                and abs(c.numerator) * self.max_abs() < SAFE:
            return Matrix(self.shape, sparse=self._sparse * int(c.numerator))
        return Matrix._from_flint(self.to_fmpq() * flint.fmpq(c.numerator, c.denominator))

    def __mul__(self, other):
        if isinstance(other, Matrix):
            return self @ other
        return self.scale(other)

    def __rmul__(self, other):
        return self.scale(other)

    def __matmul__(self, other):
        other = self._coerce(other)
        if self.shape[1] != other.shape[0]:
            raise ExactError(f"cannot multiply {self.shape} by {other.shape}")
        if self._sparse is not None and other._sparse is not None \
                and self._row_abs_bound() * other.max_abs() < SAFE:
            return Matrix((self.shape[0], other.shape[1]),
                          sparse=(self._sparse @ other._sparse).tocsr())
        if self.is_integer() and other.is_integer():
            return Matrix._from_flint(self.to_fmpz() * other.to_fmpz())
        return Matrix._from_flint(self.to_fmpq() * other.to_fmpq())

    def __pow__(self, k: int):
        """Matrix power; a negative power is the exact inverse raised to -k."""
        if not isinstance(k, int) or isinstance(k, bool):
            raise ExactError("a matrix power needs an integer exponent")
        if not self.is_square:
            raise ExactError("only a square matrix has powers")
        base = self if k >= 0 else self.inverse()
        k = abs(k)
        result = Matrix.identity(self.shape[0])
        while k:
            if k & 1:
                result = result @ base
            k >>= 1
            if k:
                base = base @ base
        return result

    def inverse(self) -> "Matrix":
        """The exact inverse (see :func:`verifier.exact.linalg.inverse`)."""
        from .linalg import inverse
        return inverse(self)

    @property
    def T(self) -> "Matrix":
        if self._sparse is not None:
            return Matrix((self.shape[1], self.shape[0]), sparse=self._sparse.T.tocsr())
        return Matrix((self.shape[1], self.shape[0]), dense=self._dense.transpose())

    def __eq__(self, other) -> bool:
        if not isinstance(other, Matrix) or self.shape != other.shape:
            return False
        if self._sparse is not None and other._sparse is not None:
            return (self._sparse != other._sparse).nnz == 0
        return self.to_fmpq() == other.to_fmpq()

    __hash__ = None

    def trace(self):
        if not self.is_square:
            raise ExactError("trace of a non-square matrix")
        if self._sparse is not None:
            return sum(int(x) for x in self._sparse.diagonal())
        return sum(_to_python(self._dense[i, i]) for i in range(self.shape[0]))

    def total(self):
        """The sum of all entries."""
        if self._sparse is not None:
            return sum(int(x) for x in self._sparse.data)
        total = sum(Fraction(_to_python(x)) for x in self._dense.entries())
        return int(total) if total.denominator == 1 else total

    def is_symmetric(self) -> bool:
        return self.is_square and self == self.T

    def __repr__(self):
        n, m = self.shape
        if n * m <= 64:
            return f"Matrix({self.rows()!r})"
        return f"Matrix(<{n}x{m}, {self.nnz()} nonzeros>)"

"""The exact matrix type that the rest of the project sees.

A ``Matrix`` is an immutable matrix over the rationals.  It keeps one of three
representations and converts between them on demand:

* an int64 form -- a dense numpy array for small matrices (at most ``DENSE_MAX``
  entries), a scipy CSR array for larger ones -- used while every entry is an integer
  of absolute value below 2^62 and every operation provably stays below that bound
  (the bound is checked with Python integers before each operation, so int64
  arithmetic is exact whenever it is used);
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

__all__ = ["Matrix", "ExactError", "SAFE", "DENSE_MAX"]

SAFE = 1 << 62  # int64 arithmetic is exact on operands and results of absolute value < SAFE
DENSE_MAX = 90_000  # int64 matrices with at most this many entries are held dense


def _int64_form(array):
    """Dense numpy for small shapes, scipy CSR for large ones (int64 either way)."""
    n, m = array.shape
    if n * m <= DENSE_MAX:
        return array.toarray() if sp.issparse(array) else np.asarray(array, dtype=np.int64)
    if sp.issparse(array):
        array = array.tocsr()
        array.eliminate_zeros()
        return array
    return sp.csr_array(array)


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

    __slots__ = ("shape", "_int", "_dense", "provenance", "congruence")

    def __init__(self, shape, int64=None, dense=None, provenance: str = "", congruence=None):
        """Low-level constructor: ``int64`` a numpy/scipy int64 array (see module
        docstring), or ``dense`` an ``fmpq_mat``.  Use the ``from_*`` builders.

        ``congruence`` is an optional *proposed* factorisation ``(Z, d)``, Z a Matrix
        and d a sequence of integers, claiming M = Z^T diag(d) Z, or a function without
        arguments that builds that pair when it is needed; nothing trusts it
        before :func:`verifier.exact.linalg.congruence_holds` has checked it exactly.
        """
        object.__setattr__(self, "shape", (int(shape[0]), int(shape[1])))
        object.__setattr__(self, "_int", None if int64 is None else _int64_form(int64))
        object.__setattr__(self, "_dense", dense)
        object.__setattr__(self, "provenance", provenance)
        object.__setattr__(self, "congruence", congruence)

    def __setattr__(self, name, value):
        raise AttributeError("Matrix is immutable")

    def __delattr__(self, name):
        raise AttributeError("Matrix is immutable")

    def __reduce__(self):
        """Pickled without the proposed congruence (a hint that may hold a function of
        the complex; the receiver can always do without it)."""
        return (Matrix, (self.shape, self._int, self._dense, self.provenance))

    def with_provenance(self, text: str) -> "Matrix":
        """The same matrix, recording how it was obtained."""
        return Matrix(self.shape, self._int, self._dense, text, self.congruence)

    def with_congruence(self, factor) -> "Matrix":
        """The same matrix carrying a proposed factorisation M = Z^T diag(d) Z, given as
        the pair (Z, d) or as a function returning it (checked exactly by whoever uses
        it, never assumed)."""
        return Matrix(self.shape, self._int, self._dense, self.provenance, factor)

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
            return cls((n, m), int64=array)
        return cls((n, m), dense=flint.fmpq_mat(n, m, [flint.fmpq(Fraction(x).numerator,
                                                                   Fraction(x).denominator)
                                                       for x in flat]))

    @classmethod
    def from_entries(cls, shape, rows, cols, values) -> "Matrix":
        """Sparse constructor from coordinate lists of integers (repeated positions add up)."""
        rows = np.asarray(rows, dtype=np.int64)
        cols = np.asarray(cols, dtype=np.int64)
        raw = values if isinstance(values, np.ndarray) else list(values)
        try:
            values = np.asarray(raw, dtype=np.int64)
        except OverflowError:
            values = None
        if values is None or (len(values) and _max_abs(values) * len(values) >= SAFE):
            return cls._from_big_entries(shape, rows, cols, [int(v) for v in raw])
        if shape[0] * shape[1] <= DENSE_MAX:
            array = np.zeros(shape, dtype=np.int64)
            np.add.at(array, (rows, cols), values)
            return cls(shape, int64=array)
        array = sp.coo_array((values, (rows, cols)), shape=shape).tocsr()
        array.sum_duplicates()
        return cls(shape, int64=array)

    @classmethod
    def _from_big_entries(cls, shape, rows, cols, values) -> "Matrix":
        total: dict = {}
        for i, j, v in zip(rows.tolist(), cols.tolist(), values):
            total[(i, j)] = total.get((i, j), 0) + int(v)
        dense = [[0] * shape[1] for _ in range(shape[0])]
        for (i, j), v in total.items():
            dense[i][j] = v
        return cls.from_rows(dense)

    @classmethod
    def from_array(cls, array) -> "Matrix":
        """From a numpy or scipy integer array (entries must be below 2^62 in absolute value)."""
        array = array.astype(np.int64) if sp.issparse(array) else np.asarray(array, dtype=np.int64)
        if _max_abs(array) >= SAFE:
            raise ExactError("entries too large for the int64 form")
        return cls(array.shape, int64=array)

    @classmethod
    def identity(cls, n: int) -> "Matrix":
        if n * n <= DENSE_MAX:
            return cls((n, n), int64=np.identity(n, dtype=np.int64))
        return cls((n, n), int64=sp.identity(n, dtype=np.int64, format="csr"))

    @classmethod
    def zeros(cls, n: int, m: int | None = None) -> "Matrix":
        m = n if m is None else m
        if n * m <= DENSE_MAX:
            return cls((n, m), int64=np.zeros((n, m), dtype=np.int64))
        return cls((n, m), int64=sp.csr_array((n, m), dtype=np.int64))

    @classmethod
    def _from_flint(cls, M) -> "Matrix":
        """From an fmpz_mat or fmpq_mat; the sparse form is used when it fits."""
        if isinstance(M, flint.fmpz_mat):
            values = [int(x) for x in M.entries()]
            if all(abs(v) < SAFE for v in values):
                array = np.array(values, dtype=np.int64).reshape(M.nrows(), M.ncols())
                return cls((M.nrows(), M.ncols()), int64=array)
            return cls((M.nrows(), M.ncols()), dense=flint.fmpq_mat(M))
        if all(x.q == 1 for x in M.entries()):
            return cls._from_flint(flint.fmpz_mat(M.nrows(), M.ncols(),
                                                   [x.p for x in M.entries()]))
        return cls((M.nrows(), M.ncols()), dense=M)

    # ------------------------------------------------------------- inspection
    @property
    def is_int64(self) -> bool:
        """True when the matrix is held in the exact int64 form (dense or sparse)."""
        return self._int is not None

    def is_integer(self) -> bool:
        if self._int is not None:
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
        if self._int is not None:
            return int(self._int[i, j])
        return _to_python(self._dense[i, j])

    def rows(self) -> list[list]:
        """All entries as a list of lists of ints / Fractions."""
        if self._int is not None:
            return self.int_array().tolist()
        n, m = self.shape
        flat = [_to_python(x) for x in self._dense.entries()]
        return [flat[i * m:(i + 1) * m] for i in range(n)]

    def sparse_rows(self) -> list[dict[int, int]]:
        """Each row as a dict {column: nonzero entry}."""
        if self._int is None:
            return [{j: x for j, x in enumerate(r) if x != 0} for r in self.rows()]
        A = self.to_scipy()
        out = []
        for i in range(self.shape[0]):
            lo, hi = A.indptr[i], A.indptr[i + 1]
            out.append(dict(zip(A.indices[lo:hi].tolist(), A.data[lo:hi].tolist())))
        return out

    def nnz(self) -> int:
        """Number of nonzero entries."""
        if self._int is not None:
            return int(np.count_nonzero(self._int)) if isinstance(self._int, np.ndarray) \
                else int(self._int.count_nonzero())
        return sum(1 for x in self._dense.entries() if x != 0)

    def max_abs(self) -> int | Fraction:
        if self._int is not None:
            return _max_abs(self._int)
        return max((abs(_to_python(x)) for x in self._dense.entries()), default=0)

    def _row_abs_bound(self) -> int:
        """max_i sum_j |M[i, j]| as a Python int (int64 form only; summed with Python
        ints whenever an int64 sum could overflow)."""
        A = self._int
        if 0 in self.shape:
            return 0
        if _max_abs(A) * self.shape[1] < SAFE:
            return int(abs(A).sum(axis=1).max())
        return max(sum(abs(int(x)) for x in row) for row in self.rows())

    # ---------------------------------------------------------- backend views
    def int_array(self) -> np.ndarray:
        """The entries as a dense numpy int64 array (only for the int64 form)."""
        if self._int is None:
            raise ExactError("matrix is not held in the int64 form")
        return self._int if isinstance(self._int, np.ndarray) else self._int.toarray()

    def to_fmpz(self):
        """python-flint integer matrix (inside ``exact/`` only)."""
        if self._int is not None:
            n, m = self.shape
            return flint.fmpz_mat(self.int_array().tolist()) if n and m else flint.fmpz_mat(n, m)
        if not self.is_integer():
            raise ExactError("matrix has non-integer entries")
        return flint.fmpz_mat(self.shape[0], self.shape[1], [x.p for x in self._dense.entries()])

    def to_fmpq(self):
        """python-flint rational matrix (inside ``exact/`` only)."""
        if self._dense is not None:
            return self._dense
        return flint.fmpq_mat(self.to_fmpz())

    def to_scipy(self):
        """The entries as a scipy CSR int64 array (only for the int64 form)."""
        if self._int is None:
            raise ExactError("matrix is not held in the int64 form")
        return self._int if sp.issparse(self._int) else sp.csr_array(self._int)

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
        if self._int is not None and other._int is not None \
                and self.max_abs() + other.max_abs() < SAFE:
            return Matrix(self.shape, int64=_combine(self._int, other._int, np.add))
        return Matrix._from_flint(self.to_fmpq() + other.to_fmpq())

    def __neg__(self):
        if self._int is not None:
            return Matrix(self.shape, int64=-self._int)
        return Matrix(self.shape, dense=-self._dense)

    def __sub__(self, other):
        return self + (-self._coerce(other))

    def scale(self, c) -> "Matrix":
        """c times the matrix, for an exact rational c."""
        if not isinstance(c, Rational) or isinstance(c, bool):
            raise TypeError(f"cannot scale a matrix by {c!r}")
        c = Fraction(c)
        if self._int is not None and c.denominator == 1 \
                and abs(c.numerator) * self.max_abs() < SAFE:
            return Matrix(self.shape, int64=self._int * int(c.numerator))
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
        if self._int is not None and other._int is not None:
            bound = self._row_abs_bound() * other.max_abs()
            if bound < SAFE:
                return Matrix((self.shape[0], other.shape[1]),
                              int64=_combine(self._int, other._int, np.matmul, bound))
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
        if self._int is not None:
            return Matrix((self.shape[1], self.shape[0]), int64=self._int.T)
        return Matrix((self.shape[1], self.shape[0]), dense=self._dense.transpose())

    def __eq__(self, other) -> bool:
        if not isinstance(other, Matrix) or self.shape != other.shape:
            return False
        if self._int is not None and other._int is not None:
            a, b = self._int, other._int
            if isinstance(a, np.ndarray) and isinstance(b, np.ndarray):
                return bool(np.array_equal(a, b))
            return (sp.csr_array(a) != sp.csr_array(b)).nnz == 0
        return self.to_fmpq() == other.to_fmpq()

    __hash__ = None

    def trace(self):
        if not self.is_square:
            raise ExactError("trace of a non-square matrix")
        if self._int is not None:
            diagonal = self._int.diagonal()
            return int(diagonal.sum()) if self.shape[0] * _max_abs(diagonal) < SAFE \
                else sum(int(x) for x in diagonal)
        return sum(_to_python(self._dense[i, i]) for i in range(self.shape[0]))

    def total(self):
        """The sum of all entries."""
        if self._int is not None:
            data = self._int.ravel() if isinstance(self._int, np.ndarray) else self._int.data
            return int(data.sum()) if len(data) * _max_abs(data) < SAFE else sum(int(x) for x in data)
        total = sum(Fraction(_to_python(x)) for x in self._dense.entries())
        return int(total) if total.denominator == 1 else total

    def entrywise_abs(self) -> "Matrix":
        """The matrix of absolute values of the entries."""
        if self._int is not None:
            return Matrix(self.shape, int64=abs(self._int))
        return Matrix.from_rows([[abs(x) for x in row] for row in self.rows()])

    def support(self) -> "Matrix":
        """The 0/1 matrix with a 1 where this matrix has a nonzero entry."""
        if self._int is None:
            return Matrix.from_rows([[int(x != 0) for x in row] for row in self.rows()])
        if isinstance(self._int, np.ndarray):
            return Matrix(self.shape, int64=(self._int != 0).astype(np.int64))
        pattern = self._int.copy()
        pattern.eliminate_zeros()
        pattern.data[:] = 1
        return Matrix(self.shape, int64=pattern)

    def is_symmetric(self) -> bool:
        return self.is_square and self == self.T

    def __repr__(self):
        n, m = self.shape
        if n * m <= 64:
            return f"Matrix({self.rows()!r})"
        return f"Matrix(<{n}x{m}, {self.nnz()} nonzeros>)"


def _max_abs(array) -> int:
    """Largest absolute entry of a numpy or scipy int64 array, as a Python int."""
    values = array.data if sp.issparse(array) else array
    if values.size == 0:
        return 0
    return max(abs(int(values.max())), abs(int(values.min())))   # no copy of the array


FLOAT_EXACT = 1 << 53  # integers below this are exact in IEEE double, and so are their sums


def _combine(a, b, operation, bound: int | None = None):
    """a + b or a @ b for int64 arrays of either kind; dense only when both are dense.

    A dense product whose every partial sum is bounded by ``bound`` < 2^53 is computed
    with floating-point BLAS: every intermediate value is then an integer below 2^53,
    which IEEE double arithmetic represents and adds exactly, so the result is exact.
    """
    if isinstance(a, np.ndarray) and isinstance(b, np.ndarray):
        if operation is np.matmul and bound is not None and bound < FLOAT_EXACT:
            return np.matmul(a.astype(np.float64), b.astype(np.float64)).astype(np.int64)
        return operation(a, b)
    a = a if sp.issparse(a) else sp.csr_array(a)
    b = b if sp.issparse(b) else sp.csr_array(b)
    return (a + b) if operation is np.add else (a @ b)

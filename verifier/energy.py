"""The free-energy explorer: critical points of F_T(p) = U(p) - T S(p) on the probability simplex.

For a complex K with Green function g (:func:`verifier.invariants.green`), a probability
vector p on the simplices of K has internal energy U(p) = sum_{x,y} g(x,y) p(x) p(y),
entropy S(p) = -sum_x p(x) log p(x) and Helmholtz free energy F_T(p) = U(p) - T S(p).  The
interaction matrix V defaults to g and may be any symmetric matrix (a
:class:`~verifier.exact.Matrix` or a list of lists of ints / Fractions / floats).

Two evidence levels live here and are kept apart:

* ``evidence = "float"`` -- :func:`critical_points`, :func:`sweep`, :func:`bifurcations`,
  :func:`free_energy`, :func:`bifurcation_diagram`, :func:`branches_csv`.  These use numpy /
  scipy in floating point; they explore and propose, they never decide.  Every object they
  return carries ``evidence == "float"``.
* ``evidence = "exact"`` -- :func:`uniform_is_critical` (integer / rational row sums) and
  :func:`minimisers_at_zero_temperature` (exhaustive search over the faces of the simplex,
  solving each face's KKT system in :class:`fractions.Fraction`).

References
----------
.. [EN] O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
        96-129, arXiv:1907.03369 (the Green function g and U = sum g).
.. [HF] O. Knill, "Helmholtz free energy for finite abstract simplicial complexes",
        arXiv:2105.07553 (2021) (the functional F_T on complexes; from memory).
.. [KKT] H. W. Kuhn, A. W. Tucker, "Nonlinear programming", Proc. 2nd Berkeley Symp. (1951);
        J. Nocedal, S. Wright, "Numerical Optimization", 2nd ed., Springer (2006), ch. 12
        (Lagrange/KKT conditions, Hessian on the tangent space).
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass, field
from fractions import Fraction
from itertools import combinations
from numbers import Rational
from pathlib import Path

import numpy as np

__all__ = [
    "EnergyError", "CriticalPoint", "BranchPoint", "Branch", "Bifurcation", "ZeroTemperature",
    "interaction_matrix", "free_energy", "critical_points", "sweep", "bifurcations",
    "uniform_is_critical", "minimisers_at_zero_temperature", "bifurcation_diagram",
    "branches_csv",
]

FLOAT = "float"
EXACT = "exact"


class EnergyError(ValueError):
    """Bad input to the free-energy explorer (the message names the argument and the fault)."""


# --------------------------------------------------------------------- input handling
def _exact_rows(V) -> list[list]:
    """V as a square symmetric list of lists of exact rationals (ints / Fractions)."""
    rows = V.rows() if hasattr(V, "rows") and callable(V.rows) else V
    try:
        rows = [list(r) for r in rows]
    except TypeError:
        raise EnergyError(f"interaction matrix: expected a Matrix or a list of lists, got "
                          f"{type(V).__name__}") from None
    n = len(rows)
    if n == 0:
        raise EnergyError("interaction matrix: empty (needs at least one row)")
    for i, r in enumerate(rows):
        if len(r) != n:
            raise EnergyError(f"interaction matrix: row {i} has {len(r)} entries, expected {n} "
                              f"(the matrix must be square)")
        for j, x in enumerate(r):
            if isinstance(x, bool) or not isinstance(x, (Rational, float, np.integer, np.floating)):
                raise EnergyError(f"interaction matrix: entry ({i}, {j}) = {x!r} is not a number")
    out = []
    for i, r in enumerate(rows):
        row = []
        for j, x in enumerate(r):
            if isinstance(x, (float, np.floating)):
                if not math.isfinite(x):
                    raise EnergyError(f"interaction matrix: entry ({i}, {j}) = {x!r} is not finite")
                row.append(Fraction(float(x)))
            else:
                row.append(Fraction(int(x)) if isinstance(x, np.integer) else x)
        out.append(row)
    for i in range(n):
        for j in range(i + 1, n):
            if out[i][j] != out[j][i]:
                raise EnergyError(f"interaction matrix: not symmetric at ({i}, {j}): "
                                  f"{out[i][j]} != {out[j][i]}")
    return out


def interaction_matrix(V) -> np.ndarray:
    """The interaction matrix V as a float numpy array (validated: square, symmetric, finite).

    V is a :class:`~verifier.exact.Matrix`, a list of lists, or a numpy array; a
    :class:`~verifier.complex.Complex` gives its Green function g [EN].

    >>> interaction_matrix([[0, 1], [1, 0]]).tolist()
    [[0.0, 1.0], [1.0, 0.0]]
    """
    if hasattr(V, "simplices") and hasattr(V, "facets"):
        from .invariants import green
        V = green(V)
    if isinstance(V, np.ndarray):
        V = V.tolist()
    rows = _exact_rows(V)
    return np.array([[float(x) for x in r] for r in rows], dtype=float)


def _temperature(T) -> float:
    if isinstance(T, bool) or not isinstance(T, (Rational, float, np.floating, np.integer)):
        raise EnergyError(f"temperature: {T!r} is not a number")
    T = float(T)
    if not (T > 0 and math.isfinite(T)):
        raise EnergyError(f"temperature: {T!r} must be a finite positive number (T = 0 is "
                          f"handled exactly by minimisers_at_zero_temperature)")
    return T


# --------------------------------------------------------------------- float side
def free_energy(V, p, T) -> float:
    """The free energy F_T(p) = p^T V p + T sum p log p, in floating point.

    Definition: U(p) = sum_{x,y} V(x,y) p(x) p(y), S(p) = -sum p(x) log p(x) (0 log 0 = 0),
    F_T = U - T S [HF].

    Params: V the interaction matrix, p a probability vector (sequence of floats), T >= 0.
    Returns a float (``evidence = "float"``).

    >>> round(free_energy([[1, 0], [0, 1]], [0.5, 0.5], 1.0), 6)   # 1/2 - log 2
    -0.193147
    """
    A = interaction_matrix(V)
    p = np.asarray(p, dtype=float)
    if p.shape != (A.shape[0],):
        raise EnergyError(f"probability vector: length {p.size}, expected {A.shape[0]}")
    T = float(T)
    pos = p[p > 0]
    return float(p @ A @ p + T * np.sum(pos * np.log(pos)))


@dataclass(frozen=True)
class CriticalPoint:
    """A critical point of F_T on the open simplex (floating point)."""
    T: float
    p: np.ndarray
    F: float
    U: float
    kind: str                      # "minimum", "saddle", "maximum" or "degenerate"
    eigenvalues: np.ndarray        # of 2 D V D + T I on {sqrt(p).w = 0}, D = diag(sqrt p):
    #                                the tangent Hessian up to congruence (same signs)
    residual: float
    evidence: str = FLOAT


def _classify(A: np.ndarray, p: np.ndarray, T: float, tol: float = 1e-9):
    """Kind and (scaled) eigenvalues of the Hessian of F_T on the tangent space at p.

    The Hessian 2V + T diag(1/p) on {sum v = 0} is congruent (v = D w, D = diag(sqrt p))
    to 2 D V D + T I on {sqrt(p) . w = 0}; by Sylvester's law of inertia both have the same
    signs, and the second has eigenvalues bounded by 2 ||V|| + T, so a relative tolerance
    is meaningful even when some p_x are tiny."""
    n = len(p)
    if n == 1:
        return "minimum", np.zeros(0)
    d = np.sqrt(p)
    # orthonormal basis of the orthogonal complement of d (d is a unit vector)
    U_, _, _ = np.linalg.svd(np.eye(n) - np.outer(d, d))
    B = U_[:, : n - 1]
    H = 2 * (d[:, None] * A * d[None, :]) + T * np.eye(n)
    ev = np.linalg.eigvalsh(B.T @ H @ B)
    scale = tol * (T + 2 * float(np.max(np.abs(A))) * n)
    if np.all(ev > scale):
        kind = "minimum"
    elif np.all(ev < -scale):
        kind = "maximum"
    elif np.any(np.abs(ev) <= scale):
        kind = "degenerate"
    else:
        kind = "saddle"
    return kind, ev


def _solve_from(A: np.ndarray, T: float, p0: np.ndarray):
    """Newton polishing in log coordinates u = log p: unknowns (u, lambda)."""
    from scipy.optimize import root

    n = len(p0)
    p0 = np.clip(p0, 1e-300, None)
    p0 = p0 / p0.sum()

    def fun(z):
        u, lam = z[:n], z[n]
        with np.errstate(over="ignore", invalid="ignore"):
            p = np.exp(u)
            return np.concatenate([2 * A @ p + T * (u + 1) - lam, [p.sum() - 1.0]])

    def jac(z):
        u = z[:n]
        with np.errstate(over="ignore"):
            p = np.exp(u)
        J = np.zeros((n + 1, n + 1))
        J[:n, :n] = 2 * A * p[None, :] + T * np.eye(n)
        J[:n, n] = -1.0
        J[n, :n] = p
        return J

    u0 = np.log(p0)
    lam0 = float(np.mean(2 * A @ p0 + T * (u0 + 1)))
    with np.errstate(over="ignore", invalid="ignore"):
        sol = root(fun, np.concatenate([u0, [lam0]]), jac=jac, method="hybr")
    z = sol.x
    if not np.all(np.isfinite(z)):
        return None
    res = float(np.max(np.abs(fun(z))))
    if not math.isfinite(res):
        return None
    p = np.exp(z[:n])
    return p / p.sum(), res


def _fixed_point(A: np.ndarray, T: float, p: np.ndarray, steps: int = 200, damping: float = 0.5):
    """Damped iteration p <- (1-d) p + d softmax(-2 V p / T)."""
    for _ in range(steps):
        e = -2 * A @ p / T
        q = np.exp(e - e.max())
        q /= q.sum()
        p = (1 - damping) * p + damping * q
    return p


def critical_points(V, T, starts: int = 40, seed: int = 0, extra_starts=(), tol: float = 1e-9,
                    dedup: float = 1e-6) -> list[CriticalPoint]:
    """Critical points of F_T on the open probability simplex, found numerically (float).

    Definition: p > 0 with sum p = 1 is critical for F_T = U - T S iff the Lagrange
    conditions 2 (V p)_x + T (log p_x + 1) = lambda hold for all x and one lambda [KKT].
    It is classified by the Hessian 2 V + T diag(1/p) restricted to the tangent space
    {sum v = 0}: "minimum" (positive definite), "maximum" (negative definite), "saddle"
    (both signs), "degenerate" (an eigenvalue within ``tol`` (2 n max|V| + T) of zero).
    ``eigenvalues`` are those of the congruent form 2 D V D + T I on {sqrt(p) . w = 0},
    D = diag(sqrt p): same signs (Sylvester), bounded size.

    Params: V the interaction matrix (Matrix / list of lists / Complex for its Green
    function); T > 0; ``starts`` the number of seeded random starts (Dirichlet(1) and
    sparser Dirichlet(0.2) samples, plus the uniform measure); ``seed`` for the generator;
    ``extra_starts`` further probability vectors to start from (used for continuation);
    ``dedup`` the max-norm distance below which two solutions count as one.
    Returns a list of :class:`CriticalPoint` sorted by F (``evidence = "float"``).

    >>> [c.kind for c in critical_points([[1, 0], [0, 1]], 1.0)]   # uniform, by symmetry
    ['minimum']

    Notes: each start runs a damped fixed-point iteration p ∝ exp(-2 V p / T) and is then
    polished by Newton's method (scipy.optimize.root, hybrid Powell) in the coordinates
    u = log p, which keeps p positive.  Exploration only: critical points whose basins no
    start reaches are missed; a residual above 1e-8 discards a solution.
    Cost O(starts * n^3).
    """
    A = interaction_matrix(V)
    T = _temperature(T)
    n = A.shape[0]
    rng = np.random.default_rng(seed)
    candidates = [np.full(n, 1.0 / n)]
    candidates += [np.asarray(s, dtype=float) for s in extra_starts]
    for k in range(int(starts)):
        alpha = 1.0 if k % 2 == 0 else 0.2
        candidates.append(rng.dirichlet(np.full(n, alpha)))
    found: list[CriticalPoint] = []
    for p0 in candidates:
        q0 = np.clip(p0, 1e-12, None)
        for init in (p0, _fixed_point(A, T, q0 / q0.sum())):
            out = _solve_from(A, T, init)
            if out is None:
                continue
            p, res = out
            if res > 1e-8 or not np.all(p > 0):
                continue
            if any(np.max(np.abs(p - c.p)) < dedup for c in found):
                continue
            kind, ev = _classify(A, p, T, tol)
            U = float(p @ A @ p)
            F = U + T * float(np.sum(p * np.log(p)))
            found.append(CriticalPoint(T, p, F, U, kind, ev, res))
    found.sort(key=lambda c: c.F)
    return found


# --------------------------------------------------------------------- continuation
@dataclass(frozen=True)
class BranchPoint:
    """One point of a branch: temperature, probability vector, free energy, kind and the
    smallest Hessian eigenvalue on the tangent space (floating point)."""
    T: float
    p: np.ndarray
    F: float
    kind: str
    min_eigenvalue: float

    def __iter__(self):                     # unpacks as (T, p, F, kind)
        return iter((self.T, self.p, self.F, self.kind))


@dataclass
class Branch:
    """A branch of critical points followed along decreasing T (floating point)."""
    points: list = field(default_factory=list)
    evidence: str = FLOAT

    def __iter__(self):
        return iter(self.points)

    def __len__(self):
        return len(self.points)


def sweep(V, temperatures, starts: int = 20, seed: int = 0, match: float = 0.05,
          jump: float = 0.25) -> list[Branch]:
    """Branches of critical points of F_T followed by continuation as T decreases (float).

    Definition: a branch is a sequence of critical points (see :func:`critical_points`) at
    successive temperatures, each obtained from the previous one by continuation.

    Params: V the interaction matrix; ``temperatures`` positive numbers (processed from the
    largest down, where F_T is strictly convex for T > 2 ||V||_2 and the only critical point
    is the minimum near the uniform measure); ``starts`` fresh random starts per temperature;
    ``match`` the max-norm distance within which a new point continues a branch;
    ``jump`` the largest max-norm step a Newton continuation may take and still count.
    Returns a list of :class:`Branch`, each a list of :class:`BranchPoint` (T, p, F, kind).

    >>> bs = sweep([[1, 0], [0, 1]], [4.0, 2.0, 1.0], starts=2)
    >>> len(bs), [pt.kind for pt in bs[0]]
    (1, ['minimum', 'minimum', 'minimum'])

    Notes: at each temperature the end points of the live branches are used as extra starts
    (continuation), plus ``starts`` fresh seeded starts.  A branch is continued by the point
    Newton's method reaches from its last point (if that step is at most ``jump``); left-over
    points join the nearest live branch within ``match``; the others start new branches.
    A branch that finds no continuation ends (a fold or a missed point).
    """
    A = interaction_matrix(V)
    Ts = sorted({_temperature(t) for t in temperatures}, reverse=True)
    if not Ts:
        raise EnergyError("temperatures: empty list")
    branches: list[Branch] = []
    live: list[Branch] = []
    for step, T in enumerate(Ts):
        ends = [b.points[-1].p for b in live]
        pts = critical_points(A, T, starts=starts, seed=seed + step, extra_starts=ends)
        used_c, used_b, assign = set(), set(), {}
        # true continuation first: Newton from each branch's last point at the new T
        for j, b in enumerate(live):
            out = _solve_from(A, T, b.points[-1].p)
            if out is None or out[1] > 1e-8:
                continue
            q = out[0]
            dists = [float(np.max(np.abs(c.p - q))) for c in pts]
            i = int(np.argmin(dists)) if dists else -1
            if i >= 0 and dists[i] < 1e-5 and i not in used_c \
                    and float(np.max(np.abs(q - b.points[-1].p))) <= jump:
                used_c.add(i)
                used_b.add(j)
                assign[i] = j
        # then nearest remaining points within ``match``
        pairs = sorted(((float(np.max(np.abs(c.p - b.points[-1].p))), i, j)
                        for i, c in enumerate(pts) for j, b in enumerate(live)))
        for d, i, j in pairs:
            if d <= match and i not in used_c and j not in used_b:
                used_c.add(i)
                used_b.add(j)
                assign[i] = j
        new_live = []
        for i, c in enumerate(pts):
            bp = BranchPoint(T, c.p, c.F, c.kind,
                             float(c.eigenvalues.min()) if c.eigenvalues.size else math.inf)
            if i in assign:
                b = live[assign[i]]
            else:
                b = Branch()
                branches.append(b)
            b.points.append(bp)
            new_live.append(b)
        live = new_live
    return branches


@dataclass(frozen=True)
class Bifurcation:
    """A temperature interval (T_low, T_high) in which something changes (floating point)."""
    T_low: float
    T_high: float
    T: float            # estimate inside the interval
    what: str           # "minima count", "eigenvalue crossing", "branch born", "branch ends"
    detail: str
    evidence: str = FLOAT


def bifurcations(branches) -> list[Bifurcation]:
    """Temperatures where the picture of critical points changes (floating point).

    Definition: reported are (i) consecutive temperatures between which the number of
    minima changes, (ii) consecutive points of a branch between which the smallest tangent
    Hessian eigenvalue changes sign (estimate by linear interpolation), (iii) branches that
    begin or end strictly inside the temperature range (folds, or points the search missed).

    Params: ``branches`` as returned by :func:`sweep`.
    Returns a list of :class:`Bifurcation` sorted by decreasing T.

    >>> bifurcations(sweep([[1, 0], [0, 1]], [4.0, 2.0], starts=2))
    []

    Notes: resolution is the temperature grid of the sweep; a change between grid points is
    located only to that interval.
    """
    Ts = sorted({pt.T for b in branches for pt in b.points}, reverse=True)
    out = []
    if not Ts:
        return out
    count = {T: 0 for T in Ts}
    for b in branches:
        for pt in b.points:
            if pt.kind == "minimum":
                count[pt.T] += 1
    for hi, lo in zip(Ts, Ts[1:]):
        if count[hi] != count[lo]:
            out.append(Bifurcation(lo, hi, (lo + hi) / 2, "minima count",
                                   f"{count[hi]} minima at T={hi:g}, {count[lo]} at T={lo:g}"))
    for k, b in enumerate(branches):
        pts = b.points
        for a, c in zip(pts, pts[1:]):
            ea, ec = a.min_eigenvalue, c.min_eigenvalue
            if math.isfinite(ea) and math.isfinite(ec) and (ea > 0) != (ec > 0):
                t = a.T + (c.T - a.T) * ea / (ea - ec) if ea != ec else (a.T + c.T) / 2
                out.append(Bifurcation(c.T, a.T, t, "eigenvalue crossing",
                                       f"branch {k}: smallest eigenvalue {ea:.3g} -> {ec:.3g}"))
        if pts and pts[0].T < Ts[0]:
            i = Ts.index(pts[0].T)
            out.append(Bifurcation(pts[0].T, Ts[i - 1], (pts[0].T + Ts[i - 1]) / 2, "branch born",
                                   f"branch {k} ({pts[0].kind}) first found at T={pts[0].T:g}"))
        if pts and pts[-1].T > Ts[-1]:
            i = Ts.index(pts[-1].T)
            out.append(Bifurcation(Ts[i + 1], pts[-1].T, (pts[-1].T + Ts[i + 1]) / 2, "branch ends",
                                   f"branch {k} ({pts[-1].kind}) last found at T={pts[-1].T:g}"))
    out.sort(key=lambda b: -b.T)
    return out


# --------------------------------------------------------------------- exact side
def uniform_is_critical(V) -> bool:
    """Whether the uniform measure is a critical point of F_T for every T > 0 (exact).

    Definition: with p_x = 1/n the Lagrange condition 2 (V p)_x + T (log p_x + 1) = lambda
    reads 2 (V 1)_x / n = lambda + T (log n - 1): it holds for all x (for one, equivalently
    every, T) iff all row sums of V are equal [KKT].

    Params: V the interaction matrix (Matrix / list of lists / Complex for its Green function).
    Returns a bool (``evidence = "exact"``: the row sums are summed in ints / Fractions;
    float entries are converted exactly to their binary rational values).

    >>> uniform_is_critical([[0, 1], [1, 0]]), uniform_is_critical([[0, 1], [1, 1]])
    (True, False)

    Notes: O(n^2) exact additions.
    """
    if hasattr(V, "simplices") and hasattr(V, "facets"):
        from .invariants import green
        V = green(V)
    rows = _exact_rows(V)
    sums = {sum(r, Fraction(0)) for r in rows}
    return len(sums) == 1


def _solve_exact(M: list[list[Fraction]], b: list[Fraction]):
    """Solve M z = b exactly by Gauss-Jordan; None if M is singular."""
    n = len(M)
    A = [list(map(Fraction, M[i])) + [Fraction(b[i])] for i in range(n)]
    for c in range(n):
        piv = next((r for r in range(c, n) if A[r][c] != 0), None)
        if piv is None:
            return None
        A[c], A[piv] = A[piv], A[c]
        inv = 1 / A[c][c]
        A[c] = [x * inv for x in A[c]]
        for r in range(n):
            if r != c and A[r][c] != 0:
                f = A[r][c]
                A[r] = [x - f * y for x, y in zip(A[r], A[c])]
    return [A[i][n] for i in range(n)]


@dataclass(frozen=True)
class ZeroTemperature:
    """The exact T = 0 answer: min of U = p^T V p over the probability simplex.

    ``value`` is the exact minimum; ``minimisers`` the minimisers that are the unique KKT
    point of their face (exact Fraction tuples, sorted); ``multipliers`` the matching mu;
    ``degenerate_faces`` the supports whose bordered KKT matrix is singular (on them the
    minimiser set, if met, is not isolated); ``kkt_points`` all isolated KKT points found."""
    value: Fraction
    minimisers: tuple
    multipliers: tuple
    degenerate_faces: tuple
    kkt_points: tuple
    evidence: str = EXACT

    def __iter__(self):
        return iter(self.minimisers)

    def __len__(self):
        return len(self.minimisers)


def minimisers_at_zero_temperature(V, max_size: int = 12) -> ZeroTemperature:
    """Exact minimisers of U(p) = p^T V p on the probability simplex (the T = 0 limit).

    Definition: minimise U(p) = sum V(x,y) p(x) p(y) over p >= 0, sum p = 1.  A minimiser with
    support A satisfies the KKT conditions (V p)_x = mu for x in A, (V p)_x >= mu for x not in
    A, p_A > 0, with U = mu [KKT].  As T -> 0 the minima of F_T accumulate at minima of U.

    Params: V the interaction matrix (Matrix / list of lists / Complex for its Green
    function), at most ``max_size`` rows (2^n - 1 faces are searched).
    Returns a :class:`ZeroTemperature`: the exact minimum ``value`` and the exact
    minimisers (tuples of Fractions), ``evidence = "exact"``.

    >>> z = minimisers_at_zero_temperature([[1, 0], [0, 1]])
    >>> z.value, z.minimisers
    (Fraction(1, 2), ((Fraction(1, 2), Fraction(1, 2)),))

    Notes: for every nonempty support A the bordered system [V_AA, -1; 1^T, 0](p_A, mu) =
    (0, 1) is solved in Fractions; solutions with p_A > 0 and the outside KKT inequalities
    are kept.  The minimum value is always found: if the bordered matrix of A is singular
    there is v != 0, sum v = 0 with V_AA v = nu 1, so U is constant along p + t v inside the
    face and a minimiser on A can be pushed to a smaller face; singleton faces are never
    singular.  Minimisers lying only on singular faces (a continuum) are not listed
    individually; their faces are reported in ``degenerate_faces``.
    Cost O(2^n n^3) exact operations.
    """
    if hasattr(V, "simplices") and hasattr(V, "facets"):
        from .invariants import green
        V = green(V)
    rows = _exact_rows(V)
    n = len(rows)
    if n > max_size:
        raise EnergyError(f"interaction matrix: {n} rows exceed max_size={max_size} for the "
                          f"exhaustive face search (2^n faces)")
    W = [[Fraction(x) for x in r] for r in rows]
    kkt, degenerate = [], []
    for k in range(1, n + 1):
        for A in combinations(range(n), k):
            M = [[W[i][j] for j in A] + [Fraction(-1)] for i in A]
            M.append([Fraction(1)] * k + [Fraction(0)])
            z = _solve_exact(M, [Fraction(0)] * k + [Fraction(1)])
            if z is None:
                degenerate.append(A)
                continue
            pA, mu = z[:k], z[k]
            if any(x <= 0 for x in pA):
                continue
            p = [Fraction(0)] * n
            for i, x in zip(A, pA):
                p[i] = x
            Vp = [sum((W[x][j] * p[j] for j in A), Fraction(0)) for x in range(n)]
            if all(Vp[x] >= mu for x in range(n) if x not in A):
                kkt.append((tuple(p), mu))
    value = min(mu for _, mu in kkt)
    best = sorted(p for p, mu in kkt if mu == value)
    return ZeroTemperature(value, tuple(best), tuple(value for _ in best), tuple(degenerate),
                           tuple(kkt))


# --------------------------------------------------------------------- output
def _coordinate(pt, coordinate):
    if coordinate is None or coordinate == "F":
        return pt.F
    return float(pt.p[int(coordinate)])


def bifurcation_diagram(branches, path, coordinate=None, title: str = "") -> Path:
    """Write a bifurcation diagram (PNG or SVG by the file suffix) of the branches (float).

    Definition: each branch is drawn as the curve T -> F (or T -> p_x when ``coordinate``
    is the index x); minima solid, other kinds dashed; the figure is labelled
    "floating point".

    Params: ``branches`` from :func:`sweep`; ``path`` ending in .png or .svg;
    ``coordinate`` None / "F" for the free energy, or a simplex index.
    Returns the path written.

    >>> import tempfile, os
    >>> d = tempfile.mkdtemp()
    >>> bs = sweep([[1, 0], [0, 1]], [2.0, 1.0], starts=1)
    >>> f = bifurcation_diagram(bs, os.path.join(d, "b.svg"))
    >>> f.stat().st_size > 0
    True

    Notes: matplotlib with the Agg canvas and an explicit Figure (no global pyplot state).
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in (".png", ".svg"):
        raise EnergyError(f"diagram path {str(path)!r}: suffix must be .png or .svg")
    fig = Figure(figsize=(7, 4.5))
    FigureCanvasAgg(fig)
    ax = fig.add_subplot(1, 1, 1)
    drawn = set()
    for b in branches:
        pts = list(b.points)
        # split a branch into runs of equal kind, so minima are solid and the rest dashed
        run = []
        for pt in pts + [None]:
            if run and (pt is None or pt.kind != run[-1].kind):
                mins = run[-1].kind == "minimum"
                label = "minimum" if mins else "saddle / other"
                ax.plot([q.T for q in run], [_coordinate(q, coordinate) for q in run],
                        linestyle="-" if mins else "--", color="C0" if mins else "C3",
                        marker="." if len(run) == 1 else None,
                        label=None if label in drawn else label)
                drawn.add(label)
                run = [run[-1]] if pt is not None else []
            if pt is not None:
                run.append(pt)
    ax.set_xlabel("temperature T")
    ax.set_ylabel("free energy F_T" if coordinate in (None, "F") else f"p[{coordinate}]")
    ax.set_title((title + " " if title else "") + "(floating point)")
    ax.text(0.99, 0.01, "evidence: floating point", transform=ax.transAxes, ha="right",
            va="bottom", fontsize=8, color="0.4")
    if drawn:
        ax.legend(loc="best", fontsize=8)
    path.parent.mkdir(parents=True, exist_ok=True)
    fig.savefig(path, format=suffix[1:])
    return path


def branches_csv(branches, path) -> Path:
    """Write the branches as CSV: one row per branch point (floating point).

    Columns: branch, T, F, kind, min_eigenvalue, evidence, p0 ... p(n-1).

    >>> import tempfile, os
    >>> bs = sweep([[1, 0], [0, 1]], [1.0], starts=1)
    >>> f = branches_csv(bs, os.path.join(tempfile.mkdtemp(), "b.csv"))
    >>> f.read_text().splitlines()[0]
    'branch,T,F,kind,min_eigenvalue,evidence,p0,p1'
    """
    path = Path(path)
    n = max((len(pt.p) for b in branches for pt in b.points), default=0)
    path.parent.mkdir(parents=True, exist_ok=True)
    with path.open("w", newline="") as fh:
        w = csv.writer(fh)
        w.writerow(["branch", "T", "F", "kind", "min_eigenvalue", "evidence"]
                   + [f"p{i}" for i in range(n)])
        for k, b in enumerate(branches):
            for pt in b.points:
                w.writerow([k, repr(pt.T), repr(pt.F), pt.kind, repr(pt.min_eigenvalue), FLOAT]
                           + [repr(float(x)) for x in pt.p])
    return path

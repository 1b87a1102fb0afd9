"""Tests for the free-energy explorer (verifier/energy.py).

F_T(p) = U(p) - T S(p), U(p) = sum g(x,y) p(x) p(y), S(p) = -sum p log p, on the probability
simplex over the simplices of a complex (issue 6 (b)).  Two small complexes, both small
enough to check by hand:

* PATH: the 1-dimensional complex of the path 0 - 1 - 2, simplices in the order
  v0, v1, v2, e01, e12 (5 simplices);
* TRIANGLE: a single filled triangle, simplices v0, v1, v2, e01, e02, e12, t (7 simplices).

Floating-point results (critical points, sweeps) are checked against hand-derived exact
statements (exact minima of U, first-order perturbation at large T, convexity bounds);
exact results are checked exactly (Fractions) and independently in floating point (SLSQP).
"""

from __future__ import annotations

import csv
import math
from fractions import Fraction

import numpy as np
import pytest
from scipy.optimize import minimize

from verifier import energy as E
from verifier.complex import Complex
from verifier.exact import Matrix
from verifier.invariants import green

PATH = Complex.from_facets([[0, 1], [1, 2]])
TRIANGLE = Complex.from_facets([[0, 1, 2]])

# The Green functions g = L^{-1}, L(x, y) = 1 if the simplices x and y intersect (the
# connection matrix).  Hand computation, checked below by multiplying with L exactly;
# L is unimodular: O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600
# (2020) 96-129, arXiv:1907.03369.
G_PATH = [[0, -1, 0, 1, 0],
          [-1, -1, -1, 1, 1],
          [0, -1, 0, 0, 1],
          [1, 1, 0, -1, 0],
          [0, 1, 1, 0, -1]]
G_TRIANGLE = [[0, 0, 0, 0, 0, -1, 1],
              [0, 0, 0, 0, -1, 0, 1],
              [0, 0, 0, -1, 0, 0, 1],
              [0, 0, -1, 0, 1, 1, -1],
              [0, -1, 0, 1, 0, 1, -1],
              [-1, 0, 0, 1, 1, 0, -1],
              [1, 1, 1, -1, -1, -1, 1]]

F = Fraction
# Exact T = 0 minimisers (hand computation, derivations in test_zero_temperature_values):
PATH_MIN_VALUE = F(-1)
PATH_MINIMISERS = sorted([(0, 1, 0, 0, 0), (0, 0, 0, 1, 0), (0, 0, 0, 0, 1)])
TRI_MIN_VALUE = F(-1, 2)
H = F(1, 2)
TRI_MINIMISERS = sorted([(H, 0, 0, 0, 0, H, 0),      # 1/2 (v0 + e12)
                         (0, H, 0, 0, H, 0, 0),      # 1/2 (v1 + e02)
                         (0, 0, H, H, 0, 0, 0)])     # 1/2 (v2 + e01)

CASES = [(PATH, G_PATH, PATH_MIN_VALUE, PATH_MINIMISERS),
         (TRIANGLE, G_TRIANGLE, TRI_MIN_VALUE, TRI_MINIMISERS)]
IDS = ["path3", "triangle"]


def _connection(K):
    return [[1 if set(x) & set(y) else 0 for y in K.simplices] for x in K.simplices]


@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_green_function_inputs(K, g, value, mins):
    # g is the inverse of the connection matrix L (Knill, arXiv:1907.03369, unimodularity
    # theorem); checked exactly here so the tests below rest on a verified input.
    assert green(K).rows() == g
    L = Matrix.from_rows(_connection(K))
    assert L @ Matrix.from_rows(g) == Matrix.identity(len(g))


# ------------------------------------------------------------------ (1) large T
@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_large_temperature_unique_minimum_near_uniform(K, g, value, mins):
    T = 100.0
    n = len(g)
    # Uniqueness (hand computation): the Hessian of F_T is 2g + T diag(1/p) >= 2g + T I on
    # the simplex (p <= 1), positive definite when T > 2 ||g||_2; ||g||_2 <= ||g||_Frobenius,
    # and sum g(x,y)^2 is an exact integer (15 for the path, 25 for the triangle), so
    # T = 100 > 2 * sqrt(25) makes F_T strictly convex: exactly one critical point, a minimum.
    assert 4 * sum(x * x for r in g for x in r) < T * T
    cps = E.critical_points(K, T)
    assert [c.kind for c in cps] == ["minimum"]
    same = E.critical_points(green(K), T)            # the Matrix input gives the same point
    assert len(same) == 1 and np.abs(same[0].p - cps[0].p).max() < 1e-10
    assert cps[0].evidence == "float"
    p = cps[0].p
    # Perturbation at order 1/T (hand computation): writing p = (1/n)(1 + eps), the Lagrange
    # condition 2 g p + T (log p + 1) = lambda gives, to first order,
    # eps_x = -(2/(n T)) (r_x - mean r), r the row sums of g.  So |p - 1/n| is
    # (2/(n^2 T)) max|r - mean r| up to O(1/T^2): about 9.6e-4 (path), 3.5e-4 (triangle).
    r = np.array([sum(row) for row in g], dtype=float)
    eps = 2 / (n * T) * np.abs(r - r.mean()).max()
    assert np.abs(p - 1 / n).max() <= 1.05 * eps / n
    predicted = (1 / n) * (1 - 2 / (n * T) * (r - r.mean()))
    # the neglected term is O(eps^2) relative, i.e. O(eps^2 / n) absolute; factor 10 margin
    assert np.abs(p - predicted).max() <= 10 * eps * eps / n
    assert abs(p.sum() - 1) < 1e-12


# ------------------------------------------------------------------ (2) T = 0, exact
@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_zero_temperature_values(K, g, value, mins):
    # Hand computation.  PATH, p = (a, b, c, d, e) on (v0, v1, v2, e01, e12):
    #   U = -b^2 - d^2 - e^2 - 2ab - 2bc + 2ad + 2bd + 2be + 2ce
    #     >= -(b^2 + d^2 + e^2 + 2ab + 2bc) >= -(a+b+c+d+e)^2 = -1,
    # with equality iff a = c = 0 and bd = be = de = 0: exactly the point masses at v1, e01,
    # e12 (U = g(x,x) = -1 there).
    # TRIANGLE, a_i on vertex i, b_i on the edge opposite i, c on the triangle, A = sum a,
    # B = sum b (entries of G_TRIANGLE: g(e_i, e_j) = 1 for i != j, g(e, t) = -1,
    # g(t, t) = 1, g(v, t) = 1, g(v_i, opposite edge) = -1, all others 0):
    #   U = 2 sum_{i<j} b_i b_j - 2cB + c^2 + 2cA - 2 sum a_i b_i,
    #   -U <= 2 sum a_i b_i + 2cB - c^2 <= 2AB + 2cB = 2B(A + c) <= (A + B + c)^2 / 2 = 1/2,
    # with equality iff c = 0, b_i b_j = 0 (i != j), a and b carried by one index i, and
    # A = B = 1/2: exactly the three points 1/2 (v_i + opposite edge).
    z = E.minimisers_at_zero_temperature(K)
    assert z.evidence == "exact"
    assert z.value == value
    assert sorted(z.minimisers) == mins
    assert all(isinstance(x, (int, Fraction)) for p in z.minimisers for x in p)


@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_zero_temperature_kkt_exact(K, g, value, mins):
    # KKT conditions for min p^T g p on the simplex (Kuhn-Tucker 1951; Nocedal-Wright,
    # "Numerical Optimization", 2nd ed., ch. 12), checked in Fractions, written here
    # independently of the module: (g p)_x = mu on the support, >= mu off it, mu = U(p).
    for p in E.minimisers_at_zero_temperature(K).minimisers:
        p = [F(x) for x in p]
        assert sum(p) == 1 and all(x >= 0 for x in p)
        gp = [sum(F(gx) * px for gx, px in zip(row, p)) for row in g]
        U = sum(px * v for px, v in zip(p, gp))
        assert U == value
        assert all(gp[x] == U for x in range(len(p)) if p[x] > 0)
        assert all(gp[x] >= U for x in range(len(p)) if p[x] == 0)


@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_zero_temperature_second_method(K, g, value, mins):
    # Independent floating-point search (scipy SLSQP, Kraft 1988, from many starts, plus
    # dense random sampling of the simplex incl. all vertices and edge midpoints): nothing
    # lower than the exact minimum may be found (tolerance 1e-9, common practice, no source).
    A = np.array(g, dtype=float)
    n = len(g)
    rng = np.random.default_rng(12345)
    samples = np.vstack([rng.dirichlet(np.full(n, a), size=20000) for a in (1.0, 0.3, 0.1)]
                        + [np.eye(n)]
                        + [(np.eye(n)[i] + np.eye(n)[j]) / 2 for i in range(n) for j in range(i)])
    sampled = np.einsum("ij,jk,ik->i", samples, A, samples).min()
    assert sampled >= float(value) - 1e-9
    best = math.inf
    cons = [{"type": "eq", "fun": lambda p: p.sum() - 1, "jac": lambda p: np.ones(n)}]
    for k in range(60):
        p0 = rng.dirichlet(np.full(n, 0.5))
        res = minimize(lambda p: p @ A @ p, p0, jac=lambda p: 2 * A @ p, method="SLSQP",
                       bounds=[(0, 1)] * n, constraints=cons, options={"ftol": 1e-14})
        if abs(res.x.sum() - 1) < 1e-9 and res.x.min() > -1e-12:
            best = min(best, float(res.fun))
    assert best >= float(value) - 1e-9
    assert best <= float(value) + 1e-6      # the search does reach the exact minimum


def test_zero_temperature_identity_matrix():
    # min p^T I p = 1/n at the uniform measure (Cauchy-Schwarz: (sum p)^2 <= n sum p^2),
    # hand computation; g of two isolated points is the 2x2 identity.
    z = E.minimisers_at_zero_temperature([[1, 0, 0], [0, 1, 0], [0, 0, 1]])
    assert z.value == F(1, 3) and z.minimisers == ((F(1, 3),) * 3,)
    assert E.minimisers_at_zero_temperature(Complex.from_facets([[0], [1]])).value == F(1, 2)


def test_zero_temperature_singular_faces():
    # V = all-ones: U = (sum p)^2 = 1 everywhere (hand computation); every face of size >= 2
    # has a singular bordered KKT matrix, the value is still found from the vertices.
    z = E.minimisers_at_zero_temperature([[1, 1, 1], [1, 1, 1], [1, 1, 1]])
    assert z.value == 1
    assert sorted(z.minimisers) == sorted([(1, 0, 0), (0, 1, 0), (0, 0, 1)])
    assert set(z.degenerate_faces) == {(0, 1), (0, 2), (1, 2), (0, 1, 2)}


# ------------------------------------------------------------------ (3) T -> 0
@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_low_temperature_minimum_approaches_exact_minimiser(K, g, value, mins):
    exact = np.array([[float(x) for x in p] for p in mins])
    dists = []
    for T in (0.2, 0.1, 0.05, 0.02):
        best = min((c for c in E.critical_points(K, T, starts=20) if c.kind == "minimum"),
                   key=lambda c: c.F)
        d = float(np.abs(exact - best.p).max(axis=1).min())
        dists.append(d)
        # Bound (hand computation): for the path the best minimum sits on the face
        # {v0, v1, v2} with p(v0) = p(v2) = a (up to the tiny edge masses), where
        # U = -1 + 4a^2 and criticality gives 4a = T log(p(v1)/a) <= T log(1/a); a < T^2
        # would force 4a >= T log(1/(2 T^2)) > 4 T^2 (T <= 0.2), so a >= T^2 and the distance
        # 2a to the point mass at v1 is at most T log(1/T), and U + 1 = 4a^2 is smaller;
        # for the triangle the exact minimiser is a nondegenerate KKT point and the
        # approach is faster still.
        assert d <= T * math.log(1 / T)
        U = float(best.p @ np.array(g, float) @ best.p)
        assert abs(U - float(value)) <= T * math.log(1 / T)
    assert dists == sorted(dists, reverse=True)


@pytest.mark.parametrize("K, g, value, mins", CASES, ids=IDS)
def test_low_temperature_one_minimum_per_exact_minimiser(K, g, value, mins):
    # At T = 0.05 the minima of F_T are near the strict minimisers of U (hand computation
    # above: three for each complex), one each.
    exact = np.array([[float(x) for x in p] for p in mins])
    minima = [c for c in E.critical_points(K, 0.05) if c.kind == "minimum"]
    assert len(minima) == len(mins)
    nearest = sorted(int(np.abs(exact - c.p).max(axis=1).argmin()) for c in minima)
    assert nearest == list(range(len(mins)))


# ------------------------------------------------------------------ (4) uniform measure
@pytest.mark.parametrize("V, expected", [
    (G_PATH, False),                      # row sums (0, -1, 0, 1, 1), from G_PATH above
    (G_TRIANGLE, False),                  # row sums (0, 0, 0, 0, 0, 0, 1)
    ([[1, 0], [0, 1]], True),             # g of two isolated points
    ([[2, -1, 1], [-1, 3, 0], [1, 0, 1]], True),   # row sums 2, 2, 2
    ([[F(1, 2), F(1, 3)], [F(1, 3), F(1, 2)]], True),
    ([[0, F(1, 3)], [F(1, 3), F(1, 2)]], False),
])
def test_uniform_is_critical_matches_row_sums(V, expected):
    # Lagrange condition at p = 1/n: 2 (V 1)_x / n = const iff equal row sums (hand
    # computation); row sums recomputed exactly here.
    sums = {sum(F(x) for x in row) for row in V}
    assert (len(sums) == 1) == expected
    assert E.uniform_is_critical(V) is expected
    assert E.uniform_is_critical(Matrix.from_rows(V)) is expected


@pytest.mark.parametrize("V", [[[1, 0], [0, 1]], [[2, -1, 1], [-1, 3, 0], [1, 0, 1]]])
@pytest.mark.parametrize("T", [0.3, 1.0, 10.0])
def test_uniform_is_found_numerically_when_critical(V, T):
    n = len(V)
    cps = E.critical_points(V, T, starts=10)
    assert any(np.abs(c.p - 1 / n).max() < 1e-8 for c in cps)


@pytest.mark.parametrize("K", [PATH, TRIANGLE], ids=IDS)
def test_uniform_not_found_numerically_when_not_critical(K):
    n = len(K.simplices)
    assert not E.uniform_is_critical(K)
    for T in (0.5, 5.0):
        assert all(np.abs(c.p - 1 / n).max() > 1e-4 for c in E.critical_points(K, T, starts=10))


def test_critical_points_satisfy_lagrange_conditions():
    # Every returned point satisfies 2 (g p)_x + T (log p_x + 1) = lambda (definition).
    A = np.array(G_TRIANGLE, float)
    for c in E.critical_points(TRIANGLE, 0.3):
        lhs = 2 * A @ c.p + 0.3 * (np.log(c.p) + 1)
        assert np.ptp(lhs) < 1e-7
        assert abs(c.F - E.free_energy(TRIANGLE, c.p, 0.3)) < 1e-12


# ------------------------------------------------------------------ (5) sweep and output
@pytest.fixture(scope="module")
def triangle_sweep():
    return E.sweep(TRIANGLE, np.geomspace(3.0, 0.1, 18), starts=10)


def test_sweep_and_bifurcations(triangle_sweep):
    branches = triangle_sweep
    assert all(b.evidence == "float" for b in branches)
    Ts = sorted({pt.T for b in branches for pt in b}, reverse=True)
    count = {T: sum(pt.kind == "minimum" for b in branches for pt in b if pt.T == T) for T in Ts}
    # strictly convex for T > 2 sqrt(25) = 10 (test above); at T = 3 the explorer finds one
    # minimum, near 0 three (the exact minimisers): so the minima count must change.
    assert count[Ts[0]] == 1 and count[Ts[-1]] == 3
    bif = E.bifurcations(branches)
    changes = [b for b in bif if b.what == "minima count"]
    assert changes and all(b.evidence == "float" for b in bif)
    assert all(b.T_low < b.T_high for b in bif)
    # the branch from the uniform measure is one branch starting at the top temperature
    assert branches[0].points[0].T == Ts[0] and branches[0].points[0].kind == "minimum"


@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_diagram_written(tmp_path, triangle_sweep, suffix, magic):
    out = E.bifurcation_diagram(triangle_sweep, tmp_path / f"diagram{suffix}")
    data = out.read_bytes()
    assert len(data) > 1000 and data.startswith(magic)
    if suffix == ".svg":
        assert b"floating point" in data


def test_csv_has_branches(tmp_path, triangle_sweep):
    out = E.branches_csv(triangle_sweep, tmp_path / "b.csv")
    with out.open(newline="") as fh:
        rows = list(csv.DictReader(fh))
    assert len(rows) == sum(len(b) for b in triangle_sweep)
    assert {int(r["branch"]) for r in rows} == set(range(len(triangle_sweep)))
    assert all(r["evidence"] == "float" for r in rows)
    for r in rows:
        p = [float(r[f"p{i}"]) for i in range(7)]
        assert abs(sum(p) - 1) < 1e-9


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize("V, message", [
    ([[0, 1], [2, 0]], "not symmetric at (0, 1)"),
    ([[0, 1], [1]], "row 1 has 1 entries, expected 2"),
    ([], "empty"),
    ([[0, "a"], ["a", 0]], "entry (0, 1)"),
])
def test_bad_matrix(V, message):
    with pytest.raises(E.EnergyError) as err:
        E.uniform_is_critical(V)
    assert message in str(err.value)


def test_bad_temperature_and_suffix(tmp_path):
    with pytest.raises(E.EnergyError, match="must be a finite positive number"):
        E.critical_points([[1]], 0)
    with pytest.raises(E.EnergyError, match="suffix must be .png or .svg"):
        E.bifurcation_diagram([], tmp_path / "x.pdf")
    with pytest.raises(E.EnergyError, match="exceed max_size"):
        E.minimisers_at_zero_temperature([[1] * 3] * 3, max_size=2)

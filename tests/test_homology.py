"""Integer homology by discrete Morse reduction, checked against published values, the
Kuenneth formulas, gudhi (an independent library, Z/2 and Z/3 coefficients) and sympy's
Smith normal form run without python-flint."""

from __future__ import annotations

import json
import os
import random
import subprocess
import sys
from math import gcd

import pytest

from tests.conftest import random_complexes
from verifier import exact
from verifier.complex import Complex
from verifier.exact import ExactError
from verifier.families import catalog
from verifier.invariants import (betti, boundary_matrix, format_homology, homology,
                                 homology_witness, morse_reduction, torsion)
from verifier.operations import join, product, refine


def groups(name: str):
    """The integer homology recorded in the catalog for a name, in homology()'s shape."""
    e = catalog.entry(name)
    return tuple((b, tuple(t)) for b, t in zip(e["betti_Q"], e["torsion"]))


# ----------------------------------------------------------------- published values
def test_real_projective_plane_has_H1_equal_to_Z_mod_2():
    # H_*(RP^2; Z) = Z, Z/2, 0: Hatcher, Algebraic Topology (2002), Example 2.42; the
    # six-vertex triangulation (hemi-icosahedron) is the catalog's, source in its record
    assert homology(catalog.complex("projective-plane-6")) == ((1, ()), (0, (2,)), (0, ()))


def test_klein_bottle_has_H1_equal_to_Z_plus_Z_mod_2():
    # H_1(Klein bottle; Z) = Z + Z/2, H_2 = 0: Hatcher (2002), Example 2.37 (cellular);
    # 8-vertex triangulation of Cervone, Geom. Dedicata 50 (1994) (catalog record)
    assert homology(catalog.complex("klein-bottle-8")) == ((1, ()), (1, (2,)), (0, ()))


@pytest.mark.parametrize("p, q", [(2, 1), (3, 1), (5, 1), (5, 2), (7, 2), (8, 3)])
def test_lens_spaces_have_H1_equal_to_Z_mod_p(p, q):
    # H_*(L(p, q); Z) = Z, Z/p, 0, Z: Hatcher (2002), Example 2.43
    K = catalog.complex(f"lens-{p}-{q}")
    assert homology(K) == ((1, ()), (0, (p,)), (0, ()), (1, ()))


def test_poincare_homology_sphere_has_the_homology_of_the_3_sphere():
    # the 16-vertex Poincare homology sphere: Bjoerner and Lutz, Exp. Math. 9 (2000)
    # 275-289; H_* = Z, 0, 0, Z (a homology sphere; pi_1 is the binary icosahedral group)
    assert homology(catalog.complex("poincare-sphere-16")) == \
        ((1, ()), (0, ()), (0, ()), (1, ()))


def test_complex_projective_plane_has_homology_Z_0_Z_0_Z():
    # CP^2: H_* = Z, 0, Z, 0, Z (Hatcher 2002, Example 2.40 / cellular homology); the
    # 9-vertex triangulation of Kuehnel and Banchoff, Math. Intelligencer 5 (1983)
    assert homology(catalog.complex("complex-projective-plane-9")) == \
        ((1, ()), (0, ()), (1, ()), (0, ()), (1, ()))


def test_real_projective_3_space_matches_the_issue_example():
    # RP^3: Z, Z/2, 0, Z (Hatcher 2002, Example 2.42); Walkup's 11-vertex triangulation
    assert homology(catalog.complex("projective-space-3-11")) == \
        ((1, ()), (0, (2,)), (0, ()), (1, ()))


def test_every_catalog_entry_matches_its_recorded_homology():
    # each record names its published source (verifier/families/data/triangulations.json;
    # constructed series: the formulas of verifier/families/constructions.py with sources)
    for name in catalog.names():
        assert homology(catalog.complex(name)) == groups(name), name


def test_surfaces_of_higher_genus():
    # orientable genus g: Z, Z^2g, Z; non-orientable genus g: Z, Z^(g-1) + Z/2, 0
    # (classification of surfaces; Hatcher 2002, Example 2.36 and 2.37)
    for g in (1, 2, 3):
        assert homology(catalog.complex(f"surface-orientable-{g}")) == \
            ((1, ()), (2 * g, ()), (1, ()))
        assert homology(catalog.complex(f"surface-nonorientable-{g}")) == \
            ((1, ()), (g - 1, (2,)), (0, ()))


# ------------------------------------------------------------- refinement invariance
@pytest.mark.parametrize("name", ["projective-plane-6", "klein-bottle-8", "lens-5-2",
                                  "dunce-hat-8", "projective-space-3-11"])
def test_homology_is_invariant_under_barycentric_refinement(name):
    # |sd K| is homeomorphic to |K| (Munkres 1984, §15), so the homology agrees
    K = catalog.complex(name)
    assert homology(refine(K, 1)) == homology(K)
    if len(K.simplices) < 200:
        assert homology(refine(K, 2)) == homology(K)


# ----------------------------------------------------------------------- Kuenneth
def _normal(free: int, cyclic: list[int]) -> tuple[int, tuple[int, ...]]:
    """A finitely generated abelian group Z^free + sum Z/c, in invariant factor form
    (primary decomposition, then the largest prime powers combined first)."""
    powers: dict[int, list[int]] = {}
    for c in cyclic:
        n, p = c, 2
        while n > 1:
            if n % p == 0:
                q = 1
                while n % p == 0:
                    n //= p
                    q *= p
                powers.setdefault(p, []).append(q)
            p += 1
    factors = []
    for p in powers:
        powers[p].sort(reverse=True)
    length = max((len(v) for v in powers.values()), default=0)
    for i in range(length):
        d = 1
        for v in powers.values():
            if i < len(v):
                d *= v[i]
        factors.append(d)
    return free, tuple(sorted(factors))


def _tensor(a, b):
    (fa, ta), (fb, tb) = a, b
    return fa * fb, [*(t for t in ta for _ in range(fb)), *(t for t in tb for _ in range(fa)),
                     *(gcd(s, t) for s in ta for t in tb)]


def _tor(a, b):
    return 0, [gcd(s, t) for s in a[1] for t in b[1]]


def _add(groups_list):
    return sum(g[0] for g in groups_list), [c for g in groups_list for c in g[1]]


def kuenneth_product(HA, HB):
    """H_n(A x B) = sum_{i+j=n} H_i A (x) H_j B  +  sum_{i+j=n-1} Tor(H_i A, H_j B)
    (Hatcher 2002, Theorem 3B.6)."""
    top = len(HA) + len(HB) - 2
    result = []
    for n in range(top + 1):
        parts = [_tensor(HA[i], HB[n - i]) for i in range(len(HA)) if 0 <= n - i < len(HB)]
        parts += [_tor(HA[i], HB[n - 1 - i]) for i in range(len(HA)) if 0 <= n - 1 - i < len(HB)]
        result.append(_normal(*_add(parts)))
    return tuple(result)


def _reduced(H):
    return ((H[0][0] - 1, H[0][1]),) + tuple(H[1:])


def kuenneth_join(HA, HB):
    """Reduced homology of a join: H~_(n+1)(A * B) = sum_{i+j=n} H~_i A (x) H~_j B +
    sum_{i+j=n-1} Tor(H~_i A, H~_j B) (J. Milnor, Ann. of Math. 63 (1956) 430-436,
    Lemma 2.1; A * B is the suspension of the smash product, from memory)."""
    RA, RB = _reduced(HA), _reduced(HB)
    top = len(HA) + len(HB) - 1
    reduced = [(0, [])]
    for n in range(top):
        parts = [_tensor(RA[i], RB[n - i]) for i in range(len(RA)) if 0 <= n - i < len(RB)]
        parts += [_tor(RA[i], RB[n - 1 - i]) for i in range(len(RA)) if 0 <= n - 1 - i < len(RB)]
        reduced.append(_add(parts))
    result = [_normal(*g) for g in reduced]
    return ((result[0][0] + 1, result[0][1]),) + tuple(result[1:])


@pytest.mark.parametrize("a, b", [("projective-plane-6", "sphere-1"),
                                  ("projective-plane-6", "projective-plane-6"),
                                  ("klein-bottle-8", "sphere-1"),
                                  ("moebius-strip-5", "projective-plane-6")])
def test_products_satisfy_the_kuenneth_formula(a, b):
    # Hatcher (2002), Theorem 3B.6 (the Tor term makes RP^2 x RP^2 have H_3 = Z/2)
    A, B = catalog.complex(a), catalog.complex(b)
    assert homology(product(A, B)) == kuenneth_product(homology(A), homology(B))


@pytest.mark.parametrize("a, b", [("projective-plane-6", "projective-plane-6"),
                                  ("projective-plane-6", "sphere-1"),
                                  ("klein-bottle-8", "ball-1"),
                                  ("lens-3-1", "projective-plane-6")])
def test_joins_satisfy_the_kuenneth_formula(a, b):
    # Milnor (1956), Lemma 2.1; RP^2 * RP^2 has H~_4 = Z/2 from Tor(Z/2, Z/2) in degree 1+1
    A, B = catalog.complex(a), catalog.complex(b)
    assert homology(join(A, B)) == kuenneth_join(homology(A), homology(B))


def test_kuenneth_helpers_on_a_hand_example():
    # common practice, no source: RP^2 x RP^2 has H = Z, Z/2^2, Z/2, Z/2, 0 (Hatcher 3B.6
    # worked by hand: H_2 = Z/2 (x) Z/2, H_3 = Tor(Z/2, Z/2))
    HR = ((1, ()), (0, (2,)), (0, ()))
    assert kuenneth_product(HR, HR) == ((1, ()), (0, (2, 2)), (0, (2,)), (0, (2,)), (0, ()))


# ------------------------------------------------------------ gudhi over Z/2, Z/3
def _gudhi_betti(K: Complex, p: int) -> tuple[int, ...]:
    gudhi = pytest.importorskip("gudhi")
    tree = gudhi.SimplexTree()
    for facet in K.facets:
        tree.insert(list(facet))
    tree.compute_persistence(homology_coeff_field=p, persistence_dim_max=True)
    numbers = list(tree.betti_numbers())
    return tuple(numbers + [0] * (K.dim + 1 - len(numbers)))[:K.dim + 1]


def _random_big(rng: random.Random) -> Complex:
    """A random complex of a few thousand to tens of thousands of simplices: random facets
    on a few dozen vertices, sometimes refined (refinement keeps the homology)."""
    n = rng.randint(12, 40)
    facets = [rng.sample(range(n), rng.randint(2, 5)) for _ in range(rng.randint(20, 120))]
    K = Complex.from_facets(facets)
    while len(K.simplices) < 10_000 and rng.random() < 0.8:
        K = refine(K)
    return K


def test_betti_numbers_over_Z2_and_Z3_agree_with_gudhi_on_random_complexes():
    # gudhi (C++ persistence over Z/p) as an independent reference; 200 small random
    # complexes and 12 of 10^4 simplices or more
    small = random_complexes(200, seed=91, max_vertices=9, max_dim=4, max_facets=9)
    rng = random.Random(5)
    big = []
    while len(big) < 12:
        K = _random_big(rng)
        if len(K.simplices) >= 10_000:
            big.append(K)
    for K in small + big:
        for p in (2, 3):
            assert betti(K, p=p) == _gudhi_betti(K, p), (K, p)


def test_betti_over_Q_agrees_with_exact_ranks_of_boundary_matrices():
    # b_k = f_k - rank d_k - rank d_(k+1) (Munkres 1984, §7), ranks by python-flint
    for K in random_complexes(150, seed=17, max_vertices=8, max_dim=4, max_facets=7):
        f = K.f_vector
        ranks = [0] + [exact.rank(boundary_matrix(K, j)) for j in range(1, len(f))] + [0]
        assert betti(K) == tuple(f[j] - ranks[j] - ranks[j + 1] for j in range(len(f)))


# ------------------------------------------------------ sympy, without python-flint
_SYMPY_SNF = r"""
import json, sys
from sympy import Matrix, ZZ
from sympy.matrices.normalforms import smith_normal_form
out = []
for rows in json.load(sys.stdin):
    if not rows or not rows[0]:
        out.append([]); continue
    S = smith_normal_form(Matrix(rows), domain=ZZ)
    out.append([abs(int(S[i, i])) for i in range(min(S.shape)) if S[i, i] != 0])
assert "flint" not in sys.modules
print(json.dumps(out))
"""


def test_torsion_agrees_with_sympy_smith_normal_form_run_without_flint():
    # sympy (python ground types, flint never loaded) as an independent reference: the
    # torsion of H_(k-1) is the invariant factors > 1 of the boundary matrix d_k
    # (Munkres 1984, §11)
    complexes = [catalog.complex("projective-plane-6"), catalog.complex("moebius-strip-5"),
                 catalog.complex("dunce-hat-8")]
    complexes += random_complexes(30, seed=3, max_vertices=7, max_dim=3, max_facets=6)
    matrices, where = [], []
    for K in complexes:
        for k in range(1, K.dim + 1):
            matrices.append(boundary_matrix(K, k).rows())
            where.append((K, k))
    env = dict(os.environ, SYMPY_GROUND_TYPES="python")
    done = subprocess.run([sys.executable, "-c", _SYMPY_SNF], input=json.dumps(matrices),
                          capture_output=True, text=True, env=env, timeout=300, check=True)
    for (K, k), factors in zip(where, json.loads(done.stdout)):
        assert torsion(K, k - 1) == tuple(sorted(d for d in factors if d > 1)), (K, k)


# ------------------------------------------------------------ the Morse reduction
def test_the_morse_complex_is_a_chain_complex_with_the_right_euler_characteristic():
    # Forman (1998): the Morse complex is chain equivalent to the simplicial one, so
    # D_(k-1) D_k = 0 and sum (-1)^k c_k = chi (common practice, no source)
    for K in random_complexes(60, seed=23, max_vertices=9, max_dim=4, max_facets=8) + \
            [refine(catalog.complex("projective-space-3-11"))]:
        R = morse_reduction(K)
        critical = [R.critical_of_dim(k) for k in range(K.dim + 1)]
        assert sum((-1) ** k * len(c) for k, c in enumerate(critical)) == sum(
            (-1) ** k * f for k, f in enumerate(K.f_vector))
        for k in range(2, K.dim + 1):
            D, E = R.boundaries.get(k - 1, {}), R.boundaries.get(k, {})
            square: dict = {}
            for (i, m), u in D.items():
                for (m2, j), v in E.items():
                    if m == m2:
                        square[(i, j)] = square.get((i, j), 0) + u * v
            assert not any(square.values())


def test_a_closed_manifold_reduces_to_few_critical_cells():
    # perfect Morse functions exist on the 3-sphere (common practice, no source): the
    # coreduction of refined S^3 leaves one vertex and one tetrahedron
    K = refine(catalog.complex("sphere-3"), 2)
    assert [len(morse_reduction(K).critical_of_dim(k)) for k in range(4)] == [1, 0, 0, 1]


def test_the_witness_describes_the_reduction():
    # common practice, no source: pairs and critical cells partition the simplices
    K = catalog.complex("projective-plane-6")
    w = homology_witness(K)
    assert sorted(w["pairs"] + w["critical"]) == list(range(len(K.simplices)))
    assert w["homology"] == [[1, []], [0, [2]], [0, []]]
    json.dumps(w)


def test_format_homology_writes_groups_as_mathematicians_do():
    # common practice, no source
    assert format_homology(homology(catalog.complex("klein-bottle-8"))) == \
        ["H_0 = Z", "H_1 = Z + Z/2", "H_2 = 0"]


# -------------------------------------------------------------------- bad input
def test_p_must_be_zero_or_a_prime():
    K = catalog.complex("projective-plane-6")
    with pytest.raises(ExactError, match="p must be 0 .* or a prime, got 4"):
        betti(K, p=4)
    with pytest.raises(ExactError, match="got -3"):
        betti(K, 1, p=-3)
    # a large prime is fine: over Z/(2^127 - 1) RP^2 has the rational Betti numbers
    assert betti(K, p=2 ** 127 - 1) == (1, 0, 0)


def test_torsion_needs_an_integer_degree():
    with pytest.raises(ExactError, match="torsion needs an integer degree k"):
        torsion(catalog.complex("projective-plane-6"), "1")


# ------------------------------------------------------------ in the claim language
def _language(statement: str, K: Complex):
    from verifier.claims.evaluate import Context, evaluate
    from verifier.claims.expression import parse

    return evaluate(parse(statement, {"K": "complex"}), {"K": K}, Context())


def test_homology_and_torsion_in_the_claim_language():
    # Hatcher (2002), Example 2.42: H_1(RP^3) = Z/2; Example 2.43: H_1(L(5, 2)) = Z/5
    assert _language("homology(K)", catalog.complex("projective-space-3-11")) == \
        ((1, ()), (0, (2,)), (0, ()), (1, ()))
    assert _language("torsion(K, 1)", catalog.complex("lens-5-2")) == (5,)
    assert _language("betti(K, 1, 5)", catalog.complex("lens-5-2")) == 1   # Z/5 (x) Z/5
    assert _language("homology(K)[1][1] == torsion(K, 1)", catalog.complex("lens-5-2"))


def test_a_non_complex_argument_is_refused_when_the_statement_is_checked():
    from verifier.claims.errors import ClaimError
    from verifier.claims.expression import parse

    with pytest.raises(ClaimError, match="homology"):
        parse("homology(connection(K)) == 1", {"K": "complex"})
    with pytest.raises(ClaimError, match="torsion"):
        parse("torsion(K) == 1", {"K": "complex"})


def test_a_prime_is_required_for_betti_over_Z_mod_p_in_the_claim_language():
    from verifier.claims.errors import EvaluationError

    with pytest.raises(EvaluationError, match="betti over Z/p needs a prime p, got 6"):
        _language("betti(K, 1, 6)", catalog.complex("torus-7"))


def test_a_complex_too_large_for_memory_is_refused_before_it_is_built():
    # the size is predicted from the f-vector (verifier.sizes), so this answers at once
    import time

    from verifier.claims.errors import EvaluationError

    start = time.perf_counter()
    with pytest.raises(EvaluationError, match=r"refine: the result would have "
                                              r"[0-9,]+ simplices, more than the limit"):
        _language("homology(refine(refine(K, 4), 4))", catalog.complex("torus-7"))
    with pytest.raises(EvaluationError, match="product: the result would have"):
        _language("homology(product(product(K, K), K))", catalog.complex("torus-7"))
    with pytest.raises(EvaluationError, match="join: the result would have"):
        _language("homology(join(join(refine(K, 3), K), refine(K, 2)))",
                  catalog.complex("torus-7"))
    assert time.perf_counter() - start < 10


def test_predicted_sizes_are_the_sizes_of_the_constructions():
    # f(sd K) = sum_i f_i (j+1)! S(i+1, j+1): Brenti and Welker, Math. Z. 259 (2008);
    # checked here against the constructions themselves
    from verifier import sizes

    for name in ["torus-7", "projective-plane-6", "sphere-3", "dunce-hat-8"]:
        K = catalog.complex(name)
        for times in (1, 2):
            assert sizes.refined_f_vector(K.f_vector, times) == refine(K, times).f_vector
        for other in ["sphere-1", "moebius-strip-5", "ball-2"]:
            H = catalog.complex(other)
            assert sizes.product_size(K.f_vector, H.f_vector) == len(product(K, H).simplices)
            assert sizes.join_size(len(K.simplices), len(H.simplices)) == \
                len(join(K, H).simplices)


def test_show_prints_integer_homology_as_mathematicians_write_it(capsys):
    # Klein bottle: H_1 = Z + Z/2 (Hatcher 2002, Example 2.37); RP^3: H_1 = Z/2, H_3 = Z
    # (Example 2.42)
    from verifier.cli import main

    assert main(["show", "klein-bottle-8", "projective-space-3-11"]) == 0
    out = capsys.readouterr().out
    assert "H_0 = Z,  H_1 = Z + Z/2,  H_2 = 0" in out
    assert "H_0 = Z,  H_1 = Z/2,  H_2 = 0,  H_3 = Z" in out


def test_the_exact_python_flow_agrees_with_the_compiled_flow():
    # the big-integer fallback (used when a coefficient would leave int64) must give the
    # same Morse boundary as the compiled kernel (common practice, no source)
    import numpy as np

    from verifier.exact.morse import _flow_exact

    for K in random_complexes(40, seed=8, max_vertices=9, max_dim=4, max_facets=8) + \
            [catalog.complex("projective-space-3-11"), catalog.complex("dunce-hat-8")]:
        R = morse_reduction(K)
        n = len(K.simplices)
        counts = np.where(R.dims > 0, R.dims + 1, 0)
        face_ptr = np.concatenate([[0], np.cumsum(counts)])
        face_idx = np.concatenate([K.face_positions(k).ravel() for k in range(1, K.dim + 1)]
                                  or [np.zeros(0, dtype=np.int64)])
        face_sgn = np.concatenate([np.tile(1 - 2 * (np.arange(k + 1) % 2), K.f_vector[k])
                                   for k in range(1, K.dim + 1)] or [np.zeros(0, dtype=np.int64)])
        critical_index = np.full(n, -1)
        for k in range(K.dim + 1):
            cells = R.critical_of_dim(k)
            critical_index[cells] = np.arange(len(cells))
        for k, entries in R.boundaries.items():
            for j, cell in enumerate(R.critical_of_dim(k)):
                exact_column = _flow_exact(cell, face_ptr, face_idx, face_sgn, R.mate, R.time,
                                           R.dims, critical_index)
                compiled = {i: v for (i, jj), v in entries.items() if jj == j}
                assert exact_column == compiled


# ---------------------------------------------------------------- h-vector, spheres
def test_h_vectors_of_spheres_satisfy_dehn_sommerville():
    # h_k = h_(d-k) for simplicial spheres, and sum h_k = f_(d-1) for pure complexes
    # (R. P. Stanley, Combinatorics and Commutative Algebra (1996), II.6; G. M. Ziegler,
    # Lectures on Polytopes (1995), Theorem 8.21)
    from verifier.invariants import h_vector

    for name in ["sphere-1", "sphere-2", "sphere-3", "cross-polytope-boundary-3",
                 "cross-polytope-boundary-4", "poincare-sphere-16"]:
        for K in (catalog.complex(name), refine(catalog.complex(name))):
            h = h_vector(K)
            assert h == h[::-1], (name, h)
            assert sum(h) == K.f_vector[-1]
    # not a sphere: the 7-vertex torus, f = (7, 21, 14), h = (1, 4, 10, -1) (hand computation)
    assert h_vector(catalog.complex("torus-7")) == (1, 4, 10, -1)


def test_sphere_and_ball_tests_in_the_claim_language():
    # the boundary of the 4-simplex is a 3-sphere, the 3-simplex a 3-ball, the
    # projective plane neither (Munkres 1984, §35; common practice)
    assert _language("is_sphere(K)", catalog.complex("simplex-boundary-4"))
    assert _language("is_ball(K)", Complex.from_facets([[1, 2, 3, 4]]))
    assert not _language("is_sphere(K) or is_ball(K)", catalog.complex("projective-plane-6"))
    assert _language("h_vector(K) == [1, 1, 1, 1, 1]", catalog.complex("simplex-boundary-4"))

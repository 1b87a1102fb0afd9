"""Checks of the large-complex paths (issue 10, "the rest must keep up at that size").

Every vectorised or compiled path is compared with an independent reference on inputs
that force it: the plain-Python definition it replaces (run on the same input, with the
size thresholds lowered), gudhi's SimplexTree for f-vectors, numpy's symmetric eigenvalue
routine for signatures, python-flint's exact inverse for Green functions, and published
formulas (Brenti-Welker f-vectors of refinements, the energy and Wu theorems).  Timings
are not tested (bench/run.py measures them); the slow tests check correctness at 10^6
simplices.
"""

from __future__ import annotations

import importlib
import itertools
import random
from math import comb, factorial

import numpy as np
import pytest

import verifier.complex as complex_module
from verifier import invariants as inv
from verifier import operations as ops
from verifier.complex import Complex, ComplexError
from verifier.exact import Matrix, linalg
from verifier.exact.linalg import (congruence_holds, gram_support_congruence_holds,
                                   inverse_by_congruence)
from verifier.families import catalog
from verifier.invariants import manifolds

from .conftest import random_complexes

# the module, not the function of the same name that verifier.invariants re-exports
connection_module = importlib.import_module("verifier.invariants.connection")


def stirling2(n: int, k: int) -> int:
    """Stirling numbers of the second kind, by the explicit formula (OEIS A008277)."""
    return sum((-1) ** j * comb(k, j) * (k - j) ** n for j in range(k + 1)) // factorial(k)


def plain_closure(facets) -> set[tuple]:
    """The definition of the generated complex: every non-empty subset of a given set
    (J. R. Munkres, Elements of Algebraic Topology, 1984, §2-3), in the user's labels."""
    return {tuple(sorted(c)) for f in facets for k in range(1, len(f) + 1)
            for c in itertools.combinations(f, k)}


@pytest.fixture
def vectorised(monkeypatch):
    """Send every input, however small, through the large-input paths."""
    monkeypatch.setattr(complex_module, "SMALL_INPUT", 0)
    monkeypatch.setattr(ops, "SMALL_INPUT", 0)
    monkeypatch.setattr(manifolds, "SMALL_COLLAPSE", 0)
    monkeypatch.setattr(linalg, "CONGRUENCE_MIN", 0)
    monkeypatch.setattr(connection_module, "LITERAL_CHECK_MAX", 0)


# ----------------------------------------------------------------- building
def test_vectorised_closure_is_the_generated_complex(vectorised):
    # Definition: all non-empty subsets of the given sets (Munkres §2-3); labels of
    # mixed kinds go through the general label order, integers through numpy.
    rng = random.Random(101)
    for trial in range(60):
        n = rng.randint(1, 30)
        facets = [rng.sample(range(n), rng.randint(0, min(n, 6)))
                  for _ in range(rng.randint(1, 40))]
        if trial % 3 == 1:
            facets = [[f"v{x}" for x in f] for f in facets]
        if trial % 3 == 2:
            facets = [[(x % 2, x) for x in f] for f in facets]
        K = Complex.from_facets(facets)
        assert {K.label_of(s) for s in K.simplices} == plain_closure(facets)
        assert list(K.simplices) == sorted(K.simplices, key=lambda s: (len(s), s))
        for k in range(K.dim + 1):     # the arrays kept are the simplices of each dimension
            assert K.simplex_array(k).tolist() == [list(s) for s in K.simplices if len(s) == k + 1]


def test_vectorised_closure_reports_repeated_vertices_at_their_position(vectorised):
    with pytest.raises(ComplexError, match=r"^facet 2: repeated vertex in \[4, 5, 4\]$"):
        Complex.from_facets([[1, 2], [], [4, 5, 4], [7, 7]])
    with pytest.raises(ComplexError, match=r"^facet 1: repeated vertex in \[3, 3\]$"):
        Complex.from_facets([[1, 2], [3, 3], 7])


def test_large_complex_f_vector_against_gudhi():
    # Independent reference: gudhi's SimplexTree inserts every face of the same facets.
    gudhi = pytest.importorskip("gudhi")
    K = ops.refine(catalog.complex("poincare-sphere-16"), 1)
    facets = [list(K.label_of(f)) for f in K.facets]
    H = Complex.from_facets(facets)
    tree = gudhi.SimplexTree()
    for f in facets:
        tree.insert(f)
    assert H == K
    assert list(H.f_vector) == list(tree.num_simplices_by_dimension())


def test_refinement_f_vectors_follow_brenti_welker():
    # f_k(K') = sum_{i >= k} (k+1)! S(i+1, k+1) f_i(K): F. Brenti and V. Welker, Math. Z.
    # 259 (2008) 849-865.
    for name in ["torus-7", "projective-plane-6", "poincare-sphere-16", "lens-3-1"]:
        K = catalog.complex(name)
        R = ops.refine(K)
        expected = tuple(sum(factorial(k + 1) * stirling2(i + 1, k + 1) * f
                             for i, f in enumerate(K.f_vector) if i >= k)
                         for k in range(K.dim + 1))
        assert R.f_vector == expected, name


def test_refinement_simplices_are_the_chains_of_the_face_poset():
    # Definition of the order complex (Munkres §15): the chains x0 < x1 < ... of faces.
    for K in random_complexes(40, seed=7, max_vertices=6, max_dim=3):
        R = ops.refine(K)
        faces = [set(s) for s in K.simplices]
        chains = {tuple(c) for k in range(1, K.dim + 2)
                  for c in itertools.combinations(range(len(faces)), k)
                  if all(faces[a] < faces[b] for a, b in zip(c, c[1:]))}
        assert set(R.simplices) == chains and R.labels == tuple(range(len(faces)))


def test_facets_and_vertex_stars_of_a_large_complex(vectorised):
    # Definitions: a facet is contained in no other simplex; the star of v is every
    # simplex containing v (common practice, no source).
    for K in random_complexes(25, seed=8, max_vertices=8, max_dim=3, max_facets=8):
        simplices = set(K.simplices)
        assert set(K.facets) == {s for s in simplices
                                 if not any(set(s) < set(t) for t in simplices)}
        for v in range(K.n_vertices):
            assert K.vertex_stars()[v] == tuple(j for j, s in enumerate(K.simplices) if v in s)


def test_colour_refinement_hash_survives_relabelling_of_a_large_complex():
    # An isomorphism invariant is unchanged by relabelling (common practice, no source);
    # the f-vector is hashed in, so complexes with different f-vectors differ.
    K = ops.refine(catalog.complex("torus-7"), 2)
    rng = random.Random(5)
    image = list(range(K.n_vertices))
    rng.shuffle(image)
    H = Complex.from_facets([[image[v] for v in f] for f in K.facets])
    assert not K.hash_is_canonical
    assert H.content_hash == K.content_hash
    assert ops.refine(catalog.complex("projective-plane-6"), 2).content_hash != K.content_hash


def test_links_in_a_large_complex_match_the_small_path(monkeypatch):
    # Lk(x) = {z - x : z in St(x), z != x} (Munkres §2), computed once through the
    # binary-search path and once through the index dict.
    K = ops.refine(catalog.complex("projective-plane-6"), 2)
    chosen = [K.simplices[j] for j in range(0, len(K.simplices), 97)]
    large = [ops.link(K, x) for x in chosen]
    monkeypatch.setattr(ops, "SMALL_INPUT", 10 ** 9)
    assert large == [ops.link(K, x) for x in chosen]
    monkeypatch.setattr(ops, "SMALL_INPUT", 0)
    # vertices 0 and 1 of K'' stand for two vertices of K': neither contains the other
    with pytest.raises(ops.OperationError, match=r"^\(0, 1\) is not a simplex of the complex"):
        ops.link(K, (0, 1))


# ------------------------------------------------------------------ counting
def test_wu_characteristic_is_the_sum_over_intersecting_pairs():
    # Definition [Wu]: sum of omega(x) omega(y) over ordered pairs of intersecting
    # simplices (W. Wu, Colloq. Math. 7 (1959)); brute force over all pairs.
    for K in random_complexes(40, seed=9, max_vertices=7, max_dim=3):
        sets = [set(s) for s in K.simplices]
        omega = [(-1) ** (len(s) - 1) for s in sets]
        brute = sum(omega[i] * omega[j] for i in range(len(sets)) for j in range(len(sets))
                    if sets[i] & sets[j])
        assert inv.wu(K) == brute


# ------------------------------------------------------------- congruences
def containment(K: Complex) -> Matrix:
    n = len(K.simplices)
    faces, cofaces = K.containments()
    return Matrix.from_entries((n, n), faces, cofaces, np.ones(len(faces), dtype=np.int64))


def omega(K: Complex) -> np.ndarray:
    return np.array([(-1) ** (len(s) - 1) for s in K.simplices], dtype=np.int64)


def test_congruence_check_accepts_the_connection_factorisation_and_nothing_else():
    # L = Z^T diag(omega) Z (O. Knill, "On Fredholm determinants in topology",
    # arXiv:1612.08229): accepted; any change of L, of Z or of the signs is rejected.
    K = ops.refine(catalog.complex("projective-plane-6"))
    L, Z, w = inv.connection(K), containment(K), omega(K)
    assert congruence_holds(L, Z, w)
    assert gram_support_congruence_holds(connection_module._vertex_incidence(K), Z, w)
    flipped = w.copy()
    flipped[17] = -flipped[17]
    assert not congruence_holds(L, Z, flipped)
    assert not gram_support_congruence_holds(connection_module._vertex_incidence(K), Z, flipped)
    rows = L.rows()
    rows[3][40] = rows[40][3] = 1 - rows[3][40]
    assert not congruence_holds(Matrix.from_rows(rows), Z, w)
    lower = Z.T                                       # not upper unitriangular
    assert not congruence_holds(L, lower, w)
    doubled = Z.rows()
    doubled[5][5] = 2                                 # diagonal entry not 1
    assert not congruence_holds(L, Matrix.from_rows(doubled), w)


def test_signature_from_a_verified_congruence_matches_eigenvalues(vectorised):
    # Sylvester's law of inertia (Phil. Mag. 4 (1852)): M = Z^T D Z with Z unitriangular
    # has the inertia of D.  Independent reference: numpy.linalg.eigvalsh on small
    # random examples, with zeros on the diagonal of D too.
    rng = np.random.default_rng(3)
    for _ in range(30):
        n = int(rng.integers(2, 12))
        Z = np.triu(rng.integers(-2, 3, size=(n, n)), 1) + np.eye(n, dtype=np.int64)
        d = rng.integers(-1, 2, size=n)
        M = Z.T @ np.diag(d) @ Z
        eigenvalues = np.linalg.eigvalsh(M.astype(float))
        tolerance = 1e-8 * max(1.0, float(np.abs(eigenvalues).max()))
        expected = (int((eigenvalues > tolerance).sum()), int((eigenvalues < -tolerance).sum()),
                    int((np.abs(eigenvalues) <= tolerance).sum()))
        matrix = Matrix.from_array(M).with_congruence((Matrix.from_array(Z), d))
        assert inv.signature(matrix) == expected
        assert inv.det(matrix) == round(np.linalg.det(M.astype(float)))


def test_a_false_congruence_falls_back_to_the_general_method(vectorised):
    # A matrix carrying a wrong factorisation still gets its true signature (Descartes'
    # rule on the exact characteristic polynomial; reference numpy eigvalsh).
    M = np.array([[2, 1, 0], [1, 2, 1], [0, 1, 2]])
    wrong = Matrix.from_array(M).with_congruence((Matrix.identity(3), [1, -1, 1]))
    assert inv.signature(wrong) == (3, 0, 0)
    assert inv.det(wrong) == 4


def test_signature_of_large_connection_matrices_counts_parities():
    # [HE] O. Knill, arXiv:1711.09527: L has f_even positive and f_odd negative
    # eigenvalues; at these orders the verified congruence decides.
    for K in [ops.refine(catalog.complex("torus-7"), 3), ops.refine(catalog.complex("lens-2-1"))]:
        assert len(K.simplices) >= linalg.CONGRUENCE_MIN
        f = K.f_vector
        assert inv.signature(inv.connection(K)) == (sum(f[0::2]), sum(f[1::2]), 0)
        assert inv.fredholm(K) == (-1) ** sum(f[1::2])        # det L = prod omega [FD]


def test_inverse_by_congruence_needs_a_true_inverse():
    Z = Matrix.from_rows([[1, 1, 0], [0, 1, 1], [0, 0, 1]])
    W = Matrix.from_rows([[1, -1, 1], [0, 1, -1], [0, 0, 1]])
    G = inverse_by_congruence(Z, [1, -1, 1], W)
    L = Z.T @ Matrix.from_rows([[1, 0, 0], [0, -1, 0], [0, 0, 1]]) @ Z
    assert L @ G == Matrix.identity(3)                # the claim, checked as a product
    assert inverse_by_congruence(Z, [1, -1, 1], Matrix.identity(3)) is None
    assert inverse_by_congruence(Z, [1, 0, 1], W) is None      # diag(d)^2 != I


def test_green_from_checked_factors_is_the_exact_inverse(vectorised):
    # Reference: the exact inverse of L (python-flint through green_by_inversion); the
    # energy theorem sum g = chi (O. Knill, Linear Algebra Appl. 600 (2020) 96-129).
    for K in random_complexes(20, seed=12, max_vertices=7, max_dim=3) + [
            catalog.complex("projective-plane-6")]:
        g = inv.green(K)
        assert g.provenance == "star formula, verified L*g = I exactly"
        assert g == inv.green_by_inversion(K)
        assert g.total() == inv.euler(K)


# ------------------------------------------------------------------ manifolds
def link_by_link(K: Complex, boundary: bool) -> bool:
    """The definition (Munkres §35): pure, and every vertex link a (d-1)-sphere (or
    ball), each link recognised by the small-complex tests one at a time."""
    d = K.dim
    if d < 0 or not K.is_pure():
        return False
    if boundary and d == 0:
        return True
    test = (lambda S: manifolds.is_sphere(S, d - 1) or manifolds.is_ball(S, d - 1)) \
        if boundary else (lambda S: manifolds.is_sphere(S, d - 1))
    return all(test(ops.link(K, (v,))) for v in range(K.n_vertices))


def test_manifold_tests_for_all_vertices_at_once_agree_with_the_definition():
    rng = random.Random(14)
    cases = [catalog.complex(name) for name in
             ["torus-7", "projective-plane-6", "klein-bottle-8", "dunce-hat-8", "ball-3",
              "sphere-3", "cube-ball-8", "rudin-ball-14", "projective-space-3-11"]]
    cases += [ops.cone(K, apex="apex") for K in cases[:4]]   # apex links: closed surfaces
    for _ in range(300):
        n, d = rng.randint(4, 9), rng.randint(1, 3)
        cases.append(Complex.from_facets([rng.sample(range(n), d + 1)
                                          for _ in range(rng.randint(1, 14))]))
    closed = with_boundary = 0
    for K in cases:
        assert inv.is_closed_manifold(K) == link_by_link(K, boundary=False), K
        assert inv.is_manifold(K) == link_by_link(K, boundary=True), K
        closed += inv.is_closed_manifold(K)
        with_boundary += inv.is_manifold_with_boundary(K)
    assert closed >= 20 and with_boundary >= 60, (closed, with_boundary)   # not vacuous


def test_collapse_witness_on_large_complexes(vectorised):
    # A refined 3-sphere is a PL 3-sphere (the boundary of the 4-simplex, subdivided); the
    # Poincare homology sphere is not a sphere (H. Poincare, 1904: nontrivial fundamental
    # group), so no collapse may be found and the question stays undecided.
    S = ops.refine(catalog.complex("sphere-3"), 2)
    assert inv.is_sphere(S) is True
    assert inv.is_ball(ops.cone(ops.refine(catalog.complex("projective-plane-6")),
                                apex="apex")) is False
    P = ops.refine(catalog.complex("poincare-sphere-16"))
    assert manifolds._collapses(P, without=P.facets[0], attempts=2) is False
    B = ops.refine(catalog.complex("ball-3"), 2)            # a collapsible 3-ball
    assert manifolds._collapses(B) is True and inv.is_ball(B)


# --------------------------------------------------------------- 10^6 simplices
@pytest.mark.slow
def test_a_million_simplices_build_and_invariants():
    # refine(torus-7, 6): f-vector against gudhi's SimplexTree on the same facets; chi = 0
    # and wu = chi for a closed surface [GB]; signature of L by parity [HE]; every vertex
    # link a circle.
    gudhi = pytest.importorskip("gudhi")
    K = ops.refine(catalog.complex("torus-7"), 6)
    assert len(K.simplices) >= 10 ** 6
    facets = np.array([list(K.label_of(f)) for f in K.facets], dtype=np.int64)
    H = Complex.from_facets(facets.tolist())
    assert H == K
    tree = gudhi.SimplexTree()
    tree.insert_batch(facets.T, np.zeros(len(facets)))
    assert list(K.f_vector) == list(tree.num_simplices_by_dimension())
    f = K.f_vector
    assert inv.euler(K) == 0 and inv.wu(K) == 0
    assert inv.signature(inv.connection(K)) == (f[0] + f[2], f[1], 0)
    assert inv.is_closed_manifold(K) and not inv.is_manifold_with_boundary(K)


@pytest.mark.slow
def test_green_of_the_refined_poincare_sphere():
    # 226,208 simplices: the energy theorem sum g = chi = 0 (Knill 2020), and the
    # diagonal of the star formula, g(x, x) = chi(St(x)) (Knill 2020 with y = x), summed.
    K = ops.refine(catalog.complex("poincare-sphere-16"), 2)
    g = inv.green(K)
    assert g.provenance == "star formula, verified L*g = I exactly"
    assert g.total() == 0
    faces, cofaces = K.containments()
    w = omega(K)
    star_euler = np.bincount(faces, weights=w[cofaces], minlength=len(K.simplices))
    assert g.trace() == int(star_euler.sum())


def test_poincare_hopf_indices_at_once_follow_the_definition():
    # Definition [PH] (O. Knill, arXiv:1201.1162): i_f(v) = 1 - chi(S^-(v)), S^-(v) the
    # simplices x of the link of v with f < f(v) on x; brute force over all simplices,
    # for random injective f; and sum_v i_f(v) = chi (Poincare-Hopf, same reference).
    rng = random.Random(16)
    for K in random_complexes(60, seed=15, max_vertices=8, max_dim=3):
        f = rng.sample(range(100), K.n_vertices)
        brute = [1 - inv.euler([x for x in K.simplices
                                if all(f[w] < f[v] for w in x)
                                and tuple(sorted(x + (v,))) in K.index])
                 for v in range(K.n_vertices)]
        assert inv.indices(K, f) == brute == [inv.index(K, f, v) for v in range(K.n_vertices)]
        assert sum(brute) == inv.euler(K)


def test_boundary_and_interior_of_large_complexes_follow_the_definition(vectorised):
    # Definition: the boundary of a pure d-complex is generated by the (d-1)-faces lying
    # in exactly one facet; the interior is everything else (common practice, no source;
    # Munkres §35 for manifolds).  Brute force by counting facets around each face.
    rng = random.Random(17)
    for _ in range(60):
        d = rng.randint(1, 3)
        n = rng.randint(d + 1, 9)
        K = Complex.from_facets([rng.sample(range(n), d + 1) for _ in range(rng.randint(1, 12))])
        count = {}
        for f in K.facets:
            for face in itertools.combinations(f, d):
                count[face] = count.get(face, 0) + 1
        free = [face for face, c in count.items() if c == 1]
        expected = plain_closure(K.label_of(face) for face in free)
        B = ops.boundary(K)
        assert {B.label_of(s) for s in B.simplices} == expected
        assert {K.label_of(K.simplices[j]) for j in ops.interior(K)} == \
            {K.label_of(s) for s in K.simplices} - expected
    B = ops.refine(catalog.complex("ball-3"), 2)        # its boundary: a refined 2-sphere
    assert inv.euler(ops.boundary(B)) == 2 and inv.is_sphere(ops.boundary(B))


def test_matrices_with_a_proposed_congruence_still_pickle():
    # Worker processes exchange matrices by pickling; the proposal is dropped on the way
    # (it is only a hint) and the entries survive (common practice, no source).
    import pickle
    L = inv.connection(catalog.complex("torus-7"))
    again = pickle.loads(pickle.dumps(L))
    assert again == L and again.congruence is None and L.congruence is not None


def test_large_connection_matrix_is_the_intersection_pattern():
    # Definition [FD]: L[x, y] = 1 when the simplices x and y intersect.  Brute force over
    # all pairs on a complex past the dense threshold, and the scipy product V V^T
    # (support) as a second reference on a larger one.
    import scipy.sparse as sp

    K = ops.refine(catalog.complex("projective-plane-6"), 2)       # 1,081 simplices
    sets = [set(s) for s in K.simplices]
    assert len(sets) ** 2 > connection_module.DENSE_MAX
    expected = [[int(bool(a & b)) for b in sets] for a in sets]
    assert inv.connection(K).rows() == expected
    H = ops.refine(catalog.complex("lens-2-1"))
    rows, cols = H.vertex_incidence()
    V = sp.csr_array((np.ones(len(rows)), (rows, cols)), shape=(len(H.simplices), H.n_vertices))
    product = (V @ V.T).tocsr()
    L = inv.connection(H).to_scipy()
    assert L.nnz == product.nnz and (L != (product > 0).astype(np.int64)).nnz == 0

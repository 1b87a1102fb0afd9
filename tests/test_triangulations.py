"""The exhaustive families ``surfaces`` and ``spheres`` (verifier/families/surfaces.py)
and their generators (verifier/families/triangulations.py), checked like a referee would.

* Counts per number of vertices (and per topological type) equal the published tables,
  each source named beside its check.
* Two independent generators agree: the 2-spheres found among the closed surfaces by
  the lexicographic search are exactly those found by vertex splitting.
* Every case is what the family promises (``is_closed_manifold``, ``is_sphere``), no two
  cases are isomorphic by an isomorphism test independent of the generators
  (``Complex.content_hash``: individualisation-refinement in verifier/complex.py), and
  canonical ids do not depend on how a case was labelled.
* ``get(id)`` rebuilds what ``shard_cases`` yields; shards are disjoint with the family
  as union; filters agree with ``euler`` and orientability read from homology; bad
  ids, shards and parameters are refused with the messages asserted.

The levels that take more than a few seconds are marked slow.
"""

from __future__ import annotations

import random
from collections import Counter

import pytest

from verifier.complex import Complex
from verifier.families import FamilyError, make_family
from verifier.families.triangulations import (canonical_facets, decode_facets,
                                              encode_facets, manifolds_3)
from verifier.invariants import betti, euler, homology, is_closed_manifold, is_sphere

# OEIS A000109 (triangulations of the sphere with n vertices), looked up: n = 4..12
A000109 = {4: 1, 5: 1, 6: 2, 7: 5, 8: 14, 9: 50, 10: 233, 11: 1249, 12: 7595}


def family(**spec):
    return make_family(spec)


def surface_type(K: Complex) -> tuple[int, bool]:
    """(Euler characteristic, orientable) of a closed connected surface: orientable
    exactly when H_2(K; Z) = Z (common practice: Munkres, Elements of Algebraic
    Topology, §43)."""
    return euler(K), homology(K)[2][0] == 1


def type_name(K: Complex) -> str:
    chi, orientable = surface_type(K)
    return f"S{(2 - chi) // 2}" if orientable else f"N{2 - chi}"


def types_on(n: int) -> Counter:
    return Counter(type_name(K) for _, K in family(family="surfaces", vertices=n))


# ------------------------------------------------------------------ counts
def test_surface_totals_up_to_8_vertices():
    # F. H. Lutz's tables of triangulated surfaces (Sulanke-Lutz 2009, Table 1):
    # 1, 1, 3, 9, 43 surfaces with 4..8 vertices (from memory, not looked up)
    for n, total in {4: 1, 5: 1, 6: 3, 7: 9, 8: 43}.items():
        assert sum(1 for _ in family(family="surfaces", vertices=n)) == total, n
        assert family(family="surfaces", vertices=n).size() == total


def test_surface_types_up_to_8_vertices():
    # Lutz's tables by type (from memory): n = 6: 2 spheres, 1 RP^2; n = 7: 5 spheres,
    # 3 RP^2, 1 torus; n = 8: 14 spheres, 16 RP^2, 7 tori, 6 Klein bottles (S_g orientable
    # of genus g, N_k non-orientable with k cross-caps)
    assert types_on(6) == Counter({"S0": 2, "N1": 1})
    assert types_on(7) == Counter({"S0": 5, "N1": 3, "S1": 1})
    assert types_on(8) == Counter({"S0": 14, "N1": 16, "S1": 7, "N2": 6})


def test_spheres_of_dimension_2_match_A000109():
    # OEIS A000109, n = 4..10
    for n in range(4, 11):
        cases = list(family(family="spheres", dimension=2, vertices=n))
        assert len(cases) == A000109[n], n
    assert family(family="spheres", dimension=2, vertices=[4, 10]).size() == sum(
        A000109[n] for n in range(4, 11))


def test_lexicographic_search_and_vertex_splitting_find_the_same_spheres():
    # two methods, one answer: the 2-spheres among the closed surfaces (lexicographic
    # search, Sulanke-Lutz) are those made by vertex splitting (Steinitz-Rademacher)
    lexicographic = {case.split(":")[1] for case in
                     family(family="surfaces", vertices=[4, 8], euler=2).case_ids()}
    splitting = {case.split(":")[1] for case in
                 family(family="spheres", dimension=2, vertices=[4, 8]).case_ids()}
    assert lexicographic == splitting
    assert len(splitting) == sum(A000109[n] for n in range(4, 9))     # OEIS A000109


def test_3_spheres_up_to_8_vertices():
    # combinatorial 3-spheres with 5, 6, 7, 8 vertices: 1, 2, 5, 39 (Grünbaum-Sreedharan
    # 1967 and Barnette for n = 8; Altshuler-Steinberg 1976; from memory), and every
    # combinatorial 3-manifold with <= 8 vertices is a sphere (same sources)
    for n, total in {5: 1, 6: 2, 7: 5, 8: 39}.items():
        assert sum(1 for _ in family(family="spheres", dimension=3, vertices=n)) == total
        assert sum(len(manifolds_3(n, d)) for d in range(4, n)) == total


# ------------------------------------------------------------------ what the cases are
def test_every_surface_is_a_closed_connected_surface():
    # definition of a closed surface (common practice, no source); is_closed_manifold
    # and betti from verifier.invariants
    for case, K in family(family="surfaces", vertices=[4, 8]):
        assert K.dim == 2 and is_closed_manifold(K) and betti(K)[0] == 1, case


def test_every_sphere_is_a_sphere():
    for case, K in family(family="spheres", dimension=2, vertices=[4, 10]):
        assert K.dim == 2 and is_sphere(K), case
        assert K.f_vector == (K.n_vertices, 3 * K.n_vertices - 6, 2 * K.n_vertices - 4)
    for case, K in family(family="spheres", dimension=3, vertices=[5, 8]):
        assert K.dim == 3 and is_sphere(K), case
        # Dehn-Sommerville for 3-manifolds: f2 = 2 f3, f0 - f1 + f2 - f3 = 0
        f0, f1, f2, f3 = K.f_vector
        assert f2 == 2 * f3 and f0 - f1 + f2 - f3 == 0


@pytest.mark.parametrize("spec", [
    {"family": "surfaces", "vertices": [4, 8]},
    {"family": "spheres", "dimension": 2, "vertices": [4, 10]},
    {"family": "spheres", "dimension": 3, "vertices": [5, 8]},
])
def test_no_two_cases_are_isomorphic(spec):
    # Complex.content_hash: SHA-256 of the individualisation-refinement canonical form of
    # verifier/complex.py (exact for <= 10 vertices), independent of BLISS
    cases = list(make_family(spec))
    assert all(K.hash_is_canonical for _, K in cases)
    hashes = [K.content_hash for _, K in cases]
    assert len(set(hashes)) == len(hashes)


def test_canonical_ids_do_not_depend_on_the_labelling():
    # a canonical form is constant on isomorphism classes (definition)
    rng = random.Random(5)
    for case, K in family(family="surfaces", vertices=[4, 8]):
        n = K.n_vertices
        for _ in range(3):
            image = list(range(n))
            rng.shuffle(image)
            relabelled = [tuple(image[v] for v in f) for f in K.facets]
            rng.shuffle(relabelled)
            assert encode_facets(canonical_facets(n, relabelled)) == case.split(":")[1]


# ------------------------------------------------------------------ ids and shards
@pytest.mark.parametrize("spec", [
    {"family": "surfaces", "vertices": [4, 8]},
    {"family": "surfaces", "vertices": [6, 8], "orientable": False},
    {"family": "spheres", "dimension": 2, "vertices": [4, 10]},
    {"family": "spheres", "dimension": 3, "vertices": [5, 8]},
])
def test_get_rebuilds_every_case_and_shards_partition_the_family(spec):
    fam = make_family(spec)
    shards = fam.shards()
    assert len(set(shards)) == len(shards)
    seen = []
    for shard in shards:
        for case, K in fam.shard_cases(shard):
            assert fam.get(case).content_hash == K.content_hash
            assert fam.get(case).facets == K.facets
            n, d = (int(x) for x in shard.split("/d"))
            degrees = Counter(K.simplex_array(1).ravel().tolist())
            assert K.n_vertices == n and max(degrees.values()) == d, (shard, case)
            seen.append(case)
    assert len(seen) == len(set(seen))                    # disjoint shards
    assert seen == list(fam.case_ids())                   # their union, in order
    assert [case for case, _ in fam] == seen
    if fam.size() is not None:
        assert fam.size() == len(seen)


def test_ids_are_spelled_in_the_compact_code():
    tetrahedron = "spheres/2/4:012013023123"
    assert list(family(family="spheres", dimension=2, vertices=4).case_ids()) == [tetrahedron]
    for case in family(family="spheres", dimension=3, vertices=[5, 8]).case_ids():
        head, code = case.split(":")
        assert head.startswith("spheres/3/") and case.isascii()
        assert not set(case) & set(" &|")
        facets = decode_facets(code, 4)
        assert facets == sorted(facets) and encode_facets(facets) == code


def test_shards_and_sizes_are_planned_without_generating():
    fam = family(family="surfaces", vertices=[8, 9])
    # the shards left out are empty: largest degree >= average degree 2 f1 / n, with
    # f1 >= 3n - 6 for surfaces (Euler) and f1 >= 4n - 10 for 3-manifolds (Walkup 1970)
    assert fam.shards() == [f"8/d{d}" for d in range(5, 8)] + [f"9/d{d}" for d in range(5, 9)]
    assert family(family="surfaces", vertices=[4, 6]).shards() == [
        "4/d3", "5/d4", "6/d4", "6/d5"]
    assert fam.size() == 43 + 655          # Lutz's tables (from memory)
    assert family(family="surfaces", vertices=9, euler=0).size() is None
    assert family(family="spheres", dimension=3, vertices=9).shards() == [
        f"9/d{d}" for d in range(6, 9)]
    assert family(family="spheres", dimension=3, vertices=[5, 7]).shards() == [
        "5/d4", "6/d5", "7/d6"]
    assert family(family="spheres", dimension=3, vertices=[5, 9]).size() == 1 + 2 + 5 + 39 + 1296
    assert family(family="spheres", dimension=2, vertices=12).f_bound() == (12, 30, 20)


# ------------------------------------------------------------------ filters
def test_filters_agree_with_euler_and_homology():
    everything = {case.split(":")[1]: surface_type(K)
                  for case, K in family(family="surfaces", vertices=[4, 8])}
    for chi in (2, 1, 0, -1):
        for orientable in (True, False, None):
            spec = {"family": "surfaces", "vertices": [4, 8], "euler": chi}
            if orientable is not None:
                spec["orientable"] = orientable
            got = {case.split(":")[1] for case in make_family(spec).case_ids()}
            want = {code for code, (c, o) in everything.items()
                    if c == chi and (orientable is None or o == orientable)}
            assert got == want, spec
    orientable = {case.split(":")[1] for case in
                  family(family="surfaces", vertices=[4, 8], orientable=True).case_ids()}
    assert orientable == {code for code, (c, o) in everything.items() if o}


# ------------------------------------------------------------------ refusals
def test_bad_ids_are_refused():
    fam = family(family="surfaces", vertices=[6, 8])
    torus = next(iter(family(family="surfaces", vertices=7, euler=0).case_ids()))
    code = torus.split(":")[1]
    facets = decode_facets(code, 3)
    swapped = sorted(tuple(sorted({0: 6, 6: 0}.get(v, v) for v in f)) for f in facets)
    not_canonical = "surfaces/7:" + encode_facets(swapped)
    assert swapped != facets
    not_a_surface = "surfaces/6:012013023123145"     # a tetrahedron boundary and a flap
    cases = {
        "graphs/G3": "its ids look like 'surfaces/<n>:<facets>'",
        "surfaces/7": "its ids look like 'surfaces/<n>:<facets>'",
        "surfaces/07:" + code: "its ids look like 'surfaces/<n>:<facets>'",
        "surfaces/5:012013023123": "it has the cases on 6 to 8 vertices, this id names 5",
        "surfaces/7:" + code[:-1]: "the facets are written as groups of 3 vertex digits "
                                   "(0-9, a-z)",
        "surfaces/7:" + code[:-3] + "01!": "the facets are written as groups of 3 vertex "
                                          "digits (0-9, a-z)",
        "surfaces/7:" + code[3:] + code[:3]: "the facets must be increasing, listed in "
                                            "increasing order, on the vertices 0..6",
        "surfaces/7:" + code[:-3] + "654": "the facets must be increasing, listed in "
                                          "increasing order, on the vertices 0..6",
        not_a_surface: "not a closed connected surface",
        not_canonical: "not the canonical labelling of its class",
    }
    for case_id, reason in cases.items():
        with pytest.raises(FamilyError) as error:
            fam.get(case_id)
        assert str(error.value) == (f"case id {case_id!r} does not belong to family "
                                    f"'surfaces' ({reason})"), case_id
    with pytest.raises(FamilyError, match=r"\(outside the family's filters\)"):
        family(family="surfaces", vertices=7, orientable=False).get(torus)
    with pytest.raises(FamilyError, match=r"\(outside the family's filters\)"):
        family(family="surfaces", vertices=7, euler=2).get(torus)
    with pytest.raises(FamilyError, match=r"\(not a triangulated 2-sphere\)"):
        family(family="spheres", dimension=2, vertices=7).get(
            "spheres/2/7:" + code)
    with pytest.raises(FamilyError, match=r"its ids look like 'spheres/3/<n>:<facets>'"):
        family(family="spheres", dimension=3, vertices=5).get("spheres/2/4:012013023123")
    with pytest.raises(FamilyError, match=r"groups of 4 vertex digits"):
        family(family="spheres", dimension=3, vertices=5).get("spheres/3/5:0123012401342")


def test_bad_shards_are_refused():
    fam = family(family="spheres", dimension=3, vertices=[5, 7])
    for shard in ("7/d3", "8/d5", "7", "7/d", "x/d4", 7):
        with pytest.raises(FamilyError) as error:
            list(fam.shard_cases(shard))
        assert str(error.value) == (
            f"family 'spheres': no shard {shard!r}; its shards are '<n>/d<k>' (n vertices, "
            f"largest vertex degree k) for 5 <= n <= 7, e.g. '7/d6'")


def test_bad_parameters_are_refused():
    expected = {
        "surfaces-0": "family 'surfaces': parameter 'vertices' must be an integer n or a "
                      "pair [lo, hi], 4 <= lo <= hi <= 10; got 11",
        "surfaces-1": "family 'surfaces': parameter 'euler' must be an integer, euler <= 2; "
                      "got 3",
        "surfaces-2": "family 'surfaces': parameter 'orientable' must be true or false; "
                      "got 'yes'",
        "surfaces-3": "family 'surfaces': missing required parameter 'vertices' (an integer "
                      "n or a pair [lo, hi], 4 <= lo <= hi <= 10: numbers of vertices (10 "
                      "vertices: 42,426 classes, a few seconds to generate))",
        "spheres-0": "family 'spheres', parameter 'vertices': for dimension 3 must be an "
                     "integer n or a pair [lo, hi] with 5 <= lo <= hi <= 9; got [4, 6]",
        "spheres-1": "family 'spheres': parameter 'dimension' must be an integer, 2 <= "
                     "dimension <= 3; got 4",
        "spheres-2": "family 'spheres': parameter 'vertices' must be an integer n or a pair "
                     "[lo, hi], 4 <= lo <= hi <= 12; got 13",
        "spheres-3": "family 'spheres', parameter 'vertices': for dimension 3 must be an "
                     "integer n or a pair [lo, hi] with 5 <= lo <= hi <= 9; got 10",
    }
    specs = {
        "surfaces-0": {"vertices": 11}, "surfaces-1": {"vertices": 5, "euler": 3},
        "surfaces-2": {"vertices": 5, "orientable": "yes"}, "surfaces-3": {},
        "spheres-0": {"dimension": 3, "vertices": [4, 6]},
        "spheres-1": {"dimension": 4, "vertices": 5},
        "spheres-2": {"dimension": 2, "vertices": 13},
        "spheres-3": {"dimension": 3, "vertices": 10},
    }
    for key, spec in specs.items():
        with pytest.raises(FamilyError) as error:
            make_family({"family": key.split("-")[0], **spec})
        assert str(error.value) == expected[key], key


# ------------------------------------------------------------------ the big levels
@pytest.mark.slow
def test_surfaces_with_9_vertices_by_type():
    # Lutz's tables (Sulanke-Lutz 2009), from memory: 655 surfaces with 9 vertices: 50
    # spheres (OEIS A000109, looked up), 134 RP^2, 112 tori, 187 Klein bottles, 133 N_3,
    # 37 N_4, 2 N_5
    assert types_on(9) == Counter({"S0": 50, "N1": 134, "S1": 112, "N2": 187, "N3": 133,
                                   "N4": 37, "N5": 2})
    cases = list(family(family="surfaces", vertices=9))
    assert all(is_closed_manifold(K) and betti(K)[0] == 1 for _, K in cases)
    hashes = {K.content_hash for _, K in cases}       # individualisation-refinement
    assert len(hashes) == len(cases) == 655


@pytest.mark.slow
def test_surfaces_with_10_vertices_by_type():
    # Lutz's tables, from memory: 42426 surfaces with 10 vertices: 233 spheres (OEIS
    # A000109, looked up), 2109 tori, 865 of genus 2, 20 of genus 3; 1210 RP^2, 4462 Klein
    # bottles, 11784 N_3, 13657 N_4, 7050 N_5, 1022 N_6, 14 N_7
    cases = list(family(family="surfaces", vertices=10))
    assert Counter(type_name(K) for _, K in cases) == Counter({
        "S0": 233, "S1": 2109, "S2": 865, "S3": 20, "N1": 1210, "N2": 4462, "N3": 11784,
        "N4": 13657, "N5": 7050, "N6": 1022, "N7": 14})
    assert all(is_closed_manifold(K) for _, K in cases)
    hashes = {K.content_hash for _, K in cases}       # individualisation-refinement
    assert len(hashes) == len(cases)


@pytest.mark.slow
def test_spheres_of_dimension_2_with_11_and_12_vertices():
    # OEIS A000109: 1249 and 7595
    for n in (11, 12):
        fam = family(family="spheres", dimension=2, vertices=n)
        ids = list(fam.case_ids())
        assert len(ids) == len(set(ids)) == A000109[n] == fam.size()
    for case in ids[::97]:
        assert is_sphere(fam.get(case))


@pytest.mark.slow
def test_3_manifolds_with_9_vertices():
    # Altshuler-Steinberg 1976 via B. Bagchi and B. Datta, "Uniqueness of Walkup's
    # 9-vertex 3-dimensional Klein bottle", Discrete Math. 2008 (abstract, looked up):
    # 1296 + 1 combinatorial 3-manifolds on 9 vertices, all 3-spheres but one, which
    # triangulates the twisted S^2-bundle over S^1 (non-orientable, H_1 = Z)
    manifolds = [f for d in range(4, 9) for f in manifolds_3(9, d)]
    assert len(manifolds) == 1297
    spheres = family(family="spheres", dimension=3, vertices=9)
    cases = list(spheres)
    assert len(cases) == 1296 == spheres.size()
    assert len({K.content_hash for _, K in cases}) == 1296
    codes = {case.split(":")[1] for case, _ in cases}
    others = [f for f in manifolds if encode_facets(f) not in codes]
    assert len(others) == 1
    walkup = Complex._from_index_sets(tuple(range(9)), others[0])
    assert is_closed_manifold(walkup) and not is_sphere(walkup)
    assert homology(walkup)[1] == (1, ()) and homology(walkup)[3] == (0, ())
    with pytest.raises(FamilyError, match=r"\(not a triangulated 3-sphere\)"):
        spheres.get("spheres/3/9:" + encode_facets(others[0]))

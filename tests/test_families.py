"""The families registry (SPEC §5), checked like a referee would.

* Exhaustive families count what the published sequences count: complexes on exactly
  n vertices up to isomorphism (OEIS A261005), on at most n vertices (OEIS A003182,
  antichains up to permutation), graphs on n vertices (OEIS A000088, the graph atlas).
* Their classes are pairwise non-isomorphic by an independent isomorphism test
  (``Complex.content_hash``: individualisation-refinement in verifier.complex), and
  closed: every complex on few vertices is isomorphic to one of them.
* Random families have the promised shape (vertex range, dimension, purity, flag
  property checked with networkx cliques) and draw what networkx draws from the same
  generator (networkx used as an independent reference).
* Determinism: same table, same ids and complexes; get(id) equals the iterated case,
  also in a fresh interpreter with another hash seed; another seed gives other cases.
* Derived families compose; their f-vectors are those of the formulas in the
  literature (Stirling numbers from sympy, the join formula) and of the operations.
* Every user mistake gives a FamilyError with the exact message asserted.
"""

from __future__ import annotations

import hashlib
import json
import os
import random
import subprocess
import sys
from itertools import combinations, permutations
from math import comb, factorial

import networkx as nx
import pytest
from sympy.functions.combinatorial.numbers import stirling

from verifier import operations as ops
from verifier.complex import Complex
from verifier.families import FAMILIES, FamilyError, describe, make_family
from verifier.families import catalog
from verifier.families.derived import (_split, cone_f_vector, join_f_vector,
                                       product_f_vector, refined_f_vector,
                                       suspension_f_vector)
from verifier.families.enumerated import canonical_facets, classes_on
from verifier.families.family import MAX_SIMPLICES, case_random

from .conftest import random_complexes

# OEIS A003182 (Dedekind numbers inequivalent under permutation: antichains of subsets
# of an n-set up to permutation), n = 0..6; looked up on oeis.org.
A003182 = [2, 3, 5, 10, 30, 210, 16353]
# OEIS A261005 (unlabeled simplicial complexes on n vertices), n = 1..6; from memory,
# and equal to the first differences A003182(n) - A003182(n - 1) of the looked-up terms
# (a complex on <= n vertices either uses all n or lives on n - 1 of them).
A261005 = [1, 2, 5, 20, 180, 16143]
# OEIS A000088 (graphs on n unlabeled nodes), n = 0..7; looked up on oeis.org.
A000088 = [1, 1, 2, 4, 11, 34, 156, 1044]


def euler(K: Complex) -> int:
    """χ(K) as the alternating sum of the f-vector (computed here, independently)."""
    return sum((-1) ** i * f for i, f in enumerate(K.f_vector))


def error_of(spec) -> FamilyError:
    with pytest.raises(FamilyError) as caught:
        make_family(spec)
    return caught.value


def brute_force_canonical(K: Complex) -> tuple:
    """Least sorted list of relabelled simplices over all k! bijections (test's own,
    plain-Python definition of a canonical form)."""
    k = K.n_vertices
    return min(tuple(sorted(tuple(sorted(p[v] for v in s)) for s in K.simplices))
               for p in permutations(range(k)))


# --------------------------------------------------------------- all-complexes
def test_all_complexes_counts_per_vertex_number_match_oeis_a261005():
    for n, expected in enumerate(A261005[:5], start=1):   # OEIS A261005(1..5)
        assert len(classes_on(n)) == expected, n


def test_all_complexes_family_sizes_match_oeis_a003182():
    # complexes on <= n vertices, up to isomorphism, with at least one vertex: the
    # antichains of A003182(n) except the empty antichain and {∅} (OEIS A003182).
    for n in range(1, 6):
        family = make_family({"family": "all-complexes", "max_vertices": n})
        assert family.size() == A003182[n] - 2, n
        assert len(list(family.case_ids())) == A003182[n] - 2


def test_all_complexes_up_to_dimension_one_are_the_graphs_oeis_a000088():
    # complexes of dimension <= 1 on exactly n vertices are the graphs on n vertices
    # (OEIS A000088)
    for n in range(1, 7):
        assert len(classes_on(n, max_dim=1)) == A000088[n], n
    family = make_family({"family": "all-complexes", "max_vertices": 6, "max_dim": 1})
    assert family.size() == sum(A000088[1:7])
    assert all(K.dim <= 1 for _, K in family)


def test_all_complexes_on_five_vertices_are_pairwise_non_isomorphic_and_closed():
    family = make_family({"family": "all-complexes", "max_vertices": 5})
    cases = list(family)
    hashes = {K.content_hash for _, K in cases}      # independent canonical form
    assert len(hashes) == len(cases) == A003182[5] - 2
    # closed: every seeded random complex on <= 5 vertices is one of the classes
    for K in random_complexes(300, seed=5, max_vertices=5, max_dim=4, max_facets=6):
        assert K.content_hash in hashes, K
    # closed under removing a facet of positive dimension (common practice, no source)
    for _, K in cases:
        for facet in K.facets:
            if len(facet) > 1:
                rest = [f for f in K.facets if f != facet] + [facet[:-1], facet[1:]]
                smaller = Complex._from_index_sets(K.labels, rest)
                assert smaller.content_hash in hashes


def test_all_complexes_on_six_vertices_match_oeis():
    family = make_family({"family": "all-complexes", "max_vertices": 6})
    assert family.size() == A003182[6] - 2                       # OEIS A003182(6)
    assert len(classes_on(6)) == A261005[5] == A003182[6] - A003182[5]   # OEIS A261005(6)
    ids = list(family.case_ids())
    assert len(set(ids)) == len(ids) == family.size()
    for case in ids[::997]:                                       # ids rebuild their case
        assert canonical_facets(family.get(case)) == case.removeprefix("all-complexes/")


@pytest.mark.slow
def test_all_complexes_on_six_vertices_are_pairwise_non_isomorphic():
    cases = classes_on(6)
    hashes = {K.content_hash for K in cases}                      # independent canonical form
    assert len(hashes) == len(cases) == A261005[5]
    assert all(K.n_vertices == 6 for K in cases)


def test_canonical_facets_agree_with_a_brute_force_canonical_form():
    rng = random.Random(7)
    for K in random_complexes(80, seed=8, max_vertices=5, max_dim=4, max_facets=5):
        new_labels = rng.sample(range(50), K.n_vertices)
        relabelled = K.relabel(dict(zip(K.labels, new_labels)))
        assert canonical_facets(relabelled) == canonical_facets(K)
        H = Complex.from_facets([[int(c) for c in f] for f in canonical_facets(K).split("-")])
        # the canonical representative is the least relabelling, also by brute force
        assert brute_force_canonical(H) == brute_force_canonical(K)
    # isomorphic iff same canonical facets, against Complex.is_isomorphic
    sample = random_complexes(40, seed=9, max_vertices=4, max_dim=3, max_facets=3)
    for K, H in combinations(sample, 2):
        if K.n_vertices == H.n_vertices:
            assert (canonical_facets(K) == canonical_facets(H)) == K.is_isomorphic(H)


def test_all_complexes_ids_and_get():
    family = make_family({"family": "all-complexes", "max_vertices": 3})
    ids = list(family.case_ids())
    assert ids == ["all-complexes/0", "all-complexes/0-1", "all-complexes/01",
                   "all-complexes/0-1-2", "all-complexes/2-01", "all-complexes/01-02",
                   "all-complexes/01-02-12", "all-complexes/012"]   # drawn by hand
    assert family.get("all-complexes/01-02-12").f_vector == (3, 3)
    with pytest.raises(FamilyError) as caught:
        family.get("all-complexes/0-12")         # isomorphic to 2-01, not canonical
    assert str(caught.value) == ("case id 'all-complexes/0-12' does not belong to family "
                                 "'all-complexes' (not the canonical representative of "
                                 "its class)")
    with pytest.raises(FamilyError):
        family.get("all-complexes/0123")         # four vertices
    assert make_family({"family": "all-complexes", "max_vertices": 3, "max_dim": 1}).size() == 7


# ---------------------------------------------------------------------- graphs
def test_graph_atlas_counts_per_vertex_number_match_oeis_a000088():
    for as_ in ("1-dimensional", "flag"):
        family = make_family({"family": "graphs", "as": as_})
        counts = [0] * 8
        for _, K in family:
            counts[K.n_vertices] += 1
        assert counts[1:] == A000088[1:], as_            # OEIS A000088(1..7)
        assert family.size() == sum(A000088[1:]) == 1252


def test_graphs_as_flag_complexes_and_bounds():
    flag = make_family({"family": "graphs", "as": "flag", "min_vertices": 4, "max_vertices": 5})
    plain = make_family({"family": "graphs", "min_vertices": 4, "max_vertices": 5})
    assert flag.size() == plain.size() == A000088[4] + A000088[5]
    for (i, K), (j, H) in zip(flag, plain):
        assert i == j and i.startswith("graphs/G")
        assert H.dim <= 1 and ops.skeleton(K, 1) == H
        cliques = {tuple(sorted(c)) for c in nx.enumerate_all_cliques(H.graph())}
        assert set(K.simplices) == cliques                # networkx cliques
    complete = flag.get("graphs/G52")                     # K5 in the atlas (Read-Wilson)
    assert complete.f_vector == (5, 10, 10, 5, 1)


# -------------------------------------------------------------- random families
RANDOM_SPECS = [
    {"family": "random-flag", "vertices": [6, 14], "edge_probability": 0.4, "count": 40,
     "seed": 11},
    {"family": "random-pure", "vertices": [5, 9], "dimension": 2, "facets": 6, "count": 30,
     "seed": 3},
    {"family": "random-pure", "vertices": 7, "dimension": 3, "facet_probability": 0.2,
     "count": 30, "seed": 4},
    {"family": "linial-meshulam", "vertices": [4, 12], "probability": 0.3, "count": 30,
     "seed": 5},
    {"family": "random-geometric", "vertices": [5, 25], "radius": 0.35, "count": 30, "seed": 6},
    {"family": "random-geometric", "vertices": 12, "radius": 0.6, "dimension": 3, "count": 20,
     "seed": 6},
]


def is_flag(K: Complex) -> bool:
    """K equals the flag complex of its 1-skeleton (cliques by networkx)."""
    return set(K.simplices) == {tuple(sorted(c)) for c in nx.enumerate_all_cliques(K.graph())}


@pytest.mark.parametrize("spec", RANDOM_SPECS, ids=lambda s: s["family"])
def test_random_families_are_deterministic(spec):
    family, again = make_family(spec), make_family(dict(spec))
    cases = list(family)
    assert [c for c, _ in cases] == list(again.case_ids())
    assert len(cases) == family.size() == spec["count"]
    assert cases[0][0] == f"{spec['family']}/s{spec['seed']}/0"
    for case, K in cases:
        assert again.get(case) == K                        # rebuilt from its id alone
    other = make_family({**spec, "seed": spec["seed"] + 1})
    assert [K for _, K in other] != [K for _, K in cases]
    assert make_family(family.spec()).spec() == family.spec()
    json.dumps(family.spec())
    json.dumps(family.params)


@pytest.mark.parametrize("spec", RANDOM_SPECS, ids=lambda s: s["family"])
def test_random_families_have_the_promised_shape(spec):
    lo, hi = spec["vertices"] if isinstance(spec["vertices"], list) else [spec["vertices"]] * 2
    for _, K in make_family(spec):
        if spec["family"] in ("random-flag", "random-geometric"):
            assert lo <= K.n_vertices <= hi and is_flag(K)
        elif spec["family"] == "random-pure":
            d = spec["dimension"]
            assert K.n_vertices <= hi and K.dim == d and K.is_pure()
            if "facets" in spec:
                assert len(K.facets) == spec["facets"]
        else:  # Linial-Meshulam: complete graph plus triangles
            assert lo <= K.n_vertices <= hi and K.dim <= 2
            assert K.f_vector[1] == comb(K.n_vertices, 2)


def test_random_graphs_are_the_ones_networkx_draws_from_the_same_generator():
    # networkx gnp_random_graph / random_geometric_graph as the reference
    flag = make_family(RANDOM_SPECS[0])
    geometric = make_family(RANDOM_SPECS[4])
    for number in range(20):
        rng = case_random("random-flag", 11, number)
        graph = nx.gnp_random_graph(rng.randint(6, 14), 0.4, seed=rng)
        assert flag.get(f"random-flag/s11/{number}") == Complex.from_graph(graph, flag=True)
        rng = case_random("random-geometric", 6, number)
        graph = nx.random_geometric_graph(rng.randint(5, 25), 0.35, seed=rng)
        assert geometric.get(f"random-geometric/s6/{number}") == Complex.from_graph(graph,
                                                                                   flag=True)


def test_cases_are_the_same_in_a_fresh_interpreter():
    spec = RANDOM_SPECS[0]
    ids = ["random-flag/s11/0", "random-flag/s11/39"]
    program = ("import json, sys\nfrom verifier.families import make_family\n"
               "f = make_family(json.loads(sys.argv[1]))\n"
               "print(json.dumps([f.get(i).facet_labels() for i in sys.argv[2:]]))")
    env = dict(os.environ, PYTHONHASHSEED="12345")
    out = subprocess.run([sys.executable, "-c", program, json.dumps(spec), *ids],
                         capture_output=True, text=True, env=env, check=True,
                         cwd=os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
    family = make_family(spec)
    assert json.loads(out.stdout) == [family.get(i).facet_labels() for i in ids]


def test_case_ids_of_other_families_are_refused():
    family = make_family(RANDOM_SPECS[0])
    for wrong, why in [("random-flag/s12/3", "its ids look like 'random-flag/s11/0'"),
                       ("random-flag/s11/40", "it has cases 0..39"),
                       ("random-flag/s11/03", "its ids look like 'random-flag/s11/0'")]:
        with pytest.raises(FamilyError) as caught:
            family.get(wrong)
        assert str(caught.value) == (f"case id {wrong!r} does not belong to family "
                                     f"'random-flag' ({why})")


# ----------------------------------------------------------------------- catalog
def test_catalog_family_defaults_to_every_recorded_name():
    family = make_family({"family": "catalog"})
    recorded = catalog.recorded_names()
    assert family.params["names"] == recorded and family.size() == len(recorded)
    for case, K in family:
        name = case.removeprefix("catalog/")
        assert list(K.f_vector) == catalog.entry(name)["f_vector"], catalog.entry(name)["source"]


# ----------------------------------------------------------------------- derived
def stirling_refinement(f):
    """f_k(K') = sum_{i>=k} (k+1)! S(i+1, k+1) f_i(K) (Brenti-Welker, Math. Z. 259 (2008));
    Stirling numbers from sympy."""
    return tuple(sum(factorial(k + 1) * int(stirling(i + 1, k + 1)) * f[i]
                     for i in range(k, len(f))) for k in range(len(f)))


def test_refine_of_catalog_torus_has_the_stirling_f_vector():
    family = make_family({"family": "refine", "times": 2,
                          "of": {"family": "catalog", "names": ["torus-7", "projective-plane-6"]}})
    assert list(family.case_ids()) == ["refine(2)/catalog/torus-7",
                                       "refine(2)/catalog/projective-plane-6"]
    for case, K in family:
        original = catalog.complex(case.split("/", 2)[2])
        assert K.f_vector == stirling_refinement(stirling_refinement(original.f_vector))
        assert euler(K) == euler(original)            # refinement is a homeomorphism
    assert refined_f_vector((7, 21, 14), 2) == stirling_refinement(stirling_refinement((7, 21, 14)))


def test_join_and_product_sizes_ids_and_invariants():
    spheres = {"family": "catalog", "names": ["sphere-1", "sphere-2", "sphere-3"]}
    graphs = {"family": "graphs", "max_vertices": 3}
    join = make_family({"family": "join", "left": spheres, "right": graphs})
    assert join.size() == 3 * 7 == len(set(join.case_ids()))
    for case, K in join:
        left, right = _split(case.removeprefix("join/"))
        A, B = make_family(spheres).get(left), make_family(graphs).get(right)
        # 1 - χ(A * B) = (1 - χ(A)) (1 - χ(B))  (Matoušek, Using the Borsuk-Ulam Theorem, 4.2)
        assert 1 - euler(K) == (1 - euler(A)) * (1 - euler(B))
        assert K.f_vector == join_f_vector(A.f_vector, B.f_vector)
    capped = make_family({"family": "join", "left": spheres, "right": graphs, "max_cases": 5})
    ids = list(capped.case_ids())
    assert capped.size() == len(ids) == 5
    assert ids[:3] == ["join/catalog/sphere-1|graphs/G1", "join/catalog/sphere-1|graphs/G2",
                       "join/catalog/sphere-2|graphs/G1"]         # order of i + j
    product = make_family({"family": "product", "left": spheres,
                           "right": {"family": "catalog", "names": ["sphere-1", "ball-1"]}})
    assert product.size() == 6
    for case, K in product:
        left, right = _split(case.removeprefix("product/"))
        A, B = catalog.complex(left.removeprefix("catalog/")), catalog.complex(
            right.removeprefix("catalog/"))
        # χ(A × B) = χ(A) χ(B) and dim adds (Björner, Handbook of Combinatorics, §10)
        assert euler(K) == euler(A) * euler(B) and K.dim == A.dim + B.dim


def test_nested_derived_ids_compose_and_escape():
    inner = {"family": "join", "left": {"family": "catalog", "names": ["sphere-1"]},
             "right": {"family": "catalog", "names": ["ball-1"]}}
    outer = make_family({"family": "join", "left": inner,
                         "right": {"family": "cone", "of": {"family": "catalog",
                                                            "names": ["sphere-1"]}}})
    (case, K), = list(outer)
    assert case == r"join/join/catalog/sphere-1\|catalog/ball-1|cone/catalog/sphere-1"
    assert outer.get(case) == K and K.f_vector == join_f_vector(
        join_f_vector((3, 3), (2, 1)), cone_f_vector((3, 3)))
    twice = make_family({"family": "skeleton", "k": 1, "of": {"family": "refine", "of": inner}})
    (case, K), = list(twice)
    assert case == "skeleton(1)/refine(1)/join/catalog/sphere-1|catalog/ball-1"
    assert K.f_vector == refined_f_vector(join_f_vector((3, 3), (2, 1)))[:2]


def test_f_vector_formulas_agree_with_the_operations():
    sample = random_complexes(12, seed=31, max_vertices=5, max_dim=2, max_facets=3)
    for K, H in zip(sample, reversed(sample)):
        assert (ops.refine(K).f_vector == refined_f_vector(K.f_vector)
                == stirling_refinement(K.f_vector))
        assert ops.join(K, H).f_vector == join_f_vector(K.f_vector, H.f_vector)
        assert ops.product(K, H).f_vector == product_f_vector(K.f_vector, H.f_vector)
        assert ops.cone(K).f_vector == cone_f_vector(K.f_vector)
        assert ops.suspension(K).f_vector == suspension_f_vector(K.f_vector)


def test_cone_suspension_skeleton_families():
    of = {"family": "all-complexes", "max_vertices": 4}
    for case, K in make_family({"family": "cone", "of": of}):
        assert euler(K) == 1 and case.startswith("cone/all-complexes/")   # cones are contractible
    for case, K in make_family({"family": "suspension", "of": of}):
        base = make_family(of).get(case.removeprefix("suspension/"))
        assert euler(K) == 2 - euler(base)          # χ(SK) = 2 - χ(K), common practice
    skeleta = make_family({"family": "skeleton", "k": 1, "of": of})
    assert skeleta.size() == A003182[4] - 2 and all(K.dim <= 1 for _, K in skeleta)


# ----------------------------------------------------------------------- files
def test_file_family_reads_facets_and_graphs(tmp_path):
    folder = tmp_path / "data"
    folder.mkdir()
    (folder / "triangle.txt").write_text("# a filled triangle\n1 2 3\n")
    (folder / "path.json").write_text('{"facets": [["a", "b"], ["b", "c"]]}')
    (folder / "square.edgelist").write_text("1 2\n2 3\n3 4\n4 1\n1 3\n")
    nx.write_graphml(nx.cycle_graph(5), folder / "pentagon.graphml")
    (folder / "notes.md").write_text("not a complex")
    family = make_family({"family": "file", "path": "data", "_base": str(tmp_path),
                          "as": "flag"})
    cases = dict(family)
    assert list(cases) == ["file/path.json", "file/pentagon.graphml", "file/square.edgelist",
                           "file/triangle.txt"]
    assert cases["file/triangle.txt"].f_vector == (3, 3, 1)
    assert cases["file/square.edgelist"].f_vector == (4, 5, 2)      # two triangles
    assert cases["file/pentagon.graphml"].f_vector == (5, 5)
    assert cases["file/square.edgelist"].labels == (1, 2, 3, 4)
    spec = family.spec()
    hashes = spec.pop("_sha256")                # each file's SHA-256, bound into the spec
    assert spec == {"family": "file", "path": "data", "as": "flag", "_base": str(tmp_path)}
    assert hashes["triangle.txt"] == hashlib.sha256(b"# a filled triangle\n1 2 3\n").hexdigest()
    assert sorted(hashes) == ["path.json", "pentagon.graphml", "square.edgelist",
                              "triangle.txt"]
    assert dict(make_family(family.spec())) == cases
    single = make_family({"family": "refine", "_base": str(folder),
                          "of": {"family": "file", "path": "triangle.txt"}})
    assert dict(single)["refine(1)/file/triangle.txt"].f_vector == (7, 12, 6)


def test_file_family_errors(tmp_path):
    assert str(error_of({"family": "file", "path": "missing.txt", "_base": str(tmp_path)})) == (
        f"family 'file', parameter 'path': no file or folder "
        f"{str(tmp_path / 'missing.txt')!r} ('missing.txt' relative to {str(tmp_path)!r})")
    assert str(error_of({"family": "file", "path": ".", "_base": str(tmp_path)})) == (
        f"family 'file', parameter 'path': folder {str(tmp_path / '.')!r} has no file "
        "ending in .txt, .json, .graphml, .edgelist")
    (tmp_path / "loop.edgelist").write_text("1 1\n")
    # a bad data file is refused when the family is built (when claims load), not per case
    loop = str(tmp_path / "loop.edgelist")
    assert str(error_of({"family": "file", "path": "loop.edgelist", "_base": str(tmp_path)})) \
        == (f"family 'file', parameter 'path': {loop}: the graph has a self-loop; "
            "simplicial complexes have none")


# ------------------------------------------------------------ validation messages
@pytest.mark.parametrize("spec, key, message", [
    ({"family": "randm-flag"}, ("family",),
     "unknown family 'randm-flag'; did you mean 'random-flag'?"),
    ({"vertices": 3}, (), "the table has no 'family' key; known families: "
     + ", ".join(FAMILIES)),
    ({"family": "random-flag", "vertices": [6, 14], "edge_prob": 0.4, "count": 3},
     ("edge_prob",), "family 'random-flag': unknown parameter 'edge_prob'; did you mean "
     "'edge_probability'? (parameters: vertices, edge_probability, count, seed)"),
    ({"family": "random-flag", "vertices": [6, 14], "edge_probability": 1.5, "count": 3},
     ("edge_probability",), "family 'random-flag': parameter 'edge_probability' must be a "
     "number, 0 <= edge_probability <= 1; got 1.5"),
    ({"family": "random-flag", "vertices": [6, 14], "edge_probability": 0.4}, (),
     "family 'random-flag': missing required parameter 'count' (an integer, 1 <= count <= "
     "10000000: how many complexes to draw)"),
    ({"family": "random-flag", "vertices": [6, 14], "edge_probability": 0.4, "count": "20"},
     ("count",), "family 'random-flag': parameter 'count' must be an integer, 1 <= count <= "
     "10000000; got '20'"),
    ({"family": "random-flag", "vertices": [6, 14], "edge_probability": 0.4, "count": 10 ** 8},
     ("count",), "family 'random-flag': parameter 'count' must be an integer, 1 <= count <= "
     "10000000; got 100000000"),
    ({"family": "random-flag", "vertices": [6, 300], "edge_probability": 0.4, "count": 3},
     ("vertices",), "family 'random-flag': parameter 'vertices' must be an integer n or a "
     "pair [lo, hi], 1 <= lo <= hi <= 200; got [6, 300]"),
    ({"family": "random-flag", "vertices": 3, "edge_probability": 0.5, "count": 3,
      "seed": True}, ("seed",), "family 'random-flag': parameter 'seed' must be an integer, "
     "0 <= seed <= 9223372036854775807; got true"),
    ({"family": "all-complexes", "max_vertices": 7}, ("max_vertices",),
     "family 'all-complexes': parameter 'max_vertices' must be an integer, 1 <= "
     "max_vertices <= 6; got 7"),
    ({"family": "all-complexes", "max_vertices": 4, "min_vertices": 5}, ("min_vertices",),
     "family 'all-complexes', parameter 'min_vertices': must be at most max_vertices = 4; "
     "got 5"),
    ({"family": "graphs", "as": "flags"}, ("as",), "family 'graphs': parameter 'as' must be "
     "one of '1-dimensional', 'flag'; got 'flags' (did you mean 'flag'?)"),
    ({"family": "catalog", "names": ["torus-7", "torus-7"]}, ("names", 1),
     "family 'catalog', parameter 'names': 'torus-7' is listed twice"),
    ({"family": "refine", "of": {"family": "catalogue"}}, ("of", "family"),
     "family 'refine', parameter 'of': unknown family 'catalogue'; did you mean 'catalog'?"),
    ({"family": "refine", "of": {"family": "catalog"}, "times": -1}, ("times",),
     "family 'refine': parameter 'times' must be an integer, 0 <= times <= 10; got -1"),
    ({"family": "refine", "of": "catalog"}, ("of",), "family 'refine', parameter 'of': a "
     "family is given as a table such as { family = \"catalog\" }, got 'catalog'"),
    ({"family": "random-pure", "vertices": 5, "dimension": 2, "count": 3}, ("facets",),
     "family 'random-pure', parameter 'facets': give exactly one of 'facets' (how many "
     "facets) and 'facet_probability' (probability of each (d+1)-set)"),
    ({"family": "random-pure", "vertices": [4, 9], "dimension": 2, "facets": 5, "count": 3},
     ("facets",), "family 'random-pure', parameter 'facets': 4 vertices have only 4 sets of "
     "size 3; got facets = 5"),
    ({"family": "random-pure", "vertices": 2, "dimension": 2, "facets": 1, "count": 3},
     ("vertices",), "family 'random-pure', parameter 'vertices': a pure 2-complex needs at "
     "least 3 vertices; got vertices = [2, 2]"),
])
def test_parameter_errors_have_exact_messages(spec, key, message):
    error = error_of(spec)
    assert str(error) == message
    assert error.key == key


def test_huge_requests_are_refused():
    error = error_of({"family": "random-flag", "vertices": 200, "edge_probability": 0.9,
                      "count": 5})
    expected = sum(comb(200, k) * 0.9 ** comb(k, 2) for k in range(1, 201))  # E[#cliques]
    assert str(error) == (f"family 'random-flag', parameter 'edge_probability': with 200 "
                          f"vertices and edge_probability 0.9 a flag complex has about "
                          f"{expected:.3g} simplices on average, more than the limit "
                          f"{MAX_SIMPLICES} per case; lower one of them")
    # refine twice of the 5-simplex (a case of all-complexes on 6 vertices): Stirling formula
    f = stirling_refinement(stirling_refinement(tuple(comb(6, i + 1) for i in range(6))))
    error = error_of({"family": "refine", "times": 2,
                      "of": {"family": "all-complexes", "max_vertices": 6}})
    assert error.key == ("times",)
    assert str(error) == (f"family 'refine', parameter 'times': the largest cases of refine "
                          f"would have up to {sum(f)} simplices (f-vector at most {list(f)}), "
                          f"more than the limit of {MAX_SIMPLICES} per case")
    # a single random case too large to refine is refused when built
    family = make_family({"family": "refine", "times": 3, "of": {
        "family": "random-flag", "vertices": 14, "edge_probability": 0.9, "count": 1}})
    with pytest.raises(FamilyError, match=r"^case 'refine\(3\)/random-flag/s0/0': the "
                                          r"result would have \d+ simplices"):
        family.get("refine(3)/random-flag/s0/0")


# ------------------------------------------------------------------- the registry
def test_registry_covers_spec_section_5_and_describes_every_parameter():
    minimum = {"all-complexes", "graphs", "random-flag", "random-pure", "linial-meshulam",
               "random-geometric", "catalog", "refine", "join", "suspension", "cone",
               "product", "skeleton", "file"}             # SPEC §5, minimum set
    assert minimum <= set(FAMILIES)
    table = describe()
    assert [entry["name"] for entry in table] == list(FAMILIES)
    for entry in table:
        assert entry["description"] and entry["reference"]
        for p in entry["parameters"]:
            assert set(p) == {"name", "type", "valid", "meaning", "required", "default"}
            assert p["meaning"] and p["type"]
    json.dumps(table)


def test_specs_are_canonical_and_recreate_the_family():
    specs = RANDOM_SPECS + [
        {"family": "all-complexes", "max_vertices": 3, "bind": "A"},
        {"family": "graphs", "max_vertices": 4, "as": "flag"},
        {"family": "catalog", "names": ["torus-7"]},
        {"family": "product", "left": {"family": "catalog", "names": ["sphere-1"]},
         "right": {"family": "graphs", "max_vertices": 2}, "max_cases": 3},
    ]
    for spec in specs:
        family = make_family(spec)
        again = make_family(json.loads(json.dumps(family.spec())))
        assert again.spec() == family.spec() and again == family
        assert "bind" not in family.spec()
        assert list(again.case_ids()) == list(family.case_ids())
        assert [K for _, K in again] == [K for _, K in family]


def test_atlas_ranges_match_the_atlas():
    # the atlas orders graphs by number of vertices (Read & Wilson, An Atlas of Graphs,
    # 1998); the planning ranges must pick exactly the graphs of each size
    import networkx as nx
    from verifier.families.enumerated import ATLAS_COUNTS
    atlas = nx.graph_atlas_g()
    start = 0
    for n, count in enumerate(ATLAS_COUNTS):
        assert {g.number_of_nodes() for g in atlas[start:start + count]} == {n}
        start += count
    assert start == len(atlas) == 1253

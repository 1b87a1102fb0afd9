"""Graphs by canonical augmentation and the ``graphs`` family, checked like a referee would.

* The generator counts what the published sequences count: graphs on n unlabeled nodes
  (OEIS A000088) and connected ones (OEIS A001349); n <= 8 in the fast run, n = 9 and
  the whole of n = 10 (every one of the 550 shards) in ``make test-full``.
* Its graphs are pairwise non-isomorphic by an isomorphism test that owes nothing to
  the generator or to igraph: ``Complex.canonical_form`` (our own
  individualisation-refinement) of the 1-dimensional complexes, n <= 8.
* For n <= 7 it finds exactly the classes of the graph atlas (Read and Wilson, as
  shipped by networkx), compared by the same independent canonical form.
* The canonical code is a canonical form: invariant under relabelling, idempotent, and
  its graph isomorphic to the given one (networkx ``is_isomorphic`` as the reference).
* The family: shards are named without generating anything, are disjoint and cover
  the family; ``get(id)`` rebuilds what the shards yield; bad ids and parameters are
  refused with the exact messages; ``connected = true`` keeps the connected graphs.
"""

from __future__ import annotations

import hashlib
import json
import os
import random
import subprocess
import sys
from itertools import islice
from math import comb

import networkx as nx
import pytest

from verifier.complex import Complex
from verifier.families import FamilyError, make_family
from verifier.families import graph_generation as generation
from verifier.families import graphs as graphs_module
from verifier.families.graph_generation import (canonical_code, children_of, code_edges,
                                                graph_code, graphs_on, is_connected)
from verifier.families.graphs import graph_id

# OEIS A000088 (graphs on n unlabeled nodes), n = 0..10; looked up on oeis.org.
A000088 = [1, 1, 2, 4, 11, 34, 156, 1044, 12346, 274668, 12005168]
# OEIS A001349 (connected graphs on n unlabeled nodes), n = 0..10; looked up on oeis.org.
A001349 = [1, 1, 1, 2, 6, 21, 112, 853, 11117, 261080, 11716571]


def as_networkx(n: int, code: int) -> nx.Graph:
    graph = nx.Graph()
    graph.add_nodes_from(range(n))
    graph.add_edges_from(code_edges(n, code))
    return graph


def independent_form(n: int, code: int):
    """Canonical form of the 1-dimensional complex by verifier.complex's own
    individualisation-refinement (no igraph, no generator code)."""
    return Complex.from_graph(as_networkx(n, code)).canonical_form()


def error_of(call) -> str:
    with pytest.raises(FamilyError) as caught:
        call()
    return str(caught.value)


# ----------------------------------------------------------------- the generator
def test_counts_match_oeis_a000088_and_a001349_up_to_8_vertices():
    for n in range(1, 9):
        codes = graphs_on(n).tolist()
        assert len(codes) == A000088[n], n                                  # OEIS A000088
        assert sum(is_connected(n, c) for c in codes) == A001349[n], n       # OEIS A001349
        if n >= 2:
            connected = children_of(n, 0, A000088[n - 1], connected=True)
            assert len(connected) == A001349[n], n                          # OEIS A001349
            assert connected == [c for c in codes if is_connected(n, c)]    # same order


def test_generated_graphs_are_pairwise_non_isomorphic_up_to_8_vertices():
    # independent test: Complex.canonical_form (verifier.complex), not igraph
    for n in range(1, 9):
        forms = {independent_form(n, c) for c in graphs_on(n).tolist()}
        assert len(forms) == A000088[n], n                                  # OEIS A000088


def test_generator_finds_the_classes_of_the_graph_atlas():
    # Read and Wilson, An Atlas of Graphs (1998), as shipped by networkx
    atlas = {}
    for graph in nx.graph_atlas_g()[1:]:
        atlas.setdefault(graph.number_of_nodes(), set()).add(
            Complex.from_graph(graph).canonical_form())
    for n in range(1, 8):
        assert {independent_form(n, c) for c in graphs_on(n).tolist()} == atlas[n], n


def test_canonical_code_is_a_canonical_form():
    # networkx is_isomorphic as the reference; random graphs on 8..11 vertices
    rng = random.Random(20261203)
    for _ in range(60):
        n = rng.randint(8, 11)
        edges = [(i, j) for j in range(n) for i in range(j) if rng.random() < rng.random()]
        code = graph_code(n, edges)
        form = canonical_code(n, code)
        sigma = list(range(n))
        rng.shuffle(sigma)
        moved = graph_code(n, [(sigma[i], sigma[j]) for i, j in edges])
        assert canonical_code(n, moved) == form
        assert canonical_code(n, form) == form
        assert nx.is_isomorphic(as_networkx(n, form), as_networkx(n, code))
    # two graphs with the same degree sequence, not isomorphic: C6 and two triangles
    hexagon = graph_code(6, [(i, (i + 1) % 6) for i in range(6)])
    triangles = graph_code(6, [(0, 1), (1, 2), (0, 2), (3, 4), (4, 5), (3, 5)])
    assert canonical_code(6, hexagon) != canonical_code(6, triangles)


def test_codes_and_edges():
    # definition of the code: bit j (j - 1) / 2 + i for the edge {i, j}, i < j
    assert graph_code(4, [(2, 3)]) == 1 << 5
    assert code_edges(4, 0b111111) == [(0, 1), (0, 2), (1, 2), (0, 3), (1, 3), (2, 3)]
    assert is_connected(1, 0) and not is_connected(2, 0)
    with pytest.raises(ValueError, match=r"^\(1, 1\) is not an edge of a simple graph on "
                                         r"vertices 0\.\.2$"):
        graph_code(3, [(1, 1)])
    with pytest.raises(ValueError, match="graphs are generated on 2 to 11 vertices; asked "
                                         "for 12"):
        children_of(12, 0, 1)


@pytest.mark.slow
def test_counts_on_9_vertices_match_oeis():
    codes = graphs_on(9).tolist()
    assert len(codes) == A000088[9] == len(set(codes))                     # OEIS A000088
    assert len(children_of(9, 0, A000088[8], connected=True)) == A001349[9]  # OEIS A001349


@pytest.mark.slow
def test_counts_on_10_vertices_match_oeis_over_every_shard():
    # the whole level, shard by shard (a few minutes on one core each pass)
    family = make_family({"family": "graphs", "min_vertices": 10, "max_vertices": 10})
    shards = family.shards()
    assert len(shards) == 550
    total = connected = 0
    for shard in shards:
        _, first, last = family._shard_of(shard)
        total += len(children_of(10, first, last + 1))
        connected += len(children_of(10, first, last + 1, connected=True))
    assert total == A000088[10]                                              # OEIS A000088
    assert connected == A001349[10]                                          # OEIS A001349


# -------------------------------------------------------------------- the family
def test_up_to_7_vertices_the_family_is_the_atlas_planned_case_by_case():
    family = make_family({"family": "graphs", "max_vertices": 7})
    assert family.shards() is None
    assert family.params == {"max_vertices": 7, "min_vertices": 1, "as": "1-dimensional"}
    ids = list(family.case_ids())
    assert ids == [f"graphs/G{i}" for i in range(1, 1253)]     # atlas numbers, unchanged
    assert family.size() == sum(A000088[1:8])                  # OEIS A000088


def test_shard_names_are_stable_and_listed_without_generating(monkeypatch):
    def refuse(*args, **kwargs):
        raise AssertionError("listing shards generated graphs")
    monkeypatch.setattr(graphs_module, "children_of", refuse)
    monkeypatch.setattr(generation, "_level", refuse)
    nine = make_family({"family": "graphs", "max_vertices": 9})
    assert nine.shards() == (
        [f"{n}/all" for n in range(1, 8)] + ["8/p0000-1043"]
        + [f"9/p{k:05d}-{k + 999:05d}" for k in range(0, 12000, 1000)] + ["9/p12000-12345"])
    ten = make_family({"family": "graphs", "min_vertices": 10, "max_vertices": 10})
    names = ten.shards()
    assert len(names) == 550 and names[0] == "10/p000000-000499"
    assert names[-1] == "10/p274500-274667"
    assert ten.size() == A000088[10]                                         # OEIS A000088
    eleven = make_family({"family": "graphs", "min_vertices": 11, "max_vertices": 11,
                          "connected": True})
    assert len(eleven.shards()) == 48021 and eleven.shards()[-1] == "11/p12005000-12005167"
    assert eleven.size() == 1006700565                                       # OEIS A001349(11)


def test_shards_are_disjoint_and_cover_the_family():
    family = make_family({"family": "graphs", "min_vertices": 6, "max_vertices": 8})
    shards = family.shards()
    assert shards == ["6/all", "7/all", "8/p0000-1043"]
    parts = [[case_id for case_id, _ in family.shard_cases(s)] for s in shards]
    union = [case_id for part in parts for case_id in part]
    assert len(union) == len(set(union)) == family.size() == sum(A000088[6:9])
    assert union == list(family.case_ids()) == [case_id for case_id, _ in family]
    assert parts[0] == [f"graphs/G{i}" for i in range(53, 209)]         # atlas, 6 vertices
    assert all(case_id.startswith("graphs/8:") for case_id in parts[2])


def test_get_rebuilds_exactly_what_the_shards_yield():
    for as_ in ("1-dimensional", "flag"):
        family = make_family({"family": "graphs", "min_vertices": 9, "max_vertices": 9,
                              "as": as_})
        cases = list(family.shard_cases("9/p01000-01999"))
        assert len(cases) > 5000
        for case_id, K in cases[::400]:
            again = family.get(case_id)
            assert again == K and again.content_hash == K.content_hash
            n = int(case_id.split("/")[1].split(":")[0])
            assert K.n_vertices == n == 9
        # the ids are self-describing: the code spells the canonical form's edges
        case_id, K = cases[17]
        code = int(case_id.split(":")[1], 16)
        assert {s for s in K.simplices if len(s) == 2} == set(code_edges(9, code))
        if as_ == "flag":                                    # networkx cliques as reference
            cliques = {tuple(sorted(c)) for c in nx.enumerate_all_cliques(K.graph())}
            assert set(K.simplices) == cliques


def test_shard_order_is_the_same_in_a_fresh_interpreter():
    family = make_family({"family": "graphs", "min_vertices": 9, "max_vertices": 9})
    here = [case_id for case_id, _ in islice(family.shard_cases("9/p12000-12345"), 2000)]
    script = ("import json; from itertools import islice; from verifier.families import "
              "make_family; f = make_family({'family': 'graphs', 'min_vertices': 9, "
              "'max_vertices': 9}); print(json.dumps([c for c, _ in islice("
              "f.shard_cases('9/p12000-12345'), 2000)]))")
    env = dict(os.environ, PYTHONHASHSEED="12345")
    out = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                         env=env, check=True).stdout
    assert json.loads(out) == here


def test_connected_keeps_exactly_the_connected_graphs():
    family = make_family({"family": "graphs", "max_vertices": 8, "connected": True})
    assert family.spec() == {"family": "graphs", "max_vertices": 8, "min_vertices": 1,
                             "as": "1-dimensional", "connected": True}
    assert make_family(family.spec()) == family
    assert family.size() == sum(A001349[1:9])                              # OEIS A001349
    counts = [0] * 9
    for case_id, K in family:
        graph = K.graph()
        assert nx.is_connected(graph), case_id                  # networkx as the reference
        counts[K.n_vertices] += 1
    assert counts[1:] == A001349[1:9]                                      # OEIS A001349
    small = make_family({"family": "graphs", "max_vertices": 4, "connected": True})
    assert small.shards() is None
    assert len(list(small.case_ids())) == small.size() == 1 + 1 + 2 + 6    # A001349(1..4)


def test_bad_ids_and_shards_are_refused_with_clear_messages():
    family = make_family({"family": "graphs", "min_vertices": 8, "max_vertices": 9,
                          "connected": True})
    path8 = canonical_code(8, graph_code(8, [(i, i + 1) for i in range(7)]))
    foreign = "case id {!r} does not belong to family 'graphs' ({})"
    forms = ("its ids are 'graphs/G<number in the atlas>' for graphs on at most 7 vertices "
             "and 'graphs/<n>:<canonical code in hexadecimal>' for 8 to 11")
    assert family.get(graph_id(8, path8)).f_vector == (8, 7)
    cases = {
        "graphs/8:zz": forms,
        "graphs/08:0000000": forms,
        "graphs/8:" + f"{path8:07x}".upper(): forms,
        "graphs/9": forms,
        "graphs/7:000000": forms + "; 7 vertices is outside 8..11",
        "graphs/10:000000000000": "it has graphs on 8 to 9 vertices, this one has 10",
        "graphs/8:00000000": "the code of a graph on 8 vertices has 7 hexadecimal digits, "
                             "this one 8",
        "graphs/G3": "graph G3 has 2 vertices",
    }
    for case_id, why in cases.items():
        assert error_of(lambda: family.get(case_id)) == foreign.format(case_id, why)
    # the same path with another labelling: not canonical, and the message names the id
    other = graph_code(8, [(0, 7)] + [(i, i + 1) for i in range(6)])
    assert other != path8
    bad = graph_id(8, other)
    assert error_of(lambda: family.get(bad)) == foreign.format(
        bad, f"not the canonical form of its graph; the canonical id is "
             f"{graph_id(8, path8)!r}")
    wide = make_family({"family": "graphs", "max_vertices": 10})
    assert error_of(lambda: wide.get("graphs/10:ffffffffffff")) == foreign.format(
        "graphs/10:ffffffffffff", "the code has bits beyond the 45 vertex pairs of 10 "
        "vertices")
    assert wide.get("graphs/8:fffffff").f_vector == (8, 28)     # K8: every labelling
    empty = graph_id(8, 0)
    assert error_of(lambda: family.get(empty)) == foreign.format(
        empty, "the graph is not connected")
    assert make_family({"family": "graphs", "max_vertices": 8}).get(empty).f_vector == (8,)
    # atlas G2: two vertices, no edge (Read and Wilson's numbering, as in networkx)
    assert error_of(lambda: make_family({"family": "graphs", "connected": True}).get(
        "graphs/G2")) == foreign.format("graphs/G2", "graph G2 is not connected")
    form = "its shards are '<n>/all' for n <= 7 and '<n>/p<first>-<last>' for n >= 8"
    shards = {
        "9/p1000-1999": f"{form}; on 9 vertices a block starts at a multiple of 1000 below "
                        "12346, e.g. '9/p00000-00999'",
        "9/p00500-01499": f"{form}; on 9 vertices a block starts at a multiple of 1000 "
                          "below 12346, e.g. '9/p00000-00999'",
        "9/all": f"{form}; graphs on 9 vertices are cut into blocks of 1000 parents",
        "10/p000000-000499": f"{form}, with 8 <= n <= 9",
        "*": f"{form}, with 8 <= n <= 9",
    }
    for shard, why in shards.items():
        assert error_of(lambda: list(family.shard_cases(shard))) == foreign.format(shard, why)
    atlas = make_family({"family": "graphs", "max_vertices": 7})
    assert error_of(lambda: list(atlas.shard_cases("7/all"))) == foreign.format(
        "7/all", "this family is planned case by case, not in shards (max_vertices <= 7)")


@pytest.mark.parametrize("spec, key, message", [
    ({"family": "graphs", "max_vertices": 12}, ("max_vertices",),
     "family 'graphs': parameter 'max_vertices' must be an integer, 1 <= max_vertices <= "
     "11; got 12"),
    ({"family": "graphs", "min_vertices": 0}, ("min_vertices",),
     "family 'graphs': parameter 'min_vertices' must be an integer, 1 <= min_vertices <= "
     "11; got 0"),
    ({"family": "graphs", "max_vertices": 9, "min_vertices": 10}, ("min_vertices",),
     "family 'graphs', parameter 'min_vertices': must be at most max_vertices = 9; got 10"),
    ({"family": "graphs", "connected": "yes"}, ("connected",),
     "family 'graphs': parameter 'connected' must be a boolean, true or false; got 'yes'"),
    ({"family": "graphs", "connected": 1}, ("connected",),
     "family 'graphs': parameter 'connected' must be a boolean, true or false; got 1"),
])
def test_parameter_errors(spec, key, message):
    with pytest.raises(FamilyError) as caught:
        make_family(spec)
    assert str(caught.value) == message and caught.value.key == key


def test_spec_of_a_table_without_connected_is_unchanged_and_bounds():
    # certificates compare specs: a table written before 'connected' existed keeps its spec
    old = {"family": "graphs", "max_vertices": 7, "min_vertices": 1, "as": "flag"}
    assert make_family(old).spec() == old
    assert make_family(dict(old, connected=False)).spec() == old
    flag = make_family({"family": "graphs", "max_vertices": 10, "as": "flag"})
    assert flag.f_bound() == tuple(comb(10, k) for k in range(1, 11))
    assert make_family({"family": "graphs", "max_vertices": 10}).f_bound() == (10, 45)


def test_ids_and_order_are_the_recorded_ones():
    # Regression record of this implementation (BLISS in python-igraph 1.0, pinned in
    # pyproject.toml), not a mathematical fact: if it changes, the ids of graphs on 8 or
    # more vertices in stored results and certificates have changed.
    petersen = nx.petersen_graph()
    code = canonical_code(10, graph_code(10, petersen.edges()))
    assert graph_id(10, code) == "graphs/10:1c024148e08e"
    assert graph_id(9, canonical_code(9, graph_code(9, nx.cycle_graph(9).edges()))) == \
        "graphs/9:c04082113"
    family = make_family({"family": "graphs", "max_vertices": 10, "min_vertices": 10})
    assert nx.is_isomorphic(family.get("graphs/10:1c024148e08e").graph(), petersen)
    eight = make_family({"family": "graphs", "min_vertices": 8, "max_vertices": 8})
    ids = [case_id for case_id, _ in eight.shard_cases("8/p0000-1043")]
    assert ids[:3] == ["graphs/8:0000000", "graphs/8:8000000", "graphs/8:c000000"]
    assert hashlib.sha256(" ".join(ids).encode()).hexdigest() == \
        "ab9f723d6d474d32136c38a7b84c279c475284d42eaf84ff434797365b95b47f"

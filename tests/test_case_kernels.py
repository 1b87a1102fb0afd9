"""The per-case fast paths (issue 11) against the reference paths they replace.

Every fast path here must give exactly what the straightforward path gives: the same
simplices in the same order, the same content hash, the same Green function.  The
references are the project's own general paths kept callable beside the fast ones
(networkx clique enumeration, the Matrix star formula, the individualisation-refinement
canonical form), networkx used independently, and hashes recorded with the code before
the speed-ups (tests/data/content_hashes.json, written by
tests/data/record_content_hashes.py; see the "how" entry of that file).
"""

import json
import random
from itertools import combinations
from pathlib import Path

import networkx as nx
import pytest

from verifier.complex import Complex
from verifier.families import make_family
from verifier.families.family import (FamilyError, MAX_SIMPLICES, _flag_cliques_networkx,
                                      flag_cliques, graph_complex)
from verifier.families.random_models import gnp_edges

RECORDED = json.loads((Path(__file__).parent / "data" / "content_hashes.json").read_text())


def _digest(text: str) -> str:
    import hashlib
    return hashlib.sha256(text.encode()).hexdigest()[:24]


def test_recorded_complexes_and_hashes_unchanged():
    # reference: values recorded with the code before the speed-ups (see module docstring)
    checked = 0
    for group in RECORDED["groups"]:
        family = make_family(dict(group["spec"]))
        for case_id, simplices_digest, hash_prefix in group["cases"]:
            K = family.get(case_id)
            assert _digest(repr((K.labels, K.simplices))) == simplices_digest, case_id
            assert K.content_hash[:24] == hash_prefix, case_id
            checked += 1
    assert checked > 3000


def test_bitmask_cliques_equal_networkx_cliques():
    # reference: networkx enumerate_all_cliques, used independently (the old path)
    rng = random.Random(20261203)
    for _ in range(1500):
        n = rng.randint(0, 14)
        edges = gnp_edges(rng, n, rng.random())
        K = graph_complex(n, edges, True, "test")
        graph = nx.Graph()
        graph.add_nodes_from(range(n))
        graph.add_edges_from(edges)
        expected = sorted((tuple(sorted(c)) for c in nx.enumerate_all_cliques(graph)),
                          key=lambda s: (len(s), s))
        assert K.simplices == tuple(expected)
        assert K.simplices == tuple(_flag_cliques_networkx(n, sorted(edges), "test"))
        assert K.labels == tuple(range(n))


def test_flag_complex_of_complete_graph_is_the_full_simplex():
    # K_n's flag complex is the (n-1)-simplex: 2^n - 1 faces (common practice, no source)
    for n in (1, 5, 10, 12):
        K = graph_complex(n, list(combinations(range(n), 2)), True, "test")
        assert len(K.simplices) == 2 ** n - 1
        assert K.f_vector == tuple(len(list(combinations(range(n), k))) for k in range(1, n + 1))


def test_masks_kept_by_the_clique_builder_equal_computed_masks():
    # reference: the definition m = sum of 2^v over the simplex's vertices
    rng = random.Random(7)
    for _ in range(200):
        n = rng.randint(1, 12)
        K = graph_complex(n, gnp_edges(rng, n, 0.6), True, "test")
        expected = [sum(1 << v for v in s) for s in K.simplices]
        assert K.vertex_masks().tolist() == expected
        assert Complex(K.labels, K.simplices).vertex_masks().tolist() == expected


def test_unusual_edge_lists_take_the_general_path_with_the_same_result():
    # repeated and reversed edges, and a graph beyond the bitmask bound (networkx reference)
    K = graph_complex(4, [(1, 0), (0, 1), (2, 1), (0, 2)], True, "test")
    assert K.simplices == ((0,), (1,), (2,), (3,), (0, 1), (0, 2), (1, 2), (0, 1, 2))
    n = 70
    path = [(v, v + 1) for v in range(n - 1)]
    K = graph_complex(n, path, True, "test")
    assert K.f_vector == (n, n - 1)


def test_too_many_cliques_is_refused_with_the_case_named():
    # K_21's flag complex has 2^21 - 1 > MAX_SIMPLICES simplices
    assert 2 ** 21 - 1 > MAX_SIMPLICES
    with pytest.raises(FamilyError, match=r"case X: the flag complex has more than "):
        graph_complex(21, list(combinations(range(21), 2)), True, "case X")
    above = [sum(1 << w for w in range(v + 1, 21)) for v in range(21)]
    with pytest.raises(FamilyError, match="case Y"):
        flag_cliques(above, "case Y")

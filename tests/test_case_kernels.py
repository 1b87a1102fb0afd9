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


# ------------------------------------------------------------------ Green function

def _varied_complexes(count: int, seed: int):
    """Flag complexes, pure complexes and every complex on <= 4 vertices."""
    rng = random.Random(seed)
    out = [K for _, K in make_family({"family": "all-complexes", "max_vertices": 4})]
    for _ in range(count):
        n = rng.randint(1, 10)
        out.append(graph_complex(n, gnp_edges(rng, n, rng.random()), True, "test"))
        facets = [rng.sample(range(n + 2), min(n + 2, rng.randint(1, 4)))
                  for _ in range(rng.randint(1, 6))]
        out.append(Complex.from_facets(facets))
    return out


def test_bitmask_green_equals_the_general_star_formula_and_exact_inversion():
    # reference: the general Matrix path of this project (green_general) and exact
    # inversion of L by python-flint (green_by_inversion), both independent of the masks
    from verifier.invariants.connection import green, green_by_inversion, green_general
    for i, K in enumerate(_varied_complexes(150, 11)):
        g = green(K)
        assert g == green_general(K)
        if i % 5 == 0:
            assert g == green_by_inversion(K)
        assert g.provenance == "star formula, verified L*g = I exactly"


def test_bitmask_green_against_sympy_inverse():
    # reference: sympy's exact rational inverse of the connection matrix, built here from
    # the definition L[x, y] = 1 iff x and y share a vertex (Knill, arXiv:1612.08229)
    import sympy
    from verifier.invariants.connection import green
    rng = random.Random(5)
    for _ in range(6):
        K = graph_complex(5, gnp_edges(rng, 5, 0.6), True, "test")
        L = sympy.Matrix(len(K), len(K), lambda x, y: int(bool(set(K.simplices[x]) &
                                                             set(K.simplices[y]))))
        assert green(K).rows() == L.inv().tolist()


def test_energy_theorem_holds_through_the_bitmask_path():
    # sum of g(x, y) = euler characteristic: Knill, "The energy of a simplicial complex",
    # Linear Algebra Appl. 600 (2020), Theorem 1
    from verifier.invariants.connection import green
    from verifier.invariants import euler
    for K in _varied_complexes(60, 3):
        assert green(K).total() == euler(K)


def test_the_check_rejects_a_wrong_candidate():
    # a candidate with one entry changed is not the inverse: L g' = I + L e_xy != I
    import numpy as np
    from verifier.exact import mask_kernels
    rng = random.Random(9)
    for _ in range(30):
        n = rng.randint(2, 9)
        K = graph_complex(n, gnp_edges(rng, n, 0.5), True, "test")
        g, ok = mask_kernels.checked_green(K.vertex_masks())
        assert ok
        x, y = rng.randrange(len(K)), rng.randrange(len(K))
        wrong = g.copy()
        wrong[x, y] += rng.choice([-1, 1])
        for check in (mask_kernels.is_connection_inverse,
                      mask_kernels.is_connection_inverse_by_faces):
            assert check(K.vertex_masks(), g)
            assert not check(K.vertex_masks(), wrong)
            assert not check(K.vertex_masks(), np.zeros_like(g))


def test_face_summed_check_equals_the_literal_product():
    # reference: L g computed from the definition L[x, t] = [x meets t] with numpy
    # (int64, entries far below 2^63), compared with the identity; the face-summed check
    # must agree with it on right and on perturbed candidates
    import numpy as np
    from verifier.exact import mask_kernels
    rng = random.Random(31)
    for _ in range(200):
        n = rng.randint(1, 9)
        K = graph_complex(n, gnp_edges(rng, n, rng.random()), True, "test")
        masks = K.vertex_masks()
        g, ok = mask_kernels.checked_green(masks)
        candidate = g.copy()
        if rng.random() < 0.5:
            candidate[rng.randrange(len(K)), rng.randrange(len(K))] += rng.choice([-2, 1])
        L = ((masks[:, None] & masks[None, :]) != 0).astype(np.int64)
        literal = bool(np.array_equal(L @ candidate, np.identity(len(K), dtype=np.int64)))
        assert mask_kernels.is_connection_inverse_by_faces(masks, candidate) == literal
        assert ok


def test_masks_not_closed_under_faces_are_not_verified():
    # {1}, {2}, {1, 2, 3} without its other faces is no simplicial complex: the face
    # lists miss {3}, {1, 3}, ..., so nothing is verified (common practice, no source)
    import numpy as np
    from verifier.exact import mask_kernels
    masks = np.array([0b10, 0b100, 0b1110], dtype=np.int64)
    assert not mask_kernels.checked_green(masks)[1]


def test_large_complexes_keep_the_general_path():
    # past MASK_GREEN_MAX simplices (K_11's flag complex: 2^11 - 1) the general path decides
    from verifier.invariants.connection import MASK_GREEN_MAX, green
    K = graph_complex(11, list(combinations(range(11), 2)), True, "test")
    assert len(K) > MASK_GREEN_MAX
    assert green(K).total() == 1    # the simplex is contractible: euler = 1


# ------------------------------------------------------------------ canonical form

def _compiled_form(K: Complex):
    from verifier.canonical_kernels import canonical_rows
    vertices, ends = canonical_rows(K.n_vertices, K.vertex_masks())
    starts = [0] + ends.tolist()[:-1]
    return tuple(tuple(vertices[a:b].tolist()) for a, b in zip(starts, ends.tolist()))


def _forms_agree(specs):
    # reference: the plain-Python individualisation-refinement of this project
    # (verifier.complex._canonical_form), which the compiled search must reproduce
    from verifier.complex import _canonical_form
    checked = 0
    for spec in specs:
        for _, K in make_family(spec):
            if 0 < K.n_vertices <= 10:
                assert _compiled_form(K) == _canonical_form(K), K
                assert K.canonical_form() == _canonical_form(K)
                checked += 1
    return checked


def test_compiled_canonical_form_equals_the_python_search():
    assert _forms_agree([{"family": "all-complexes", "max_vertices": 5},
                         {"family": "graphs", "as": "flag"},
                         {"family": "catalog"},
                         {"family": "random-flag", "vertices": [6, 10],
                          "edge_probability": 0.5, "count": 400, "seed": 2}]) > 1500


@pytest.mark.slow
def test_compiled_canonical_form_on_every_complex_with_six_vertices():
    # all 16,143 classes on <= 6 vertices (OEIS A003182 counts them)
    assert _forms_agree([{"family": "all-complexes", "max_vertices": 6},
                         {"family": "graphs", "as": "1-dimensional"}]) > 17000


def test_compiled_canonical_form_is_a_relabelling_invariant():
    # isomorphic complexes get one form (definition of a canonical form); the check is
    # against the Python search on a random relabelling of each complex
    from verifier.complex import _canonical_form
    rng = random.Random(17)
    for _ in range(300):
        n = rng.randint(1, 10)
        K = graph_complex(n, gnp_edges(rng, n, rng.random()), True, "test")
        images = rng.sample(range(100), n)
        L = K.relabel(dict(zip(range(n), images)))
        assert L.canonical_form() == K.canonical_form() == _canonical_form(L)
        assert L.content_hash == K.content_hash


def test_content_hash_text_is_the_json_of_the_form():
    # the hash is SHA-256 of the JSON text of {"canonical": form, "n": n}
    # (the definition in verifier/complex.py before the speed-up)
    import hashlib
    rng = random.Random(4)
    for _ in range(100):
        n = rng.randint(1, 10)
        K = graph_complex(n, gnp_edges(rng, n, 0.5), True, "test")
        text = json.dumps({"canonical": [list(f) for f in K.canonical_form()], "n": n},
                          separators=(",", ":"), sort_keys=True)
        assert K.content_hash == hashlib.sha256(text.encode()).hexdigest()


# ------------------------------------------------------------------ one timer per case

def test_a_nested_time_limit_stops_its_own_step():
    # the case's one interval timer serves building and judging: a ring inside a nested
    # use is that use's LimitExceeded, and the outer use goes on (common practice, no source)
    import time
    from verifier.claims.errors import LimitExceeded
    from verifier.claims.evaluate import time_limit
    deadline = time.monotonic() + 0.2
    reached = []
    with time_limit(deadline, 0.2):
        with pytest.raises(LimitExceeded, match="longer than 0.2 s"):
            with time_limit(deadline, 0.2):
                while True:
                    time.sleep(0.01)
        reached.append("after the nested step")
    assert reached == ["after the nested step"]


def test_a_case_that_outruns_its_limit_while_judged_is_recorded_as_a_limit():
    # the statement runs past the deadline: outcome "limit" naming the seconds, the
    # complex still built and hashed (what the record said before the one-timer change)
    from verifier.claims.evaluate import Limits
    from verifier.claims.loader import load_text
    from verifier.run.cases import evaluate_case, plan
    text = ('[[claim]]\nname = "slow"\nstatement = "sum(x for x in range(10000) for y in '
            'range(10000)) >= 0"\nsource = "none"\n  [[claim.over]]\n  family = "catalog"\n'
            '  names = ["simplex-boundary-3"]\n')
    claim = load_text(text, "slow.toml")[0]
    case_id = next(iter(plan(claim)))
    record = evaluate_case(claim, case_id, Limits(seconds=0.3))
    assert record["outcome"] == "limit" and "seconds" in record["message"]
    assert record["complex_hash"]


def test_flag_complex_of_masks_equals_graph_complex():
    # reference: graph_complex on the edge list of the same graph (tested above against
    # networkx)
    from verifier.families.family import flag_complex_of_masks
    rng = random.Random(41)
    for _ in range(300):
        n = rng.randint(0, 12)
        edges = gnp_edges(rng, n, rng.random())
        above = [sum(1 << v for u2, v in edges if u2 == u) for u in range(n)]
        K = flag_complex_of_masks(above, "test")
        L = graph_complex(n, edges, True, "test")
        assert K == L and K.vertex_masks().tolist() == L.vertex_masks().tolist()
    with pytest.raises(FamilyError, match=r"case Z: the neighbours above vertex 1 must be"):
        flag_complex_of_masks([0b10, 0b1, 0], "case Z")      # vertex 0 is below vertex 1
    with pytest.raises(FamilyError, match="case Z: the neighbours above vertex 0"):
        flag_complex_of_masks([0b1000, 0, 0], "case Z")      # vertex 3 does not exist

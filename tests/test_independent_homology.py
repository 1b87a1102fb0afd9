"""Integer homology on the independent (flint-free) path, and its discrete-Morse witnesses.

What is checked, and against what:

1. published integer homology of classic triangulations (sources beside each check),
   computed three ways on the independent side: Smith normal form of the full boundary
   matrices, a verified witness of our own collapse matching, and a verified witness
   from the main backend;
2. invariant factors against sympy's Smith normal form, run in a process with
   ``SYMPY_GROUND_TYPES=python`` that never loads python-flint;
3. the claim functions ``homology``, ``torsion`` and ``betti`` of the independent backend
   on complexes of 10^4 simplices or more, with and without a witness;
4. tampered witnesses, each rejected with its own message;
5. the re-check process, handed witnesses by the checking process, never loads flint.
"""

from __future__ import annotations

import ast
import copy
import json
import os
import random
import subprocess
import sys
from pathlib import Path

import pytest

from verifier.complex import Complex
from verifier.families import catalog
from verifier.independent import claims as independent
from verifier.independent import homology as hom
from verifier.independent.homology import WitnessError, verify_witness
from verifier.operations import refine

ROOT = Path(__file__).resolve().parent.parent

Z, Z2 = (1, ()), (0, (2,))
ZERO = (0, ())


def _main_witness(K: Complex):
    """The main backend's witness, through JSON as it travels; None if not available."""
    try:
        from verifier.invariants import homology_witness
    except ImportError:
        return None
    return json.loads(json.dumps(homology_witness(K)))


def _three_ways(K: Complex) -> set:
    """Homology by Smith normal form, by our collapse witness, by the main witness."""
    answers = {hom.homology_by_smith(K.facets),
               verify_witness(K.facets, json.loads(json.dumps(hom.collapse_witness(K.facets))))
               .homology}
    witness = _main_witness(K)
    if witness is not None:
        answers.add(verify_witness(K.facets, witness).homology)
    return answers


# ------------------------------------------------------- (1) published homology
PUBLISHED = [
    # RP^2: H_0 = Z, H_1 = Z/2, H_2 = 0.  Hatcher, Algebraic Topology (2002), sec. 2.2,
    # cellular homology of RP^n; triangulation: the 6-vertex hemi-icosahedron (catalog).
    ("projective-plane-6", (Z, Z2, ZERO)),
    # Klein bottle: H_1 = Z + Z/2, H_2 = 0.  Hatcher, Algebraic Topology, sec. 2.1/2.2
    # (cellular chain complex of the square with its sides identified); triangulation:
    # Cervone, Geom. Dedicata 50 (1994).
    ("klein-bottle-8", (Z, (1, (2,)), ZERO)),
    # Torus: H = (Z, Z^2, Z).  Hatcher, Algebraic Topology, sec. 2.1 (Example 2.3);
    # Moebius-Csaszar 7-vertex torus.
    ("torus-7", (Z, (2, ()), Z)),
    # RP^3 = L(2, 1): (Z, Z/2, 0, Z).  Hatcher, sec. 2.2 (RP^n); Walkup's 11 vertices.
    ("projective-space-3-11", (Z, Z2, ZERO, Z)),
    # Lens spaces L(p, q): H_1 = Z/p, H_3 = Z (orientable), H_2 = 0.  Hatcher, Algebraic
    # Topology, sec. 2.2, Example 2.43 (cellular homology of lens spaces).
    ("lens-3-1", (Z, (0, (3,)), ZERO, Z)),
    ("lens-5-2", (Z, (0, (5,)), ZERO, Z)),
    ("lens-7-3", (Z, (0, (7,)), ZERO, Z)),
    # Poincare homology sphere: the homology of S^3.  Bjoerner & Lutz, Exp. Math. 9
    # (2000) 275-289 (16-vertex triangulation); H_1 = abelianised binary icosahedral
    # group = 0 (perfect group; from memory).
    ("poincare-sphere-16", (Z, ZERO, ZERO, Z)),
    # CP^2: (Z, 0, Z, 0, Z).  Kuehnel & Banchoff, Math. Intelligencer 5 (1983) 11-22;
    # Hatcher, sec. 2.2 (cellular homology of CP^n).
    ("complex-projective-plane-9", (Z, ZERO, Z, ZERO, Z)),
    # Dunce hat: contractible, not collapsible.  Zeeman, Topology 2 (1963); Benedetti &
    # Lutz, Exp. Math. 23 (2014).
    ("dunce-hat-8", (Z, ZERO, ZERO)),
]


@pytest.mark.parametrize("name, expected", PUBLISHED)
def test_published_integer_homology_three_independent_ways(name, expected):
    assert _three_ways(catalog.complex(name)) == {expected}


def test_the_catalog_records_agree_with_the_verified_homology():
    # verifier/families/data/triangulations.json records betti_Q and torsion with a source
    # for each entry (Lutz's library, Hatcher, Kuehnel-Banchoff, ...).
    data = json.loads((ROOT / "verifier" / "families" / "data"
                       / "triangulations.json").read_text())
    for entry in data["entries"]:
        K = catalog.complex(entry["id"])
        expected = tuple((b, tuple(t)) for b, t in zip(entry["betti_Q"], entry["torsion"]))
        witness = json.loads(json.dumps(hom.collapse_witness(K.facets)))
        assert verify_witness(K.facets, witness).homology == expected, entry["id"]


@pytest.mark.parametrize("name, times, expected", [
    # Homology is a homeomorphism invariant and |sd K| = |K| (Munkres, Elements of
    # Algebraic Topology, sec. 15-17): refinements keep the published groups above.
    ("klein-bottle-8", 3, (Z, (1, (2,)), ZERO)),          # 10,368 simplices
    ("projective-plane-6", 4, (Z, Z2, ZERO)),             # 38,886 simplices
    ("lens-3-1", 1, (Z, (0, (3,)), ZERO, Z)),             # 30,176 simplices
])
def test_refined_complexes_of_ten_thousand_simplices_and_more(name, times, expected):
    K = refine(catalog.complex(name), times)
    assert len(K) >= hom.WITNESS_THRESHOLD
    mine = verify_witness(K.facets, json.loads(json.dumps(hom.collapse_witness(K.facets))))
    assert mine.homology == expected
    witness = _main_witness(K)
    if witness is not None:
        assert verify_witness(K.facets, witness).homology == expected


def test_betti_numbers_over_z_p_follow_the_universal_coefficient_theorem():
    # b_k(Z/p) = rank H_k + #{torsion of H_k divisible by p} + #{... of H_(k-1)}
    # (Hatcher, Algebraic Topology, sec. 3.A, universal coefficients); compared with the
    # ranks modulo p of the full boundary matrices (verifier.independent.compute).
    from verifier.independent.compute import betti_numbers, simplices_of
    for name in ("projective-plane-6", "klein-bottle-8", "lens-5-2", "lens-3-1"):
        K = catalog.complex(name)
        morse = verify_witness(K.facets, hom.collapse_witness(K.facets))
        simplices = simplices_of(K.facet_labels())[1]
        for p in (2, 3, 5):
            groups = morse.homology
            ucf = tuple(r + sum(t % p == 0 for t in tor)
                        + (sum(t % p == 0 for t in groups[k - 1][1]) if k else 0)
                        for k, (r, tor) in enumerate(groups))
            assert morse.betti(p) == ucf == betti_numbers(simplices, p), (name, p)
        assert morse.betti(0) == betti_numbers(simplices), name


# ------------------------------------------------ (2) against sympy, without flint
_SYMPY_CHILD = r"""
import json, sys
class NoFlint:
    def find_spec(self, name, path=None, target=None):
        if name == "flint" or name.startswith("flint."):
            raise ImportError("flint refused")
sys.meta_path.insert(0, NoFlint())
from sympy import Matrix, ZZ
from sympy.matrices.normalforms import invariant_factors
from sympy.external.gmpy import GROUND_TYPES
out = []
for shape, entries in json.loads(sys.stdin.read()):
    M = Matrix.zeros(*shape)
    for i, j, v in entries:
        M[i, j] = v
    factors = invariant_factors(M, domain=ZZ) if shape[0] and shape[1] else ()
    out.append([abs(int(d)) for d in factors if d != 0])
print(json.dumps({"factors": out, "ground_types": GROUND_TYPES,
                  "flint": "flint" in sys.modules}))
"""


def _random_complexes(count: int, seed: int) -> list[Complex]:
    rng = random.Random(seed)
    found = []
    while len(found) < count:
        n = rng.randint(4, 8)
        facets = [rng.sample(range(n), rng.randint(2, 4)) for _ in range(rng.randint(2, 9))]
        found.append(Complex.from_facets(facets))
    return found


def test_invariant_factors_agree_with_sympys_smith_normal_form_without_flint():
    # sympy's invariant_factors (Smith normal form over ZZ), in a process where sympy
    # uses python ground types and python-flint cannot load: an independent reference.
    names = ["projective-plane-6", "klein-bottle-8", "dunce-hat-8", "rudin-ball-14",
             "complex-projective-plane-9"]
    complexes = [catalog.complex(n) for n in names] + _random_complexes(40, seed=7)
    matrices, ours = [], []
    for K in complexes:
        tables = hom.tables_from_facets(K.facets)
        for k, rows in hom._simplicial_boundaries(tables).items():
            shape = (len(tables.arrays[k - 1]), len(tables.arrays[k]))
            matrices.append([shape, [[i, j, v] for i, row in enumerate(rows)
                                     for j, v in row.items()]])
            ours.append(list(hom.invariant_factors(rows)))
    # some matrices with non-unit invariant factors, not from complexes
    rng = random.Random(3)
    for _ in range(30):
        n, m = rng.randint(1, 6), rng.randint(1, 6)
        rows = [{j: rng.choice([-6, -4, -2, 0, 0, 3, 4, 9]) for j in range(m)} for _ in range(n)]
        rows = [{j: v for j, v in r.items() if v} for r in rows]
        matrices.append([(n, m), [[i, j, v] for i, r in enumerate(rows) for j, v in r.items()]])
        ours.append(list(hom.invariant_factors(rows)))
    env = dict(os.environ, SYMPY_GROUND_TYPES="python")
    done = subprocess.run([sys.executable, "-c", _SYMPY_CHILD], input=json.dumps(matrices),
                          capture_output=True, text=True, env=env, check=True)
    answer = json.loads(done.stdout)
    assert answer["ground_types"] == "python" and not answer["flint"]
    assert answer["factors"] == ours
    assert any(d > 1 for factors in ours for d in factors)      # torsion was exercised


def test_torsion_of_small_complexes_matches_sympys_invariant_factors():
    # torsion(K, k) = invariant factors > 1 of d_(k+1) (Munkres, Elements of Algebraic
    # Topology, sec. 11), the factors from sympy as above, flint-free.
    complexes = [catalog.complex(n) for n in ("projective-plane-6", "klein-bottle-8",
                                             "lens-3-1")]
    matrices = []
    for K in complexes:
        tables = hom.tables_from_facets(K.facets)
        for k, rows in hom._simplicial_boundaries(tables).items():
            shape = (len(tables.arrays[k - 1]), len(tables.arrays[k]))
            matrices.append([shape, [[i, j, v] for i, row in enumerate(rows)
                                     for j, v in row.items()]])
    env = dict(os.environ, SYMPY_GROUND_TYPES="python")
    done = subprocess.run([sys.executable, "-c", _SYMPY_CHILD], input=json.dumps(matrices),
                          capture_output=True, text=True, env=env, check=True)
    factors = iter(json.loads(done.stdout)["factors"])
    for K in complexes:
        by_degree = [next(factors) for _ in range(K.dim)]
        for k in range(K.dim + 1):
            expected = tuple(d for d in (by_degree[k] if k < K.dim else []) if d > 1)
            assert independent.torsion(K, k) == expected


# ------------------------------------------------------------ (3) claim functions
def test_claim_functions_answer_from_a_verified_witness_on_large_complexes():
    # Klein bottle refined 3 times (10,368 simplices): H_1 = Z + Z/2 (Hatcher, sec. 2.1),
    # b(Z/2) = (1, 2, 1), b(Q) = (1, 1, 0) (universal coefficients, Hatcher sec. 3.A).
    K = refine(catalog.complex("klein-bottle-8"), 3)
    witness = _main_witness(K) or hom.collapse_witness(K.facets)
    independent.use_witnesses({hom.complex_key(K.labels, K.facets): witness})
    try:
        assert independent.homology(K) == (Z, (1, (2,)), ZERO)
        assert independent.torsion(K, 1) == (2,) and independent.torsion(K, 2) == ()
        assert independent.betti(K, None, 2) == (1, 2, 1)
        assert independent.betti(K) == (1, 1, 0)
        assert independent.betti(K, 1, 3) == 1
    finally:
        independent.use_witnesses(None)


def test_claim_functions_without_a_witness_build_their_own_morse_complex():
    # RP^2 refined 4 times (38,886 simplices): (Z, Z/2, 0), Hatcher sec. 2.2.
    K = refine(catalog.complex("projective-plane-6"), 4)
    independent.use_witnesses(None)
    assert independent.homology(K) == (Z, Z2, ZERO)
    assert independent.betti(K, 2, 2) == 1 and independent.betti(K, 2) == 0


def test_a_rejected_witness_is_a_clear_evaluation_error():
    from verifier.claims.errors import EvaluationError
    K = refine(catalog.complex("klein-bottle-8"), 3)
    witness = copy.deepcopy(_main_witness(K) or hom.collapse_witness(K.facets))
    witness["homology"][1] = [1, []]
    independent.use_witnesses({hom.complex_key(K.labels, K.facets): witness})
    try:
        with pytest.raises(EvaluationError) as caught:
            independent.homology(K)
        assert str(caught.value) == (
            "the homology witness was rejected: claimed homology H_1 = Z but the verified "
            "Morse complex gives H_1 = Z + Z/2")
    finally:
        independent.use_witnesses(None)


# ---------------------------------------------------------------- (4) tampering
def _rp2():
    K = catalog.complex("projective-plane-6")
    return K, json.loads(json.dumps(hom.collapse_witness(K.facets)))


def test_tampered_dropped_pair():
    K, w = _rp2()
    a, b = w["pairs"][-2:]
    del w["pairs"][-2:]
    with pytest.raises(WitnessError, match=rf"^simplex {min(a, b)} \(.*\) is neither in a "
                                           r"pair nor critical$"):
        verify_witness(K.facets, w)


def test_tampered_pair_that_is_not_a_face_relation():
    K, w = _rp2()
    tables = hom.tables_from_facets(K.facets)
    a, b = w["pairs"][0], w["pairs"][1]
    same_dim = [x for x in range(tables.size) if len(tables.simplex(x)) ==
                len(tables.simplex(b)) and not set(tables.simplex(a)) <= set(tables.simplex(x))]
    w["pairs"][1] = same_dim[0]
    with pytest.raises(WitnessError) as caught:
        verify_witness(K.facets, w)
    assert str(caught.value) == (f"pair 0 ({a}, {same_dim[0]}): {tables.simplex(a)} is not "
                                 f"a face of {tables.simplex(same_dim[0])}")
    w["pairs"][1] = a            # a simplex paired with itself: wrong dimension
    with pytest.raises(WitnessError, match=r"^pair 0 .* is not a codimension-one face of"):
        verify_witness(K.facets, w)


def test_tampered_simplex_used_twice():
    K, w = _rp2()
    w["critical"] = sorted(w["critical"] + [w["pairs"][0]])
    with pytest.raises(WitnessError, match=rf"^simplex {w['pairs'][0]} .* occurs more than "
                                           r"once: in pair 0 and critical$"):
        verify_witness(K.facets, w)


def test_tampered_cyclic_matching():
    # The circle 0-1-2 with every vertex matched to the next edge: the gradient path
    # 0 -> [0,1] -> 1 -> [1,2] -> 2 -> [0,2] -> 0 is closed (Forman 1998, sec. 6: such a
    # matching is no discrete gradient).  Positions: vertices 0, 1, 2; edges 3 = [0,1],
    # 4 = [0,2], 5 = [1,2].
    circle = [(0, 1), (1, 2), (0, 2)]
    w = {"scheme": "morse/1", "size": 6, "pairs": [0, 3, 1, 5, 2, 4], "critical": [],
         "boundaries": {}, "homology": [[1, []], [1, []]]}
    with pytest.raises(WitnessError) as caught:
        verify_witness(circle, w)
    message = str(caught.value)
    head = ("the matching is not acyclic: a closed gradient path in dimensions 0-1 runs "
            "through the pairs ")
    assert message.startswith(head)
    named = {tuple(int(x) for x in pair.strip("()").split(", "))
             for pair in message[len(head):].split("), (")}
    assert named == {(0, 3), (1, 5), (2, 4)}


def test_tampered_cyclic_matching_in_dimensions_one_and_two():
    # On a closed surface the triangles around a vertex v form a cycle t_0, ..., t_5,
    # consecutive ones sharing the edge e_i = t_(i-1) & t_i through v (Munkres, sec. 35:
    # the link of a vertex is a circle).  Pairing e_i with t_i gives the closed gradient
    # path e_0, t_0, e_1, t_1, ..., back to e_0; every cell stays covered exactly once,
    # so only the acyclicity check can object.
    K = catalog.complex("torus-7")
    tables = hom.tables_from_facets(K.facets)
    position = {tables.simplex(x): x for x in range(tables.size)}
    around = [t for t in position if len(t) == 3 and 0 in t]
    cycle = [around.pop(0)]
    while around:
        nxt = next(t for t in around if len(set(t) & set(cycle[-1])) == 2)
        around.remove(nxt)
        cycle.append(nxt)
    assert len(set(cycle[0]) & set(cycle[-1])) == 2                 # it closes up
    pairs = [(position[tuple(sorted(set(cycle[i - 1]) & set(cycle[i])))], position[cycle[i]])
             for i in range(len(cycle))]
    used = {x for pair in pairs for x in pair}
    w = {"scheme": "morse/1", "size": tables.size,
         "pairs": [x for pair in pairs for x in pair],
         "critical": [x for x in range(tables.size) if x not in used],
         "boundaries": {}, "homology": []}
    with pytest.raises(WitnessError) as caught:
        verify_witness(K.facets, w)
    head = ("the matching is not acyclic: a closed gradient path in dimensions 1-2 runs "
            "through the pairs ")
    assert str(caught.value).startswith(head)
    named = {tuple(int(x) for x in pair.strip("()").split(", "))
             for pair in str(caught.value)[len(head):].split("), (")}
    assert named == set(pairs)


def test_tampered_morse_boundary_entry():
    # RP^2's Morse complex has one critical cell in each dimension and D_2 = (+-2):
    # H_1 = Z/2 (Hatcher, sec. 2.2).  A changed entry is caught before any homology.
    K, w = _rp2()
    [[i, j, v]] = w["boundaries"]["2"]
    assert abs(v) == 2
    w["boundaries"]["2"] = [[i, j, 4 * v // abs(v)]]
    with pytest.raises(WitnessError) as caught:
        verify_witness(K.facets, w)
    assert str(caught.value).startswith(f"Morse boundary D_2 entry ({i}, {j}) (critical "
                                        "cells ")
    assert str(caught.value).endswith(f"the witness says {4 * v // abs(v)}, the gradient "
                                      f"paths give {v}")
    w["boundaries"]["2"] = []
    with pytest.raises(WitnessError, match=r"the witness says 0, the gradient paths give"):
        verify_witness(K.facets, w)


def test_tampered_claimed_homology():
    K, w = _rp2()
    w["homology"][1] = [0, [3]]
    with pytest.raises(WitnessError) as caught:
        verify_witness(K.facets, w)
    assert str(caught.value) == ("claimed homology H_1 = Z/3 but the verified Morse complex "
                                 "gives H_1 = Z/2")
    w["homology"] = [[1, []], [0, [2]]]              # H_2 left out
    with pytest.raises(WitnessError, match=r"^claimed homology H_2 = nothing"):
        verify_witness(K.facets, w)


def test_tampered_header_fields():
    K, w = _rp2()
    with pytest.raises(WitnessError, match=r"^the witness is for 30 simplices, the complex "
                                           r"has 31$"):
        verify_witness(K.facets, dict(w, size=30))
    with pytest.raises(WitnessError, match=r"^unknown witness scheme 'morse/0'"):
        verify_witness(K.facets, dict(w, scheme="morse/0"))
    with pytest.raises(WitnessError, match=r"^the witness has no field 'pairs'$"):
        verify_witness(K.facets, {k: v for k, v in w.items() if k != "pairs"})
    with pytest.raises(WitnessError, match=r"^pairs\[0\] = 31 is not a simplex"):
        verify_witness(K.facets, dict(w, pairs=[31] + w["pairs"][1:]))


def test_tampering_is_caught_on_a_large_witness_of_the_main_backend():
    K = refine(catalog.complex("lens-3-1"), 1)                # 30,176 simplices
    witness = _main_witness(K)
    if witness is None:
        pytest.skip("the main backend has no homology_witness yet")
    assert verify_witness(K.facets, witness).homology == (Z, (0, (3,)), ZERO, Z)
    broken = copy.deepcopy(witness)
    broken["pairs"][2], broken["pairs"][4] = broken["pairs"][4], broken["pairs"][2]
    with pytest.raises(WitnessError, match=r"^pair [12] "):
        verify_witness(K.facets, broken)
    entries = witness["boundaries"]["2"] or witness["boundaries"]["1"]
    if entries:
        broken = copy.deepcopy(witness)
        key = "2" if witness["boundaries"]["2"] else "1"
        broken["boundaries"][key][0][2] += 1
        with pytest.raises(WitnessError, match=rf"^Morse boundary D_{key} entry"):
            verify_witness(K.facets, broken)


# ------------------------------------------- (5) hand-over and no python-flint
def test_independent_homology_imports_nothing_outside_the_independent_package():
    # SPEC.md section 8: no flint, no module of the main backend.
    tree = ast.parse((ROOT / "verifier" / "independent" / "homology.py").read_text())
    imported = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            imported |= {alias.name.split(".")[0] for alias in node.names}
        elif isinstance(node, ast.ImportFrom):
            imported.add("." * node.level + (node.module or ""))
    assert imported <= {"__future__", "hashlib", "json", "dataclasses", "itertools", "math",
                        "numpy", ".compute"}, imported


def test_the_recheck_process_verifies_handed_over_witnesses_without_flint():
    from verifier.certificates import _witnesses
    K = refine(catalog.complex("klein-bottle-8"), 3)
    claim = {"statement": "torsion(K, 1) == [2] and homology(K)[1][0] == 1", "where": None}
    witnesses = _witnesses(claim, [K])
    if not witnesses:
        pytest.skip("the main backend has no homology_witness yet")
    assert list(witnesses) == [hom.complex_key(K.labels, K.facets)]
    tampered = copy.deepcopy(witnesses)
    next(iter(tampered.values()))["homology"][1] = [1, []]
    task = {"statement": claim["statement"], "where": None,
            "variables": {"K": K.facet_labels()}}
    run = independent.recheck_run([dict(task, witnesses=witnesses),
                                   dict(task, witnesses=tampered)])
    good, bad = run.results
    assert good["outcome"] == "holds"
    # the tampered witness reached the process under the right key and was rejected
    assert bad["outcome"] == "error"
    assert "the homology witness was rejected: claimed homology H_1 = Z but" in bad["message"]
    assert run.report["flint_in_sys_modules"] is False
    assert run.report["flint_imports_refused"] == []


def test_witnesses_are_only_computed_for_homology_claims_on_large_complexes():
    from verifier.certificates import _witnesses
    big = refine(catalog.complex("klein-bottle-8"), 3)
    small = catalog.complex("klein-bottle-8")
    assert _witnesses({"statement": "euler(K) == 0"}, [big]) == {}
    assert _witnesses({"statement": "betti(K, 1) == 1"}, [small]) == {}


def test_malformed_witness_field_is_refused_before_a_process_starts():
    with pytest.raises(independent.RecheckInputError) as caught:
        independent.validate_tasks([{"statement": "euler(K) == 1", "variables": {"K": [[1]]},
                                     "witnesses": [1]}])
    assert str(caught.value) == ("task 0: 'witnesses' must map complex keys to witness "
                                 "objects")

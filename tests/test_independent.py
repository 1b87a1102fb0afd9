"""The independent exact backend: it never loads python-flint, and it agrees with the main one.

``verifier.independent`` recomputes invariants in a worker process running sympy with
python ground types and plain Python arithmetic.  These tests check (1) that the worker
really runs without python-flint, (2) that on 200 seeded random complexes (dimension
<= 3, at most 7 vertices) every quantity agrees entry by entry with the main backend
(``verifier.invariants`` / ``verifier.exact``, which use python-flint), and (3) small
cases computed by hand.
"""

from __future__ import annotations

import importlib.util
import json
import os
import random
import subprocess
import sys
import time
from fractions import Fraction
from pathlib import Path

import pytest

from verifier import exact
from verifier import invariants as inv
from verifier.complex import Complex
from verifier.independent import (IndependentCheckError, IndependentInputError, recompute,
                                  run)
from verifier.independent import compute

ROOT = Path(__file__).resolve().parent.parent
ALL = ["simplices", "f_vector", "connection", "green", "det", "charpoly", "signature",
       "betti", "betti_mod_2", "betti_mod_3", "euler", "wu"]


def _worker(request: str, env_changes: dict) -> subprocess.CompletedProcess:
    env = dict(os.environ)
    for name, value in env_changes.items():
        if value is None:
            env.pop(name, None)
        else:
            env[name] = value
    env["PYTHONPATH"] = os.pathsep.join([str(ROOT), env.get("PYTHONPATH", "")])
    return subprocess.run([sys.executable, "-m", "verifier.independent.worker"],
                          input=request, capture_output=True, text=True, env=env,
                          cwd=str(ROOT), timeout=120)


# ------------------------------------------------------------ (1) no python-flint
def test_python_flint_is_installed_so_the_independence_tests_mean_something():
    # sympy switches to python-flint only when it is importable (sympy documentation,
    # "Ground types"); if it were absent, the tests below would pass trivially.
    assert importlib.util.find_spec("flint") is not None


@pytest.mark.parametrize("ground_types", ["python", "flint", None])
def test_worker_runs_sympy_with_python_ground_types_and_never_loads_flint(ground_types):
    # Whatever the caller's environment says (even SYMPY_GROUND_TYPES=flint, or nothing),
    # the worker must compute with sympy's pure-Python ground types and end without
    # 'flint' in sys.modules.  Requirement of SPEC.md section 8; no outside source.
    request = json.dumps({"tasks": [
        {"facets": [[1, 2, 3], [3, 4]], "compute": ["green", "det", "charpoly", "signature"]},
        {"facets": [[1, 2], [2, 3], [1, 3]], "compute": ["det", "betti", "betti_mod_2"]},
        {"facets": [[0, 1, 2, 3]], "compute": ["charpoly", "green"]},
    ]})
    completed = _worker(request, {"SYMPY_GROUND_TYPES": ground_types})
    assert completed.returncode == 0, completed.stdout + completed.stderr
    answer = json.loads(completed.stdout)
    report = answer["report"]
    assert report["flint_in_sys_modules"] is False
    assert report["flint_imports_refused"] == []
    assert report["sympy_loaded"] is True
    assert report["sympy_ground_types"] == "python"
    assert len(answer["results"]) == 3
    # connection matrix of the 3-simplex: 15 simplices, determinant prod (-1)^dim = -1
    # (O. Knill, On Fredholm determinants in topology, arXiv:1612.08229, 2016)
    assert len(answer["results"][2]["green"]) == 15


def test_client_report_confirms_python_ground_types():
    # Same requirement through the client API (SPEC.md section 8).
    outcome = run([{"facets": [[1, 2, 3]], "compute": ["det", "green"]}])
    assert outcome.report["flint_in_sys_modules"] is False
    assert outcome.report["sympy_ground_types"] == "python"


def test_importing_the_package_loads_neither_flint_nor_sympy():
    # The parent process must stay free to run the main backend; importing the client
    # may not drag in sympy (whose ground types would then be fixed) or python-flint.
    code = ("import json, sys, verifier.independent; "
            "print(json.dumps(['flint' in sys.modules, 'sympy' in sys.modules]))")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    completed = subprocess.run([sys.executable, "-c", code], capture_output=True,
                               text=True, env=env, cwd=str(ROOT), timeout=60)
    assert completed.returncode == 0, completed.stderr
    assert json.loads(completed.stdout) == [False, False]


def test_sympy_functions_refuse_to_run_where_flint_is_loaded():
    # This test process has loaded python-flint (through verifier.exact), so a direct
    # call would not be independent; the backend must refuse rather than compute.
    assert "flint" in sys.modules
    with pytest.raises(compute.IndependenceBroken, match="python-flint is loaded"):
        compute.determinant([[1]])


# ------------------------------------------------- (2) agreement with the main backend
def _random_facets(rng: random.Random) -> list[list[int]]:
    """At most 7 vertices with labels from 1..30, 1-8 facets of dimension <= 3."""
    n = rng.randint(1, 7)
    vertices = rng.sample(range(1, 31), n)
    return [rng.sample(vertices, rng.randint(1, min(n, 4))) for _ in range(rng.randint(1, 8))]


CASES = [_random_facets(random.Random(seed)) for seed in range(200)]


@pytest.fixture(scope="module")
def both_backends():
    """Each random complex computed by the main backend and by the independent one."""
    t0 = time.perf_counter()
    main = []
    for facets in CASES:
        K = Complex.from_facets(facets)
        L = inv.connection(K)
        main.append({
            "simplices": [K.label_of(s) for s in K.simplices],
            "f_vector": K.f_vector,
            "connection": L.rows(),
            "green": inv.green(K).rows(),
            "det": exact.det(L),
            "charpoly": list(exact.charpoly(L).coeffs),
            "signature": exact.signature(L),
            "betti": inv.betti(K),
            "betti_mod_2": inv.betti(K, p=2),
            "betti_mod_3": inv.betti(K, p=3),
            "euler": inv.euler(K),
            "wu": inv.wu(K),
        })
    t1 = time.perf_counter()
    outcome = run([{"facets": facets, "compute": ALL} for facets in CASES], timeout=300)
    t2 = time.perf_counter()
    print(f"\n200 random complexes: main backend {t1 - t0:.2f} s, independent backend "
          f"{t2 - t1:.2f} s (worker's own time {outcome.report['seconds']:.2f} s); "
          f"largest complex {max(len(m['simplices']) for m in main)} simplices")
    return main, outcome.results


def test_random_complexes_cover_several_shapes():
    # Not a mathematical identity: the sample should reach every dimension 0..3 and
    # include complexes with a 1-cycle, so that the comparisons below are not vacuous.
    dims = {len(Complex.from_facets(f).f_vector) - 1 for f in CASES}
    assert dims == {0, 1, 2, 3}
    assert sum(inv.betti(Complex.from_facets(f), 1) > 0 for f in CASES) >= 10


@pytest.mark.parametrize("quantity", ALL)
def test_independent_backend_agrees_with_main_backend(both_backends, quantity):
    # Reference: the two backends share no code (python-flint vs. sympy with python
    # ground types and plain Python arithmetic); agreement on every entry is the check.
    main, independent = both_backends
    for number, (ours, theirs) in enumerate(zip(main, independent)):
        assert ours[quantity] == theirs[quantity], (
            f"{quantity} differs on random complex {number} with facets {CASES[number]}")


def test_green_entries_are_integers_and_sum_to_euler_characteristic(both_backends):
    # Unimodularity: det L = prod over simplices of (-1)^dim, so g = L^-1 is integral
    # (O. Knill, On Fredholm determinants in topology, arXiv:1612.08229, 2016); energy
    # theorem: the entries of g sum to chi (O. Knill, The energy of a simplicial complex,
    # Linear Algebra Appl. 600 (2020), arXiv:1907.03369).  Checked on the independent side.
    _, independent = both_backends
    for number, values in enumerate(independent):
        odd = sum(1 for s in values["simplices"] if len(s) % 2 == 0)
        assert values["det"] == (-1) ** odd, number
        assert all(type(e) is int for row in values["green"] for e in row), number
        assert sum(map(sum, values["green"])) == values["euler"], number


def test_signature_counts_even_and_odd_simplices(both_backends):
    # L has as many positive eigenvalues as even-dimensional simplices and as many
    # negative ones as odd-dimensional simplices (O. Knill, One can hear the Euler
    # characteristic of a simplicial complex, arXiv:1711.09527, 2017).
    _, independent = both_backends
    for number, values in enumerate(independent):
        f = values["f_vector"]
        assert values["signature"] == (sum(f[0::2]), sum(f[1::2]), 0), number


def test_inertia_agrees_with_descartes_rule_on_the_charpoly(both_backends):
    # Two exact routes to the inertia of a symmetric matrix: Sylvester's law of inertia
    # (congruence elimination) and Descartes' rule of signs, exact for real-rooted
    # polynomials (D. R. Curtiss, Ann. of Math. 19 (1918); details from memory).
    _, independent = both_backends
    for number, values in enumerate(independent):
        assert compute.descartes_signature(values["charpoly"]) == values["signature"], number


# ------------------------------------------------------------- (3) hand-checked cases
def test_single_edge_by_hand():
    # Order v1, v2, e.  L = [[1,0,1],[0,1,1],[1,1,1]] by definition; det L = -1 (one
    # odd-dimensional simplex; unimodularity theorem, O. Knill, arXiv:1612.08229, 2016);
    # the inverse below was multiplied out by hand (L g = I); its entries sum to
    # chi = 2 - 1 = 1 (energy theorem, O. Knill, The energy of a simplicial complex,
    # Linear Algebra Appl. 600 (2020), arXiv:1907.03369).  charpoly by hand: trace 3,
    # principal 2x2 minors 1 + 0 + 0, det -1, so x^3 - 3x^2 + x + 1.
    (values,) = recompute([{"facets": [[1, 2]], "compute": ALL}])
    assert values["simplices"] == [(1,), (2,), (1, 2)]
    assert values["connection"] == [[1, 0, 1], [0, 1, 1], [1, 1, 1]]
    assert values["det"] == -1
    assert values["green"] == [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]
    assert sum(map(sum, values["green"])) == values["euler"] == 1
    assert values["charpoly"] == [1, 1, -3, 1]
    assert values["signature"] == (2, 1, 0)
    # Wu characteristic by enumeration: 3 diagonal pairs (+1 each) and 4 ordered
    # vertex-edge pairs (-1 each) give -1 (definition: O. Knill, arXiv:1803.06788, 2018).
    assert values["wu"] == -1
    assert values["betti"] == values["betti_mod_2"] == (1, 0)


def test_small_complexes_by_hand():
    # Homology of a point, circle, 2-sphere (boundary of the tetrahedron) and the real
    # projective plane on 6 vertices: H_1(RP^2; Z) = Z/2, H_2 = 0, so over Q the Betti
    # numbers are (1, 0, 0) and over Z/2 they are (1, 1, 1) by universal coefficients
    # (J. R. Munkres, Elements of Algebraic Topology, 1984, sections 6 and 53; from memory).
    # The 6-vertex RP^2 (hemi-icosahedron) facet list is written from memory; the test
    # checks it is a closed surface (every edge in exactly two triangles) with chi = 1.
    rp2 = [[1, 2, 3], [1, 3, 4], [1, 4, 5], [1, 5, 6], [1, 2, 6], [2, 3, 5], [2, 4, 5],
           [2, 4, 6], [3, 4, 6], [3, 5, 6]]
    edges = [sorted(e) for t in rp2 for e in ([t[0], t[1]], [t[0], t[2]], [t[1], t[2]])]
    assert all(edges.count(e) == 2 for e in edges) and len(edges) == 30
    names = ["f_vector", "euler", "wu", "betti", "betti_mod_2", "betti_mod_3", "signature"]
    point, circle, sphere, plane = recompute([
        {"facets": [[7]], "compute": names},
        {"facets": [[1, 2], [2, 3], [1, 3]], "compute": names},
        {"facets": [[1, 2, 3], [1, 2, 4], [1, 3, 4], [2, 3, 4]], "compute": names},
        {"facets": rp2, "compute": names},
    ])
    assert point == {"f_vector": (1,), "euler": 1, "wu": 1, "betti": (1,),
                     "betti_mod_2": (1,), "betti_mod_3": (1,), "signature": (1, 0, 0)}
    # circle: Wu by enumeration 3 + 3 + 6 - 12 = 0 (vertex pairs, edge self-pairs,
    # distinct edges all meeting, vertex-edge incidences both ways)
    assert circle["betti"] == circle["betti_mod_2"] == (1, 1)
    assert (circle["euler"], circle["wu"]) == (0, 0)
    assert sphere["f_vector"] == (4, 6, 4) and sphere["euler"] == 2
    assert sphere["betti"] == sphere["betti_mod_2"] == sphere["betti_mod_3"] == (1, 0, 1)
    assert plane["f_vector"] == (6, 15, 10) and plane["euler"] == 1
    assert plane["betti"] == plane["betti_mod_3"] == (1, 0, 0)
    assert plane["betti_mod_2"] == (1, 1, 1)
    # one can hear chi: (#even, #odd) simplices = (6 + 10, 15) (Knill, arXiv:1711.09527)
    assert plane["signature"] == (16, 15, 0)


def test_inertia_handles_zero_pivots():
    # Sylvester's law of inertia (G. H. Golub and C. F. Van Loan, Matrix Computations,
    # 4th ed., 2013, section 8.1; from memory).  Hand computations: [[0,1],[1,0]] has
    # eigenvalues +1 and -1; [[0,1,0],[1,0,0],[0,0,0]] adds a zero eigenvalue;
    # [[0,2,1],[2,0,1],[1,1,0]] has charpoly x^3 - 6x - 4 = (x + 2)(x^2 - 2x - 2), roots
    # -2 and 1 +- sqrt 3, so two negative and one positive; diag(1/2, -3) gives (1, 1, 0).
    assert compute.inertia([[0, 1], [1, 0]]) == (1, 1, 0)
    assert compute.inertia([[0, 1, 0], [1, 0, 0], [0, 0, 0]]) == (1, 1, 1)
    assert compute.inertia([[0, 2, 1], [2, 0, 1], [1, 1, 0]]) == (1, 2, 0)
    assert compute.inertia([[Fraction(1, 2), 0], [0, -3]]) == (1, 1, 0)
    assert compute.inertia([]) == (0, 0, 0)


def test_empty_complex():
    # The empty complex: no simplices, chi = 0, the 0x0 matrix has determinant 1 and
    # characteristic polynomial 1 (common convention, no source).
    (values,) = recompute([{"facets": [], "compute": ["det", "charpoly", "green", "betti",
                                                      "euler", "wu", "signature"]}])
    assert values == {"det": 1, "charpoly": [1], "green": [], "betti": (), "euler": 0,
                      "wu": 0, "signature": (0, 0, 0)}


def test_string_labels_are_sorted_like_the_main_backend():
    # Same (dim, lex) order over sorted labels as verifier.complex; strings sort
    # alphabetically, and integers come before strings when both occur (the project's
    # convention, no outside source).
    for facets in ([["b", "c"], ["a", "c"]], [["x", 2], [10, "x", 3]]):
        (values,) = recompute([{"facets": facets, "compute": ["simplices", "green"]}])
        K = Complex.from_facets(facets)
        assert values["simplices"] == [K.label_of(s) for s in K.simplices]
        assert values["green"] == inv.green(K).rows()


# ------------------------------------------------------------------ failure paths
@pytest.mark.parametrize("task, message", [
    ({"facets": [[1, True]], "compute": ["det"]},
     "task 0: facet 0 has label True; labels must be integers or strings"),
    ({"facets": [[1, 2]], "compute": ["gren"]},
     "task 0: unknown quantity 'gren'; valid names are simplices, f_vector, connection, "
     "green, det, charpoly, signature, betti, euler, wu and betti_mod_P for a prime P"),
    ({"facets": [[1, 2]], "compute": ["betti_mod_4"]},
     "task 0: 'betti_mod_4' needs a prime modulus, and 4 is not prime"),
    ({"facets": [[1, 2, 1]]}, "task 0: facet 0 repeats a vertex: [1, 2, 1]"),
    ({"facets": [[1]], "compute": [], "seed": 3},
     "task 0: unknown field 'seed'; valid fields are 'facets' and 'compute'"),
])
def test_bad_tasks_are_rejected_before_the_worker_starts(task, message):
    with pytest.raises(IndependentInputError) as caught:
        recompute([task])
    assert str(caught.value) == message


def test_worker_rejects_a_request_that_is_not_json():
    completed = _worker("{not json", {"SYMPY_GROUND_TYPES": "python"})
    assert completed.returncode == 2
    answer = json.loads(completed.stdout)
    assert answer["kind"] == "input"
    assert answer["error"].startswith("request is not valid JSON")


def test_worker_reports_bad_tasks_by_position():
    request = json.dumps({"tasks": [{"facets": [[1]], "compute": []},
                                    {"facets": "12", "compute": []}]})
    completed = _worker(request, {"SYMPY_GROUND_TYPES": "python"})
    assert completed.returncode == 2
    assert json.loads(completed.stdout)["error"] == \
        "task 1: 'facets' must be a list of lists of labels"


def test_timeout_becomes_an_independent_check_error():
    with pytest.raises(IndependentCheckError, match=r"exceeded 0\.001 s on a batch of 1 task"):
        recompute([{"facets": [[1, 2, 3]], "compute": ["det"]}], timeout=0.001)


def test_independent_values_travel_between_processes():
    # the evaluator runs heavy linear algebra in a forked child and pickles its result
    # back (verifier.claims.evaluate.stoppable); the independent backend's immutable
    # Matrix and Poly must survive that (common practice, no source)
    import pickle

    from verifier.independent.matrix import Matrix, Poly
    M = Matrix.from_rows([[1, 2], [3, 4]])
    assert pickle.loads(pickle.dumps(M)).rows() == M.rows()
    p = Poly([1, 0, -1])
    assert pickle.loads(pickle.dumps(p)).coeffs == p.coeffs


def test_a_large_green_function_is_re_evaluated_independently():
    # the energy theorem sum(g) = chi (Knill, Linear Algebra Appl. 600 (2020)) on the torus
    # refined twice (1,512 simplices): large enough that the evaluator computes in a child
    # process; chi(torus) = 0 (catalog record)
    from verifier.families import catalog
    from verifier.independent.claims import evaluate_claim_independently
    from verifier.operations import refine

    K = refine(catalog.complex("torus-7"), 2)
    outcome = evaluate_claim_independently("sum(green(K)) == euler(K)",
                                           {"K": K.facet_labels()})
    assert outcome.get("holds") is True, outcome


def test_main_backend_values_travel_between_processes():
    # the same for the main backend's exact matrices and polynomials (common practice)
    import pickle

    from verifier.exact import Matrix, Poly
    p = Poly([1, 0, -1])
    assert pickle.loads(pickle.dumps(p)) == p
    M = Matrix.from_rows([[1, 2], [3, 4]])
    assert pickle.loads(pickle.dumps(M)) == M


def test_large_exact_linear_algebra_comes_back_from_the_child_process():
    # det L and L @ L for the torus refined twice (order 1,512) are computed in the
    # evaluator's child and come back exactly: det L = prod omega = (-1)^(f_1) for a
    # 2-complex (Knill, arXiv:1612.08229), and trace(L @ L) = number of intersecting
    # ordered pairs = sum of the entries of L (L is a 0/1 symmetric matrix)
    from verifier.claims.evaluate import Context, Limits, evaluate
    from verifier.claims.expression import parse
    from verifier.families import catalog
    from verifier.operations import refine

    K = refine(catalog.complex("torus-7"), 2)
    ctx = Context(Limits(seconds=120))
    det = evaluate(parse("det(connection(K))", {"K": "complex"}), {"K": K}, ctx)
    assert det == (-1) ** K.f_vector[1]
    assert evaluate(parse("trace(connection(K) @ connection(K)) == sum(connection(K))",
                          {"K": "complex"}), {"K": K}, Context(Limits(seconds=120)))

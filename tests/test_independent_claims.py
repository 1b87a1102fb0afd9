"""The independent backend of the claim language agrees with the main one, without python-flint.

``verifier.independent.claims.IMPLEMENTATIONS`` provides every function of the claim
language on a code path of its own (plain-Python exact matrices, own combinatorics).
These tests check (1) that it provides exactly the table's names, (2) that a process
importing it and evaluating claims with it never loads python-flint, (3) that on 100
seeded random complexes and the catalog's small entries both backends give the same
values, texts and errors for statements exercising every function, in this process and
through the re-check subprocess, (4) that errors for bad arguments carry the main
backend's messages, and (5) published identities and hand computations on the
independent side alone.
"""

from __future__ import annotations

import ast
import json
import os
import subprocess
import sys
import time
from fractions import Fraction
from pathlib import Path

import pytest
import sympy

from verifier.claims.backend import IMPLEMENTATIONS as MAIN
from verifier.claims.errors import ClaimError, EvaluationError, Undecided
from verifier.claims.enclosure import consistent
from verifier.claims.evaluate import Context, evaluate, evaluate_claim
from verifier.claims.expression import parse
from verifier.claims.functions import FUNCTIONS
from verifier.claims.values import describe_value
from verifier.complex import Complex
from verifier.families import catalog
from verifier.independent import claims as independent
from verifier.independent import matrix as mx
from verifier.independent.claims import IMPLEMENTATIONS as OURS

from .conftest import random_complexes

ROOT = Path(__file__).resolve().parent.parent

# Statements in one complex K: together they call every function of the table (checked
# below), on values of every kind, including combinations the evaluator builds itself
# (matrix powers, polynomial arithmetic, indexing by simplices, quantifiers).
STATEMENTS = [
    "simplices(K)", "vertices(K)", "facets(K)", "dim(K)", "dim(facets(K)[0])", "size(K)",
    "size(star(K, vertices(K)[0]))", "size(connection(K))", "f_vector(K)",
    "sum(omega(x) for x in simplices(K))", "range(dim(K) + 1)",
    "sum((-1) ** k * betti(K, k) for k in range(dim(K) + 1))", "euler(K)", "euler(star(K, vertices(K)[0]))", "wu(K)",
    "connection(K)", "green(K)", "hodge(K)", "signless_hodge(K)", "dirac(K)",
    "boundary_matrix(K, 0)", "boundary_matrix(K, 1)", "boundary_matrix(K, 2)",
    "boundary_matrix(K, dim(K) + 1)", "identity(K)", "identity(3)",
    "transpose(boundary_matrix(K, 1))", "abs(dirac(K))", "abs(1 - euler(K))",
    "det(connection(K))", "det(hodge(K))", "det(connection(K) / 2)",
    "det(dirac(K) + identity(K))", "trace(hodge(K))", "rank(boundary_matrix(K, 1))",
    "rank(dirac(K))", "kernel_dim(hodge(K))",
    "kernel_dim(boundary_matrix(K, 1) @ transpose(boundary_matrix(K, 1)))",
    "charpoly(connection(K))", "charpoly(hodge(K))", "charpoly(dirac(K))",
    "charpoly(green(K) / 3)", "is_reciprocal(charpoly(connection(K)))",
    "is_reciprocal(charpoly(hodge(K)))", "is_reciprocal(charpoly(dirac(K) @ dirac(K)))",
    "signature(connection(K))", "signature(hodge(K) - identity(K))", "positive(green(K))",
    "negative(dirac(K))", "multiplicity(hodge(K), 0)", "multiplicity(connection(K), 1)",
    "multiplicity(connection(K) @ dirac(K), 0)", "zeta(connection(K), 2)",
    "zeta(connection(K), -1)", "zeta(connection(K), 0)", "zeta(green(K) + identity(K), 1)",
    "betti(K)", "betti(K, 1)", "betti(K, 1, 2)", "betti(K, 0, 3)", "betti(K, 7)",
    "betti(K, 1, 2 ** 127 - 1)", "homology(K)", "homology(K)[0]", "torsion(K, 1)",
    "torsion(K, 0)", "torsion(K, 9)", "h_vector(K)", "is_sphere(K)", "is_ball(K)",
    "is_manifold(K)", "is_manifold_with_boundary(K)", "is_closed_manifold(K)",
    "curvature(K, vertices(K)[0])", "sum(curvature(K, v) for v in vertices(K))",
    "index(K, vertices(K)[-1])", "sum(index(K, v) * index(K, v) for v in vertices(K))",
    "star(K, vertices(K)[0])", "star(K, simplices(K)[-1])", "closed_star(K, vertices(K)[0])",
    "link(K, vertices(K)[0])", "link(K, facets(K)[-1])", "unit_sphere(K, vertices(K)[0])",
    "unit_sphere(K, facets(K)[0])", "unit_sphere(K, facets(K)[-1])", "boundary(K)",
    "interior(K)", "euler(interior(K))", "refine(K)", "refine(K, 0)",
    "join(K, skeleton(K, 0))", "cone(K)", "suspension(K)",
    "product(skeleton(K, 1), skeleton(K, 0))", "skeleton(K, 1)", "union(K, K)",
    "union(star(K, vertices(K)[0]), star(K, vertices(K)[-1]))",
    "all(is_closed_manifold(link(K, v)) for v in vertices(K))",
    "connection(K) @ green(K) == identity(K)", "green(K) ** -1 == connection(K)",
    "hodge(K) == dirac(K) @ dirac(K)", "hodge(K) ** 2", "-green(K) * 3 / 2",
    "green(K)[vertices(K)[0], vertices(K)[0]]", "charpoly(hodge(K)) ** 2",
    "charpoly(connection(K)) * 2 - charpoly(connection(K))",
    "green(K) == connection(K)",
]

CERTIFIED = [
    # certified values: enclosures agree when they intersect (each backend at its own
    # precision, by its own method: arb balls here, sympy roots and mpmath intervals there)
    "zeta(connection(K) ** 2, 1/2, 3)", "re(zeta(connection(K), 1/2, 1))",
    "im(zeta(connection(K) ** 2, -1, 1/3))", "abs(zeta(green(K) ** 2, 1, 1))",
    "eigenvalue_enclosures(connection(K))", "eigenvalue_enclosures(hodge(K) + identity(K))[0]",
    "zeta(connection(K) ** 2, 1/2, 3) == zeta(connection(K) ** 2, -1/2, -3)",
    "zeta(connection(K) ** 2, 1/2) > zeta(connection(K) ** 2, -1/2)",
    "zeros_on_axis(connection(skeleton(K, 1)) ** 2, 0, 3)",
    "zeros_in_box(connection(skeleton(K, 1)) ** 2, -1, 1, 0, 3)",
    "free_energy(identity(3), [1/2, 1/4, 1/4], 1)", "free_energy(identity(2), [1, 0], 3)",
    "critical_points(identity(3), 1)",
]

# Bad arguments or impossible requests: each must fail, with the same message, under both
# backends (shapes, singular matrices, non-primes, names that are not simplices, ...).
FAILING = [
    ("det(boundary_matrix(K, 2))", "det: det needs a square matrix, got 4x1"),
    ("trace(boundary_matrix(K, 2))", "trace: trace of a non-square matrix"),
    ("boundary_matrix(K, -1)", "boundary_matrix needs a dimension k >= 0, got -1"),
    ("betti(K, 1, 4)", "betti over Z/p needs a prime p, got 4"),
    ("betti(K, 1, 2 ** 61 + 1)", "betti over Z/p needs a prime p, got 2305843009213693953"),
    ("torsion(K, 1/2)", "torsion needs an integer degree, got 1/2"),
    ("identity(-1)", "identity needs a size n >= 0 or a complex, got -1"),
    ("range(-2)", "range needs an integer from 0 to 10000, got -2"),
    ("refine(K, 5)", "refine takes 0 to 4 refinements, got 5"),
    ("zeta(hodge(K), 1/2)", "zeta: matrix is singular (0 is an eigenvalue)"),
    ("zeros_on_axis(connection(K) ** 2, 0, 1)", "zeros_on_axis: the spectrum is not closed under "
                                           "lambda -> 1/lambda, so zeta_K is not real on the "
                                           "imaginary axis"),
    ("zeros_in_box(connection(K) ** 2, 1, 0, 0, 1)", "zeros_in_box: empty rectangle [1, 0] x [0, 1]"),
    ("eigenvalue_enclosures(connection(K) @ dirac(K))",
     "eigenvalue_enclosures needs a symmetric integer matrix (real eigenvalues)"),
    ("free_energy(K, [1], 1)", "free_energy: p has 1 entries, the matrix has order 9"),
    ("critical_points(K, 0)", "critical_points needs a temperature T > 0, got 0"),
    ("zeta(hodge(K), 1)", "zeta: matrix is singular"),
    ("hodge(K) ** -1", "matrix power -1: matrix is singular"),
    ("signature(connection(K) @ dirac(K))", "signature: signature needs a symmetric matrix"),
    ("signature(boundary_matrix(K, 2))", "signature: signature needs a square matrix, got 4x1"),
    ("star(K, (1, 9))", "[1, 9] is not a simplex of the complex"),
    ("link(K, (1, 4))", "[1, 4] is not a simplex of the complex"),
    ("curvature(K, (1, 2))", "[1, 2] is not a vertex"),
    ("index(K, (9,))", "[9] is not a simplex of the complex"),
    ("skeleton(K, -1)", "skeleton: skeleton dimension must be an integer >= 0, got -1"),
    ("multiplicity(boundary_matrix(K, 2), 0)",
     "multiplicity: multiplicity needs a square matrix, got 4x1"),
    ("connection(K) + boundary_matrix(K, 1)", "matrix +: shapes (9, 9) and (4, 4) differ"),
    ("connection(K) @ boundary_matrix(K, 2)", "matrix @: cannot multiply (9, 9) by (4, 1)"),
    ("boundary_matrix(K, 2) ** 2", "matrix power 2: only a square matrix has powers"),
    # union(K, star(K, (1,))) mixes a complex and a set: refused when it is parsed
    # (tests/test_hardening_language.py), so no backend ever sees it
    ("boundary(K)", "boundary: the boundary is defined for pure complexes (all facets of one "
                    "dimension); this complex has facets of dimensions [1, 2]"),
    ("interior(K)", "interior: the boundary is defined for pure complexes (all facets of one "
                    "dimension); this complex has facets of dimensions [1, 2]"),
    ("cone(K)", "cone: apex label 'apex' is already a vertex label of the complex; "
                "pass another apex label"),
]
# the complex of FAILING: a triangle with a pendant edge and a vertex named 'apex'
FAILING_COMPLEX = Complex.from_facets([[1, 2, 3], [3, "apex"]])

SMALL_CATALOG = [name for name in catalog.names()
                 if len(catalog.complex(name).simplices) <= 60]
RANDOM = random_complexes(100, seed=20261202)


def _agree(ours: tuple, main: tuple) -> bool:
    """Equal outcomes, or two certified values whose enclosures intersect."""
    if tuple(ours) == tuple(main):
        return True
    return ours[0] == main[0] == "value" and consistent(ours[1], main[1])


def _outcome(table, node, env) -> tuple:
    """('value', text), ('undecided', '') or ('error', message): what one backend makes
    of one expression (the two backends word 'not certified at 1024 bits' differently)."""
    try:
        return "value", describe_value(evaluate(node, env, Context(table=table)))
    except Undecided:
        return "undecided", ""
    except ClaimError as error:
        return "error", error.message


def _calls(node) -> set[str]:
    names = {node.function.name} if node.kind == "call" else set()
    for child in node.args:
        names |= _calls(child)
    for _, iterable, conditions in node.loops:
        names |= _calls(iterable)
        for condition in conditions:
            names |= _calls(condition)
    return names


# ------------------------------------------------------------------ (1) the table
def test_independent_table_has_exactly_the_names_of_the_function_table():
    # Requirement of SPEC.md section 8 (a second backend for every function); no outside source.
    assert set(OURS) == set(MAIN) == set(FUNCTIONS)
    assert all(callable(f) for f in OURS.values())


def test_statements_exercise_every_function_of_the_table():
    # Not a mathematical fact: the agreement checks below are only as good as their
    # coverage, so every function must be called by some statement.
    called = set()
    for text in STATEMENTS + CERTIFIED + [text for text, _ in FAILING]:
        called |= _calls(parse(text, {"K": "complex"}))
    assert called == set(FUNCTIONS)


def test_independent_modules_import_nothing_that_loads_python_flint():
    # SPEC.md section 8: the independent path never imports flint; verifier.exact,
    # verifier.invariants, verifier.operations and verifier.claims.backend all do (or may),
    # so none of them may be imported by these modules, directly or by a relative name.
    # (sympy is allowed: the re-check process runs it only with python ground types.)
    forbidden = {"flint", "verifier.exact", "verifier.invariants",
                 "verifier.operations", "verifier.claims.backend"}
    package = "verifier.independent"
    for name in ("claims", "matrix", "recheck", "certified"):
        tree = ast.parse((ROOT / "verifier" / "independent" / f"{name}.py").read_text())
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                targets = [alias.name for alias in node.names]
            elif isinstance(node, ast.ImportFrom):
                base = node.module or ""
                if node.level:
                    parent = package.rsplit(".", node.level - 1)[0] if node.level > 1 else package
                    base = f"{parent}.{base}" if base else parent
                targets = [base] + [f"{base}.{alias.name}" for alias in node.names]
            else:
                continue
            for target in targets:
                assert not any(target == f or target.startswith(f + ".") for f in forbidden), \
                    f"{name}.py imports {target}"


# ------------------------------------------------------- (2) no python-flint at all
_CHILD = r"""
import json, sys

refused = []

class NoFlint:
    def find_spec(self, name, path=None, target=None):
        if name == "flint" or name.startswith("flint."):
            refused.append(name)
            raise ImportError("flint refused")
        return None

sys.meta_path.insert(0, NoFlint())
from verifier.claims.evaluate import Context, evaluate
from verifier.claims.expression import parse
from verifier.claims.values import describe_value
from verifier.claims.errors import ClaimError, Undecided
from verifier.complex import Complex
from verifier.independent.claims import IMPLEMENTATIONS, evaluate_claim_independently

request = json.loads(sys.stdin.read())
texts = []
for facets in request["complexes"]:
    K = Complex.from_facets(facets)
    row = []
    for statement in request["statements"]:
        try:
            value = evaluate(parse(statement, {"K": "complex"}), {"K": K},
                             Context(table=IMPLEMENTATIONS))
            row.append(["value", describe_value(value)])
        except Undecided:
            row.append(["undecided", ""])
        except ClaimError as error:
            row.append(["error", error.message])
    texts.append(row)
claim = evaluate_claim_independently("sum(green(K)) == euler(K)", {"K": [[1, 2, 3], [3, 4]]})
loaded = sorted(m for m in sys.modules if m == "flint" or m.startswith("flint.")
                or m in ("verifier.exact", "verifier.invariants", "verifier.operations",
                         "verifier.claims.backend"))
print(json.dumps({"texts": texts, "loaded": loaded, "refused": refused,
                  "sympy": "sympy" in sys.modules, "claim": claim["holds"]}))
"""


def test_a_process_evaluating_every_function_never_loads_python_flint():
    # SPEC.md section 8: re-checking must not use python-flint.  A fresh process with an
    # import hook that refuses (and records) any attempt to import flint evaluates every
    # statement on two complexes; nothing may even try to load flint or the main backend.
    # Its answers must also equal the main backend's, computed here (the main backend,
    # python-flint based, is the reference: the two share no linear algebra).
    complexes = [[[1, 2, 3], [3, 4], [4, 5], [5, 3]], [[0, 1, 2, 3], [3, 4]]]
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("SYMPY_GROUND_TYPES", None)
    completed = subprocess.run(
        [sys.executable, "-c", _CHILD], input=json.dumps(
            {"complexes": complexes, "statements": STATEMENTS + CERTIFIED}),
        capture_output=True, text=True, env=env, cwd=str(ROOT), timeout=120)
    assert completed.returncode == 0, completed.stderr[-2000:]
    answer = json.loads(completed.stdout)
    assert answer["loaded"] == [] and answer["refused"] == []
    assert answer["claim"] is True   # energy theorem, O. Knill, Linear Algebra Appl. 600 (2020)
    for facets, row in zip(complexes, answer["texts"]):
        K = Complex.from_facets(facets)
        for statement, theirs in zip(STATEMENTS + CERTIFIED, row):
            ours = _outcome(MAIN, parse(statement, {"K": "complex"}), {"K": K})
            assert _agree(tuple(theirs), ours), (facets, statement)


# ------------------------------------------------------ (3) agreement, in process
@pytest.fixture(scope="module")
def agreement():
    """Both backends' outcome for every statement on every test complex, with timings."""
    cases = [(f"random #{i}", K) for i, K in enumerate(RANDOM)] + \
            [(name, catalog.complex(name)) for name in SMALL_CATALOG]
    nodes = [parse(text, {"K": "complex"}) for text in STATEMENTS]
    rows, seconds = [], {"main": 0.0, "independent": 0.0}
    for name, K in cases:
        for text, node in zip(STATEMENTS, nodes):
            t0 = time.perf_counter()
            main = _outcome(MAIN, node, {"K": K})
            t1 = time.perf_counter()
            ours = _outcome(OURS, node, {"K": K})
            seconds["main"] += t1 - t0
            seconds["independent"] += time.perf_counter() - t1
            rows.append((name, text, main, ours))
    print(f"\n{len(cases)} complexes x {len(STATEMENTS)} statements: main backend "
          f"{seconds['main']:.1f} s, independent backend {seconds['independent']:.1f} s")
    return rows


def test_sample_covers_every_dimension_and_both_outcomes(agreement):
    # Not a mathematical fact: the sample must reach dimensions 0..3, include manifolds
    # and non-manifolds, and include statements that fail, so that agreement means something.
    assert {K.dim for K in RANDOM} == {0, 1, 2, 3}
    outcomes = {(text, main) for _, text, main, _ in agreement
                if text in ("is_manifold(K)", "green(K) == connection(K)", "boundary(K)")}
    assert ("is_manifold(K)", ("value", "true")) in outcomes
    assert ("is_manifold(K)", ("value", "false")) in outcomes
    assert ("green(K) == connection(K)", ("value", "false")) in outcomes
    assert any(text == "boundary(K)" and main[0] == "error" for text, main in outcomes)


@pytest.fixture(scope="module")
def certified_agreement():
    """Both backends' outcome for every certified statement on a smaller sample (the
    independent backend's interval arithmetic is slower; each value needs one exact
    characteristic polynomial and its isolated roots)."""
    cases = [(f"random #{i}", K) for i, K in enumerate(RANDOM[:16])] + \
            [(name, catalog.complex(name)) for name in SMALL_CATALOG[:2]]
    rows = []
    for text in CERTIFIED:
        node = parse(text, {"K": "complex"})
        for name, K in cases[:3] if "critical_points" in text else cases:
            rows.append((name, text, _outcome(MAIN, node, {"K": K}),
                         _outcome(OURS, node, {"K": K})))
    return rows


@pytest.mark.parametrize("statement", CERTIFIED)
def test_both_backends_give_intersecting_certified_values(certified_agreement, statement):
    # Reference: the main backend (arb balls from python-flint); the independent one
    # isolates roots with sympy and evaluates with mpmath intervals at 160 bits instead of
    # 128: both enclose the same number, so their enclosures must intersect, and counts,
    # decisions and exact values must be equal
    seen = 0
    for name, text, main, ours in certified_agreement:
        if text == statement:
            seen += 1
            assert _agree(ours, main), f"{statement} on {name}"
    assert seen >= 3


@pytest.mark.parametrize("statement", STATEMENTS)
def test_both_backends_give_the_same_value_or_error(agreement, statement):
    # Reference: the main backend (python-flint through verifier.exact, star formula for
    # the Green function, verifier.invariants and verifier.operations); the independent
    # one shares none of that code, so agreement of every text is the check.
    for name, text, main, ours in agreement:
        if text == statement:
            assert _agree(ours, main), f"{statement} on {name}"


def test_pairs_of_complexes_agree():
    # Operations of two complexes and identities over them.  Reference: the main backend;
    # the identities are 1 - chi(A*B) = (1 - chi A)(1 - chi B) (join; J. Matousek, Using
    # the Borsuk-Ulam Theorem, Springer 2003, sec. 4.2, from memory) and
    # chi(A x B) = chi(A) chi(B) (product; common knowledge).
    statements = ["join(A, B)", "product(A, B)", "union(A, B)", "betti(join(A, B))",
                  "1 - euler(join(A, B)) == (1 - euler(A)) * (1 - euler(B))",
                  "euler(product(A, B)) == euler(A) * euler(B)", "refine(A, 2)",
                  "unit_sphere(refine(A), vertices(refine(A))[-1])"]
    small = random_complexes(24, seed=99, max_vertices=5, max_dim=2, max_facets=4)
    for A, B in zip(small[::2], small[1::2]):
        env = {"A": A, "B": B}
        for text in statements:
            node = parse(text, {"A": "complex", "B": "complex"})
            main, ours = _outcome(MAIN, node, env), _outcome(OURS, node, env)
            assert ours == main, (A.facet_labels(), B.facet_labels(), text)
            if "==" in text:
                assert ours == ("value", "true"), (A.facet_labels(), B.facet_labels(), text)


# ---------------------------------------------------- (3b) agreement, re-check process
CLAIMS = [
    ("sum(green(K)) == euler(K)", None),
    ("charpoly(connection(K)) == charpoly(green(K) ** -1)", None),
    ("green(K) == connection(K)", None),
    ("all(curvature(K, v) == 0 for v in vertices(K))", None),
    ("any(index(K, v) < 0 for v in vertices(K))", None),
    ("betti(K) == betti(refine(K))", "dim(K) <= 2"),
    ("wu(K) == euler(K)", "is_closed_manifold(K)"),
    ("is_reciprocal(charpoly(hodge(K)))", None),
    ("zeta(hodge(K), 1) == 1", None),
]


def test_recheck_process_agrees_with_the_main_backend():
    # The certificate checker's path: one subprocess, SYMPY_GROUND_TYPES=python, and a
    # report that python-flint was not loaded (SPEC.md section 8).  Outcome, exact sides
    # and witness of every claim must equal the main backend's (the reference).
    cases = RANDOM[:30] + [catalog.complex(n) for n in ("torus-7", "projective-plane-6")]
    tasks = [{"statement": s, "where": w, "variables": {"K": K.facet_labels()}}
             for K in cases for s, w in CLAIMS]
    run = independent.recheck_run(tasks, timeout=300)
    assert run.report["flint_in_sys_modules"] is False
    assert run.report["flint_imports_refused"] == []
    assert run.report["sympy_ground_types_requested"] == "python"
    assert run.report["sympy_loaded"] is False or run.report["sympy_ground_types"] == "python"
    outcomes = set()
    for task, theirs in zip(tasks, run.results):
        K = Complex.from_facets(task["variables"]["K"])
        types = {"K": "complex"}
        try:
            if task["where"] and not evaluate(parse(task["where"], types), {"K": K},
                                              Context(table=MAIN)):
                expected = {"outcome": "outside"}
            else:
                o = evaluate_claim(parse(task["statement"], types), {"K": K}, Context(table=MAIN))
                expected = {"outcome": "holds" if o.holds else "fails", "sides": o.sides,
                            "witness": o.witness}
        except EvaluationError as error:
            expected = {"outcome": "error", "message": error.message}
        outcomes.add(expected["outcome"])
        assert {key: theirs.get(key) for key in expected} == expected, task
    assert outcomes == {"holds", "fails", "outside", "error"}


def test_recheck_rejects_malformed_tasks_before_starting():
    with pytest.raises(independent.RecheckInputError) as caught:
        independent.recheck([{"statement": "euler(K) == 1", "variables": {"K": [1, 2]}}])
    assert str(caught.value) == \
        "task 0: variable 'K' must be a list of facets (lists of labels)"
    with pytest.raises(independent.RecheckInputError) as caught:
        independent.recheck([{"statement": "euler(K)", "variables": {}, "seed": 1}])
    assert str(caught.value) == ("task 0: unknown field 'seed'; valid fields are "
                                 "'statement', 'variables', 'where' and 'witnesses'")


def test_recheck_reports_case_errors_per_task_and_reads_tuple_labels():
    # A statement that does not parse and a facet that repeats a vertex are the user's
    # errors, reported per task; a label written as a JSON list is a tuple label (as
    # produced by join and product).  Hand check: the join of two points is an edge, chi = 1.
    results = independent.recheck([
        {"statement": "gren(K)", "variables": {"K": [[1, 2]]}},
        {"statement": "euler(K) == 1", "variables": {"K": [[1, 1]]}},
        {"statement": "euler(K) == 1", "variables": {"K": [[[0, "a"], [1, "b"]]]}},
    ])
    problem = {"holds": None, "outside": False, "sides": [], "witness": None, "evidence": None}
    assert results[0] == dict(problem, outcome="error",
                              message="unknown function 'gren'; did you mean 'green'?")
    assert results[1] == dict(problem, outcome="error",
                              message="building the case: facet 0: repeated vertex in [1, 1]")
    assert results[2]["outcome"] == "holds" and results[2]["holds"] is True


# --------------------------------------------------------- (4) error messages
@pytest.mark.parametrize("statement, message", FAILING)
def test_bad_arguments_give_the_main_backends_message(statement, message):
    # Failure paths must name the problem in the same words under both backends
    # (STYLE.md section 5); the expected text is written out so a change in either shows.
    node = parse(statement, {"K": "complex"})
    env = {"K": FAILING_COMPLEX}
    assert _outcome(MAIN, node, env) == ("error", message)
    assert _outcome(OURS, node, env) == ("error", message)


def test_undecidable_sphere_recognition_says_so():
    # The vertex link at a pole of the suspension of the Poincare homology sphere is that
    # homology sphere, which is not simply connected and hence not a PL 3-sphere, so no
    # collapse of it minus a facet can reach a point and the test cannot decide
    # (J. H. C. Whitehead, Proc. London Math. Soc. 45 (1939); the triangulation's source
    # is in the catalog).  Both backends must say 'could not decide', in the same words.
    P = catalog.complex("poincare-sphere-16")
    node = parse("is_closed_manifold(suspension(K))", {"K": "complex"})
    message = ("is_closed_manifold: could not decide whether a 3-manifold with the homology "
               "of a sphere is a PL sphere (greedy collapse got stuck)")
    with pytest.raises(independent.NotDecided) as caught:
        evaluate(node, {"K": P}, Context(table=OURS))
    assert caught.value.message == message
    assert _outcome(MAIN, node, {"K": P}) == ("error", message)


# ------------------------------------------- (5) identities on the independent side
IDENTITIES = [
    # Gauss-Bonnet for Levitt curvature: N. Levitt, Discrete Comput. Geom. 7 (1992) 59-67
    "sum(curvature(K, v) for v in vertices(K)) == euler(K)",
    # Poincare-Hopf: O. Knill, arXiv:1201.1162 (2012)
    "sum(index(K, v) for v in vertices(K)) == euler(K)",
    # energy theorem: O. Knill, Linear Algebra Appl. 600 (2020) 96-129
    "sum(green(K)) == euler(K)",
    # unimodularity: O. Knill, arXiv:1612.08229 (2016)
    "det(connection(K)) == (-1) ** sum(1 for x in simplices(K) if dim(x) % 2 == 1)",
    # one can hear chi: O. Knill, arXiv:1711.09527 (2017)
    "positive(connection(K)) - negative(connection(K)) == euler(K)",
    # Hodge theorem: the kernel of H has dimension b_0 + b_1 + ... (Munkres 1984, from memory)
    "kernel_dim(hodge(K)) == sum(betti(K))",
    # Euler-Poincare: J. R. Munkres, Elements of Algebraic Topology (1984) sec. 22
    "euler(K) == sum((-1) ** k * betti(K, k) for k in range(dim(K) + 1))",
    # Wu characteristic as a double sum equals sum over z of omega(z) chi(St z)^2:
    # O. Knill, arXiv:1601.04533 (2016)
    "wu(K) == sum(omega(z) * euler(star(K, z)) ** 2 for z in simplices(K))",
    # barycentric refinement is a homeomorphism: Munkres (1984) sec. 15
    "euler(refine(K)) == euler(K) and betti(refine(K)) == betti(K)",
    # hydrogen identity for 1-dimensional complexes, L - L^-1 = |H|: O. Knill,
    # arXiv:1803.01464 (2018)
    "dim(K) > 1 or connection(K) - green(K) == signless_hodge(K)",
    # the boundary of a boundary is zero: Munkres (1984) sec. 5
    "rank(boundary_matrix(K, 1) @ boundary_matrix(K, 2)) == 0",
]


def test_published_identities_hold_on_the_independent_side():
    # Each identity, with its source above, on every random complex and the small catalog.
    cases = RANDOM + [catalog.complex(name) for name in SMALL_CATALOG]
    for text in IDENTITIES:
        node = parse(text, {"K": "complex"})
        for K in cases:
            assert evaluate(node, {"K": K}, Context(table=OURS)) is True, (text, K.facet_labels())


def test_catalog_manifolds_are_recognised():
    # The catalog's published descriptions (its data file names each source): torus,
    # projective plane and Klein bottle are closed surfaces; the Moebius strip and the
    # cube ball have boundary; the dunce hat is not a manifold (edge in three triangles).
    # Betti numbers: torus (1, 2, 1); RP^2 over Q (1, 0, 0) and over Z/2 (1, 1, 1)
    # (Munkres 1984, sec. 6 and 53, from memory).
    def value(text, name):
        return evaluate(parse(text, {"K": "complex"}), {"K": catalog.complex(name)},
                        Context(table=OURS))

    for name in ("torus-7", "projective-plane-6", "klein-bottle-8", "sphere-3"):
        assert value("is_closed_manifold(K)", name) is True, name
    for name in ("moebius-strip-5", "cube-ball-8", "ball-3"):
        assert value("is_manifold_with_boundary(K)", name) is True, name
    assert value("is_manifold(K)", "dunce-hat-8") is False
    assert value("betti(K)", "torus-7") == (1, 2, 1)
    assert value("betti(K)", "projective-plane-6") == (1, 0, 0)
    assert value("(betti(K, 0, 2), betti(K, 1, 2), betti(K, 2, 2))", "projective-plane-6") == (1, 1, 1)


def test_an_edge_by_hand():
    # Order v1, v2, e.  L = [[1,0,1],[0,1,1],[1,1,1]] by definition; its inverse, multiplied
    # out by hand, is [[0,-1,1],[-1,0,1],[1,1,-1]]; charpoly by hand: trace 3, principal
    # 2x2 minors 1 + 0 + 0, det -1, so x^3 - 3x^2 + x + 1; signature (2, 1, 0) (two even,
    # one odd simplex: Knill, arXiv:1711.09527); Wu = 3 - 4 = -1 (Knill, arXiv:1601.04533);
    # curvature at a vertex 1 - 1/2 (Levitt 1992).
    K = Complex.from_facets([[1, 2]])
    assert independent.connection(K).matrix.rows() == [[1, 0, 1], [0, 1, 1], [1, 1, 1]]
    assert independent.green(K).matrix.rows() == [[0, -1, 1], [-1, 0, 1], [1, 1, -1]]
    assert str(mx.charpoly(independent.connection(K).matrix)) == "x^3 - 3*x^2 + x + 1"
    assert mx.signature(independent.connection(K).matrix) == (2, 1, 0)
    assert independent.wu(K) == -1
    assert independent.curvature(K, (1,)) == Fraction(1, 2)
    assert independent.is_manifold_with_boundary(K) is True


# --------------------------------------------------------- the matrix module alone
def _sympy_charpoly(rows):
    x = sympy.Symbol("x")
    poly = sympy.Matrix(rows).charpoly(x)
    return [Fraction(int(c.p), int(c.q)) for c in reversed(poly.all_coeffs())]


def test_matrix_module_against_sympy():
    # Reference library used independently: sympy's Matrix (det, rank, inverse, charpoly)
    # on seeded random rational matrices, including entries beyond 2^62 and zero rows.
    import random
    rng = random.Random(5)
    for trial in range(60):
        n = rng.randint(1, 6)

        def entry():
            r = rng.random()
            if r < 0.35:
                return 0
            if r < 0.75:
                return rng.randint(-3, 3)
            if r < 0.85:
                return rng.randint(-10 ** 20, 10 ** 20)
            return Fraction(rng.randint(-5, 5), rng.randint(1, 4))

        rows = [[entry() for _ in range(n)] for _ in range(n)]
        S = sympy.Matrix([[sympy.Rational(x.numerator, x.denominator) if isinstance(x, Fraction)
                           else x for x in r] for r in rows])
        A = mx.Matrix.from_rows(rows)
        assert mx.det(A) == Fraction(str(S.det())), rows
        assert mx.rank(A) == S.rank(), rows
        assert list(mx.charpoly(A).coeffs) == _sympy_charpoly(S), rows
        if S.det() != 0:
            inverse = S.inv()
            assert mx.inverse(A).rows() == [[Fraction(str(inverse[i, j])) for j in range(n)]
                                            for i in range(n)], rows


def test_charpoly_of_a_large_block_matrix_uses_its_blocks():
    # det(xI - A) of a block-diagonal matrix is the product over the blocks (common
    # practice, no source); here diag(J, J) with J = [[0, 1], [1, 0]] after a permutation:
    # (x^2 - 1)^2 = x^4 - 2x^2 + 1.
    A = mx.Matrix.from_rows([[0, 0, 1, 0], [0, 0, 0, 1], [1, 0, 0, 0], [0, 1, 0, 0]])
    assert str(mx.charpoly(A)) == "x^4 - 2*x^2 + 1"
    assert mx._blocks(A) == [[0, 2], [1, 3]]


def test_matrix_equality_accepts_only_its_own_type():
    # The evaluator compares matrices with ==; a matrix never equals a list or a number.
    A = mx.Matrix.from_rows([[1, 2], [3, 4]])
    assert A == mx.Matrix.from_rows([[1, 2], [3, 4]])
    assert (A == [[1, 2], [3, 4]]) is False and (A == 1) is False
    with pytest.raises(TypeError):
        A + [[1, 2], [3, 4]]

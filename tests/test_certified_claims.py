"""Certified numbers in the claim language: enclosures, decisions, the outcome 'undecided'.

References used here:
- mpmath at 60 significant digits (``mpmath.eigsy`` for the eigenvalues of L^2, then the
  sum of lambda^-s) as the independent numerical reference for zeta values;
- O. Knill, "The hydrogen identity for Laplacians", arXiv:1803.01464 (2018): for a
  1-dimensional complex the spectrum of L^2 is closed under lambda -> 1/lambda, so
  zeta(s) = zeta(-s) and zeta(i t) is real; in dimension 2 this fails (a triangle);
- Shannon entropy of the uniform measure on n points is log n (common practice, no source).
"""

from __future__ import annotations

import sqlite3
import textwrap
from fractions import Fraction
from pathlib import Path

import mpmath
import pytest

from verifier.certificates import write_certificates
from verifier.claims.enclosure import Enclosure, decide_equal, decide_sign
from verifier.claims.errors import EvaluationError, ExpressionError, Undecided
from verifier.claims.evaluate import Context, evaluate, evaluate_claim
from verifier.claims.expression import parse
from verifier.complex import Complex
from verifier.families.cycles import cycle
from verifier.invariants import connection
from verifier.operations import refine
from verifier.run.runner import RunOptions, run
from verifier.run.store import Store

ROOT = Path(__file__).resolve().parent.parent
LIBRARY = ROOT / "claims"

C12 = refine(cycle(6))                                # the refined 6-cycle, 24 simplices
TRIANGLE = Complex.from_facets([[0, 1, 2]])
PATH3 = Complex.from_facets([[0, 1], [1, 2]])


def judge(text: str, K: Complex):
    ctx = Context()
    outcome = evaluate_claim(parse(text, {"K": "complex"}), {"K": K}, ctx)
    return outcome


def value(text: str, K: Complex):
    return evaluate(parse(text, {"K": "complex"}), {"K": K}, Context())


def reference_zeta(K: Complex, s: complex, dps: int = 60) -> mpmath.mpc:
    """zeta(s) of L^2 from mpmath's symmetric eigensolver at ``dps`` digits."""
    with mpmath.workdps(dps):
        L = connection(K)
        A = mpmath.matrix(L.rows())
        eigenvalues = mpmath.eigsy(A * A, eigvals_only=True)
        return sum(mpmath.power(lam, -mpmath.mpc(s)) for lam in eigenvalues)


def contains(enclosure: Enclosure, z: mpmath.mpc, slack=Fraction(1, 10**50)) -> bool:
    """Does the enclosure, widened by the reference's own rounding, contain z?"""
    with mpmath.workdps(60):
        re, im = (Fraction(mpmath.nstr(x, 58, min_fixed=-1, max_fixed=1, strip_zeros=False))
                  if x != 0 else Fraction(0) for x in (z.real, z.imag))
    return (enclosure.re[0] - slack <= re <= enclosure.re[1] + slack and
            enclosure.im[0] - slack <= im <= enclosure.im[1] + slack)


# ------------------------------------------------------------ enclosures
@pytest.mark.parametrize("K, s, t", [(C12, Fraction(1, 2), 3), (TRIANGLE, Fraction(-3, 2), 1),
                                     (PATH3, 0, Fraction(7, 2))])
def test_zeta_enclosures_contain_the_mpmath_reference(K, s, t):
    # reference: mpmath eigsy at 60 digits (named above)
    z = value(f"zeta(connection(K) ** 2, {s}, {t})", K)
    assert isinstance(z, Enclosure) and z.bits == 128 and 0 < z.width() < Fraction(1, 10**30)
    assert contains(z, reference_zeta(K, complex(s, t)))
    sharper = z.at(512)
    assert sharper.bits == 512 and sharper.width() < Fraction(1, 10**140)
    assert contains(sharper, reference_zeta(K, complex(s, t)))


def test_zeta_at_an_integer_stays_exact():
    # tr L^-2 = tr L^2 for a 1-dimensional complex (Knill 2018); both exact rationals
    assert value("zeta(connection(K) ** 2, 1)", PATH3) == value("zeta(connection(K) ** 2, -1)", PATH3)
    assert isinstance(value("zeta(connection(K), 2)", PATH3), int)


def test_eigenvalue_enclosures_contain_mpmath_eigenvalues():
    # reference: mpmath eigsy at 60 digits
    balls = value("eigenvalue_enclosures(connection(K))", TRIANGLE)
    with mpmath.workdps(60):
        reference = sorted(mpmath.eigsy(mpmath.matrix(connection(TRIANGLE).rows()),
                                        eigvals_only=True))
        assert len(balls) == 7
        for ball, lam in zip(balls, reference):
            assert contains(ball, mpmath.mpc(lam))


# ------------------------------------------------------------- decisions
def test_functional_equation_is_proved_in_dimension_one_and_refuted_in_dimension_two():
    # Knill (2018): zeta(s) = zeta(-s) for L^2 of a 1-dimensional complex; a triangle breaks it
    text = "zeta(connection(K) ** 2, 1/2, 3) == zeta(connection(K) ** 2, -1/2, -3)"
    holds = judge(text, C12)
    assert holds.holds and holds.evidence == "certified"
    assert all("@128 bits" in side for side in holds.sides)
    assert [entry["function"] for entry in holds.certified] == ["zeta", "zeta"]
    fails = judge(text, TRIANGLE)
    assert not fails.holds and fails.evidence == "certified"


def test_equal_sides_without_an_exact_argument_are_undecided():
    # zeta(i t) is real for a 1-dimensional complex (Knill 2018), so Im zeta(i) = 0 is
    # true, but balls alone can never show that a real number is exactly 0
    with pytest.raises(Undecided) as caught:
        judge("im(zeta(connection(K) ** 2, 0, 1)) == 0", C12)
    assert "no exact argument" in caught.value.message
    assert len(caught.value.sides) == 2 and "bits" in caught.value.sides[0]
    # |zeta(s)| = |zeta(-s)| holds as well, and is undecided for the same reason
    with pytest.raises(Undecided):
        judge("abs(zeta(connection(K) ** 2, 1/2, 3)) == abs(zeta(connection(K) ** 2, -1/2, -3))",
              C12)


def test_kleene_logic_lets_a_certain_answer_win_over_an_undecided_one():
    undecided = "im(zeta(connection(K) ** 2, 0, 1)) == 0"
    false = "zeta(connection(K) ** 2, 1/2) == 0"      # zeta(1/2) > 0: a sum of positive terms
    assert judge(f"({undecided}) and ({false})", C12).holds is False
    assert judge(f"({undecided}) or not ({false})", C12).holds is True
    assert judge(f"all(x == 0 for x in [im(zeta(connection(K) ** 2, 0, 1)), 1])", C12).holds is False
    with pytest.raises(Undecided):
        judge(f"({undecided}) or ({false})", C12)


def test_orders_of_real_enclosures():
    # the connection matrix of a triangle has 7 eigenvalues, 3 of them negative
    # (signature (4, 3): Knill, arXiv:1711.09527, the signature is the f-vector parity)
    outcome = judge("count(x < 0 for x in eigenvalue_enclosures(connection(K))) == 3", TRIANGLE)
    assert outcome.holds and outcome.evidence == "certified"
    with pytest.raises(EvaluationError, match="not real"):
        judge("zeta(connection(K), 1/2, 1) < 0", TRIANGLE)      # a negative eigenvalue: complex
    assert decide_sign(Enclosure.exact(0)) == 0
    assert decide_equal(Fraction(1, 3), Enclosure.exact(Fraction(1, 3)))


def test_certified_values_need_certified_evidence(tmp_path):
    path = tmp_path / "weak.toml"
    path.write_text(textwrap.dedent('''
        [[claim]]
        name = "zeta-exact-only"
        statement = "zeta(connection(K) ** 2, 1/2, 3) == zeta(connection(K) ** 2, -1/2, -3)"
        expect = "holds"
        [[claim.over]]
        family = "cycles"
        lengths = [3, 4]
    '''))
    result = run([path], RunOptions(store=str(tmp_path / "s.db"), engine="inline"))
    assert result.claims[0].counts["weak"] == 2 and result.claims[0].verdict == "incomplete"


def test_static_types_of_certified_values():
    with pytest.raises(ExpressionError, match="zeros_in_box: argument 'A' must be matrix"):
        parse("zeros_in_box(K, -1, 1, 0, 20) == 0", {"K": "complex"})
    with pytest.raises(ExpressionError, match="'<' needs number or ball, got matrix"):
        parse("connection(K) < zeta(connection(K), 1/2)", {"K": "complex"})
    node = parse("zeta(connection(K), 1/2) + 1", {"K": "complex"})
    assert node.type == "ball"


# ------------------------------------------------------------ the runner
UNDECIDED_CLAIM = '''
[[claim]]
name = "zeta-real-on-the-axis"
title = "zeta(i) of L^2 is real for cycles (true, but balls cannot show a real number is 0)"
statement = "im(zeta(connection(K) ** 2, 0, 1)) == 0"
expect = "holds"
evidence = "certified"
source = "O. Knill, arXiv:1803.01464 (2018)"
[[claim.over]]
family = "cycles"
lengths = [3, 5]
'''


def test_an_undecidable_claim_is_reported_undecided_not_pass_or_fail(tmp_path):
    # Done-when 2 of issue 6: the two sides are equal (Knill 2018), no exact argument is
    # available to the comparison, so every case is 'undecided' and no certificate is written
    path = tmp_path / "undecided.toml"
    path.write_text(UNDECIDED_CLAIM)
    result = run([path], RunOptions(store=str(tmp_path / "s.db"), engine="inline"))
    (claim,) = result.claims
    assert claim.counts["undecided"] == 3
    assert claim.counts["holds"] == claim.counts["fails"] == 0
    assert claim.verdict == "undecided" and not claim.meets_expectation
    assert all("no exact argument" in p["message"] for p in claim.problems)
    assert write_certificates(result, tmp_path / "certificates") == []
    store = Store(tmp_path / "s.db")
    try:
        recorded = store.certified_values(result.run_id, claim.claim.name)
    finally:
        store.close()
    assert [r["outcome"] for r in recorded] == ["undecided"] * 3
    assert all("@128 bits" in r["values"][0]["value"] for r in recorded)
    # the report says so too, with the reason for each case
    from verifier.report import write_report
    write_report(tmp_path / "s.db", tmp_path / "report")
    text = (tmp_path / "report" / "report.md").read_text()
    assert "verdict: **undecided**" in text
    assert text.count(": undecided: the two values agree to within") == 3


def test_stores_written_before_certified_values_gain_the_column(tmp_path):
    path = tmp_path / "old.sqlite"
    db = sqlite3.connect(path)
    db.execute("CREATE TABLE cases (run_id TEXT NOT NULL, claim TEXT NOT NULL, case_id TEXT "
               "NOT NULL, family TEXT NOT NULL, complex_hash TEXT NOT NULL, outcome TEXT NOT "
               "NULL, evidence TEXT, sides TEXT, witness TEXT, message TEXT, seconds REAL, "
               "PRIMARY KEY (run_id, claim, case_id)) WITHOUT ROWID")
    db.commit()
    db.close()
    store = Store(path)
    store.add_cases("r", [{"claim": "c", "case_id": "x", "family": "f", "complex_hash": "h",
                           "outcome": "holds", "certified": [{"function": "zeta", "value": "1"}]}])
    assert store.certified_values("r", "c")[0]["values"] == [{"function": "zeta", "value": "1"}]
    store.close()


def test_shipped_certified_claims_meet_their_expectations(tmp_path):
    # zeta(s) = zeta(-s) in dimension 1 and its failure on a triangle (Knill 2018); the
    # zeros of zeta for refined cycles (a conjecture, with its small counterexamples)
    names = ["zeta-functional-equation-1d.toml", "zeta-functional-equation-2d-fails.toml",
             "zeta-zeros-small-cycles-fails.toml"]
    result = run([LIBRARY / n for n in names], RunOptions(store=str(tmp_path / "s.db"),
                                                           engine="inline"))
    verdicts = {c.claim.name: (c.verdict, c.meets_expectation) for c in result.claims}
    assert verdicts == {"zeta-functional-equation-1d": ("holds", True),
                        "zeta-functional-equation-2d": ("fails, as expected", True),
                        "zeta-zeros-small-cycles": ("fails, as expected", True)}
    triangle = result.claims[1].counterexample["complexes"]["K"]
    assert Complex.from_facets(triangle).is_isomorphic(TRIANGLE)
    assert result.claims[1].counterexample["certified"][0]["function"] == "zeta"


# ---------------------------------------------------------- free energy
def test_free_energy_exact_at_point_masses_and_certified_elsewhere():
    # U(e_x) = g(x, x) and S(e_x) = 0 (definitions); S(uniform on 3 points) = log 3
    g = value("green(K)", TRIANGLE)
    point = value("free_energy(K, [1, 0, 0, 0, 0, 0, 0], 5)", TRIANGLE)
    assert point == g.matrix[0, 0]
    F = value("free_energy(K, [1/3, 1/3, 1/3, 0, 0, 0, 0], 2)", TRIANGLE)
    U = sum(g.matrix[i, j] for i in range(3) for j in range(3)) * Fraction(1, 9)
    with mpmath.workdps(60):
        assert contains(F, mpmath.mpc(mpmath.mpf(U.numerator) / U.denominator - 2 * mpmath.log(3)))


def test_free_energy_of_symmetric_measures_is_proved_equal():
    # a rotation of the triangle permutes vertices and edges and preserves g, hence U and S
    text = ("free_energy(K, [1/2, 1/4, 0, 1/4, 0, 0, 0], 1) == "
            "free_energy(K, [0, 1/2, 1/4, 0, 0, 1/4, 0], 1)")
    outcome = judge(text, TRIANGLE)
    assert outcome.holds and outcome.evidence == "certified"
    with pytest.raises(EvaluationError, match="sum to 3/2"):
        value("free_energy(K, [1, 1/2, 0, 0, 0, 0, 0], 1)", TRIANGLE)


def test_critical_points_carry_float_evidence():
    # at high temperature F_T is strictly convex (Hessian 2V + T diag(1/p) > 0 once
    # T > 2 |V| max p), so there is one critical point, near the uniform measure
    outcome = judge("size(critical_points(K, 100)) == 1", PATH3)
    assert outcome.holds and outcome.evidence == "float"
    (point,) = value("critical_points(K, 100)", PATH3)
    assert sum(point) == pytest.approx(1, abs=1e-5)
    assert max(abs(x - Fraction(1, 5)) for x in point) < Fraction(1, 50)


# ---------------------------------------------------------- certificates
CERTIFIED_CLAIM = '''
[[claim]]
name = "zeta-cycles-small"
title = "zeta(s) = zeta(-s) and the zeros of zeta near the axis, for a few refined cycles"
statement = """
zeta(connection(K) ** 2, 1/2, 3) == zeta(connection(K) ** 2, -1/2, -3)
and zeros_in_box(connection(K) ** 2, -1/5, 1/5, 0, 5) == zeros_on_axis(connection(K) ** 2, 0, 5)
"""
expect = "holds"
evidence = "certified"
source = "O. Knill, arXiv:1803.01464 (2018); zero counts computed here"
[[claim.over]]
family = "refine"
of = { family = "cycles", lengths = [4, 6] }
times = 1
'''


def test_certificates_keep_enclosures_and_a_recheck_recomputes_them(tmp_path):
    # the recorded enclosures (arb, 128 bits) and the independent ones (sympy roots and
    # mpmath intervals, 160 bits) enclose the same numbers, so they must intersect
    from verifier.certificates import check, load, seal
    import json
    path = tmp_path / "claim.toml"
    path.write_text(CERTIFIED_CLAIM)
    result = run([path], RunOptions(store=str(tmp_path / "s.db"), engine="inline"))
    assert result.claims[0].verdict == "holds"
    (written,) = write_certificates(result, tmp_path / "certificates")
    data = load(written)
    cases = data["certified"]["cases"]
    assert len(cases) == 3
    functions = [v["function"] for v in cases[0]["values"]]
    assert functions == ["zeta", "zeta", "zeros_in_box", "zeros_on_axis"]
    assert all("@128 bits" in v["value"] for v in cases[0]["values"])
    verdict = check(written)
    assert verdict.verified, verdict.reason
    # a recorded enclosure moved off the true value: the re-check must refuse it
    tampered = dict(data)
    tampered["certified"] = json.loads(json.dumps(data["certified"]))
    tampered["certified"]["cases"][0]["values"][0]["value"] = "[5, 6] + [0, 1]i @128 bits"
    bad = tmp_path / "tampered.json"
    bad.write_text(json.dumps(seal(tampered)))
    verdict = check(bad)
    assert not verdict.verified and "recorded [5, 6] + [0, 1]i @128 bits" in verdict.reason


def test_a_certified_counterexample_is_rechecked_by_intersection(tmp_path):
    # the failing companion in dimension 2 (a triangle, Knill 2018): its certificate keeps
    # the enclosures of zeta(s) and zeta(-s); the independent backend's must meet them
    from verifier.certificates import check, load, seal
    import json
    result = run([LIBRARY / "zeta-functional-equation-2d-fails.toml"],
                 RunOptions(store=str(tmp_path / "s.db"), engine="inline"))
    (written,) = write_certificates(result, tmp_path / "certificates")
    data = load(written)
    assert data["kind"] == "counterexample" and data["evidence"] == "certified"
    assert [v["function"] for v in data["certified"]["values"]] == ["zeta", "zeta"]
    assert check(written).verified
    tampered = json.loads(json.dumps(data))
    tampered["certified"]["values"][1]["value"] = "[100, 101] @128 bits"
    bad = tmp_path / "tampered.json"
    bad.write_text(json.dumps(seal(tampered)))
    assert "mismatch" in check(bad).reason

"""The claim expression language: what it accepts, what it refuses, and how it evaluates.

Mathematical checks name their sources; refusals assert the exact message and place.
"""

from __future__ import annotations

import time
from fractions import Fraction

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from verifier.claims import (ClaimError, Context, EvaluationError, ExpressionError, Limits,
                             LimitExceeded, evaluate, evaluate_claim, parse)
from verifier.claims.functions import FUNCTIONS
from verifier.complex import Complex
from verifier.families import catalog

K_TYPES = {"K": "complex"}
EDGE = Complex.from_facets([[1, 2]])
TORUS = catalog.complex("torus-7")


def value(text, K=EDGE, **limits):
    return evaluate(parse(text, K_TYPES), {"K": K}, Context(Limits(**limits)))


# ------------------------------------------------------------------ evaluation
def test_rationals_are_exact():
    # 1/3 is a rational, never a float (SPEC §4)
    assert value("1/3 + 1/6") == Fraction(1, 2)
    assert value("(2/3) ** -2") == Fraction(9, 4)
    assert value("7 // 2 + 7 % 2") == 4


def test_energy_and_unimodularity_on_the_torus():
    # energy theorem (Knill, Linear Algebra Appl. 600 (2020)): sum g = chi = 0 for the torus;
    # unimodularity (Knill, arXiv:1612.08229): det L = (-1)^(f_1) = (-1)^21 = -1
    assert value("sum(green(K)) == euler(K)", TORUS) is True
    assert value("det(connection(K))", TORUS) == -1
    assert value("count(x for x in simplices(K) if dim(x) == 1)", TORUS) == 21


def test_quantifiers_nest_and_filter():
    # the edge has 3 simplices; pairs (x, y) with x a proper face of y: 2 (hand count)
    assert value("count(1 for x in simplices(K) for y in simplices(K) if x != y and "
                 "y in star(K, x))") == 2
    assert value("all(omega(x) == (-1) ** dim(x) for x in simplices(K))") is True
    assert value("any(dim(x) == 2 for x in simplices(K))") is False


def test_matrix_indexing_by_simplices_and_integers():
    # g of an edge: [[0,-1,1],[-1,0,1],[1,1,-1]] in the order 1, 2, {1,2} (hand computation)
    assert value("green(K)[(1, 2), (1, 2)]") == -1
    assert value("green(K)[(1,), (2,)]") == -1
    assert value("green(K)[0, 2]") == 1
    assert value("connection(K) * green(K) == identity(K)") is True
    assert value("connection(K) ** -1 == green(K)") is True


def test_counterexample_values_and_witness():
    # the hydrogen identity fails for a triangle at a vertex: L(v,v) - g(v,v) = 1 - 0 = 1
    # but |H|(v,v) = deg v = 2 (hand computation)
    triangle = Complex.from_facets([[1, 2, 3]])
    outcome = evaluate_claim(parse("connection(K) - green(K) == signless_hodge(K)", K_TYPES),
                             {"K": triangle})
    assert not outcome.holds
    assert outcome.witness == {"entry": "[[1], [1]]", "left": "1", "right": "2"}
    outcome = evaluate_claim(parse("all(dim(x) < 2 for x in simplices(K))", K_TYPES),
                             {"K": triangle})
    assert outcome.witness == {"x": "[1, 2, 3]"}


# -------------------------------------------------------------------- refusals
@pytest.mark.parametrize("text, message", [
    ("K.labels", "attribute access is not allowed"),
    ("euler(K).__class__", "attribute access is not allowed"),
    ("__import__('os')", "unknown function '__import__'"),
    ("open('x')", "unknown function 'open'"),
    ("eval('1')", "unknown function 'eval'"),
    ("exec", "unknown name 'exec'"),
    ("(lambda: 1)()", "lambda is not allowed"),
    ("[x for x in simplices(K)]", "generators are allowed only inside all(), any(), sum() and count()"),
    ("'text'", "literal 'text' is not allowed; only integers and True/False"),
    ("1.5", "1.5 is a floating-point number; write exact rationals such as 3/2"),
    ("euler(K, 1)", "euler takes 1 argument, got 2: euler(x: complex|set|list[simplex]) -> number"),
    ("gren(K)", "unknown function 'gren'; did you mean 'green'?"),
    ("euler(x=K)", "euler: keyword arguments are not allowed"),
    ("green(K) + 1", "operator '+' does not apply to matrix and number"),
    ("det(K)", "det: argument 'A' must be matrix, got complex"),
    ("{1: 2}", "dict and set literals are not allowed"),
    ("K is K", "'is' comparisons are not allowed; use == or !="),
    ("euler(K)[0:1]", "slices are not allowed; index by integers or simplices"),
    ("euler(K)[0]", "a number cannot be indexed"),
])
def test_refused_before_anything_runs(text, message):
    with pytest.raises(ExpressionError) as caught:
        parse(text, K_TYPES)
    assert caught.value.message == message


def test_errors_name_line_and_column():
    with pytest.raises(ExpressionError) as caught:
        parse("euler(K) ==\n  betti(K) + gren(K)", K_TYPES)
    assert str(caught.value) == "<expression>:2:14: unknown function 'gren'; did you mean 'green'?"


def test_deeply_nested_expressions_are_refused():
    with pytest.raises(ExpressionError, match="nested"):
        parse("(" * 300 + "1" + ")" * 300, K_TYPES)
    with pytest.raises(ExpressionError, match="nested more than"):
        parse("-" * 100 + "1", K_TYPES)
    with pytest.raises(ExpressionError, match="longer than"):
        parse("1 + " * 2000 + "1", K_TYPES)


def test_huge_powers_are_bounded_not_computed():
    start = time.monotonic()
    with pytest.raises(LimitExceeded) as caught:
        value("2 ** 10 ** 10")
    assert caught.value.limit == "max_exponent"
    with pytest.raises(LimitExceeded) as caught:
        value("connection(K) ** 100000")
    assert caught.value.limit == "max_matrix_power"
    with pytest.raises(LimitExceeded) as caught:
        value("3 ** 5000", max_result_bits=1000)
    assert caught.value.limit == "max_result_bits"
    assert time.monotonic() - start < 5
    assert value("1 ** 10 ** 10") == 1  # trivially bounded bases are fine


def test_step_and_time_limits():
    with pytest.raises(LimitExceeded) as caught:
        value("count(1 for x in simplices(K) for y in simplices(K) for z in simplices(K))",
              TORUS, max_steps=10_000)
    assert caught.value.limit == "max_steps"
    with pytest.raises(LimitExceeded) as caught:
        value("count(1 for x in simplices(K) for y in simplices(K) for z in simplices(K))",
              TORUS, seconds=0.05)
    assert caught.value.limit == "seconds"


def test_evaluation_errors_are_ours():
    with pytest.raises(EvaluationError, match="division by zero"):
        value("1 / (euler(K) - 1)")
    with pytest.raises(EvaluationError, match="is not a simplex of the complex"):
        value("star(K, (1, 5))")
    with pytest.raises(EvaluationError, match="singular"):
        value("hodge(K) ** -1")


def test_every_function_has_a_summary_and_source():
    for f in FUNCTIONS.values():
        assert f.summary, f.name
        assert f.source, f.name


# ------------------------------------------------------- random text (property)
ALPHABET = st.sampled_from(list("KxyM()[]{},.:+-*/%<>=!&|~^@'\" _0123456789\n")
                           + ["green", "euler", "for", "in", "if", "else", "and", "or", "not",
                              "all", "sum", "lambda", "import", "__class__", "**", "simplices",
                              "connection", "count", "det", "10", "-1"])


@settings(max_examples=300, deadline=None)
@given(st.lists(ALPHABET, max_size=25).map("".join))
def test_random_text_gives_only_our_errors(text):
    # whatever the text, parsing and evaluating raise nothing but ClaimError subclasses
    try:
        node = parse(text, K_TYPES)
        evaluate(node, {"K": EDGE}, Context(Limits(seconds=2, max_steps=20_000)))
    except ClaimError:
        pass


# --------------------------------------------------------- random claim files (property)
TOML_PIECES = st.sampled_from([
    "[[claim]]\n", "[[claim.over]]\n", "[claim]\n", 'name = "x"\n', 'name = "Bad Name"\n',
    'statement = "euler(K) == 1"\n', 'statement = "gren(K)"\n', "statement = 3\n",
    'statement = """\nall(\n"""\n', 'where = "dim(K) >= 0"\n', 'expect = "fails"\n',
    'expect = "maybe"\n', 'evidence = "float"\n', "max_cases = -1\n", 'family = "catalog"\n',
    'family = "random-flag"\n', "vertices = [3, 2]\n", "count = 1e3\n", "edge_probability = 2\n",
    'names = ["torus-7", "nothing"]\n', 'bind = "A"\n', 'bind = "1x"\n', "= 1\n", '"\n',
    "of = { family = \"catalog\" }\n", "times = 9\n", 'family = "refine"\n', "\x00", "#\n",
])


@settings(max_examples=150, deadline=None)
@given(st.lists(TOML_PIECES, max_size=14).map("".join))
def test_random_claim_files_give_only_our_errors(text):
    # whatever the file says, loading it raises nothing but ClaimError subclasses, and a
    # file that loads evaluates with only ClaimError subclasses too
    import tempfile
    from pathlib import Path

    from verifier.claims.loader import load_file
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "random.toml"
        path.write_text(text)
        try:
            claims = load_file(path)
        except ClaimError:
            return
        for claim in claims:
            try:
                evaluate(claim.statement, {v: EDGE for v in claim.variables},
                         Context(Limits(seconds=2, max_steps=20_000)))
            except ClaimError:
                pass

"""prod, min and max beside sum: quantifiers of the claim language, in both backends."""

from __future__ import annotations

import pytest

from verifier.claims.errors import ClaimError, EvaluationError
from verifier.claims.evaluate import Context, evaluate
from verifier.claims.expression import parse
from verifier.families import catalog
from verifier.independent.claims import IMPLEMENTATIONS as INDEPENDENT


def both(statement: str, name: str):
    """The value under the main backend, checked equal under the independent one."""
    node = parse(statement, {"K": "complex"})
    K = catalog.complex(name)
    main = evaluate(node, {"K": K}, Context())
    assert evaluate(node, {"K": K}, Context(table=INDEPENDENT)) == main
    return main


def test_prod_min_and_max_over_generators_and_lists():
    # the 7-vertex torus: f = (7, 21, 14) (Csaszar 1949; catalog record), every vertex of
    # degree 6 (common practice, no source)
    assert both("prod(f_vector(K))", "torus-7") == 7 * 21 * 14
    assert both("max(f_vector(K))", "torus-7") == 21
    assert both("min(f_vector(K))", "torus-7") == 7
    assert both("min(size(link(K, v)) for v in vertices(K))", "torus-7") == 12
    assert both("max(size(link(K, v)) for v in vertices(K) if v != vertices(K)[0])",
                "torus-7") == 12
    assert both("prod(2 for x in facets(K))", "sphere-1") == 8
    assert both("prod(1 for x in facets(K) if dim(x) > 5)", "sphere-1") == 1   # empty product


def test_prod_no_longer_suggests_the_product_of_complexes():
    # issue 13: `prod(...)` used to be answered with "did you mean 'product'?"
    assert parse("prod(f_vector(K)) > 0", {"K": "complex"}).type == "bool"


def test_bad_uses_are_refused_at_load_or_named_at_run_time():
    with pytest.raises(ClaimError, match="min needs number"):
        parse("min(link(K, v) for v in vertices(K))", {"K": "complex"})
    with pytest.raises(ClaimError, match="max of a complex"):
        parse("max(K)", {"K": "complex"})
    with pytest.raises(EvaluationError, match="min of no items"):
        both("min(dim(x) for x in facets(K) if dim(x) > 5)", "sphere-1")


def test_prod_obeys_the_bit_limit():
    from verifier.claims.evaluate import Limits
    node = parse("prod(2 ** 900 for x in simplices(K))", {"K": "complex"})
    with pytest.raises(EvaluationError, match="bits"):
        evaluate(node, {"K": catalog.complex("torus-7")}, Context(Limits(max_result_bits=10_000)))

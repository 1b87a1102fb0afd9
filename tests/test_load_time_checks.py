"""Mistakes a claim file can show before anything runs (issue 13, section 2): each is an
error at file:line:column when the claim loads, never a case that fails at run time."""

from __future__ import annotations

import pytest

from verifier.claims.errors import ClaimError
from verifier.claims.loader import load_text

TEMPLATE = '''[[claim]]
name = "r"
statement = "{statement}"
{extra}
  [[claim.over]]
  family = "all-complexes"
  max_vertices = 3
'''


def load(statement: str, extra: str = ""):
    return load_text(TEMPLATE.format(statement=statement, extra=extra), "r.toml")


@pytest.mark.parametrize("statement, message", [
    ("connection(K) == 1", "r.toml:3:31: '==' compares values of one type, got matrix and number"),
    ("charpoly(connection(K)) == 1", "r.toml:3:41: '==' compares values of one type, got poly"),
    ("facets(K)[0] == 1", "r.toml:3:30: '==' compares values of one type, got simplex"),
    ("betti(K) + 1 == 2", "r.toml:3:14: operator '+' does not apply to list[number] and number"),
    ("zeros_on_axis(connection(K) ** 2, 0, 20) == 1",
     "r.toml:3:14: zeros_on_axis gives certified values, weaker than the claim's evidence = "
     "\"exact\"; write evidence = \"certified\" in the claim"),
])
def test_type_and_evidence_mistakes_are_load_errors(statement, message):
    with pytest.raises(ClaimError) as caught:
        load(statement)
    assert str(caught.value).startswith(message)


def test_a_certified_function_loads_in_a_certified_claim():
    (claim,) = load("zeros_on_axis(connection(K) ** 2, 0, 20) >= 0", 'evidence = "certified"')
    assert claim.evidence == "certified"


def test_a_float_function_needs_float_evidence_also_in_where():
    with pytest.raises(ClaimError, match="critical_points gives float values"):
        load("euler(K) == 1", 'where = "size(critical_points(K, 1)) > 0"')


def test_a_claim_without_expect_is_expected_to_hold_and_the_readme_says_so():
    # issue 13: the default must not be silent; the README's claim-file section states it
    from pathlib import Path
    (claim,) = load("euler(K) >= 0")
    assert claim.expect == "holds"
    readme = " ".join(Path(__file__).resolve().parent.parent.joinpath("README.md")
                      .read_text(encoding="utf-8").split())
    assert "a claim without `expect` is expected to hold" in readme

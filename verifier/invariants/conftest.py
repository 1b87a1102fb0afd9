"""Doctest names for the invariants package: its examples read as in the package's own
namespace (``Complex`` and every public invariant), whichever module they live in."""

import pytest

import verifier.invariants as invariants
from verifier.complex import Complex


@pytest.fixture(autouse=True)
def _invariant_names(doctest_namespace):
    doctest_namespace["Complex"] = Complex
    for name in invariants.__all__:
        doctest_namespace[name] = getattr(invariants, name)

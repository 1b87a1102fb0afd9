"""From checking to finding: exact relations among invariants, and the hypotheses under
which a failing claim holds.

Modules (data flows down this list):

``values``      every expression evaluated exactly on every case (process pool)
``relations``   the lattice of integer relations: exact null space + LLL, each relation
                checked on every case before it is reported
``predicates``  the registry of predicates a hypothesis may be made of (a plain table)
``hypotheses``  predicates that separate the passing from the failing cases of a run
``files``       discovery files (TOML) in, claim files out
``record``      discoveries kept in the run store, for ``verifier report``
``workflow``    what ``verifier discover`` does: discover, write claims, test them further

The Python API is :func:`discover` (relations) and
:func:`verifier.discover.workflow.hypotheses_for` (hypotheses).
"""

from __future__ import annotations

from .relations import CONSTANT, Relation, RelationResult, check_relation, find_relations
from .values import DiscoveryError, Expression, ValueTable, value_table

__all__ = ["discover", "Discovery", "DiscoveryError", "Expression", "ValueTable",
           "Relation", "RelationResult", "find_relations", "check_relation", "value_table",
           "CONSTANT"]


class Discovery:
    """The result of :func:`discover`.

    ``relations`` -- a list of dicts, one per basis relation of the lattice: expression
    text (or ``"1"`` for the constant term) -> integer coefficient, with
    Σ coefficient · value = 0 on every case (each was checked on every case);
    ``texts`` -- the same relations in plain form; ``cases`` -- how many cases;
    ``constants`` -- {expression text: value} for expressions constant on the family;
    ``ranges`` -- {expression text: (min, max)}; ``result`` -- the full
    :class:`RelationResult`.
    """

    def __init__(self, result: RelationResult):
        self.result = result
        self.relations = [dict(r.coefficients) for r in result.relations]
        self.texts = [r.text for r in result.relations]
        self.cases = result.cases
        self.constants = {e.text: v for e, v in result.constants}
        self.ranges = {e.text: (lo, hi) for e, lo, hi in result.ranges}

    def __repr__(self) -> str:
        shown = "; ".join(self.texts) or "no relation"
        return f"<Discovery on {self.cases} cases: {shown}>"


def discover(over, expressions, degree: int = 1, workers: int | None = None) -> Discovery:
    """The exact integer relations among expressions over a union of families.

    Definition: all integer vectors c with c_1 + Σ_e c_e · e(K) = 0 for every case K
    of the families, as an LLL-reduced basis of that lattice; each basis relation is
    checked on every case before it is returned.

    Parameters: over -- a list of family tables as in claim files (``[[claim.over]]``);
    expressions -- claim-language expressions in the variable K, each giving a number;
    degree -- 1, or 2 to include the products of pairs; workers -- processes for the
    evaluation (default: 2 for large families).
    Returns: a :class:`Discovery` whose ``.relations`` is a list of dicts mapping each
    expression text that occurs, and "1" for the constant term, to an integer.

    >>> d = discover([{"family": "all-complexes", "max_vertices": 3}],
    ...              ["f_vector(K)[0]", "euler(K)", "sum(green(K))"])
    >>> d.relations
    [{'euler(K)': -1, 'sum(green(K))': 1}]

    Method: :func:`verifier.discover.values.value_table`, then
    :func:`verifier.discover.relations.find_relations` (exact null space and LLL
    reduction: A. K. Lenstra, H. W. Lenstra, L. Lovász, Math. Ann. 261 (1982) 515-534).
    """
    from ..families import make_family
    from .files import family_from_table
    if isinstance(expressions, str):
        raise DiscoveryError("expressions must be a list of texts, got one text")
    families = [family_from_table(table, make_family) for table in over]
    items = [Expression(text, text) for text in expressions]
    table = value_table(families, items, workers=workers)
    return Discovery(find_relations(table, degree))


class _CallablePackage(__import__("types").ModuleType):
    """``verifier.discover`` is both this package and the function :func:`discover`:
    once the package is imported, Python binds the name ``verifier.discover`` to it, so
    calling the package calls the function (the signature other code relies on)."""

    def __call__(self, over, expressions, degree: int = 1, workers: int | None = None):
        return discover(over, expressions, degree, workers)


__import__("sys").modules[__name__].__class__ = _CallablePackage

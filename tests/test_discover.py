"""verifier discover: exact relations among invariants, and hypotheses for failing claims.

Each mathematical check names its source.  Lattices of relations are compared through a
Hermite normal form computed here in plain Python (independent of python-flint).
"""

from __future__ import annotations

import sqlite3
from fractions import Fraction
from pathlib import Path

import pytest

import verifier
from verifier.claims.evaluate import Context, Limits, evaluate
from verifier.claims.expression import parse
from verifier.complex import Complex
from verifier.discover import check_relation, find_relations, value_table
from verifier.discover.files import load_discovery
from verifier.discover.hypotheses import separators
from verifier.discover.predicates import PREDICATES
from verifier.discover.values import DiscoveryError, Expression
from verifier.discover.workflow import hypotheses_for, relations_from_file
from verifier.exact import integer_kernel
from verifier.families import make_family

ROOT = Path(__file__).resolve().parent.parent


# ------------------------------------------------------------------ helpers
def hermite(vectors: list[list[int]]) -> list[list[int]]:
    """Row Hermite normal form by integer row operations (plain Python): a canonical
    basis of the lattice the vectors span (H. Cohen, GTM 138, Algorithm 2.4.4 in spirit)."""
    rows = [list(v) for v in vectors if any(v)]
    out, column, n = [], 0, len(rows[0]) if rows else 0
    while rows and column < n:
        active = [r for r in rows if r[column]]
        if not active:
            column += 1
            continue
        while len(active) > 1:                       # Euclid on the column
            active.sort(key=lambda r: abs(r[column]))
            pivot = active[0]
            for r in active[1:]:
                q = r[column] // pivot[column]
                for k in range(n):
                    r[k] -= q * pivot[k]
            active = [r for r in active if r[column]]
        pivot = active[0]
        if pivot[column] < 0:
            pivot[:] = [-x for x in pivot]
        rows = [r for r in rows if r is not pivot and any(r)]
        out.append(pivot)
        column += 1
    for i, row in enumerate(out):                    # reduce above the pivots
        p = next(k for k, x in enumerate(row) if x)
        for above in out[:i]:
            q = above[p] // row[p]
            for k in range(n):
                above[k] -= q * row[k]
    return out


def lattice(relations: list[dict], keys: list[str]) -> list[list[int]]:
    return hermite([[r.get(k, 0) for k in keys] for r in relations])


F = [f"(f_vector(K)[{k}] if dim(K) >= {k} else 0)" for k in range(6)]
B = [f"betti(K, {k})" for k in range(5)]
CHI, WU, G = "euler(K)", "wu(K)", "sum(green(K))"
POS, NEG = "positive(connection(K))", "negative(connection(K))"
ATLAS_EXPRESSIONS = F + B + [CHI, WU, G, POS, NEG]


def textbook(fs: int, bs: int) -> list[dict]:
    """The relations the literature gives among these expressions."""
    euler_f = {CHI: 1, **{F[k]: -(-1) ** k for k in range(fs)}}       # Euler: chi = sum (-1)^k f_k
    euler_b = {CHI: 1, **{B[k]: -(-1) ** k for k in range(bs)}}       # Euler-Poincare
    energy = {G: 1, CHI: -1}                                          # energy theorem
    positive = {POS: 1, **{F[k]: -1 for k in range(0, fs, 2)}}        # hearing chi
    negative = {NEG: 1, **{F[k]: -1 for k in range(1, fs, 2)}}
    return [euler_f, euler_b, energy, positive, negative]


# ---------------------------------------------------------- the exact kernel
def test_integer_kernel_is_the_saturated_lattice():
    # ker [[2, 4]] ∩ Z^2 is spanned by (2, -1); (4, -2) would span a sublattice of index 2
    assert hermite(integer_kernel([[2, 4]], 2)) == [[2, -1]]
    # the kernel over Q agrees with sympy's exact nullspace (reference library)
    import sympy
    rows = [[1, 2, 3, 4, 5], [2, 3, 5, 7, 11], [Fraction(1, 2), 1, Fraction(3, 2), 2, Fraction(5, 2)]]
    ours = integer_kernel(rows, 5)
    theirs = sympy.Matrix(rows).nullspace()
    assert len(ours) == len(theirs) == 3
    for v in ours:
        assert all(sum(Fraction(a) * b for a, b in zip(row, v)) == 0 for row in rows)
    assert sympy.Matrix(ours).rank() == 3


def test_atlas_rediscovery_five_vertices():
    """All 208 complexes with <= 5 vertices (OEIS A003182 counts them): the lattice is
    spanned by the textbook relations and by f_5 = 0 and b_4 = 0 (no complex on 5
    vertices has a 5-simplex or a 4-cycle)."""
    d = verifier.discover(over=[{"family": "all-complexes", "max_vertices": 5}],
                          expressions=ATLAS_EXPRESSIONS, degree=1)
    assert d.cases == 208
    keys = ["1"] + ATLAS_EXPRESSIONS
    expected = textbook(5, 4) + [{F[5]: 1}, {B[4]: 1}]
    assert lattice(d.relations, keys) == lattice(expected, keys)
    assert d.constants == {F[5]: 0, B[4]: 0}


def test_atlas_rediscovery_six_vertices():
    """All 16,351 complexes with <= 6 vertices: the integer relations among f_0..f_5,
    b_0..b_4, chi, wu, sum(g), positive(L), negative(L) are exactly the integer span of
    Euler's relation chi = sum (-1)^k f_k, Euler-Poincare chi = sum (-1)^k b_k
    (Munkres 1984, Thm 22.2), the energy theorem sum(g) = chi (O. Knill, The energy of
    a simplicial complex, Linear Algebra Appl. 600 (2020)), and positive(L) = f_0 + f_2
    + f_4, negative(L) = f_1 + f_3 + f_5 (O. Knill, One can hear the Euler
    characteristic of a simplicial complex, arXiv:1711.09527)."""
    d = verifier.discover(over=[{"family": "all-complexes", "max_vertices": 6}],
                          expressions=ATLAS_EXPRESSIONS, degree=1)
    assert d.cases == 16351
    keys = ["1"] + ATLAS_EXPRESSIONS
    assert lattice(d.relations, keys) == lattice(textbook(6, 5), keys)
    assert d.result.rejected == []
    # every reported relation was checked on every case, and holds there
    table, result = d.result.table, d.result
    for relation in d.relations:
        assert check_relation(relation, table.expressions, table.values,
                              table.case_ids) is None


def test_a_perturbed_relation_is_rejected_by_the_final_check():
    """The null space proposes, the check decides: a proposal that is off by one on the
    constant term of the energy theorem (sum(g) = chi + 1 is false on every complex,
    Knill 2020) is rejected and never reported."""
    family = make_family({"family": "all-complexes", "max_vertices": 4})
    table = value_table([family], [Expression(CHI, "chi"), Expression(G, "g")])

    def proposals(rows, n):
        true = integer_kernel(rows, n)
        return true + [[1, 1, -1]]                      # 1 + chi - g = 0: perturbed
    result = find_relations(table, proposals=proposals)
    assert [r.coefficients for r in result.relations] == [{CHI: -1, G: 1}]
    assert len(result.rejected) == 1
    assert result.rejected[0]["coefficients"] in ({"1": 1, CHI: 1, G: -1},
                                                  {"1": -1, CHI: -1, G: 1})
    assert result.rejected[0]["fails_on"] == table.case_ids[0]


def test_a_relation_failing_on_one_case_only_is_rejected():
    # f_0 = 3 holds on the triangle and fails on the 4-vertex path only
    cols = [Expression("f0", "f0")]
    assert check_relation({"f0": 1, "1": -3}, cols, [[3], [3], [4]], ["a", "b", "c"]) == "c"


def test_dehn_sommerville_on_closed_surfaces():
    """Closed surfaces of the catalog and their barycentric refinements: 2 f_1 = 3 f_2
    (each edge in two triangles, each triangle has three edges) and f_1 = 3 (f_0 - chi)
    (with Euler's relation; the Dehn-Sommerville relations for 2-manifolds, e.g.
    B. Grünbaum, Convex Polytopes, 2nd ed. (2003), §9.2 -- from memory)."""
    found = load_discovery(ROOT / "discoveries" / "surfaces.toml")
    table = value_table(found.families, found.expressions)
    result = find_relations(table)
    keys = ["1"] + [e.text for e in found.expressions]
    f0, f1, f2, chi = keys[1:]
    relations = [r.coefficients for r in result.relations]
    expected = [{f1: 2, f2: -3}, {chi: 1, f0: -1, f1: 1, f2: -1}]    # with Euler's relation
    assert lattice(relations, keys) == lattice(expected, keys)
    # f_1 = 3 (f_0 - chi) lies in the lattice found
    assert lattice(relations + [{f1: 1, f0: -3, chi: 3}], keys) == lattice(relations, keys)


def test_degree_two_relation_of_a_join():
    """The f-polynomial of a join is the product of the f-polynomials (A. Björner,
    Topological methods, Handbook of Combinatorics (1995), §9 -- from memory), so with
    s = |K|: |K * K| = (s + 1)^2 - 1; at degree 2 this is the only relation on the 28
    complexes with <= 4 vertices (s takes more than four values)."""
    s, j = "size(simplices(K))", "size(simplices(join(K, K)))"
    d = verifier.discover(over=[{"family": "all-complexes", "max_vertices": 4}],
                          expressions=[s, j], degree=2)
    square = f"({s}) * ({s})"
    assert d.relations in ([{s: 2, j: -1, square: 1}], [{s: -2, j: 1, square: -1}])


# ------------------------------------------------------------- predicates
def test_every_predicate_means_what_its_where_says():
    """The fast test of each predicate agrees with its claim-language text on every
    complex with <= 5 vertices and on catalog surfaces (so a proposed claim's `where`
    means what was tested)."""
    cases = [K for _, K in make_family({"family": "all-complexes", "max_vertices": 5})]
    cases += [K for _, K in make_family({"family": "catalog", "names": [
        "torus-7", "projective-plane-6", "cross-polytope-boundary-3", "moebius-strip-5"]})]
    for p in PREDICATES:
        node = parse(p.where, {"K": "complex"})
        for K in cases:
            assert bool(evaluate(node, {"K": K}, Context(Limits()))) == p.test(K), (p.key, K)


def test_flag_and_bipartite_predicates_on_hand_checked_complexes():
    flag = next(p for p in PREDICATES if p.key == "flag")
    bipartite = next(p for p in PREDICATES if p.key == "bipartite")
    hollow = Complex.from_facets([[0, 1], [1, 2], [0, 2]])          # empty triangle
    square = Complex.from_facets([[0, 1], [1, 2], [2, 3], [0, 3]])  # C_4
    assert not flag.test(hollow) and flag.test(square)
    assert bipartite.test(square) and not bipartite.test(hollow)


def test_separators_never_report_what_does_not_separate():
    holds = [True, True, False, False, True]
    values = {"dim<=1": [True, True, False, True, True],
              "pure": [True, False, False, False, True],
              "connected": [True, True, True, False, True]}
    registry = [p for p in PREDICATES if p.key in values]
    s = separators(holds, values, registry)
    for h in s.separating + s.sufficient:
        chosen = [bool(h.selected >> i & 1) for i in range(len(holds))]
        assert not any(c and not ok for c, ok in zip(chosen, holds))
        if h.kind == "separates":
            assert chosen == holds
    assert [h.words for h in s.separating] == ["dim(K) <= 1 and K is connected"]


# ------------------------------------------------------------- hypotheses
@pytest.mark.parametrize("claim_file", ["reciprocal-2d-fails.toml", "hydrogen-2d-fails.toml"])
def test_hypothesis_for_the_failing_companions_is_dimension_at_most_one(tmp_path, claim_file):
    """Reciprocity of charpoly(L^2) and the hydrogen identity hold for graphs (O. Knill,
    The hydrogen identity for Laplacians, arXiv:1803.01464) and fail in dimension 2: the
    finder proposes dim(K) <= 1, and the proposed claim holds on all complexes with <= 5
    vertices."""
    store = str(tmp_path / "s.sqlite")
    report = hypotheses_for(str(ROOT / "claims" / claim_file), store=store,
                            out=str(tmp_path / "out"),
                            further=[{"family": "all-complexes", "max_vertices": 5}])
    proposals = {h.where: name for name, h in report.proposals}
    assert "dim(K) <= 1" in proposals
    outcome = report.outcomes[proposals["dim(K) <= 1"]]
    assert outcome["verdict"] == "holds" and outcome["holds"] > 0 and outcome["fails"] == 0
    text = (tmp_path / "out").rglob("*-when-dimle1.toml")
    assert 'where     = "dim(K) <= 1"' in next(text).read_text()


def _check_reported_hypotheses(report, store, claim_path):
    """Re-decide every reported hypothesis through its claim-language text on the cases
    read from the store (independent of the fast predicate tests)."""
    from verifier.claims.loader import load_paths
    from verifier.run.cases import complexes_of
    db = sqlite3.connect(store)
    bare = next(Path(f).parent for f in report.claim_files) / f"{report.claim}-cases.toml"
    claim = load_paths([str(bare)])[0]
    rows = db.execute("SELECT case_id, outcome FROM cases WHERE run_id = ? AND claim = ?",
                      (report.run_id, claim.name)).fetchall()
    db.close()
    for _name, h in report.proposals:
        node = parse(h.where, {"K": "complex"})
        for case_id, outcome in rows:
            if outcome not in ("holds", "fails"):
                continue
            selected = evaluate(node, complexes_of(claim, case_id), Context(Limits()))
            if selected:
                assert outcome == "holds", (h.words, case_id)
            elif h.kind == "separates":
                assert outcome == "fails", (h.words, case_id)


@pytest.mark.slow
def test_betti_over_z2_and_q_on_six_vertices(tmp_path):
    """Betti numbers over Z/2 and over Q differ exactly where H_* has 2-torsion; on <= 6
    vertices this needs the 6-vertex projective plane (Munkres 1984, §6 and Thm 22.2).
    Whatever the finder reports must truly separate (or be sufficient), re-checked here
    through the claim language on every case."""
    claim = tmp_path / "betti.toml"
    claim.write_text('[[claim]]\nname = "betti-z2"\nstatement = "all(betti(K, k) == '
                     'betti(K, k, 2) for k in range(dim(K) + 1))"\n\n  [[claim.over]]\n'
                     '  family = "all-complexes"\n  max_vertices = 6\n')
    store = str(tmp_path / "s.sqlite")
    report = hypotheses_for(str(claim), store=store, out=str(tmp_path / "out"),
                            test_further=False)
    assert report.failing > 0 and report.passing > 0
    _check_reported_hypotheses(report, store, claim)


def test_betti_over_z2_and_q_on_refined_surfaces(tmp_path):
    """Fast variant: the catalog's surfaces; only the non-orientable ones have 2-torsion
    in H_1 (classification of surfaces, Munkres 1984, §6).  The finder's report is
    re-checked through the claim language."""
    claim = tmp_path / "betti.toml"
    claim.write_text('[[claim]]\nname = "betti-z2"\nstatement = "all(betti(K, k) == '
                     'betti(K, k, 2) for k in range(dim(K) + 1))"\n\n  [[claim.over]]\n'
                     '  family = "catalog"\n  names = ["torus-7", "projective-plane-6", '
                     '"klein-bottle-8", "cross-polytope-boundary-3", "moebius-strip-5", '
                     '"dunce-hat-8"]\n\n  [[claim.over]]\n  family = "all-complexes"\n'
                     '  max_vertices = 4\n')
    store = str(tmp_path / "s.sqlite")
    report = hypotheses_for(str(claim), store=store, out=str(tmp_path / "out"),
                            test_further=False)
    assert report.failing == 2                      # projective plane, Klein bottle
    _check_reported_hypotheses(report, store, claim)


# -------------------------------------------------------------- bad input
def _cli(args, capsys):
    from verifier.cli import main
    code = main(args)
    return code, capsys.readouterr()


@pytest.mark.parametrize("body, message", [
    ('expressions = ["gren(K)"]', "tmp.toml:3:17: unknown function 'gren'; did you mean 'green'?"),
    ('expressions = ["dim(K) <= 1"]', "tmp.toml:3:17: 'dim(K) <= 1' gives a bool; a discovery "
                                     "needs numbers"),
    ('expressions = ["euler(K)"]\ndegre = 2', "tmp.toml:4:1: unknown key 'degre' in "
                                             "[discovery]; did you mean 'degree'?"),
])
def test_bad_discovery_files_are_one_line_errors(tmp_path, capsys, monkeypatch, body, message):
    monkeypatch.chdir(tmp_path)
    Path("tmp.toml").write_text(f'[discovery]\nname = "x"\n{body}\n\n  [[discovery.over]]\n'
                                '  family = "all-complexes"\n  max_vertices = 3\n')
    code, out = _cli(["discover", "relations", "tmp.toml", "--out", "found",
                      "--store", "s.sqlite"], capsys)
    assert code == 2
    assert message in out.err and len(out.err.strip().splitlines()) == 1
    assert not Path("found").exists() and not Path("s.sqlite").exists()


def test_an_expression_that_cannot_be_evaluated_names_the_case(tmp_path):
    family = make_family({"family": "all-complexes", "max_vertices": 2})
    with pytest.raises(DiscoveryError, match=r"'f_vector\(K\)\[1\]' cannot be evaluated on "
                                             r"case 0\|all-complexes/0: index 1 outside 0..0"):
        value_table([family], [Expression("f_vector(K)[1]", "f1")])


def test_relations_command_writes_runnable_claims(tmp_path):
    report = relations_from_file(str(ROOT / "discoveries" / "surfaces.toml"),
                                 out=str(tmp_path / "out"), store=str(tmp_path / "s.sqlite"),
                                 test_further=True)
    assert len(report.claim_files) == 2
    assert all(o["verdict"] == "holds" and o["fails"] == 0
               for o in report.further_outcomes.values())
    from verifier.discover.record import load_all
    kept = load_all(tmp_path / "s.sqlite")
    assert kept[0]["kind"] == "relations" and len(kept[0]["relations"]) == 2


def test_report_has_a_discoveries_section(tmp_path):
    """Relations and hypotheses kept in the store appear in report.md and report.html."""
    from verifier.report import write_report
    store = str(tmp_path / "s.sqlite")
    relations_from_file(str(ROOT / "discoveries" / "surfaces.toml"), out=str(tmp_path / "o"),
                        store=store, test_further=True)
    hypotheses_for(str(ROOT / "claims" / "hydrogen-2d-fails.toml"), store=store,
                   out=str(tmp_path / "o"), test_further=True)
    md, html = write_report(store, tmp_path / "rep", certificates_dir=tmp_path)[:2]
    for text in (md.read_text(), html.read_text()):
        assert "Discoveries" in text and "Relations: surfaces" in text
        assert "exactly when dim(K) &lt;= 1" in text or "exactly when dim(K) <= 1" in text

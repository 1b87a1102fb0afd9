"""Working with results: the store queried and compared without SQL (issue 13).

The facts checked: the complexes on at most 3 vertices are the 8 listed by the
`all-complexes` family (tests/test_families.py checks the counts against OEIS); among
them the Euler characteristic exceeds 1 exactly on the 2 and 3 isolated points (2 and 3)
and on an edge plus a point (2), so "euler(K) <= 1" fails on 3 cases.
"""

import hashlib
import json
from pathlib import Path

import pytest

from verifier.cli import main

CLAIM = """
[[claim]]
name      = "small-euler"
title     = "The Euler characteristic is at most 1"
statement = "euler(K) <= 1"
{where}
expect    = "holds"
source    = "conjecture (false: a disjoint union of points)"

  [[claim.over]]
  family = "all-complexes"
  max_vertices = 3
"""


def _run(folder: Path, *extra) -> int:
    return main(["run", str(folder / "small.toml"), "--store", str(folder / "s.sqlite"),
                 "--certificates", str(folder / "certs"), "--engine", "inline", "--quiet",
                 *extra])


@pytest.fixture(scope="module")
def store(tmp_path_factory):
    """A real store: a full run that fails on 3 cases, then the claim's `where` fixed to
    exclude the disconnected complexes and only the failing cases run again."""
    folder = tmp_path_factory.mktemp("queries")
    (folder / "small.toml").write_text(CLAIM.format(where=""))
    assert _run(folder) == 1
    (folder / "small.toml").write_text(CLAIM.format(where='where = "betti(K, 0) == 1"'))
    first = json.loads(_query(["runs", "--store", str(folder / "s.sqlite"), "--as", "json"]))
    assert _run(folder, "--again", first[0]["run_id"][:8]) == 0
    runs = json.loads(_query(["runs", "--store", str(folder / "s.sqlite"), "--as", "json"]))
    return folder, runs[1]["run_id"], runs[0]["run_id"]


def _query(argv, capsys=None) -> str:
    import contextlib
    import io
    buffer = io.StringIO()
    with contextlib.redirect_stdout(buffer):
        code = main(argv)
    assert code in (0, 1), code
    return buffer.getvalue()


def _fingerprint(folder: Path) -> dict:
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.glob("s.sqlite*"))}


def test_runs_show_date_claims_verdicts_and_command(store):
    folder, first, again = store
    runs = json.loads(_query(["runs", "--store", str(folder / "s.sqlite"), "--as", "json"]))
    assert [r["run_id"] for r in runs] == [again, first]
    assert runs[1]["claims"]["small-euler"]["verdict"] == "fails"
    assert runs[1]["claims"]["small-euler"]["cases"] == 8
    assert runs[0]["claims"]["small-euler"] == {
        "expect": "holds", "ok": True, "verdict": "holds", "cases": 3,
        "counts": {"holds": 0, "fails": 0, "outside": 3, "error": 0, "limit": 0, "weak": 0,
                   "undecided": 0}}
    assert runs[0]["again_of"] == first
    assert runs[1]["command"].startswith("verifier run ")
    assert "--again" in runs[0]["command"]
    assert runs[1]["started"][:2] == "20" and runs[1]["finished"]
    table = _query(["runs", "--store", str(folder / "s.sqlite")])
    assert f"again: cases of {first}" in table
    assert "small-euler: fails (8 cases) NOT OK" in table


def test_cases_filtered_by_outcome_family_and_size(store):
    folder, first, _ = store
    base = ["cases", "--store", str(folder / "s.sqlite"), "--run", first]
    failing = json.loads(_query(base + ["--outcome", "fails", "--as", "json"]))
    assert failing["run"] == first and failing["cases"] == 3
    by_id = {c["case_id"]: c for c in failing["shown"]}
    # two points: chi = 2, f-vector (2); three points: chi = 3; an edge and a point: chi = 2
    assert by_id["0|all-complexes/0-1"]["sides"] == ["2", "1"]
    assert by_id["0|all-complexes/0-1"]["sizes"] == {"K": [2, 2]}
    assert by_id["0|all-complexes/0-1-2"]["sizes"] == {"K": [3, 3]}
    assert by_id["0|all-complexes/2-01"]["sizes"] == {"K": [3, 4]}
    csv_text = _query(base + ["--outcome", "fails", "--simplices", "4:", "--as", "csv"])
    assert csv_text.splitlines() == [
        "claim,case,family,outcome,vertices,simplices,values,seconds",
        csv_text.splitlines()[1]]
    assert csv_text.splitlines()[1].startswith(
        "small-euler,0|all-complexes/2-01,all-complexes,fails,3,4,2  vs  1,")
    everything = json.loads(_query(base + ["--as", "json"]))
    assert everything["cases"] == 8
    assert json.loads(_query(base + ["--vertices", ":1", "--as", "json"]))["cases"] == 1
    assert json.loads(_query(base + ["--family", "graphs", "--as", "json"]))["cases"] == 0
    table = _query(base + ["--outcome", "fails"])
    for column in ("claim", "case", "outcome", "vertices", "simplices", "values"):
        assert column in table
    assert "0|all-complexes/0-1-2" in table and "3  vs  1" in table


def test_again_records_a_run_of_the_failing_cases_only(store):
    folder, first, again = store
    rows = json.loads(_query(["cases", "--store", str(folder / "s.sqlite"), "--run", again,
                              "--as", "json"]))
    assert sorted(c["case_id"] for c in rows["shown"]) == [
        "0|all-complexes/0-1", "0|all-complexes/0-1-2", "0|all-complexes/2-01"]
    assert {c["outcome"] for c in rows["shown"]} == {"outside"}
    assert not (folder / "certs" / "small-euler.json").read_text() == ""   # from the first


def test_diff_names_verdicts_failures_and_digests(store, capsys):
    folder, first, again = store
    code = main(["diff", first[:10], again, "--store", str(folder / "s.sqlite")])
    out = capsys.readouterr().out
    assert code == 1
    assert "small-euler: verdict fails -> holds" in out
    assert "3 cases no longer fail: 0|all-complexes/0-1, 0|all-complexes/0-1-2, " \
           "0|all-complexes/2-01" in out
    assert "digest differs" in out and "(8 -> 3 cases)" in out
    data = json.loads(_query(["diff", first, first, "--store", str(folder / "s.sqlite"),
                              "--as", "json"]))
    assert data["changed"] == [] and main(["diff", first, first, "--store",
                                           str(folder / "s.sqlite")]) == 0


def test_read_only_commands_leave_the_store_unchanged(store):
    folder, first, again = store
    before = _fingerprint(folder)
    for argv in (["runs"], ["cases", "--as", "json"], ["cases", "--run", first],
                 ["diff", first, again], ["summary"]):
        _query(argv + ["--store", str(folder / "s.sqlite")])
    assert _fingerprint(folder) == before


@pytest.mark.parametrize("argv, message", [
    (["cases", "--run", "zzz"], "error: no run 'zzz' in "),
    (["diff", "zzz", "latest"], "error: no run 'zzz' in "),
    (["cases", "--claim", "energy"], "has no claim 'energy' (its claims: small-euler)"),
    (["cases", "--outcome", "passed"], "error: unknown outcome 'passed'; valid: holds, fails"),
])
def test_bad_run_ids_and_filters_are_one_line_exit_2(store, capsys, argv, message):
    folder, _, _ = store
    assert main(argv + ["--store", str(folder / "s.sqlite")]) == 2
    err = capsys.readouterr().err
    assert message in err and err.count("\n") == 1 and "Traceback" not in err


def test_missing_store_is_one_line_exit_2(tmp_path, capsys):
    for argv in (["runs"], ["cases"], ["diff", "a", "b"]):
        assert main(argv + ["--store", str(tmp_path / "none.sqlite")]) == 2
        err = capsys.readouterr().err
        assert "no such file" in err and err.count("\n") == 1
    assert not (tmp_path / "none.sqlite").exists()


def test_again_with_nothing_to_evaluate_is_refused(store, capsys):
    folder, _, again = store
    assert _run(folder, "--again", again) == 2
    assert "that run has no failing or unsettled case of these claims" in \
        capsys.readouterr().err


# ------------------------------------------------------------ claims from a notebook
def test_check_runs_a_statement_without_a_file_and_writes_a_certificate(tmp_path):
    # the energy theorem (O. Knill, Linear Algebra Appl. 600 (2020)) on the 8 complexes
    # with at most 3 vertices; "euler(K) <= 1" fails first on two points (chi = 2)
    import verifier
    from verifier.certificates import load
    from verifier.run.runner import RunResult

    result = verifier.check("sum(green(K)) == euler(K)",
                            over=[{"family": "all-complexes", "max_vertices": 3}],
                            certificates=tmp_path / "certs", store=tmp_path / "n.sqlite")
    assert isinstance(result, RunResult) and result.ok
    assert (result.claims[0].verdict, result.claims[0].cases) == ("holds", 8)
    assert "<table" in result._repr_html_()
    (path,) = result.certificates
    assert load(path)["claim"]["statement"] == "sum(green(K)) == euler(K)"
    runs = json.loads(_query(["runs", "--store", str(tmp_path / "n.sqlite"), "--as", "json"]))
    assert runs[0]["command"].startswith("verifier.check('sum(green(K)) == euler(K)'")
    failing = verifier.check("euler(K) <= 1", where="dim(K) == 0",
                             over=[{"family": "all-complexes", "max_vertices": 3}],
                             expect="fails")
    assert failing.ok and failing.claims[0].counterexample["complexes"] == {"K": [[0], [1]]}


def test_check_reports_a_bad_statement_at_its_column():
    import verifier
    from verifier.claims.errors import ClaimError
    with pytest.raises(ClaimError, match="unknown function 'gren'; did you mean 'green'"):
        verifier.check("sum(gren(K)) == 1", over=[{"family": "all-complexes",
                                                   "max_vertices": 2}])


def test_catalog_entry_has_facets_for_every_name():
    # constructed names used to give facets = None; the boundary of the triangle is the
    # 3-cycle, and the recipe of sphere-2 (boundary of the tetrahedron) has 4 triangles
    from verifier.families import catalog
    assert catalog.entry("sphere-1")["facets"] == [[1, 2], [1, 3], [2, 3]]
    for name in catalog.names():
        record = catalog.entry(name)
        assert record["facets"] == catalog.complex(name).facet_labels(), name
    assert len(catalog.entry("sphere-2")["facets"]) == 4


# ------------------------------------------------------------------ output wording
def test_summary_off_a_terminal_keeps_every_column_and_explains_s(store):
    # stdout captured (not a terminal, 80 columns by default): no column is dropped or cut
    folder, first, _ = store
    out = _query(["summary", "--store", str(folder / "s.sqlite"), "--run", first])
    header = next(line for line in out.splitlines() if "claim" in line)
    assert header.split() == ["claim", "cases", "holds", "fails", "outside", "other", "s"]
    (folder / "other.toml").write_text(CLAIM.format(where="").replace(
        '"small-euler"', '"a-claim-with-a-rather-long-name-for-the-table"'))
    out = _query(["run", str(folder / "other.toml"), "--store", str(folder / "o.sqlite"),
                  "--certificates", str(folder / "certs"), "--engine", "inline", "--quiet"])
    assert "a-claim-with-a-rather-long-name-for-the-table   fails NOT OK" in out
    assert "s: seconds of computation summed over the claim's cases (not wall time" in out


def test_search_by_name_says_it_looks_in_claims_only(tmp_path, monkeypatch, capsys):
    (tmp_path / "claims").mkdir()
    (tmp_path / "claims" / "small.toml").write_text(CLAIM.format(where=""))
    monkeypatch.chdir(tmp_path)
    assert main(["search", "energy", "--seconds", "1"]) == 2
    assert capsys.readouterr().err.strip() == (
        "error: search: no claim named 'energy' in ./claims (a claim's name is looked up "
        "there only; give the claim file's path instead)")

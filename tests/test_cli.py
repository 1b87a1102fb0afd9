"""The `verifier` command as a user types it."""

from __future__ import annotations

import json
import subprocess
import sys

from verifier.cli import main


ROOT = __import__("pathlib").Path(__file__).resolve().parent.parent


def run(*args):
    return subprocess.run([sys.executable, "-m", "verifier", *args], capture_output=True,
                          text=True, timeout=120, cwd=ROOT)


def test_show_prints_exact_invariants_of_the_torus(capsys):
    # 7-vertex torus (Moebius 1861 / Csaszar 1949): f = (7, 21, 14), chi = 0,
    # Betti numbers (1, 2, 1) -- values recorded with their source in
    # verifier/families/data/triangulations.json.
    assert main(["show", "torus-7"]) == 0
    out = capsys.readouterr().out
    assert "[7, 21, 14]" in out
    assert "[1, 2, 1]" in out
    assert "closed manifold" in out
    # det L = prod omega = (-1)^(f_1) = -1 (Knill, arXiv:1612.08229); signature of L is
    # (#even, #odd simplices) = (21, 21, 0) (Knill, arXiv:1711.09527)
    assert "-1" in out and "(21, 21, 0)" in out


def test_show_reads_a_facet_file(tmp_path, capsys):
    # a hollow triangle: the circle, chi = 0, b = (1, 1) (hand computation)
    path = tmp_path / "circle.txt"
    path.write_text("# three edges\n1 2\n2 3\n1, 3\n")
    assert main(["show", str(path)]) == 0
    out = capsys.readouterr().out
    assert "[3, 3]" in out and "[1, 1]" in out


def test_show_reads_json(tmp_path, capsys):
    path = tmp_path / "edge.json"
    path.write_text(json.dumps({"facets": [[1, 2]]}))
    assert main(["show", str(path)]) == 0
    assert "[2, 1]" in capsys.readouterr().out


def test_unknown_name_is_one_line_with_a_suggestion_and_exit_2():
    result = run("show", "tours-7")
    assert result.returncode == 2
    assert "unknown catalog name 'tours-7'; did you mean 'torus-7'?" in result.stderr
    assert "Traceback" not in result.stderr and result.stdout == ""


def test_bad_file_names_line_and_exit_2(tmp_path):
    path = tmp_path / "bad.txt"
    path.write_text("1 2 3\n4 4\n")
    result = run("show", str(path))
    assert result.returncode == 2
    assert f"{path}:2: repeated vertex in [4, 4]" in " ".join(result.stderr.split())
    assert "Traceback" not in result.stderr


def test_missing_file_exit_2(tmp_path):
    result = run("show", str(tmp_path / "nothing.txt"))
    assert result.returncode == 2
    assert "no such file" in result.stderr


def test_all_inputs_are_checked_before_any_output(capsys):
    assert main(["show", "torus-7", "no-such-complex"]) == 2
    assert "[7, 21, 14]" not in capsys.readouterr().out


def test_list_names_every_catalog_entry(capsys):
    from verifier.families import catalog
    assert main(["show", "--list"]) == 0
    out = capsys.readouterr().out
    for name in catalog.names():
        assert name in out


def test_functions_lists_every_function_with_its_source(capsys):
    from verifier.claims.functions import TABLE
    assert main(["functions"]) == 0
    out = capsys.readouterr().out
    for f in TABLE:
        assert f.signature() in " ".join(out.split()) or f.name + "(" in out
    assert "O. Knill, Linear Algebra Appl. 600 (2020) 96-129" in " ".join(out.split())


def test_families_lists_every_family_and_parameter(capsys):
    from verifier.families import describe
    assert main(["families"]) == 0
    out = " ".join(capsys.readouterr().out.split())
    for family in describe():
        assert family["name"] + ":" in out
        for p in family["parameters"]:
            assert p["name"] in out
    assert "[lo, hi]" in out     # markup-like text is shown as written


def test_search_finds_the_triangle_and_writes_a_certificate(tmp_path):
    # the hydrogen identity fails in dimension 2 (Knill, arXiv:1803.01464, states it for
    # graphs); the search must find a counterexample that shrinks to one triangle
    result = run("search", "claims/hydrogen-2d-fails.toml", "--seconds", "30", "--seed", "3",
                 "--certificates", str(tmp_path))
    assert result.returncode == 0, result.stdout + result.stderr
    certificate = json.loads((tmp_path / "hydrogen-identity-2d.json").read_text())
    facets = certificate["complex"]["facets"]
    assert len(facets) == 1 and len(facets[0]) == 3
    checked = run("check", str(tmp_path / "hydrogen-identity-2d.json"))
    assert checked.returncode == 0, checked.stdout


def test_search_reports_nothing_found_for_a_theorem(tmp_path):
    result = run("search", "energy", "--seconds", "3", "--certificates", str(tmp_path))
    assert result.returncode == 0
    assert "no counterexample found (evidence, not proof)" in result.stdout
    assert not list(tmp_path.iterdir())


def test_energy_explorer_writes_diagram_and_exact_facts(tmp_path):
    # the path with 3 vertices: the uniform measure is not critical (row sums of g are
    # 0, -1, 0, 1, 1, not all equal) and the T = 0 minimum of U is -1, at a point mass on
    # the middle vertex or on either edge (hand computation, see tests/test_energy.py)
    path = tmp_path / "path3.txt"
    path.write_text("1 2\n2 3\n")
    result = run("energy", str(path), "--out", str(tmp_path), "--temperatures", "2:0.1:12")
    assert result.returncode == 0, result.stderr
    out = " ".join(result.stdout.split())
    assert "uniform measure critical for every T: no" in out
    # three minimisers, each a probability measure (a point mass), not one measure of mass 3
    assert ("T = 0: minimum of U = -1, attained by 3 probability measures: p = δ[2, 3]; "
            "p = δ[1, 2]; p = δ[2]") in out
    assert (tmp_path / "energy-path3.png").stat().st_size > 0
    assert (tmp_path / "energy-path3.csv").read_text().count("\n") > 12
    bad = run("energy", str(path), "--temperatures", "2:x")
    assert bad.returncode == 2 and "expected A:B:N" in bad.stderr


def test_a_search_certificate_is_checked_from_its_recorded_original(tmp_path):
    # common practice, no source: a search certificate names no family case, so the
    # checker re-evaluates the recorded original and replays the shrinking from it; an
    # original that does not fail (a single edge is outside dim(K) == 2) is refused even
    # with both hashes recomputed
    from verifier.certificates import _load, seal
    result = run("search", "claims/hydrogen-2d-fails.toml", "--seconds", "30", "--seed", "3",
                 "--certificates", str(tmp_path))
    assert result.returncode == 0, result.stdout + result.stderr
    path = tmp_path / "hydrogen-identity-2d.json"
    data = _load(path)
    assert data["cases"] == 1 and data["outcomes"]["fails"] == 1
    data["original"]["complexes"]["K"]["facets"] = [[1, 2]]
    body = {k: v for k, v in data.items() if k != "sha256"}
    path.write_text(json.dumps(seal(body), sort_keys=True))
    checked = run("check", str(path))
    assert checked.returncode == 1
    assert "NOT verified" in checked.stdout


def test_list_keeps_sources_whole_and_titles_in_prose(capsys):
    # common practice, no source: a source is never cut mid-word, and the recorded
    # entries carry prose titles (the reference data's titles, ../shared/data)
    from verifier.families import catalog
    assert main(["show", "--list"]) == 0
    tokens = set(capsys.readouterr().out.replace("│", " ").split())
    for name in catalog.recorded_names():
        entry = catalog.entry(name)
        assert set(entry["source"].split()) <= tokens, name
        assert "_" not in entry["title"], entry["title"]

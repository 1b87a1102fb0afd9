"""Reports that go into a paper (issue 13, section 4): scope, provenance, LaTeX, Markdown.

Each test reads a real store written by `verifier run` (three runs of three small claim
files) and checks the report against what the store, the claim files and the
certificate files say: SHA-256 digests recomputed with hashlib, versions from
importlib.metadata, the command line as the store recorded it.
"""

from __future__ import annotations

import hashlib
import platform
import shutil
import subprocess
import sys
from importlib import metadata
from pathlib import Path

import pytest

from verifier.report import collect, write_latex, write_report

# a statement over several lines (TOML multi-line string) and two bound complexes, one of
# them from a family whose parameters make a long text
TWO_COMPLEXES = '''[[claim]]
name = "euler-of-join"
title = "Euler characteristic of a join"
statement = """
euler(join(A, B))
  == euler(A) + euler(B) - euler(A) * euler(B)
"""
source = "J. R. Munkres (1984) §62: the join's reduced Euler characteristic is minus a product"

  [[claim.over]]
  bind = "A"
  family = "catalog"
  names = ["sphere-1", "sphere-2", "moebius-strip-5", "projective-plane-6", "torus-7"]

  [[claim.over]]
  bind = "B"
  family = "cycles"
  lengths = [3, 6]
'''

CERTIFIED = '''[[claim]]
name = "zeta-positive-at-one-half"
statement = "re(zeta(connection(K) ** 2, 1/2)) > 0"
evidence = "certified"
source = "demo: a sum of positive square roots of eigenvalues of L^2"

  [[claim.over]]
  family = "cycles"
  lengths = [4, 5]
'''

FAILS = '''[[claim]]
name = "at-most-one-triangle"
statement = "f_vector(K)[2] < 2 if dim(K) >= 2 else True"
expect = "fails"
source = "demo"

  [[claim.over]]
  family = "all-complexes"
  max_vertices = 4
'''


def verifier(*args, cwd=None):
    done = subprocess.run([sys.executable, "-m", "verifier", *args], capture_output=True,
                          text=True, timeout=300, cwd=cwd)
    assert done.returncode in (0, 1), done.stdout + done.stderr
    return done


@pytest.fixture(scope="module")
def store(tmp_path_factory):
    folder = tmp_path_factory.mktemp("provenance")
    runs = []
    for name, text in (("join.toml", TWO_COMPLEXES), ("certified.toml", CERTIFIED),
                       ("fails.toml", FAILS)):
        (folder / name).write_text(text)
        verifier("run", name, "--engine", "inline", "--store", "s.sqlite",
                 "--certificates", "certs", cwd=folder)
        runs.append(collect(folder / "s.sqlite").run_id)
    return folder, runs


def test_the_default_scope_is_the_latest_run_and_others_can_be_chosen(store):
    folder, runs = store
    latest = collect(folder / "s.sqlite", certificates_dir=folder / "certs")
    assert [c.name for c in latest.claims] == ["at-most-one-triangle"]
    every = collect(folder / "s.sqlite", certificates_dir=folder / "certs", every_claim=True)
    assert sorted(c.name for c in every.claims) == [
        "at-most-one-triangle", "euler-of-join", "zeta-positive-at-one-half"]
    assert {c.name: c.run_id for c in every.claims} == {
        "euler-of-join": runs[0], "zeta-positive-at-one-half": runs[1],
        "at-most-one-triangle": runs[2]}
    two = collect(folder / "s.sqlite", runs=runs[:2])
    assert [c.name for c in two.claims] == ["euler-of-join", "zeta-positive-at-one-half"]
    # through the command line: repeated --run, and --every-claim
    out = folder / "several"
    verifier("report", "--store", "s.sqlite", "--run", runs[0], "--run", runs[1],
             "--out", str(out), "--certificates", "certs", cwd=folder)
    text = (out / "report.md").read_text()
    assert text.startswith(f"# Verifier report: runs {runs[0]}, {runs[1]}")
    assert "## euler-of-join" in text and "## zeta-positive-at-one-half" in text
    assert f"- run: `{runs[1]}`" in text
    verifier("report", "--store", "s.sqlite", "--every-claim", "--out", str(folder / "all"),
             "--certificates", "certs", cwd=folder)
    text = (folder / "all" / "report.md").read_text()
    assert text.startswith("# Verifier report: the latest verdict of each of the 3 claims")
    for name in ("euler-of-join", "zeta-positive-at-one-half", "at-most-one-triangle"):
        assert f"## {name}:" in text


def provenance_expected(folder: Path, runs: list[str]) -> list[str]:
    expected = [f"simplicial-verifier {metadata.version('simplicial-verifier')}",
                f"python-flint {metadata.version('python-flint')}",
                f"sympy {metadata.version('sympy')}", f"Python {platform.python_version()}",
                platform.node(), platform.machine(),
                "verifier run join.toml --engine inline --store s.sqlite --certificates certs"]
    for name in ("join.toml", "certified.toml", "fails.toml"):
        expected.append(hashlib.sha256((folder / name).read_bytes()).hexdigest())
    for name in ("euler-of-join", "zeta-positive-at-one-half", "at-most-one-triangle"):
        expected.append(hashlib.sha256((folder / "certs" / f"{name}.json").read_bytes())
                        .hexdigest())
    expected += ["precision of zeta-positive-at-one-half: certified values at 128 bits",
                 "precision of euler-of-join: no certified values (every value exact)"]
    return expected


@pytest.mark.parametrize("form", ["md", "html", "tex"])
def test_every_report_states_its_provenance(store, form):
    folder, runs = store
    out = folder / f"prov-{form}"
    if form == "tex":
        path = write_latex(folder / "s.sqlite", out / "r.tex", every_claim=True,
                           certificates_dir=folder / "certs")
        text = path.read_text().replace(r"\allowbreak{}", "")
    else:
        write_report(folder / "s.sqlite", out, every_claim=True,
                     certificates_dir=folder / "certs")
        text = (out / f"report.{form}").read_text()
    for item in provenance_expected(folder, runs):
        if form == "tex":
            item = item.replace("_", r"\_")
        if form == "html":          # what and value are a <dt> and a <dd>
            assert all(part in text for part in item.split(": ")), item
            continue
        assert item in text, item


def test_the_latex_fragment_inputs_into_a_paper_and_cuts_nothing(store, tmp_path):
    folder, runs = store
    fragment = write_latex(folder / "s.sqlite", tmp_path / "results.tex", fragment=True,
                           every_claim=True, certificates_dir=folder / "certs")
    text = fragment.read_text()
    assert r"\documentclass" not in text and r"\begin{document}" not in text
    assert r"\end{document}" not in text
    # family parameters are never cut: every name of the catalog family is there
    plain = text.replace(r"\allowbreak{}", "")
    for name in ("sphere-1", "sphere-2", "moebius-strip-5", "projective-plane-6", "torus-7"):
        assert name in plain
    assert "..." not in plain and "\u2026" not in plain
    # with two bound complexes each family says which variable it binds
    assert r"$A\leftarrow$ catalog" in plain and r"$B\leftarrow$ cycles" in plain
    paper = tmp_path / "paper.tex"
    paper.write_text("\\documentclass{article}\n\\usepackage{tikz}\n\\usepackage{longtable}\n"
                     "\\usepackage{array}\n\\begin{document}\nOur results:\n\\input{results.tex}\n\\end{document}\n")
    pdflatex = shutil.which("pdflatex")
    if pdflatex is None:
        pytest.fail("pdflatex is required by the report tests: run `make system-deps`")
    done = subprocess.run([pdflatex, "-interaction=nonstopmode", "-halt-on-error",
                           "paper.tex"], cwd=tmp_path, capture_output=True, text=True,
                          timeout=180)
    assert done.returncode == 0, done.stdout[-3000:]
    assert "Overfull \\hbox" not in done.stdout or "results.tex" not in done.stdout
    # the command writes it too
    verifier("report", "--store", "s.sqlite", "--every-claim", "--out", str(tmp_path / "o"),
             "--certificates", "certs", "--latex-fragment", str(tmp_path / "f.tex"), cwd=folder)
    assert r"\documentclass" not in (tmp_path / "f.tex").read_text()


def test_a_multi_line_statement_keeps_its_lines_in_markdown(store):
    folder, runs = store
    write_report(folder / "s.sqlite", folder / "md", run_id=runs[0],
                 certificates_dir=folder / "certs")
    text = (folder / "md" / "report.md").read_text()
    block = ("- statement:\n\n  ```\n  euler(join(A, B))\n"
             "    == euler(A) + euler(B) - euler(A) * euler(B)\n  ```\n")
    assert block in text
    html_text = (folder / "md" / "report.html").read_text()
    assert ("<pre>euler(join(A, B))\n  == euler(A) + euler(B) - euler(A) * euler(B)</pre>"
            in html_text)


def test_the_report_shows_the_relabelled_and_recognised_counterexample(store):
    folder, runs = store
    write_report(folder / "s.sqlite", folder / "cx", run_id=runs[2],
                 certificates_dir=folder / "certs")
    text = (folder / "cx" / "report.md").read_text()
    assert "- K relabelled: [[1, 2, 3], [1, 2, 4]]" in text


def test_a_closed_surface_is_drawn_in_space_in_the_latex_export(tmp_path):
    # the 6-vertex projective plane has the complete graph K_6 as 1-skeleton, which is not
    # planar (Kuratowski; common practice): the TikZ picture is the 3-dimensional view
    # (every triangle drawn, back to front, half-transparent) and it compiles
    import shutil
    import subprocess

    from verifier.families import catalog
    from verifier.report import _tikz

    picture = _tikz(catalog.complex("projective-plane-6").facet_labels())
    assert "3-dimensional view" in picture and picture.count("\\filldraw") == 10
    flat = _tikz([[1, 2, 3], [1, 3, 4]])
    assert "3-dimensional view" not in flat
    pdflatex = shutil.which("pdflatex")
    assert pdflatex is not None, "pdflatex is required: run `make system-deps`"
    (tmp_path / "p.tex").write_text("\\documentclass{article}\\usepackage{tikz}"
                                    "\\begin{document}" + picture + "\\end{document}\n")
    done = subprocess.run([pdflatex, "-interaction=nonstopmode", "-halt-on-error", "p.tex"],
                          cwd=tmp_path, capture_output=True, text=True, timeout=180)
    assert done.returncode == 0, done.stdout[-2000:]

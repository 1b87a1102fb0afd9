"""Reports of a run: the HTML page rendered in real headless Chromium, the numbers checked
against the store, the LaTeX export compiled with pdflatex, the command line.

One run feeds every test: the shipped energy claim (first 200 cases), the two shipped
failing companions (hydrogen identity and reciprocity of L^2 in dimension 2; their
minimal counterexample is the single triangle [[0, 1, 2]]) and a claim of our own whose
title and source are full of characters that HTML and LaTeX treat specially.

Chromium (Debian package ``chromium``) and pdflatex (``texlive-latex-base`` and
``texlive-pictures``) are installed by ``make system-deps``, which ``make test`` runs
first; a missing binary fails these tests with that instruction, it never skips them.
Chromium is started with no network: a proxy at a closed port, every host name
unresolvable, background networking off.
"""

from __future__ import annotations

import html
import itertools
import json
import re
import shutil
import subprocess
from fractions import Fraction
from html.parser import HTMLParser
from pathlib import Path
from types import SimpleNamespace

import pytest
import sympy

from verifier import drawing
from verifier.certificates import write_certificates
from verifier.cli import main
from verifier.report import (CAUTION, ReportError, collect, counterexample_drawing,
                             recheck_command, write_latex, write_report)
from verifier.run.runner import RunOptions, run
from verifier.run.store import Store

ROOT = Path(__file__).resolve().parent.parent

SPECIAL_TITLE = ('Euler-Poincare, 50% & #1: chi_2 ~ {x^2} $ \\ <b>not bold</b> "χ ≤ 2" — '
                 'Möbius, Erdős, 日本 | a<b>c')
SPECIAL_CLAIM = f'''# A claim of our own whose texts exercise HTML and LaTeX escaping.
[[claim]]
name      = "euler-poincare-escaping"
title     = {json.dumps(SPECIAL_TITLE, ensure_ascii=False)}
statement = "euler(K) == sum((-1) ** k * betti(K, k) for k in range(dim(K) + 1))"
expect    = "holds"
source    = "J. R. Munkres, Elements of Algebraic Topology (1984), Thm 22.2 & §22 <p>"

  [[claim.over]]
  family = "all-complexes"
  max_vertices = 3
'''

CHROMIUM_FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
                  "--no-first-run", "--disable-background-networking",
                  "--disable-component-update", "--disable-sync", "--hide-scrollbars",
                  "--proxy-server=127.0.0.1:9", "--host-resolver-rules=MAP * ~NOTFOUND"]
_profiles = itertools.count()


# ------------------------------------------------------------------ the run
@pytest.fixture(scope="module")
def report(tmp_path_factory):
    """A run with passes and counterexamples, its certificates, report and LaTeX file."""
    base = tmp_path_factory.mktemp("report")
    special = base / "escaping.toml"
    special.write_text(SPECIAL_CLAIM, encoding="utf-8")
    store = base / "verifier.sqlite"
    result = run([str(ROOT / "claims/energy.toml"), str(ROOT / "claims/hydrogen-2d-fails.toml"),
                  str(ROOT / "claims/reciprocal-2d-fails.toml"), str(special)],
                 RunOptions(store=str(store), engine="inline", workers=1, max_cases=200))
    certificates = base / "certificates"
    write_certificates(result, certificates)
    out = base / "out"
    written = write_report(store, out, certificates_dir=certificates)
    latex = write_latex(store, base / "latex" / "report.tex", certificates_dir=certificates)
    return SimpleNamespace(base=base, store=store, result=result, certificates=certificates,
                           out=out, written=written, latex=latex,
                           html=(out / "report.html").read_text(encoding="utf-8"),
                           markdown=(out / "report.md").read_text(encoding="utf-8"))


def test_the_run_has_passes_and_counterexamples(report):
    verdicts = {r.claim.name: r.verdict for r in report.result.claims}
    assert verdicts == {"energy": "holds", "hydrogen-identity-2d": "fails, as expected",
                        "reciprocal-charpoly-2d": "fails, as expected",
                        "euler-poincare-escaping": "holds"}
    assert [p.name for p in report.written[:2]] == ["report.md", "report.html"]


# ------------------------------------------------------------------ Chromium
def chromium() -> str:
    path = shutil.which("chromium") or shutil.which("chromium-browser")
    if path is None:
        pytest.fail("headless Chromium is required by the report tests and is not installed: "
                    "run `make system-deps` (Debian packages chromium and chromium-driver)",
                    pytrace=False)
    return path


def browse(tmp_path: Path, target: Path, *options: str) -> subprocess.CompletedProcess:
    """Chromium, headless and offline, on a local file; console messages on stderr."""
    profile = tmp_path / f"chromium-profile-{next(_profiles)}"
    command = [chromium(), *CHROMIUM_FLAGS, f"--user-data-dir={profile}",
               "--enable-logging=stderr", "--v=0", *options, target.resolve().as_uri()]
    done = subprocess.run(command, capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, f"chromium failed ({done.returncode}): {done.stderr[-2000:]}"
    return done


def console_messages(stderr: str) -> list[str]:
    """Chromium logs each console message of the page (errors, CSP violations, failed
    loads) as a line with CONSOLE in it (common practice, no source)."""
    return [line for line in stderr.splitlines() if "CONSOLE" in line]


PROBE_HEAD = """<script>
window.__problems = [];
window.addEventListener("error", function (e) {
  window.__problems.push("error: " + (e.message || (e.target && (e.target.src || e.target.href))));
}, true);
document.addEventListener("securitypolicyviolation", function (e) {
  window.__problems.push("blocked: " + e.blockedURI);
});
</script>"""

PROBE_BODY = """<script>
window.addEventListener("load", function () {
  var images = Array.prototype.map.call(document.images, function (img) {
    return {alt: img.alt, complete: img.complete, width: img.naturalWidth,
            height: img.naturalHeight, inline: img.src.indexOf("data:image/png;base64,") === 0};
  });
  document.body.setAttribute("data-probe", JSON.stringify({images: images,
    problems: window.__problems, title: document.title}));
});
</script>"""


def probe(report, tmp_path) -> dict:
    """Load a copy of report.html with two small scripts added (the page itself has no
    script) and read what they found from the DOM Chromium dumps after the load event.
    The copy's security policy additionally allows inline scripts; nothing else changes."""
    page = report.html
    policy = re.search(r'<meta http-equiv="Content-Security-Policy" content="([^"]*)"/>', page)
    assert policy, "the report declares a Content-Security-Policy"
    page = page.replace(policy.group(1), policy.group(1) + "; script-src 'unsafe-inline'")
    page = page.replace("<head>", "<head>" + PROBE_HEAD, 1)
    page = page.replace("</body>", PROBE_BODY + "</body>", 1)
    copy = tmp_path / "probe.html"
    copy.write_text(page, encoding="utf-8")
    done = browse(tmp_path, copy, "--virtual-time-budget=10000", "--dump-dom")
    found = re.search(r'data-probe="([^"]*)"', done.stdout)
    assert found, "the probe did not run (no data-probe attribute in the dumped DOM)"
    return json.loads(html.unescape(found.group(1)))


def test_every_image_of_the_html_report_loads_in_chromium(report, tmp_path):
    result = probe(report, tmp_path)
    images = result["images"]
    pngs = [p for p in report.written if p.suffix == ".png"]
    # one <img> per picture written beside report.md; at least the two counterexample
    # drawings and the spectrum of the reciprocity companion (charpoly of L^2); the
    # hydrogen identity compares matrices entry by entry and gets no spectrum picture
    assert len(images) == len(pngs) >= 3
    assert sum("counterexample" in i["alt"] for i in images) == 2
    for image in images:
        assert image["inline"], image["alt"]
        assert image["complete"] and image["width"] > 0 and image["height"] > 0, image
    assert result["problems"] == []
    assert result["title"].startswith("Verifier report: run ")


def test_the_html_report_logs_no_console_message_in_chromium(report, tmp_path):
    done = browse(tmp_path, report.out / "report.html", "--virtual-time-budget=5000",
                  "--dump-dom")
    assert "Verifier report" in done.stdout
    assert console_messages(done.stderr) == []


def test_the_console_check_sees_a_page_that_reaches_for_the_network(tmp_path):
    # control for the test above: the same capture reports a page whose image lies on the
    # network (blocked by its policy) and which writes to the console
    page = tmp_path / "control.html"
    page.write_text('<!DOCTYPE html><html><head><meta http-equiv="Content-Security-Policy" '
                    "content=\"default-src 'none'; script-src 'unsafe-inline'\"/></head><body>"
                    '<img src="https://example.org/x.png" alt="remote"/>'
                    '<script>console.error("control message")</script></body></html>',
                    encoding="utf-8")
    done = browse(tmp_path, page, "--virtual-time-budget=3000", "--dump-dom")
    messages = "\n".join(console_messages(done.stderr))
    assert "example.org" in messages and "control message" in messages


def test_a_screenshot_of_the_html_report_is_not_blank(report, tmp_path):
    from PIL import Image

    shot = tmp_path / "report.png"
    browse(tmp_path, report.out / "report.html", "--window-size=1200,2000",
           f"--screenshot={shot}")
    with Image.open(shot) as image:
        rgb = image.convert("RGB")
        assert rgb.size == (1200, 2000)
        colours = rgb.getcolors(maxcolors=1 << 24)
    assert len(colours) > 1
    white = sum(count for count, colour in colours if colour == (255, 255, 255))
    assert white < 0.99 * 1200 * 2000       # text, tables and pictures cover the page


def test_the_html_report_is_self_contained(report):
    class Links(HTMLParser):
        def __init__(self):
            super().__init__()
            self.found = []

        def handle_starttag(self, tag, attrs):
            for name, value in attrs:
                if name in ("src", "href", "srcset", "action", "data", "poster"):
                    self.found.append((tag, name, value))
            if tag in ("link", "iframe", "object", "embed"):
                self.found.append((tag, "tag", ""))
            if tag == "script" and dict(attrs).get("type") != "application/json":
                self.found.append((tag, "script", ""))

    parser = Links()
    parser.feed(report.html)
    for tag, name, value in parser.found:
        assert (tag, name) == ("img", "src") and value.startswith("data:image/png;base64,") \
            or (tag, name) == ("a", "href") and value.startswith("#"), (tag, name, value[:60])
    assert "default-src 'none'" in report.html
    assert not re.search(r"url\(|@import|https?://", report.html.split("<body>")[0])


# ------------------------------------------------------------------ numbers
def embedded_numbers(page: str) -> dict:
    block = re.search(r'<script type="application/json" id="verifier-report-data">(.*?)'
                      r"</script>", page, re.S)
    assert block, "the report embeds its numbers as JSON"
    return json.loads(block.group(1))


def markdown_summary(text: str) -> dict[str, dict]:
    """The summary table of report.md: claim -> counts (and cases)."""
    rows = {}
    header = None
    for line in text.split("## Summary", 1)[1].split("\n## ", 1)[0].splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if cells[0] == "claim":
            header = cells
        elif header and len(cells) == len(header) and not cells[0].startswith("---"):
            rows[cells[0]] = dict(zip(header, cells))
    return rows


def test_the_reports_numbers_equal_the_stores(report):
    # the report must say what the store says (common practice, no source)
    store = Store(report.store)
    try:
        run_id = store.latest_run()
        summary = store.summary(run_id)
    finally:
        store.close()
    assert run_id == report.result.run_id
    numbers = embedded_numbers(report.html)
    assert numbers["run"] == run_id
    assert set(numbers["claims"]) == set(summary) == {r.claim.name for r in report.result.claims}
    table = markdown_summary(report.markdown)
    assert set(table) == set(summary)
    for name, entry in summary.items():
        shown = numbers["claims"][name]
        assert shown["cases"] == entry["cases"]
        assert shown["counts"] == entry["counts"]
        assert shown["seconds"] == pytest.approx(entry["seconds"], abs=1e-5)
        row = table[name]
        assert int(row["cases"]) == entry["cases"]
        assert {o: int(row[o]) for o in entry["counts"]} == entry["counts"]
        # one variable per claim here: each case belongs to exactly one family row
        assert sum(f["cases"] for f in shown["families"]) == entry["cases"]
        for outcome, count in entry["counts"].items():
            assert sum(f["counts"][outcome] for f in shown["families"]) == count


def test_family_rows_count_the_cases_of_each_family(report):
    # energy's first 200 cases all come from its first family (all-complexes): the cap
    # max_cases = 200 stops it before the graphs, random and refined families
    energy = embedded_numbers(report.html)["claims"]["energy"]
    assert [(f["family"], f["cases"]) for f in energy["families"]] == [
        ("all-complexes", 200), ("graphs", 0), ("linial-meshulam", 0), ("refine", 0)]
    assert "No case was drawn from graphs, linial-meshulam, refine." in report.markdown


def test_the_report_states_the_caution_and_how_to_recheck(report, capsys):
    assert CAUTION in report.markdown and html.escape(CAUTION) in report.html
    for r in report.result.claims:
        command = recheck_command(report.certificates / f"{r.claim.name}.json")
        assert command in report.markdown and html.escape(command) in report.html
    # the command printed for a counterexample re-verifies it independently
    path = report.certificates / "hydrogen-identity-2d.json"
    assert main(["check", str(path)]) == 0
    assert "verified" in capsys.readouterr().out


def test_claim_texts_are_escaped_in_html(report):
    assert "<b>not bold</b>" not in report.html
    assert html.escape(SPECIAL_TITLE) in report.html
    assert "&lt;p&gt;" in report.html


# ------------------------------------------------------------ counterexamples
def connection_matrix(facets) -> tuple[list, sympy.Matrix]:
    """L[x, y] = 1 when the simplices x, y intersect (O. Knill, "The energy of a simplicial
    complex", Linear Algebra Appl. 600 (2020)), built with sympy, simplices ordered by
    dimension then lexicographically."""
    simplices = sorted({s for f in facets for k in range(1, len(f) + 1)
                        for s in itertools.combinations(sorted(f), k)},
                       key=lambda s: (len(s), s))
    n = len(simplices)
    return simplices, sympy.Matrix(n, n, lambda i, j: int(bool(set(simplices[i])
                                                            & set(simplices[j]))))


def shown_matrix(markdown: str, claim: str, side: str) -> sympy.Matrix:
    section = markdown.split(f"## {claim}:", 1)[1].split("\n## ", 1)[0]
    block = section.split(f"{side} side:", 1)[1].split("```", 2)[1]
    rows = [[Fraction(x) for x in re.findall(r"-?\d+(?:/\d+)?", line)]
            for line in block.strip().splitlines()]
    return sympy.Matrix(rows)


def test_the_hydrogen_counterexample_values_agree_with_sympy(report):
    # For the triangle K = [[0, 1, 2]] the report shows L - L^-1 and the signless Hodge
    # matrix H = (|d| + |d|^T)^2 (definitions of O. Knill, "The hydrogen identity for
    # Laplacians", arXiv:1803.01464, 2018, recalled from memory); recomputed with sympy
    # from the definitions, independently of the verifier.
    assert "- K = `[[0, 1, 2]]`" in report.markdown
    simplices, L = connection_matrix([[0, 1, 2]])
    d = sympy.Matrix(len(simplices), len(simplices),
                     lambda i, j: int(len(simplices[i]) + 1 == len(simplices[j])
                                      and set(simplices[i]) < set(simplices[j])))
    D = d + d.T
    assert shown_matrix(report.markdown, "hydrogen-identity-2d", "Left") == L - L.inv()
    assert shown_matrix(report.markdown, "hydrogen-identity-2d", "Right") == D * D
    assert L - L.inv() != D * D


def test_the_reciprocity_counterexample_is_not_reciprocal_by_sympy(report):
    # charpoly of L^2 for the triangle is not palindromic (reciprocity holds for graphs:
    # O. Knill, arXiv:1803.01464, 2018); the report shows the triangle and 'false'
    section = report.markdown.split("## reciprocal-charpoly-2d:", 1)[1]
    assert "- K = `[[0, 1, 2]]`" in section and "Value: `false`" in section
    _, L = connection_matrix([[0, 1, 2]])
    coefficients = (L * L).charpoly().all_coeffs()
    assert coefficients != coefficients[::-1]


def test_counterexample_drawings_show_the_triangle(report):
    # the minimal counterexample of both companions is one filled triangle on 0, 1, 2
    # (claims/reciprocal-2d-fails.toml; checked above with sympy); counted in the
    # figure's data, not its pixels
    run_data = collect(report.store, certificates_dir=report.certificates)
    failing = [c for c in run_data.claims if c.counterexample]
    assert {c.name for c in failing} == {"hydrogen-identity-2d", "reciprocal-charpoly-2d"}
    for claim in failing:
        found = drawing.drawn(counterexample_drawing(claim))
        assert found["triangle"] == ["0,1,2"]
        assert sorted(found["vertex"]) == ["0", "1", "2"]
        assert sorted(found["edge"]) == ["0,1", "0,2", "1,2"]


# ------------------------------------------------------------------ LaTeX
def test_the_latex_export_compiles_with_pdflatex(report, tmp_path):
    pdflatex = shutil.which("pdflatex")
    if pdflatex is None:
        pytest.fail("pdflatex is required by the report tests and is not installed: run "
                    "`make system-deps` (Debian packages texlive-latex-base, "
                    "texlive-pictures)", pytrace=False)
    source = report.latex.read_text(encoding="utf-8")
    assert source.startswith("\\documentclass[10pt]{article}")
    assert "\\begin{tikzpicture}" in source and "\\fill[blue!25] (v0) -- (v1) -- (v2)" in source
    assert "50\\% \\& \\#1: chi\\_2" in source          # the special title, escaped
    assert 'M\\"{o}bius, Erd\\H{o}s, [U+65E5][U+672C]' in source and source.isascii()
    shutil.copy(report.latex, tmp_path / "report.tex")
    done = subprocess.run([pdflatex, "-interaction=nonstopmode", "-halt-on-error",
                           "report.tex"], cwd=tmp_path, capture_output=True, text=True,
                          timeout=180)
    assert done.returncode == 0, done.stdout[-3000:]
    assert (tmp_path / "report.pdf").read_bytes()[:5] == b"%PDF-"
    log = (tmp_path / "report.log").read_text(encoding="latin-1")
    assert "Missing character" not in log


def test_latex_table_counts_equal_the_stores(report):
    source = report.latex.read_text(encoding="utf-8")
    store = Store(report.store)
    try:
        summary = store.summary(store.latest_run())
    finally:
        store.close()
    for name, entry in summary.items():
        c = entry["counts"]
        other = c["error"] + c["limit"] + c["weak"]
        row = " & ".join(str(x) for x in (entry["cases"], c["holds"], c["fails"], c["outside"],
                                          other))
        assert re.search(r"\\emph\{all \([^)]*\)\} & " + re.escape(row)
                         + r" \\tabularnewline", source), name


# ------------------------------------------------------------------ command line
def test_the_report_command_writes_the_files(report, tmp_path, capsys):
    out = tmp_path / "cli"
    code = main(["report", "--store", str(report.store), "--out", str(out), "--latex",
                 str(out / "paper.tex"), "--certificates", str(report.certificates),
                 "--run", report.result.run_id])
    assert code == 0
    assert (out / "report.md").is_file() and (out / "report.html").is_file()
    assert (out / "paper.tex").read_text(encoding="utf-8").startswith("\\documentclass")
    assert f"wrote {out / 'report.html'}" in capsys.readouterr().out


def test_the_report_command_names_a_missing_store(tmp_path, capsys):
    missing = tmp_path / "none.sqlite"
    assert main(["report", "--store", str(missing)]) == 2
    err = capsys.readouterr().err
    assert f"{missing}: no such store (run `verifier run` first)" in err.replace("\n", "")
    assert "Traceback" not in err
    assert not missing.exists()


def test_the_report_command_names_an_unknown_run(report, capsys):
    assert main(["report", "--store", str(report.store), "--run", "no-such-run"]) == 2
    err = capsys.readouterr().err.replace("\n", "")
    assert f"report: {report.store}: no run 'no-such-run' (latest: " in err


def test_a_file_that_is_not_a_store_is_named(tmp_path):
    junk = tmp_path / "junk.sqlite"
    junk.write_text("not a database", encoding="utf-8")
    with pytest.raises(ReportError, match=r"junk.sqlite: not a verifier store"):
        collect(junk)


def test_notebook_display_of_runs_and_certificates(tmp_path):
    # a run's results and a certificate show themselves as HTML with the counterexample
    # drawn inline (the single triangle of the failing companion, Knill arXiv:1803.01464)
    from verifier.certificates import load, write_certificates
    from verifier.run.runner import RunOptions, run
    result = run([ROOT / "claims" / "hydrogen-2d-fails.toml"],
                 RunOptions(store=str(tmp_path / "s.sqlite"), engine="inline"))
    html = result._repr_html_()
    assert "hydrogen-identity-2d" in html and "data:image/png;base64," in html
    (path,) = write_certificates(result, tmp_path / "certs")
    shown = load(path)._repr_html_()
    assert "counterexample certificate" in shown and "data:image/png;base64," in shown

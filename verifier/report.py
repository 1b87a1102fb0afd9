"""Reports of a run (SPEC §9): Markdown, one self-contained HTML page, and LaTeX.

A report is made from what a run left behind and nothing else: the SQLite store (the
run's request, which holds every claim's statement, source and families; the cases with
their outcomes and times; the shrunk counterexamples) and the certificates folder.  The
runner is never consulted, so a report can be written on another machine, later, from a
copied store.

What each claim gets:

* its title, statement, source, expectation and verdict;
* each ``[[claim.over]]`` family with its parameters and the cases the store holds for
  it, split by outcome;
* the summed case time;
* the certificate file and the exact command that re-checks it;
* for a counterexample: a drawing beside the exact values of both sides and the witness;
* for a spectral claim (one that uses a characteristic polynomial, signature, counts of
  positive or negative eigenvalues, multiplicities, a zeta function or eigenvalue
  enclosures; see :func:`is_spectral`): the spectrum
  of L (or of L² when the statement squares it) of the counterexample, or of one tested
  complex when the claim held.

The HTML page is one file: styles inline, pictures as ``data:`` URIs, a
Content-Security-Policy that forbids every network request, and the report's numbers
as a JSON block (``<script type="application/json" id="verifier-report-data">``, data
only, never executed) for programs to read.

:func:`write_latex` writes a LaTeX document (``article`` class, ``tikz`` and nothing
and ``longtable``, default fonts) with a table of claims × families × outcomes and, for each
counterexample, its facet list and a TikZ drawing.

References:
    [K1] O. Knill, "The energy of a simplicial complex", Linear Algebra Appl. 600 (2020)
         96-129 (the connection matrix L and its inverse, the Green function).
    [K2] O. Knill, "One can hear the Euler characteristic of a simplicial complex",
         arXiv:1711.09527 (2017) (signature of L).
"""

from __future__ import annotations

import html
import json
import math
import re
import sqlite3
import time
from dataclasses import dataclass, field
from pathlib import Path

from .run.store import OUTCOMES, UNSETTLED, verdict_of

__all__ = ["ReportError", "RunData", "ClaimData", "FamilyData", "CAUTION", "collect",
           "write_report", "write_latex", "counterexample_drawing", "is_spectral", "is_squared",
           "latex_escape", "recheck_command", "provenance"]

CAUTION = "Checking an identity on finitely many complexes is evidence, not proof"

SPECTRAL_FUNCTIONS = ("charpoly", "signature", "positive", "negative", "multiplicity", "zeta",
                      "zeros_in_box", "zeros_on_axis", "eigenvalue_enclosures")
_SPECTRAL = re.compile(r"\b(" + "|".join(SPECTRAL_FUNCTIONS) + r")\s*\(")
_SQUARED = re.compile(r"\bconnection\s*\(\s*\w+\s*\)\s*\*\*\s*2\b")
_OUTCOMES = OUTCOMES
_SPECTRUM_SIMPLICES = 150          # largest complex whose spectrum stands for a held claim
_REPRESENTATIVES = 12              # held cases tried when choosing that complex


class ReportError(Exception):
    """The store cannot give a report (no such file, no run, unknown run id)."""


# ------------------------------------------------------------------- the data
@dataclass
class FamilyData:
    """One ``[[claim.over]]`` entry of a claim and the cases the store holds for it."""
    index: int
    bind: str
    name: str
    parameters: dict
    cases: int = 0
    counts: dict = field(default_factory=lambda: {o: 0 for o in _OUTCOMES})


@dataclass
class ClaimData:
    """One claim of a run, as the store and the certificates folder describe it."""
    name: str
    title: str
    statement: str
    where: str | None
    expect: str
    evidence: str
    source: str
    families: list[FamilyData]
    counts: dict
    cases: int
    seconds: float
    verdict: str
    certificate: str | None            # path of the certificate file, if present
    certificate_note: str              # what the certificate folder says about it
    counterexample: dict | None
    spectral: bool
    squared: bool
    unsettled: list = field(default_factory=list)   # first few cases that settle nothing
    run_id: str = ""                   # the run this claim's verdict comes from
    certificate_sha256: str | None = None
    precision: list = field(default_factory=list)   # bits of the certified values recorded
    smallest: dict | None = None       # smallest failing case of the exhaustive families


@dataclass
class RunData:
    """A run (or several: see :func:`collect`): ids, times, engine, claims, provenance."""
    store: str
    run_id: str
    started: float
    finished: float | None
    engine: str
    claims: list[ClaimData]
    runs: list[dict] = field(default_factory=list)   # run_id, started, finished, engine,
                                                     # command, file_sha256 of each run
    scope: str = ""                                  # what the report covers, in words

    def numbers(self) -> dict:
        """The report's numbers as plain data (what the HTML page embeds as JSON)."""
        return {"run": self.run_id, "store": self.store, "claims": {
            c.name: {"cases": c.cases, "counts": dict(c.counts), "seconds": round(c.seconds, 6),
                     "verdict": c.verdict, "families": [
                         {"index": f.index, "family": f.name, "bind": f.bind,
                          "cases": f.cases, "counts": dict(f.counts)} for f in c.families]}
            for c in self.claims}}


# ------------------------------------------------------------------ small helpers
def is_spectral(statement: str) -> bool:
    """Whether a claim's statement is spectral: it calls a function of a spectrum, so that
    a picture of the spectrum adds something to its report.

    The connection matrix L of K has L[x, y] = 1 when the simplices x and y intersect
    [K1]; a statement is spectral when it calls ``charpoly``, ``signature``,
    ``positive``, ``negative``, ``multiplicity``, ``zeta`` (or the counts of its zeros,
    ``zeros_in_box``, ``zeros_on_axis``) or ``eigenvalue_enclosures``.  A statement
    about the entries of L or of its inverse (``connection``, ``green``) is not.

    Parameters: statement -- the claim's statement text.
    Returns: True or False.

    >>> is_spectral("sum(green(K)) == euler(K)"), is_spectral("euler(K) == wu(K)")
    (False, False)
    >>> is_spectral("positive(connection(K)) - negative(connection(K)) == euler(K)")
    True

    Notes: a word match on function calls; a name inside another word does not count.
    Reference: [K1], [K2].
    """
    return bool(_SPECTRAL.search(statement or ""))


def is_squared(statement: str) -> bool:
    """Whether a statement speaks of L² (``connection(K) ** 2``), so the picture should
    show the spectrum of L² with its reciprocal pairing λ ↔ 1/λ.

    Parameters: statement -- the claim's statement text.
    Returns: True or False.

    >>> is_squared("is_reciprocal(charpoly(connection(K) ** 2))")
    True
    >>> is_squared("det(connection(K)) ** 2 == 1")
    False

    Notes: a regular expression on the text.  Reference: [K1].
    """
    return bool(_SQUARED.search(statement or ""))


def recheck_command(certificate: str | Path) -> str:
    """The command that re-checks a certificate with the independent backend.

    >>> recheck_command("reports/certificates/energy.json")
    'verifier check reports/certificates/energy.json'
    """
    text = str(certificate)
    if re.search(r"[^\w@%+=:,./-]", text):
        text = "'" + text.replace("'", "'\"'\"'") + "'"
    return f"verifier check {text}"


_LATEX_SPECIAL = {"\\": r"\textbackslash{}", "&": r"\&", "%": r"\%", "$": r"\$", "#": r"\#",
                  "_": r"\_", "{": r"\{", "}": r"\}", "~": r"\textasciitilde{}",
                  "^": r"\textasciicircum{}", "<": r"\textless{}", ">": r"\textgreater{}",
                  "|": r"\textbar{}", '"': "''"}
_LATEX_UNICODE = {"χ": r"$\chi$", "λ": r"$\lambda$", "Λ": r"$\Lambda$", "ω": r"$\omega$",
                  "ζ": r"$\zeta$", "σ": r"$\sigma$", "Σ": r"$\Sigma$", "μ": r"$\mu$",
                  "π": r"$\pi$", "Δ": r"$\Delta$", "δ": r"$\delta$", "β": r"$\beta$",
                  "α": r"$\alpha$", "γ": r"$\gamma$", "ε": r"$\varepsilon$",
                  "≤": r"$\leq$", "≥": r"$\geq$", "≠": r"$\neq$", "×": r"$\times$",
                  "·": r"$\cdot$", "⊆": r"$\subseteq$", "∈": r"$\in$",
                  "↔": r"$\leftrightarrow$",
                  "→": r"$\to$", "²": r"$^2$", "³": r"$^3$", "⁻": r"$^-$", "¹": r"$^1$",
                  "–": "--", "—": "---", "‘": "`", "’": "'", "“": "``", "”": "''",
                  "…": r"\ldots{}", "\u00a0": "~"}


_LATEX_LETTERS = {"ß": r"\ss{}", "ø": r"\o{}", "Ø": r"\O{}", "æ": r"\ae{}", "Æ": r"\AE{}",
                  "œ": r"\oe{}", "Œ": r"\OE{}", "ł": r"\l{}", "Ł": r"\L{}", "ı": r"\i{}",
                  "§": r"$\S$", "¶": r"$\P$", "©": "(c)", "°": r"$^\circ$",
                  "±": r"$\pm$", "÷": r"$\div$", "¬": r"$\neg$"}
_LATEX_ACCENTS = {"\u0301": "'", "\u0300": "`", "\u0302": "^", "\u0308": '"', "\u0303": "~",
                  "\u0327": "c", "\u030c": "v", "\u030b": "H", "\u0306": "u", "\u0304": "=",
                  "\u0307": ".", "\u030a": "r"}


CERTIFIED_CAPTION = ("Certified values met on the way (enclosures proved by ball arithmetic, "
                     "decimals rounded outward, with the precision used)")


def _certified_row(entry: dict) -> str:
    """One certified value: where in the statement, which function, its enclosure."""
    return f"{entry.get('at', '?')}  {entry.get('function', '?')}: {entry.get('value', '')}"


def latex_escape(text) -> str:
    r"""Text made safe for LaTeX: special characters escaped, other characters spelled out
    in ASCII, so the result compiles with LaTeX's default fonts and nothing else.

    The ten characters LaTeX treats specially (and ``<``, ``>``, ``|``, ``"``, which
    the default font encoding misprints) become commands; Greek letters and common
    mathematical symbols become math; a Latin letter with accents becomes the letter
    under accent commands (``ö`` -> ``\"{o}``), a few other letters their commands;
    any other character is written as its code point ``[U+XXXX]``.

    Parameters: text -- any value (converted with ``str``).
    Returns: LaTeX source, ASCII only.

    >>> print(latex_escape("chi_2 & 50% of $x^2 {a} ~ \\"))
    chi\_2 \& 50\% of \$x\textasciicircum{}2 \{a\} \textasciitilde{} \textbackslash{}
    >>> print(latex_escape("χ(K) ≤ 2, Möbius, Erdős, Łódź, 日"))
    $\chi$(K) $\leq$ 2, M\"{o}bius, Erd\H{o}s, \L{}\'{o}d\'{z}, [U+65E5]

    Notes: one pass over the characters, so an escape is never escaped again; accents
    by Unicode canonical decomposition (NFD).
    Reference: L. Lamport, "LaTeX: A Document Preparation System", 2nd ed. (1994)
    §2.2.1 (special characters) and §3.2.1 (accents).
    """
    import unicodedata

    out = []
    for ch in str(text):
        if ch in _LATEX_SPECIAL:
            out.append(_LATEX_SPECIAL[ch])
        elif ch in "\n\t\r":
            out.append(" ")
        elif " " <= ch <= "~":
            out.append(ch)
        elif ch in _LATEX_UNICODE:
            out.append(_LATEX_UNICODE[ch])
        elif ch in _LATEX_LETTERS:
            out.append(_LATEX_LETTERS[ch])
        elif ord(ch) < 32 or 0x7F <= ord(ch) < 0xA0:
            continue
        else:
            parts = unicodedata.normalize("NFD", ch)
            base, marks = parts[0], parts[1:]
            if base.isascii() and base.isalpha() and marks and all(
                    m in _LATEX_ACCENTS for m in marks):
                result = r"\i" if base == "i" else r"\j" if base == "j" else base
                for mark in marks:
                    result = "\\" + _LATEX_ACCENTS[mark] + "{" + result + "}"
                out.append(result)
            else:
                out.append(f"[U+{ord(ch):04X}]")
    return "".join(out)


def _parameter_text(spec: dict) -> str:
    """A family table's parameters as one line: ``max_vertices = 5, as = flag``."""
    parts = []
    for key, value in spec.items():
        if key.startswith("_") or key in ("family", "bind"):   # private: base folder, hashes
            continue
        if isinstance(value, dict) and "family" in value:
            inner = _parameter_text(value)
            value = f"{value['family']}({inner})" if inner else value["family"]
        elif isinstance(value, list):
            value = "[" + ", ".join(_scalar(v) for v in value) + "]"
        else:
            value = _scalar(value)
        parts.append(f"{key} = {value}")
    return ", ".join(parts)


def _scalar(value) -> str:
    if isinstance(value, dict):
        return _parameter_text(value) if "family" not in value else (
            f"{value['family']}({_parameter_text(value)})")
    if isinstance(value, bool):
        return "true" if value else "false"
    return str(value)


def _refs(case_id: str) -> list[int]:
    """The [[claim.over]] positions a case id draws from ('0|a & 2|b' -> [0, 2]).

    A lone ' & ' separates the parts of a case of several variables (an '&' inside a
    family's own id is doubled, so it never reads as a separator).
    """
    refs = []
    for piece in case_id.split(" & "):
        head = piece.split("|", 1)[0]
        if head.isdigit():
            refs.append(int(head))
    return refs


def _verdict(expect: str, counts: dict) -> str:
    """What a reader is told about a claim, from its counts and its expectation."""
    return verdict_of(counts, expect)[1]


# ------------------------------------------------------------------- collecting
def _open(store_path) -> sqlite3.Connection:
    path = Path(store_path)
    if not path.is_file():
        raise ReportError(f"{store_path}: no such store (run `verifier run` first)")
    try:
        db = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=30)
        db.execute("SELECT run_id, request, started, finished, engine FROM runs LIMIT 1")
        db.execute("SELECT claim, case_id, outcome, seconds FROM cases LIMIT 1")
        db.execute("SELECT run_id, claim, record FROM counterexamples LIMIT 1")
    except sqlite3.DatabaseError as error:
        raise ReportError(f"{store_path}: not a verifier store ({error})") from None
    return db


def _family_counts(db, run_id: str, claim: str, families: list[FamilyData]):
    """Fill each family's case counts (by outcome) from the store.

    A case of one variable belongs to one family; SQL groups those by the position
    before the first '|'.  A case of several variables counts for every family it draws
    from (so for such claims the family rows add up to more than the cases)."""
    by_index = {f.index: f for f in families}

    def add(index: int, outcome: str, count: int):
        entry = by_index.get(index)
        if entry is not None:
            entry.counts[outcome] = entry.counts.get(outcome, 0) + count
            entry.cases += count

    rows = db.execute(
        "SELECT substr(case_id, 1, instr(case_id, '|') - 1), outcome, COUNT(*) FROM cases "
        "WHERE run_id = ? AND claim = ? AND instr(case_id, ' & ') = 0 GROUP BY 1, 2",
        (run_id, claim))
    for ref, outcome, count in rows:
        if str(ref).isdigit():
            add(int(ref), outcome, count)
    rows = db.execute("SELECT case_id, outcome FROM cases WHERE run_id = ? AND claim = ? AND "
                      "instr(case_id, ' & ') > 0", (run_id, claim))
    for case_id, outcome in rows:
        for ref in dict.fromkeys(_refs(case_id)):
            add(ref, outcome, 1)


def _shard_counts(db, run_id: str, claim: str, families: list[FamilyData]):
    """A claim planned in shards keeps only its notable cases one by one: its outcome
    counts and times come from its shards' parts (verifier/run/shards.py), and so do its
    families' counts (a shard key starts with the position of its family).  Returns
    (counts, seconds), or None for a claim planned case by case."""
    if not db.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND "
                      "name = 'shard_parts'").fetchone():
        return None
    rows = db.execute("SELECT shard, counts, seconds FROM shard_parts WHERE run_id = ? AND "
                      "claim = ?", (run_id, claim)).fetchall()
    if not rows:
        return None
    counts, seconds = {o: 0 for o in _OUTCOMES}, 0.0
    for family in families:
        family.counts, family.cases = {o: 0 for o in _OUTCOMES}, 0
    by_index = {f.index: f for f in families}
    for shard, text, spent in rows:
        entry = by_index.get(int(shard.split("|", 1)[0]))
        for outcome, count in json.loads(text).items():
            counts[outcome] = counts.get(outcome, 0) + count
            if entry is not None:
                entry.counts[outcome] = entry.counts.get(outcome, 0) + count
                entry.cases += count
        seconds += spent or 0.0
    return counts, seconds


def _certificate(folder: Path, name: str, run_id: str) -> tuple[str | None, str]:
    path = folder / f"{name}.json"
    if not path.is_file():
        return None, "no certificate in the folder (a run with unsettled cases writes none)"
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as error:
        return str(path), f"the file cannot be read as a certificate ({error})"
    if not isinstance(data, dict):
        return str(path), "the file is not a certificate (not a JSON object)"
    kind = data.get("kind", "?")
    if data.get("run") != run_id:
        return str(path), (f"{kind} certificate of another run ({data.get('run')}); "
                           "re-run to refresh it")
    return str(path), f"{kind} certificate of this run"


def _example_store(folder) -> Path:
    """A tiny store for the examples: one run of the claim chi(K) == 1 on three complexes,
    a point and a filled triangle (chi = 1, it holds) and the triangle's boundary, a
    circle (chi = 3 - 3 = 0, it fails and is the stored counterexample)."""
    from .run.store import Store

    path = Path(folder) / "example.sqlite"
    claim = {"name": "contractible", "title": "chi(K) = 1", "statement": "euler(K) == 1",
             "where": None, "expect": "holds", "evidence": "exact", "max_cases": None,
             "source": "an example", "over": [{"family": "all-complexes", "max_vertices": 3,
                                               "min_vertices": 1, "bind": "K"}]}
    store = Store(path)
    store.open_run("example-run", {"claims": [claim]}, "inline")
    store.add_cases("example-run", [
        {"claim": "contractible", "case_id": f"0|all-complexes/{cid}", "family": "all-complexes",
         "complex_hash": cid, "outcome": outcome, "sides": [chi, "1"], "seconds": 0.001}
        for cid, outcome, chi in (("0", "holds", "1"), ("012", "holds", "1"),
                                  ("01-02-12", "fails", "0"))])
    store.save_counterexample("example-run", "contractible", "0|all-complexes/01-02-12", {
        "case_id": "0|all-complexes/01-02-12", "family": "all-complexes",
        "complexes": {"K": [[0, 1], [0, 2], [1, 2]]}, "sides": ["0", "1"], "witness": None,
        "steps": [], "minimal": True})
    store.finish_run("example-run")
    store.close()
    return path


def collect(store_path, run_id: str | None = None,
            certificates_dir: str | Path = "reports/certificates",
            runs: list[str] | None = None, every_claim: bool = False) -> RunData:
    """Everything a report shows about one run, read from the store and the certificates.

    Parameters:
        store_path: the SQLite store written by ``verifier run``.
        run_id: the run (default: the latest one started).
        certificates_dir: where ``verifier run`` wrote the certificates.
        runs: several run ids: the report covers each of them, claims in run order.
        every_claim: the latest verdict of every claim in the store: for each claim
            name, the latest started run that holds cases of it.

    Returns: a :class:`RunData` (claims in the order of the run's request).

    Raises :class:`ReportError` for a missing or foreign file, an empty store or an
    unknown run id (the message names them).

    >>> import tempfile
    >>> folder = tempfile.mkdtemp()
    >>> run = collect(_example_store(folder), certificates_dir=folder)
    >>> claim = run.claims[0]
    >>> claim.verdict, claim.cases, claim.counts["holds"], claim.counts["fails"]
    ('fails', 3, 2, 1)
    >>> claim.counterexample["complexes"], claim.families[0].cases
    ({'K': [[0, 1], [0, 2], [1, 2]]}, 3)

    Notes: one grouped query per claim; cases of several variables are read row by row.
    """
    if runs or every_claim:
        return _collect_many(store_path, runs or [], every_claim, certificates_dir)
    db = _open(store_path)
    try:
        if run_id is None:
            row = db.execute("SELECT run_id FROM runs ORDER BY started DESC LIMIT 1").fetchone()
            if row is None:
                raise ReportError(f"{store_path}: the store holds no run")
            run_id = row[0]
        command = "command" if _column(db, "runs", "command") else "NULL"
        row = db.execute(f"SELECT request, started, finished, engine, {command} FROM runs "
                         "WHERE run_id = ?", (run_id,)).fetchone()
        if row is None:
            known = [r[0] for r in db.execute(
                "SELECT run_id FROM runs ORDER BY started DESC LIMIT 3")]
            raise ReportError(f"{store_path}: no run {run_id!r} (latest: "
                              f"{', '.join(known) or 'none'})")
        request = json.loads(row[0])
        started, finished, engine = row[1], row[2], row[3] or "?"
        folder = Path(certificates_dir)
        claims = []
        for spec in request.get("claims", []):
            name = spec["name"]
            families = [FamilyData(i, over.get("bind", "K"), over.get("family", "?"),
                                   {k: v for k, v in over.items() if k not in ("bind",)})
                        for i, over in enumerate(spec.get("over", []))]
            counts = {o: 0 for o in _OUTCOMES}
            seconds = 0.0
            for outcome, count, spent in db.execute(
                    "SELECT outcome, COUNT(*), SUM(seconds) FROM cases WHERE run_id = ? AND "
                    "claim = ? GROUP BY outcome", (run_id, name)):
                counts[outcome] = count
                seconds += spent or 0.0
            _family_counts(db, run_id, name, families)
            if (sharded := _shard_counts(db, run_id, name, families)) is not None:
                counts, seconds = sharded
            record = db.execute("SELECT record FROM counterexamples WHERE run_id = ? AND "
                                "claim = ?", (run_id, name)).fetchone()
            certificate, note = _certificate(folder, name, run_id)
            statement = spec.get("statement", "")
            unsettled = [{"case_id": c, "outcome": o, "message": m or ""} for c, o, m in
                         db.execute("SELECT case_id, outcome, message FROM cases WHERE "
                                    f"run_id = ? AND claim = ? AND outcome IN "
                                    f"({', '.join('?' * len(UNSETTLED))}) ORDER BY case_id "
                                    "LIMIT 5", (run_id, name, *UNSETTLED))]
            certified = [r[0] for r in db.execute(
                "SELECT certified FROM cases WHERE run_id = ? AND claim = ? AND certified IS "
                "NOT NULL", (run_id, name))]
            claims.append(ClaimData(
                name=name, title=spec.get("title") or name, statement=statement,
                where=spec.get("where"), expect=spec.get("expect", "holds"),
                evidence=spec.get("evidence", "exact"), source=spec.get("source") or "",
                families=families, counts=counts, cases=sum(counts.values()),
                seconds=seconds, verdict=_verdict(spec.get("expect", "holds"), counts),
                certificate=certificate, certificate_note=note,
                counterexample=json.loads(record[0]) if record else None,
                spectral=is_spectral(statement), squared=is_squared(statement),
                unsettled=unsettled, run_id=run_id,
                certificate_sha256=_sha256_file(certificate)
                if note.endswith("of this run") else None,
                precision=_precisions(certified)))
        _smallest(store_path, run_id, claims)
        described = {"run_id": run_id, "started": started, "finished": finished,
                     "engine": engine, "command": row[4],
                     "file_sha256": request.get("file_sha256") or {}}
        return RunData(str(store_path), run_id, started, finished, engine, claims,
                       runs=[described], scope=f"run {run_id}")
    finally:
        db.close()


def _smallest(store_path, run_id: str, claims: list[ClaimData]) -> None:
    """Fill in each failing claim's smallest failing case of its exhaustive families."""
    from .run.store import Store, StoreError

    if not any(c.counts.get("fails") for c in claims):
        return
    try:
        store = Store.read_only(store_path)
    except StoreError:
        return
    try:
        for c in claims:
            if c.counts.get("fails"):
                c.smallest = store.smallest_failing(run_id, c.name)
    finally:
        store.close()


def _smallest_text(c: ClaimData) -> str:
    m = c.smallest
    return (f"smallest failing case of the exhaustive families: {m['case_id']} "
            f"({m['vertices']} vertices, {m['simplices']} simplices)") if m else ""


def _column(db, table: str, column: str) -> bool:
    return any(r[1] == column for r in db.execute(f"PRAGMA table_info({table})"))


def _sha256_file(path) -> str | None:
    import hashlib
    try:
        return hashlib.sha256(Path(path).read_bytes()).hexdigest()
    except (OSError, TypeError):
        return None


def _precisions(certified_columns: list[str]) -> list[int]:
    """The precisions (bits) named by the certified values of a claim's cases."""
    bits = set()
    for text in certified_columns:
        for entry in json.loads(text) if text else []:
            bits.update(int(b) for b in re.findall(r"@(\d+) bits", str(entry.get("value", ""))))
    return sorted(bits)


def _collect_many(store_path, runs: list[str], every_claim: bool,
                  certificates_dir) -> RunData:
    """Several runs in one report, or the latest verdict of every claim (see collect)."""
    db = _open(store_path)
    try:
        ordered = [r[0] for r in db.execute("SELECT run_id FROM runs ORDER BY started DESC")]
        if not ordered:
            raise ReportError(f"{store_path}: the store holds no run")
        for run_id in runs:
            if run_id not in ordered:
                raise ReportError(f"{store_path}: no run {run_id!r} (latest: "
                                  f"{', '.join(ordered[:3])})")
        latest_of = {}
        if every_claim:
            for run_id in ordered:
                for (name,) in db.execute("SELECT DISTINCT claim FROM cases WHERE run_id = ?",
                                          (run_id,)):
                    latest_of.setdefault(name, run_id)
    finally:
        db.close()
    chosen = list(dict.fromkeys(runs)) if runs else [
        r for r in reversed(ordered) if r in latest_of.values()]
    parts = [collect(store_path, r, certificates_dir) for r in chosen]
    claims = [c for part in parts for c in part.claims
              if not every_claim or latest_of.get(c.name) == part.run_id]
    scope = (f"the latest verdict of each of the {len(claims)} claims in the store"
             if every_claim else f"runs {', '.join(chosen)}")
    return RunData(str(store_path), ", ".join(chosen), min(p.started for p in parts),
                   max((p.finished for p in parts), default=None, key=lambda f: f or 0),
                   ", ".join(dict.fromkeys(p.engine for p in parts)), claims,
                   runs=[r for p in parts for r in p.runs], scope=scope)


def provenance(run: RunData) -> list[tuple[str, str]]:
    """The provenance lines of a report: (what, value) pairs.

    The versions and the machine are those of the report's own environment, and, for
    each run with a certificate, the versions the certificate recorded; then each run's
    command line, each claim file's SHA-256, each certificate's SHA-256 and the precision
    of certified values."""
    import platform
    from importlib import metadata

    def version(package: str) -> str:
        try:
            return metadata.version(package)
        except metadata.PackageNotFoundError:
            return "not installed"
    rows = [("report written with", f"simplicial-verifier {version('simplicial-verifier')}, "
             f"python-flint {version('python-flint')}, sympy {version('sympy')}, "
             f"Python {platform.python_version()}"),
            ("machine", f"{platform.node() or '?'} ({platform.platform()}, "
             f"{platform.machine() or '?'})")]
    for r in run.runs:
        rows.append((f"run {r['run_id']}", f"engine {r['engine']}; command: "
                     + (r.get("command") or "not recorded (a store written before commands)")))
        for file, digest in sorted((r.get("file_sha256") or {}).items()):
            rows.append((f"claim file {file}", f"SHA-256 {digest}"))
    seen = set()
    for c in run.claims:
        if c.certificate and c.certificate not in seen:
            seen.add(c.certificate)
            recorded = _certificate_versions(c.certificate) if c.certificate_sha256 else ""
            rows.append((f"certificate {c.certificate}",
                         f"SHA-256 {c.certificate_sha256}" + (f"; run with {recorded}"
                                                              if recorded else "")
                         if c.certificate_sha256 else c.certificate_note))
    for c in run.claims:
        rows.append((f"precision of {c.name}", ("certified values at " + ", ".join(
            f"{b} bits" for b in c.precision)) if c.precision else
            "no certified values (every value exact)"))
    return rows


def _certificate_versions(path) -> str:
    try:
        versions = json.loads(Path(path).read_text(encoding="utf-8")).get("versions") or {}
    except (OSError, ValueError):
        return ""
    names = ("simplicial-verifier", "python-flint", "sympy", "python")
    return ", ".join(f"{n} {versions[n]}" for n in names if n in versions)


# ------------------------------------------------------------------- pictures
@dataclass
class _Picture:
    kind: str          # "counterexample" or "spectrum"
    png: bytes
    caption: str
    file: str          # the PNG's file name beside report.md


def counterexample_drawing(claim: ClaimData):
    """The figure a report shows for a claim's counterexample.

    The complex (for several variables, one panel each) drawn by
    :func:`verifier.drawing.counterexample_figure`: filled triangles, edges, labelled
    vertices, and in red the simplices the witness names.

    Parameters: claim -- a :class:`ClaimData` with a counterexample.
    Returns: a matplotlib ``Figure`` whose artists name their simplices
    (:func:`verifier.drawing.drawn`).

    >>> import tempfile
    >>> from verifier.drawing import drawn
    >>> folder = tempfile.mkdtemp()
    >>> claim = collect(_example_store(folder)).claims[0]
    >>> shown = drawn(counterexample_drawing(claim))     # the circle: 3 edges, no triangle
    >>> sorted(shown["edge"]), shown["triangle"]
    (['0,1', '0,2', '1,2'], [])

    Notes: about 0.1 s (matplotlib).  Reference: SPEC §9.
    """
    from . import drawing

    record = claim.counterexample
    complexes = record.get("complexes") or {}
    facets = next(iter(complexes.values())) if len(complexes) == 1 else complexes
    return drawing.counterexample_figure(facets, sides=record.get("sides"),
                                         witness=record.get("witness"),
                                         title=f"{claim.name}: minimal counterexample",
                                         expressions=side_expressions(claim.statement))


def side_expressions(statement: str) -> tuple[str, str] | None:
    """The texts of the two sides of a statement that is one comparison (``a == b``,
    ``a < b``, ...), as written; None for any other statement.

    >>> side_expressions("betti(K, 1, 2) == betti(K, 1)")
    ('betti(K, 1, 2)', 'betti(K, 1)')
    >>> side_expressions("is_reciprocal(charpoly(connection(K)))") is None
    True
    """
    import ast

    text = "(" + str(statement or "").strip() + "\n)"
    try:
        tree = ast.parse(text, mode="eval").body
    except (SyntaxError, ValueError):
        return None
    if not isinstance(tree, ast.Compare) or len(tree.ops) != 1:
        return None
    left = ast.get_source_segment(text, tree.left)
    right = ast.get_source_segment(text, tree.comparators[0])
    if left is None or right is None:
        return None
    return " ".join(left.split()), " ".join(right.split())


def _counterexample_picture(claim: ClaimData) -> _Picture | None:
    from . import drawing

    record = claim.counterexample
    complexes = record.get("complexes") or {}
    try:
        png = drawing.figure_png(counterexample_drawing(claim))
    except drawing.DrawingError as error:
        return _Picture("counterexample", b"", f"not drawn: {error}", "")
    caption = ("the complex" + ("es " if len(complexes) > 1 else " ")
               + "; ".join(f"{v} = {f}" for v, f in complexes.items())
               + (", the simplices the witness names in red" if record.get("witness") else ""))
    return _Picture("counterexample", png, caption, f"{claim.name}-counterexample.png")


def _spectrum_picture(claim: ClaimData, K, where: str) -> _Picture | None:
    from . import drawing

    try:
        values, counts = drawing.spectrum_of(K, squared=claim.squared)
        fig = drawing.draw_spectrum(values, counts, squared=claim.squared,
                                    title=f"{claim.name}: {'L²' if claim.squared else 'L'}")
        png = drawing.figure_png(fig)
    except drawing.DrawingError as error:
        return _Picture("spectrum", b"", f"spectrum not drawn: {error}", "")
    matrix = "L² (L the connection matrix)" if claim.squared else "the connection matrix L"
    caption = (f"eigenvalues of {matrix} of {where}, f-vector {list(K.f_vector)}: positions "
               f"from floating point, counts exact ({counts[0]} positive, {counts[1]} "
               f"negative, {counts[2]} zero)")
    return _Picture("spectrum", png, caption, f"{claim.name}-spectrum.png")


def _representative(store_path, run: RunData, claim: ClaimData):
    """One complex a held spectral claim was tested on, for its spectrum picture: among
    up to a dozen held one-variable cases spread over the case order, the one with most
    simplices (at most a few hundred).  None when no case can be rebuilt."""
    from .families import make_family

    db = _open(store_path)
    try:
        ids = [r[0] for r in db.execute(
            "SELECT case_id FROM cases WHERE run_id = ? AND claim = ? AND outcome = 'holds' "
            "AND instr(case_id, ' & ') = 0 ORDER BY case_id", (claim.run_id or run.run_id,
                                                                  claim.name))]
    finally:
        db.close()
    if not ids:
        return None, ""
    step = max(1, len(ids) // _REPRESENTATIVES)
    chosen = ids[::step][:_REPRESENTATIVES] + [ids[-1]]
    best, best_id = None, ""
    specs = {f.index: f.parameters for f in claim.families}
    built: dict[int, object] = {}
    deadline = time.monotonic() + 5.0
    for case_id in dict.fromkeys(chosen):
        if time.monotonic() > deadline:
            break
        ref, _, family_id = case_id.partition("|")
        try:
            if int(ref) not in built:
                built[int(ref)] = make_family(specs[int(ref)])
            K = built[int(ref)].get(family_id.replace("&&", "&"))
        except Exception:  # noqa: BLE001 - the picture is optional; the report says so
            continue
        if len(K.simplices) <= _SPECTRUM_SIMPLICES and (
                best is None or len(K.simplices) > len(best.simplices)):
            best, best_id = K, family_id
    return best, best_id


def _pictures(store_path, run: RunData) -> dict[str, list[_Picture]]:
    from .complex import Complex

    pictures: dict[str, list[_Picture]] = {}
    for claim in run.claims:
        found = []
        record = claim.counterexample
        if record:
            found.append(_counterexample_picture(claim))
            if claim.spectral and len(record.get("complexes") or {}) >= 1:
                variable, facets = next(iter(record["complexes"].items()))
                K = Complex.from_facets(facets)
                found.append(_spectrum_picture(claim, K, f"the counterexample {variable}"))
        elif claim.spectral and claim.counts.get("holds"):
            K, case_id = _representative(store_path, run, claim)
            if K is not None:
                found.append(_spectrum_picture(claim, K, f"tested case {case_id}"))
        pictures[claim.name] = [p for p in found if p is not None]
    return pictures


# ---------------------------------------------------------------------- texts
def _simplex_order(record: dict) -> str:
    """For a counterexample whose sides are matrices: the simplices indexing their rows
    and columns, in the order the matrices use (by dimension, then lexicographically)."""
    from .complex import Complex

    sides = record.get("sides") or []
    complexes = record.get("complexes") or {}
    if len(complexes) != 1 or not any(str(x).startswith("[[") for x in sides):
        return ""
    K = Complex.from_facets(next(iter(complexes.values())))
    if len(K.simplices) > 60:
        return ""
    names = ["{" + ",".join(str(K.labels[v]) for v in s) + "}" for s in K.simplices]
    return "rows and columns indexed by the simplices " + " ".join(names)


def _value_text(text: str) -> str:
    """An exact value for reading: a matrix one row per line with aligned columns."""
    text = str(text)
    if text.startswith("[[") and text.endswith("]]") and "], [" in text:
        rows = [r.split(", ") for r in text[2:-2].split("], [")]
        if all(len(r) == len(rows[0]) for r in rows):
            width = [max(len(r[j]) for r in rows) for j in range(len(rows[0]))]
            return "\n".join(("[" if i == 0 else " ") + "[" + ", ".join(
                v.rjust(width[j]) for j, v in enumerate(r)) + "]" + ("]" if i == len(rows) - 1
                                                                     else ",")
                for i, r in enumerate(rows))
    return text


def _when(timestamp) -> str:
    if not timestamp:
        return "unfinished"
    return time.strftime("%Y-%m-%d %H:%M:%S UTC", time.gmtime(timestamp))


def _seconds(value: float) -> str:
    return f"{value:.2f} s" if value < 100 else f"{value:.0f} s"


def _families_line(run: RunData) -> tuple[str, str]:
    """The families some case was drawn from, and those named but left without a case
    (a ``max_cases`` cap stops a claim before its later families)."""
    covered, empty = [], []
    for claim in run.claims:
        for f in claim.families:
            (covered if f.cases else empty).append(f.name)
    covered = list(dict.fromkeys(covered))
    empty = [name for name in dict.fromkeys(empty) if name not in covered]
    return ", ".join(covered) or "none", ", ".join(empty)


def _caution(run: RunData) -> str:
    cases = sum(c.cases for c in run.claims)
    covered, empty = _families_line(run)
    text = (f"{CAUTION}: these results cover {cases} cases drawn from the families "
            f"{covered} (the parameters and case counts of each claim's families are "
            "stated below), and say nothing about complexes outside them.")
    if empty:
        text += f" No case was drawn from {empty}."
    return text


# ------------------------------------------------------------------- Markdown
def _markdown(run: RunData, pictures: dict[str, list[_Picture]]) -> str:
    lines = [f"# Verifier report: {run.scope or 'run ' + run.run_id}", "",
             f"Store `{run.store}`; engine {run.engine}; started {_when(run.started)}, "
             f"finished {_when(run.finished)}.", "", f"> {_caution(run)}", "",
             "## Summary", "",
             "| claim | expect | verdict | cases | " + " | ".join(_OUTCOMES) + " | seconds |",
             "|---|---|---|--:|" + "--:|" * len(_OUTCOMES) + "--:|"]
    for c in run.claims:
        lines.append(f"| {c.name} | {c.expect} | {c.verdict} | {c.cases} | " + " | ".join(
            str(c.counts[o]) for o in _OUTCOMES) + f" | {c.seconds:.2f} |")
    several = len(run.runs) > 1
    for c in run.claims:
        lines += ["", f"## {c.name}: {_md(c.title)}", ""]
        if several:
            lines.append(f"- run: `{c.run_id}`")
        lines += _md_code("statement", c.statement)
        if c.where:
            lines += _md_code("where", c.where)
        lines += [f"- source: {_md(c.source) or 'not given'}",
                  f"- expected: {c.expect}; verdict: **{c.verdict}**; evidence: {c.evidence}",
                  f"- time: {_seconds(c.seconds)} summed over {c.cases} cases", "",
                  "| # | family | parameters | binds | cases | holds | fails | outside | "
                  "other |", "|--:|---|---|---|--:|--:|--:|--:|--:|"]
        for f in c.families:
            other = sum(f.counts.get(o, 0) for o in UNSETTLED)
            lines.append(f"| {f.index} | {f.name} | {_md(_parameter_text(f.parameters))} | "
                         f"{f.bind} | {f.cases} | {f.counts.get('holds', 0)} | "
                         f"{f.counts.get('fails', 0)} | {f.counts.get('outside', 0)} | "
                         f"{other} |")
        lines.append("")
        if c.certificate:
            lines += [f"Certificate `{c.certificate}` ({c.certificate_note}); re-check it with",
                      "", "```", recheck_command(c.certificate), "```"]
        else:
            lines.append(f"Certificate: {c.certificate_note}.")
        if c.unsettled:
            lines += ["", "Unsettled cases (the first few):", ""] + [
                f"- `{u['case_id']}`: {u['outcome']}: {_md(u['message'])}" for u in c.unsettled]
        record = c.counterexample
        if record:
            lines += ["", "### Minimal counterexample", ""]
            for v, facets in (record.get("complexes") or {}).items():
                lines.append(f"- {v} = `{facets}`")
            for v, entry in _readable(record).items():
                lines.append(f"- {v} relabelled: {_md(describe_readable(entry))}")
            lines.append(f"- from case `{record.get('case_id')}` ({record.get('family')}), "
                         f"{len(record.get('steps') or [])} shrinking steps, "
                         f"{'minimal' if record.get('minimal') else 'shrinking stopped early'}")
            if c.smallest:
                lines.append(f"- {_md(_smallest_text(c))}")
            sides = record.get("sides") or []
            if _simplex_order(record):
                lines += ["", _md(_simplex_order(record)).replace("{", "`{").replace("}", "}`")
                          + "."]
            if len(sides) == 2:
                left, right = side_expressions(c.statement) or ("", "")
                lines += ["", "Left side:" + (f" `{left}`" if left else ""), "", "```",
                          _value_text(sides[0]), "```", "",
                          "Right side:" + (f" `{right}`" if right else ""), "", "```",
                          _value_text(sides[1]), "```"]
            elif sides:
                lines += ["", "Value: `" + " ".join(map(str, sides)) + "`"]
            if record.get("witness"):
                lines += ["", "Witness: " + ", ".join(
                    f"{k} = `{v}`" for k, v in record["witness"].items())]
            if record.get("certified"):
                lines += ["", CERTIFIED_CAPTION + ":", "", "```"] + [
                    _certified_row(v) for v in record["certified"]] + ["```"]
        for p in pictures.get(c.name, []):
            if p.file:
                lines += ["", f"![{p.caption}]({p.file})", "", f"*{_md(p.caption)}*"]
            else:
                lines += ["", f"*{_md(p.caption)}*"]
    lines += ["", "## Provenance", ""] + [f"- {_md(what)}: {_md(value)}"
                                          for what, value in provenance(run)]
    lines += ["", "---", "", CAUTION + ".", ""]
    return "\n".join(lines)


def _md(text: str) -> str:
    return str(text).replace("|", "\\|").replace("\n", " ")


def _md_code(label: str, text: str) -> list[str]:
    """A claim text in Markdown: inline code on one line, a fenced block (indented under
    its list item) when the text has several lines, so that every line is kept."""
    text = str(text).strip("\n")
    if "\n" not in text and "`" not in text:
        return [f"- {label}: `{text}`"]
    fence = "~~~~" if "```" in text else "```"
    return [f"- {label}:", "", f"  {fence}"] + [f"  {line}" for line in text.split("\n")] + [
        f"  {fence}", ""]


def _readable(record: dict) -> dict:
    """The relabelled form of a counterexample (older stores: computed here)."""
    if record.get("readable"):
        return record["readable"]
    from .run.readable import readable
    return readable(record.get("complexes") or {})


def describe_readable(entry: dict) -> str:
    from .run.readable import describe
    return describe(entry)


# ----------------------------------------------------------------------- HTML
_CSS = """
body{font-family:Georgia,'DejaVu Serif',serif;max-width:1100px;margin:1.5em auto;padding:0 1em;
color:#1d1d1d;background:#fff;line-height:1.45}
h1{font-size:1.6em;margin-bottom:.2em}h2{font-size:1.3em;border-bottom:1px solid #ccc;
margin-top:2em}h3{font-size:1.1em}
code,pre{font-family:'DejaVu Sans Mono',Menlo,Consolas,monospace;font-size:.88em}
pre{background:#f6f6f4;border:1px solid #e0e0dc;padding:.5em .7em;overflow-x:auto;margin:.3em 0}
table{border-collapse:collapse;margin:.6em 0}th,td{border:1px solid #d4d4d0;padding:.2em .55em}
th{background:#efefeb;text-align:left}td.n{text-align:right;font-variant-numeric:tabular-nums}
.caution{border-left:4px solid #b8860b;background:#fbf6e6;padding:.6em 1em;margin:1em 0}
.verdict-ok{color:#1b6e20;font-weight:bold}.verdict-bad{color:#a61b1b;font-weight:bold}
.pair{display:flex;flex-wrap:wrap;gap:1.2em;align-items:flex-start}
.pair figure{margin:0;flex:0 0 auto}.pair .values{flex:1 1 380px;min-width:300px}
figure img{max-width:100%;height:auto;border:1px solid #e4e4e0}
figcaption{font-size:.85em;color:#555;max-width:520px}
.meta{color:#555;font-size:.92em}dl{display:grid;grid-template-columns:max-content 1fr;
gap:.15em 1em}dt{font-weight:bold}dd{margin:0}
"""

_CSP = ("default-src 'none'; img-src data:; style-src 'unsafe-inline'; "
        "base-uri 'none'; form-action 'none'")


def _h(text) -> str:
    return html.escape(str(text), quote=True)


def _img(p: _Picture, alt: str) -> str:
    from .drawing import data_uri

    if not p.png:
        return f"<p><em>{_h(p.caption)}</em></p>"
    return (f'<figure><img src="{data_uri(p.png)}" alt="{_h(alt)}"/>'
            f"<figcaption>{_h(p.caption)}</figcaption></figure>")


def _html(run: RunData, pictures: dict[str, list[_Picture]]) -> str:
    out = ["<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8"/>',
           f'<meta http-equiv="Content-Security-Policy" content="{_CSP}"/>',
           '<meta name="viewport" content="width=device-width, initial-scale=1"/>',
           f"<title>Verifier report: run {_h(run.run_id)}</title>",
           f"<style>{_CSS}</style>"]
    data = json.dumps(run.numbers(), sort_keys=True).replace("</", "<\\/")
    out.append(f'<script type="application/json" id="verifier-report-data">{data}</script>')
    out += ["</head><body>", f"<h1>Verifier report: {_h(run.scope or 'run ' + run.run_id)}</h1>",
            f'<p class="meta">Store <code>{_h(run.store)}</code>; engine {_h(run.engine)}; '
            f"started {_h(_when(run.started))}, finished {_h(_when(run.finished))}.</p>",
            f'<p class="caution">{_h(_caution(run))}</p>',
            "<h2>Summary</h2>", "<table><thead><tr><th>claim</th><th>expect</th>"
            "<th>verdict</th><th>cases</th>" + "".join(f"<th>{o}</th>" for o in _OUTCOMES)
            + "<th>seconds</th></tr></thead><tbody>"]
    for c in run.claims:
        out.append(f'<tr><td><a href="#claim-{_h(c.name)}">{_h(c.name)}</a></td>'
                   f"<td>{_h(c.expect)}</td><td>{_verdict_html(c)}</td>"
                   f'<td class="n">{c.cases}</td>'
                   + "".join(f'<td class="n">{c.counts[o]}</td>' for o in _OUTCOMES)
                   + f'<td class="n">{c.seconds:.2f}</td></tr>')
    out.append("</tbody></table>")
    for c in run.claims:
        out += [f'<h2 id="claim-{_h(c.name)}">{_h(c.title)}</h2>', "<dl>",
                f"<dt>claim</dt><dd><code>{_h(c.name)}</code></dd>"]
        if len(run.runs) > 1:
            out.append(f"<dt>run</dt><dd><code>{_h(c.run_id)}</code></dd>")
        out.append(f"<dt>statement</dt><dd>{_html_code(c.statement)}</dd>")
        if c.where:
            out.append(f"<dt>where</dt><dd>{_html_code(c.where)}</dd>")
        out += [f"<dt>source</dt><dd>{_h(c.source or 'not given')}</dd>",
                f"<dt>expected</dt><dd>{_h(c.expect)}</dd>",
                f"<dt>verdict</dt><dd>{_verdict_html(c)}</dd>",
                f"<dt>evidence</dt><dd>{_h(c.evidence)}</dd>",
                f"<dt>time</dt><dd>{_h(_seconds(c.seconds))} summed over {c.cases} cases</dd>",
                "<dt>certificate</dt><dd>"]
        if c.certificate:
            out.append(f"<code>{_h(c.certificate)}</code> ({_h(c.certificate_note)}); "
                       f"re-check: <pre>{_h(recheck_command(c.certificate))}</pre>")
        else:
            out.append(_h(c.certificate_note))
        if c.unsettled:
            out.append("</dd><dt>unsettled</dt><dd><ul>" + "".join(
                f"<li><code>{_h(u['case_id'])}</code>: {_h(u['outcome'])}: {_h(u['message'])}</li>"
                for u in c.unsettled) + "</ul>")
        out += ["</dd></dl>", "<table><thead><tr><th>#</th><th>family</th><th>parameters</th>"
                "<th>binds</th><th>cases</th><th>holds</th><th>fails</th><th>outside</th>"
                "<th>other</th></tr></thead><tbody>"]
        for f in c.families:
            other = sum(f.counts.get(o, 0) for o in UNSETTLED)
            out.append(f'<tr><td class="n">{f.index}</td><td>{_h(f.name)}</td>'
                       f"<td><code>{_h(_parameter_text(f.parameters))}</code></td>"
                       f"<td>{_h(f.bind)}</td><td class=\"n\">{f.cases}</td>"
                       f'<td class="n">{f.counts.get("holds", 0)}</td>'
                       f'<td class="n">{f.counts.get("fails", 0)}</td>'
                       f'<td class="n">{f.counts.get("outside", 0)}</td>'
                       f'<td class="n">{other}</td></tr>')
        out.append("</tbody></table>")
        shown = pictures.get(c.name, [])
        record = c.counterexample
        if record:
            drawing = next((p for p in shown if p.kind == "counterexample"), None)
            out += ["<h3>Minimal counterexample</h3>", '<div class="pair">']
            if drawing is not None:
                out.append(_img(drawing, f"drawing of the counterexample to {c.name}"))
            out.append('<div class="values">')
            for v, facets in (record.get("complexes") or {}).items():
                out.append(f"<p><b>{_h(v)}</b> = <code>{_h(facets)}</code></p>")
            for v, entry in _readable(record).items():
                out.append(f"<p>{_h(v)} relabelled: <code>"
                           f"{_h(describe_readable(entry))}</code></p>")
            out.append(f"<p class=\"meta\">from case <code>{_h(record.get('case_id'))}</code> "
                       f"({_h(record.get('family'))}), {len(record.get('steps') or [])} "
                       "shrinking steps, " + ("minimal" if record.get("minimal")
                                              else "shrinking stopped early") + "</p>")
            if c.smallest:
                out.append(f'<p class="meta">{_h(_smallest_text(c))}</p>')
            sides = record.get("sides") or []
            if _simplex_order(record):
                out.append(f'<p class="meta">{_h(_simplex_order(record))}</p>')
            if len(sides) == 2:
                left, right = side_expressions(c.statement) or ("", "")
                out += [f"<p>left side{' <code>' + _h(left) + '</code>' if left else ''}</p>"
                        f"<pre>{_h(_value_text(sides[0]))}</pre>",
                        f"<p>right side{' <code>' + _h(right) + '</code>' if right else ''}"
                        f"</p><pre>{_h(_value_text(sides[1]))}</pre>"]
            elif sides:
                out.append(f"<p>value</p><pre>{_h(' '.join(map(str, sides)))}</pre>")
            if record.get("witness"):
                out.append("<p>witness</p><pre>" + _h("\n".join(
                    f"{k} = {v}" for k, v in record["witness"].items())) + "</pre>")
            if record.get("certified"):
                out.append(f"<p>{_h(CERTIFIED_CAPTION.lower())}</p><pre>" + _h("\n".join(
                    _certified_row(v) for v in record["certified"])) + "</pre>")
            out.append("</div></div>")
        for p in shown:
            if p.kind == "spectrum":
                out += ["<h3>Spectrum</h3>", _img(p, f"spectrum picture for {c.name}")]
    out += ["<h2>Provenance</h2>", '<dl class="provenance">'] + [
        f"<dt>{_h(what)}</dt><dd><code>{_h(value)}</code></dd>"
        for what, value in provenance(run)] + ["</dl>"]
    out += [f'<p class="caution">{_h(CAUTION)}.</p>', "</body></html>", ""]
    return "\n".join(out)


def _html_code(text: str) -> str:
    text = str(text).strip("\n")
    return f"<pre>{_h(text)}</pre>" if "\n" in text else f"<code>{_h(text)}</code>"


def _verdict_html(c: ClaimData) -> str:
    good = c.verdict in ("holds", "fails, as expected")
    return f'<span class="verdict-{"ok" if good else "bad"}">{_h(c.verdict)}</span>'


# ------------------------------------------------------------------ writing
def write_report(store_path, out_dir="reports", run_id: str | None = None,
                 certificates_dir: str | Path = "reports/certificates",
                 runs: list[str] | None = None, every_claim: bool = False) -> list[Path]:
    """Write ``report.md`` and a self-contained ``report.html`` for one run of the store.

    The report lists, per claim, its statement, source, families with the cases covered,
    outcome counts, time, certificate and re-check command; each counterexample is drawn
    beside its exact values; spectral claims get a picture of the spectrum of L (or L²).
    The HTML page needs no network (pictures are ``data:`` URIs, styles inline, and its
    Content-Security-Policy forbids any request); the Markdown file links the pictures,
    written beside it as PNG files (one per picture).

    Parameters:
        store_path: the SQLite store of ``verifier run``.
        out_dir: the folder to write into (created if missing).
        run_id: the run (default: the latest).
        certificates_dir: the folder ``verifier run`` wrote certificates to.
        runs, every_claim: the scope: several runs, or the latest verdict of every claim
            in the store (see :func:`collect`).

    Returns: the paths written (report.md, report.html, then the PNG files).

    Raises :class:`ReportError` when the store or run cannot be found.

    >>> import tempfile
    >>> folder = Path(tempfile.mkdtemp())
    >>> [p.name for p in write_report(_example_store(folder), folder / "out",
    ...                               certificates_dir=folder)]
    ['report.md', 'report.html', 'contractible-counterexample.png']

    Notes: reads only the store and the certificates folder (see the module docstring);
    about 0.3 s per picture (matplotlib).  Reference: SPEC §9.
    """
    run = collect(store_path, run_id, certificates_dir, runs=runs, every_claim=every_claim)
    pictures = _pictures(store_path, run)
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    written = [out / "report.md", out / "report.html"]
    from .discover.render import discoveries_html, discoveries_markdown  # own section
    written[0].write_text(_markdown(run, pictures) + discoveries_markdown(store_path),
                          encoding="utf-8")
    written[1].write_text(_html(run, pictures).replace(
        f'<p class="caution">{_h(CAUTION)}.</p>', discoveries_html(store_path)
        + f'<p class="caution">{_h(CAUTION)}.</p>', 1), encoding="utf-8")
    for claim_pictures in pictures.values():
        for p in claim_pictures:
            if p.file and p.png:
                (out / p.file).write_bytes(p.png)
                written.append(out / p.file)
    return written


# ---------------------------------------------------------------------- LaTeX
def _positions(K) -> list[tuple[float, float]]:
    """Plane positions of K's vertices: the drawing module's deterministic layout when it
    offers one, else the vertices on a circle in label order."""
    from . import drawing

    layout = getattr(drawing, "layout", None) or getattr(drawing, "_layout", None)
    if layout is not None:
        try:
            return [(float(x), float(y)) for x, y in layout(K)]
        except Exception:  # noqa: BLE001 - fall back to the circle below
            pass
    n = K.n_vertices
    angles = [math.pi / 2 - 2 * math.pi * i / max(n, 1) for i in range(n)]
    return [(math.cos(a), math.sin(a)) if n > 1 else (0.0, 0.0) for a in angles]


def _tikz_in_space(K) -> str:
    """A TikZ picture of a 2-complex whose edges cannot be drawn flat without crossings
    (a closed surface other than the sphere): the vertices placed in space as in the
    3-dimensional view of :mod:`verifier.drawing`, seen from a fixed direction, the
    triangles filled half-transparent from the back to the front."""
    from .drawing import space_layout

    pos = space_layout(K)
    azimuth, elevation = math.radians(35), math.radians(25)
    right = (math.cos(azimuth), math.sin(azimuth), 0.0)
    up = (-math.sin(elevation) * math.sin(azimuth), math.sin(elevation) * math.cos(azimuth),
          math.cos(elevation))
    toward = (math.cos(elevation) * math.sin(azimuth), -math.cos(elevation) * math.cos(azimuth),
              math.sin(elevation))

    def dot(p, q):
        return sum(a * b for a, b in zip(p, q))

    flat = [(2.5 * dot(p, right), 2.5 * dot(p, up)) for p in pos]
    depth = [dot(p, toward) for p in pos]
    lines = ["\\begin{tikzpicture}"]
    for i, (x, y) in enumerate(flat):
        lines.append(f"  \\coordinate (v{i}) at ({x:.4f},{y:.4f});")
    triangles = sorted((s for s in K.simplices if len(s) == 3),
                       key=lambda s: sum(depth[v] for v in s))
    for s in triangles:
        lines.append("  \\filldraw[fill=blue!30, fill opacity=0.55, draw=black!60] "
                     + " -- ".join(f"(v{v})" for v in s) + " -- cycle;")
    for i, label in enumerate(K.labels):
        lines.append(f"  \\node[circle, draw, fill=white, inner sep=1.2pt, font=\\scriptsize] at "
                     f"(v{i}) {{{latex_escape(label)}}};")
    lines.append("\\end{tikzpicture}")
    lines.append("\\par\\emph{A 3-dimensional view (a drawing): the edges of this complex "
                 "cannot be drawn in the plane without crossings.}")
    return "\n".join(lines)


def _tikz(facets) -> str:
    """A TikZ picture of a complex: filled triangles, edges, labelled vertices."""
    from .complex import Complex

    K = Complex.from_facets(facets)
    from .drawing import needs_space
    if needs_space(K):
        return _tikz_in_space(K)
    pos = _positions(K)
    if pos:
        xs, ys = [p[0] for p in pos], [p[1] for p in pos]
        span = max(max(xs) - min(xs), max(ys) - min(ys), 1e-9)
        scale = min(2.0, 5.0 / span)
    else:
        scale = 1.0
    lines = [f"\\begin{{tikzpicture}}[scale={scale:.3f}]"]
    for i, (x, y) in enumerate(pos):
        lines.append(f"  \\coordinate (v{i}) at ({x:.4f},{y:.4f});")
    for s in K.simplices:
        if len(s) == 3:
            lines.append("  \\fill[blue!25] " + " -- ".join(f"(v{v})" for v in s) + " -- cycle;")
    for s in K.simplices:
        if len(s) == 2:
            lines.append(f"  \\draw[thick] (v{s[0]}) -- (v{s[1]});")
    for i, label in enumerate(K.labels):
        lines.append(f"  \\node[circle, draw, fill=white, inner sep=1.5pt, font=\\small] at "
                     f"(v{i}) {{{latex_escape(label)}}};")
    lines.append("\\end{tikzpicture}")
    if K.dim >= 3:
        lines.append(f"\\par\\emph{{{K.dim}-dimensional: the 2-skeleton is drawn.}}")
    return "\n".join(lines)


def _short(text: str, limit: int) -> str:
    return text if len(text) <= limit else text[: limit - 3].rstrip() + "..."


def _facets_latex(facets) -> str:
    return r"$\{$" + ", ".join(r"$\{$" + ", ".join(latex_escape(v) for v in f) + r"$\}$"
                               for f in facets) + r"$\}$"


def _latex(run: RunData, fragment: bool = False) -> str:
    preamble = [r"\documentclass[10pt]{article}",
                r"\usepackage{tikz}", r"\usepackage{longtable}", r"\usepackage{array}",
                r"\setlength{\textwidth}{16cm}\setlength{\oddsidemargin}{0cm}",
                r"\setlength{\evensidemargin}{0cm}",
                r"\begin{document}", ""]
    if fragment:
        preamble = ["% Results of the verifier, to \\input into a document whose preamble",
                    "% loads the packages tikz, longtable and array.", ""]
    out = preamble + [
           r"\section*{Results of " + latex_escape(run.scope or "run " + run.run_id) + "}", "",
           latex_escape(_caution(run)), "",
           r"{\small\setlength{\tabcolsep}{3pt}",
           r"\begin{longtable}{>{\raggedright}p{0.22\linewidth}p{0.3\linewidth}rrrrr}",
           r"\hline",
           r"claim & family & cases & holds & fails & outside & other \tabularnewline",
           r"\hline", r"\endhead", r"\hline", r"\endfoot"]
    for c in run.claims:
        for i, f in enumerate(c.families):
            other = sum(f.counts.get(o, 0) for o in UNSETTLED)
            out.append((r"\texttt{" + latex_escape(c.name).replace("-", r"-\allowbreak{}")
                        + "}" if i == 0 else "") + " & "
                       + r"\raggedright " + _binds_latex(c, f) + latex_escape(f.name)
                       + (r" {\footnotesize(" + _breakable(_parameter_text(f.parameters))
                          + ")}" if _parameter_text(f.parameters) else "")
                       + " & " + " & ".join(
                           str(x) for x in (f.cases, f.counts.get("holds", 0),
                                            f.counts.get("fails", 0),
                                            f.counts.get("outside", 0), other))
                       + r" \tabularnewline")
        other = sum(c.counts.get(o, 0) for o in UNSETTLED)
        out.append(r" & \emph{all (" + latex_escape(c.verdict) + ")} & " + " & ".join(
            str(x) for x in (c.cases, c.counts["holds"], c.counts["fails"],
                             c.counts["outside"], other)) + r" \tabularnewline")
        out.append(r"\hline")
    out += [r"\end{longtable}", "}", "", r"\section*{Claims}", ""]
    for c in run.claims:
        out += [r"\subsection*{" + latex_escape(c.title) + "}", "",
                r"\noindent Claim \texttt{" + latex_escape(c.name) + r"}: "
                r"{\ttfamily\raggedright " + latex_escape(c.statement) + r"\par}"]
        if c.where:
            out.append(r"\noindent where {\ttfamily " + latex_escape(c.where) + r"\par}")
        out += [r"\noindent Source: " + latex_escape(c.source or "not given") + r".\par",
                r"{\raggedright\noindent Families: " + "; ".join(
                    _binds_latex(c, f) + latex_escape(f.name) + " ("
                    + _breakable(_parameter_text(f.parameters)) + f"): {f.cases} cases"
                    for f in c.families) + r".\par}",
                r"\noindent Expected " + latex_escape(c.expect) + "; verdict "
                + latex_escape(c.verdict) + f"; {c.cases} cases, "
                + latex_escape(_seconds(c.seconds)) + r".\par"]
        if len(run.runs) > 1:
            out.append(r"\noindent Run \texttt{" + latex_escape(c.run_id) + r"}.\par")
        if c.certificate:
            out.append(r"{\raggedright\noindent Re-check: \texttt{" + _breakable(
                recheck_command(c.certificate)) + r"}\par}")
        record = c.counterexample
        if record:
            out += ["", r"\paragraph{Minimal counterexample.}"]
            for v, facets in (record.get("complexes") or {}).items():
                out += [latex_escape(v) + " = " + _facets_latex(facets) + r"\par", "",
                        r"\begin{center}", _tikz(facets), r"\end{center}"]
            for v, entry in _readable(record).items():
                out.append(r"\noindent " + latex_escape(v) + " relabelled: "
                           + _breakable(describe_readable(entry)) + r"\par")
            if c.smallest:
                out.append(r"\noindent " + _breakable(_smallest_text(c)) + r".\par")
            sides = record.get("sides") or []
            if _simplex_order(record):
                out.append(r"\noindent " + latex_escape(_simplex_order(record)) + r".\par")
            named = side_expressions(c.statement) or ("", "")
            for label, value, expression in zip(("Left side", "Right side") if len(sides) == 2
                                                else ("Value",), sides, named):
                out += [r"\noindent " + label + (r" \texttt{" + _breakable(expression) + "}"
                                                 if expression and len(sides) == 2 else "")
                        + r":\par", r"{\ttfamily\small"]
                out += [r"\noindent\mbox{" + latex_escape(row).replace(" ", "~") + r"}\par"
                        for row in _value_text(value).split("\n")]
                out.append("}")
            if record.get("witness"):
                out.append(r"\noindent Witness: \texttt{" + latex_escape(", ".join(
                    f"{k} = {v}" for k, v in record["witness"].items())) + r"}\par")
            if record.get("certified"):
                out += [r"\noindent " + CERTIFIED_CAPTION + r":\par", r"{\ttfamily\small"]
                out += [r"\noindent\mbox{" + latex_escape(_certified_row(v)).replace(" ", "~")
                        + r"}\par" for v in record["certified"]]
                out.append("}")
        out.append("")
    out += [r"\section*{Provenance}", "", r"{\small\raggedright"] + [
        r"\noindent " + latex_escape(what) + ": " + _breakable(value) + r"\par"
        for what, value in provenance(run)] + ["}", ""]
    if not fragment:
        out += [r"\end{document}", ""]
    return "\n".join(out)


def _breakable(text: str) -> str:
    """Escaped text that may break after commas, slashes, hyphens, equals signs and every 16
    characters of a long word (hashes), so that nothing is cut and no line runs off."""
    pieces = re.findall(r"[^,/=\s-]{1,16}[,/=-]?|[,/=-]|\s+", str(text))
    return r"\allowbreak{}".join(latex_escape(p) for p in pieces)


def _binds_latex(claim: ClaimData, family: FamilyData) -> str:
    """For a claim over several complexes: which variable the family binds."""
    variables = {f.bind for f in claim.families}
    return ("$" + latex_escape(family.bind) + r"\leftarrow$ ") if len(variables) > 1 else ""


def write_latex(store_path, path, run_id: str | None = None,
                certificates_dir: str | Path = "reports/certificates",
                fragment: bool = False, runs: list[str] | None = None,
                every_claim: bool = False) -> Path:
    """Write a LaTeX document of one run: claims × families × outcomes, and each
    counterexample's facet list with a TikZ drawing.

    It compiles with a plain LaTeX install (``article``, ``tikz``, ``longtable``, ``array``,
    default fonts, ASCII source; on Debian the packages texlive-latex-base and
    texlive-pictures).  Claim texts are
    escaped with :func:`latex_escape`; vertex positions come from the drawing module's
    layout, so the TikZ picture matches the HTML report's drawing.

    Parameters:
        store_path: the SQLite store.
        path: the .tex file to write (its folder is created).
        run_id: the run (default: the latest).
        fragment: write no preamble and no ``\\begin{document}``: a file to ``\\input``
            into a paper whose preamble loads tikz and longtable.
        runs, every_claim: the scope, as for :func:`collect`.

    Returns: the path written.  Raises :class:`ReportError` as :func:`collect` does.

    >>> import tempfile
    >>> folder = Path(tempfile.mkdtemp())
    >>> text = write_latex(_example_store(folder), folder / "r.tex").read_text()
    >>> "begin{tikzpicture}" in text, "fill[" in text     # the circle: no filled triangle
    (True, False)

    Notes: a matrix-valued side is written one row per line.  Reference: SPEC §9.
    """
    run = collect(store_path, run_id, certificates_dir, runs=runs, every_claim=every_claim)
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    target.write_text(_latex(run, fragment=fragment), encoding="utf-8")
    return target


# --------------------------------------------------------------- notebooks
def _counterexample_img(facets, sides=None, witness=None) -> str:
    from . import drawing
    figure = drawing.counterexample_figure(facets, sides=sides, witness=witness)
    return f'<img alt="counterexample" src="{drawing.data_uri(drawing.figure_png(figure))}">'


def run_html(result) -> str:
    """HTML for a run's results in a notebook: one row per claim, and each minimal
    counterexample drawn with its exact values (``RunResult._repr_html_``)."""
    rows = []
    for r in result.claims:
        counts = r.counts
        colour = "#1a7f37" if r.meets_expectation else "#b42318"
        rows.append(
            f"<tr><td>{_h(r.claim.name)}</td><td style='color:{colour}'>{_h(r.verdict)}</td>"
            f"<td>{r.cases}</td><td>{counts.get('fails', 0)}</td>"
            f"<td>{counts.get('outside', 0)}</td><td><code>{_h(r.digest[:12])}</code></td></tr>")
    parts = [f"<p>run <code>{_h(result.run_id)}</code> ({_h(result.engine)}, "
             f"{result.workers} workers, {result.seconds:.1f} s)</p>",
             "<table><tr><th>claim</th><th>verdict</th><th>cases</th><th>fails</th>"
             "<th>outside</th><th>digest</th></tr>" + "".join(rows) + "</table>"]
    for r in result.claims:
        c = r.counterexample
        if c:
            parts.append(f"<p><b>{_h(r.claim.name)}</b>: minimal counterexample "
                         f"<code>{_h(str(c['complexes']))}</code></p>")
            parts.append(_counterexample_img(c["complexes"], c.get("sides"), c.get("witness")))
    return "\n".join(parts)


def certificate_html(data: dict) -> str:
    """HTML for a certificate in a notebook (``Certificate._repr_html_``)."""
    claim = data.get("claim", {})
    lines = [f"<p><b>{_h(data.get('kind', '?'))} certificate</b> for "
             f"<b>{_h(claim.get('name', '?'))}</b>: <code>{_h(claim.get('statement', ''))}</code></p>",
             f"<p>{_h(data.get('cases', '?'))} cases, evidence {_h(data.get('evidence', '?'))}, "
             f"digest <code>{_h(str(data.get('digest', ''))[:16])}</code>; re-check with "
             f"<code>verifier check</code></p>"]
    if data.get("kind") == "counterexample":
        complexes = {v: c["facets"] for v, c in data.get("complexes", {}).items()}
        lines.append(f"<p>values: <code>{_h(' vs '.join(data.get('values') or []))}</code></p>")
        lines.append(_counterexample_img(complexes or data["complex"]["facets"],
                                         data.get("values"), data.get("witness")))
    return "\n".join(lines)

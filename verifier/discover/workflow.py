"""What ``verifier discover`` does, step by step, for the command line and for Python.

* :func:`relations_from_file` -- a discovery file in; the checked relations, one claim
  file per relation (``expect = "holds"``), and (on request) the run of those claims on
  the families named as ``further``.
* :func:`hypotheses_for` -- a claim in; its statement run on every case of its families
  (the claim's own ``where`` set aside unless asked to keep it), the cases read back
  from the store, the registry's predicates evaluated on each, the separating and the
  sufficient hypotheses, each written as a claim with ``where`` and run further.

Both keep a record in the store for ``verifier report``.  Files are written only after
the discovery itself succeeded; a claim run goes through :func:`verifier.run.runner.run`
like any other.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from pathlib import Path

from .files import claim_file_text, family_from_table, load_discovery, toml_value
from .relations import RelationResult, find_relations
from .values import DiscoveryError, value_table

__all__ = ["RelationsReport", "HypothesesReport", "relations_from_file", "hypotheses_for",
           "relations_lines", "hypotheses_lines", "run_claims"]


@dataclass
class RelationsReport:
    name: str
    title: str
    result: RelationResult
    over: list[dict]
    further: list[dict]
    claim_files: list[str]
    further_outcomes: dict = field(default_factory=dict)   # claim name -> outcome dict


@dataclass
class HypothesesReport:
    claim: str
    statement: str
    set_aside_where: str | None
    cases: int
    passing: int
    failing: int
    unsettled: int
    separation: object
    claim_files: list[str]
    outcomes: dict = field(default_factory=dict)            # claim name -> outcome dict
    proposals: list = field(default_factory=list)           # (claim name, hypothesis)
    run_id: str = ""
    seconds: float = 0.0


def _families_text(tables: list[dict]) -> str:
    return "; ".join(toml_value({k: v for k, v in t.items() if k != "bind"}) for t in tables)


def run_claims(paths: list[str], store: str, workers: int | None = None) -> dict:
    """Run claim files with the runner; claim name -> {verdict, cases, fails, holds,
    outside, other, ok}."""
    from ..run.runner import RunOptions, run
    from ..run.store import UNSETTLED
    result = run(paths, RunOptions(store=store, workers=workers))
    outcomes = {}
    for r in result.claims:
        outcomes[r.claim.name] = {
            "verdict": r.verdict, "ok": r.meets_expectation, "cases": r.cases,
            "holds": r.counts["holds"], "fails": r.counts["fails"],
            "outside": r.counts["outside"], "other": sum(r.counts[o] for o in UNSETTLED),
            "counterexample": (r.counterexample or {}).get("complexes"),
            "run_id": result.run_id}
    return outcomes


def _fresh_folder(out: Path) -> None:
    out.mkdir(parents=True, exist_ok=True)


def _check_paths(store: str, out: str) -> None:
    """Refuse a store or output folder that cannot be used, before any work."""
    from ..run.runner import check_output_folder
    from ..run.store import check_store_path
    check_store_path(store)
    check_output_folder(out, "--out")


def relations_from_file(path: str, out: str = "reports/discovered",
                        store: str = "reports/verifier.sqlite", degree: int | None = None,
                        further: list[dict] | None = None, test_further: bool = False,
                        workers: int | None = None) -> RelationsReport:
    """Discover the relations of a discovery file, write a claim per relation, and with
    ``test_further`` run them on the file's ``further`` families (plus ``further``)."""
    from ..families import make_family
    _check_paths(store, out)
    found = load_discovery(path)
    further_tables = list(found.further) + list(further or [])
    for table in further or []:
        family_from_table(table, make_family)
    if test_further and not further_tables:
        raise DiscoveryError("nothing to test further on: add [[discovery.further]] to the "
                             "file or name a family with --test-further")
    table = value_table(found.families, found.expressions, workers=workers,
                        specs=found.over)
    result = find_relations(table, degree or found.degree)
    folder = Path(out) / found.name
    _fresh_folder(folder)
    source = (f"found by verifier discover on {_families_text(found.over)} "
              f"({result.cases} cases, exact); a conjecture beyond them")
    files = []
    for i, relation in enumerate(result.relations, 1):
        name = f"{found.name}-{i}"
        text = claim_file_text(name, relation.text, relation.statement,
                               found.over + further_tables, source,
                               comment=f"Proposed by `verifier discover {path}`: proved on "
                                       f"{relation.cases} cases of the families above it "
                                       "was found on.")
        target = folder / f"{name}.toml"
        target.write_text(text, encoding="utf-8")
        files.append(str(target))
    report = RelationsReport(found.name, found.title, result, found.over, further_tables, files)
    if test_further and files:
        report.further_outcomes = run_claims(files, store, workers)
    from .record import save
    save(store, "relations", found.name, relations_record(report))
    return report


def relations_record(report: RelationsReport) -> dict:
    r = report.result
    return {
        "title": report.title, "families": report.over, "further": report.further,
        "cases": r.cases, "degree": r.degree,
        "expressions": [{"name": e.name, "text": e.text} for e in r.table.expressions],
        "relations": [{"text": x.text, "statement": x.statement, "cases": x.cases,
                       "coefficients": x.coefficients} for x in r.relations],
        "rejected": r.rejected,
        "constants": [{"name": e.name, "value": str(v)} for e, v in r.constants],
        "ranges": [{"name": e.name, "min": str(lo), "max": str(hi)} for e, lo, hi in r.ranges],
        "seconds_values": r.seconds_values, "seconds_relations": r.seconds_relations,
        "claim_files": report.claim_files, "further_outcomes": report.further_outcomes,
    }


def relations_lines(report: RelationsReport) -> list[str]:
    """The plain-text account of a discovery of relations (what the command prints)."""
    r = report.result
    lines = [f"{report.name}: {len(r.table.expressions)} expressions on {r.cases:,} cases "
             f"({_families_text(report.over)}), degree {r.degree}",
             f"values {r.seconds_values:.1f} s ({r.table.workers} "
             f"process{'es' if r.table.workers > 1 else ''}), relations "
             f"{r.seconds_relations:.2f} s", ""]
    if r.relations:
        lines.append(f"relations (a basis of all integer relations; each checked on every "
                     f"case):")
        for i, x in enumerate(r.relations, 1):
            lines.append(f"  [{i}] {x.text}    (proved on {x.cases:,} cases)")
    else:
        lines.append("no integer relation holds on every case")
    for rejected in r.rejected:
        lines.append(f"  rejected: {rejected['text']} (fails on case {rejected['fails_on']})")
    lines.append("")
    if r.constants:
        lines.append("constant on the family: " + ", ".join(
            f"{e.name} = {v}" for e, v in r.constants))
    lines.append("ranges: " + ", ".join(f"{e.name} in [{lo}, {hi}]" for e, lo, hi in r.ranges
                                        if lo != hi))
    if report.claim_files:
        lines.append(f"claim files: {Path(report.claim_files[0]).parent}/ "
                     f"({len(report.claim_files)} written, expect = \"holds\")")
    if report.further_outcomes:
        lines.append("")
        lines.append(f"tested further on {_families_text(report.further)}:")
        for i, (name, o) in enumerate(report.further_outcomes.items(), 1):
            word = "survives" if o["ok"] else f"does not survive ({o['verdict']})"
            lines.append(f"  [{i}] {word}: {o['holds']:,} cases hold, {o['fails']:,} fail"
                         + (f", {o['other']} unsettled" if o["other"] else ""))
            if o.get("counterexample"):
                lines.append(f"      counterexample: {o['counterexample']}")
    return lines


# ------------------------------------------------------------------- hypotheses
def _cases_of_run(store: str, run_id: str, claim: str) -> list[tuple[str, str]]:
    import sqlite3
    db = sqlite3.connect(f"file:{store}?mode=ro", uri=True, timeout=30)
    try:
        return list(db.execute("SELECT case_id, outcome FROM cases WHERE run_id = ? AND "
                               "claim = ? ORDER BY case_id", (run_id, claim)))
    finally:
        db.close()


def _tables_of(claim) -> list[dict]:
    tables = []
    for ref in claim.over:
        table = {k: v for k, v in ref.spec.items() if not str(k).startswith("_")}
        if ref.bind != "K":
            table["bind"] = ref.bind
        tables.append(table)
    return tables


def hypotheses_for(path: str, claim_name: str | None = None,
                   store: str = "reports/verifier.sqlite", out: str = "reports/discovered",
                   keep_where: bool = False, further: list[dict] | None = None,
                   test_further: bool = True, workers: int | None = None,
                   registry=None) -> HypothesesReport:
    """Find the hypotheses under which a claim's statement holds (see module docstring).

    The statement is first run on every case of the claim's families (with the claim's
    own ``where`` only when ``keep_where``); the outcomes are read from the store;
    cases that are neither 'holds' nor 'fails' (errors, limits) are left out and counted.
    """
    from ..claims.errors import ClaimError
    from ..claims.loader import load_paths
    from ..run.cases import complexes_of
    from .hypotheses import predicate_table, separators

    started = time.monotonic()
    _check_paths(store, out)
    try:
        claims = load_paths([path])
    except ClaimError as error:
        raise DiscoveryError(error.message, error.place) from None
    if claim_name:
        claims = [c for c in claims if c.name == claim_name]
        if not claims:
            raise DiscoveryError(f"no claim named '{claim_name}' in {path}")
    if len(claims) != 1:
        raise DiscoveryError(f"{path} holds several claims; choose one with --claim NAME "
                             f"({', '.join(c.name for c in claims)})")
    claim = claims[0]
    if claim.variables != ["K"]:
        raise DiscoveryError(f"claim '{claim.name}' binds {', '.join(claim.variables)}; the "
                             "hypothesis finder handles claims about one complex K")
    from ..families import make_family
    further_tables = list(further or [])
    for table in further_tables:
        family_from_table(table, make_family)
    tables = _tables_of(claim)
    folder = Path(out) / f"{claim.name}-hypotheses"
    _fresh_folder(folder)
    where = claim.where_text if keep_where else None
    bare_name = f"{claim.name}-cases"[:80]
    bare = folder / f"{bare_name}.toml"
    bare.write_text(claim_file_text(
        bare_name, f"{claim.title} (statement on every case)", claim.statement_text, tables,
        claim.source, where=where,
        comment=f"The statement of '{claim.name}' on every case of its families"
                + ("" if keep_where else " (its own 'where' set aside)") + "."),
        encoding="utf-8")
    outcomes = run_claims([str(bare)], store, workers)
    run_id = outcomes[bare_name]["run_id"]
    rows = _cases_of_run(store, run_id, bare_name)
    decided = [(cid, o) for cid, o in rows if o in ("holds", "fails")]
    unsettled = sum(1 for _, o in rows if o not in ("holds", "fails", "outside"))
    bare_claim = load_paths([str(bare)])[0]
    cases = [(cid, complexes_of(bare_claim, cid)["K"]) for cid, _ in decided]
    values, dropped = predicate_table(cases, registry, workers)
    separation = separators([o == "holds" for _, o in decided], values, registry)
    separation.dropped = dropped
    proposals = separation.separating + (separation.sufficient
                                         if not separation.separating else [])
    files, named = [], []
    for h in proposals:
        name = f"{claim.name}-when-{h.key}".replace("<=", "le")[:80].rstrip("-")
        condition = h.where if where is None else f"({where}) and ({h.where})"
        text = claim_file_text(
            name, f"{claim.title}, when {h.words}", claim.statement_text,
            tables + further_tables, f"hypothesis proposed by verifier discover for "
            f"'{claim.name}'; {claim.source}", where=condition,
            comment=f"'{claim.name}' {'holds exactly' if h.kind == 'separates' else 'holds'} "
                    f"when {h.words} on the {len(decided):,} decided cases of its families.")
        target = folder / f"{name}.toml"
        target.write_text(text, encoding="utf-8")
        files.append(str(target))
        named.append((name, h))
    results = run_claims(files, store, workers) if (files and test_further) else {}
    report = HypothesesReport(claim.name, claim.statement_text,
                              None if keep_where else claim.where_text, len(rows),
                              separation.passing, separation.failing, unsettled, separation,
                              files, results, named, run_id, time.monotonic() - started)
    from .record import save
    save(store, "hypotheses", claim.name, hypotheses_record(report))
    return report


def hypotheses_record(report: HypothesesReport) -> dict:
    s = report.separation
    return {
        "statement": report.statement, "set_aside_where": report.set_aside_where,
        "cases": report.cases, "passing": report.passing, "failing": report.failing,
        "unsettled": report.unsettled, "dropped": s.dropped,
        "lines": hypotheses_lines(report),
        "proposals": [{"claim": name, "kind": h.kind, "words": h.words, "where": h.where,
                       "covered": h.passing_covered, "equivalent": h.equivalent,
                       "further": report.outcomes.get(name)} for name, h in report.proposals],
    }


def hypotheses_lines(report: HypothesesReport) -> list[str]:
    """The plain-text account of a hypothesis search (what the command prints)."""
    s = report.separation
    decided = report.passing + report.failing
    lines = [f"{report.claim}: {report.statement}"]
    if report.set_aside_where:
        lines.append(f"  (its own where, {report.set_aside_where}, set aside: a hypothesis "
                     "replaces it)")
    lines.append(f"the statement holds on {report.passing:,} and fails on {report.failing:,} "
                 f"of {decided:,} decided cases" + (f" ({report.unsettled} unsettled, left out)"
                                                   if report.unsettled else ""))
    if s.dropped:
        lines.append(f"predicates not decided on every case, left out: {', '.join(s.dropped)}")
    if s.separating:
        for h in s.separating:
            lines.append(f"holds on all {decided:,} cases exactly when {h.words}")
            if h.equivalent:
                lines.append(f"  (on these cases the same as: {'; '.join(h.equivalent[:3])})")
    else:
        lines.append("no predicate of the registry, nor a conjunction of two, separates the "
                     "passing from the failing cases")
        for h in s.sufficient:
            lines.append(f"holds on every case where {h.words} ({h.passing_covered:,} of the "
                         f"{report.passing:,} passing cases; none of the {report.failing:,} "
                         "failing)")
    for name, h in report.proposals:
        o = report.outcomes.get(name)
        if o is None:
            continue
        word = "holds" if o["verdict"] == "holds" else o["verdict"]
        lines.append(f"  {name}: tested further on {o['cases']:,} cases ({o['holds']:,} with "
                     f"the hypothesis): {word}")
        if o.get("counterexample"):
            lines.append(f"    counterexample: {o['counterexample']}")
    if not report.proposals:
        lines.append("nothing to test further")
    return lines

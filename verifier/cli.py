"""The ``verifier`` command.

    verifier run PATH...          test the claims in claim files or folders
    verifier check CERT...        re-verify certificates with the independent backend
    verifier show COMPLEX...      exact invariants of catalog names or facet files
                                  (--png FILE also draws a complex, .png or .svg)
    verifier report               a run's report: Markdown, one HTML page, LaTeX
    verifier runs                 the runs in a store: date, claims, verdicts, command
    verifier cases                the cases of a run, filtered (table, CSV or JSON)
    verifier diff RUN_A RUN_B     what changed between two runs (exit 1 if anything did)
    verifier functions            the functions of the claim language
    verifier families             the families claims are tested over
    verifier discover ...         propose relations among invariants (relations FILE), or
                                  hypotheses under which a claim holds (hypotheses FILE)

A COMPLEX is a catalog name (``verifier show --list`` prints them) or a path to a facet
file (text: one facet per line; ``.json``: a list of facets).  Exit codes: 0 success
(every claim meets its expectation, every certificate verifies), 1 when one does not,
2 bad input (named in one line on standard error, no traceback).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import re
import sys
import time
from fractions import Fraction
from pathlib import Path

from rich import box
from rich.console import Console
from rich.markup import escape
from rich.table import Table

from . import __version__
from .complex import Complex
from .run.readable import describe as describe_readable
from .run.store import UNSETTLED

__all__ = ["main", "load_complex", "UserError"]


class UserError(Exception):
    """A mistake in what the user asked for; printed as one line, exit code 2."""


def load_complex(spec: str, max_simplices: int | None = None) -> tuple[str, Complex]:
    """A complex from a catalog name or a data file, with a display name.

    A file is read as the ``file`` family reads it (:mod:`verifier.families.datafiles`):
    a regular file of bounded size, whose simplices are counted from its facets and
    refused above ``max_simplices`` before the complex is built.
    """
    from .families import catalog
    from .families.datafiles import MAX_DATA_BYTES, DataFileError, complex_from_bytes
    from .families.family import MAX_SIMPLICES
    from .userfiles import UnreadableFile, read_bytes

    cap = max_simplices or MAX_SIMPLICES
    path = Path(spec)
    if path.suffix or os.path.lexists(path) or "/" in spec:
        if not os.path.lexists(path):
            raise UserError(f"{spec}: no such file (and not a catalog name)")
        try:
            return path.name, complex_from_bytes(read_bytes(path, "complex file",
                                                            MAX_DATA_BYTES), spec, cap=cap)
        except UnreadableFile as error:
            raise UserError(str(error)) from None
        except DataFileError as error:
            hint = (f" (--max-simplices raises the limit, up to {SHOW_SIMPLICES_CEILING:,})"
                    if "simplices allowed" in str(error) or "more than" in str(error) else "")
            raise UserError(f"{error}{hint}") from None
    try:
        return spec, catalog.complex(spec)
    except catalog.CatalogError as error:
        raise UserError(str(error)) from None


def _fraction_text(x) -> str:
    return str(x) if not isinstance(x, Fraction) or x.denominator != 1 else str(x.numerator)


def _manifold_text(K: Complex) -> str:
    from . import invariants as inv

    try:
        if inv.is_closed_manifold(K):
            return "closed manifold"
        if inv.is_manifold_with_boundary(K):
            return "manifold with boundary"
        return "not a manifold"
    except inv.NotDecided:
        return "undecided"


def describe(K: Complex) -> list[tuple[str, str]]:
    """The invariants `verifier show` prints, as (name, exact value) rows."""
    from . import invariants as inv

    rows = [
        ("vertices", str(K.n_vertices)),
        ("dimension", str(K.dim)),
        ("f-vector", str(list(K.f_vector))),
        ("Euler characteristic", str(inv.euler(K))),
        ("integral homology", ",  ".join(inv.format_homology(inv.homology(K)))),
        ("Betti numbers over Q", str(list(inv.betti(K)))),
        ("Betti numbers over Z/2", str(list(inv.betti(K, p=2)))),
        ("Wu characteristic", str(inv.wu(K))),
        ("manifold", _manifold_text(K)),
    ]
    if len(K.simplices) <= 20_000:
        L = inv.connection(K)
        g = inv.green(K)
        positive, negative, zero = inv.signature(L)
        rows += [
            ("det L (Fredholm)", str(inv.fredholm(K))),
            ("signature of L (+, -, 0)", f"({positive}, {negative}, {zero})"),
            ("sum of Green function", str(g.total())),
        ]
    rows.append(("isomorphism hash", K.content_hash[:16]
                 + ("" if K.hash_is_canonical else " (invariant hash)")))
    return rows


def cmd_show(args, console: Console) -> int:
    from .families import catalog

    if args.list:
        if args.png is not None:
            raise UserError("show: --png draws a complex and cannot be combined with --list")
        table = Table(title="catalog", show_lines=False)
        table.add_column("name", no_wrap=True)
        table.add_column("title")
        table.add_column("source")
        for name in catalog.names():
            e = catalog.entry(name)
            table.add_row(name, e.get("title", ""), e.get("source", ""))
        for pattern in catalog.patterns():
            table.add_row(pattern, "(family of constructions)", "")
        console.print(table)
        return 0
    if not args.complexes:
        raise UserError("show: name at least one complex (catalog name or facet file), "
                        "or use --list")
    if args.png is not None:
        _check_picture_path(args.png, len(args.complexes))
    loaded = [load_complex(spec, args.max_simplices)
              for spec in args.complexes]  # all inputs first
    if args.png is not None:
        _write_picture(loaded[0][1], args.png)
    for name, K in loaded:
        start = time.perf_counter()
        rows = describe(K)
        elapsed = time.perf_counter() - start
        table = Table(title=f"{name}", title_justify="left", show_header=False)
        table.add_column("invariant", style="bold")
        table.add_column("value")
        for key, value in rows:
            table.add_row(key, value)
        console.print(table)
        console.print(f"[dim]{len(K.simplices)} simplices, exact, {elapsed:.2f} s[/dim]\n")
    if args.png is not None:
        console.print(f"drawing written to {escape(args.png)}", highlight=False, soft_wrap=True)
    return 0


_PICTURE_SUFFIXES = (".png", ".svg")


def _check_picture_path(path: str, count: int) -> None:
    """Refuse a --png request before any work: one complex, a known picture suffix."""
    if count != 1:
        raise UserError(f"show --png: draws one complex, but {count} were named")
    suffix = Path(path).suffix.lower()
    if suffix not in _PICTURE_SUFFIXES:
        raise UserError(f"--png {path}: unknown picture format {suffix or '(no suffix)'!r}; "
                        "use a file name ending in .png or .svg")


def _write_picture(K: Complex, path: str) -> None:
    """Draw K (verifier.drawing) and write it as PNG or SVG according to the suffix."""
    from . import drawing

    try:
        figure = drawing.draw_complex(K)
        if Path(path).suffix.lower() == ".svg":
            data = drawing.figure_svg(figure).encode("utf-8")
        else:
            data = drawing.figure_png(figure)
    except drawing.DrawingError as error:
        raise UserError(f"--png {path}: {error}") from None
    try:
        Path(path).write_bytes(data)
    except OSError as error:
        raise UserError(f"--png {path}: cannot write the file ({error.strerror or error})") \
            from None


class _Bar:
    """The progress bar of `verifier run` (rich)."""

    def __init__(self, console: Console):
        from rich.progress import (BarColumn, MofNCompleteColumn, Progress, TextColumn,
                                   TimeElapsedColumn, TimeRemainingColumn)
        self.progress = Progress(TextColumn("{task.description:<28}"), BarColumn(),
                                 MofNCompleteColumn(), TimeElapsedColumn(),
                                 TimeRemainingColumn(), console=console, transient=False)
        self.task = None

    def start(self, claim, total, done, unit="cases"):
        if self.task is None:
            self.progress.start()
        name = claim.name[:28] if unit == "cases" else f"{claim.name[:19]} ({unit})"
        self.task = self.progress.add_task(name, total=total, completed=done)

    def advance(self, n):
        self.progress.advance(self.task, n)

    def done(self):
        pass

    def stop(self):
        if self.task is not None:
            self.progress.stop()


def cmd_run(args, console: Console) -> int:
    from .certificates import write_certificates
    from .claims.errors import ClaimError
    from .run.runner import RunOptions, run

    from .families import FamilyError
    from .run.runner import OptionError, check_options, check_output_folder
    from .run.store import StoreError

    options = RunOptions(store=args.store, workers=args.workers, engine=args.engine,
                         scheduler=args.scheduler, case_memory=args.case_memory,
                         resume=args.resume, max_cases=args.max_cases,
                         case_timeout=args.case_timeout,
                         data_folders=tuple(args.data_folder or ()),
                         command=" ".join(["verifier", *(args.argv or [])]))
    if args.again is not None:
        options.rerun = _again_selection(args)
    try:                           # every option and output path before any work
        check_options(options)
        check_output_folder(args.certificates, "--certificates")
    except OptionError as error:
        raise UserError(str(error)) from None
    bar = None if args.quiet else _Bar(console)
    try:
        result = run(args.paths, options, progress=bar)
    except (ClaimError, OptionError) as error:
        raise UserError(str(error)) from None
    except (StoreError, FamilyError) as error:
        raise UserError(str(error)) from None
    finally:
        if bar is not None:
            bar.stop()
    try:
        written = [] if options.rerun else write_certificates(result, args.certificates)
    except OSError as error:
        raise UserError(f"--certificates {args.certificates}: cannot write a certificate "
                        f"({error.strerror or error}); the run is in the store "
                        f"{result.store}") from None
    again = (f", again: the failing and unsettled cases of {options.rerun['of']}"
             if options.rerun else "")
    table = Table(title=f"run {result.run_id} ({result.engine}, {result.workers} workers"
                        f"{', resumed' if result.resumed else ''}{again})", title_justify="left",
                  box=box.SIMPLE_HEAD, padding=(0, 1))
    table.add_column("claim", no_wrap=True)
    table.add_column("verdict", no_wrap=True)
    for column in ("cases", "fails", "outside", "other", "s"):
        table.add_column(column, justify="right", no_wrap=True)
    for r in result.claims:
        other = sum(r.counts[o] for o in UNSETTLED)
        mark = "[green]ok[/green]" if r.meets_expectation else "[red]NOT OK[/red]"
        verdict = r.verdict.split(",")[0] + ("*" if r.claim.expect == "fails" else "")
        table.add_row(r.claim.name, f"{verdict} {mark}", str(r.cases), str(r.counts["fails"]),
                      str(r.counts["outside"]), str(other), f"{r.seconds:.0f}")
    _print_table(console, table)
    console.print("[dim]s: seconds of computation summed over the claim's cases (not wall "
                  "time; the run's wall time is on the last line)[/dim]")
    if any(r.claim.expect == "fails" for r in result.claims):
        console.print("[dim]* expected to fail: ok means a counterexample was found[/dim]")
    for r in result.claims:
        if r.counterexample:
            c = r.counterexample
            facets = "; ".join(f"{v} = {escape(str(f))}" for v, f in c["complexes"].items())
            console.print(f"[bold]{r.claim.name}[/bold]: minimal counterexample {facets}"
                          f" (from case {escape(c['case_id'])}, {len(c['steps'])} shrinking "
                          "steps)", highlight=False)
            for v, entry in (c.get("readable") or {}).items():
                console.print(f"    relabelled: {v} = {escape(describe_readable(entry))}",
                              highlight=False)
            smallest = _smallest_failing(result, r.claim.name)
            if smallest:
                console.print(f"    smallest failing case of the exhaustive families: "
                              f"{escape(smallest['case_id'])} ({smallest['vertices']} vertices, "
                              f"{smallest['simplices']} simplices)", highlight=False)
            sides = c["sides"]
            if len(sides) == 2 and len(sides[0]) + len(sides[1]) < 160:
                console.print(f"    {escape(sides[0])}  vs  {escape(sides[1])}", highlight=False)
            elif c.get("witness"):
                console.print(f"    differs at {escape(str(c['witness']))}", highlight=False)
        for p in r.problems:
            console.print(f"[yellow]{r.claim.name}[/yellow]: case {escape(p['case_id'])}: "
                          f"{p['outcome']}: {escape(str(p['message']))}", highlight=False)
    if options.rerun:
        console.print(f"store: {result.store}; no certificates: this run covers only the "
                      "cases evaluated again (a full run certifies a claim); wall time "
                      f"{result.seconds:.1f} s", highlight=False)
    else:
        console.print(f"store: {result.store}; certificates: {len(written)} written to "
                      f"{args.certificates}; wall time {result.seconds:.1f} s", highlight=False)
    return 0 if result.ok else 1


def _smallest_failing(result, claim: str) -> dict | None:
    """The smallest failing case of the run's exhaustive families for a claim (store read)."""
    from .run.store import Store, StoreError
    try:
        store = Store.read_only(result.store)
    except StoreError:
        return None
    try:
        return store.smallest_failing(result.run_id, claim)
    finally:
        store.close()


def _again_selection(args) -> dict:
    """The failing and unsettled cases of the run named by --again (same store)."""
    from .claims.errors import ClaimError
    from .claims.loader import load_paths
    from .run.queries import QueryError, again_cases

    if args.resume:
        raise UserError("--again starts a new run; it cannot be combined with --resume")
    if args.max_cases is not None:
        raise UserError("--again evaluates the earlier run's cases; it cannot be combined "
                        "with --max-cases")
    try:
        claims = load_paths(args.paths)
        return again_cases(args.store, args.again, claims)
    except ClaimError as error:
        raise UserError(str(error)) from None
    except QueryError as error:
        raise UserError(f"--again: {error}") from None


def _print_table(console: Console, table: Table) -> None:
    """A table with every column whatever the output: a terminal keeps its width, a file
    or a pipe gets the width the table needs (nothing dropped or cut)."""
    if console.is_terminal:
        console.print(table)
        return
    from rich.measure import Measurement
    saved = console.width
    console.width = max(saved, Measurement.get(
        console, console.options.update_width(10_000), table).maximum)
    try:
        console.print(table)
    finally:
        console.width = saved


def _bounds(text: str) -> tuple:
    """'LOW:HIGH', 'LOW:' or ':HIGH' or 'N' -> (low, high), None for a missing end."""
    pieces = text.split(":") if ":" in text else [text, text]
    if len(pieces) != 2 or not all(re.fullmatch(r"[0-9]{0,12}", p.strip()) for p in pieces) \
            or not any(p.strip() for p in pieces):
        raise argparse.ArgumentTypeError(f"expected N, LOW:HIGH, LOW: or :HIGH with whole "
                                         f"numbers, got {text[:40]!r}")
    low, high = (int(p) if p.strip() else None for p in pieces)
    if low is not None and high is not None and low > high:
        raise argparse.ArgumentTypeError(f"LOW must not exceed HIGH, got {text[:40]!r}")
    return low, high


def _values_text(row: dict) -> str:
    if row["outcome"] in UNSETTLED or (not row["sides"] and row.get("message")):
        return row.get("message") or ""
    return "  vs  ".join(str(x) for x in row["sides"])


def _sizes_text(sizes: dict | None, which: int) -> str:
    if not sizes:
        return "-"
    if len(sizes) == 1:
        return str(next(iter(sizes.values()))[which])
    return ", ".join(f"{v}: {pair[which]}" for v, pair in sizes.items())


def cmd_cases(args, console: Console) -> int:
    import csv
    import io
    from .run.queries import QueryError, cases

    try:
        run_id, rows = cases(args.store, args.run, args.claim, args.outcome, args.family,
                             args.vertices, args.simplices)
    except QueryError as error:
        raise UserError(str(error)) from None
    shown = rows if args.limit is None else rows[:args.limit]
    if args.output == "json":
        print(json.dumps({"run": run_id, "cases": len(rows), "shown": [
            {k: r[k] for k in ("claim", "case_id", "family", "outcome", "evidence", "sizes",
                               "sides", "message", "seconds", "complex_hash")}
            for r in shown]}, indent=1))
        return 0
    if args.output == "csv":
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\n")
        writer.writerow(["claim", "case", "family", "outcome", "vertices", "simplices",
                         "values", "seconds"])
        for r in shown:
            writer.writerow([r["claim"], r["case_id"], r["family"], r["outcome"],
                             _sizes_text(r["sizes"], 0), _sizes_text(r["sizes"], 1),
                             _values_text(r), f"{r['seconds']:.4f}"])
        sys.stdout.write(buffer.getvalue())
        return 0
    table = Table(title=f"run {run_id}: {len(rows)} cases"
                        + (f" (the first {len(shown)} shown; --limit)" if len(shown) < len(rows)
                           else ""), title_justify="left", box=box.SIMPLE_HEAD, padding=(0, 1))
    for column in ("claim", "case", "outcome"):
        table.add_column(column, no_wrap=True)
    table.add_column("vertices", justify="right", no_wrap=True)
    table.add_column("simplices", justify="right", no_wrap=True)
    table.add_column("values")
    for r in shown:
        table.add_row(escape(r["claim"]), escape(r["case_id"]), r["outcome"],
                      _sizes_text(r["sizes"], 0), _sizes_text(r["sizes"], 1),
                      escape(_values_text(r)))
    _print_table(console, table)
    from .run.queries import sharded_claims
    for name, total in sharded_claims(args.store, run_id, args.claim).items():
        console.print(f"{escape(name)} ranges over a family planned in shards: of its "
                      f"{total:,} cases only the notable ones (not holding, or with certified "
                      "values) are kept one by one; `verifier summary` counts them all")
    return 0


def cmd_runs(args, console: Console) -> int:
    from .run.queries import QueryError, runs

    try:
        found = runs(args.store)
    except QueryError as error:
        raise UserError(str(error)) from None
    if args.output == "json":
        print(json.dumps(found, indent=1))
        return 0
    if not found:
        console.print(f"{escape(args.store)}: no run yet", highlight=False)
        return 0
    table = Table(title=f"{len(found)} runs in {args.store} (newest first)", title_justify="left",
                  box=box.SIMPLE_HEAD, padding=(0, 1), show_lines=False)
    table.add_column("run", no_wrap=True)
    table.add_column("started", no_wrap=True)
    table.add_column("claims: verdicts")
    table.add_column("command")
    for r in found:
        verdicts = "\n".join(f"{name}: {c['verdict']} ({c['cases']} cases)"
                             + ("" if c["ok"] else " NOT OK") for name, c in r["claims"].items())
        status = "" if r["finished"] else "\n(unfinished)"
        command = r["command"] or "(not recorded)"
        if r["again_of"]:
            command += f"\n(again: cases of {r['again_of']})"
        table.add_row(r["run_id"], (r["started"] or "") + status, escape(verdicts),
                      escape(command))
    _print_table(console, table)
    return 0


def cmd_diff(args, console: Console) -> int:
    from .run.queries import QueryError, compare

    try:
        result = compare(args.store, args.first, args.second)
    except QueryError as error:
        raise UserError(str(error)) from None
    if args.output == "json":
        print(json.dumps(result, indent=1))
        return 1 if result["changed"] else 0
    say = lambda text: console.print(escape(text), highlight=False, soft_wrap=True)  # noqa: E731
    say(f"from run {result['first']} to run {result['second']}:")
    for name, e in result["claims"].items():
        before, after = e["verdict"]
        if not e["changed"]:
            say(f"  {name}: unchanged ({after}, {e['cases'][1]} cases, same digest)")
            continue
        if before is None or after is None:
            say(f"  {name}: only in run {result['second'] if before is None else result['first']}"
                f" ({after or before})")
            continue
        say(f"  {name}: verdict {before} -> {after}" if before != after
            else f"  {name}: verdict {after} in both")
        for key, words in (("fails_appeared", "now fail"), ("fails_disappeared", "no longer fail"),
                           ("unsettled_appeared", "now unsettled"),
                           ("unsettled_disappeared", "no longer unsettled")):
            ids = e[key]
            if ids:
                more = f", ... ({len(ids)} in all)" if len(ids) > 5 else ""
                say(f"    {len(ids)} cases {words}: {', '.join(ids[:5])}{more}")
        if e["digest"][0] != e["digest"][1]:
            say(f"    digest differs: {e['digest'][0][:16]} -> {e['digest'][1][:16]} "
                f"({e['cases'][0]} -> {e['cases'][1]} cases)")
    say(f"{len(result['changed'])} of {len(result['claims'])} claims changed")
    return 1 if result["changed"] else 0


def cmd_check(args, console: Console) -> int:
    from .certificates import CertificateError, _load, check_all, data_files, oversized

    paths = args.certificates
    if not paths:
        raise UserError("check: name at least one certificate file")
    folder = args.data_folder
    if folder is not None and not os.path.isdir(folder):
        raise UserError(f"--data-folder {folder!r}: no such folder")
    claims = None
    if args.claims:                # the shared claim files: loaded first, as `run` loads them
        from .claims.errors import ClaimError
        from .claims.loader import load_paths
        try:
            claims = load_paths(args.claims)
        except ClaimError as error:
            raise UserError(str(error)) from None
    for path in paths:             # every file is readable before any is checked
        try:
            data = _load(Path(path))
        except CertificateError as error:
            raise UserError(str(error)) from None
        if (problem := oversized(data)):
            raise UserError(f"{path}: refused before re-checking: {problem}")
        named = data_files(data)
        if named and folder is None:
            raise UserError(f"{path}: its families read data files ({', '.join(named[:3])}); "
                            "name the folder that holds them with --data-folder DIR (no path "
                            "a certificate names is opened)")
    everything = True
    outcomes = check_all(paths, sample=args.sample, seed=args.seed, data_folder=folder,
                         claims=claims)
    for path, outcome in zip(paths, outcomes):
        mark = "[green]verified[/green]" if outcome.verified else "[red]NOT verified[/red]"
        console.print(f"{mark}  {escape(str(path))}  {outcome.kind} {escape(outcome.claim)}: "
                      f"{escape(outcome.reason)}", highlight=False, soft_wrap=True)
        if outcome.verified or outcome.different_claim:
            for line in outcome.details:
                console.print(f"    {escape(line)}", highlight=False, soft_wrap=True)
        everything &= outcome.verified
    return 0 if everything else 1


def cmd_search(args, console: Console) -> int:
    import hashlib
    from types import SimpleNamespace

    from .certificates import write_certificates
    from .claims.errors import ClaimError
    from .claims.loader import load_paths
    from .run.runner import ClaimResult
    from .run.search import search

    paths = list(args.paths)
    if len(paths) == 1 and not Path(paths[0]).exists() and Path("claims").is_dir():
        args.claim = args.claim or paths[0]       # a claim's name: look in ./claims
        paths = ["claims"]
    try:
        claims = load_paths(paths)
    except ClaimError as error:
        raise UserError(str(error)) from None
    if args.claim:
        claims = [c for c in claims if c.name == args.claim]
        if not claims:
            where = ("./claims (a claim's name is looked up there only; give the claim "
                     "file's path instead)" if paths == ["claims"] else ", ".join(paths))
            raise UserError(f"search: no claim named '{args.claim}' in {where}")
    if len(claims) != 1:
        raise UserError("search: the files hold several claims; choose one with --claim NAME "
                        f"({', '.join(c.name for c in claims)})")
    claim = claims[0]
    from .run.runner import OptionError, check_output_folder
    try:
        check_output_folder(args.certificates, "--certificates")
    except OptionError as error:
        raise UserError(str(error)) from None
    console.print(f"searching for a counterexample to [bold]{claim.name}[/bold] "
                  f"({args.seconds:g} s, seed {args.seed}) ...", highlight=False)
    found = search(claim, seconds=args.seconds, seed=args.seed, max_vertices=args.max_vertices,
                   max_dim=args.max_dim)
    if found is None:
        console.print("no counterexample found (evidence, not proof)")
        return 0 if claim.expect == "holds" else 1
    facets = {v: K.facet_labels() for v, K in found.minimal.items()}
    console.print(f"counterexample after {found.examples} examples "
                  f"({found.seconds:.1f} s): {escape(str(facets))}", highlight=False)
    record = {"case_id": f"search/seed-{args.seed}", "family": "search",
              "original": {v: K.facet_labels() for v, K in found.original.items()},
              "original_sides": found.original_sides, "complexes": facets, "sides": found.sides,
              "witness": found.witness, "evidence": found.evidence, "steps": found.steps,
              "evaluations": found.evaluations, "minimal": found.minimal_shown}
    digest = hashlib.sha256(json.dumps(facets, sort_keys=True, default=str).encode()).hexdigest()
    # the certificate certifies one case: the complex the search found, shrunk by our moves
    from .run.store import OUTCOMES
    outcomes = dict({o: 0 for o in OUTCOMES}, fails=1)
    result = ClaimResult(claim, outcomes, 1, digest, found.seconds,
                         claim.expect == "fails", "fails", record)
    run = SimpleNamespace(claims=[result], engine="search", workers=1,
                          run_id=f"search-seed-{args.seed}")
    (path,) = write_certificates(run, args.certificates)
    console.print(f"certificate: {path}", highlight=False)
    return 0 if claim.expect == "fails" else 1


def _measure_text(K: Complex, p) -> str:
    """A probability measure on the simplices, as mathematicians write it: a point mass
    ``p = δ[2, 3]``, otherwise ``p = 1/2 δ[1] + 1/2 δ[2]``."""
    names = [list(K.label_of(s)) for s in K.simplices]
    atoms = [(names[i], x) for i, x in enumerate(p) if x]
    if len(atoms) == 1:
        return f"p = δ{atoms[0][0]}"
    return "p = " + " + ".join(f"{x} δ{name}" for name, x in atoms)


def cmd_summary(args, console: Console) -> int:
    from .run.store import Store, StoreError

    if not Path(args.store).exists():
        raise UserError(f"{args.store}: no such store (run `verifier run` first)")
    start = time.perf_counter()
    try:
        store = Store.read_only(args.store)      # a summary never writes to the store
    except StoreError as error:
        raise UserError(str(error)) from None
    try:
        run_id = args.run or store.latest_run()
        if run_id is None:
            raise UserError(f"{args.store}: the store holds no run")
        request = store.run_request(run_id)
        if not request:
            raise UserError(f"{args.store}: no run {run_id!r}")
        table_data = store.summary(run_id)
        finished = dict((r[0], r[2]) for r in store.runs()).get(run_id)
    finally:
        store.close()
    table = Table(title=f"run {run_id}{'' if finished else ' (unfinished: --resume finishes it)'}",
                  title_justify="left", box=box.SIMPLE_HEAD, padding=(0, 1))
    table.add_column("claim", no_wrap=True)
    for column in ("cases", "holds", "fails", "outside", "other", "s"):
        table.add_column(column, justify="right", no_wrap=True)
    for claim in request.get("claims", []):
        entry = table_data.get(claim["name"], {"counts": {}, "cases": 0, "seconds": 0.0})
        counts = entry["counts"]
        other = sum(counts.get(o, 0) for o in UNSETTLED)
        name = claim["name"] + ("*" if claim.get("expect") == "fails" else "")
        table.add_row(name, str(entry["cases"]),
                      str(counts.get("holds", 0)), str(counts.get("fails", 0)),
                      str(counts.get("outside", 0)), str(other), f"{entry['seconds']:.0f}")
    _print_table(console, table)
    if any(c.get("expect") == "fails" for c in request.get("claims", [])):
        console.print("[dim]* expected to fail[/dim]")
    console.print(f"[dim]{escape(args.store)}, read in {time.perf_counter() - start:.2f} s[/dim]")
    return 0


def cmd_report(args, console: Console) -> int:
    from .report import ReportError, write_latex, write_report

    if not Path(args.store).is_file():
        raise UserError(f"{args.store}: no such store (run `verifier run` first)")
    runs = [r for given in (args.run or []) for r in given.split(",") if r]
    if runs and args.every_claim:
        raise UserError("report: --run and --every-claim choose the scope in two ways; "
                        "give one")
    scope = dict(run_id=runs[0] if len(runs) == 1 else None,
                 runs=runs if len(runs) > 1 else None, every_claim=args.every_claim)
    try:
        written = write_report(args.store, args.out, certificates_dir=args.certificates,
                               **scope)
        if args.latex:
            written.append(write_latex(args.store, args.latex,
                                       certificates_dir=args.certificates, **scope))
        if args.latex_fragment:
            written.append(write_latex(args.store, args.latex_fragment, fragment=True,
                                       certificates_dir=args.certificates, **scope))
    except ReportError as error:
        raise UserError(f"report: {error}") from None
    for path in written:
        console.print(f"wrote {escape(str(path))}", highlight=False, soft_wrap=True)
    return 0


def _temperatures(text: str) -> list[float]:
    """'A:B:N' -> N temperatures from A down to B (A, B > 0, N >= 2)."""
    try:
        a, b, n = text.split(":")
        a, b, n = float(a), float(b), int(n)
    except ValueError:
        raise UserError(f"--temperatures: expected A:B:N (e.g. 2:0.05:40), got {text!r}") from None
    if not (math.isfinite(a) and math.isfinite(b) and a > 0 and b > 0
            and 2 <= n <= MAX_TEMPERATURES):
        raise UserError(f"--temperatures: need finite A > 0, B > 0 and 2 <= N <= "
                        f"{MAX_TEMPERATURES}, got {text!r}")
    high, low = max(a, b), min(a, b)
    return [high + (low - high) * i / (n - 1) for i in range(n)]


def cmd_energy(args, console: Console) -> int:
    from . import energy
    from .invariants import green

    name, K = load_complex(args.complex)
    temperatures = _temperatures(args.temperatures)
    if len(K.simplices) > 400:
        raise UserError(f"energy: {name} has {len(K.simplices)} simplices; the explorer "
                        "handles at most 400")
    V = green(K)
    out = Path(args.out)
    stem = out / f"energy-{Path(name).stem}"
    try:
        branches = energy.sweep(V, temperatures, seed=args.seed)
        diagram = energy.bifurcation_diagram(branches, f"{stem}.{args.format}",
                                             title=f"{name}: F_T on the probability simplex")
        table = energy.branches_csv(branches, f"{stem}.csv")
    except energy.EnergyError as error:
        raise UserError(f"energy: {error}") from None
    console.print(f"[bold]{escape(name)}[/bold]: free energy F_T(p) = U(p) - T S(p), U from the "
                  f"Green function ({len(K.simplices)} simplices)", highlight=False)
    critical = energy.uniform_is_critical(V)
    console.print(f"  uniform measure critical for every T: {'yes' if critical else 'no'} "
                  "[dim](exact, from the row sums of g)[/dim]", highlight=False)
    if len(K.simplices) <= 12:
        zero = energy.minimisers_at_zero_temperature(V)
        shown = "; ".join(_measure_text(K, p) for p in zero.minimisers)
        count = len(zero.minimisers)
        console.print(f"  T = 0: minimum of U = {zero.value}, attained by {count} probability "
                      f"measure{'s' if count != 1 else ''}: {escape(shown)} "
                      "[dim](exact, over all faces of the simplex)[/dim]", highlight=False)
    for b in energy.bifurcations(branches):
        console.print(f"  bifurcation near T = {b.T:.4g} ({escape(b.what)}: {escape(b.detail)}) "
                      "[dim](floating point)[/dim]", highlight=False)
    console.print(f"diagram: {escape(str(diagram))}; branches: {escape(str(table))} "
                  "[dim](floating point)[/dim]", highlight=False, soft_wrap=True)
    return 0


def cmd_discover(args, console: Console) -> int:
    """`verifier discover relations FILE` / `verifier discover hypotheses CLAIMFILE`."""
    from .discover.values import DiscoveryError
    from .discover import workflow
    from .families import FamilyError, make_family
    from .run.runner import OptionError
    from .run.store import StoreError

    try:
        further = []
        if args.test_further:
            from .discover.files import parse_family_option
            further = [parse_family_option(text, make_family)[0] for text in args.test_further]
        if args.what == "relations":
            report = workflow.relations_from_file(
                args.path, out=args.out, store=args.store, degree=args.degree,
                further=further, test_further=args.test or bool(further), workers=args.workers)
            lines = workflow.relations_lines(report)
            ok = all(o["ok"] for o in report.further_outcomes.values())
        else:
            report = workflow.hypotheses_for(
                args.path, args.claim, store=args.store, out=args.out,
                keep_where=args.keep_where, further=further, workers=args.workers)
            lines = workflow.hypotheses_lines(report)
            ok = True
    except DiscoveryError as error:
        raise UserError(str(error)) from None
    except (OptionError, StoreError, FamilyError) as error:
        raise UserError(str(error)) from None
    for line in lines:
        console.print(escape(line), highlight=False, soft_wrap=True)
    return 0 if ok else 1


def cmd_functions(args, console: Console) -> int:
    from .claims.functions import QUANTIFIERS, TABLE
    console.print("[bold]Functions of the claim language[/bold] (exact; sources beside each)\n")
    for f in TABLE:
        console.print(f"[bold cyan]{escape(f.signature())}[/bold cyan]")
        console.print(f"    {escape(f.summary)}", highlight=False)
        console.print(f"    [dim]source: {escape(f.source)}[/dim]", highlight=False)
    console.print("\n[bold]Quantifiers[/bold] (take a generator)\n")
    for name, meaning in QUANTIFIERS.items():
        console.print(f"[bold cyan]{name}[/bold cyan](... for x in ... if ...)")
        console.print(f"    {escape(meaning)}", highlight=False)
    return 0


def cmd_families(args, console: Console) -> int:
    from .families import describe
    console.print("[bold]Families[/bold] (use in " + escape("[[claim.over]]") +
                  " tables: family = \"name\", then the parameters)\n")
    for family in describe():
        console.print(f"[bold cyan]{escape(family['name'])}[/bold cyan]: "
                      f"{escape(family['description'])}", highlight=False)
        if family.get("reference"):
            console.print(f"  [dim]source: {escape(family['reference'])}[/dim]", highlight=False)
        for p in family["parameters"]:
            need = "required" if p.get("required") else f"default {p.get('default')!r}"
            valid = f"; {p['valid']}" if p.get("valid") else ""
            console.print(f"  [bold]{escape(p['name'])}[/bold] ({escape(need)}): "
                          f"{escape(str(p.get('type', '')))}{escape(valid)}", highlight=False)
            console.print(f"      {escape(str(p.get('meaning', '')))}", highlight=False)
        console.print()
    return 0


class _OptionMistake(Exception):
    """A command line argparse cannot read (printed as one line, exit code 2)."""


class _Parser(argparse.ArgumentParser):
    """argparse, with its errors as one line instead of a usage block."""

    def error(self, message):
        raise _OptionMistake(f"{self.prog}: {message} (see {self.prog} --help)")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(
        prog="verifier",
        description="Exact tests of identities about finite simplicial complexes.")
    parser.add_argument("--version", action="version", version=f"verifier {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")
    show = commands.add_parser("show", help="print exact invariants of complexes")
    show.add_argument("complexes", nargs="*", metavar="COMPLEX",
                      help="catalog name or facet file (.txt/.json)")
    show.add_argument("--list", action="store_true", help="list the catalog names")
    show.add_argument("--png", metavar="FILE", default=None,
                      help="also draw the complex into FILE (.png or .svg)")
    show.add_argument("--max-simplices", type=_count(1, SHOW_SIMPLICES_CEILING), default=None,
                      metavar="N", help="refuse a file whose complex has more than N "
                      "simplices (default 1,000,000; at most 10,000,000)")
    show.set_defaults(handler=cmd_show)

    run = commands.add_parser("run", help="test claims over their families")
    run.add_argument("paths", nargs="+", metavar="PATH", help="claim files or folders")
    run.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    run.add_argument("--certificates", default="reports/certificates",
                     help="folder for the certificates")
    run.add_argument("--workers", type=_integer, default=None,
                     help="worker processes (default: one per core; at most 4 per core)")
    run.add_argument("--engine", choices=["processes", "dask", "inline"], default="processes",
                     help="local worker processes (default), a Dask cluster, or in-process")
    run.add_argument("--scheduler", metavar="ADDRESS", default=None,
                     help="with --engine dask: a running scheduler (tcp://HOST:PORT); "
                          "without it a local cluster is started")
    run.add_argument("--resume", action="store_true",
                     help="finish the interrupted run of the same claims in the store")
    run.add_argument("--max-cases", type=_integer, default=None,
                     help="at most this many cases per claim")
    run.add_argument("--case-timeout", type=_real, default=60.0,
                     help="seconds allowed for one case (default 60; 0 < seconds <= one week)")
    run.add_argument("--data-folder", action="append", metavar="DIR", default=None,
                     help="also let `file` families read data files inside DIR (by default "
                          "only inside each claim file's folder); may be repeated")
    run.add_argument("--case-memory", type=_integer, default=None, metavar="MB",
                     help="memory one case may use on a worker, in megabytes (default: 3/4 "
                          "of the machine's memory shared by the workers and the client)")
    run.add_argument("--quiet", action="store_true", help="no progress bar")
    run.add_argument("--again", metavar="RUN", default=None,
                     help="evaluate again only the failing and unsettled cases of the earlier "
                          "run RUN of the same store (a new run; no certificates)")
    run.set_defaults(handler=cmd_run)

    listing = commands.add_parser("cases", help="the cases of a run, filtered")
    listing.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    listing.add_argument("--run", default=None, help="run id or its beginning (default: "
                         "the latest run)")
    listing.add_argument("--claim", default=None, help="only this claim's cases")
    listing.add_argument("--outcome", action="append", default=None, metavar="OUTCOME",
                         help="only cases with this outcome: holds, fails, outside, error, "
                              "limit, weak, undecided, unsettled (the last four) or again "
                              "(fails and unsettled); may be repeated")
    listing.add_argument("--family", default=None, help="only cases from this family")
    listing.add_argument("--vertices", type=_bounds, default=None, metavar="LOW:HIGH",
                         help="only cases whose largest complex has this many vertices "
                              "(N, LOW:HIGH, LOW: or :HIGH)")
    listing.add_argument("--simplices", type=_bounds, default=None, metavar="LOW:HIGH",
                         help="the same for the number of simplices")
    listing.add_argument("--as", dest="output", choices=["table", "csv", "json"],
                         default="table", help="output format (default table)")
    listing.add_argument("--limit", type=_count(1, 10**9), default=None, metavar="N",
                         help="show at most N cases")
    listing.set_defaults(handler=cmd_cases)

    history = commands.add_parser("runs", help="the runs in a store")
    history.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    history.add_argument("--as", dest="output", choices=["table", "json"], default="table",
                         help="output format (default table)")
    history.set_defaults(handler=cmd_runs)

    versus = commands.add_parser("diff", help="what changed between two runs")
    versus.add_argument("first", metavar="RUN_A", help="the earlier run (id or its beginning)")
    versus.add_argument("second", metavar="RUN_B", help="the later run")
    versus.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    versus.add_argument("--as", dest="output", choices=["text", "json"], default="text",
                        help="output format (default text)")
    versus.set_defaults(handler=cmd_diff)

    check = commands.add_parser("check", help="re-verify certificates independently")
    check.add_argument("certificates", nargs="*", metavar="CERT")
    check.add_argument("--sample", type=_count(1, 10**9), default=None,
                       help="re-evaluate a seeded sample of N cases of a pass certificate")
    check.add_argument("--seed", type=_seed, default=0, help="seed of the sample")
    check.add_argument("--data-folder", metavar="DIR", default=None,
                       help="the folder holding the data files of `file` families, looked "
                            "up by name and checked against their recorded SHA-256")
    check.add_argument("--claims", nargs="+", metavar="FILE", default=None,
                       help="claim files (or folders) the certificates' claims must be found "
                            "in, unchanged: a consistent rewrite is reported as a different "
                            "claim")
    check.set_defaults(handler=cmd_check)

    hunt = commands.add_parser("search", help="hunt a counterexample with random generation")
    hunt.add_argument("paths", nargs="+", metavar="PATH_OR_NAME",
                      help="claim file(s), or the name of a claim in ./claims")
    hunt.add_argument("--claim", help="the claim's name when a file holds several")
    hunt.add_argument("--seconds", type=_seconds, default=60.0,
                      help="time budget (default 60; 0 < seconds <= one week)")
    hunt.add_argument("--seed", type=_seed, default=0, help="seed of the random generation")
    hunt.add_argument("--max-vertices", type=_count(1, 30), default=8,
                      help="vertices of a generated complex (1 to 30, default 8)")
    hunt.add_argument("--max-dim", type=_count(0, 10), default=3,
                      help="dimension of a generated complex (0 to 10, default 3)")
    hunt.add_argument("--certificates", default="reports/certificates",
                      help="folder for the counterexample certificate")
    hunt.set_defaults(handler=cmd_search)

    summary = commands.add_parser("summary", help="summarise a run from the store")
    summary.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    summary.add_argument("--run", default=None, help="run id (default: the latest run)")
    summary.set_defaults(handler=cmd_summary)

    report = commands.add_parser("report", help="write a run's report (Markdown, HTML, LaTeX)")
    report.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    report.add_argument("--out", default="reports", metavar="DIR",
                        help="folder for report.md, report.html and the pictures "
                             "(default: reports)")
    report.add_argument("--run", default=None, action="append", metavar="RUN",
                        help="run id (default: the latest run); repeat it, or separate ids "
                             "with commas, for one report of several runs")
    report.add_argument("--every-claim", action="store_true",
                        help="report the latest verdict of every claim in the store (each "
                             "from the latest run that evaluated it)")
    report.add_argument("--latex", default=None, metavar="FILE",
                        help="also write a LaTeX document of the results to FILE")
    report.add_argument("--latex-fragment", default=None, metavar="FILE",
                        help="also write the results as a LaTeX fragment to \\input into a "
                             "paper (its preamble loads tikz, longtable and array)")
    report.add_argument("--certificates", default="reports/certificates", metavar="DIR",
                        help="folder holding the run's certificates")
    report.set_defaults(handler=cmd_report)

    explore = commands.add_parser("energy", help="explore the free energy of a complex")
    explore.add_argument("complex", metavar="COMPLEX", help="catalog name or facet file")
    explore.add_argument("--temperatures", default="2:0.05:40", metavar="A:B:N",
                         help="N temperatures from A down to B (default 2:0.05:40)")
    explore.add_argument("--out", default="reports", help="folder for the diagram and CSV")
    explore.add_argument("--format", choices=["png", "svg"], default="png")
    explore.add_argument("--seed", type=_seed, default=0, help="seed of the random starts")
    explore.set_defaults(handler=cmd_energy)

    find = commands.add_parser("discover", help="propose relations among invariants, or the "
                               "hypotheses under which a failing claim holds")
    find.add_argument("what", choices=["relations", "hypotheses"],
                      help="relations: from a discovery file; hypotheses: for a claim file")
    find.add_argument("path", metavar="FILE", help="discovery file (relations) or claim file "
                      "(hypotheses)")
    find.add_argument("--claim", default=None, help="hypotheses: the claim's name when the "
                      "file holds several")
    find.add_argument("--degree", type=_count(1, 2), default=None,
                      help="relations: 1 (linear) or 2 (products of pairs too)")
    find.add_argument("--test", action="store_true", help="relations: run the proposed "
                      "claims on the file's [[discovery.further]] families")
    find.add_argument("--test-further", action="append", metavar="FAMILY", default=None,
                      help="run the proposals on this family too, a TOML inline table such as "
                      "'{ family = \"all-complexes\", max_vertices = 6 }' (may be repeated)")
    find.add_argument("--keep-where", action="store_true", help="hypotheses: keep the "
                      "claim's own 'where' (by default a hypothesis replaces it)")
    find.add_argument("--out", default="reports/discovered", metavar="DIR",
                      help="folder for the proposed claim files (default reports/discovered)")
    find.add_argument("--store", default="reports/verifier.sqlite", help="SQLite store")
    find.add_argument("--workers", type=_count(1, 64), default=None,
                      help="worker processes (default: 2 for large families)")
    find.set_defaults(handler=cmd_discover)

    functions = commands.add_parser("functions", help="list the claim language's functions")
    functions.set_defaults(handler=cmd_functions)
    families = commands.add_parser("families", help="list the families and their parameters")
    families.set_defaults(handler=cmd_families)
    return parser


SHOW_SIMPLICES_CEILING = 10_000_000     # the most --max-simplices may allow
MAX_SEED = 2**63 - 1
MAX_TEMPERATURES = 10_000


def _integer(text: str) -> int:
    """An integer as typed (ranges are checked where the option is used)."""
    if not re.fullmatch(r"[+-]?[0-9]{1,30}", text.strip()):
        raise argparse.ArgumentTypeError(f"expected an integer, got {text[:40]!r}")
    return int(text)


def _real(text: str) -> float:
    """A number as typed, 'nan' and 'inf' included (ranges are checked where used)."""
    try:
        return float(text) if len(text) <= 40 else float("nan")
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a number, got {text[:40]!r}") from None


def _count(low: int, high: int):
    """An argparse type: an integer with low <= value <= high."""
    def parse(text: str) -> int:
        value = _integer(text)
        if not low <= value <= high:
            raise argparse.ArgumentTypeError(f"expected an integer from {low:,} to {high:,}, "
                                             f"got {value}")
        return value
    return parse


def _seed(text: str) -> int:
    return _count(0, MAX_SEED)(text)


def _seconds(text: str) -> float:
    from .run.runner import MAX_CASE_SECONDS
    value = _real(text)
    if not (math.isfinite(value) and 0 < value <= MAX_CASE_SECONDS):
        raise argparse.ArgumentTypeError(f"expected a number of seconds with 0 < seconds <= "
                                         f"{MAX_CASE_SECONDS:.0f}, got {text[:40]!r}")
    return value


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except _OptionMistake as error:
        Console(stderr=True, emoji=False).print(f"[red]error:[/red] {escape(str(error))}",
                                                highlight=False, soft_wrap=True)
        return 2
    if not getattr(args, "handler", None):
        parser.print_help()
        return 2
    console = Console(emoji=False)
    args.argv = list(sys.argv[1:] if argv is None else argv)
    try:
        return args.handler(args, console)
    except UserError as error:
        Console(stderr=True, emoji=False).print(f"[red]error:[/red] {escape(str(error))}",
                                   highlight=False, soft_wrap=True)
        return 2
    except KeyboardInterrupt:
        Console(stderr=True, emoji=False).print("interrupted")
        return 130


if __name__ == "__main__":
    sys.exit(main())

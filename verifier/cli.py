"""The ``verifier`` command.

    verifier show COMPLEX [COMPLEX ...]     exact invariants of catalog names or facet files

A COMPLEX is a catalog name (``verifier show --list`` prints them) or a path to a facet
file (text: one facet per line; ``.json``: a list of facets).  Exit codes: 0 success,
2 bad input (named in one line on standard error, no traceback).
"""

from __future__ import annotations

import argparse
import sys
import time
from fractions import Fraction
from pathlib import Path

from rich.console import Console
from rich.markup import escape
from rich.table import Table

from . import __version__
from .complex import Complex, ComplexError

__all__ = ["main", "load_complex", "UserError"]


class UserError(Exception):
    """A mistake in what the user asked for; printed as one line, exit code 2."""


def load_complex(spec: str) -> tuple[str, Complex]:
    """A complex from a catalog name or a facet file, with a display name."""
    from .families import catalog

    path = Path(spec)
    if path.suffix or path.exists() or "/" in spec:
        if not path.exists():
            raise UserError(f"{spec}: no such file (and not a catalog name)")
        try:
            return path.name, Complex.from_file(path)
        except ComplexError as error:
            raise UserError(str(error)) from None
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
        table = Table(title="catalog", show_lines=False)
        table.add_column("name", no_wrap=True)
        table.add_column("title")
        table.add_column("source")
        for name in catalog.names():
            e = catalog.entry(name)
            table.add_row(name, e.get("title", ""), e.get("source", "")[:70])
        for pattern in catalog.patterns():
            table.add_row(pattern, "(family of constructions)", "")
        console.print(table)
        return 0
    if not args.complexes:
        raise UserError("show: name at least one complex (catalog name or facet file), "
                        "or use --list")
    loaded = [load_complex(spec) for spec in args.complexes]  # all inputs first
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
    return 0


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="verifier",
        description="Exact tests of identities about finite simplicial complexes.")
    parser.add_argument("--version", action="version", version=f"verifier {__version__}")
    commands = parser.add_subparsers(dest="command", metavar="COMMAND")
    show = commands.add_parser("show", help="print exact invariants of complexes")
    show.add_argument("complexes", nargs="*", metavar="COMPLEX",
                      help="catalog name or facet file (.txt/.json)")
    show.add_argument("--list", action="store_true", help="list the catalog names")
    show.set_defaults(handler=cmd_show)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "handler", None):
        parser.print_help()
        return 2
    console = Console()
    try:
        return args.handler(args, console)
    except UserError as error:
        Console(stderr=True).print(f"[red]error:[/red] {escape(str(error))}",
                                   highlight=False, soft_wrap=True)
        return 2
    except KeyboardInterrupt:
        Console(stderr=True).print("interrupted")
        return 130


if __name__ == "__main__":
    sys.exit(main())

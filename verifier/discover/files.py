"""Discovery files in, claim files out.

A discovery file (TOML) names the family and the expressions::

    [discovery]
    name        = "surfaces"                 # [a-z0-9-], names the claim files written
    title       = "Counting faces of closed surfaces"     # optional
    degree      = 1                          # optional: 1, or 2 for products of pairs
    expressions = [
      { name = "f0", value = "f_vector(K)[0]" },   # a display name and a claim expression
      "euler(K)",                                   # or the expression alone
    ]

      [[discovery.over]]                     # the cases: a union of families, as in claims
      family = "catalog"
      names  = ["torus-7", "projective-plane-6"]

      [[discovery.further]]                  # optional: where the proposals are tested next
      family = "refine"
      of     = { family = "catalog", names = ["torus-7"] }

Every mistake is one :class:`~verifier.discover.values.DiscoveryError` naming
file:line:column.  Claim files are written by :func:`claim_file_text` (one ``[[claim]]``
each, ready for ``verifier run``).
"""

from __future__ import annotations

import difflib
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from ..claims.errors import Place
from .values import DiscoveryError, Expression

__all__ = ["DiscoveryFile", "load_discovery", "family_from_table", "parse_family_option",
           "claim_file_text", "toml_value", "NAME"]

NAME = re.compile(r"^[a-z0-9][a-z0-9-]{0,79}$")
DISPLAY = re.compile(r"^[A-Za-z_][A-Za-z0-9_]{0,39}$")
TOP_KEYS = ("discovery",)
KEYS = ("name", "title", "degree", "expressions", "over", "further")
MAX_BYTES = 1_000_000
MAX_EXPRESSIONS = 64


@dataclass
class DiscoveryFile:
    name: str
    title: str
    degree: int
    expressions: list[Expression]
    over: list[dict]                       # family tables as written (no '_base')
    further: list[dict] = field(default_factory=list)
    families: list = field(default_factory=list)          # built Family objects
    further_families: list = field(default_factory=list)
    path: str = "<discovery>"


def _closest(name: str, valid) -> str:
    close = difflib.get_close_matches(name, list(valid), n=1, cutoff=0.6)
    return f"; did you mean '{close[0]}'?" if close else ""


class _Locator:
    """Line and column of keys and string literals in a TOML text (first occurrence)."""

    def __init__(self, text: str, file: str):
        self.lines = text.splitlines()
        self.file = file

    def key(self, key: str, after: int = 0) -> Place:
        pattern = re.compile(rf"^\s*{re.escape(key)}\s*=|^\s*\[\[?\s*discovery\.{re.escape(key)}\s*\]")
        for number, line in enumerate(self.lines[after:], after + 1):
            found = pattern.search(line)
            if found:
                return Place(self.file, number, len(line) - len(line.lstrip()) + 1)
        return Place(self.file, 1, 1)

    def literal(self, text: str) -> Place:
        """The place of the first character inside the quotes of a string literal."""
        for quote in ('"', "'"):
            needle = quote + text + quote
            for number, line in enumerate(self.lines, 1):
                column = line.find(needle)
                if column >= 0:
                    return Place(self.file, number, column + 2)
        return Place(self.file, 1, 1)

    def table(self, key: str, index: int) -> Place:
        header = re.compile(rf"^\s*\[\[\s*discovery\.{re.escape(key)}\s*\]\]")
        seen = -1
        for number, line in enumerate(self.lines, 1):
            if header.search(line):
                seen += 1
                if seen == index:
                    return Place(self.file, number, len(line) - len(line.lstrip()) + 1)
        return self.key(key)


def family_from_table(table, make_family, base: str | None = None, place: Place | None = None):
    """A family from a table as written in a claim's ``[[claim.over]]``; errors become
    :class:`DiscoveryError` at ``place``."""
    if not isinstance(table, dict):
        raise DiscoveryError(f"a family must be a table such as {{ family = \"catalog\" }}, "
                             f"got {str(table)[:40]!r}", place)
    if "family" not in table:
        raise DiscoveryError("family table is missing 'family'", place)
    bind = table.get("bind", "K")
    if bind != "K":
        raise DiscoveryError(f"a discovery has one variable, K; got bind = {bind!r}", place)
    hidden = [k for k in table if isinstance(k, str) and k.startswith("_")]
    if hidden:
        raise DiscoveryError(f"unknown key '{hidden[0]}' (keys starting with '_' are reserved)",
                             place)
    spec = {k: v for k, v in table.items() if k != "bind"}
    if base is not None:
        spec["_base"] = base
    try:
        return make_family(spec)
    except (ValueError, KeyError, TypeError) as error:
        message = str(error.args[0]) if error.args else str(error)
        raise DiscoveryError(message, place) from None


def parse_family_option(text: str, make_family):
    """A family named on the command line as a TOML inline table, e.g.
    ``{ family = "all-complexes", max_vertices = 6 }``; returns (table, family)."""
    try:
        table = tomllib.loads("family_table = " + text.strip())["family_table"]
    except tomllib.TOMLDecodeError as error:
        raise DiscoveryError(f"not a TOML inline table ({error}); write e.g. "
                             "'{ family = \"all-complexes\", max_vertices = 6 }'",
                             Place("--test-further")) from None
    return table, family_from_table(table, make_family, place=Place("--test-further"))


def load_discovery(path: str | Path, make_family=None) -> DiscoveryFile:
    """Read and check a discovery file; raise DiscoveryError at file:line:column."""
    from ..claims.expression import parse  # noqa: F401 - the language is checked below
    from ..userfiles import UnreadableFile, read_text
    from .values import parse_expressions
    if make_family is None:
        from ..families import make_family
    path = Path(path)
    file = str(path)
    try:
        text = read_text(path, "discovery file", MAX_BYTES)
    except UnreadableFile as error:
        raise DiscoveryError(str(error)) from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        message = str(error)
        found = re.search(r"\(at line (\d+), column (\d+)\)", message)
        place = Place(file, int(found.group(1)), int(found.group(2))) if found else Place(file)
        raise DiscoveryError("invalid TOML: " + re.sub(r"\s*\(at line.*\)$", "", message),
                             place) from None
    locate = _Locator(text, file)
    for key in data:
        if key not in TOP_KEYS:
            raise DiscoveryError(f"unknown top-level key '{key}'; a discovery file holds one "
                                 "[discovery] table", locate.key(key))
    table = data.get("discovery")
    if not isinstance(table, dict):
        raise DiscoveryError("no [discovery] table in the file", Place(file, 1, 1))
    for key in table:
        if key not in KEYS:
            raise DiscoveryError(f"unknown key '{key}' in [discovery]{_closest(key, KEYS)}",
                                 locate.key(key))
    name = table.get("name")
    if not isinstance(name, str) or not NAME.match(name):
        raise DiscoveryError("[discovery] needs name = \"...\" made of a-z, 0-9 and '-' "
                             f"(at most 80 characters), got {name!r}",
                             locate.key("name") if "name" in table else Place(file, 1, 1))
    title = table.get("title", name)
    if not isinstance(title, str):
        raise DiscoveryError("title must be a string", locate.key("title"))
    degree = table.get("degree", 1)
    if degree not in (1, 2) or isinstance(degree, bool):
        raise DiscoveryError(f"degree must be 1 or 2, got {degree!r}", locate.key("degree"))
    raw = table.get("expressions")
    if not isinstance(raw, list) or not raw:
        raise DiscoveryError("[discovery] needs expressions = [\"euler(K)\", ...] (a non-empty "
                             "list)", locate.key("expressions") if "expressions" in table
                             else Place(file, 1, 1))
    if len(raw) > MAX_EXPRESSIONS:
        raise DiscoveryError(f"{len(raw)} expressions; at most {MAX_EXPRESSIONS} are allowed",
                             locate.key("expressions"))
    expressions, names = [], set()
    for item in raw:
        if isinstance(item, str):
            value, shown = item, item
        elif isinstance(item, dict):
            extra = [k for k in item if k not in ("name", "value")]
            value, shown = item.get("value"), item.get("name")
            where = locate.literal(value) if isinstance(value, str) else locate.key("expressions")
            if extra:
                raise DiscoveryError(f"unknown key '{extra[0]}' in an expression; use "
                                     "{ name = \"f1\", value = \"...\" }", where)
            if not isinstance(value, str):
                raise DiscoveryError("an expression table needs value = \"...\" (a claim "
                                     "expression)", where)
            if not isinstance(shown, str) or not DISPLAY.match(shown):
                raise DiscoveryError(f"an expression's name must be a short identifier such "
                                     f"as f1 or chi, got {shown!r}", locate.literal(shown)
                                     if isinstance(shown, str) else where)
        else:
            raise DiscoveryError(f"each expression is a string or {{ name = ..., value = ... }}"
                                 f", got {item!r}", locate.key("expressions"))
        if shown in names:
            raise DiscoveryError(f"the name '{shown}' is used twice", locate.literal(shown))
        names.add(shown)
        expressions.append(Expression(value, shown, locate.literal(value)))
    parse_expressions(expressions)
    tables = {}
    for key, required in (("over", True), ("further", False)):
        entries = table.get(key, [])
        if isinstance(entries, dict):
            entries = [entries]
        if required and not entries:
            raise DiscoveryError("[discovery] needs at least one [[discovery.over]] family",
                                 Place(file, 1, 1))
        if not isinstance(entries, list):
            raise DiscoveryError(f"'{key}' must be a list of family tables", locate.key(key))
        tables[key] = entries
    base = str(path.parent)
    families = [family_from_table(t, make_family, base, locate.table("over", i))
                for i, t in enumerate(tables["over"])]
    further = [family_from_table(t, make_family, base, locate.table("further", i))
               for i, t in enumerate(tables["further"])]
    return DiscoveryFile(name, title, degree, expressions, tables["over"], tables["further"],
                         families, further, file)


# ----------------------------------------------------------------- writing TOML
def toml_value(value) -> str:
    """A TOML literal for a string, number, boolean, list or table (inline).

    >>> toml_value({"family": "catalog", "names": ["torus-7"], "times": 2})
    '{ family = "catalog", names = ["torus-7"], times = 2 }'
    """
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(value)
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        items = [f"{_key(k)} = {toml_value(v)}" for k, v in value.items()
                 if not str(k).startswith("_")]
        return "{ " + ", ".join(items) + " }" if items else "{}"
    raise TypeError(f"cannot write {type(value).__name__} as TOML")


def _key(key: str) -> str:
    return key if re.fullmatch(r"[A-Za-z0-9_-]+", key) else toml_value(key)


def claim_file_text(name: str, title: str, statement: str, over: list[dict], source: str,
                    where: str | None = None, comment: str = "") -> str:
    """One claim file (expect = "holds"), ready for ``verifier run``."""
    lines = [f"# {line}" for line in comment.splitlines()] if comment else []
    lines += ["[[claim]]", f"name      = {toml_value(name)}", f"title     = {toml_value(title)}",
              f"statement = {toml_value(statement)}"]
    if where:
        lines.append(f"where     = {toml_value(where)}")
    lines += ['expect    = "holds"', f"source    = {toml_value(source)}"]
    for table in over:
        lines.append("")
        lines.append("  [[claim.over]]")
        for key, value in table.items():
            if not str(key).startswith("_") and key != "bind":
                lines.append(f"  {_key(key)} = {toml_value(value)}")
    return "\n".join(lines) + "\n"

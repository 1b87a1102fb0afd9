"""Claim files: TOML with one or more ``[[claim]]`` tables (SPEC §3).

A claim names an identity (``statement``), an optional precondition (``where``), what
is expected of it (``expect = "holds"`` or ``"fails"``), the evidence required, its
source, and the families it is tested over (``[[claim.over]]``; several entries with
the same ``bind`` variable are a union; different variables are a product, capped by
``max_cases``).  Every error names the file, line and column and, for a misspelt name,
the closest valid one.  Nothing runs until every claim of a request loads.
"""

from __future__ import annotations

import difflib
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from ..userfiles import UnreadableFile, read_text
from .errors import ClaimError, ClaimFileError, ExpressionError, Place
from .expression import Node, in_file, parse

__all__ = ["Claim", "FamilyRef", "load_file", "load_text", "load_paths", "CLAIM_KEYS", "EVIDENCE_LEVELS"]

CLAIM_KEYS = ("name", "title", "statement", "where", "expect", "evidence", "source", "over",
              "max_cases", "notes")
EVIDENCE_LEVELS = ("exact", "certified", "probabilistic", "float")
NAME = re.compile(r"^[a-z0-9][a-z0-9-]*$")
MAX_NAME_LENGTH = 80            # a claim's name also names its certificate file
MAX_FILE_BYTES = 1_000_000
MAX_TOML_NESTING = 40           # arrays and inline tables inside one another


@dataclass
class FamilyRef:
    """One ``[[claim.over]]`` entry: the family's spec, its variable, where it stands."""
    spec: dict
    bind: str
    place: Place
    family: object = None             # the Family object (verifier.families)


@dataclass
class Claim:
    name: str
    title: str
    statement_text: str
    statement: Node
    where_text: str | None
    where: Node | None
    expect: str
    evidence: str
    source: str
    over: list[FamilyRef]
    max_cases: int | None
    file: str
    place: Place
    notes: str = ""
    variables: list[str] = field(default_factory=list)

    def to_json(self) -> dict:
        """The claim as data (for certificates and the store)."""
        return {"name": self.name, "title": self.title, "statement": self.statement_text,
                "where": self.where_text, "expect": self.expect, "evidence": self.evidence,
                "source": self.source, "max_cases": self.max_cases,
                "over": [dict(ref.family.spec() if ref.family is not None else ref.spec,
                              bind=ref.bind) for ref in self.over]}


# --------------------------------------------------------------- positions
class _Positions:
    """Where each key of each [[claim]] / [[claim.over]] table stands in the text.

    tomllib gives values without positions, so the text is scanned for table headers and
    ``key = value`` lines (enough for the shapes claim files take; a key not found falls
    back to the table header's line)."""

    HEADER = re.compile(r"^\s*\[\[\s*claim(\.over)?\s*\]\]")
    KEY = re.compile(r"^\s*([A-Za-z0-9_-]+)\s*=\s*")

    def __init__(self, text: str, file: str):
        self.file = file
        self.claims: list[dict] = []      # per claim: {"": header, key: (line, col)}
        self.overs: list[list[dict]] = []
        current = None
        for number, line in enumerate(text.splitlines(), start=1):
            header = self.HEADER.match(line)
            if header:
                if header.group(1):
                    if not self.overs:
                        continue
                    current = {"": (number, 1)}
                    self.overs[-1].append(current)
                else:
                    current = {"": (number, 1)}
                    self.claims.append(current)
                    self.overs.append([])
                continue
            if line.lstrip().startswith("["):
                current = None
                continue
            key = self.KEY.match(line)
            if key and current is not None and key.group(1) not in current:
                current[key.group(1)] = (number, key.end() + 1)
                current["key:" + key.group(1)] = (number, key.start(1) + 1)

    def place(self, claim: int, key: str | None = None, over: int | None = None) -> Place:
        table = None
        if claim < len(self.claims):
            table = self.claims[claim] if over is None else (
                self.overs[claim][over] if over < len(self.overs[claim]) else None)
        if table is None:
            return Place(self.file)
        line, column = table.get(key, table[""]) if key else table[""]
        return Place(self.file, line, column)

    def expression_place(self, claim: int, key: str, text: str) -> Place:
        """Where the first character of an expression string stands."""
        place = self.place(claim, key)
        if place.line is None:
            return place
        raw = self._line(place.line)
        start = (place.column or 1) - 1
        if raw[start:start + 3] in ('"""', "'''"):
            return Place(place.file, place.line + 1, 1) if raw[start + 3:].strip() == "" \
                else Place(place.file, place.line, place.column + 3)
        if raw[start:start + 1] in ('"', "'"):
            return Place(place.file, place.line, place.column + 1)
        return place

    def _line(self, number: int) -> str:
        return self._lines[number - 1] if number - 1 < len(self._lines) else ""


def _shown(value) -> str:
    text = repr(value)
    return text if len(text) <= 40 else text[:37] + "..."


def _hidden_key(table, depth: int = 0) -> str | None:
    """The first key starting with '_' in a family table or the tables nested in it."""
    if depth > MAX_TOML_NESTING:
        return None
    for key, value in table.items():
        if isinstance(key, str) and key.startswith("_"):
            return key
        values = value if isinstance(value, list) else [value]
        for inner in values:
            if isinstance(inner, dict) and (found := _hidden_key(inner, depth + 1)):
                return found
    return None


def _closest(name: str, valid) -> str:
    close = difflib.get_close_matches(name, list(valid), n=1, cutoff=0.6)
    return f"; did you mean '{close[0]}'?" if close else ""


# ------------------------------------------------------------------ loading
def _read(path: Path) -> str:
    """A claim file's text: a regular file (never a FIFO, device or folder, which would
    block or never end), UTF-8, at most MAX_FILE_BYTES."""
    try:
        return read_text(path, "claim file", MAX_FILE_BYTES)
    except UnreadableFile as error:
        message = str(error)
        prefix = f"{path}: "
        raise ClaimFileError(message[len(prefix):] if message.startswith(prefix) else message,
                             Place(str(path))) from None


def _nesting(text: str, file: str) -> None:
    """Refuse arrays and inline tables nested deeper than MAX_TOML_NESTING, at the place
    where the limit is passed (the TOML reader would otherwise exhaust Python's stack)."""
    depth, line, column, i, n = 0, 1, 0, 0, len(text)
    while i < n:
        c = text[i]
        column += 1
        if c == "\n":
            line, column = line + 1, 0
        elif c == "#":
            end = text.find("\n", i)
            i = n if end < 0 else end
            continue
        elif c in "\"'":
            triple = text.startswith(c * 3, i)
            quote = c * 3 if triple else c
            j = i + len(quote)
            while j < n:
                if c == '"' and text[j] == "\\":
                    j += 2
                    continue
                if text.startswith(quote, j) or (not triple and text[j] == "\n"):
                    break
                j += 1
            j = min(n, j + len(quote))
            skipped = text[i:j]
            if "\n" in skipped:
                line += skipped.count("\n")
                column = len(skipped) - skipped.rfind("\n") - 1
            else:
                column += len(skipped) - 1
            i = j
            continue
        elif c in "[{":
            depth += 1
            if depth > MAX_TOML_NESTING:
                raise ClaimFileError(f"arrays or tables nested more than {MAX_TOML_NESTING} "
                                     "deep", Place(file, line, column))
        elif c in "]}":
            depth = max(0, depth - 1)
        i += 1


def load_file(path: str | Path, make_family=None) -> list[Claim]:
    """Load every claim of one file; raise ClaimError at the first problem.

    ``make_family`` builds a family object from a ``[[claim.over]]`` table (default:
    :func:`verifier.families.make_family`); its errors are located at the table.
    """
    path = Path(path)
    return load_text(_read(path), path, make_family)


def load_text(text: str, path: str | Path, make_family=None) -> list[Claim]:
    """Load the claims of a claim file's text; ``path`` names it in errors and is the base
    of relative paths in its families (workers of a cluster load claims this way)."""
    path = Path(path)
    file = str(path)
    _nesting(text, file)
    try:
        data = tomllib.loads(text)
    except RecursionError:
        raise ClaimFileError("arrays or tables nested too deeply", Place(file)) from None
    except tomllib.TOMLDecodeError as error:
        message = str(error)
        found = re.search(r"\(at line (\d+), column (\d+)\)", message)
        place = Place(file, int(found.group(1)), int(found.group(2))) if found else Place(file)
        raise ClaimFileError("invalid TOML: " + re.sub(r"\s*\(at line.*\)$", "", message),
                             place) from None
    positions = _Positions(text, file)
    positions._lines = text.splitlines()
    unknown = [k for k in data if k != "claim"]
    if unknown:
        raise ClaimFileError(f"unknown top-level key '{unknown[0]}'; a claim file holds "
                             "[[claim]] tables", Place(file, 1, 1))
    tables = data.get("claim")
    if not isinstance(tables, list) or not tables:
        raise ClaimFileError("no [[claim]] table in the file", Place(file, 1, 1))
    if make_family is None:
        from ..families import make_family
    return [_claim(i, table, positions, path, make_family) for i, table in enumerate(tables)]


def _text(table, key, i, positions, required=True, default=None) -> str | None:
    if key not in table:
        if required:
            raise ClaimFileError(f"claim is missing '{key}'", positions.place(i))
        return default
    value = table[key]
    if not isinstance(value, str):
        raise ClaimFileError(f"'{key}' must be a string, got {type(value).__name__}",
                             positions.place(i, key))
    return value


def _claim(i: int, table: dict, positions: _Positions, path: Path, make_family) -> Claim:
    for key in table:
        if key not in CLAIM_KEYS:
            raise ClaimFileError(f"unknown key '{key}' in [[claim]]{_closest(key, CLAIM_KEYS)}",
                                 positions.place(i, "key:" + key))
    name = _text(table, "name", i, positions)
    if len(name) > MAX_NAME_LENGTH:
        raise ClaimFileError(f"claim name '{name[:20]}...' has {len(name)} characters; at most "
                             f"{MAX_NAME_LENGTH} are allowed (it also names the certificate "
                             "file)", positions.place(i, "name"))
    if not NAME.match(name):
        raise ClaimFileError(f"claim name '{name}' must use only a-z, 0-9 and '-'",
                             positions.place(i, "name"))
    expect = _text(table, "expect", i, positions, required=False, default="holds")
    if expect not in ("holds", "fails"):
        raise ClaimFileError(f"expect must be \"holds\" or \"fails\", got \"{expect}\"",
                             positions.place(i, "expect"))
    evidence = _text(table, "evidence", i, positions, required=False, default="exact")
    if evidence not in EVIDENCE_LEVELS:
        raise ClaimFileError(f"evidence must be one of {', '.join(EVIDENCE_LEVELS)}, got "
                             f"\"{evidence}\"{_closest(evidence, EVIDENCE_LEVELS)}",
                             positions.place(i, "evidence"))
    max_cases = table.get("max_cases")
    if max_cases is not None and (not isinstance(max_cases, int) or isinstance(max_cases, bool)
                                  or max_cases < 1):
        raise ClaimFileError(f"max_cases must be a positive integer, got {max_cases!r}",
                             positions.place(i, "max_cases"))
    over = table.get("over")
    if not isinstance(over, list) or not over:
        raise ClaimFileError("claim has no [[claim.over]] family to be tested over",
                             positions.place(i, "over" if "over" in table else None))
    refs = []
    for j, entry in enumerate(over):
        place = positions.place(i, over=j)
        if place.line is None:                 # written inline: over = [ ... ]
            place = positions.place(i, "over")
        if not isinstance(entry, dict):
            raise ClaimFileError("each 'over' entry must be a table such as "
                                 f"{{ family = \"catalog\" }}, got {_shown(entry)}", place)
        hidden = _hidden_key(entry)
        if hidden:
            top = next(k for k, v in entry.items() if k == hidden or _hidden_key(
                v if isinstance(v, dict) else {"": v}) == hidden)
            raise ClaimFileError(f"unknown key '{hidden}' in 'over' entry (keys starting with "
                                 "'_' are reserved for the tool)",
                                 positions.place(i, top, over=j) if place.line else place)
        bind = entry.get("bind", "K")
        if not isinstance(bind, str) or not bind.isidentifier() or bind.startswith("_"):
            raise ClaimFileError(f"bind must be a variable name, got {bind!r}", place)
        spec = {k: v for k, v in entry.items() if k != "bind"}
        spec["_base"] = str(path.parent)
        if "family" not in spec:
            raise ClaimFileError("'over' entry is missing 'family'", place)
        family_place = positions.place(i, "family", over=j)
        try:
            family = make_family(spec)
        except ClaimError as error:
            raise error.at(family_place) from None
        except (ValueError, KeyError, TypeError) as error:
            message = str(error.args[0]) if error.args else str(error)
            key = getattr(error, "key", None)    # the parameter at fault, when known
            place = family_place
            if key and isinstance(key[0], str) and key[0] in entry:
                place = positions.place(i, key[0], over=j)
            raise ClaimFileError(message, place) from None
        refs.append(FamilyRef(spec, bind, family_place, family))
    variables = list(dict.fromkeys(ref.bind for ref in refs))
    types = {v: "complex" for v in variables}
    statement_text = _text(table, "statement", i, positions)
    statement = parse(statement_text, types,
                      positions.expression_place(i, "statement", statement_text))
    if statement.type not in ("bool", "any"):
        raise ExpressionError(f"the statement must be true or false, but it gives a "
                              f"{statement.type}", positions.expression_place(i, "statement", ""))
    where_text = _text(table, "where", i, positions, required=False)
    where = None
    if where_text is not None:
        where = parse(where_text, types, positions.expression_place(i, "where", where_text))
        if where.type not in ("bool", "any"):
            raise ExpressionError(f"'where' must be true or false, but it gives a {where.type}",
                                  positions.expression_place(i, "where", ""))
    for key, text, node in (("statement", statement_text, statement),
                            ("where", where_text, where)):
        if node is not None:
            try:
                _check_evidence(node, evidence)
            except ExpressionError as error:
                error.place = in_file(error.place, positions.expression_place(i, key, text))
                raise
    return Claim(
        name=name,
        title=_text(table, "title", i, positions, required=False, default=name),
        statement_text=statement_text, statement=statement,
        where_text=where_text, where=where, expect=expect, evidence=evidence,
        source=_text(table, "source", i, positions, required=False, default="conjecture"),
        over=refs, max_cases=max_cases, file=str(path), place=positions.place(i),
        notes=_text(table, "notes", i, positions, required=False, default=""),
        variables=variables)


def _check_evidence(node, evidence: str) -> None:
    """Refuse, when the claim loads, a function whose every result is weaker than the
    evidence the claim asks for (a certified-only function in an exact claim would fail
    in every case)."""
    order = EVIDENCE_LEVELS              # strongest first
    if node.kind == "call" and node.function.always and \
            order.index(node.function.evidence) > order.index(evidence):
        raise ExpressionError(
            f"{node.function.name} gives {node.function.evidence} values, weaker than the "
            f"claim's evidence = \"{evidence}\"; write evidence = "
            f"\"{node.function.evidence}\" in the claim", node.place())
    for child in node.args:
        _check_evidence(child, evidence)
    for _variable, iterable, conditions in getattr(node, "loops", None) or ():
        for part in (iterable, *conditions):
            _check_evidence(part, evidence)


def load_paths(paths, make_family=None) -> list[Claim]:
    """Load claim files and folders (every ``*.toml`` inside, sorted); names must be unique."""
    files: list[Path] = []
    for p in paths:
        p = Path(p)
        if p.is_dir():
            files.extend(sorted(p.glob("*.toml")))
        else:
            files.append(p)
    if not files:
        raise ClaimFileError("no claim files found", Place(", ".join(str(p) for p in paths)))
    claims: list[Claim] = []
    seen: dict[str, Claim] = {}
    for f in files:
        for claim in load_file(f, make_family):
            if claim.name in seen:
                raise ClaimFileError(f"claim name '{claim.name}' is used twice (also at "
                                     f"{seen[claim.name].place})", claim.place)
            seen[claim.name] = claim
            claims.append(claim)
    return claims

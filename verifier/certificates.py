"""Certificates: writing them after a run, and checking them independently (SPEC §8).

A certificate is canonical JSON (sorted keys) with a versioned schema and, under
``"sha256"``, the SHA-256 of the canonical text of everything else.  Two kinds:

* ``pass`` -- the claim (text and hash), its families with their seeds, the number of
  cases, the outcome counts, a digest over every case's id and isomorphism hash, the
  evidence level, engine and library versions, times;
* ``counterexample`` -- the claim, the minimal complex(es) (facets), the exact value of
  each side of the statement, the witness, the original failing case and family, and how
  it was shrunk.

:func:`check` re-verifies a certificate with the independent backend
(:mod:`verifier.independent.claims`: plain Python integers and fractions, in a
subprocess that never loads python-flint): it recomputes the hash, re-evaluates counterexamples in full,
re-plans the cases of a pass certificate, recomputes its digest and re-evaluates every
case (or a seeded sample of ``sample`` cases).  Certified values (evidence ``certified``,
SPEC §6) are recorded with their enclosures and precision under ``"certified"``; the
independent backend recomputes them with another method at another precision, and each
recorded enclosure must intersect its recomputation.

Homology at scale: when a statement calls ``homology``, ``torsion`` or ``betti``, the
checking process computes, with the main backend, a discrete-Morse witness
(``verifier.invariants.homology_witness``) for every bound complex of a case with
:data:`~verifier.independent.homology.WITNESS_THRESHOLD` simplices or more, and sends it
with the case, keyed by :func:`~verifier.independent.homology.complex_key`.  The re-check
process verifies each witness before answering from it (matching, acyclicity, Morse
boundary, homology) and computes a Morse complex of its own for complexes without one.
"""

from __future__ import annotations

import hashlib
import json
import os
import platform
import random
import re
import tempfile
import time
from dataclasses import dataclass, field
from importlib import metadata
from pathlib import Path

__all__ = ["SCHEMA", "canonical", "seal", "write_certificates", "check", "check_all", "CheckResult",
           "CertificateError", "Certificate", "load"]

SCHEMA = "simplicial-verifier/certificate/1"


class CertificateError(Exception):
    """A certificate file cannot be read at all (says which and why)."""


def canonical(data: dict) -> str:
    return json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def seal(body: dict) -> dict:
    """The certificate: the body plus the SHA-256 of its canonical text."""
    body = {k: v for k, v in body.items() if k != "sha256"}
    return dict(body, sha256=hashlib.sha256(canonical(body).encode()).hexdigest())


def _versions() -> dict:
    versions = {"python": platform.python_version()}
    for package in ("simplicial-verifier", "python-flint", "sympy", "networkx", "numpy"):
        try:
            versions[package] = metadata.version(package)
        except metadata.PackageNotFoundError:
            versions[package] = "not installed"
    return versions


def _claim_block(claim) -> dict:
    data = claim.to_json()
    data["sha256"] = hashlib.sha256(canonical(data).encode()).hexdigest()
    data["file"] = Path(claim.file).name
    return data


def certificate_of(result, run) -> dict:
    """The certificate body for one claim's result of a run."""
    claim = result.claim
    body = {
        "schema": SCHEMA,
        "claim": _claim_block(claim),
        "cases": result.cases,
        "outcomes": result.counts,
        "digest": result.digest,
        "evidence": claim.evidence,
        "engine": {"name": run.engine, "workers": run.workers},
        "versions": _versions(),
        "run": run.run_id,
        "created": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
        "seconds": round(result.seconds, 3),
        "recheck": "verifier check <this file>",
    }
    if result.counterexample is not None:
        c = result.counterexample
        body.update(kind="counterexample",
                    complex={"facets": c["complexes"][claim.variables[0]]},
                    complexes={v: {"facets": f} for v, f in c["complexes"].items()},
                    values=c["sides"], witness=c["witness"],
                    original={"case_id": c["case_id"], "family": c["family"],
                              "complexes": {v: {"facets": f} for v, f in c["original"].items()},
                              "values": c["original_sides"]},
                    shrinking={"steps": c["steps"], "evaluations": c["evaluations"],
                               "minimal": c["minimal"]})
        body["evidence"] = c["evidence"]
        if c.get("certified"):
            body["certified"] = {"note": _CERTIFIED_NOTE, "values": c["certified"]}
    else:
        body["kind"] = "pass"
        if result.certified:
            body["certified"] = {"note": _CERTIFIED_NOTE, "cases": result.certified}
    if getattr(result, "shards", None) is not None:
        body["shards"] = result.shards
    elif (cap := _run_cap(claim, result.cases)) is not None:
        body["max_cases"] = cap
    return seal(body)


def _run_cap(claim, cases: int) -> int | None:
    """The cap a run put on a claim's cases beyond the claim's own ``max_cases``
    (``verifier run --max-cases``), or None: the families plan more cases than were run.
    Cases are planned in a fixed order, so the first ``cases`` of them are the ones run."""
    import itertools

    from .run.cases import plan
    if cases < 1:
        return None
    size = _planned_size(claim)
    if size is None:
        size = sum(1 for _ in itertools.islice(plan(claim, None), cases + 1))
    return cases if size > cases else None


_CERTIFIED_NOTE = ("enclosures with exact decimal ends, rounded outward, and the precision "
                   "(bits) that produced them; a re-check recomputes them by another method at "
                   "another precision and requires every pair of enclosures to intersect")


def _atomic_write(path: Path, text: str):
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temporary = tempfile.mkstemp(dir=path.parent, prefix=".tmp-", suffix=".json")
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as out:
            out.write(text)
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def write_certificates(run, folder: str | Path) -> list[Path]:
    """One certificate per claim with a settled verdict, written atomically as
    ``<folder>/<claim>.json``; claims with unsettled cases (errors, limits) get none."""
    written = []
    for result in run.claims:
        if result.verdict in ("incomplete", "undecided"):
            continue
        path = Path(folder) / f"{result.claim.name}.json"
        cert = certificate_of(result, run)
        _atomic_write(path, json.dumps(cert, sort_keys=True, indent=1, ensure_ascii=False) + "\n")
        written.append(path)
    return written


class Certificate(dict):
    """A certificate's data (a dict) that shows itself in a notebook."""

    def _repr_html_(self) -> str:
        from .report import certificate_html
        return certificate_html(self)


def load(path: str | Path) -> Certificate:
    """Read a certificate file (no checking: see :func:`check`)."""
    return Certificate(_load(Path(path)))


# ---------------------------------------------------------------------- check
@dataclass
class CheckResult:
    path: str
    verified: bool
    reason: str
    kind: str = ""
    claim: str = ""
    cases_checked: int = 0
    details: list = field(default_factory=list)   # what was certified, in words
    different_claim: bool = False    # verifies, but is not the claim of the claim files


MAX_CERTIFICATE_BYTES = 32 * 1024 * 1024


def _load(path: Path) -> dict:
    """A certificate file's data: a regular file of at most MAX_CERTIFICATE_BYTES holding a
    JSON object (hostile JSON -- deep nesting, huge numbers, lone surrogates -- refused
    by :func:`verifier.userfiles.parse_json`)."""
    from .userfiles import UnreadableFile, parse_json, read_text
    try:
        data = parse_json(read_text(path, "certificate", MAX_CERTIFICATE_BYTES), path,
                          "certificate")
    except UnreadableFile as error:
        raise CertificateError(str(error)) from None
    if not isinstance(data, dict):
        raise CertificateError(f"not a certificate: {path}: expected a JSON object")
    return data


def oversized(data: dict) -> str | None:
    """What is too large to re-check in a certificate's complexes (each complex's simplex
    count predicted from its facets, before anything is built), or None."""
    from .families.datafiles import DataFileError, count_simplices
    from .families.family import MAX_SIMPLICES
    blocks = [("complex", data.get("complex"))]
    for key, holder in (("complexes", data.get("complexes")),
                        ("original.complexes", (data.get("original") or {}).get("complexes")
                         if isinstance(data.get("original"), dict) else None)):
        if isinstance(holder, dict):
            blocks += [(f"{key}.{name}", block) for name, block in holder.items()]
    for where, block in blocks:
        facets = block.get("facets") if isinstance(block, dict) else None
        if not isinstance(facets, list):
            continue
        try:
            count_simplices([tuple(map(repr, f)) if isinstance(f, list) else ()
                             for f in facets], MAX_SIMPLICES, lambda i: f"{where}, facet {i}")
        except DataFileError as error:
            return str(error)
    return None


def data_files(data: dict) -> list[str]:
    """The paths of data files a certificate's families name (``file`` families, at any
    depth): re-checking them needs the data folder from the user."""
    found = []

    def walk(value, depth=0):
        if depth > 64:
            return
        if isinstance(value, dict):
            if value.get("family") == "file":
                found.append(str(value.get("path")))
            for inner in value.values():
                walk(inner, depth + 1)
        elif isinstance(value, list):
            for inner in value:
                walk(inner, depth + 1)
    claim = data.get("claim")
    if isinstance(claim, dict):
        walk(claim.get("over"))
    return found


# ------------------------------------------------------------ what a certificate holds
TOP_KEYS = ("schema", "kind", "claim", "cases", "outcomes", "digest", "evidence", "engine",
            "versions", "run", "created", "seconds", "recheck", "sha256")
OPTIONAL_TOP_KEYS = ("certified", "max_cases", "shards")
COUNTEREXAMPLE_KEYS = ("complex", "complexes", "values", "witness", "original", "shrinking")
CLAIM_BLOCK_KEYS = ("name", "title", "statement", "where", "expect", "evidence", "source",
                    "max_cases", "over", "sha256", "file")
PROVENANCE_NOTE = ("provenance (engine, versions, run id, times, claim file name) is recorded "
                   "as written and cannot be verified")
MAX_SHRINK_TASKS = 20_000       # re-evaluations spent on replaying a shrinking record at most
_STRENGTH = {"exact": {"exact"}, "certified": {"exact", "certified"},
             "probabilistic": {"exact", "probabilistic"},
             "float": {"exact", "certified", "probabilistic", "float"}}
_NUMBER = r"-?\d+(?:/\d+)?(?:\.\d+)?"
_INTERVAL = re.compile(rf"\[({_NUMBER}), ({_NUMBER})\]|({_NUMBER})")
_BITS = re.compile(r" @(\d+) bits")
_HEX = re.compile(r"[0-9a-f]{64}")
_CREATED = re.compile(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ")


class _Rejected(Exception):
    """A certificate is not verified: ``reason`` says why (what is wrong, where, and what
    would be valid)."""

    def __init__(self, reason: str):
        super().__init__(reason)
        self.reason = reason


def _shown(value, limit: int = 60) -> str:
    text = json.dumps(value, ensure_ascii=False)
    return text if len(text) <= limit else text[:limit] + "..."


def _whole(value) -> bool:
    return isinstance(value, int) and not isinstance(value, bool)


def _keys(obj, where: str, required, optional=()) -> dict:
    """``obj`` as an object with exactly the ``required`` keys and some ``optional`` ones."""
    if not isinstance(obj, dict):
        raise _Rejected(f"malformed: {where} must be an object, got {_shown(obj)}")
    for key in obj:
        if key not in required and key not in optional:
            valid = ", ".join(sorted(set(required) | set(optional)))
            raise _Rejected(f"malformed: unknown key '{key}' in {where} (valid keys: {valid})")
    for key in required:
        if key not in obj:
            raise _Rejected(f"malformed: {where} lacks the key '{key}'")
    return obj


def _text(obj: dict, key: str, where: str, allow_none: bool = False) -> str | None:
    value = obj.get(key)
    if value is None and allow_none:
        return None
    if not isinstance(value, str):
        raise _Rejected(f"malformed: {where}.{key} must be text, got {_shown(value)}")
    return value


def _closest(value, valid) -> str:
    import difflib
    near = difflib.get_close_matches(str(value), valid, n=1)
    return f"; did you mean '{near[0]}'?" if near else ""


def _duplicate_key(text: str) -> str | None:
    """The path and name of the first key written twice in one JSON object, or None (JSON
    readers keep only one of the two values, so a duplicate hides what was signed)."""
    marked: dict[int, str] = {}

    def hook(pairs):
        obj, seen = dict(pairs), set()
        for key, _value in pairs:
            if key in seen and not marked:
                marked[id(obj)] = key
            seen.add(key)
        return obj
    data = json.loads(text, object_pairs_hook=hook)
    if not marked:
        return None
    ((target, key),) = marked.items()

    def find(value, path):
        if id(value) == target:
            return path
        inner = value.items() if isinstance(value, dict) else (
            enumerate(value) if isinstance(value, list) else ())
        for k, v in inner:
            found = find(v, f"{path}.{k}" if isinstance(k, str) else f"{path}[{k}]")
            if found is not None:
                return found
        return None
    where = (find(data, "") or "").lstrip(".")
    return f"'{where}.{key}'" if where else f"'{key}'"


def _facets(value, where: str) -> list:
    """Facets as written in a certificate (checked to be the canonical form the tool
    writes: every label an integer, a text or a list of those)."""
    from .complex import Complex

    def label(x, depth=0):
        return _whole(x) or isinstance(x, str) or (
            isinstance(x, list) and depth < 4 and all(label(y, depth + 1) for y in x))
    block = _keys(value, where, ("facets",))
    facets = block["facets"]
    if not isinstance(facets, list) or not facets or not all(
            isinstance(f, list) and f and all(label(x) for x in f) for f in facets):
        raise _Rejected(f"malformed: {where}.facets must be a non-empty list of facets (lists of "
                        f"integer or text labels), got {_shown(facets)}")
    try:
        written = Complex.from_facets([[_tuple_labels(x) for x in f] for f in facets])
    except Exception as error:  # noqa: BLE001 - the complex's own complaint, reported
        raise _Rejected(f"malformed: {where}.facets do not form a complex: {error}") from None
    if _plain(written.facet_labels()) != facets:
        raise _Rejected(f"malformed: {where}.facets are not in the canonical form the tool "
                        f"writes ({_shown(_plain(written.facet_labels()))})")
    return facets


def _plain(value):
    """Labels and facets as JSON writes them (tuples become lists)."""
    return json.loads(json.dumps(value))


# ------------------------------------------------------------------ typed values
def _value_problem(recorded, recomputed: str, where: str, certified: bool) -> str | None:
    """Why a recorded value text does not stand for the recomputed one, or None.

    An exact value (no precision named) must be recorded exactly as recomputed; an
    enclosure (``... @N bits``) only where the claim asks for certified evidence, with the
    same form (same numbers of intervals and points), every interval ordered, and every
    interval meeting the recomputed one.
    """
    if not isinstance(recorded, str):
        return f"{where} must be a value text, got {_shown(recorded)}"
    if not _BITS.search(recomputed):
        if recorded == recomputed:
            return None
        if _BITS.search(recorded):
            return (f"{where} is the enclosure {_shown(recorded)}, but the value is exact: "
                    f"{_shown(recomputed)} (an exact value is recorded exactly)")
        return f"{where}: recorded {_shown(recorded)}, recomputed {_shown(recomputed)}"
    if not certified:
        return (f"{where} is an enclosure ({_shown(recorded)}); enclosures are allowed only in "
                "a claim with evidence = \"certified\"")

    def shape(text):
        return _INTERVAL.sub("N", _BITS.sub(" @ bits", text))
    bits = [int(b) for b in _BITS.findall(recorded)]
    if shape(recorded) != shape(recomputed) or not bits or not all(8 <= b <= 65536 for b in bits):
        return (f"{where}: recorded {_shown(recorded)} does not have the form of the "
                f"recomputed enclosure {_shown(recomputed)}")
    ours, theirs = _intervals(recorded), _intervals(recomputed)
    if any(lo > hi for lo, hi in ours):
        return f"{where}: recorded {_shown(recorded)} has an interval with lo > hi"
    if not all(a[0] <= b[1] and b[0] <= a[1] for a, b in zip(ours, theirs)):
        return f"{where}: recorded {_shown(recorded)}, recomputed {_shown(recomputed)}"
    return None


def _intervals(text: str) -> list:
    from fractions import Fraction
    out = []
    for m in _INTERVAL.finditer(_BITS.sub("", text)):
        if m.group(1) is not None:
            out.append((Fraction(m.group(1)), Fraction(m.group(2))))
        else:
            out.append((Fraction(m.group(3)),) * 2)
    return out


def _values_problem(recorded, recomputed: list, where: str, certified: bool) -> str | None:
    if not isinstance(recorded, list):
        return f"{where} must be a list of value texts, got {_shown(recorded)}"
    if len(recorded) != len(recomputed):
        return (f"{where} holds {len(recorded)} value(s), the re-evaluation gives "
                f"{len(recomputed)}: {_shown(recomputed)}")
    for i, (old, new) in enumerate(zip(recorded, recomputed)):
        if (problem := _value_problem(old, str(new), f"{where}[{i}]", certified)):
            return problem
    return None


def _certified_problem(recorded, recomputed: list, where: str, certified: bool) -> str | None:
    """Recorded certified values (``{"at", "function", "value"}``) against the recomputed
    ones, in the order met."""
    recomputed = recomputed or []
    if recorded is None:
        return (f"{where} is missing: the re-evaluation gives {len(recomputed)} certified "
                "value(s)") if recomputed else None
    if not isinstance(recorded, list):
        return f"{where} must be a list, got {_shown(recorded)}"
    if len(recorded) != len(recomputed):
        return (f"{len(recorded)} certified values recorded in {where}, "
                f"{len(recomputed)} recomputed")
    for i, (old, new) in enumerate(zip(recorded, recomputed)):
        place = f"{where}[{i}]"
        try:
            _keys(old, place, ("at", "function", "value"))
        except _Rejected as error:
            return error.reason.removeprefix("malformed: ")
        for key in ("at", "function"):
            if old[key] != new.get(key):
                return f"{place}.{key}: recorded {_shown(old[key])}, recomputed {_shown(new.get(key))}"
        if (problem := _value_problem(old["value"], str(new.get("value")), place, certified)):
            return (f"{old['function']} at {old['at']}: recorded {old['value']}, recomputed "
                    f"{new.get('value')} ({problem})")
    return None


# --------------------------------------------------------------------- the claim
class _Claim:
    """A certificate's claim, validated by the claim loader's rules: enough to re-plan its
    cases and to say what was certified."""

    def __init__(self, block: dict, data_folder=None):
        from .claims.errors import ClaimError
        from .claims.expression import parse
        from .claims.loader import EVIDENCE_LEVELS, MAX_NAME_LENGTH, NAME, FamilyRef
        from .families import make_family
        from .families.named import DataChanged
        _keys(block, "claim", CLAIM_BLOCK_KEYS)
        self.block = block
        self.name = _text(block, "name", "claim")
        if len(self.name) > MAX_NAME_LENGTH or not NAME.match(self.name):
            raise _Rejected(f"malformed: claim.name {_shown(self.name)} is not a claim name (at "
                            f"most {MAX_NAME_LENGTH} characters a-z, 0-9 and '-', starting "
                            "with a letter or digit)")
        for key in ("title", "source", "file"):
            _text(block, key, "claim")
        self.expect = _text(block, "expect", "claim")
        if self.expect not in ("holds", "fails"):
            raise _Rejected(f"malformed: claim.expect must be \"holds\" or \"fails\", got "
                            f"{_shown(self.expect)}")
        self.evidence = _text(block, "evidence", "claim")
        if self.evidence not in EVIDENCE_LEVELS:
            raise _Rejected(f"malformed: claim.evidence must be one of "
                            f"{', '.join(EVIDENCE_LEVELS)}, got {_shown(self.evidence)}"
                            f"{_closest(self.evidence, EVIDENCE_LEVELS)}")
        self.max_cases = block["max_cases"]
        if self.max_cases is not None and not (_whole(self.max_cases) and self.max_cases >= 1):
            raise _Rejected(f"malformed: claim.max_cases must be a positive integer or null, "
                            f"got {_shown(self.max_cases)}")
        over = block["over"]
        if not isinstance(over, list) or not over:
            raise _Rejected("malformed: claim.over must be a non-empty list of families")
        self.over = []
        for i, entry in enumerate(over):
            where = f"claim.over[{i}]"
            if not isinstance(entry, dict) or not isinstance(entry.get("family"), str):
                raise _Rejected(f"malformed: {where} must be a family table with 'family', got "
                                f"{_shown(entry)}")
            bind = entry.get("bind")
            if not isinstance(bind, str) or not bind.isidentifier() or bind.startswith("_") \
                    or not bind.isascii():
                raise _Rejected(f"malformed: {where}.bind must be a variable name, got "
                                f"{_shown(bind)}")
            spec = {k: v for k, v in entry.items() if k != "bind"}
            reads_files = bool(data_files({"claim": {"over": [spec]}}))
            try:
                family = make_family(_with_data_folder(spec, data_folder))
            except DataChanged as error:
                raise _Rejected(f"mismatch: {error}") from None
            except CertificateError as error:
                raise _Rejected(f"not re-checked: {error}") from None
            except (ClaimError, ValueError, KeyError, TypeError) as error:
                message = str(error.args[0]) if error.args else str(error)
                raise _Rejected(f"malformed: {where}: {message}") from None
            if not reads_files and canonical(family.spec()) != canonical(spec):
                raise _Rejected(f"malformed: {where} is not in the form the tool writes "
                                f"(expected {_shown(family.spec(), 200)})")
            self.over.append(FamilyRef(spec, bind, None, family))
        self.variables = list(dict.fromkeys(ref.bind for ref in self.over))
        types = {v: "complex" for v in self.variables}
        self.statement = _text(block, "statement", "claim")
        self.where = _text(block, "where", "claim", allow_none=True)
        for key, text in (("statement", self.statement), ("where", self.where)):
            if text is None:
                continue
            try:
                node = parse(text, types)
            except ClaimError as error:
                raise _Rejected(f"malformed: claim.{key}: {error}") from None
            if node.type not in ("bool", "any"):
                raise _Rejected(f"malformed: claim.{key} must be true or false, but it gives a "
                                f"{node.type}")

    def describe(self, cases: int, cap: int | None) -> list[str]:
        """What was certified, in words: the statement, the where, families and sizes."""
        lines = [f"statement: {self.statement}"]
        lines.append(f"where: {self.where}" if self.where is not None else "where: (none)")
        lines.append(f"expect: {self.expect}; evidence: {self.evidence}")
        for ref in self.over:
            params = ", ".join(f"{k}={_shown(v, 80)}" for k, v in ref.spec.items()
                               if k != "family" and not k.startswith("_"))
            size = ref.family.size()
            lines.append(f"over {ref.bind}: {ref.spec['family']}({params})"
                         + (f": {size:,} complexes" if size is not None else ""))
        cap = f" (the first {cap:,} planned)" if cap else ""
        lines.append(f"cases: {cases:,}{cap}")
        return lines


def _compare_with_claim_files(block: dict, claims) -> str | None:
    """None when the claim files hold this very claim; otherwise how it differs."""
    mine = {k: v for k, v in block.items() if k not in ("sha256", "file")}
    found = [c for c in claims if c.name == block.get("name")]
    if not found:
        return f"the claim files hold no claim named {_shown(block.get('name'))}"
    theirs = found[0].to_json()
    if canonical(mine) == canonical(theirs):
        return None
    for key in sorted(set(mine) | set(theirs)):
        if canonical({"v": mine.get(key)}) != canonical({"v": theirs.get(key)}):
            return (f"{key} is {_shown(mine.get(key))} in the certificate, "
                    f"{_shown(theirs.get(key))} in {found[0].file}")
    return "it differs from the claim in the claim files"


# ------------------------------------------------------------------- checking
def check(path: str | Path, sample: int | None = None, seed: int = 0,
          timeout: float | None = None, data_folder: str | Path | None = None,
          claims=None) -> CheckResult:
    """Re-verify one certificate; never raises for a bad certificate, says why instead.
    See :func:`check_all`."""
    return check_all([path], sample, seed, timeout, data_folder, claims)[0]


def check_all(paths, sample: int | None = None, seed: int = 0, timeout: float | None = None,
              data_folder: str | Path | None = None, claims=None) -> list[CheckResult]:
    """Re-verify certificates, re-evaluating all their cases in one batch of the
    independent backend; one :class:`CheckResult` per path, in order.

    What is re-derived: the content and claim hashes; every key (unknown, missing and
    duplicate keys are refused); the claim by the claim loader's rules (name, expect,
    evidence, max_cases, statement and ``where`` type-checked, families rebuilt in the form
    the tool writes); the cases re-planned (with the recorded cap) and their digest; the
    outcome counts, recounted from a re-evaluation of every case (not with ``sample``);
    the evidence level against the claim and the re-evaluation; values by type (exact
    texts equal, enclosures only in certified claims and meeting the recomputed ones); for
    a counterexample the original case rebuilt from its family and id (it must be the
    first failing case and fail), the shrinking record replayed with the shrinker's own
    moves (each step the first failing move, the evaluations counted) and minimality (no
    move of the shrinker from the counterexample fails), the witness and the values.

    ``claims`` (loaded :class:`~verifier.claims.loader.Claim` objects) confirms that each
    certificate's claim is the one of the claim files; ``data_folder`` is where the data
    files of ``file`` families are looked up (by name; each must have the recorded
    SHA-256).  Provenance (versions, times, engine) cannot be verified and is said so.
    """
    from .independent.claims import RecheckError, RecheckInputError, recheck
    checks = [_Check(Path(p), sample, seed, data_folder) for p in paths]
    tasks = []
    for item in checks:
        item.first = len(tasks)
        tasks += item.tasks
    answers = []
    if tasks:
        try:
            answers = recheck(tasks, timeout=timeout)
        except (RecheckError, RecheckInputError) as error:
            for item in checks:
                if item.tasks and item.result.reason == "":
                    item.result.reason = f"could not re-check: {error}"
            return [item.result for item in checks]
    for item in checks:
        item.conclude(answers[item.first:item.first + len(item.tasks)], claims)
    return [item.result for item in checks]


class _Check:
    """One certificate on its way through :func:`check_all`: validated when made (its
    ``tasks`` for the independent backend then wait in ``tasks``), concluded from the
    answers."""

    def __init__(self, path: Path, sample, seed, data_folder):
        self.path, self.sample, self.seed = path, sample, seed
        self.result = CheckResult(str(path), False, "")
        self.tasks: list = []
        self.first = 0
        self.data = None
        try:
            self._prepare(data_folder)
        except _Rejected as error:
            self.result.reason, self.tasks = error.reason, []
        except Exception as error:  # noqa: BLE001 - reported as the reason, never a traceback
            self.result.reason = f"could not re-check: {type(error).__name__}: {error}"
            self.tasks = []

    # ---- before the re-evaluation
    def _prepare(self, data_folder):
        from .userfiles import UnreadableFile, read_text
        try:
            data = _load(self.path)
            text = read_text(self.path, "certificate", MAX_CERTIFICATE_BYTES)
        except (CertificateError, UnreadableFile) as error:
            raise _Rejected(str(error)) from None
        self.data = data
        block = data.get("claim")
        self.result.claim = block.get("name", "?") if isinstance(block, dict) and \
            isinstance(block.get("name"), str) else "?"
        self.result.kind = str(data.get("kind", ""))
        if (problem := oversized(data)):
            raise _Rejected(f"refused: {problem}")
        if data.get("schema") != SCHEMA:
            raise _Rejected(f"unknown schema {_shown(data.get('schema'))} (expected {SCHEMA!r})")
        if seal(data)["sha256"] != data.get("sha256"):
            raise _Rejected("tampered: the sha256 does not match the certificate's content")
        if (duplicate := _duplicate_key(text)):
            raise _Rejected(f"malformed: the key {duplicate} is written twice in one object "
                            "(a JSON reader keeps only one of them)")
        if not isinstance(block, dict) or any(k not in block for k in ("statement", "over",
                                                                        "sha256")):
            raise _Rejected("malformed: the claim block is incomplete")
        inner = {k: v for k, v in block.items() if k not in ("sha256", "file")}
        if hashlib.sha256(canonical(inner).encode()).hexdigest() != block["sha256"]:
            raise _Rejected("tampered: the claim's sha256 does not match its text")
        if data.get("kind") not in ("pass", "counterexample"):
            raise _Rejected(f"malformed: kind must be \"pass\" or \"counterexample\", got "
                            f"{_shown(data.get('kind'))}")
        if data_files(data) and data_folder is None:
            raise _Rejected("not re-checked: its families read data files ("
                            + ", ".join(data_files(data)[:3]) + "); name the folder that "
                            "holds them with --data-folder")
        self.claim = claim = _Claim(block, data_folder)
        announced = data.get("cases")
        if not _whole(announced) or announced < 0:
            raise _Rejected(f"malformed: 'cases' must be a whole number, got {_shown(announced)}")
        cap = data.get("max_cases")
        if cap is not None and not (_whole(cap) and cap >= 1):
            raise _Rejected(f"malformed: max_cases must be a positive integer (the cap the run "
                            f"planned its cases with), got {_shown(cap)}")
        caps = [c for c in (claim.max_cases, cap) if c is not None]
        self.cap = min(caps) if caps else None
        self.search = _found_by_search(data)
        expected = 1 if self.search else _planned_size(claim, self.cap)
        if expected is not None and expected != announced:
            raise _Rejected(f"mismatch: the certificate's families plan {expected:,} cases, "
                            f"it says {announced:,} (nothing was evaluated)")
        self.result.details = claim.describe(announced, self.cap)
        self._validate(data, claim)
        self._plan(data, claim, announced)
        if data["kind"] == "counterexample":
            self._counterexample_tasks(data, claim)

    def _validate(self, data: dict, claim: _Claim):
        """Every key known, every value of its type, the counts consistent."""
        from .claims.loader import EVIDENCE_LEVELS
        from .run.store import OUTCOMES, UNSETTLED
        kind = data["kind"]
        required = TOP_KEYS + (COUNTEREXAMPLE_KEYS if kind == "counterexample" else ())
        _keys(data, "the certificate", required, OPTIONAL_TOP_KEYS)
        outcomes = _keys(data["outcomes"], "outcomes", OUTCOMES)
        for name, count in outcomes.items():
            if not _whole(count) or count < 0:
                raise _Rejected(f"malformed: outcomes.{name} must be a whole number >= 0, got "
                                f"{_shown(count)}")
        if sum(outcomes.values()) != data["cases"]:
            raise _Rejected(f"mismatch: the outcome counts add up to {sum(outcomes.values()):,}, "
                            f"the certificate has {data['cases']:,} cases")
        unsettled = sum(outcomes[o] for o in UNSETTLED)
        if kind == "pass" and (outcomes["fails"] or unsettled):
            raise _Rejected(f"mismatch: a pass certificate records {outcomes['fails']} failing "
                            f"and {unsettled} unsettled case(s); it must record none")
        if kind == "counterexample" and not outcomes["fails"]:
            raise _Rejected("mismatch: a counterexample certificate records no failing case "
                            "(outcomes.fails is 0)")
        if not isinstance(data["digest"], str) or not _HEX.fullmatch(data["digest"]):
            raise _Rejected(f"malformed: digest must be 64 lowercase hexadecimal digits, got "
                            f"{_shown(data['digest'])}")
        evidence = data["evidence"]
        if evidence not in EVIDENCE_LEVELS:
            raise _Rejected(f"malformed: evidence must be one of {', '.join(EVIDENCE_LEVELS)}, "
                            f"got {_shown(evidence)}{_closest(evidence, EVIDENCE_LEVELS)}")
        if kind == "pass" and evidence != claim.evidence:
            raise _Rejected(f"mismatch: evidence is {_shown(evidence)}, but the claim asks for "
                            f"{_shown(claim.evidence)} (a pass certificate records the claim's "
                            "level)")
        if kind == "pass" and evidence == "float":
            raise _Rejected("mismatch: float evidence is exploration only, never a pass "
                            "certificate (SPEC §6)")
        if evidence not in _STRENGTH[claim.evidence]:
            raise _Rejected(f"mismatch: evidence {_shown(evidence)} is weaker than the claim's "
                            f"{_shown(claim.evidence)} allows")
        engine = _keys(data["engine"], "engine", ("name", "workers"))
        if not isinstance(engine["name"], str) or not _whole(engine["workers"]):
            raise _Rejected(f"malformed: engine must name the engine and its workers, got "
                            f"{_shown(engine)}")
        if not isinstance(data["versions"], dict) or not all(
                isinstance(v, str) for v in data["versions"].values()):
            raise _Rejected("malformed: versions must map package names to version texts")
        for key in ("run", "recheck"):
            _text(data, key, "the certificate")
        if not isinstance(data["created"], str) or not _CREATED.fullmatch(data["created"]):
            raise _Rejected(f"malformed: created must be a UTC time such as "
                            f"2026-01-31T12:00:00Z, got {_shown(data['created'])}")
        if isinstance(data["seconds"], bool) or not isinstance(data["seconds"], (int, float)) \
                or not data["seconds"] >= 0:
            raise _Rejected(f"malformed: seconds must be a number >= 0, got "
                            f"{_shown(data['seconds'])}")
        certified = data.get("certified")
        if certified is not None:
            if claim.evidence != "certified":
                raise _Rejected("mismatch: the certificate records certified values (enclosures), "
                                f"but the claim's evidence is {_shown(claim.evidence)}; "
                                "enclosures are allowed only where the claim is certified")
            listed = "cases" if kind == "pass" else "values"
            _keys(certified, "certified", ("note", listed))
            if certified["note"] != _CERTIFIED_NOTE:
                raise _Rejected(f"malformed: certified.note is not the tool's note "
                                f"({_shown(_CERTIFIED_NOTE)})")
            if not isinstance(certified[listed], list):
                raise _Rejected(f"malformed: certified.{listed} must be a list")
        if kind == "counterexample":
            self._validate_counterexample(data, claim)

    def _validate_counterexample(self, data: dict, claim: _Claim):
        for where, holder in (("complexes", data["complexes"]),
                              ("original.complexes", (data["original"] or {}).get("complexes")
                               if isinstance(data["original"], dict) else None)):
            if not isinstance(holder, dict) or sorted(holder) != sorted(claim.variables):
                raise _Rejected(f"malformed: {where} must give the complexes of "
                                f"{', '.join(claim.variables)}, got {_shown(holder)}")
            for variable, block in holder.items():
                _facets(block, f"{where}.{variable}")
        first = data["complexes"][claim.variables[0]]
        if _facets(data["complex"], "complex") != first["facets"]:
            raise _Rejected(f"mismatch: complex differs from complexes.{claim.variables[0]}")
        if not isinstance(data["values"], list) or not all(
                isinstance(v, str) for v in data["values"]):
            raise _Rejected(f"malformed: values must be a list of value texts, got "
                            f"{_shown(data['values'])}")
        witness = data["witness"]
        if witness is not None and not (isinstance(witness, dict) and all(
                isinstance(v, str) for v in witness.values())):
            raise _Rejected(f"malformed: witness must be null or map names to value texts, got "
                            f"{_shown(witness)}")
        original = _keys(data["original"], "original", ("case_id", "family", "complexes",
                                                         "values"))
        _text(original, "case_id", "original")
        _text(original, "family", "original")
        if not isinstance(original["values"], list):
            raise _Rejected("malformed: original.values must be a list of value texts")
        shrinking = _keys(data["shrinking"], "shrinking", ("steps", "evaluations", "minimal"))
        if not isinstance(shrinking["steps"], list) or not all(
                isinstance(s, str) for s in shrinking["steps"]):
            raise _Rejected("malformed: shrinking.steps must be a list of texts")
        if not _whole(shrinking["evaluations"]) or shrinking["evaluations"] < 0:
            raise _Rejected(f"malformed: shrinking.evaluations must be a whole number >= 0, got "
                            f"{_shown(shrinking['evaluations'])}")
        if not isinstance(shrinking["minimal"], bool):
            raise _Rejected(f"malformed: shrinking.minimal must be true or false, got "
                            f"{_shown(shrinking['minimal'])}")

    def _plan(self, data: dict, claim: _Claim, announced: int):
        """Re-plan the cases with the recorded cap, recompute the digest, and queue every
        case (or the sample) for re-evaluation."""
        import itertools

        from .run.cases import complexes_of, plan
        from .run.runner import digest_of
        if self.search:                 # one case, found beyond the families
            minimal = {v: data["complexes"][v]["facets"] for v in claim.variables}
            if _search_digest(minimal) != data["digest"]:
                raise _Rejected("mismatch: the digest is not the one of the certified "
                                "counterexample")
            self.ids, self.envs, self.chosen, self.tasks = [], {}, [], []
            self.total = 0
            return
        from .run.shards import is_sharded
        if is_sharded(claim):
            self._plan_shards(data, claim, announced)
            return
        ids = list(itertools.islice(plan(claim, self.cap), announced + 1))
        if len(ids) != announced:
            raise _Rejected(f"mismatch: {len(ids)} cases re-planned, certificate says "
                            f"{announced}")
        envs = {cid: complexes_of(claim, cid) for cid in ids}
        rows = [(cid, ",".join(envs[cid][v].content_hash for v in claim.variables))
                for cid in ids]
        if digest_of(rows) != data["digest"]:
            raise _Rejected("mismatch: the digest over the cases differs from the certified one")
        self.ids, self.envs, self.total = ids, envs, len(ids)
        sample = self.sample
        self.chosen = ids if not sample or sample >= len(ids) else sorted(
            random.Random(self.seed).sample(ids, sample))
        self.tasks = [self._task({v: envs[cid][v] for v in claim.variables})
                      for cid in self.chosen]

    def _plan_shards(self, data: dict, claim: _Claim, announced: int):
        """A sharded claim: the recorded shards must be the claim's shards in order, their
        counts and digest sums must add up to the certificate's cases and digest; then only
        the shards that hold the sampled cases (every shard without --sample) are generated
        again, each checked against its recorded count and sum, and the sampled cases are
        queued for re-evaluation."""
        from .run.shards import (MODULUS, ShardError, add_sums, line_value, shard_cases,
                                 shard_keys, sharded_digest)
        if self.cap is not None:
            raise _Rejected("malformed: max_cases on a claim over a family planned in shards "
                            "(the runner never caps such a claim)")
        try:
            keys = shard_keys(claim)
        except ShardError as error:
            raise _Rejected(f"malformed: {error}") from None
        recorded = data.get("shards")
        if not isinstance(recorded, list):
            raise _Rejected("malformed: a claim over a family planned in shards records its "
                            "shards ('shards': a list of {shard, cases, sum})")
        for i, entry in enumerate(recorded):
            _keys(entry, f"shards[{i}]", ("shard", "cases", "sum"))
            if not _whole(entry["cases"]) or entry["cases"] < 0 or not isinstance(
                    entry["sum"], str) or not _HEX.fullmatch(entry["sum"]):
                raise _Rejected(f"malformed: shards[{i}] must have a whole number of cases and "
                                f"a sum of 64 hexadecimal digits, got {_shown(entry)}")
        if [e["shard"] for e in recorded] != keys:
            raise _Rejected(f"mismatch: the certificate's shards are not the {len(keys):,} "
                            "shards of the claim's families, in order")
        if sum(e["cases"] for e in recorded) != announced:
            raise _Rejected(f"mismatch: the shards hold {sum(e['cases'] for e in recorded):,} "
                            f"cases, the certificate says {announced:,}")
        total_sum = add_sums("0" * 64, *(e["sum"] for e in recorded))
        if sharded_digest(announced, total_sum) != data["digest"]:
            raise _Rejected("mismatch: the digest is not the one of the recorded shards")
        sample = self.sample
        if sample and sample < announced:
            positions = sorted(random.Random(self.seed).sample(range(announced), sample))
        else:
            positions = None
        wanted: dict[int, set] = {}
        if positions is not None:
            starts, at = [], 0
            for entry in recorded:
                starts.append(at)
                at += entry["cases"]
            import bisect
            for position in positions:
                shard = bisect.bisect_right(starts, position) - 1
                while recorded[shard]["cases"] == 0:      # empty shards hold no position
                    shard -= 1
                wanted.setdefault(shard, set()).add(position - starts[shard])
        chosen, envs = [], {}
        for number, (key, entry) in enumerate(zip(keys, recorded)):
            if positions is not None and number not in wanted:
                continue
            count, total = 0, 0
            for index, (cid, env) in enumerate(shard_cases(claim, key)):
                hashes = ",".join(env[v].content_hash for v in claim.variables)
                total += line_value(cid, hashes)
                count += 1
                if positions is None or index in wanted[number]:
                    chosen.append(cid)
                    envs[cid] = env
            if count != entry["cases"] or f"{total % MODULUS:064x}" != entry["sum"]:
                raise _Rejected(f"mismatch: shard {key} generated again has {count:,} cases and "
                                f"another digest sum than the certificate records "
                                f"({entry['cases']:,} cases)")
        self.ids, self.envs, self.chosen, self.total = chosen, envs, chosen, announced
        self.sharded = True
        self.tasks = [self._task({v: envs[cid][v] for v in claim.variables})
                      for cid in chosen]

    def _case_env(self, case_id: str) -> dict | None:
        """The complexes of a case of the claim: from the planned cases, or (a sharded
        claim re-checked on a sample) rebuilt from the id alone; None if not a case."""
        if case_id in self.envs:
            return self.envs[case_id]
        if not getattr(self, "sharded", False):
            return None
        from .run.cases import complexes_of
        try:
            return complexes_of(self.claim, case_id)
        except (ValueError, KeyError, IndexError):
            return None

    def _task(self, env: dict) -> dict:
        """A re-check task for an environment (variable -> Complex or facet list)."""
        from .complex import Complex
        claim = self.claim
        variables = {v: (K.facet_labels() if isinstance(K, Complex) else K)
                     for v, K in env.items()}
        return _with_witnesses({"statement": claim.statement, "where": claim.where,
                                "variables": variables}, claim.block, list(env.values()))

    def _counterexample_tasks(self, data: dict, claim: _Claim):
        """The original case rebuilt from its family and id, the counterexample, and every
        move of the shrinker along the recorded steps and from the counterexample."""
        from .complex import Complex
        from .run.cases import family_label
        from .run.shrink import candidates
        original = data["original"]
        if self.search:                 # the complex the search found, as recorded
            env = {v: Complex.from_facets([[_tuple_labels(x) for x in f]
                                           for f in original["complexes"][v]["facets"]])
                   for v in claim.variables}
        elif (env := self._case_env(original["case_id"])) is None:
            raise _Rejected(f"mismatch: original.case_id {_shown(original['case_id'])} is not a "
                            "case of the claim's families")
        for v in claim.variables if not self.search else ():
            if _plain(env[v].facet_labels()) != original["complexes"][v]["facets"]:
                raise _Rejected(f"mismatch: original.complexes.{v} is not case "
                                f"{original['case_id']} of its family (rebuilt: "
                                f"{_shown(_plain(env[v].facet_labels()))})")
        if not self.search and family_label(claim, original["case_id"]) != original["family"]:
            raise _Rejected(f"mismatch: original.family is {_shown(original['family'])}, case "
                            f"{original['case_id']} belongs to "
                            f"{_shown(family_label(claim, original['case_id']))}")
        several = len(claim.variables) > 1
        rounds, current = [], dict(env)
        steps = data["shrinking"]["steps"]
        budget = MAX_SHRINK_TASKS
        for number, step in enumerate(steps + [None]):
            moves = []
            for v in claim.variables:
                for description, smaller in candidates(current[v]):
                    moves.append(((f"{v}: " if several else "") + description,
                                  dict(current, **{v: smaller})))
            budget -= len(moves)
            if budget < 0:
                raise _Rejected(f"refused: replaying the shrinking record needs more than "
                                f"{MAX_SHRINK_TASKS:,} re-evaluations")
            rounds.append(moves)
            if step is None:
                break
            chosen = [trial for description, trial in moves if description == step]
            if not chosen:
                raise _Rejected(f"mismatch: shrinking.steps[{number}] {_shown(step)} is not a "
                                "move of the shrinker on the complex reached before it")
            current = chosen[0]
        for v in claim.variables:
            final = _plain(current[v].facet_labels())
            recorded = data["complexes"][v]["facets"]
            if final != recorded:
                raise _Rejected(f"mismatch: the shrinking steps lead from the original case to "
                                f"{v} = {_shown(final)}, not to the certified {_shown(recorded)}")
        minimal = {v: Complex.from_facets([[_tuple_labels(x) for x in f]
                                           for f in data["complexes"][v]["facets"]])
                   for v in claim.variables}
        self.rounds = rounds
        self.tasks = self.tasks + [self._task(minimal), self._task(env)] + [
            self._task(trial) for moves in rounds for _d, trial in moves]

    # ---- after the re-evaluation
    def conclude(self, answers: list, claims):
        if not self.tasks:
            return
        try:
            if self.data["kind"] == "pass":
                self._conclude_pass(answers)
            else:
                self._conclude_counterexample(answers)
        except _Rejected as error:
            self.result.reason = error.reason
            return
        self.result.verified = True
        if claims is not None:
            difference = _compare_with_claim_files(self.data["claim"], claims)
            if difference is not None:
                self.result.verified = False
                self.result.different_claim = True
                self.result.reason = ("a different claim: the certificate verifies, but its "
                                      f"claim is not the one of the claim files: {difference}")
            else:
                self.result.details.append("claim: the same as in the claim files")
        else:
            self.result.details.append("claim: not compared with a claim file (--claims FILE)")
        self.result.details.append(PROVENANCE_NOTE)

    def _recount(self, answers: list) -> str:
        """Outcome counts recounted from a re-evaluation of every case; what was done."""
        from .run.store import OUTCOMES, UNSETTLED
        recorded = self.data["outcomes"]
        if len(self.chosen) != self.total:
            return "outcome counts not recounted (a sample)"
        recounted = {o: 0 for o in OUTCOMES}
        for answer in answers:
            recounted[answer.get("outcome") if answer.get("outcome") in OUTCOMES else "error"] += 1
        settled = ("holds", "fails", "outside")
        # a case the run left unsettled (a limit, an error) may be settled here
        spare = sum(recorded[o] for o in UNSETTLED)
        explained = all(recorded[o] <= recounted[o] for o in settled) and sum(
            recounted[o] - recorded[o] for o in settled) + sum(
            recounted[o] for o in UNSETTLED) == spare
        if not explained:
            shown = ", ".join(f"{o} {recounted[o]}" for o in OUTCOMES if recounted[o])
            raise _Rejected(f"mismatch: outcome counts recounted as {shown}; the certificate "
                            f"says {', '.join(f'{o} {n}' for o, n in recorded.items() if n)}")
        return "outcome counts recounted"

    def _evidence_problem(self, cid: str, answer: dict) -> str | None:
        got = answer.get("evidence")
        if got is not None and got not in _STRENGTH[self.claim.evidence]:
            return (f"case {cid} is re-evaluated with {got} evidence, more than the "
                    f"claim's {self.claim.evidence} allows")
        return None

    def _conclude_pass(self, answers: list):
        data, claim = self.data, self.claim
        certified = claim.evidence == "certified"
        entries = (data.get("certified") or {}).get("cases", [])
        recorded = {}
        for i, entry in enumerate(entries):
            where = f"certified.cases[{i}]"
            _keys(entry, where, ("case_id", "outcome", "sides", "values"))
            if self._case_env(entry["case_id"]) is None or entry["case_id"] in recorded:
                raise _Rejected(f"mismatch: {where}.case_id {_shown(entry['case_id'])} is not a "
                                "case of the certificate (or is listed twice)")
            recorded[entry["case_id"]] = entry
        for cid, answer in zip(self.chosen, answers):
            if answer.get("holds") is None and not answer.get("outside"):
                raise _Rejected(f"could not re-evaluate case {cid}: "
                                f"{answer.get('message', 'unknown error')}")
            if not (answer.get("holds") or answer.get("outside")):
                raise _Rejected(f"mismatch: the statement fails on case {cid} "
                                "(independent backend)")
            if (problem := self._evidence_problem(cid, answer)):
                raise _Rejected(f"mismatch: {problem}")
            entry = recorded.get(cid)
            if entry is None:
                if answer.get("certified") and len(recorded) < 200 and len(self.chosen) == \
                        self.total:
                    raise _Rejected(f"mismatch: the certified values of case {cid} were dropped")
                continue
            if entry["outcome"] != answer.get("outcome"):
                raise _Rejected(f"mismatch on case {cid}: certified.cases outcome "
                                f"{_shown(entry['outcome'])}, recomputed {answer.get('outcome')}")
            if (problem := _values_problem(entry["sides"], answer.get("sides") or [],
                                           f"the sides of case {cid}", certified)):
                raise _Rejected(f"mismatch on case {cid}: {problem}")
            if (problem := _certified_problem(entry["values"], answer.get("certified"),
                                              f"certified values of case {cid}", certified)):
                raise _Rejected(f"mismatch on case {cid}: {problem}")
        counted = self._recount(answers)
        scope = "every case" if len(self.chosen) == self.total else \
            f"a sample of {len(self.chosen)} cases"
        self.result.cases_checked = len(self.chosen)
        self.result.reason = (f"verified: digest recomputed, {scope} re-evaluated (independent "
                              f"backend), {counted}")

    def _conclude_counterexample(self, answers: list):
        data, claim = self.data, self.claim
        certified = claim.evidence == "certified"
        count = len(self.chosen)
        cases, (answer, first), trials = answers[:count], answers[count:count + 2], \
            answers[count + 2:]
        self.result.cases_checked = len(answers)
        if answer.get("holds") is None and not answer.get("outside"):
            raise _Rejected(f"could not re-evaluate: {answer.get('message', 'unknown error')}")
        if answer.get("outside"):
            raise _Rejected("mismatch: the counterexample is outside the claim's 'where' domain")
        if answer.get("holds"):
            raise _Rejected("mismatch: the statement holds on the certified counterexample")
        if (problem := _values_problem(data["values"], answer.get("sides") or [], "values",
                                       certified)):
            raise _Rejected(f"mismatch: {problem}")
        if canonical({"w": data["witness"]}) != canonical({"w": answer.get("witness")}):
            raise _Rejected(f"mismatch: witness is {_shown(data['witness'])}, the re-evaluation "
                            f"gives {_shown(answer.get('witness'))}")
        got = answer.get("evidence")
        if data["evidence"] != got and not (data["evidence"] == "probabilistic"
                                            and got == "exact"):
            raise _Rejected(f"mismatch: evidence is {_shown(data['evidence'])}, the "
                            f"re-evaluation gives {_shown(got)} evidence")
        recorded = (data.get("certified") or {}).get("values")
        if (problem := _certified_problem(recorded, answer.get("certified"), "certified.values",
                                          certified)):
            raise _Rejected(f"mismatch: {problem}")
        original = data["original"]
        if first.get("outcome") != "fails":
            raise _Rejected(f"mismatch: the statement does not fail on the original failing "
                            f"case {original['case_id']} (re-evaluated: {first.get('outcome')})")
        if (problem := _values_problem(original["values"], first.get("sides") or [],
                                       "original.values", certified)):
            raise _Rejected(f"mismatch: {problem}")
        if count == self.total:
            failing = sorted(cid for cid, a in zip(self.chosen, cases) if a.get("outcome") == "fails")
            if failing and failing[0] != original["case_id"]:
                raise _Rejected(f"mismatch: the first failing case is {failing[0]}, not the "
                                f"original {original['case_id']}")
        self._replay(trials)
        counted = ("found by a search beyond the families: its original complex is taken as "
                   "recorded" if self.search else self._recount(cases))
        self.result.reason = ("verified: the statement fails on the counterexample and on the "
                              "original case, the shrinking record replayed, no move of the "
                              f"shrinker from it fails, digest recomputed, {counted} "
                              "(independent backend)")

    def _replay(self, trials: list):
        """Each recorded step is the first failing move; the counterexample has none (when
        the record says it is minimal); the evaluations are the shrinker's count."""
        shrinking = self.data["shrinking"]
        steps, position, evaluations = shrinking["steps"], 0, 0
        for number, moves in enumerate(self.rounds):
            outcomes = [a.get("outcome") for a in trials[position:position + len(moves)]]
            position += len(moves)
            failing = [i for i, o in enumerate(outcomes) if o == "fails"]
            if number < len(steps):
                if not failing or moves[failing[0]][0] != steps[number]:
                    first = moves[failing[0]][0] if failing else "none"
                    raise _Rejected(f"mismatch: shrinking.steps[{number}] is "
                                    f"{_shown(steps[number])}, but the shrinker's first failing "
                                    f"move there is {_shown(first)}")
                evaluations += failing[0] + 1
            else:
                last_round = len(moves)
                if failing and shrinking["minimal"]:
                    raise _Rejected(f"mismatch: the counterexample is not minimal: after the "
                                    f"move {_shown(moves[failing[0]][0])} the statement still "
                                    "fails")
        if shrinking["minimal"] and shrinking["evaluations"] != evaluations + last_round:
            raise _Rejected(f"mismatch: shrinking.evaluations is {shrinking['evaluations']}; "
                            f"replaying the record takes {evaluations + last_round}")
        # not minimal: the shrinker's budget ran out in the last round, before its end
        if not shrinking["minimal"] and not (
                evaluations <= shrinking["evaluations"] < evaluations + last_round):
            raise _Rejected(f"mismatch: shrinking.minimal is false, but the record replays to "
                            f"the end: {evaluations + last_round} evaluations show the "
                            "counterexample minimal" if shrinking["evaluations"] == evaluations
                            + last_round else f"mismatch: shrinking.evaluations is "
                            f"{shrinking['evaluations']}; replaying the record takes "
                            f"{evaluations} to {evaluations + last_round - 1}")


def _variables(claim: dict) -> list[str]:
    return list(dict.fromkeys(entry.get("bind", "K") for entry in claim["over"]))


def _tuple_labels(value):
    """A label read from JSON as the re-check process reads it (lists become tuples)."""
    return tuple(_tuple_labels(v) for v in value) if isinstance(value, list) else value


def _witnesses(claim: dict, complexes) -> dict:
    """Homology witnesses for the large complexes of one case (complex key -> witness),
    computed by the main backend; empty unless the claim calls a homology function."""
    text = f"{claim.get('statement') or ''} {claim.get('where') or ''}"
    if not re.search(r"\b(homology|torsion|betti)\s*\(", text):
        return {}
    from .complex import Complex
    from .independent.homology import WITNESS_THRESHOLD, complex_key
    from .invariants import homology_witness
    found = {}
    for K in complexes:
        if not isinstance(K, Complex):
            K = Complex.from_facets([[_tuple_labels(v) for v in f] for f in K])
        if len(K.simplices) >= WITNESS_THRESHOLD:
            found[complex_key(K.labels, K.facets)] = homology_witness(K)
    return found


def _with_witnesses(task: dict, claim: dict, complexes) -> dict:
    witnesses = _witnesses(claim, complexes)
    return dict(task, witnesses=witnesses) if witnesses else task


def _with_data_folder(spec, folder):
    """A family spec whose ``file`` families read their recorded files from ``folder``."""
    if isinstance(spec, list):
        return [_with_data_folder(v, folder) for v in spec]
    if not isinstance(spec, dict):
        return spec
    spec = {k: _with_data_folder(v, folder) for k, v in spec.items()}
    if spec.get("family") == "file":
        if folder is None:
            raise CertificateError("its families read data files; name the folder that "
                                   "holds them with --data-folder")
        spec.update(path=".", _base=os.path.realpath(str(folder)))
    return spec


def _found_by_search(data: dict) -> bool:
    """Was the counterexample found by `verifier search` (beyond the claim's families)?"""
    engine, original = data.get("engine"), data.get("original")
    return (data.get("kind") == "counterexample" and isinstance(engine, dict)
            and engine.get("name") == "search" and isinstance(original, dict)
            and original.get("family") == "search")


def _search_digest(complexes: dict) -> str:
    """The digest of a search certificate: SHA-256 of the minimal complexes' facets."""
    return hashlib.sha256(json.dumps(complexes, sort_keys=True, default=str).encode()).hexdigest()


def _planned_size(planned, cap=None) -> int | None:
    """How many cases the families of a certificate announce, without enumerating them
    (None when a family cannot tell)."""
    sizes = {}
    for ref in planned.over:
        size = ref.family.size()
        if size is None:
            return None
        sizes[ref.bind] = sizes.get(ref.bind, 0) + size
    total = 1
    for size in sizes.values():
        total *= size
    caps = [c for c in (planned.max_cases, cap) if isinstance(c, int)]
    return min([total] + caps)

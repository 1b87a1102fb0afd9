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
import tempfile
import time
from dataclasses import dataclass
from importlib import metadata
from pathlib import Path

__all__ = ["SCHEMA", "canonical", "seal", "write_certificates", "check", "CheckResult",
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
    return seal(body)


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


def check(path: str | Path, sample: int | None = None, seed: int = 0,
          timeout: float | None = None, data_folder: str | Path | None = None) -> CheckResult:
    """Re-verify one certificate; never raises for a bad certificate, says why instead.

    ``data_folder`` is where the data files of ``file`` families are looked up (by name;
    each must have the SHA-256 the certificate records).  Without it, a certificate
    whose families read files is not re-checked: no path a certificate names is opened.
    """
    path = Path(path)
    try:
        data = _load(path)
    except CertificateError as error:
        return CheckResult(str(path), False, str(error))
    name = data.get("claim", {}).get("name", "?") if isinstance(data.get("claim"), dict) else "?"
    result = CheckResult(str(path), False, "", str(data.get("kind", "")), name)
    if (problem := oversized(data)):
        result.reason = f"refused: {problem}"
        return result
    if data.get("schema") != SCHEMA:
        result.reason = f"unknown schema {data.get('schema')!r} (expected {SCHEMA!r})"
        return result
    if seal(data)["sha256"] != data.get("sha256"):
        result.reason = "tampered: the sha256 does not match the certificate's content"
        return result
    claim = data.get("claim")
    required = ("statement", "over", "sha256")
    if not isinstance(claim, dict) or any(k not in claim for k in required):
        result.reason = "malformed: the claim block is incomplete"
        return result
    block = {k: v for k, v in claim.items() if k not in ("sha256", "file")}
    if hashlib.sha256(canonical(block).encode()).hexdigest() != claim["sha256"]:
        result.reason = "tampered: the claim's sha256 does not match its text"
        return result
    try:
        if data.get("kind") == "counterexample":
            return _check_counterexample(data, result, timeout)
        if data.get("kind") == "pass":
            if data_files(data) and data_folder is None:
                result.reason = ("not re-checked: its families read data files ("
                                 + ", ".join(data_files(data)[:3]) + "); name the folder "
                                 "that holds them with --data-folder")
                return result
            return _check_pass(data, result, sample, seed, timeout, data_folder)
    except Exception as error:  # noqa: BLE001 - reported as the reason, never a traceback
        result.reason = f"could not re-check: {type(error).__name__}: {error}"
        return result
    result.reason = f"unknown kind {data.get('kind')!r}"
    return result


def _variables(claim: dict) -> list[str]:
    return list(dict.fromkeys(entry.get("bind", "K") for entry in claim["over"]))


def _tuple_labels(value):
    """A label read from JSON as the re-check process reads it (lists become tuples)."""
    return tuple(_tuple_labels(v) for v in value) if isinstance(value, list) else value


def _witnesses(claim: dict, complexes) -> dict:
    """Homology witnesses for the large complexes of one case (complex key -> witness),
    computed by the main backend; empty unless the claim calls a homology function."""
    import re
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


def _check_counterexample(data: dict, result: CheckResult, timeout) -> CheckResult:
    from .independent.claims import recheck
    claim = data["claim"]
    complexes = data.get("complexes") or {_variables(claim)[0]: data.get("complex")}
    task = {"statement": claim["statement"], "where": claim.get("where"),
            "variables": {v: c["facets"] for v, c in complexes.items()}}
    original = data.get("original", {}).get("complexes")
    tasks = [task]
    if original:
        tasks.append(dict(task, variables={v: c["facets"] for v, c in original.items()}))
    tasks = [_with_witnesses(t, claim, list(t["variables"].values())) for t in tasks]
    answers = recheck(tasks, timeout=timeout)
    answer = answers[0]
    result.cases_checked = len(tasks)
    if answer.get("holds") is None and not answer.get("outside"):
        result.reason = f"could not re-evaluate: {answer.get('message', 'unknown error')}"
    elif answer.get("outside"):
        result.reason = "mismatch: the counterexample is outside the claim's 'where' domain"
    elif answer.get("holds"):
        result.reason = "mismatch: the statement holds on the certified counterexample"
    elif data.get("values") and not _same_values(answer.get("sides") or [], data["values"]):
        result.reason = (f"mismatch: recomputed values {answer.get('sides')} differ from the "
                         f"certified {data['values']}")
    elif (problem := _certified_mismatch(data.get("certified", {}).get("values"), answer)):
        result.reason = f"mismatch: {problem}"
    elif answer.get("outcome", "fails") != "fails":
        result.reason = f"mismatch: the independent backend says {answer.get('outcome')}"
    elif original and answers[1].get("outcome", "fails") != "fails":
        result.reason = "mismatch: the statement does not fail on the original failing case"
    else:
        result.verified = True
        result.reason = "verified: the statement fails on the counterexample (independent backend)"
    return result


def _same_values(recomputed: list, recorded: list) -> bool:
    """Exact texts must be equal; certified enclosures must intersect."""
    from .claims.enclosure import consistent
    return len(recomputed) == len(recorded) and all(
        consistent(str(a), str(b)) for a, b in zip(recomputed, recorded))


def _certified_mismatch(recorded, answer: dict) -> str | None:
    """Compare the certified values a certificate recorded with the independent ones."""
    if not recorded:
        return None
    from .claims.enclosure import consistent_values
    return consistent_values(recorded, answer.get("certified") or [])


class _Plan:
    """Just enough of a claim to re-plan its cases from a certificate."""

    def __init__(self, claim: dict, data_folder=None):
        from .claims.loader import FamilyRef
        from .families import make_family
        self.name = claim.get("name", "?")
        self.max_cases = claim.get("max_cases")
        self.over = []
        for entry in claim["over"]:
            spec = _with_data_folder({k: v for k, v in entry.items() if k != "bind"},
                                     data_folder)
            self.over.append(FamilyRef(spec, entry.get("bind", "K"), None, make_family(spec)))
        self.variables = list(dict.fromkeys(ref.bind for ref in self.over))


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


def _planned_size(planned) -> int | None:
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
    return min(total, planned.max_cases) if isinstance(planned.max_cases, int) else total


def _check_pass(data: dict, result: CheckResult, sample, seed, timeout,
                data_folder=None) -> CheckResult:
    import itertools

    from .independent.claims import recheck
    from .run.cases import complexes_of, plan
    from .run.runner import digest_of
    from .families.named import DataChanged
    claim = data["claim"]
    try:
        planned = _Plan(claim, data_folder)
    except DataChanged as error:
        result.reason = f"mismatch: {error}"
        return result
    announced = data.get("cases")
    if not isinstance(announced, int) or isinstance(announced, bool) or announced < 0:
        result.reason = f"malformed: 'cases' must be a whole number, got {announced!r}"
        return result
    expected = _planned_size(planned)
    if expected is not None and expected != announced:
        result.reason = (f"mismatch: the certificate's families plan {expected:,} cases, "
                         f"it says {announced:,} (nothing was evaluated)")
        return result
    ids = list(itertools.islice(plan(planned, None), announced + 1))
    envs = {cid: complexes_of(planned, cid) for cid in ids}
    rows = [(cid, ",".join(envs[cid][v].content_hash for v in planned.variables)) for cid in ids]
    if len(ids) != data.get("cases"):
        result.reason = f"mismatch: {len(ids)} cases re-planned, certificate says {data.get('cases')}"
        return result
    if digest_of(rows) != data.get("digest"):
        result.reason = "mismatch: the digest over the cases differs from the certified one"
        return result
    chosen = ids if not sample or sample >= len(ids) else sorted(
        random.Random(seed).sample(ids, sample))
    tasks = [_with_witnesses({"statement": claim["statement"], "where": claim.get("where"),
                              "variables": {v: envs[cid][v].facet_labels()
                                            for v in planned.variables}},
                             claim, [envs[cid][v] for v in planned.variables])
             for cid in chosen]
    answers = recheck(tasks, timeout=timeout) if tasks else []
    result.cases_checked = len(tasks)
    recorded = {entry.get("case_id"): entry.get("values")
                for entry in data.get("certified", {}).get("cases", [])}
    for cid, answer in zip(chosen, answers):
        if answer.get("holds") is None and not answer.get("outside"):
            result.reason = (f"could not re-evaluate case {cid}: "
                             f"{answer.get('message', 'unknown error')}")
            return result
        if not (answer.get("holds") or answer.get("outside")):
            result.reason = f"mismatch: the statement fails on case {cid} (independent backend)"
            return result
        if (problem := _certified_mismatch(recorded.get(cid), answer)):
            result.reason = f"mismatch on case {cid}: {problem}"
            return result
    scope = "every case" if len(chosen) == len(ids) else f"a sample of {len(chosen)} cases"
    result.verified = True
    result.reason = f"verified: digest recomputed, {scope} re-evaluated (independent backend)"
    return result

"""Certificates bind every meaning (issue 12, section 3): the reproducers and a tamper suite.

An attacker can recompute both SHA-256 values of a certificate (its content hash and its
claim's hash), so the hashes only catch careless edits; everything else must be re-derived
by ``verifier check`` with the independent backend.  Three real certificates are made
once per session from shipped claims (SPEC §8), over small families:

* a pass certificate: the energy theorem, sum of g = chi (Knill, Linear Algebra Appl. 600,
  2020), over every complex on <= 3 vertices;
* a counterexample certificate with a shrinking record: reciprocity of charpoly(L^2) in
  dimension 2 (Knill, arXiv:1803.01464), over the complexes on exactly 4 vertices -- the
  first failing case shrinks to one filled triangle;
* a certified counterexample: zeta(s) = zeta(-s) of L^2 fails on the triangle, shown by
  disjoint enclosures (same source).

The suite mutates them systematically -- character flips, dropped keys, added keys,
duplicate keys, and meaning-changing edits of every value with both hashes recomputed --
re-checks all mutations in one batch of the independent backend (with the claim files, so
that a self-consistent rewrite is reported as a different claim) and requires every
meaning-changing mutation to be rejected or reported as a different claim.  The table of
figures is printed (``pytest -s``) and kept in ``TABLE``.
"""

from __future__ import annotations

import copy
import hashlib
import json
import re
import subprocess
import sys
from collections import Counter
from pathlib import Path

import pytest

from verifier.certificates import canonical, check, check_all, seal, write_certificates
from verifier.claims.loader import load_paths
from verifier.run.runner import RunOptions, run

CLAIMS = '''
[[claim]]
name      = "energy"
title     = "Entries of the inverse connection matrix sum to the Euler characteristic"
statement = "sum(green(K)) == euler(K)"
expect    = "holds"
source    = "O. Knill, The energy of a simplicial complex, Linear Algebra Appl. 600 (2020) 96-129"

  [[claim.over]]
  family = "all-complexes"
  max_vertices = 3

[[claim]]
name      = "reciprocal-charpoly-2d"
title     = "Reciprocity of the characteristic polynomial of L^2 fails in dimension 2"
statement = "is_reciprocal(charpoly(connection(K) ** 2))"
where     = "dim(K) == 2"
expect    = "fails"
source    = "O. Knill, The hydrogen identity for Laplacians, arXiv:1803.01464 (2018)"

  [[claim.over]]
  family = "all-complexes"
  min_vertices = 4
  max_vertices = 4

[[claim]]
name      = "zeta-functional-equation-2d"
title     = "The functional equation zeta(s) = zeta(-s) of L^2 fails in dimension 2"
statement = "zeta(connection(K) ** 2, 1/2, 1) == zeta(connection(K) ** 2, -1/2, -1)"
where     = "dim(K) == 2"
expect    = "fails"
evidence  = "certified"
source    = "O. Knill, The hydrogen identity for Laplacians, arXiv:1803.01464 (2018)"

  [[claim.over]]
  family = "all-complexes"
  max_vertices = 3
'''

PROVENANCE = ("engine", "versions", "run", "created", "seconds", "recheck", "claim.file")
TABLE: dict = {}


def reseal(data: dict) -> dict:
    """What an attacker does after an edit: recompute the claim's hash the way
    verifier/certificates.py does (canonical JSON of the claim without 'sha256' and
    'file'), then the certificate's content hash."""
    data = copy.deepcopy(data)
    claim = data.get("claim")
    if isinstance(claim, dict):
        inner = {k: v for k, v in claim.items() if k not in ("sha256", "file")}
        claim["sha256"] = hashlib.sha256(canonical(inner).encode()).hexdigest()
    return seal(data)


def text_of(data: dict) -> str:
    return json.dumps(data, sort_keys=True, indent=1, ensure_ascii=False) + "\n"


@pytest.fixture(scope="session")
def made(tmp_path_factory):
    folder = tmp_path_factory.mktemp("tamper")
    claims = folder / "claims.toml"
    claims.write_text(CLAIMS)
    result = run([claims], RunOptions(store=str(folder / "s.sqlite"), engine="inline"))
    paths = write_certificates(result, folder / "certificates")
    certificates = {p.stem: json.loads(p.read_text()) for p in paths}
    assert sorted(certificates) == ["energy", "reciprocal-charpoly-2d",
                                    "zeta-functional-equation-2d"]
    assert certificates["reciprocal-charpoly-2d"]["shrinking"]["steps"], "a shrinking record"
    return folder, claims, certificates


def write(folder: Path, name: str, text: str) -> Path:
    path = folder / f"{name}.json"
    path.write_text(text)
    return path


def checked(made, name: str, change, claims: bool = False, **options):
    folder, claim_file, certificates = made
    data = copy.deepcopy(certificates[name])
    change(data)
    path = write(folder, f"edited-{name}", text_of(reseal(data)))
    return check(path, claims=load_paths([claim_file]) if claims else None, **options)


# ======================================================= the reproducers (§3)
def test_the_shipped_certificates_verify(made):
    folder, claim_file, certificates = made
    paths = [write(folder, f"good-{n}", text_of(c)) for n, c in certificates.items()]
    for outcome in check_all(paths, claims=load_paths([claim_file])):
        assert outcome.verified, outcome.reason
        assert "claim: the same as in the claim files" in outcome.details


def test_outcome_counts_are_recounted(made):
    # a pass certificate that says 3 cases failed
    def change(d):
        d["outcomes"]["fails"], d["outcomes"]["holds"] = 3, d["outcomes"]["holds"] - 3
    outcome = checked(made, "energy", change)
    assert outcome.reason == ("mismatch: a pass certificate records 3 failing and 0 unsettled "
                              "case(s); it must record none")

    def shuffle(d):          # consistent totals, wrong split: only a recount can tell
        d["outcomes"]["holds"] -= 1
        d["outcomes"]["outside"] += 1
    outcome = checked(made, "reciprocal-charpoly-2d", shuffle)
    assert outcome.reason == ("mismatch: outcome counts recounted as holds 1, fails 7, outside "
                              "12; the certificate says fails 7, outside 13")


@pytest.mark.parametrize("key, value, expected", [
    ("evidence", "bxact", "malformed: evidence must be one of exact, certified, probabilistic, "
                          "float, got \"bxact\"; did you mean 'exact'?"),
    ("evidence", "certified", "mismatch: evidence is \"certified\", but the claim asks for "
                              "\"exact\" (a pass certificate records the claim's level)"),
])
def test_evidence_is_validated(made, key, value, expected):
    assert checked(made, "energy", lambda d: d.__setitem__(key, value)).reason == expected


def test_claim_expect_evidence_name_and_cap_follow_the_loaders_rules(made):
    cases = [
        ("expect", "bxact", 'malformed: claim.expect must be "holds" or "fails", got "bxact"'),
        ("evidence", "bxact", "malformed: claim.evidence must be one of exact, certified, "
                              "probabilistic, float, got \"bxact\"; did you mean 'exact'?"),
        ("name", "Energy Theorem", 'malformed: claim.name "Energy Theorem" is not a claim name '
                                   "(at most 80 characters a-z, 0-9 and '-', starting with a "
                                   "letter or digit)"),
        ("max_cases", 0, "malformed: claim.max_cases must be a positive integer or null, got 0"),
    ]
    for key, value, expected in cases:
        outcome = checked(made, "energy", lambda d: d["claim"].__setitem__(key, value))
        assert outcome.reason == expected
    outcome = checked(made, "energy", lambda d: d.__setitem__("max_cases", 0))
    assert outcome.reason == ("malformed: max_cases must be a positive integer (the cap the run "
                              "planned its cases with), got 0")
    # a cap that plans other cases than the digest covers
    outcome = checked(made, "energy", lambda d: d["claim"].__setitem__("max_cases", 5))
    assert outcome.reason == ("mismatch: the certificate's families plan 5 cases, it says 8 "
                              "(nothing was evaluated)")


def test_witness_shrinking_and_original_are_checked(made):
    name = "reciprocal-charpoly-2d"
    edits = {
        "witness": (lambda d: d.__setitem__("witness", {"x": "[0, 1]"}),
                    'mismatch: witness is {"x": "[0, 1]"}, the re-evaluation gives null'),
        "shrinking.steps": (lambda d: d["shrinking"].__setitem__("steps", []),
                            "mismatch: the shrinking steps lead from the original case to K = "),
        "shrinking.evaluations": (lambda d: d["shrinking"].__setitem__("evaluations", 1),
                                  "mismatch: shrinking.evaluations is 1; replaying the record "),
        "shrinking.minimal": (lambda d: d["shrinking"].__setitem__("minimal", "yes"),
                              'malformed: shrinking.minimal must be true or false, got "yes"'),
        "original.case_id": (lambda d: d["original"].__setitem__("case_id", "0|all-complexes/x"),
                             'mismatch: original.case_id "0|all-complexes/x" is not a case'),
        "original.family": (lambda d: d["original"].__setitem__("family", "graphs"),
                            'mismatch: original.family is "graphs", case '),
        "original.values": (lambda d: d["original"].__setitem__("values", ["true"]),
                            'mismatch: original.values[0]: recorded "true", recomputed "false"'),
        "original.complexes": (
            lambda d: d["original"]["complexes"]["K"].__setitem__("facets", [[0, 1, 2]]),
            "mismatch: original.complexes.K is not case "),
    }
    for key, (change, expected) in edits.items():
        outcome = checked(made, name, change)
        assert outcome.reason.startswith(expected), (key, outcome.reason)


def test_a_counterexamples_cases_digest_and_families_are_checked(made):
    name = "reciprocal-charpoly-2d"
    outcome = checked(made, name, lambda d: d.__setitem__("cases", d["cases"] + 1))
    assert outcome.reason == ("mismatch: the certificate's families plan 20 cases, it says 21 "
                              "(nothing was evaluated)")
    outcome = checked(made, name, lambda d: d.__setitem__("digest", "f" * 64))
    assert outcome.reason == "mismatch: the digest over the cases differs from the certified one"
    outcome = checked(made, name, lambda d: d["claim"]["over"][0].__setitem__("max_vertices", 5))
    assert outcome.reason.startswith("mismatch: the certificate's families plan ")
    outcome = checked(made, name, lambda d: d["claim"]["over"][0].__setitem__("max_dim", 2))
    assert outcome.reason == ("mismatch: the certificate's families plan 19 cases, it says 20 "
                              "(nothing was evaluated)")
    outcome = checked(made, name, lambda d: d["shrinking"].__setitem__("minimal", False))
    assert outcome.reason == ("mismatch: shrinking.minimal is false, but the record replays to "
                              "the end: 5 evaluations show the counterexample minimal")


def test_an_exact_value_cannot_become_an_enclosure_nor_be_dropped(made):
    name = "reciprocal-charpoly-2d"
    outcome = checked(made, name, lambda d: d.__setitem__("values", ["[-1000, 1000] @128 bits"]))
    assert outcome.reason == ('mismatch: values[0] is the enclosure "[-1000, 1000] @128 bits", '
                              'but the value is exact: "false" (an exact value is recorded '
                              "exactly)")
    outcome = checked(made, name, lambda d: d.__setitem__("values", []))
    assert outcome.reason == ('mismatch: values holds 0 value(s), the re-evaluation gives 1: '
                              '["false"]')
    # certified values: dropped, or moved off the true value
    zeta = "zeta-functional-equation-2d"
    outcome = checked(made, zeta, lambda d: d.pop("certified"))
    assert outcome.reason == ("mismatch: certified.values is missing: the re-evaluation gives 2 "
                              "certified value(s)")
    outcome = checked(made, zeta, lambda d: d["values"].__setitem__(0, "[5, 6] @128 bits"))
    assert outcome.reason.startswith('mismatch: values[0]: recorded "[5, 6] @128 bits" does not '
                                     "have the form of the recomputed enclosure")


def test_enclosures_only_where_the_claim_is_certified(made):
    def change(d):
        d["claim"]["evidence"] = "exact"
    outcome = checked(made, "zeta-functional-equation-2d", change)
    assert outcome.reason == ("mismatch: evidence \"certified\" is weaker than the claim's "
                              "\"exact\" allows")


def test_a_larger_failing_complex_cannot_replace_the_minimal_one(made):
    # two triangles sharing an edge also fail (dimension 2, not reciprocal), but removing
    # a vertex gives one triangle, which fails too: not minimal
    def change(d):
        larger = [[0, 1, 2], [1, 2, 3]]
        d["complex"]["facets"] = larger
        d["complexes"]["K"]["facets"] = larger
    outcome = checked(made, "reciprocal-charpoly-2d", change)
    assert outcome.reason.startswith("mismatch: the shrinking steps lead from the original case "
                                     "to K = ")

    def rewrite(d):           # the record rewritten to stop early: minimality is re-derived
        d["shrinking"]["steps"] = []
        d["complex"]["facets"] = d["original"]["complexes"]["K"]["facets"]
        d["complexes"]["K"]["facets"] = d["original"]["complexes"]["K"]["facets"]
        d["values"] = d["original"]["values"]
    outcome = checked(made, "reciprocal-charpoly-2d", rewrite)
    assert outcome.reason.startswith("mismatch: the counterexample is not minimal: after the "
                                     "move \"removed vertex ")


def test_unknown_and_duplicate_keys_are_refused(made):
    outcome = checked(made, "energy", lambda d: d.__setitem__("verified_by", "referee"))
    assert outcome.reason.startswith("malformed: unknown key 'verified_by' in the certificate")
    outcome = checked(made, "energy", lambda d: d["claim"]["over"][0].__setitem__("note", 1))
    assert outcome.reason.startswith("malformed: claim.over[0]: family 'all-complexes': unknown "
                                     "parameter 'note'")
    folder, _claims, certificates = made
    text = text_of(certificates["energy"]).replace('"cases": 8,', '"cases": 8,\n "cases": 8,', 1)
    outcome = check(write(folder, "duplicate", text))
    assert outcome.reason == ("malformed: the key 'cases' is written twice in one object (a "
                              "JSON reader keeps only one of them)")


def test_a_consistent_rewrite_is_reported_as_a_different_claim(made):
    # statement = "True" with both hashes recomputed verifies on its own; the claim file
    # shows that it is not the energy theorem
    folder, claim_file, certificates = made
    data = copy.deepcopy(certificates["energy"])
    data["claim"]["statement"] = "True"
    path = write(folder, "rewritten", text_of(reseal(data)))
    assert check(path).verified
    result = subprocess.run([sys.executable, "-m", "verifier", "check", str(path), "--claims",
                             str(claim_file)], capture_output=True, text=True, timeout=120)
    assert result.returncode == 1, result.stdout + result.stderr
    out = " ".join(result.stdout.split())
    assert (f"NOT verified {path} pass energy: a different claim: the certificate verifies, but "
            "its claim is not the one of the claim files: statement is \"True\" in the "
            f"certificate, \"sum(green(K)) == euler(K)\" in {claim_file}") in out
    assert "statement: True" in out


def test_check_prints_what_was_certified_and_that_provenance_is_not_verified(made):
    folder, claim_file, certificates = made
    path = write(folder, "printed", text_of(certificates["reciprocal-charpoly-2d"]))
    result = subprocess.run([sys.executable, "-m", "verifier", "check", str(path), "--claims",
                             str(claim_file)], capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stdout + result.stderr
    lines = [line.strip() for line in result.stdout.splitlines()[1:]]
    assert lines == [
        "statement: is_reciprocal(charpoly(connection(K) ** 2))",
        "where: dim(K) == 2",
        "expect: fails; evidence: exact",
        "over K: all-complexes(max_vertices=4, min_vertices=4): 20 complexes",
        "cases: 20",
        "claim: the same as in the claim files",
        "provenance (engine, versions, run id, times, claim file name) is recorded as written "
        "and cannot be verified"]


def test_a_run_cap_is_recorded_and_replans_the_same_cases(tmp_path):
    claims = tmp_path / "claims.toml"
    claims.write_text(CLAIMS)
    result = run([claims], RunOptions(store=str(tmp_path / "s.sqlite"), engine="inline",
                                      max_cases=5))
    paths = write_certificates(result, tmp_path / "certificates")
    assert all(json.loads(p.read_text())["max_cases"] == 5 for p in paths)
    for outcome in check_all(paths):
        assert outcome.verified, outcome.reason
        assert "cases: 5 (the first 5 planned)" in outcome.details


# ============================================================== the tamper suite
def _paths(value, path=()):
    """Every key path of a JSON value (objects and lists), leaves and inner nodes."""
    yield path
    if isinstance(value, dict):
        for key, inner in value.items():
            yield from _paths(inner, path + (key,))
    elif isinstance(value, list):
        for i, inner in enumerate(value):
            yield from _paths(inner, path + (i,))


def _get(data, path):
    for key in path:
        data = data[key]
    return data


def _set(data, path, value):
    _get(data, path[:-1])[path[-1]] = value


def _name(path) -> str:
    return ".".join(str(p) for p in path)


def _provenance(path) -> bool:
    text = _name(path)
    return any(text == p or text.startswith(p + ".") for p in PROVENANCE)


def _edits(value, path):
    """Meaning-changing replacements of one value (type by type, plus what the issue
    names for particular keys)."""
    last = path[-1] if path else None
    out = []
    if isinstance(value, bool):
        out.append(not value)
    elif isinstance(value, int):
        out += [value + 1, value - 1, 0] if value not in (0, 1) else [value + 1, -1]
    elif isinstance(value, str):
        out += [value + "x", ""]
        if re.fullmatch(r"-?\d+(/\d+)?", value) or value in ("true", "false"):
            out += ["[-1000, 1000] @128 bits", "1/2" if value != "1/2" else "3"]
        if last == "statement":
            out.append("True")
        if last == "where":
            out.append("True")
        if last in ("expect",):
            out.append("fails" if value == "holds" else "holds")
        if last == "evidence":
            out += [e for e in ("exact", "certified", "probabilistic", "float", "bxact")
                    if e != value]
        if last == "name":
            out += ["Energy", "energy-2"]
        if last == "value" and "bits" in value:
            out.append("[5, 6] + [0, 1]i @128 bits")
    elif value is None:
        out += ["True" if last == "where" else 1, 0]
    elif isinstance(value, list):
        if value:
            out.append(value[:-1])
        out.append(value + [copy.deepcopy(value[0])] if value else ["x"])
    elif isinstance(value, dict):
        out.append({})
    return [v for v in out if v != value]


def mutations(name: str, data: dict, text: str):
    """(kind, what, meaning-changing, text) for one certificate."""
    out = []
    # flips: a character of the file changed, hashes left alone
    positions = [i for i, c in enumerate(text) if not c.isspace()]
    for i in positions[::max(1, len(positions) // 40)]:
        c = text[i]
        flipped = "7" if c == "3" else "3" if c.isdigit() else "x" if c != "x" else "y"
        out.append(("flip", f"{name}@{i}", True, text[:i] + flipped + text[i + 1:]))
    paths = [p for p in _paths(data) if p]
    for path in paths:
        # drops: once without and once with both hashes recomputed
        if isinstance(path[-1], str) and path != ("sha256",):
            edited = copy.deepcopy(data)
            del _get(edited, path[:-1])[path[-1]]
            out.append(("drop", _name(path), True, text_of(edited)))
            if path != ("claim", "sha256"):
                out.append(("drop, rehashed", _name(path), not _provenance(path[:-1] or path),
                            text_of(reseal(edited))))
        # edits with both hashes recomputed
        if path[-1] == "sha256":
            continue
        for value in _edits(_get(data, path), path):
            edited = copy.deepcopy(data)
            _set(edited, path, value)
            out.append(("edit, rehashed", f"{_name(path)} = {json.dumps(value)[:40]}",
                        not _provenance(path), text_of(reseal(edited))))
    # additions: an unknown key in every object
    for path in [()] + paths:
        if isinstance(_get(data, path), dict):
            edited = copy.deepcopy(data)
            _get(edited, path)["checked_by"] = "referee"
            out.append(("addition, rehashed", _name(path) or "(top)",
                        not (path and _provenance(path)), text_of(reseal(edited))))
    # duplicate keys: a key written again with another value, the hash over what a JSON
    # reader keeps (the last one)
    for key in ("cases", "digest", "evidence", "kind", "outcomes", "claim"):
        if key in data:
            edited = copy.deepcopy(data)
            edited[key] = {"cases": 0, "digest": "0" * 64, "evidence": "float",
                           "kind": "pass", "outcomes": {}, "claim": {}}[key]
            sealed = reseal(edited)
            body = text_of(sealed)
            first = f'"{key}": ' + json.dumps(data[key], sort_keys=True, ensure_ascii=False)
            out.append(("duplicate key", key, True,
                        body.replace("{\n", "{\n " + first + ",\n", 1)))
    return out


def test_tamper_suite(made):
    folder, claim_file, certificates = made
    target = folder / "mutations"
    target.mkdir(exist_ok=True)
    suite = []
    for name, data in certificates.items():
        for kind, what, meaning, text in mutations(name, data, text_of(data)):
            path = write(target, f"{len(suite):05d}", text)
            suite.append((kind, f"{name}: {what}", meaning, path))
    assert len(suite) >= 300
    results = check_all([s[3] for s in suite], claims=load_paths([claim_file]))
    table: dict = {}
    accepted = []
    for (kind, what, meaning, _path), outcome in zip(suite, results):
        row = table.setdefault(kind if meaning else "provenance edit, rehashed",
                               Counter(count=0, rejected=0, different=0, verified=0))
        row["count"] += 1
        if outcome.different_claim:
            row["different"] += 1
        elif outcome.verified:
            row["verified"] += 1
            if meaning:
                accepted.append(what)
        else:
            row["rejected"] += 1
    TABLE.update(table)
    print("\nmutation kind                 count  rejected  different claim  verified")
    for kind, row in table.items():
        print(f"{kind:<28}{row['count']:>6}{row['rejected']:>10}{row['different']:>17}"
              f"{row['verified']:>10}")
    assert accepted == [], f"meaning-changing edits accepted: {accepted}"
    # nothing unverifiable is given away: a provenance edit changes no meaning and still
    # verifies (its values are said to be unverifiable)
    assert table["provenance edit, rehashed"]["verified"] > 0

"""The main job end to end: claim files -> runs -> store -> counterexamples -> certificates."""

from __future__ import annotations

import json
import os
import random
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

from verifier.certificates import check, seal, write_certificates
from verifier.claims.evaluate import Limits
from verifier.complex import Complex
from verifier.run.cases import holds_on
from verifier.run.runner import RunOptions, run
from verifier.run.shrink import candidates

from .conftest import ENERGY_ON_SIX_VERTICES, wait_for_stored_cases

ROOT = Path(__file__).resolve().parent.parent
LIBRARY = ROOT / "claims"


def options(tmp_path, **extra) -> RunOptions:
    settings = dict(store=str(tmp_path / "store.sqlite"), engine="inline")
    settings.update(extra)
    return RunOptions(**settings)


def cli(*args, cwd=None, timeout=300):
    return subprocess.run([sys.executable, "-m", "verifier", *args], capture_output=True,
                          text=True, timeout=timeout, cwd=cwd)


# ------------------------------------------------------------- counterexamples
@pytest.mark.parametrize("name", ["reciprocal-2d-fails.toml", "hydrogen-2d-fails.toml"])
def test_failing_companions_shrink_to_a_single_triangle(tmp_path, name):
    # Over complexes on <= 4 vertices of dimension 2, both the reciprocity of charpoly(L^2)
    # and the hydrogen identity fail, and the smallest counterexample is one filled
    # triangle (Knill, arXiv:1803.01464, states them for graphs only; the triangle's
    # failure is checked by hand in tests/test_identities.py).
    result = run([LIBRARY / name], options(tmp_path))
    (claim_result,) = result.claims
    assert claim_result.meets_expectation and claim_result.counts["fails"] > 0
    minimal = claim_result.counterexample["complexes"]["K"]
    assert Complex.from_facets(minimal).is_isomorphic(Complex.from_facets([[0, 1, 2]]))


def test_minimal_counterexample_is_minimal(tmp_path):
    # removing any one vertex or facet of the shrunk complex makes the claim hold or
    # leaves its domain (the definition of minimal in this project)
    result = run([LIBRARY / "hydrogen-2d-fails.toml"], options(tmp_path))
    claim = result.claims[0].claim
    K = Complex.from_facets(result.claims[0].counterexample["complexes"]["K"])
    assert holds_on(claim, {"K": K}, Limits()) == "fails"
    for description, smaller in candidates(K):
        if description.startswith(("removed vertex", "removed facet")):
            assert holds_on(claim, {"K": smaller}, Limits()) != "fails", description


def test_shrinking_a_large_failure(tmp_path):
    # a claim that fails exactly when the complex has a 2-simplex: from a refined torus
    # (the first failing case) the shrinker must reach a single triangle, deterministically
    path = tmp_path / "has-triangle.toml"
    path.write_text('[[claim]]\nname = "no-triangles"\nstatement = "dim(K) < 2"\n'
                    'source = "demo"\n[[claim.over]]\nfamily = "catalog"\n'
                    'names = ["torus-7"]\n')
    first = run([path], options(tmp_path))
    second = run([path], options(tmp_path, store=str(tmp_path / "other.sqlite")))
    a = first.claims[0].counterexample
    assert Complex.from_facets(a["complexes"]["K"]).f_vector == (3, 3, 1)
    assert a["complexes"] == second.claims[0].counterexample["complexes"]
    assert a["steps"] == second.claims[0].counterexample["steps"]


# ------------------------------------------------------------------ digests
def test_digest_does_not_depend_on_engine_or_workers(tmp_path):
    claim = LIBRARY / "gauss-bonnet.toml"
    inline = run([claim], options(tmp_path, max_cases=150))
    processes = run([claim], options(tmp_path, engine="processes", workers=2, max_cases=150,
                                     store=str(tmp_path / "p.sqlite")))
    assert [c.digest for c in inline.claims] == [c.digest for c in processes.claims]
    assert [c.cases for c in inline.claims] == [c.cases for c in processes.claims] == [150, 150]


def test_resume_after_sigkill_gives_the_same_digest(tmp_path):
    # a run killed with SIGKILL at a seeded random moment, then resumed, ends with the same
    # case count and digest as an uninterrupted run; no case is lost or stored twice
    claim = tmp_path / "energy-6.toml"
    claim.write_text(ENERGY_ON_SIX_VERTICES.format(cases=12000))
    store = tmp_path / "killed.sqlite"
    certs = tmp_path / "certs"
    process = subprocess.Popen([sys.executable, "-m", "verifier", "run", str(claim), "--quiet",
                                "--store", str(store), "--certificates", str(certs)],
                               stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    assert wait_for_stored_cases(store)
    time.sleep(random.Random(7).uniform(0.5, 2.0))   # then a seeded random moment later
    os.kill(process.pid, signal.SIGKILL)
    process.wait()
    with sqlite3.connect(store) as db:
        partial = db.execute("SELECT COUNT(*) FROM cases").fetchone()[0]
    resumed = cli("run", str(claim), "--quiet", "--resume", "--store", str(store),
                  "--certificates", str(certs))
    assert resumed.returncode == 0, resumed.stderr
    assert "resumed" in resumed.stdout
    whole = run([claim], options(tmp_path, engine="processes", workers=2,
                                 store=str(tmp_path / "whole.sqlite")))
    with sqlite3.connect(store) as db:
        run_id = db.execute("SELECT run_id FROM runs").fetchone()[0]
        rows = db.execute("SELECT case_id, complex_hash FROM cases WHERE run_id = ?",
                          (run_id,)).fetchall()
        runs = db.execute("SELECT COUNT(*) FROM runs").fetchone()[0]
    from verifier.run.runner import digest_of
    assert runs == 1                          # the resume continued the killed run
    assert len(rows) == len(set(rows)) == whole.claims[0].cases
    assert 0 < partial < whole.claims[0].cases  # the kill really interrupted the run
    assert digest_of(rows) == whole.claims[0].digest
    certificate = json.loads((certs / "energy-6.json").read_text())
    assert certificate["digest"] == whole.claims[0].digest


# -------------------------------------------------------------- bad claim files
BAD_FILES = {
    "bad-toml.toml": ('[[claim]]\nname = "x\n', "bad-toml.toml:2:10: invalid TOML"),
    "unknown-function.toml": ('[[claim]]\nname = "x"\nstatement = "sum(gren(K)) == 1"\n'
                              '[[claim.over]]\nfamily = "catalog"\n',
                              "unknown-function.toml:3:18: unknown function 'gren'; did you "
                              "mean 'green'?"),
    "arity.toml": ('[[claim]]\nname = "x"\nstatement = "euler(K, K) == 1"\n'
                   '[[claim.over]]\nfamily = "catalog"\n',
                   "arity.toml:3:14: euler takes 1 argument, got 2"),
    "types.toml": ('[[claim]]\nname = "x"\nstatement = "det(K) == 1"\n'
                   '[[claim.over]]\nfamily = "catalog"\n',
                   "types.toml:3:18: det: argument 'A' must be matrix, got complex"),
    "unknown-family.toml": ('[[claim]]\nname = "x"\nstatement = "euler(K) == 1"\n'
                            '[[claim.over]]\nfamily = "catalgo"\n',
                            "unknown-family.toml:5:10: unknown family 'catalgo'; did you mean "
                            "'catalog'?"),
    "bad-parameter.toml": ('[[claim]]\nname = "x"\nstatement = "euler(K) == 1"\n'
                           '[[claim.over]]\nfamily = "random-flag"\nvertices = 8\n'
                           'edge_probability = 1.5\ncount = 3\n',
                           "bad-parameter.toml:7:20: family 'random-flag': parameter "
                           "'edge_probability' must be a number, 0 <= edge_probability <= 1; "
                           "got 1.5"),
}


@pytest.mark.parametrize("name", sorted(BAD_FILES))
def test_malformed_claim_files_exit_2_with_one_line(tmp_path, name):
    text, expected = BAD_FILES[name]
    path = tmp_path / name
    path.write_text(text)
    result = cli("run", str(path), "--store", str(tmp_path / "s.sqlite"), "--quiet")
    assert result.returncode == 2
    assert "Traceback" not in result.stderr
    message = " ".join(result.stderr.split())
    assert message.startswith(f"error: {path.parent}/" + expected.split(":")[0]), message
    assert expected.split(": ", 1)[0] in message and expected.split(": ", 1)[1] in message
    assert len(result.stderr.strip().splitlines()) == 1
    assert not (tmp_path / "s.sqlite").exists()      # nothing written half-way


def test_bad_parameter_names_the_parameter(tmp_path):
    path = tmp_path / "p.toml"
    path.write_text(BAD_FILES["bad-parameter.toml"][0])
    result = cli("run", str(path), "--quiet", "--store", str(tmp_path / "s.sqlite"))
    assert "edge_probability" in result.stderr and "1.5" in result.stderr


def test_nothing_runs_until_every_claim_loads(tmp_path):
    good = LIBRARY / "energy.toml"
    bad = tmp_path / "bad.toml"
    bad.write_text(BAD_FILES["unknown-function.toml"][0])
    result = cli("run", str(good), str(bad), "--quiet", "--store", str(tmp_path / "s.sqlite"))
    assert result.returncode == 2 and not (tmp_path / "s.sqlite").exists()


# --------------------------------------------------------------- certificates
@pytest.fixture(scope="module")
def certified(tmp_path_factory):
    folder = tmp_path_factory.mktemp("certs")
    result = run([LIBRARY / "hydrogen-2d-fails.toml", LIBRARY / "refinement-invariance.toml"],
                 RunOptions(store=str(folder / "s.sqlite"), engine="inline"))
    paths = write_certificates(result, folder)
    return {p.stem: p for p in paths}


def test_certificates_follow_the_schema(certified):
    counterexample = json.loads(certified["hydrogen-identity-2d"].read_text())
    passing = json.loads(certified["refinement-invariance"].read_text())
    for cert in (counterexample, passing):
        for key in ("schema", "kind", "claim", "cases", "evidence", "digest", "sha256"):
            assert key in cert
        for key in ("name", "statement", "sha256"):
            assert key in cert["claim"]
        assert seal(cert)["sha256"] == cert["sha256"]
    assert counterexample["kind"] == "counterexample" and passing["kind"] == "pass"
    assert counterexample["complex"]["facets"] == [[0, 1, 2]]
    assert all(isinstance(v, str) for v in counterexample["values"])


def test_certificates_verify_independently(certified):
    for path in certified.values():
        outcome = check(path)
        assert outcome.verified, outcome.reason


def tamper(path: Path, tmp_path: Path, change, reseal: bool) -> Path:
    data = json.loads(path.read_text())
    change(data)
    if reseal:
        data = seal(data)
    target = tmp_path / path.name
    target.write_text(json.dumps(data))
    return target


def test_tampered_value_is_rejected(certified, tmp_path):
    path = tamper(certified["hydrogen-identity-2d"], tmp_path,
                  lambda d: d["values"].__setitem__(0, "[[0]]"), reseal=False)
    outcome = check(path)
    assert not outcome.verified
    assert outcome.reason == "tampered: the sha256 does not match the certificate's content"


def test_tampered_facet_with_a_new_hash_is_rejected(certified, tmp_path):
    # the forger recomputes the hash, so only the independent re-evaluation can notice:
    # on a single edge the hydrogen identity holds (Knill, arXiv:1803.01464)
    def change(d):
        d["complex"]["facets"] = [[0, 1]]
        d["complexes"]["K"]["facets"] = [[0, 1]]
    outcome = check(tamper(certified["hydrogen-identity-2d"], tmp_path, change, reseal=True))
    assert not outcome.verified
    assert outcome.reason.startswith("mismatch:")


def test_tampered_hash_is_rejected(certified, tmp_path):
    path = tamper(certified["refinement-invariance"], tmp_path,
                  lambda d: d.__setitem__("sha256", "0" * 64), reseal=False)
    assert check(path).reason == "tampered: the sha256 does not match the certificate's content"


def test_tampered_digest_with_a_new_hash_is_rejected(certified, tmp_path):
    path = tamper(certified["refinement-invariance"], tmp_path,
                  lambda d: d.__setitem__("digest", "f" * 64), reseal=True)
    outcome = check(path)
    assert outcome.reason == "mismatch: the digest over the cases differs from the certified one"


def test_check_command_exit_codes(certified, tmp_path):
    good = cli("check", *map(str, certified.values()))
    assert good.returncode == 0, good.stdout + good.stderr
    lines = [line for line in good.stdout.splitlines() if line.strip()]
    verdicts = [line for line in lines if not line.startswith(" ")]   # details are indented
    assert len(verdicts) == 2 and all(line.startswith("verified") for line in verdicts)
    broken = tamper(certified["refinement-invariance"], tmp_path,
                    lambda d: d.__setitem__("cases", 1), reseal=False)
    bad = cli("check", str(broken))
    assert bad.returncode == 1 and "NOT verified" in bad.stdout
    junk = tmp_path / "junk.json"
    junk.write_text("{not json")
    result = cli("check", str(junk))          # not a certificate at all: bad input, exit 2
    assert result.returncode == 2 and "invalid JSON" in result.stderr and result.stdout == ""


# ------------------------------------------------------------------- time limits
def test_a_slow_case_is_recorded_as_limit_not_dropped(tmp_path):
    # a library call that cannot be interrupted from inside (the exact charpoly of a matrix
    # of order 9,072) is stopped by the engine's watchdog; the case is recorded as 'limit'
    # with the limit named, the other case still holds, and the claim is incomplete
    path = tmp_path / "slow.toml"
    path.write_text('[[claim]]\nname = "slow"\nsource = "demo"\nstatement = "size(K) < 10 or '
                    'charpoly(connection(refine(K, 3))) == charpoly(connection(K))"\n'
                    '[[claim.over]]\nfamily = "catalog"\n'
                    'names = ["simplex-boundary-1", "torus-7"]\n')
    start = time.monotonic()
    result = run([path], options(tmp_path, engine="processes", workers=2, case_timeout=1.0))
    assert time.monotonic() - start < 60
    (claim,) = result.claims
    assert claim.counts["holds"] == 1 and claim.counts["limit"] == 1
    assert claim.verdict == "incomplete" and not claim.meets_expectation
    assert claim.problems[0]["message"].startswith("seconds:")
    assert claim.cases == 2                     # nothing dropped: both cases are in the store


def test_cooperative_limit_inside_the_evaluator(tmp_path):
    path = tmp_path / "loop.toml"
    path.write_text('[[claim]]\nname = "loop"\nsource = "demo"\n'
                    'statement = "count(1 for x in simplices(K) for y in simplices(K) for z in '
                    'simplices(K)) >= 0"\n[[claim.over]]\nfamily = "refine"\n'
                    'of = { family = "catalog", names = ["torus-7"] }\ntimes = 2\n')
    result = run([path], options(tmp_path, case_timeout=0.5))
    assert result.claims[0].counts["limit"] == 1
    assert result.claims[0].problems[0]["message"].startswith("seconds: evaluation took longer")


def test_check_can_sample_a_large_pass_certificate(certified):
    outcome = check(certified["refinement-invariance"], sample=5, seed=1)
    assert outcome.verified and outcome.cases_checked == 5
    assert "a sample of 5 cases" in outcome.reason


def test_a_case_over_its_memory_is_recorded_as_limit(tmp_path):
    # the exact Green function of a thrice-refined 5-vertex torus-like complex needs far
    # more than 20 MB; with --case-memory 20 the case is recorded as a 'memory' limit
    path = tmp_path / "big.toml"
    path.write_text('[[claim]]\nname = "big"\nsource = "demo"\n'
                    'statement = "size(K) < 10 or det(green(refine(K, 3)) ** 2) == 1"\n'
                    '[[claim.over]]\nfamily = "catalog"\n'
                    'names = ["simplex-boundary-1", "torus-7"]\n')
    result = run([path], options(tmp_path, engine="processes", workers=1, case_memory=20))
    (claim,) = result.claims
    assert claim.counts["holds"] == 1 and claim.counts["limit"] == 1, claim.counts
    assert claim.problems[0]["message"].startswith("memory:")

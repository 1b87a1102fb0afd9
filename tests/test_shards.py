"""Sharded planning: the client lists shards, workers generate and evaluate them; the digest
does not depend on the engine, the workers, the order of parts or interruptions; a worker
that dies mid-shard loses and duplicates nothing; certificates re-check from the shards."""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

from verifier.certificates import check, seal, write_certificates
from verifier.families import FAMILIES
from verifier.families.cycles import cycle
from verifier.families.family import Family, FamilyType, Param
from verifier.run import runner as runner_module
from verifier.run.runner import OptionError, RunOptions, digest_of, run
from verifier.run.shards import add_sums, line_value, run_shard, sharded_digest

SHARDS = {"a": range(3, 9), "b": range(9, 15), "c": range(15, 21), "d": range(21, 21)}


class ShardedCycles(Family):
    """Test family: the cycles C_3..C_20 in four shards (the last one empty)."""

    def shards(self):
        return list(SHARDS)

    def shard_cases(self, shard):
        if shard not in SHARDS:
            raise self._foreign(shard, "no such shard")
        for n in SHARDS[shard]:
            yield f"sharded-cycles/C{n}", cycle(n)

    def case_ids(self):
        return (cid for shard in SHARDS for cid, _ in self.shard_cases(shard))

    def get(self, case_id):
        tail = case_id[len("sharded-cycles/C"):] if isinstance(case_id, str) else ""
        if not case_id.startswith("sharded-cycles/C") or not tail.isdigit() or \
                not 3 <= int(tail) <= 20:
            raise self._foreign(case_id, "ids are sharded-cycles/C<n>, 3 <= n <= 20")
        return cycle(int(tail))

    def size(self):
        return 18


SHARDED_CYCLES = FamilyType(
    name="sharded-cycles", description="test family", reference="test",
    params=(Param.integer("unused", 0, 1, "nothing", default=0),),
    build=lambda params, context: ShardedCycles("sharded-cycles", params))


@pytest.fixture(autouse=True)
def registered(monkeypatch):
    monkeypatch.setitem(FAMILIES, "sharded-cycles", SHARDED_CYCLES)


def claim_file(folder: Path, statement: str, name: str = "cycles-sharded",
               expect: str = "holds", extra: str = "") -> Path:
    path = folder / f"{name}.toml"
    path.write_text(f'[[claim]]\nname = "{name}"\nstatement = "{statement}"\n'
                    f'expect = "{expect}"\nsource = "definition of the Euler characteristic"\n'
                    f'{extra}[[claim.over]]\nfamily = "sharded-cycles"\n'
                    '[[claim.over]]\nfamily = "cycles"\nlengths = [3, 4]\n')
    return path


def flat_digest(ids_and_hashes):
    return digest_of(ids_and_hashes)


def test_digest_is_the_multiset_sum_of_the_cases_and_does_not_depend_on_the_engine(tmp_path):
    # chi(C_n) = 0 for every cycle (common practice, no source): every case holds
    path = claim_file(tmp_path, "euler(K) == 0")
    digests, counts = set(), set()
    for number, (engine, workers) in enumerate([("inline", 1), ("processes", 1),
                                                ("processes", 2)]):
        result = run([path], RunOptions(store=str(tmp_path / f"s{number}.sqlite"),
                                        engine=engine, workers=workers))
        (claim,) = result.claims
        assert claim.verdict == "holds" and claim.cases == 20
        assert claim.counts["holds"] == 20
        assert [e["shard"] for e in claim.shards] == ["0|a", "0|b", "0|c", "0|d", "1|*"]
        assert [e["cases"] for e in claim.shards] == [6, 6, 6, 0, 2]
        digests.add(claim.digest)
        counts.add(json.dumps(claim.counts, sort_keys=True))
    assert len(digests) == 1 and len(counts) == 1
    # the digest recomputed from the definition: the sum of the lines' SHA-256 values
    lines = [(f"0|sharded-cycles/C{n}", cycle(n).content_hash) for n in range(3, 21)] + \
            [(f"1|cycles/C{n}", cycle(n).content_hash) for n in (3, 4)]
    total = sum(line_value(cid, h) for cid, h in lines) % (1 << 256)
    assert digests == {sharded_digest(20, f"{total:064x}")}


def test_parts_add_up_whatever_the_split(tmp_path):
    path = claim_file(tmp_path, "euler(K) == 0")
    from verifier.run.cases import sources_of
    from verifier.claims.loader import load_paths
    from verifier.claims.evaluate import Limits
    from dataclasses import asdict
    files = sources_of(load_paths([path]))
    limits = asdict(Limits(seconds=30.0))
    whole = run_shard(files, "cycles-sharded", "0|a", 0, None, limits)
    assert whole["complete"] and whole["cases"] == 6 and whole["stop"] == 6
    pieces = [run_shard(files, "cycles-sharded", "0|a", a, b, limits)
              for a, b in ((0, 1), (1, 4), (4, 6))]
    assert [p["complete"] for p in pieces] == [False, False, True]
    assert sum(p["cases"] for p in pieces) == 6
    assert add_sums(*(p["sum"] for p in pieces)) == whole["sum"]
    assert whole["notable"] == []       # holding cases are kept as counts only


def test_failing_cases_are_stored_and_shrunk_and_the_certificate_rechecks(tmp_path):
    # f_0(C_n) = n, so "f_vector(K)[0] < 12" fails on C_12..C_20 (definition)
    path = claim_file(tmp_path, "f_vector(K)[0] < 12", name="small-cycles", expect="fails")
    result = run([path], RunOptions(store=str(tmp_path / "s.sqlite"), engine="processes",
                                    workers=2))
    (claim,) = result.claims
    assert claim.counts["fails"] == 9 and claim.counts["holds"] == 11
    assert claim.meets_expectation
    assert claim.counterexample["case_id"] == "0|sharded-cycles/C12"
    from verifier.run.store import Store
    store = Store(tmp_path / "s.sqlite")
    stored = store.case_records(result.run_id, "small-cycles")
    store.close()
    assert sorted(r["case_id"] for r in stored) == sorted(
        f"0|sharded-cycles/C{n}" for n in range(12, 21))     # only the notable cases
    (certificate,) = write_certificates(result, tmp_path / "certs")
    checked = check(certificate)
    assert checked.verified, checked.reason


def test_pass_certificate_rechecks_on_a_sample_and_rejects_a_forged_shard(tmp_path):
    path = claim_file(tmp_path, "euler(K) == 0")
    result = run([path], RunOptions(store=str(tmp_path / "s.sqlite"), engine="inline"))
    (certificate,) = write_certificates(result, tmp_path / "certs")
    data = json.loads(Path(certificate).read_text())
    assert [e["shard"] for e in data["shards"]] == ["0|a", "0|b", "0|c", "0|d", "1|*"]
    whole = check(certificate)
    assert whole.verified and whole.cases_checked == 20, whole.reason
    sampled = check(certificate, sample=3, seed=5)
    assert sampled.verified and sampled.cases_checked == 3, sampled.reason
    # a shard's sum changed and the digest recomputed to match: the shard generated again
    # does not give that sum
    forged = dict(data)
    forged["shards"] = [dict(e) for e in data["shards"]]
    forged["shards"][1]["sum"] = add_sums(forged["shards"][1]["sum"], "0" * 63 + "1")
    forged["shards"][2]["sum"] = add_sums(forged["shards"][2]["sum"], "f" * 64)  # -1
    Path(tmp_path / "forged.json").write_text(json.dumps(seal(forged)))
    rejected = check(tmp_path / "forged.json")
    assert not rejected.verified and "shard 0|b" in rejected.reason
    # a shard dropped from the list
    dropped = dict(data, shards=data["shards"][:-1])
    Path(tmp_path / "dropped.json").write_text(json.dumps(seal(dropped)))
    assert "shards" in check(tmp_path / "dropped.json").reason


def test_a_cap_on_a_sharded_claim_is_refused(tmp_path):
    path = claim_file(tmp_path, "euler(K) == 0")
    with pytest.raises(OptionError, match="planned in shards"):
        run([path], RunOptions(store=str(tmp_path / "s.sqlite"), engine="inline", max_cases=5))


def test_a_worker_dying_mid_shard_loses_and_duplicates_nothing(tmp_path, monkeypatch):
    # the worker evaluating shard 0|b dies (os._exit) the first time it reaches C_11; the
    # engine splits the shard by ranges (counted in a child of the client) and the pieces
    # complete; the counts and the digest are those of an undisturbed run
    path = claim_file(tmp_path, "euler(K) == 0")
    undisturbed = run([path], RunOptions(store=str(tmp_path / "a.sqlite"), engine="inline"))
    marker = tmp_path / "died-once"
    real = runner_module.run_shard

    def dying(sources, name, key, start, stop, limits):
        if key == "0|b" and start <= 2 and (stop is None or stop > 2) \
                and not marker.exists():
            marker.write_text("x")
            os._exit(3)
        return real(sources, name, key, start, stop, limits)

    monkeypatch.setattr(runner_module, "run_shard", dying)
    disturbed = run([path], RunOptions(store=str(tmp_path / "b.sqlite"), engine="processes",
                                       workers=2))
    assert marker.exists()
    (a,), (b,) = undisturbed.claims, disturbed.claims
    assert b.counts == a.counts and b.cases == a.cases == 20
    assert b.digest == a.digest
    from verifier.run.store import Store
    store = Store(tmp_path / "b.sqlite")
    parts = store.db.execute("SELECT shard, start, stop FROM shard_parts WHERE shard = '0|b' "
                             "ORDER BY start").fetchall()
    store.close()
    assert len(parts) >= 2 and parts[0][1] == 0 and parts[-1][2] == 6    # split by ranges
    assert all(p[2] == q[1] for p, q in zip(parts, parts[1:]))            # contiguous


def test_resume_skips_finished_shards(tmp_path):
    path = claim_file(tmp_path, "euler(K) == 0")
    store_path = tmp_path / "s.sqlite"
    first = run([path], RunOptions(store=str(store_path), engine="inline"))
    from verifier.run.store import Store
    store = Store(store_path)
    # make the run look interrupted: one shard finished, one half done, the rest missing
    store.db.execute("DELETE FROM shard_parts WHERE shard IN ('0|c', '0|d', '1|*')")
    store.db.execute("UPDATE shard_parts SET stop = 3, complete = 0, cases = 3 "
                     "WHERE shard = '0|b'")
    store.db.execute("UPDATE runs SET finished = NULL")
    store.db.commit()
    store.close()
    resumed = run([path], RunOptions(store=str(store_path), engine="inline", resume=True))
    assert resumed.resumed and resumed.run_id == first.run_id
    assert resumed.claims[0].digest == first.claims[0].digest
    assert resumed.claims[0].cases == 20


def test_report_and_summary_count_every_case_of_a_sharded_claim(tmp_path):
    from verifier.report import write_report
    from verifier.run.store import Store
    path = claim_file(tmp_path, "euler(K) == 0")
    result = run([path], RunOptions(store=str(tmp_path / "s.sqlite"), engine="inline"))
    store = Store(tmp_path / "s.sqlite")
    summary = store.summary(result.run_id)
    store.close()
    assert summary["cycles-sharded"]["cases"] == 20
    assert summary["cycles-sharded"]["counts"]["holds"] == 20
    write_report(tmp_path / "s.sqlite", tmp_path / "out")
    text = (tmp_path / "out" / "report.md").read_text()
    assert "| cycles-sharded | holds | holds | 20 | 20 | 0 |" in text
    assert "| 0 | sharded-cycles |" in text and "| K | 18 | 18 | 0 |" in text


def test_a_killed_client_resumes_without_redoing_finished_shards(tmp_path):
    # every graph on 6..8 vertices (OEIS A000088: 156 + 1,044 + 12,346) in three shards;
    # the client (and its workers) is killed once a shard is stored; --resume keeps that
    # shard's part and evaluates the rest; the digest is the one of an uninterrupted run
    import signal
    import sqlite3
    import subprocess
    import sys
    from .conftest import SHARDED_ENERGY, wait_for_stored_cases
    claim = tmp_path / "graphs.toml"
    claim.write_text(SHARDED_ENERGY)
    store = tmp_path / "s.sqlite"
    command = [sys.executable, "-m", "verifier", "run", str(claim), "--quiet", "--workers",
               "1", "--store", str(store), "--certificates", str(tmp_path / "certs")]
    process = subprocess.Popen(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                               start_new_session=True, cwd=tmp_path)
    assert wait_for_stored_cases(store, table="shard_parts")
    os.killpg(process.pid, signal.SIGKILL)
    process.wait()
    with sqlite3.connect(store) as db:
        before = db.execute("SELECT shard, start, stop FROM shard_parts").fetchall()
        finished = db.execute("SELECT COUNT(*) FROM runs WHERE finished IS NOT NULL"
                              ).fetchone()[0]
    assert before and finished == 0
    resumed = subprocess.run(command + ["--resume"], capture_output=True, text=True,
                             timeout=300, cwd=tmp_path)
    assert resumed.returncode == 0, resumed.stderr[-2000:]
    whole = run([claim], RunOptions(store=str(tmp_path / "w.sqlite"), workers=2))
    with sqlite3.connect(store) as db:
        after = db.execute("SELECT shard, start, stop FROM shard_parts").fetchall()
        runs = db.execute("SELECT COUNT(*) FROM runs").fetchone()[0]
    assert runs == 1 and set(before) <= set(after)
    assert sorted(s for s, _, _ in after) == ["0|6/all", "0|7/all", "0|8/p0000-1043"]
    certificate = json.loads((tmp_path / "certs" / "energy-graphs-8.json").read_text())
    assert certificate["digest"] == whole.claims[0].digest
    assert certificate["cases"] == 156 + 1044 + 12346

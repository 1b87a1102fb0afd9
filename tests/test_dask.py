"""The same runs on a real dask.distributed LocalCluster (2 worker processes)."""

from __future__ import annotations

import os
import random
import signal
import sqlite3
import subprocess
import sys
import threading
import time
from pathlib import Path

import pytest

from verifier.certificates import certificate_of
from verifier.run.runner import RunOptions, digest_of, run

from .conftest import ENERGY_ON_SIX_VERTICES, wait_for_stored_cases

ROOT = Path(__file__).resolve().parent.parent
LIBRARY = ROOT / "claims"


@pytest.fixture(scope="module")
def cluster():
    from dask.distributed import Client, LocalCluster
    local = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                         dashboard_address=None, silence_logs=40)
    client = Client(local)
    yield local, client
    client.close()
    local.close()


def comparable(certificate: dict) -> dict:
    """A certificate without what may differ between engines: times, engine, run, versions."""
    skip = {"created", "seconds", "engine", "run", "versions", "sha256"}
    return {k: v for k, v in certificate.items() if k not in skip}


def test_library_gives_the_same_digests_and_certificates_on_dask(cluster, tmp_path):
    local, _client = cluster
    on_dask = run([LIBRARY], RunOptions(store=str(tmp_path / "d.sqlite"), engine="dask",
                                        scheduler=local.scheduler_address))
    on_processes = run([LIBRARY], RunOptions(store=str(tmp_path / "p.sqlite"), workers=2))
    assert on_dask.ok and on_processes.ok
    for a, b in zip(on_dask.claims, on_processes.claims):
        assert a.claim.name == b.claim.name
        assert (a.digest, a.cases, a.counts) == (b.digest, b.cases, b.counts), a.claim.name
        assert comparable(certificate_of(a, on_dask)) == comparable(certificate_of(b, on_processes))


def test_a_killed_worker_costs_only_a_retry(cluster, tmp_path):
    local, client = cluster
    claim = LIBRARY / "energy.toml"
    reference = run([claim], RunOptions(store=str(tmp_path / "ref.sqlite"), engine="inline"))
    pids = list(client.run(os.getpid).values())

    def kill_one():
        time.sleep(1.0)
        os.kill(pids[0], signal.SIGKILL)

    killer = threading.Thread(target=kill_one)
    killer.start()
    result = run([claim], RunOptions(store=str(tmp_path / "k.sqlite"), engine="dask",
                                     scheduler=local.scheduler_address))
    killer.join()
    (claim_result,) = result.claims
    assert claim_result.cases == reference.claims[0].cases
    assert claim_result.digest == reference.claims[0].digest
    assert claim_result.counts == reference.claims[0].counts
    client.wait_for_workers(2, timeout=60)        # the nanny brought the worker back


def test_resume_across_engines_after_killing_the_client(tmp_path):
    # a dask run whose client (and local cluster) is killed, resumed with local processes
    claim = tmp_path / "energy-6.toml"
    claim.write_text(ENERGY_ON_SIX_VERTICES.format(cases=10000))
    store = tmp_path / "s.sqlite"
    process = subprocess.Popen([sys.executable, "-m", "verifier", "run", str(claim), "--quiet",
                                "--engine", "dask", "--workers", "2", "--store", str(store),
                                "--certificates", str(tmp_path / "certs")],
                               stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                               start_new_session=True, cwd=tmp_path)
    assert wait_for_stored_cases(store)
    time.sleep(random.Random(11).uniform(0.5, 1.5))
    os.killpg(process.pid, signal.SIGKILL)
    process.wait()
    with sqlite3.connect(store) as db:
        partial = db.execute("SELECT COUNT(*) FROM cases").fetchone()[0]
    resumed = subprocess.run([sys.executable, "-m", "verifier", "run", str(claim), "--quiet",
                              "--resume", "--store", str(store), "--certificates",
                              str(tmp_path / "certs")], capture_output=True, text=True,
                             timeout=300, cwd=tmp_path)
    assert resumed.returncode == 0, resumed.stderr
    whole = run([claim], RunOptions(store=str(tmp_path / "w.sqlite"), workers=2))
    with sqlite3.connect(store) as db:
        rows = db.execute("SELECT case_id, complex_hash FROM cases").fetchall()
        runs = db.execute("SELECT COUNT(*) FROM runs").fetchone()[0]
    assert runs == 1 and 0 < partial < whole.claims[0].cases
    assert len(rows) == len(set(rows)) == whole.claims[0].cases
    assert digest_of(rows) == whole.claims[0].digest


SHARDED_ENERGY = """[[claim]]
name = "energy-graphs-8"
statement = "sum(green(K)) == euler(K)"
source = "O. Knill, The energy of a simplicial complex, Linear Algebra Appl. 600 (2020) 96-129"
[[claim.over]]
family = "graphs"
min_vertices = 6
max_vertices = 8
as = "flag"
"""


def test_a_worker_killed_mid_shard_loses_and_duplicates_nothing(cluster, tmp_path):
    # every graph on 6, 7 and 8 vertices (156 + 1,044 + 12,346, OEIS A000088) in three
    # shards generated by the workers; once the two small shards are stored, the worker
    # busy with the big one is killed: Dask gives that shard to the other worker (or the
    # engine splits it); the counts and the digest are those of a local run
    local, client = cluster
    claim = tmp_path / "energy-graphs-8.toml"
    claim.write_text(SHARDED_ENERGY)
    reference = run([claim], RunOptions(store=str(tmp_path / "p.sqlite"), workers=2))
    (expected,) = reference.claims
    assert expected.cases == 156 + 1044 + 12346 and expected.verdict == "holds"
    assert [e["shard"] for e in expected.shards] == ["0|6/all", "0|7/all", "0|8/p0000-1043"]
    store = tmp_path / "d.sqlite"
    killed = []

    def parts() -> tuple[int, int]:
        try:
            with sqlite3.connect(store) as db:
                return db.execute("SELECT COUNT(*), SUM(shard LIKE '0|8/%') FROM shard_parts"
                                  ).fetchone()
        except sqlite3.OperationalError:
            return 0, 0

    def kill_one():
        deadline = time.monotonic() + 240
        while time.monotonic() < deadline and parts()[0] < 2:
            time.sleep(0.02)
        pids = client.run(os.getpid)
        busy = [address for address, keys in client.processing().items() if keys]
        for address in busy:
            os.kill(pids[address], signal.SIGKILL)
        killed.append((len(busy), parts()[1] or 0))

    killer = threading.Thread(target=kill_one)
    killer.start()
    result = run([claim], RunOptions(store=str(store), engine="dask",
                                     scheduler=local.scheduler_address))
    killer.join()
    assert killed == [(1, 0)], "the worker with the big shard was not killed mid-shard"
    (got,) = result.claims
    assert (got.cases, got.counts, got.digest) == (expected.cases, expected.counts,
                                                   expected.digest)
    assert got.shards == expected.shards
    with sqlite3.connect(store) as db:      # no shard counted twice
        rows = db.execute("SELECT shard, start, stop FROM shard_parts ORDER BY shard, start"
                          ).fetchall()
    covered = {}
    for shard, start, stop in rows:
        assert covered.get(shard, 0) == start
        covered[shard] = stop
    client.wait_for_workers(2, timeout=60)

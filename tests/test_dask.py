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

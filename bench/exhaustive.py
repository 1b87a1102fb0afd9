"""Benchmarks of the exhaustive families: every graph on 9 and 10 vertices through the
runner, and the generation of every surface on <= 9 vertices and every 2-sphere on 12.

exhaustive-graphs-9    the energy claim over all 274,668 flag complexes of graphs on 9
                       vertices, `verifier run` with 2 local workers (sharded planning);
                       baseline: the same claim planned case by case over 20,000 random
                       flag complexes of G(9, 1/2) (the same sizes on average), scaled to
                       274,668 cases.  Target: at least 5,000 cases/s per core.
exhaustive-graphs-10   all 12,005,168 graphs on 10 vertices through the Dask engine on a
                       LocalCluster of 2 workers.  BENCH_GRAPHS10=whole runs every shard
                       (the default); BENCH_GRAPHS10=<k> runs k shards spread over the
                       family whole and projects the whole run from their cases per second.
                       Baseline: the same shards on the local engine (2 workers).
generate-surfaces-9    every closed surface with 4..9 vertices, generated in a fresh interpreter.
generate-spheres-2d-12 every 2-sphere with 12 vertices, generated in a fresh interpreter.
"""

from __future__ import annotations

import os
import tempfile
import time
from pathlib import Path

ENERGY = ('[[claim]]\nname = "{name}"\nstatement = "sum(green(K)) == euler(K)"\n'
          'source = "O. Knill, The energy of a simplicial complex, Linear Algebra Appl. 600 '
          '(2020) 96-129"\n[[claim.over]]\n{family}\n')

# OEIS A000088: graphs on n vertices (n = 9, 10)
GRAPHS_9, GRAPHS_10 = 274_668, 12_005_168


def _claim(folder: Path, name: str, family: str) -> Path:
    path = folder / f"{name}.toml"
    path.write_text(ENERGY.format(name=name, family=family))
    return path


def bench_exhaustive_graphs_9():
    from verifier.run.runner import RunOptions, run

    folder = Path(tempfile.mkdtemp(prefix="bench-graphs9-"))
    path = _claim(folder, "energy-graphs-9", 'family = "graphs"\nmin_vertices = 9\n'
                  'max_vertices = 9\nas = "flag"')
    start = time.perf_counter()
    result = run([path], RunOptions(store=str(folder / "s.sqlite"), workers=2))
    ours = time.perf_counter() - start
    (claim,) = result.claims
    assert claim.verdict == "holds" and claim.cases == GRAPHS_9, (claim.verdict, claim.cases)
    sample = 20_000
    flat = _claim(folder, "energy-random-9", f'family = "random-flag"\nvertices = 9\n'
                  f'edge_probability = 0.5\ncount = {sample}\nseed = 9')
    start = time.perf_counter()
    baseline = run([flat], RunOptions(store=str(folder / "b.sqlite"), workers=2))
    baseline_s = (time.perf_counter() - start) * GRAPHS_9 / sample
    assert baseline.claims[0].verdict == "holds"
    return {"ours_s": ours, "baseline_s": baseline_s, "cases": claim.cases,
            "cases_per_s_per_core": claim.cases / ours / 2,
            "shards": len(claim.shards), "digest": claim.digest,
            "ours": "verifier run, 2 local workers, sharded: each worker generates its shard",
            "baseline": f"the same claim planned case by case over {sample:,} random flag "
                        "complexes of G(9, 1/2), 2 workers, scaled to 274,668 cases",
            "target": "cases_per_s_per_core >= 5000"}


def _spread(keys: list, k: int) -> list:
    step = max(1, len(keys) // k)
    return keys[::step][:k]


def bench_exhaustive_graphs_10():
    from dask.distributed import Client, LocalCluster

    from verifier.claims.loader import load_paths
    from verifier.run.cases import sources_of
    from verifier.run.runner import RunOptions, run
    from verifier.run.engines import ProcessEngine
    from verifier.run.shards import run_shard, shard_keys
    from verifier.run.runner import _limits, limits_dict

    mode = os.environ.get("BENCH_GRAPHS10", "whole")
    folder = Path(tempfile.mkdtemp(prefix="bench-graphs10-"))
    path = _claim(folder, "energy-graphs-10", 'family = "graphs"\nmin_vertices = 10\n'
                  'max_vertices = 10\nas = "flag"')
    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                           dashboard_address=None, silence_logs=40)
    client = Client(cluster)
    try:
        if mode == "whole":
            start = time.perf_counter()
            result = run([path], RunOptions(store=str(folder / "s.sqlite"), engine="dask",
                                            scheduler=cluster.scheduler_address))
            ours = time.perf_counter() - start
            (claim,) = result.claims
            assert claim.verdict == "holds" and claim.cases == GRAPHS_10
            return {"ours_s": ours, "baseline_s": ours, "cases": claim.cases,
                    "cases_per_s_per_core": claim.cases / ours / 2, "whole": True,
                    "shards": len(claim.shards), "digest": claim.digest,
                    "ours": "verifier run --engine dask, LocalCluster of 2 workers, every shard",
                    "baseline": "(none: the whole run; ratio 1 by definition)",
                    "target": "whole if within 2 hours on 2 cores"}
        claims = load_paths([path])
        files, claim = sources_of(claims), claims[0]
        keys = _spread(shard_keys(claim), int(mode))
        limits = limits_dict(_limits(RunOptions(), 2))
        start = time.perf_counter()
        futures = [client.submit(run_shard, files, claim.name, key, 0, None, limits,
                                 pure=False) for key in keys]
        parts = client.gather(futures)
        ours = time.perf_counter() - start
        cases = sum(p["cases"] for p in parts)
        assert all(p["complete"] and p["counts"].get("holds") == p["cases"] for p in parts)
        engine = ProcessEngine(2)
        from verifier.run.engines import Batch
        start = time.perf_counter()
        local = [r for _b, r in engine.map(run_shard, [
            Batch((files, claim.name, key, 0, None, limits), [key], 1e9) for key in keys])]
        baseline = time.perf_counter() - start
        assert sum(p["cases"] for p in local) == cases
        rate = cases / ours
        return {"ours_s": ours, "baseline_s": baseline, "cases": cases, "whole": False,
                "shards_run": len(keys), "shards": len(shard_keys(claim)),
                "cases_per_s_per_core": rate / 2,
                "projected_whole_h": GRAPHS_10 / rate / 3600,
                "ours": f"{len(keys)} shards spread over the family, Dask LocalCluster of 2 "
                        "workers (each shard generated and evaluated whole)",
                "baseline": "the same shards on the local engine, 2 workers",
                "target": "projection of the whole run from the shards' cases per second"}
    finally:
        client.close()
        cluster.close()


def _generate(spec: dict) -> tuple[float, int, dict]:
    """Generate a family in a fresh interpreter (cold caches): seconds, count, count per
    number of vertices."""
    import json
    import subprocess
    import sys
    program = ("import json, sys, time\nfrom collections import Counter\n"
               "from verifier.families import make_family\n"
               "family = make_family(json.loads(sys.argv[1]))\n"
               "start = time.perf_counter()\n"
               "table = Counter(K.n_vertices for _cid, K in family)\n"
               "print(json.dumps([time.perf_counter() - start, sorted(table.items())]))\n")
    root = Path(__file__).resolve().parent.parent
    done = subprocess.run([sys.executable, "-c", program, json.dumps(spec)], cwd=root,
                          capture_output=True, text=True, check=True)
    seconds, rows = json.loads(done.stdout.strip().splitlines()[-1])
    table = {int(n): c for n, c in rows}
    return seconds, sum(table.values()), table


def bench_generate_surfaces_9():
    seconds, count, table = _generate({"family": "surfaces", "vertices": [4, 9]})
    # Sulanke and Lutz, Eur. J. Combin. 30 (2009), Table 1: 1, 1, 3, 9, 43, 655 surfaces
    # on 4..9 vertices
    assert table == {4: 1, 5: 1, 6: 3, 7: 9, 8: 43, 9: 655}, table
    return {"ours_s": seconds, "baseline_s": seconds, "cases": count, "per_vertices": table,
            "ours": "lexicographic enumeration in a fresh interpreter (compiled code from "
                    "numba's disk cache)",
            "baseline": "(none: ratio 1 by definition)"}


def bench_generate_spheres_2d_12():
    seconds, count, table = _generate({"family": "spheres", "dimension": 2, "vertices": 12})
    assert count == 7595, count           # OEIS A000109(12)
    return {"ours_s": seconds, "baseline_s": seconds, "cases": count,
            "ours": "vertex splitting level by level in a fresh interpreter (compiled code "
                    "from numba's disk cache)",
            "baseline": "(none: ratio 1 by definition)"}


BENCHMARKS = {
    "exhaustive-graphs-9": bench_exhaustive_graphs_9,
    "exhaustive-graphs-10": bench_exhaustive_graphs_10,
    "generate-surfaces-9": bench_generate_surfaces_9,
    "generate-spheres-2d-12": bench_generate_spheres_2d_12,
}

"""Benchmarks of the exact core against baselines measured in the same run.

Run:  python bench/run.py [--only NAME ...]     (or `make bench`)

Each benchmark times our exact method and a baseline on the same input, prints a table
and writes bench/results.json as {name: {"ours_s", "baseline_s", "ratio", ...}} with
ratio = baseline_s / ours_s (above 1 means we are faster).  Machines here are noisy, so
fast timings are the best of several repetitions; absolute times mean little, ratios
measured in one run mean more.  Every 'ours' result is checked for correctness (and
against the baseline's answer where the baseline gives one) before it is reported.

The python-flint characteristic-polynomial baselines take minutes each at order ~1,500.
certified-zeta takes about two minutes, mostly the exact charpoly of L^2 at order 1,000
(~30 s) and the mpmath baseline (~50 s).
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from pathlib import Path

import flint
import networkx as nx
import numpy as np

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from verifier import invariants as inv  # noqa: E402
from verifier import operations as ops  # noqa: E402
from verifier.complex import Complex  # noqa: E402
from verifier.exact import Matrix, signature  # noqa: E402
from verifier.exact import charpoly_is_reciprocal  # noqa: E402
from verifier.families import catalog  # noqa: E402
from bench.homology import BENCHMARKS as HOMOLOGY_BENCHMARKS  # noqa: E402
from bench.timing import best_of, fresh  # noqa: E402
from bench.discover import BENCHMARKS as DISCOVER_BENCHMARKS  # noqa: E402
from bench.exhaustive import BENCHMARKS as EXHAUSTIVE_BENCHMARKS  # noqa: E402
from bench.per_case import BENCHMARKS as PER_CASE_BENCHMARKS  # noqa: E402

RESULTS = ROOT / "bench" / "results.json"


def refined_torus(times: int) -> Complex:
    return ops.refine(catalog.complex("torus-7"), times)


def flint_identity(n: int):
    identity = flint.fmpz_mat(n, n)
    for i in range(n):
        identity[i, i] = 1
    return identity


def flint_dense_inverse(K: Complex):
    """Baseline: build L densely and solve L G = I with python-flint (exact, dense)."""
    L = inv.connection(fresh(K)).to_fmpz()
    return L.solve(flint_identity(L.nrows()), integer=True)


# --------------------------------------------------------------------- benchmarks
def bench_green_torus_r2():
    K = refined_torus(2)
    ours_s, g = best_of(5, lambda: inv.green(fresh(K)))
    baseline_s, G = best_of(1, lambda: flint_dense_inverse(K))
    assert g.provenance.startswith("star formula") and g == Matrix._from_flint(G)
    return {"ours_s": ours_s, "baseline_s": baseline_s, "size": len(K.simplices),
            "ours": "star formula + sparse exact check L*g = I",
            "baseline": "python-flint fmpz_mat.solve(L, I), dense exact"}


def bench_green_torus_r3():
    K = refined_torus(3)

    def ours():
        return inv.green(fresh(ops.refine(catalog.complex("torus-7"), 3)))

    ours_s, g = best_of(3, ours)
    assert g.provenance == "star formula, verified L*g = I exactly"
    assert g.total() == inv.euler(K) == 0          # energy theorem as a sanity check
    dense = inv.connection(K).int_array().astype(np.float64)
    baseline_s, _ = best_of(1, lambda: np.linalg.inv(dense))
    return {"ours_s": ours_s, "baseline_s": baseline_s, "size": len(K.simplices),
            "ours": "refine + star formula + exact check, total",
            "baseline": "numpy float64 dense inverse (not exact; python-flint dense exact "
                        "inversion at this order is far slower still)",
            "target": "ours_s < 10"}


def bench_energy_atlas():
    graphs = [g for g in nx.graph_atlas_g() if g.number_of_nodes() > 0]
    complexes = [Complex.from_graph(g, flag=True) for g in graphs]
    euler = [inv.euler(K) for K in complexes]

    def ours():
        greens = inv.green_many(fresh(K) for K in complexes)
        return [g.total() for g in greens]

    def baseline():
        sums = []
        for K in complexes:
            sets = [set(x) for x in K.simplices]
            n = len(sets)
            L = flint.fmpz_mat([[1 if sets[i] & sets[j] else 0 for j in range(n)]
                                for i in range(n)])
            G = L.solve(flint_identity(n), integer=True)
            sums.append(sum(int(x) for x in G.entries()))
        return sums

    ours_s, sums = best_of(3, ours)
    baseline_s, baseline_sums = best_of(3, baseline)
    assert sums == euler == baseline_sums          # the energy theorem, both ways
    return {"ours_s": ours_s, "baseline_s": baseline_s, "cases": len(complexes),
            "ours": "batched float proposals, each verified exactly",
            "baseline": "build L, python-flint exact solve, case by case"}


def _reciprocal_case(K: Complex, expect: bool, label: str):
    L = inv.connection(K)
    ours_s, verdict = best_of(1, lambda: charpoly_is_reciprocal(inv.connection(fresh(K)),
                                                                  square=True))
    A = L.to_fmpz()
    baseline_s, q = best_of(1, lambda: (A * A).charpoly())
    coefficients = [int(c) for c in q.coeffs()]
    truth = coefficients == coefficients[::-1] or coefficients == [-c for c in coefficients[::-1]]
    assert verdict.value == truth == expect, label
    return {"ours_s": ours_s, "baseline_s": baseline_s, "size": len(K.simplices),
            "answer": verdict.value, "evidence": verdict.evidence,
            "error_bound": (f"{float(verdict.error_bound):.3g}"
                            if verdict.error_bound is not None else None)}


def bench_reciprocal_r2():
    torus = _reciprocal_case(refined_torus(2), False, "torus r2")
    graph = nx.gnm_random_graph(300, 1200, seed=2026)
    one_dim = _reciprocal_case(Complex.from_graph(graph), True, "random graph")
    ours_s = torus["ours_s"] + one_dim["ours_s"]
    baseline_s = torus["baseline_s"] + one_dim["baseline_s"]
    return {"ours_s": ours_s, "baseline_s": baseline_s,
            "ours": "randomized modular test with exact witness / stated error bound",
            "baseline": "python-flint fmpz_mat.charpoly(L*L), then compare coefficients",
            "torus-r2": torus, "graph-300-1200": one_dim}


def bench_signature_r2():
    K = refined_torus(2)
    ours_s, sig = best_of(5, lambda: signature(inv.connection(fresh(K))))
    dense = inv.connection(K).int_array().astype(np.float64)
    eig_s, eigenvalues = best_of(5, lambda: np.linalg.eigvalsh(dense))
    A = inv.connection(K).to_fmpz()
    start = time.perf_counter()
    p = [int(c) for c in A.charpoly().coeffs()]
    signs = [c > 0 for c in p if c != 0]
    changes = sum(1 for a, b in zip(signs, signs[1:]) if a != b)
    descartes_s = time.perf_counter() - start
    even = sum(1 for x in K.simplices if len(x) % 2 == 1)
    assert sig == (even, len(K.simplices) - even, 0)
    assert changes == sig[0]                       # Descartes: positive roots
    assert int((eigenvalues > 0).sum()) == sig[0]
    return {"ours_s": ours_s, "baseline_s": eig_s, "size": len(K.simplices),
            "ours": "exact symmetric elimination with +-1 pivots (Sylvester)",
            "baseline": "numpy float64 eigvalsh",
            "descartes_s": descartes_s, "ratio_vs_descartes": descartes_s / ours_s}


def bench_runner_atlas():
    """The energy claim over the flag complexes of the whole graph atlas through the
    runner (the code path of `verifier run`), 2 workers against 1 worker."""
    import tempfile

    from verifier.run.runner import RunOptions, run

    folder = Path(tempfile.mkdtemp(prefix="bench-runner-"))
    claim = folder / "energy-atlas.toml"
    claim.write_text('[[claim]]\nname = "energy-atlas"\nstatement = "sum(green(K)) == euler(K)"\n'
                     'source = "O. Knill, Linear Algebra Appl. 600 (2020)"\n'
                     '[[claim.over]]\nfamily = "graphs"\nmax_vertices = 7\nas = "flag"\n')

    def timed(workers: int, tag: str, max_cases=None):
        best, result = float("inf"), None
        for attempt in range(3):
            options = RunOptions(store=str(folder / f"{tag}-{attempt}.sqlite"), workers=workers,
                                 engine="processes", max_cases=max_cases)
            start = time.perf_counter()
            result = run([claim], options)
            best = min(best, time.perf_counter() - start)
        return best, result

    timed(2, "warm-up", max_cases=10)      # imports and caches, outside the timings
    one_s, one = timed(1, "one")
    two_s, two = timed(2, "two")
    assert one.ok and two.ok and one.claims[0].digest == two.claims[0].digest
    cases = two.claims[0].cases
    return {"ours_s": two_s, "baseline_s": one_s, "cases": cases,
            "cases_per_s_2_workers": cases / two_s, "cases_per_s_1_worker": cases / one_s,
            "ours": "verifier run, 2 worker processes", "baseline": "the same, 1 worker",
            "target": "ratio >= 1.6"}


def bench_dask_atlas():
    """The energy claim over the atlas's flag complexes on a 2-worker LocalCluster against
    the local process engine with 2 workers (both through the runner)."""
    import tempfile

    from dask.distributed import Client, LocalCluster

    from verifier.run.runner import RunOptions, run

    folder = Path(tempfile.mkdtemp(prefix="bench-dask-"))
    claim = folder / "energy-atlas.toml"
    claim.write_text('[[claim]]\nname = "energy-atlas"\nstatement = "sum(green(K)) == euler(K)"\n'
                     'source = "O. Knill, Linear Algebra Appl. 600 (2020)"\n'
                     '[[claim.over]]\nfamily = "graphs"\nmax_vertices = 7\nas = "flag"\n')
    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                           dashboard_address=None, silence_logs=40)
    client = Client(cluster)
    try:
        def timed(engine: str, tag: str):
            best, result = float("inf"), None
            for attempt in range(3):
                options = RunOptions(store=str(folder / f"{tag}-{attempt}.sqlite"), workers=2,
                                     engine=engine, scheduler=cluster.scheduler_address)
                start = time.perf_counter()
                result = run([claim], options)
                best = min(best, time.perf_counter() - start)
            return best, result

        timed("dask", "warm-up")
        dask_s, on_dask = timed("dask", "dask")
        local_s, on_local = timed("processes", "local")
    finally:
        client.close()
        cluster.close()
    assert on_dask.claims[0].digest == on_local.claims[0].digest
    return {"ours_s": dask_s, "baseline_s": local_s, "cases": on_dask.claims[0].cases,
            "ours": "verifier run --engine dask (LocalCluster, 2 workers)",
            "baseline": "verifier run, local engine, 2 workers", "target": "ratio >= 0.8"}


def bench_campaign_1e6():
    """10^6 small cases through `verifier run` (local engine, 2 workers): cases per
    second, store size, and the time `verifier summary` takes on that store."""
    import subprocess
    import tempfile

    folder = Path(tempfile.mkdtemp(prefix="bench-campaign-"))
    claim = folder / "energy-million.toml"
    claim.write_text('[[claim]]\nname = "energy-million"\n'
                     'statement = "sum(green(K)) == euler(K)"\n'
                     'source = "O. Knill, Linear Algebra Appl. 600 (2020)"\n'
                     '[[claim.over]]\nfamily = "random-flag"\nvertices = [4, 9]\n'
                     'edge_probability = 0.5\ncount = 1000000\nseed = 2026\n')
    store = folder / "campaign.sqlite"
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-m", "verifier", "run", str(claim), "--workers", "2",
                           "--store", str(store), "--certificates", str(folder / "certs")],
                          cwd=folder, capture_output=True, text=True)
    run_s = time.perf_counter() - start
    assert done.returncode == 0, done.stderr[-2000:]
    start = time.perf_counter()
    summary = subprocess.run([sys.executable, "-m", "verifier", "summary", "--store", str(store)],
                             cwd=folder, capture_output=True, text=True)
    summary_s = time.perf_counter() - start
    assert summary.returncode == 0 and "1000000" in summary.stdout, summary.stdout
    size = store.stat().st_size + sum(p.stat().st_size for p in folder.glob("campaign.sqlite-*"))
    return {"ours_s": run_s, "baseline_s": run_s, "cases": 1_000_000,
            "cases_per_s": 1_000_000 / run_s, "cases_per_s_per_core": 500_000 / run_s,
            "store_bytes": size, "summary_s": summary_s,
            "projection_1e8_cases_on_64_workers_h": 1e8 / (500_000 / run_s * 64) / 3600,
            "ours": "verifier run, 2 workers, 10^6 random flag complexes",
            "baseline": "(none: ratio 1 by definition)", "target": "summary_s < 5"}


def bench_paper_scale():
    """Cases per second per core for each shipped claim (from a run of the library with
    the local engine), and the wall time projected for 10^6 and 10^8 cases on N workers
    (linear in cases, divided by workers: the runner's client is not the bottleneck up to
    the campaign's rate, see campaign-1e6)."""
    import tempfile

    from verifier.run.runner import RunOptions, run

    folder = Path(tempfile.mkdtemp(prefix="bench-scale-"))
    start = time.perf_counter()
    result = run([ROOT / "claims"], RunOptions(store=str(folder / "s.sqlite"), workers=2))
    wall = time.perf_counter() - start
    assert result.ok
    claims = {}
    for r in result.claims:
        per_core = r.cases / max(r.seconds, 1e-9)       # case-seconds are per-core time
        claims[r.claim.name] = {
            "cases": r.cases, "cases_per_s_per_core": round(per_core, 1),
            "projected_h": {f"{n:g} cases on {w} workers": round(n / (per_core * w) / 3600, 3)
                            for n in (1e6, 1e8) for w in (2, 16, 64, 256)}}
    return {"ours_s": wall, "baseline_s": wall, "claims": claims,
            "ours": "the shipped library, local engine, 2 workers",
            "baseline": "(none: ratio 1 by definition)"}


def refined_cycle(n: int) -> Complex:
    """The cycle C_n refined once: C_2n, with 2n vertices and 2n edges, 4n simplices."""
    return ops.refine(Complex.from_facets([[i, (i + 1) % n] for i in range(n)]))


def _mp_rational(q):
    import mpmath
    return mpmath.mpf(q.numerator) / q.denominator


def _mp_zeta_terms(enclosures):
    """[(log lambda, multiplicity)] in mpmath (current mp.prec) from the midpoints of our
    certified eigenvalue enclosures (all positive here), grouped by distinct eigenvalue."""
    import mpmath
    from collections import Counter
    middles = Counter((lo + hi) / 2 for lo, hi in enclosures)
    return [(mpmath.log(_mp_rational(q)), m) for q, m in middles.items()]


def _mp_zeta(terms, s):
    """zeta(s) = sum_lambda lambda^(-s) = sum m exp(-s log lambda), mpmath floating point."""
    import mpmath
    total = mpmath.mpc(0)
    for log_lambda, m in terms:
        total += m * mpmath.exp(-s * log_lambda)
    return total


def _evaluation_points(count):
    """Run count() once while recording where the certified code evaluates zeta: the
    midpoints (re, im), as Fractions, of the acb arguments of every evaluation (points and
    the balls covering whole pieces of the contour).  Returns (count's result, points)."""
    from verifier.exact import certified

    evaluate, points = certified._zeta_acb, []

    def recording(logs, s):
        points.append(s)
        return evaluate(logs, s)

    certified._zeta_acb = recording
    try:
        result = count()
    finally:
        certified._zeta_acb = evaluate
    middles = []
    for s in points:
        (a, b), (c, d) = certified._arb_interval(s.real), certified._arb_interval(s.imag)
        middles.append(((a + b) / 2, (c + d) / 2))
    return result, middles


def _eigen_small(n: int, bits: int):
    """Eigenvalues of L^2 on a small refined cycle: certified enclosures (exact charpoly,
    root isolation) against mpmath's symmetric eigensolver at the same precision."""
    import mpmath

    from verifier.exact import charpoly_of_square, eigenvalue_enclosures

    K = refined_cycle(n)
    L = inv.connection(K)
    ours_s, enclosures = best_of(1, lambda: eigenvalue_enclosures(
        charpoly_of_square(inv.connection(fresh(K))), bits))
    with mpmath.workprec(bits):
        A = mpmath.matrix((L @ L).rows())
        baseline_s, values = best_of(1, lambda: mpmath.eigsy(A, eigvals_only=True))
        values = sorted(values)
        deviation = max(abs(v - _mp_rational((lo + hi) / 2)) for v, (lo, hi) in
                        zip(values, enclosures))
    assert len(values) == len(enclosures) == len(K.simplices)
    assert deviation < mpmath.mpf(2) ** (-bits // 2), deviation
    return {"ours_s": ours_s, "baseline_s": baseline_s, "ratio": baseline_s / ours_s,
            "n": n, "size": len(K.simplices), "bits": bits,
            "max_deviation_float": float(deviation),
            "ours": "exact charpoly (Graeffe from L) + certified root isolation",
            "baseline": "mpmath.eigsy on L^2 (floating point, not certified)"}


def bench_certified_zeta():
    """Certified zero counting of zeta(s) = sum lambda^(-s), lambda running over the
    spectrum of A = L^2 for the refined cycle C_250 (1000 simplices): zeros on the segment
    {i t : 0 <= t <= T} and in the box |Re s| < 1/2, 0 < Im s < T.  The spectrum is closed
    under lambda -> 1/lambda (1-dimensional complex), so zeta is real on the imaginary axis.
    Baseline: mpmath at the same precision evaluating zeta at the midpoints of every
    argument our counter evaluates, from the midpoints of our eigenvalue enclosures (so
    the eigenvalue computation is in neither side of the ratio)."""
    from fractions import Fraction

    import mpmath

    from verifier.exact import certified, charpoly_of_square, eigenvalue_enclosures
    from verifier.exact import zeros_in_box, zeros_on_axis, zeta_ball

    n, bits, T = 250, 128, Fraction(50)
    box = (Fraction(-1, 2), Fraction(1, 2), Fraction(0), T)
    K = refined_cycle(n)
    L = inv.connection(K)
    charpoly_s, poly = best_of(1, lambda: charpoly_of_square(L))     # det(x I - L^2), exact
    assert poly.degree == len(K.simplices) == 4 * n

    def isolate():
        spectrum = certified._Spectrum(poly)   # factor; the roots are cached per precision
        spectrum.roots(bits)                   # arb isolation + exact sign-change check
        return spectrum

    isolation_s, spectrum = best_of(1, isolate)
    enclosures = eigenvalue_enclosures(spectrum, bits)
    axis_s, on_axis = best_of(1, lambda: zeros_on_axis(spectrum, 0, T, prec=bits, max_prec=bits))
    box_s, in_box = best_of(1, lambda: zeros_in_box(spectrum, *box, prec=bits, max_prec=bits))
    counting_s = axis_s + box_s

    # The same evaluations again, recorded (untimed); the counts must not change.
    again_axis, axis_points = _evaluation_points(
        lambda: zeros_on_axis(spectrum, 0, T, prec=bits, max_prec=bits))
    again_box, box_points = _evaluation_points(
        lambda: zeros_in_box(spectrum, *box, prec=bits, max_prec=bits))
    assert (again_axis, again_box) == (on_axis, in_box)

    with mpmath.workprec(bits):
        def evaluate(points):
            terms = _mp_zeta_terms(enclosures)
            return [_mp_zeta(terms, mpmath.mpc(_mp_rational(x), _mp_rational(y)))
                    for x, y in points]

        baseline_axis_s, _ = best_of(1, lambda: evaluate(axis_points))
        baseline_box_s, _ = best_of(1, lambda: evaluate(box_points))
        baseline_s = baseline_axis_s + baseline_box_s

        # Float evidence: sign changes of Re zeta(i t) (mpmath) on a grid of [0, T].
        steps = 20 * int(T)
        terms = _mp_zeta_terms(enclosures)
        start = time.perf_counter()
        grid = [_mp_zeta(terms, mpmath.mpc(0, _mp_rational(T * k / steps))).real
                for k in range(steps + 1)]
        grid_s = time.perf_counter() - start
        sign_changes = sum(1 for a, b in zip(grid, grid[1:]) if (a > 0) != (b > 0))

        # The mpmath value at s = i T lies in (or within rounding of) our certified ball.
        (re_lo, re_hi), (im_lo, im_hi) = zeta_ball(spectrum, (0, T), bits)
        value = _mp_zeta(terms, mpmath.mpc(0, _mp_rational(T)))
        slack = mpmath.mpf(2) ** (-bits // 2)
        assert _mp_rational(re_lo) - slack <= value.real <= _mp_rational(re_hi) + slack
        assert _mp_rational(im_lo) - slack <= value.imag <= _mp_rational(im_hi) + slack

    assert on_axis == sign_changes, (on_axis, sign_changes)
    assert in_box >= on_axis           # every zero i t with 0 < t < T lies in the box
    small = _eigen_small(25, bits)
    shared_s = charpoly_s + isolation_s
    return {"ours_s": counting_s, "baseline_s": baseline_s,
            "n": n, "size": len(K.simplices), "bits": bits, "T": str(T),
            "box": [str(x) for x in box],
            "zeros_on_axis": on_axis, "zeros_in_box": in_box,
            "grid_sign_changes_float": sign_changes, "grid_points": steps + 1, "grid_s": grid_s,
            "charpoly_s": charpoly_s, "isolation_s": isolation_s,
            "axis_s": axis_s, "box_s": box_s,
            "baseline_axis_s": baseline_axis_s, "baseline_box_s": baseline_box_s,
            "evaluations_axis": len(axis_points), "evaluations_box": len(box_points),
            "distinct_eigenvalues": len({(lo + hi) / 2 for lo, hi in enclosures}),
            "end_to_end_ours_s": shared_s + counting_s,
            "end_to_end_baseline_s": shared_s + baseline_s,
            "ours": "certified counts: zeros_on_axis + zeros_in_box (acb, argument "
                    "principle / monotone bisection), given the certified spectrum",
            "baseline": "mpmath mpc at the same precision, zeta evaluated at the midpoints of "
                        "the same arguments, eigenvalues = midpoints of our enclosures "
                        "(values only: no enclosure, no derivative bound, no decision)",
            "shared": "exact charpoly det(x I - L^2) by Graeffe from charpoly(L), then "
                      "factoring + certified root isolation; counted in both end-to-end times",
            "eigen-100": small}


# ------------------------------------------------------------------ scale (issue 10)
def bench_green_poincare_r2():
    """The Green function of the Poincare homology sphere refined twice (226,208 simplices,
    dimension 3), exact with its check, against the same star formula evaluated as an
    unchecked floating-point sparse product (what the check costs on top of the formula)."""
    import scipy.sparse as sp

    K = ops.refine(catalog.complex("poincare-sphere-16"), 2)
    ours_s, g = best_of(3, lambda: inv.green(fresh(K)))
    assert g.provenance == "star formula, verified L*g = I exactly"
    assert g.total() == inv.euler(K) == 0              # energy theorem as a sanity check

    def unchecked():
        faces, cofaces = K.containments()
        w = (1 - 2 * (np.repeat(np.arange(K.dim + 1), K.f_vector) % 2)).astype(np.float64)
        n = len(K.simplices)
        M = sp.csr_array((w[faces] * w[cofaces], (faces, cofaces)), shape=(n, n))
        return M @ sp.diags_array(w) @ M.T

    baseline_s, G = best_of(3, unchecked)
    difference = G - g.to_scipy().astype(np.float64)
    assert abs(difference).max() == 0                  # the same matrix
    return {"ours_s": ours_s, "baseline_s": baseline_s, "size": len(K.simplices),
            "nnz_g": g.nnz(), "target": "ours_s <= 5",
            "ours": "star formula g = M D M^T + exact check of L g = I (verified factors)",
            "baseline": "the same star formula as an unchecked float64 scipy product"}


def _scale_measurements() -> dict:
    """Times of the operations on refine(torus-7, 6) (1,959,552 simplices), run in a fresh
    process by :func:`bench_scale_1e6` so that its peak memory is this work's alone."""
    import resource

    times = {}

    def timed(name, work):
        start = time.perf_counter()
        value = work()
        times[name] = time.perf_counter() - start
        return value

    torus = catalog.complex("torus-7")
    R = timed("refine_s", lambda: ops.refine(torus, 6))
    facets = [list(R.label_of(f)) for f in R.facets]
    K = timed("from_facets_s", lambda: Complex.from_facets(facets))
    assert K == R
    f = timed("f_vector_s", lambda: inv.f_vector(K))
    chi = timed("euler_s", lambda: inv.euler(K))
    wu = timed("wu_s", lambda: inv.wu(K))
    sig = timed("signature_s", lambda: signature(inv.connection(K)))
    step = K.n_vertices // 10
    links = timed("links_s", lambda: [ops.link(K, (v,)) for v in range(0, 10 * step, step)])
    closed = timed("closed_manifold_s", lambda: inv.is_closed_manifold(K))
    manifold = timed("manifold_s", lambda: inv.is_manifold(K))
    digest = timed("content_hash_s", lambda: K.content_hash)
    # Facts checked: a torus has chi = 0 and, being a closed manifold, Wu = chi [GB];
    # the signature of L counts even- and odd-dimensional simplices [HE]; vertex links of
    # a closed surface are circles (as many edges as vertices).
    assert chi == 0 and wu == 0 and closed and manifold and len(digest) == 64
    assert sig == (f[0] + f[2], f[1], 0)
    assert all(L.dim == 1 and L.f_vector[0] == L.f_vector[1] for L in links)
    peak_kb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return {"size": len(K.simplices), "f_vector": list(f), "peak_rss_gb": peak_kb / 2 ** 20,
            **times}


def bench_scale_1e6():
    """A complex with 1,959,552 simplices (the 7-vertex torus refined six times): build
    time against gudhi's SimplexTree built from the same facets, and the times of
    euler, wu, f_vector, signature(connection(K)), ten links, the manifold tests and the
    content hash, with the peak memory of the process that ran them."""
    import subprocess

    import gudhi

    child = subprocess.run([sys.executable, "-c", "import json, bench.run as b; "
                            "print(json.dumps(b._scale_measurements()))"],
                           cwd=ROOT, capture_output=True, text=True, check=True)
    row = json.loads(child.stdout.strip().splitlines()[-1])
    R = ops.refine(catalog.complex("torus-7"), 6)
    facets = np.array([list(R.label_of(f)) for f in R.facets], dtype=np.int64)

    def build_tree():
        tree = gudhi.SimplexTree()
        tree.insert_batch(facets.T, np.zeros(len(facets)))
        return tree

    baseline_s, tree = best_of(1, build_tree)
    assert tree.num_simplices() == row["size"]
    assert list(tree.num_simplices_by_dimension()) == row["f_vector"]
    operations = sum(row[k] for k in row if k.endswith("_s") and k != "from_facets_s")
    row.update({"ours_s": row["from_facets_s"], "baseline_s": baseline_s,
                "operations_s": operations, "target": "build in seconds; each operation well "
                "below a minute; peak at most 8 GB",
                "ours": "Complex.from_facets on the facets (closure, ordering, index arrays)",
                "baseline": "gudhi SimplexTree.insert_batch of the same facets"})
    return row


BENCHMARKS = {
    "green-torus-r2": bench_green_torus_r2,
    "green-torus-r3": bench_green_torus_r3,
    "energy-atlas": bench_energy_atlas,
    "reciprocal-r2": bench_reciprocal_r2,
    "signature-r2": bench_signature_r2,
    "runner-atlas": bench_runner_atlas,
    "dask-atlas": bench_dask_atlas,
    "campaign-1e6": bench_campaign_1e6,
    "paper-scale": bench_paper_scale,
    "certified-zeta": bench_certified_zeta,
    "green-poincare-r2": bench_green_poincare_r2,
    "scale-1e6": bench_scale_1e6,
}
BENCHMARKS.update(HOMOLOGY_BENCHMARKS)
BENCHMARKS.update(DISCOVER_BENCHMARKS)
BENCHMARKS.update(EXHAUSTIVE_BENCHMARKS)
BENCHMARKS.update(PER_CASE_BENCHMARKS)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", nargs="*", choices=sorted(BENCHMARKS), default=None,
                        help="run only these benchmarks (results of others are kept)")
    args = parser.parse_args(argv)
    results = json.loads(RESULTS.read_text()) if RESULTS.exists() else {}
    for name in args.only or BENCHMARKS:
        print(f"running {name} ...", flush=True)
        row = BENCHMARKS[name]()
        row["ratio"] = row["baseline_s"] / row["ours_s"]
        results[name] = row
        RESULTS.write_text(json.dumps(results, indent=1, sort_keys=True) + "\n")
    print(f"\n{'benchmark':<16} {'ours (s)':>10} {'baseline (s)':>13} {'ratio':>9}  note")
    for name, row in results.items():
        note = ""
        if name == "signature-r2":
            note = f"vs Descartes on exact charpoly: {row['ratio_vs_descartes']:.0f}x"
        if name.startswith("homology-"):
            note = f"{row['size']} simplices, {row['homology']}; target {row['target']}"
            if "peak_rss_gb" in row:
                note += (f"; build {row['build_s']:.1f} s + homology {row['homology_s']:.1f} s,"
                         f" peak {row['peak_rss_gb']:.1f} GB")
        if name == "green-torus-r3":
            note = "target: ours under 10 s"
        if name == "green-poincare-r2":
            note = (f"{row['size']} simplices, target at most 5 s; baseline: unchecked "
                    "float64 star formula")
        if name == "scale-1e6":
            note = (f"{row['size']} simplices: build vs gudhi SimplexTree; refine "
                    f"{row['refine_s']:.1f} s, signature(L) {row['signature_s']:.1f} s, wu "
                    f"{row['wu_s']:.1f} s, closed manifold {row['closed_manifold_s']:.1f} s, "
                    f"10 links {row['links_s']:.1f} s, hash {row['content_hash_s']:.1f} s, "
                    f"peak {row['peak_rss_gb']:.1f} GB")
        if name.startswith("exhaustive-graphs"):
            note = (f"{row['cases']:,} cases, {row['cases_per_s_per_core']:.0f} cases/s/core"
                    + ("" if row.get("whole", True) else
                       f" ({row['shards_run']} of {row['shards']} shards; whole run projected "
                       f"{row['projected_whole_h']:.2f} h)"))
        if name == "per-case-energy":
            note = (f"run_batch {row['run_batch_cases_per_s']:.0f} cases/s per core; "
                    + ", ".join(f"{k} {v['ours_us']:.0f} vs {v['baseline_us']:.0f} us"
                                for k, v in row["steps"].items()))
        if name.startswith("generate-"):
            note = f"{row['cases']:,} complexes generated"
        if name == "campaign-1e6":
            note = (f"{row['cases_per_s']:.0f} cases/s, store {row['store_bytes'] / 1e6:.0f} MB,"
                    f" summary {row['summary_s']:.1f} s")
        if name == "certified-zeta":
            note = (f"{row['size']} simplices, {row['bits']} bits, T={row['T']}: "
                    f"{row['zeros_on_axis']} zeros on axis (float grid "
                    f"{row['grid_sign_changes_float']}), {row['zeros_in_box']} in box; mpmath at "
                    f"our {row['evaluations_axis'] + row['evaluations_box']} arguments; shared "
                    f"charpoly {row['charpoly_s']:.0f} s + isolation {row['isolation_s']:.0f} s")
        print(f"{name:<16} {row['ours_s']:>10.4f} {row['baseline_s']:>13.3f} "
              f"{row['ratio']:>9.1f}  {note}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())

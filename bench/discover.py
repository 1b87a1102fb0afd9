"""Benchmark of `verifier discover` over the atlas of small complexes, against sympy.

discover-atlas: the 16,351 complexes with at most 6 vertices (all-complexes,
max_vertices = 6; OEIS A003182 up to n = 6) and 12 expressions (f_0..f_3, b_0..b_2,
euler, wu, sum(green), positive(L), negative(L)).  Values: every expression on every
case, exactly, in a pool of 2 processes (green and connection dominate: one exact
inverse and one exact signature per case, the connection matrix shared between
positive and negative).  Relations: ours is the exact kernel of the 16,351 x 13 matrix
(duplicate rows dropped, python-flint echelon form, LLL-reduced integer basis, each
relation checked on every case); the baseline is sympy's exact ``Matrix.nullspace`` on
the same matrix, in the same run (best of 9 each).  Both must give the same rational kernel.
"""

from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from verifier.discover import find_relations, value_table  # noqa: E402
from verifier.discover.values import Expression  # noqa: E402
from verifier.families import make_family  # noqa: E402
from bench.timing import best_of  # noqa: E402

EXPRESSIONS = ([f"(f_vector(K)[{k}] if dim(K) >= {k} else 0)" for k in range(4)]
               + [f"betti(K, {k})" for k in range(3)]
               + ["euler(K)", "wu(K)", "sum(green(K))", "positive(connection(K))",
                  "negative(connection(K))"])


def bench_discover_atlas() -> dict:
    import sympy
    family = make_family({"family": "all-complexes", "max_vertices": 6})
    table = value_table([family], [Expression(t, t) for t in EXPRESSIONS], workers=2)
    relations_s, result = best_of(9, lambda: find_relations(table))
    matrix = sympy.Matrix([[1] + row for row in table.values])
    baseline_s, kernel = best_of(9, matrix.nullspace)
    ours = sympy.Matrix([[r.coefficients.get(k, 0) for k in ["1"] + EXPRESSIONS]
                         for r in result.relations])
    theirs = sympy.Matrix.hstack(*kernel).T if kernel else sympy.zeros(0, len(EXPRESSIONS) + 1)
    assert ours.rank() == theirs.rank() == sympy.Matrix.vstack(ours, theirs).rank()
    return {"ours_s": relations_s, "baseline_s": baseline_s, "values_s": table.seconds,
            "cases": len(table.case_ids), "expressions": len(EXPRESSIONS),
            "relations": [r.text for r in result.relations], "workers": table.workers}


BENCHMARKS = {"discover-atlas": bench_discover_atlas}

if __name__ == "__main__":
    print(bench_discover_atlas())

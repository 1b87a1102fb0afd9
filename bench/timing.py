"""Timing helpers shared by the benchmarks: the best of several runs, a fresh complex."""

from __future__ import annotations

import time


def best_of(repeats: int, work):
    """(best wall time, last result) of `repeats` calls of work()."""
    best, result = float("inf"), None
    for _ in range(repeats):
        start = time.perf_counter()
        result = work()
        best = min(best, time.perf_counter() - start)
    return best, result


def fresh(K):
    """The same complex with empty caches, so that every timing starts from scratch."""
    return type(K)(K.labels, K.simplices)

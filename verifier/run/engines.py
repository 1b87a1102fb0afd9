"""Engines: where batches of cases are evaluated.

An engine is a small class with one method, :meth:`map`, that applies the batch function
(:func:`verifier.run.cases.run_batch`) to batches of arguments and yields
``(batch, records)`` as batches finish, in any order.  The runner does everything else
(planning, the store, progress), so a new engine is one new class.

* :class:`InlineEngine` evaluates in the calling process (debugging, tiny runs).
* :class:`ProcessEngine` keeps one worker process per core.  A watchdog gives every batch
  a time budget (cases x per-case limit, plus slack): a worker that overruns it or dies is
  killed and replaced; its batch is retried case by case, and a single case that overruns
  again is recorded as ``limit`` (or ``error`` if its worker keeps dying) -- never lost.
"""

from __future__ import annotations

import multiprocessing as mp
import os
import queue
import time
import traceback
from collections import deque

__all__ = ["InlineEngine", "ProcessEngine", "Batch"]


class Batch:
    """Arguments of one call of the batch function, and what to record if it cannot run."""

    __slots__ = ("args", "case_ids", "budget", "attempt")

    def __init__(self, args: tuple, case_ids: list[str], budget: float, attempt: int = 0):
        self.args, self.case_ids, self.budget, self.attempt = args, case_ids, budget, attempt


class InlineEngine:
    name = "inline"

    def __init__(self, workers: int = 1):
        self.workers = 1

    def map(self, function, batches):
        for batch in batches:
            yield batch, function(*batch.args)

    def close(self):
        pass


def _worker_main(function, tasks, results):
    """A worker: take (number, args) tasks until None, send (number, records | error).
    It stops by itself when the process that started it is gone (killed client).
    Its linear algebra runs single-threaded: the engine already keeps every core busy,
    and BLAS threads inherited through fork would only compete with the other workers."""
    from threadpoolctl import threadpool_limits
    threadpool_limits(1)
    parent = os.getppid()
    while True:
        try:
            task = tasks.get(timeout=1.0)
        except queue.Empty:
            if os.getppid() != parent:
                return
            continue
        if task is None:
            return
        number, args = task
        try:
            results.put((number, os.getpid(), function(*args), None))
        except BaseException:  # report, keep serving: one bad batch must not end the run
            results.put((number, os.getpid(), None, traceback.format_exc(limit=5)))


class ProcessEngine:
    """Local worker processes with a watchdog (see module docstring)."""

    name = "processes"

    def __init__(self, workers: int | None = None, slack: float = 10.0):
        self.workers = max(1, workers or os.cpu_count() or 1)
        self.slack = slack
        methods = mp.get_all_start_methods()
        self.context = mp.get_context("fork" if "fork" in methods else "spawn")

    def _start(self, function):
        tasks = self.context.Queue()
        process = self.context.Process(target=_worker_main, args=(function, tasks, self.results),
                                       daemon=True)
        process.start()
        return {"process": process, "tasks": tasks, "batch": None, "number": None,
                "started": 0.0}

    def map(self, function, batches):
        self.results = self.context.Queue()
        pending = deque(batches)
        workers = [self._start(function) for _ in range(min(self.workers, max(len(pending), 1)))]
        numbers = iter(range(1 << 62))
        try:
            while pending or any(w["batch"] is not None for w in workers):
                for w in workers:  # hand out work
                    if w["batch"] is None and pending:
                        batch = pending.popleft()
                        w.update(batch=batch, number=next(numbers), started=time.monotonic())
                        w["tasks"].put((w["number"], batch.args))
                try:
                    number, pid, records, error = self.results.get(timeout=0.2)
                except queue.Empty:
                    number = None
                if number is not None:
                    owner = next((w for w in workers if w["number"] == number), None)
                    if owner is not None:
                        batch = owner["batch"]
                        owner.update(batch=None, number=None)
                        if error is None:
                            yield batch, records
                        else:
                            yield batch, _failed(batch, "error",
                                                 "worker raised: " + error.strip().splitlines()[-1])
                for i, w in enumerate(workers):  # watchdog
                    batch = w["batch"]
                    if batch is None:
                        continue
                    dead = not w["process"].is_alive()
                    late = time.monotonic() - w["started"] > batch.budget
                    if not (dead or late):
                        continue
                    w["process"].kill()
                    w["process"].join(5)
                    workers[i] = self._start(function)
                    if len(batch.case_ids) > 1:       # retry its cases one by one
                        for single in _split(batch):
                            pending.appendleft(single)
                    elif dead and batch.attempt == 0:  # a crash: one more try
                        pending.appendleft(Batch(batch.args, batch.case_ids, batch.budget, 1))
                    else:
                        outcome = "limit" if late else "error"
                        reason = ("seconds: the case ran past its time limit" if late
                                  else "the worker process died while evaluating the case")
                        yield batch, _failed(batch, outcome, reason)
        finally:
            for w in workers:
                if w["process"].is_alive():
                    w["tasks"].put(None)
            for w in workers:
                w["process"].join(1)
                if w["process"].is_alive():
                    w["process"].kill()

    def close(self):
        pass


def _split(batch: Batch) -> list[Batch]:
    files, claim, _case_ids, limits = batch.args
    per_case = batch.budget / max(len(batch.case_ids), 1)
    return [Batch((files, claim, [cid], limits), [cid], per_case, batch.attempt)
            for cid in batch.case_ids]


def _failed(batch: Batch, outcome: str, message: str) -> list[dict]:
    """Records for cases the engine could not evaluate (the runner fills in the rest)."""
    return [{"case_id": cid, "outcome": outcome, "message": message, "complex_hash": "",
             "seconds": 0.0, "_engine_failure": True} for cid in batch.case_ids]

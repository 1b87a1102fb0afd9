"""Engines: where batches of cases are evaluated.

An engine is a small class with one method, :meth:`map`, that applies the batch function
(:func:`verifier.run.cases.run_batch`) to batches of arguments and yields
``(batch, records)`` as batches finish, in any order.  The runner does everything else
(planning, the store, progress), so a new engine is one new class.

* :class:`InlineEngine` evaluates in the calling process (debugging, tiny runs).
* :class:`DaskEngine` sends batches to a ``dask.distributed`` cluster: a local one it
  starts itself, or a running scheduler.  Dask moves the batches of a worker that dies to
  another worker; a watchdog like the one below cancels a batch that overruns its
  budget, restarts that worker, and retries the batch case by case.
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

__all__ = ["InlineEngine", "ProcessEngine", "DaskEngine", "Batch"]


class Batch:
    """Arguments of one call of the batch function, and what to record if it cannot run.

    ``splitter`` (optional) cuts a batch that failed into smaller batches, or returns
    None when the batch is one case; without it a batch of several case ids is split into
    one batch per case (a sharded claim's batch is one shard, split by ranges of its
    cases: :mod:`verifier.run.shards`)."""

    __slots__ = ("args", "case_ids", "budget", "attempt", "splitter")

    def __init__(self, args: tuple, case_ids: list[str], budget: float, attempt: int = 0,
                 splitter=None):
        self.args, self.case_ids, self.budget, self.attempt = args, case_ids, budget, attempt
        self.splitter = splitter

    def pieces(self) -> list["Batch"] | None:
        """Smaller batches covering this one, or None when it is a single case."""
        if self.splitter is not None:
            return self.splitter(self)
        return _split(self) if len(self.case_ids) > 1 else None


class InlineEngine:
    name = "inline"

    def __init__(self, workers: int = 1):
        self.workers = 1

    def map(self, function, batches):
        for batch in batches:
            yield batch, function(*batch.args)

    def close(self):
        pass


def _limit_memory(megabytes: int | None):
    """Cap this process's address space at its current size plus ``megabytes``: a case
    that needs more raises MemoryError, which the case records as a 'memory' limit."""
    if not megabytes:
        return
    import resource
    with open("/proc/self/statm") as statm:
        pages = int(statm.read().split()[0])
    current = pages * os.sysconf("SC_PAGE_SIZE")
    cap = current + megabytes * 1024 * 1024
    resource.setrlimit(resource.RLIMIT_AS, (cap, cap))


def _worker_main(function, tasks, results, memory=None):
    """A worker: take (number, args) tasks until None, send (number, records | error).
    It stops by itself when the process that started it is gone (killed client).
    Its linear algebra runs single-threaded: the engine already keeps every core busy,
    and BLAS threads inherited through fork would only compete with the other workers."""
    from threadpoolctl import threadpool_limits
    threadpool_limits(1)
    results.put((-1, os.getpid(), None, None))   # starts the queue's thread before any cap
    if memory:   # the libraries a case may need are loaded first: the cap is the case's
        from ..claims import backend  # noqa: F401
        from .cases import _load_kernels
        _load_kernels()      # compiled kernels too (compiled once per machine, then cached)
    _limit_memory(memory)
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

    def __init__(self, workers: int | None = None, slack: float = 10.0,
                 memory: int | None = None):
        self.workers = max(1, workers or os.cpu_count() or 1)
        self.slack = slack
        self.memory = memory
        methods = mp.get_all_start_methods()
        self.context = mp.get_context("fork" if "fork" in methods else "spawn")

    def _start(self, function):
        tasks = self.context.Queue()
        process = self.context.Process(target=_worker_main,
                                       args=(function, tasks, self.results, self.memory),
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
                    pieces = batch.pieces()
                    if pieces:                         # retry it piece by piece
                        for single in reversed(pieces):
                            pending.appendleft(single)
                    elif dead and batch.attempt == 0:  # a crash: one more try
                        pending.appendleft(Batch(batch.args, batch.case_ids, batch.budget, 1,
                                                 batch.splitter))
                    else:
                        outcome = "limit" if late else "error"
                        reason = ("seconds: the case ran past its time limit" if late
                                  else "the worker process died while evaluating the case"
                                  + (f" (out of memory? one case may use {self.memory} MB)"
                                     if self.memory else ""))
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


class DaskEngine:
    """Batches on a ``dask.distributed`` cluster (see the module docstring).

    ``scheduler=None`` starts a ``LocalCluster`` with ``workers`` single-threaded worker
    processes (one per core by default); otherwise it connects to ``scheduler``
    (``tcp://HOST:PORT``).  At most two batches per worker are in flight, so the
    watchdog's clock starts close to when a batch starts.
    """

    name = "dask"

    def __init__(self, workers: int | None = None, scheduler: str | None = None,
                 slack: float = 10.0, memory: int | None = None):
        from dask.distributed import Client, LocalCluster

        self.cluster = None
        if scheduler:
            self.client = Client(scheduler, timeout="30s")
        else:
            extra = {"memory_limit": f"{memory + 600}MB"} if memory else {}
            self.cluster = LocalCluster(n_workers=max(1, workers or os.cpu_count() or 1),
                                        threads_per_worker=1, processes=True,
                                        dashboard_address=None, silence_logs=40, **extra)
            self.client = Client(self.cluster)
        self.workers = max(1, len(self.client.scheduler_info()["workers"]))
        self.slack = slack
        self.memory = memory

    def map(self, function, batches):
        from dask.distributed import wait

        pending = deque(batches)
        running: dict = {}                        # future -> (batch, submitted at)
        limit = 2 * self.workers
        while pending or running:
            while pending and len(running) < limit:
                batch = pending.popleft()
                future = self.client.submit(_call_threadsafe, function, batch.args, pure=False)
                running[future] = (batch, time.monotonic())
            try:
                done, _ = wait(list(running), timeout=0.5, return_when="FIRST_COMPLETED")
            except TimeoutError:         # nothing finished in this half second
                done = []
            for future in done:
                batch, _started = running.pop(future)
                try:
                    records = future.result()
                except Exception as error:        # noqa: BLE001 - recorded with the cases
                    if type(error).__name__ == "KilledWorker":
                        pieces = batch.pieces()
                        if pieces:                    # find the case that kills workers
                            pending.extendleft(reversed(pieces))
                            continue
                        records = _failed(batch, "limit", "memory: workers kept dying on this "
                                          "case (out of memory or crashed"
                                          + (f"; one case may use {self.memory} MB)"
                                             if self.memory else ")"))
                    else:
                        records = _failed(batch, "error", f"worker raised: {error}")
                yield batch, records
            now = time.monotonic()
            for future, (batch, started) in list(running.items()):
                if now - started <= batch.budget + self.slack:
                    continue
                running.pop(future)
                self._stop(future)
                pieces = batch.pieces()
                if pieces:
                    for single in reversed(pieces):
                        pending.appendleft(single)
                else:
                    yield batch, _failed(batch, "limit",
                                         "seconds: the case ran past its time limit")

    def _stop(self, future):
        """Cancel an overrunning batch and restart the worker stuck in it."""
        processing = self.client.processing()
        busy = [address for address, keys in processing.items() if future.key in keys]
        self.client.cancel(future)
        if busy:
            try:
                self.client.restart_workers(busy)
            except Exception:  # noqa: BLE001 - a worker that cannot restart is retired
                self.client.retire_workers(busy)

    def plan(self, function, *args):
        """Run a planning function (e.g. an exhaustive enumeration) on a worker."""
        return self.client.submit(function, *args, pure=False).result()

    def close(self):
        self.client.close()
        if self.cluster is not None:
            self.cluster.close()


def _call_threadsafe(function, args):
    """Worker-side call with single-threaded linear algebra (as in the process engine)."""
    from threadpoolctl import threadpool_limits
    with threadpool_limits(1):
        return function(*args)

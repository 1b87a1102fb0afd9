"""The runner: claims in, cases evaluated, store written, counterexamples shrunk.

:func:`run` loads every claim first (nothing runs until all load), plans each claim's
cases, skips those a resumed run already has, sends batches to an engine, writes each
finished batch to the store (only this process writes), shrinks the first failing case
of each claim to a minimal counterexample, and summarises.  The run id is a hash of the
request (claim files' contents and options), so ``resume=True`` finds the interrupted
run of the same request and completes it without losing or repeating a case.

The digest of a claim is the SHA-256 of its sorted ``case_id complex_hash`` lines: the
same whatever the engine, the number of workers or the interruptions.
"""

from __future__ import annotations

import hashlib
import json
import math
import os
import time
from dataclasses import dataclass, field
from pathlib import Path

from ..claims.evaluate import Limits
from ..claims.loader import Claim, load_paths
from ..families.named import data_folders
from .cases import _claims as _claims_cache
from .cases import complexes_of, family_label, limits_dict, plan, run_batch, sources_of
from .engines import Batch, DaskEngine, InlineEngine, ProcessEngine
from .shards import (ShardError, case_at, count_shard, is_sharded, line_value, run_shard,
                     shard_keys)
from .shrink import shrink
from .store import Store, StoreError, check_store_path, verdict_of

__all__ = ["run", "RunOptions", "ClaimResult", "RunResult", "digest_of", "ENGINES",
           "OptionError", "check_options", "check_output_folder", "max_workers",
           "MAX_CASE_SECONDS", "default_case_memory", "CLIENT_MARGIN"]

ENGINES = {"processes": ProcessEngine, "inline": InlineEngine, "dask": DaskEngine}

WORKERS_PER_CORE = 4                # the most worker processes per core a run may start
MAX_CASE_SECONDS = 7 * 86_400.0     # one week: the longest time one case may be given
MAX_CASES = 10**12


class OptionError(ValueError):
    """An option of a run is out of range, or a path it names cannot be used; the message
    names the option and says what is valid.  Raised before any work."""


def max_workers() -> int:
    """The most workers a run may start: WORKERS_PER_CORE per core of this machine."""
    return WORKERS_PER_CORE * (os.cpu_count() or 1)


def _physical_megabytes() -> int | None:
    try:
        return os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES") // 2**20
    except (ValueError, OSError, AttributeError):
        return None


MEMORY_SHARE = 0.75     # of the machine's memory, shared by the workers and the client
MIN_CASE_MEMORY = 256   # megabytes: no default cap below this
CLIENT_MARGIN = 10.0    # seconds the client may take past a case's time limit (start-up
                        # and clean-up of the process that does the work)


def default_case_memory(workers: int) -> int | None:
    """The memory cap of one case when --case-memory is not given, in megabytes: three
    quarters of the machine's memory shared by the workers and the client (which shrinks
    counterexamples under the same cap), at least 256 MB; None if the machine does not
    say how much memory it has."""
    memory = _physical_megabytes()
    if memory is None:
        return None
    return max(MIN_CASE_MEMORY, int(memory * MEMORY_SHARE) // (max(1, workers) + 1))


def _in_child(function, args: tuple, seconds: float, memory: int | None):
    """``function(*args)`` in a forked process under the case limits: its memory capped
    like a worker's, killed after ``seconds``.  Returns ("ok", value), ("limit", reason)
    or ("error", reason).  Keeps the client within the limits whatever the input."""
    import multiprocessing as mp
    from .engines import _limit_memory
    if "fork" not in mp.get_all_start_methods():   # no fork: in this process, timer only
        try:
            return "ok", function(*args)
        except Exception as error:  # noqa: BLE001 - reported with the case
            return "error", f"{type(error).__name__}: {error}"
    context = mp.get_context("fork")
    receive, send = context.Pipe(duplex=False)

    def child():
        try:
            if memory:      # libraries first: the cap is the work's, as in a worker
                from ..claims import backend  # noqa: F401
            _limit_memory(memory)
            send.send(("ok", function(*args)))
        except MemoryError:
            send.send(("limit", f"memory: more than the {memory} MB one case may use"))
        except BaseException as error:  # noqa: BLE001 - reported to the parent
            send.send(("error", f"{type(error).__name__}: {error}"))

    process = context.Process(target=child, daemon=True)
    process.start()
    send.close()
    try:
        if receive.poll(seconds):
            try:
                return receive.recv()
            except EOFError:
                pass
            process.join(5)
            return "error", "the process died (out of memory or crashed)"
        return "limit", f"seconds: it took longer than {seconds:.0f} s"
    finally:
        if process.is_alive():
            process.kill()
        process.join(5)
        receive.close()


def _whole(value) -> bool:
    return isinstance(value, int) and not isinstance(value, bool)


def check_options(options: "RunOptions") -> None:
    """Refuse options that make no sense, naming the option and what is valid.

    >>> check_options(RunOptions(case_timeout=float("nan")))
    Traceback (most recent call last):
    ...
    verifier.run.runner.OptionError: --case-timeout must be a number of seconds with 0 < seconds <= 604800, got nan
    """
    if options.engine not in ENGINES:
        raise OptionError(f"--engine must be one of {', '.join(ENGINES)}, got "
                          f"{options.engine!r}")
    top = max_workers()
    if options.workers is not None and not (_whole(options.workers)
                                            and 1 <= options.workers <= top):
        raise OptionError(f"--workers must be an integer from 1 to {top} ({WORKERS_PER_CORE} "
                          f"per core on this machine), got {options.workers!r}")
    timeout = options.case_timeout
    if not (isinstance(timeout, (int, float)) and not isinstance(timeout, bool)
            and math.isfinite(timeout) and 0 < timeout <= MAX_CASE_SECONDS):
        raise OptionError(f"--case-timeout must be a number of seconds with 0 < seconds <= "
                          f"{MAX_CASE_SECONDS:.0f}, got {timeout!r}")
    if options.max_cases is not None and not (_whole(options.max_cases)
                                              and 1 <= options.max_cases <= MAX_CASES):
        raise OptionError(f"--max-cases must be an integer from 1 to {MAX_CASES:,}, got "
                          f"{options.max_cases!r}")
    memory = _physical_megabytes()
    if options.case_memory is not None and not (
            _whole(options.case_memory) and 1 <= options.case_memory
            and (memory is None or options.case_memory <= memory)):
        limit = f"from 1 to {memory} (this machine's memory)" if memory else "of at least 1"
        raise OptionError(f"--case-memory must be a number of megabytes {limit}, got "
                          f"{options.case_memory!r}")
    if options.batch_size is not None and not (_whole(options.batch_size)
                                               and 1 <= options.batch_size <= 1_000_000):
        raise OptionError(f"batch size must be an integer from 1 to 1000000, got "
                          f"{options.batch_size!r}")
    shrink_seconds = options.shrink_seconds
    if not (isinstance(shrink_seconds, (int, float)) and math.isfinite(shrink_seconds)
            and 0 < shrink_seconds <= MAX_CASE_SECONDS):
        raise OptionError(f"shrinking time must be a number of seconds with 0 < seconds <= "
                          f"{MAX_CASE_SECONDS:.0f}, got {shrink_seconds!r}")
    if options.scheduler is not None and options.engine != "dask":
        raise OptionError("--scheduler needs --engine dask")
    for folder in options.data_folders:
        if not os.path.isdir(folder):
            raise OptionError(f"--data-folder {str(folder)!r}: no such folder")


def check_output_folder(folder: str | Path, option: str) -> None:
    """Refuse an output folder that cannot be written, before any work: it must be a
    folder (or creatable under one) in which files can be created.  Creates nothing."""
    path = Path(folder)
    if path.exists() and not path.is_dir():
        raise OptionError(f"{option} {str(folder)!r} is a file, not a folder")
    ancestor = path if path.is_dir() else next(
        (p for p in path.parents if os.path.lexists(p)), Path("."))
    if not ancestor.is_dir():
        raise OptionError(f"{option} {str(folder)!r} cannot be created: {str(ancestor)!r} is "
                          "a file, not a folder")
    import tempfile
    try:
        handle, probe = tempfile.mkstemp(dir=ancestor, prefix=".verifier-probe-")
    except OSError as error:
        raise OptionError(f"{option} {str(folder)!r}: cannot create files in "
                          f"{str(ancestor)!r} ({error.strerror or error})") from None
    os.close(handle)
    os.unlink(probe)


@dataclass
class RunOptions:
    store: str = "reports/verifier.sqlite"
    workers: int | None = None
    engine: str = "processes"
    scheduler: str | None = None          # dask: address of a running scheduler
    case_memory: int | None = None        # megabytes a worker may add for one case
    resume: bool = False
    max_cases: int | None = None
    case_timeout: float = 60.0
    batch_size: int | None = None
    shrink_seconds: float = 300.0
    data_folders: tuple = ()               # folders a `file` family may read besides the
                                           # claim file's own (verifier run --data-folder)
    command: str | None = None             # the command line, recorded with the run
    rerun: dict | None = None              # {"of": run id, "cases": {claim: [case ids]}}:
                                           # evaluate only these cases (verifier run --again)


@dataclass
class ClaimResult:
    claim: Claim
    counts: dict
    cases: int
    digest: str
    seconds: float
    meets_expectation: bool
    verdict: str                       # what a reader is told: holds / fails / undecided /
                                       # incomplete (store.verdict_of)
    counterexample: dict | None = None
    problems: list = field(default_factory=list)
    certified: list = field(default_factory=list)   # certified values per case (with bits)
    shards: list | None = None         # a sharded claim: [{"shard", "cases", "sum"}] in order


@dataclass
class RunResult:
    run_id: str
    store: str
    claims: list[ClaimResult]
    seconds: float
    engine: str
    workers: int
    resumed: bool

    @property
    def ok(self) -> bool:
        return all(c.meets_expectation for c in self.claims)

    def _repr_html_(self) -> str:
        from ..report import run_html
        return run_html(self)


def request_of(claims: list[Claim], options: RunOptions) -> dict:
    """What identifies a run: the claims (as data, with their files' contents hashed) and
    the options that change which cases are evaluated and how."""
    files = sorted({c.file for c in claims})
    contents = {f: hashlib.sha256(Path(f).read_bytes()).hexdigest() for f in files}
    return {"files": files, "file_sha256": contents,
            "claims": [c.to_json() for c in claims], "max_cases": options.max_cases,
            "limits": limits_dict(Limits(seconds=options.case_timeout)),
            **({"rerun": options.rerun} if options.rerun else {})}


def digest_of(rows) -> str:
    """SHA-256 over the sorted 'case_id complex_hash' lines of a claim's cases."""
    h = hashlib.sha256()
    for case_id, complex_hash in sorted(rows):
        h.update(f"{case_id} {complex_hash}\n".encode())
    return h.hexdigest()


def _batches(files, claim: Claim, ids, size: int, limits: dict, case_seconds: float):
    """Batches of case ids, each with the time budget the engine's watchdog enforces: the
    per-case limit for every case, plus a margin for the evaluator's own (cooperative)
    deadline to fire first."""
    def budget(n: int) -> float:
        return case_seconds * n * 1.5 + 3.0

    chunk = []
    for case_id in ids:
        chunk.append(case_id)
        if len(chunk) == size:
            yield Batch((files, claim.name, chunk, limits), chunk, budget(len(chunk)))
            chunk = []
    if chunk:
        yield Batch((files, claim.name, chunk, limits), chunk, budget(len(chunk)))


def _hash_of_case(claim: Claim, case_id: str) -> str:
    env = complexes_of(claim, case_id)
    return ",".join(env[v].content_hash for v in claim.variables)


def _complete(claim: Claim, record: dict, limits: Limits | None = None) -> dict:
    """Fill in what an engine could not (a case whose worker was killed or died).  The
    case is rebuilt and hashed in a child process under the case limits, never in the
    client itself."""
    record.setdefault("claim", claim.name)
    record["family"] = record.get("family") or family_label(claim, record["case_id"])
    if not record.get("complex_hash") and record.get("_engine_failure"):
        limits = limits or Limits()
        status, value = _in_child(_hash_of_case, (claim, record["case_id"]),
                                  (limits.seconds or 60.0) + CLIENT_MARGIN, limits.memory)
        if status == "ok":
            record["complex_hash"] = value
        else:
            record["complex_hash"] = "unbuildable"
            record["message"] = (record.get("message") or "") + f"; building: {value}"
    record.pop("_engine_failure", None)
    return record


def run(paths, options: RunOptions | None = None, progress=None) -> RunResult:
    """Run the claims in ``paths`` (files or folders); see the module docstring.

    ``progress`` is an object with ``start(claim, total)``, ``advance(n)`` and ``done()``
    (the command line passes a rich progress bar); None for silence.
    """
    options = options or RunOptions()
    check_options(options)
    with data_folders(options.data_folders):
        return _run(paths, options, progress)


def _run(paths, options: RunOptions, progress) -> RunResult:
    started = time.monotonic()
    claims = load_paths(paths)
    if options.rerun is not None:      # only the claims that have cases to evaluate again
        claims = [c for c in claims if options.rerun["cases"].get(c.name)]
        if not claims:
            raise OptionError(f"--again {options.rerun['of']}: that run has no failing or "
                              "unsettled case of these claims: nothing to evaluate again")
    files = sources_of(claims)
    request = request_of(claims, options)
    run_id = hashlib.sha256(json.dumps(request, sort_keys=True).encode()).hexdigest()[:16]
    try:
        check_store_path(options.store)
    except StoreError as error:
        raise OptionError(f"--store: {error}") from None
    if options.resume and not Path(options.store).is_file():
        raise OptionError(f"--resume: nothing to resume: there is no store "
                          f"{str(options.store)!r} (run without --resume to start a run)")
    store = Store(options.store)
    try:
        if not options.resume:
            run_id = f"{run_id}-{int(time.time() * 1000)}"
        else:
            previous = [r for r in store.unfinished_runs() if r.startswith(run_id)]
            if not previous:
                finished = [r[0] for r in store.runs() if r[0].startswith(run_id)]
                state = (f"the last run of these claims ({finished[0]}) is finished"
                         if finished else "it holds no interrupted run of these claims with "
                         "these options")
                raise OptionError(f"--resume: nothing to resume in {str(options.store)!r}: "
                                  f"{state} (run without --resume to start a new run)")
            run_id = previous[0]
        resumed = store.open_run(run_id, request, options.engine, options.command)
        _claims_cache(files)   # loaded once here; forked workers inherit it
        engine_class = ENGINES[options.engine]
        memory = case_memory(options)
        if options.engine == "dask":
            engine = engine_class(options.workers, options.scheduler, memory=memory)
        elif options.engine == "processes":
            engine = engine_class(options.workers, memory=memory)
        else:
            engine = engine_class(options.workers)
        try:
            results = [_run_claim(claim, files, run_id, store, engine, options, progress)
                       for claim in claims]
        finally:
            engine.close()
        store.finish_run(run_id)
        return RunResult(run_id, str(options.store), results, time.monotonic() - started,
                         engine.name, engine.workers, resumed)
    finally:
        store.close()


def case_memory(options: RunOptions) -> int | None:
    """The memory cap of one case in force for a run: --case-memory, or the default for
    the number of workers (:func:`default_case_memory`)."""
    if options.case_memory is not None:
        return options.case_memory
    workers = options.workers or os.cpu_count() or 1
    return default_case_memory(workers if options.engine != "inline" else 1)


def _limits(options: RunOptions, workers: int) -> Limits:
    """The limits of every evaluation of a run, in workers and in the client alike."""
    return Limits(seconds=options.case_timeout, memory=case_memory(options))


def plan_ids(files: tuple[tuple[str, str], ...], claim_name: str,
             max_cases: int | None) -> list[str]:
    """Every case id of a claim, in order.  Engines that can run it remotely do
    (enumerating an exhaustive family is work for the cluster, not the client)."""
    return list(plan(_claims_cache(tuple(files))[claim_name], max_cases))


def _run_claim(claim: Claim, files, run_id: str, store: Store, engine, options: RunOptions,
               progress) -> ClaimResult:
    bounds = _limits(options, engine.workers)
    limits = limits_dict(bounds)
    if options.rerun is None and is_sharded(claim):
        return _run_sharded(claim, files, run_id, store, engine, options, progress, bounds)
    planner = getattr(engine, "plan", None)
    if options.rerun is not None:      # the earlier run's failing and unsettled cases
        ids = sorted(options.rerun["cases"].get(claim.name, []))
    else:
        ids = (planner(plan_ids, files, claim.name, options.max_cases) if planner
               else plan_ids(files, claim.name, options.max_cases))
    done = store.done_cases(run_id, claim.name)
    todo = [cid for cid in ids if cid not in done]
    size = options.batch_size or _batch_size(len(ids), engine.workers)
    if progress:
        progress.start(claim, len(ids), len(ids) - len(todo))
    for _batch, records in engine.map(
            run_batch, _batches(files, claim, todo, size, limits, options.case_timeout)):
        store.add_cases(run_id, [_complete(claim, r, bounds) for r in records])
        if progress:
            progress.advance(len(records))
    if progress:
        progress.done()
    return _summarise(store, run_id, claim, options)


# A shard's time budget for the watchdog: the per-case limit for this many cases (the
# number of cases of a shard is not known before it is generated; the per-case limit
# itself is enforced inside the worker, case by case).
SHARD_BUDGET_CASES = 100_000


def _sharded_cap(claim: Claim, options: RunOptions) -> None:
    cap = claim.max_cases or options.max_cases
    if cap is not None:
        raise OptionError(f"claim {claim.name!r} ranges over a family planned in shards "
                          f"(every case of it, generated by the workers): a cap on its cases "
                          f"(max_cases = {cap:,}) is not supported; ask the family for fewer "
                          "vertices instead")


def _run_sharded(claim: Claim, files, run_id: str, store: Store, engine, options: RunOptions,
                 progress, bounds: Limits) -> ClaimResult:
    """A claim over a sharded family: the client lists shard keys, never case ids; each
    worker generates and evaluates its shard (:mod:`.shards`); only parts and notable
    cases reach the store; a resumed run skips finished shards."""
    _sharded_cap(claim, options)
    try:
        keys = shard_keys(claim)
    except ShardError as error:
        raise OptionError(str(error)) from None
    limits = limits_dict(bounds)
    done = store.done_shards(run_id, claim.name)
    todo = [key for key in keys if key not in done]
    budget = options.case_timeout * SHARD_BUDGET_CASES * 1.5 + 3.0

    def splitter(batch: Batch):
        return _split_shard(claim, batch, bounds)

    batches = [Batch((files, claim.name, key, 0, None, limits), [key], budget,
                     splitter=splitter) for key in todo]
    if progress:
        progress.start(claim, len(keys), len(keys) - len(todo), unit="shards")
    for batch, result in engine.map(run_shard, batches):
        if isinstance(result, list):       # the engine could not evaluate this piece
            part, records = _failed_piece(claim, batch, result[0], bounds)
        else:
            part, records = result, result["notable"]
        store.add_shard_part(run_id, claim.name, part,
                             [_complete(claim, r, bounds) for r in records])
        if progress and part["complete"]:
            progress.advance(1)
    if progress:
        progress.done()
    return _summarise(store, run_id, claim, options, keys)


def _split_shard(claim: Claim, batch: Batch, bounds: Limits) -> list[Batch] | None:
    """Halves of a shard piece whose worker died or overran (None for a single case).  A
    piece open to the shard's end is first given its end by counting the shard in a
    child process of the client (generation only, under the case limits)."""
    files, name, key, start, stop, limits = batch.args
    if stop is None:
        status, value = _in_child(count_shard, (claim, key), (bounds.seconds or 60.0)
                                  * 10 + CLIENT_MARGIN, bounds.memory)
        if status != "ok":
            return None
        stop = value
    if stop - start <= 1:
        return None
    middle = (start + stop) // 2
    per_case = batch.budget / max(stop - start, 1)
    return [Batch((files, name, key, a, b, limits), [key], per_case * (b - a) + 3.0, 0,
                  batch.splitter) for a, b in ((start, middle), (middle, stop))]


def _failed_piece(claim: Claim, batch: Batch, failure: dict, bounds: Limits):
    """The part and record of a piece the engine gave up on: a single case (its worker
    kept dying or overran) or a shard that could not even be counted."""
    key, start = batch.args[2], batch.args[3]
    status, value = _in_child(case_at, (claim, key, start), (bounds.seconds or 60.0)
                              + CLIENT_MARGIN, bounds.memory)
    if status == "ok":
        case_id, complex_hash, last = value
    else:
        case_id, complex_hash, last = f"{key}#{start}", "unbuildable", True
    record = {"claim": claim.name, "case_id": case_id, "family": family_label(claim, case_id)
              if status == "ok" else claim.over[int(key.split("|")[0])].family.name,
              "complex_hash": complex_hash, "outcome": failure["outcome"],
              "message": failure["message"] + ("" if status == "ok" else f"; {value}"),
              "seconds": 0.0}
    part = {"shard": key, "start": start, "stop": start + 1, "complete": last, "cases": 1,
            "counts": {failure["outcome"]: 1}, "sum": f"{line_value(case_id, complex_hash):064x}", "seconds": 0.0}
    return part, [record]


def _batch_size(total: int | None, workers: int) -> int:
    if total is None:
        return 16
    return max(1, min(64, total // (workers * 8) or 1))


def _summarise(store: Store, run_id: str, claim: Claim, options: RunOptions,
               keys: list[str] | None = None) -> ClaimResult:
    counts = store.counts(run_id, claim.name)
    shards = None
    if keys is not None:        # a sharded claim: its shards' sums, in the planned order
        sums = {entry["shard"]: entry for entry in store.shard_sums(run_id, claim.name)}
        shards = [sums[key] for key in keys if key in sums]
    problems = store.problem_cases(run_id, claim.name)
    failing = counts["fails"] > 0
    meets, verdict = verdict_of(counts, claim.expect)
    counterexample = None
    if failing:
        counterexample = store.counterexample(run_id, claim.name)
        if counterexample is None:
            counterexample = _shrink_first(store, run_id, claim, options)
    return ClaimResult(claim, counts, sum(counts.values()), store.digest(run_id, claim.name),
                       store.seconds(run_id, claim.name), meets, verdict, counterexample, problems,
                       store.certified_values(run_id, claim.name), shards)


def _facets_of_case(claim: Claim, case_id: str) -> dict:
    env = complexes_of(claim, case_id)
    return {v: env[v].facet_labels() for v in claim.variables}


def _shrink_record(claim: Claim, case_id: str, limits: Limits, seconds: float) -> dict:
    """Shrink the case and describe the result (runs in a child process)."""
    env = complexes_of(claim, case_id)
    shrunk = shrink(claim, env, limits, max_seconds=seconds)
    final = evaluate_case_env(claim, shrunk.env, limits)
    record = {
        "original": {v: env[v].facet_labels() for v in claim.variables},
        "complexes": {v: shrunk.env[v].facet_labels() for v in claim.variables},
        "sides": final["sides"],
        "witness": final["witness"],
        "evidence": final["evidence"],
        "certified": final["certified"],
        "steps": shrunk.steps,
        "evaluations": shrunk.evaluations,
        "minimal": shrunk.complete,
    }
    if shrunk.stopped:
        record["stopped"] = shrunk.stopped
    return record


def _shrink_first(store: Store, run_id: str, claim: Claim, options: RunOptions) -> dict:
    """Shrink the first failing case (in case-id order) and store the result.  The work
    runs in a child process under the case limits (memory cap, time limit per
    evaluation, --shrink-seconds in all), so the client never runs unguarded work; if
    the child cannot finish, the original case is kept, marked not minimal."""
    first = store.failing_cases(run_id, claim.name, limit=1)[0]
    limits = _limits(options, 1)
    seconds = options.shrink_seconds + options.case_timeout + CLIENT_MARGIN
    status, value = _in_child(_shrink_record,
                              (claim, first["case_id"], limits, options.shrink_seconds),
                              seconds, limits.memory)
    if status == "ok":
        record = {"case_id": first["case_id"], "family": first["family"],
                  "original_sides": first["sides"], **value}
    else:
        built, facets = _in_child(_facets_of_case, (claim, first["case_id"]),
                                  options.case_timeout + CLIENT_MARGIN, limits.memory)
        if built != "ok":
            facets = {v: [] for v in claim.variables}
        record = {"case_id": first["case_id"], "family": first["family"],
                  "original": facets, "original_sides": first["sides"], "complexes": facets,
                  "sides": first["sides"], "witness": first.get("witness"),
                  "evidence": first.get("evidence", "exact"),
                  "certified": first.get("certified") or [], "steps": [], "evaluations": 0,
                  "minimal": False, "stopped": f"shrinking could not finish: {value}"}
    store.save_counterexample(run_id, claim.name, first["case_id"], record)
    return record


def evaluate_case_env(claim: Claim, env: dict, limits: Limits) -> dict:
    """Sides, witness and evidence of the statement on an environment (it must fail)."""
    from ..claims.evaluate import Context, evaluate_claim
    outcome = evaluate_claim(claim.statement, env, Context(limits))
    return {"sides": outcome.sides, "witness": outcome.witness, "evidence": outcome.evidence,
            "certified": outcome.certified}


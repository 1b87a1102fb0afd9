"""Cases: what is tested, and the evaluation of one case.

A claim's cases come from its families: the union of the families bound to the same
variable, the product over different variables (capped by ``max_cases``).  A case is
named by a stable id built from the families' case ids, so that any process can rebuild
its complexes from the id alone (:func:`evaluate_case`), and a resumed run can tell which
cases are done.

The batch function :func:`run_batch` is what engines ship to workers: it takes plain
data (the claim files' texts, the claim name, the case ids, the limits) and returns plain
records, so it runs the same in a local process or on a cluster's machines.
"""

from __future__ import annotations

import itertools
import time
from dataclasses import asdict
from functools import lru_cache

from ..claims.errors import ClaimError, LimitExceeded, Undecided
from ..claims.evaluate import Context, Limits, evaluate, evaluate_claim, time_limit
from ..claims.loader import Claim, load_text

__all__ = ["case_parts", "plan", "evaluate_case", "run_batch", "EVIDENCE_ORDER", "join_id",
           "split_id"]

EVIDENCE_ORDER = ["exact", "certified", "probabilistic", "float"]
SEPARATOR = " & "


def join_id(parts: list[tuple[int, str]]) -> str:
    """The case id of a combination of family cases: 'ref|id' joined by ' & ', where
    ref is the position of the family's [[claim.over]] entry.  An '&' inside a family's
    id is doubled, so the separator (a lone '&' between spaces) cannot occur inside one.

    >>> join_id([(0, "catalog/torus-7"), (1, "file/a & b.txt")])
    '0|catalog/torus-7 & 1|file/a && b.txt'
    >>> split_id(_) == [(0, "catalog/torus-7"), (1, "file/a & b.txt")]
    True
    """
    return SEPARATOR.join(f"{ref}|{cid.replace('&', '&&')}" for ref, cid in parts)


def split_id(case_id: str) -> list[tuple[int, str]]:
    """The (ref, family case id) parts of a case id (inverse of :func:`join_id`)."""
    parts = []
    for piece in case_id.split(SEPARATOR):
        ref, cid = piece.split("|", 1)
        parts.append((int(ref), cid.replace("&&", "&")))
    return parts


def case_parts(claim: Claim):
    """For each bound variable (in order), the (over-entry index, case id) pairs it ranges
    over: the union of its families' cases."""
    per_variable = []
    for variable in claim.variables:
        per_variable.append([(i, cid) for i, ref in enumerate(claim.over) if ref.bind == variable
                             for cid in ref.family.case_ids()])
    return per_variable


def plan(claim: Claim, max_cases: int | None = None):
    """The case ids of a claim, lazily, in a fixed order (at most ``max_cases``)."""
    cap = min(x for x in (claim.max_cases, max_cases) if x is not None) \
        if (claim.max_cases or max_cases) else None
    if len(claim.variables) == 1:
        variable = claim.variables[0]
        ids = (join_id([(i, cid)]) for i, ref in enumerate(claim.over) if ref.bind == variable
               for cid in ref.family.case_ids())
    else:
        ids = (join_id(list(combo)) for combo in itertools.product(*case_parts(claim)))
    return itertools.islice(ids, cap) if cap is not None else ids


def family_label(claim: Claim, case_id: str) -> str:
    return SEPARATOR.join(claim.over[ref].family.name for ref, _ in split_id(case_id))


def complexes_of(claim: Claim, case_id: str) -> dict:
    """The environment of a case: variable -> Complex."""
    env = {}
    for ref, cid in split_id(case_id):
        entry = claim.over[ref]
        env[entry.bind] = entry.family.get(cid)
    return env


def evaluate_case(claim: Claim, case_id: str, limits: Limits, env: dict | None = None) -> dict:
    """Evaluate one case: build its complexes (unless ``env`` brings them, as a sharded
    family's generator does), check ``where``, evaluate the statement."""
    _load_kernels()
    start = time.perf_counter()
    record = {"claim": claim.name, "case_id": case_id, "family": family_label(claim, case_id)}
    deadline = time.monotonic() + limits.seconds if limits.seconds is not None else None
    try:
        # one interval timer for building and judging; each step turns a ring inside it
        # into its own LimitExceeded (a nested time_limit)
        with time_limit(deadline, limits.seconds):
            record.update(_build_and_judge(claim, case_id, limits, deadline, record, env))
    except LimitExceeded as error:   # the deadline passed between the two steps
        record.update(outcome="limit", message=f"{error.limit}: {error.message}")
    record["seconds"] = time.perf_counter() - start
    return record


def _build_and_judge(claim: Claim, case_id: str, limits: Limits, deadline: float | None,
                     record: dict, env: dict | None) -> dict:
    """The outcome fields of a case's record: its complexes built (unless ``env`` brings
    them) and hashed into ``record``, then judged."""
    try:
        with time_limit(deadline, limits.seconds):
            if env is None:
                env = complexes_of(claim, case_id)
            record["complex_hash"] = ",".join(env[v].content_hash for v in claim.variables)
            record["sizes"] = {v: [env[v].n_vertices, len(env[v].simplices)]
                               for v in claim.variables}      # for `verifier cases`
    except LimitExceeded as error:
        return {"complex_hash": "", "outcome": "limit",
                "message": f"{error.limit}: building the case: {error.message}"}
    except MemoryError:
        return {"complex_hash": "", "outcome": "limit",
                "message": f"{memory_reason(limits)} (building the case)"}
    except Exception as error:  # a family that cannot build its case: recorded, not fatal
        return {"complex_hash": "", "outcome": "error", "message": f"building the case: {error}"}
    return _judge(claim, env, limits, deadline)


def _load_kernels() -> None:
    """The compiled kernels every case of a complex uses (canonical form, Green
    function), compiled or loaded from the disk cache before a case's clock starts: the
    first compilation on a machine takes seconds, which no case's time limit should
    pay.  Free after the first call in a process."""
    if _KERNELS_LOADED:
        return
    from ..canonical_kernels import load as load_canonical
    from ..exact.mask_kernels import load as load_green
    load_canonical()
    load_green()
    _KERNELS_LOADED.append(True)


_KERNELS_LOADED: list = []


def memory_reason(limits: Limits) -> str:
    """The recorded reason of a case that ran out of memory, naming the cap in force."""
    if limits.memory:
        return (f"memory: the case needed more than the {limits.memory} MB one case may use "
                "(--case-memory)")
    return "memory: the case needed more memory than this process may use"


def _judge(claim: Claim, env: dict, limits: Limits, deadline: float | None = None) -> dict:
    """Outcome of the claim on one environment (no timing, no ids).  The ``where`` and
    the statement share one deadline (by default ``limits.seconds`` from now)."""
    _load_kernels()
    context = Context(limits)
    if deadline is not None:
        context.deadline = deadline
    try:
        with time_limit(context.deadline, limits.seconds):
            if claim.where is not None:
                condition = Context(limits)
                condition.deadline = context.deadline
                if not evaluate(claim.where, env, condition):
                    return {"outcome": "outside"}
            outcome = evaluate_claim(claim.statement, env, context)
    except Undecided as error:     # a certified comparison the precision ladder cannot settle
        return {"outcome": "undecided", "evidence": "certified", "message": error.message,
                "sides": getattr(error, "sides", []), "certified": context.certified}
    except LimitExceeded as error:
        return {"outcome": "limit", "message": f"{error.limit}: {error.message}"}
    except ClaimError as error:
        return {"outcome": "error", "message": error.message}
    except RecursionError:
        return {"outcome": "limit", "message": "max_depth: recursion too deep"}
    except MemoryError:
        return {"outcome": "limit", "message": memory_reason(limits)}
    except Exception as error:   # noqa: BLE001 - our own bug; recorded with this case only
        return {"outcome": "error", "message": f"evaluation failed ({type(error).__name__}): "
                                               f"{error}"}
    result = {"outcome": "holds" if outcome.holds else "fails", "evidence": outcome.evidence,
              "sides": outcome.sides, "witness": outcome.witness,
              "certified": outcome.certified}
    if EVIDENCE_ORDER.index(outcome.evidence) > EVIDENCE_ORDER.index(claim.evidence):
        result["outcome"] = "weak"
        result["message"] = (f"evidence {outcome.evidence} (error bound "
                             f"{outcome.error_bound}) is weaker than the required {claim.evidence}")
    return result


def holds_on(claim: Claim, env: dict, limits: Limits) -> str:
    """'fails', 'holds', 'outside' or a problem outcome for an environment (the shrinker's
    question)."""
    return _judge(claim, env, limits)["outcome"]


@lru_cache(maxsize=8)
def _claims(sources: tuple[tuple[str, str], ...]) -> dict[str, Claim]:
    """The claims of (path, text) pairs, loaded once per process."""
    return {c.name: c for path, text in sources for c in load_text(text, path)}


def sources_of(claims: list[Claim]) -> tuple[tuple[str, str], ...]:
    """The (path, text) of every claim file: what workers need to rebuild the claims, even
    on machines that do not have the files."""
    from pathlib import Path
    paths = sorted({str(Path(c.file).resolve()) for c in claims})
    return tuple((p, Path(p).read_text(encoding="utf-8")) for p in paths)


def run_batch(sources: tuple[tuple[str, str], ...], claim_name: str, case_ids: list[str],
              limits: dict) -> list[dict]:
    """Evaluate a batch of cases of one claim; plain data in, plain records out."""
    claim = _claims(tuple(sources))[claim_name]
    bounds = Limits(**limits)
    return [_isolated(claim, case_id, bounds) for case_id in case_ids]


def _isolated(claim: Claim, case_id: str, limits: Limits, env: dict | None = None) -> dict:
    """One case of a batch; whatever happens to it stays with it (never the batch)."""
    try:
        return evaluate_case(claim, case_id, limits, env)
    except MemoryError:
        outcome, message = "limit", memory_reason(limits)
    except RecursionError:
        outcome, message = "limit", "max_depth: recursion too deep"
    except Exception as error:   # noqa: BLE001 - our own bug; recorded with this case only
        outcome, message = "error", f"evaluation failed ({type(error).__name__}): {error}"
    return {"claim": claim.name, "case_id": case_id, "family": family_label(claim, case_id),
            "complex_hash": "", "outcome": outcome, "message": message, "seconds": 0.0}


def limits_dict(limits: Limits) -> dict:
    return asdict(limits)

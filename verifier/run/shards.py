"""Sharded planning: exhaustive families too large to list in one process.

A family that knows how to split itself (``Family.shards()`` is not None: all graphs on
10 vertices, every surface on 9 vertices, ...) is never enumerated by the client.  The
claim's cases are cut into *shards*: for each ``[[claim.over]]`` entry of the claim's
variable, the family's own shards, or the whole family as one shard ``*`` when it is
planned case by case.  A shard is named by its key ``<entry>|<shard>``, for example
``0|9/p01000-01999``.  The client lists the keys (cheap: no family generates anything to
name its shards); each engine worker generates the cases of its shard itself and
evaluates them (:func:`run_shard`), and sends back a *part*: the number of cases, the
outcome counts, the summed case time, the records of the notable cases (every outcome
but ``holds`` and ``outside``, and every case with certified values) and the digest sum
below.  Only notable cases are stored case by case.

Digest of a sharded claim.  Each case contributes the line ``"<case_id> <complex_hash>"``
as in the digest of a claim planned case by case; the contribution is the SHA-256 of
the line read as a 256-bit integer, and a part carries the sum of its contributions
modulo 2^256.  Sums of disjoint parts add up, so the claim's digest

    SHA-256( "sharded <number of cases> <sum as 64 hex digits>" )

is the same whatever the engine, the number of workers, the order in which parts come
back, or how a shard was split after a worker died (a multiset hash in the sense of
M. Bellare and D. Micciancio, "A new paradigm for collision-free hashing", EUROCRYPT
1997: the additive construction over Z/2^256).  The digest identifies the set of cases;
``verifier check`` recomputes it, so a forged sum cannot pass.

A part covers cases ``start <= index < stop`` of its shard in the shard's fixed order;
``stop = None`` asks for every case to the end.  A resumed run keeps the shards whose
parts cover them from the first case to the last, and evaluates the others again.
"""

from __future__ import annotations

import hashlib
import time
from collections import Counter

from ..claims.evaluate import Limits
from ..claims.loader import Claim
from .cases import _claims, _isolated, join_id

__all__ = ["is_sharded", "shard_keys", "shard_cases", "run_shard", "line_value",
           "sharded_digest", "add_sums", "ShardError", "WHOLE", "NOTABLE_EXCLUDED",
           "count_shard", "case_at"]

WHOLE = "*"                          # the shard of a family planned case by case
MODULUS = 1 << 256
NOTABLE_EXCLUDED = ("holds", "outside")   # outcomes kept only as counts


class ShardError(ValueError):
    """A claim cannot be planned in shards (says why)."""


def is_sharded(claim: Claim) -> bool:
    """True when some family of the claim is planned in shards."""
    return any(ref.family.shards() is not None for ref in claim.over)


def shard_keys(claim: Claim) -> list[str]:
    """The keys of a sharded claim's shards, in the fixed order of its ``[[claim.over]]``
    entries and of each family's shards.

    >>> from verifier.claims.loader import load_text
    >>> claim = load_text('[[claim]]\\nname = "e"\\nstatement = "euler(K) == euler(K)"\\n'
    ...                   'source = "definition"\\n[[claim.over]]\\nfamily = "cycles"\\n'
    ...                   'lengths = [3, 4]\\n', "example.toml")[0]
    >>> shard_keys(claim)
    ['0|*']
    """
    if len(claim.variables) != 1:
        raise ShardError(f"claim {claim.name!r}: a family planned in shards can only be bound "
                         f"to a claim with one variable (this one has "
                         f"{', '.join(claim.variables)})")
    keys = []
    for i, ref in enumerate(claim.over):
        shards = ref.family.shards()
        keys.extend(f"{i}|{name}" for name in (shards if shards is not None else [WHOLE]))
    return keys


def _split_key(claim: Claim, key: str) -> tuple[int, str]:
    ref, _, name = key.partition("|")
    if not ref.isdigit() or int(ref) >= len(claim.over) or not name:
        raise ShardError(f"claim {claim.name!r}: {key!r} is not a shard of this claim")
    return int(ref), name


def shard_cases(claim: Claim, key: str):
    """The cases of one shard: ``(case_id, env)`` with the claim's case ids (as
    :func:`verifier.run.cases.join_id` spells them) and env = {variable: Complex}."""
    i, name = _split_key(claim, key)
    entry = claim.over[i]
    cases = iter(entry.family) if name == WHOLE else entry.family.shard_cases(name)
    for cid, K in cases:
        yield join_id([(i, cid)]), {entry.bind: K}


def line_value(case_id: str, complex_hash: str) -> int:
    """The contribution of one case to a digest sum: SHA-256 of its digest line."""
    return int.from_bytes(hashlib.sha256(f"{case_id} {complex_hash}\n".encode()).digest(), "big")


def add_sums(*sums: str) -> str:
    """The sum modulo 2^256 of digest sums written as 64 hex digits."""
    return f"{sum(int(s, 16) for s in sums) % MODULUS:064x}"


def sharded_digest(cases: int, total: str) -> str:
    """The digest of a sharded claim from its number of cases and its digest sum."""
    return hashlib.sha256(f"sharded {cases} {total}".encode()).hexdigest()


def run_shard(sources: tuple[tuple[str, str], ...], claim_name: str, key: str, start: int,
              stop: int | None, limits: dict) -> dict:
    """Generate and evaluate cases ``start <= index < stop`` of one shard (the batch
    function of sharded claims; plain data in, plain data out)."""
    claim = _claims(tuple(sources))[claim_name]
    bounds = Limits(**limits)
    counts: Counter = Counter()
    total, seconds, cases, notable = 0, 0.0, 0, []
    index, complete = start - 1, False
    began = time.perf_counter()
    try:
        for index, (case_id, env) in enumerate(shard_cases(claim, key)):
            if index < start:
                continue
            if stop is not None and index >= stop:
                index -= 1
                break
            record = _isolated(claim, case_id, bounds, env)
            counts[record["outcome"]] += 1
            cases += 1
            total += line_value(case_id, record["complex_hash"])
            seconds += record.get("seconds", 0.0)
            if record["outcome"] not in NOTABLE_EXCLUDED or record.get("certified"):
                notable.append(record)
        else:
            complete = True
    except Exception as error:  # noqa: BLE001 - a family that cannot generate its shard
        index += 1
        case_id = f"{key}#{index}"
        notable.append({"claim": claim.name, "case_id": case_id, "family":
                        claim.over[_split_key(claim, key)[0]].family.name, "complex_hash": "",
                        "outcome": "error", "seconds": 0.0,
                        "message": f"generating shard {key}: {type(error).__name__}: {error}"})
        counts["error"] += 1
        cases += 1
        total += line_value(case_id, "")
        complete = True
    return {"shard": key, "start": start, "stop": index + 1, "complete": complete,
            "cases": cases, "counts": dict(counts), "sum": f"{total % MODULUS:064x}",
            "seconds": seconds, "wall": time.perf_counter() - began, "notable": notable}


def count_shard(claim: Claim, key: str) -> int:
    """The number of cases of one shard (generates the shard; used only to split a shard
    whose worker died, in a child process of the client)."""
    return sum(1 for _ in shard_cases(claim, key))


def case_at(claim: Claim, key: str, index: int) -> tuple[str, str, bool]:
    """The id and complex hash of case ``index`` of a shard, and whether it is the shard's
    last case (generates up to the case after it)."""
    found = None
    for i, (case_id, env) in enumerate(shard_cases(claim, key)):
        if i == index:
            found = case_id, ",".join(env[v].content_hash for v in claim.variables)
        elif i > index:
            return (*found, False)
    if found is None:
        raise ShardError(f"shard {key} has no case {index}")
    return (*found, True)

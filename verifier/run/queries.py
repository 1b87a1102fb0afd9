"""Questions about the store, answered without SQL (``verifier cases``, ``runs``,
``diff`` and ``run --again``).

Every function here opens the store read-only (:meth:`Store.read_only`): a query never
creates, migrates or writes a store.  Mistakes a user can make -- a store that is not
there, a run id that names no run or several -- raise :class:`QueryError` with one line
that says what would be valid.
"""

from __future__ import annotations

import datetime
import json
from contextlib import contextmanager

from .store import OUTCOMES, UNSETTLED, Store, StoreError, verdict_of

__all__ = ["QueryError", "reading", "resolve_run", "cases", "runs", "compare",
           "again_cases", "OUTCOME_GROUPS"]

# words a user may give for outcomes, besides the outcomes themselves
OUTCOME_GROUPS = {"unsettled": UNSETTLED, "again": ("fails", *UNSETTLED)}


class QueryError(Exception):
    """A query that cannot be answered (no store, no such run, a bad filter)."""


@contextmanager
def reading(path):
    """The store at ``path``, opened read-only, closed afterwards."""
    try:
        store = Store.read_only(path)
    except StoreError as error:
        raise QueryError(str(error)) from None
    try:
        yield store
    finally:
        store.close()


def resolve_run(store: Store, text: str | None) -> str:
    """The run id a user means: the whole id or a prefix of exactly one run; None or
    'latest' is the newest run.

    Raises QueryError naming the store's newest runs when nothing, or several, match.
    """
    ids = store.run_ids()
    if not ids:
        raise QueryError(f"store {str(store.path)!r} holds no run")
    if text is None or text == "latest":
        return ids[0]
    if text in ids:
        return text
    matches = [i for i in ids if i.startswith(text)]
    if len(matches) == 1:
        return matches[0]
    known = ", ".join(ids[:3]) + (", ..." if len(ids) > 3 else "")
    if matches:
        raise QueryError(f"run {text!r} is the beginning of {len(matches)} run ids; give more "
                         f"of it (runs: {known})")
    raise QueryError(f"no run {text!r} in {str(store.path)!r} (runs, newest first: {known}; "
                     "`verifier runs` lists them)")


def _outcomes(words) -> tuple[str, ...] | None:
    if not words:
        return None
    chosen: list[str] = []
    for word in words:
        group = OUTCOME_GROUPS.get(word, (word,) if word in OUTCOMES else None)
        if group is None:
            raise QueryError(f"unknown outcome {word!r}; valid: "
                             f"{', '.join((*OUTCOMES, *OUTCOME_GROUPS))}")
        chosen.extend(o for o in group if o not in chosen)
    return tuple(chosen)


def _size(sizes: dict | None, which: int) -> int | None:
    """The largest vertex (0) or simplex (1) count over a case's complexes."""
    return max(pair[which] for pair in sizes.values()) if sizes else None


def cases(path, run: str | None = None, claim: str | None = None, outcomes=None,
          family: str | None = None, vertices: tuple | None = None,
          simplices: tuple | None = None) -> tuple[str, list[dict]]:
    """The run id and the cases of a run that pass every filter given.

    ``outcomes``: outcome names, or 'unsettled' (error, limit, weak, undecided) or 'again'
    (fails and unsettled); ``family``: a family name of the case (any of its complexes for
    claims over several); ``vertices``/``simplices``: (low, high) bounds, either None,
    on the largest complex of the case (cases whose sizes were not recorded are left out
    when a size filter is given).
    """
    wanted = _outcomes(outcomes)
    with reading(path) as store:
        run_id = resolve_run(store, run)
        if claim is not None and claim not in store.claims_of_run(run_id):
            names = ", ".join(store.claims_of_run(run_id)) or "none"
            raise QueryError(f"run {run_id} has no claim {claim!r} (its claims: {names})")
        rows = store.case_records(run_id, claim, wanted)
    kept = []
    for row in rows:
        if family is not None and family not in row["family"].split(" & "):
            continue
        if not _within(_size(row["sizes"], 0), vertices):
            continue
        if not _within(_size(row["sizes"], 1), simplices):
            continue
        kept.append(row)
    return run_id, kept


def sharded_claims(path, run: str | None = None, claim: str | None = None) -> dict[str, int]:
    """The claims of a run planned in shards (they keep only their notable cases one by
    one), each with its number of cases."""
    with reading(path) as store:
        run_id = resolve_run(store, run)
        return {name: sum(store.counts(run_id, name).values())
                for name in store.claims_of_run(run_id)
                if (claim is None or name == claim) and store.is_sharded(run_id, name)}


def _within(value: int | None, bounds: tuple | None) -> bool:
    if bounds is None:
        return True
    if value is None:
        return False
    low, high = bounds
    return (low is None or value >= low) and (high is None or value <= high)


def _claim_verdicts(store: Store, run_id: str, request: dict) -> dict[str, dict]:
    """Per claim of a run: expect, counts, cases, verdict words and whether it meets it."""
    expects = {c["name"]: c.get("expect", "holds") for c in request.get("claims", [])}
    summary = store.summary(run_id)
    table = {}
    for name in list(expects) + sorted(set(summary) - set(expects)):
        entry = summary.get(name, {"counts": {o: 0 for o in OUTCOMES}, "cases": 0})
        ok, words = verdict_of(entry["counts"], expects.get(name, "holds"))
        table[name] = {"expect": expects.get(name, "holds"), "counts": entry["counts"],
                       "cases": entry["cases"], "verdict": words, "ok": ok}
    return table


def _date(seconds: float | None) -> str | None:
    if seconds is None:
        return None
    return datetime.datetime.fromtimestamp(seconds).strftime("%Y-%m-%d %H:%M:%S")


def runs(path) -> list[dict]:
    """Every run of a store, newest first: id, start (local time), whether it finished,
    engine, the command that started it (None when the store predates commands), the
    earlier run it evaluated again (if any), and each claim's verdict."""
    with reading(path) as store:
        out = []
        for record in store.run_records():
            request = record["request"]
            out.append({"run_id": record["run_id"], "started": _date(record["started"]),
                        "finished": record["finished"] is not None,
                        "engine": record["engine"], "command": record["command"],
                        "again_of": (request.get("rerun") or {}).get("of"),
                        "claims": _claim_verdicts(store, record["run_id"], request)})
        return out


def compare(path, first: str, second: str) -> dict:
    """What changed from run ``first`` to run ``second`` of one store.

    Per claim present in either run: the verdicts (None where the claim is absent), the
    case ids that fail in the second run but not in the first ('appeared') and the other
    way round ('disappeared'), the same for unsettled cases, and both digests (SHA-256 of
    the sorted case ids and isomorphism hashes, as in certificates).  ``changed`` lists
    the claims where anything of this differs.
    """
    with reading(path) as store:
        a, b = resolve_run(store, first), resolve_run(store, second)
        requests = {r["run_id"]: r["request"] for r in store.run_records()}
        verdicts = {run: _claim_verdicts(store, run, requests[run]) for run in (a, b)}
        claims = list(dict.fromkeys([*verdicts[a], *verdicts[b]]))
        table = {}
        for name in claims:
            outcome = {run: {r["case_id"]: r["outcome"] for r in store.case_records(run, name)}
                       for run in (a, b)}
            digests = {run: store.digest(run, name) if name in verdicts[run]
                       else None for run in (a, b)}

            def having(run, kinds):
                return {c for c, o in outcome[run].items() if o in kinds}

            fails = {run: having(run, ("fails",)) for run in (a, b)}
            open_ = {run: having(run, UNSETTLED) for run in (a, b)}
            entry = {
                "verdict": [verdicts[run].get(name, {}).get("verdict") for run in (a, b)],
                "cases": [sum(store.counts(run, name).values()) for run in (a, b)],
                "fails_appeared": sorted(fails[b] - fails[a]),
                "fails_disappeared": sorted(fails[a] - fails[b]),
                "unsettled_appeared": sorted(open_[b] - open_[a]),
                "unsettled_disappeared": sorted(open_[a] - open_[b]),
                "digest": [digests[a], digests[b]],
            }
            entry["changed"] = bool(entry["verdict"][0] != entry["verdict"][1]
                                    or entry["fails_appeared"] or entry["fails_disappeared"]
                                    or entry["unsettled_appeared"]
                                    or entry["unsettled_disappeared"]
                                    or entry["digest"][0] != entry["digest"][1])
            table[name] = entry
    return {"first": a, "second": b, "claims": table,
            "changed": [n for n, e in table.items() if e["changed"]]}


def again_cases(path, run: str, claims=None) -> dict:
    """What ``verifier run --again RUN`` evaluates: {"of": run id, "cases": {claim: [case
    ids whose outcome was fails or unsettled]}}.  With ``claims`` (loaded Claim objects),
    a claim whose families differ from those recorded in the run is refused: its case ids
    would name other complexes."""
    with reading(path) as store:
        run_id = resolve_run(store, run)
        request = next(r["request"] for r in store.run_records() if r["run_id"] == run_id)
        selected: dict[str, list[str]] = {}
        for row in store.case_records(run_id, outcomes=OUTCOME_GROUPS["again"]):
            selected.setdefault(row["claim"], []).append(row["case_id"])
    recorded = {c["name"]: c.get("over") for c in request.get("claims", [])}
    for claim in claims or ():
        if claim.name in selected and recorded.get(claim.name) != json.loads(
                json.dumps(claim.to_json()["over"], sort_keys=True)):
            raise QueryError(f"--again {run_id}: the families of claim {claim.name!r} changed "
                             "since that run, so its case ids would name other complexes; "
                             "run the claim in full instead")
    return {"of": run_id, "cases": selected}

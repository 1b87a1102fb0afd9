"""The SQLite store of runs and cases (SPEC §7).

One row per case: the claim, the case id, the complex's isomorphism hash, the outcome,
the exact values of the statement's sides, the evidence, the time.  A run is keyed by a
hash of its request (claims and options), so ``--resume`` finds an interrupted run and
finishes it: a case is written once (the primary key forbids a second row), and a case
is written only after it has been evaluated, so none is lost.

Only the runner's client process writes; workers never touch the store.
"""

from __future__ import annotations

import json
import os
import sqlite3
import time
from pathlib import Path

__all__ = ["Store", "StoreError", "OUTCOMES", "UNSETTLED", "verdict_of", "check_store_path"]


class StoreError(Exception):
    """The store cannot be used (a folder, read-only, not a store, under a file): the
    message names the path and what is wrong; raised before any case runs."""


_TABLES = {"runs", "cases", "counterexamples"}


def _writable_folder(folder: Path, what: str) -> None:
    """Prove that files can be created in ``folder`` by creating (and removing) one."""
    import tempfile
    try:
        handle, probe = tempfile.mkstemp(dir=folder, prefix=".verifier-probe-")
    except OSError as error:
        raise StoreError(f"{what}: cannot create files in {str(folder)!r} "
                         f"({error.strerror or error})") from None
    os.close(handle)
    os.unlink(probe)


def _existing_ancestor(path: Path) -> Path:
    for parent in path.parents:
        if os.path.lexists(parent):
            return parent
    return Path(".")


def check_store_path(path: str | Path) -> None:
    """Refuse a store path that cannot work, before anything is created or run.

    A store is an SQLite file (or a path where one can be created): not a folder, not a
    special file, not under a file, in a folder where files can be created (SQLite writes
    its journal beside the store), writable itself, and either empty or a store of ours.
    """
    path = Path(path)
    what = f"store {str(path)!r}"
    if path.is_dir():
        raise StoreError(f"{what} is a folder; --store names an SQLite file (for example "
                         f"{str(path / 'verifier.sqlite')!r})")
    if os.path.lexists(path) and not path.is_file():
        raise StoreError(f"{what} is not a regular file")
    ancestor = path.parent if path.parent.exists() else _existing_ancestor(path)
    if not ancestor.is_dir():
        raise StoreError(f"{what} cannot be created: {str(ancestor)!r} is a file, not a folder")
    _writable_folder(ancestor, what)
    if not path.exists():
        return
    try:
        os.close(os.open(path, os.O_RDWR))
    except OSError as error:
        raise StoreError(f"{what} cannot be written ({error.strerror or error})") from None
    if path.stat().st_size == 0:
        return
    try:
        with open(path, "rb") as handle:
            magic = handle.read(16)
    except OSError as error:
        raise StoreError(f"{what} cannot be read ({error.strerror or error})") from None
    if magic != b"SQLite format 3\x00":
        raise StoreError(f"{what} is not an SQLite file (a store is one); name a new file or "
                         "an existing store")
    try:
        db = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=30)
        try:
            tables = {row[0] for row in db.execute(
                "SELECT name FROM sqlite_master WHERE type = 'table'")}
        finally:
            db.close()
    except sqlite3.DatabaseError as error:
        raise StoreError(f"{what} cannot be opened as a store ({error})") from None
    if tables and not tables & _TABLES:
        raise StoreError(f"{what} is an SQLite database of something else (tables: "
                         f"{', '.join(sorted(tables)[:5])}); name a new file or a store")

OUTCOMES = ("holds", "fails", "outside", "error", "limit", "weak", "undecided")
UNSETTLED = ("error", "limit", "weak", "undecided")   # cases that settle nothing either way


def verdict_of(counts: dict, expect: str) -> tuple[bool, str]:
    """Whether a claim's outcome counts meet its expectation, and the words for it.

    A failing case decides a claim; otherwise any unsettled case leaves it open:
    ``undecided`` when every such case is a certified comparison that the maximum
    precision could not settle, ``incomplete`` when some case hit an error or a limit.

    >>> verdict_of({"holds": 3, "undecided": 1}, "holds")
    (False, 'undecided')
    >>> verdict_of({"fails": 1, "error": 2}, "fails")
    (True, 'fails, as expected')
    """
    failing = counts.get("fails", 0) > 0
    unsettled = sum(counts.get(o, 0) for o in UNSETTLED)
    open_word = "undecided" if unsettled == counts.get("undecided", 0) else "incomplete"
    if expect == "holds":
        return (not failing and unsettled == 0,
                "fails" if failing else (open_word if unsettled else "holds"))
    return (failing, "fails, as expected" if failing else (
        open_word if unsettled else "holds, expected to fail"))

# families whose cases are every complex (or graph) up to a size, so that the smallest
# failing case among their cases is the smallest failing case of the family
EXHAUSTIVE = ("all-complexes", "graphs")

SCHEMA = """
CREATE TABLE IF NOT EXISTS runs (
    run_id     TEXT PRIMARY KEY,
    request    TEXT NOT NULL,
    started    REAL NOT NULL,
    finished   REAL,
    engine     TEXT
);
CREATE TABLE IF NOT EXISTS cases (
    run_id       TEXT NOT NULL,
    claim        TEXT NOT NULL,
    case_id      TEXT NOT NULL,
    family       TEXT NOT NULL,
    complex_hash TEXT NOT NULL,
    outcome      TEXT NOT NULL,
    evidence     TEXT,
    sides        TEXT,
    witness      TEXT,
    message      TEXT,
    seconds      REAL,
    certified    TEXT,
    PRIMARY KEY (run_id, claim, case_id)
) WITHOUT ROWID;
CREATE TABLE IF NOT EXISTS shard_parts (
    run_id     TEXT NOT NULL,
    claim      TEXT NOT NULL,
    shard      TEXT NOT NULL,
    start      INTEGER NOT NULL,
    stop       INTEGER NOT NULL,
    complete   INTEGER NOT NULL,
    cases      INTEGER NOT NULL,
    counts     TEXT NOT NULL,
    digest_sum TEXT NOT NULL,
    seconds    REAL,
    PRIMARY KEY (run_id, claim, shard, start)
) WITHOUT ROWID;
CREATE TABLE IF NOT EXISTS counterexamples (
    run_id     TEXT NOT NULL,
    claim      TEXT NOT NULL,
    case_id    TEXT NOT NULL,
    record     TEXT NOT NULL,
    PRIMARY KEY (run_id, claim)
);
"""


class Store:
    """A thin layer over one SQLite file."""

    def __init__(self, path: str | Path):
        self.path = Path(path)
        try:
            self.path.parent.mkdir(parents=True, exist_ok=True)
            self.db = sqlite3.connect(str(self.path), timeout=30)
        except (OSError, sqlite3.Error) as error:
            raise StoreError(f"store {str(self.path)!r} cannot be opened "
                             f"({getattr(error, 'strerror', None) or error})") from None
        try:
            self.db.execute("PRAGMA journal_mode=WAL")
            self.db.execute("PRAGMA synchronous=NORMAL")
            self.db.executescript(SCHEMA)
            columns = {row[1] for row in self.db.execute("PRAGMA table_info(cases)")}
            if "certified" not in columns:       # a store written before certified values
                self.db.execute("ALTER TABLE cases ADD COLUMN certified TEXT")
            if "sizes" not in columns:           # a store written before case sizes
                self.db.execute("ALTER TABLE cases ADD COLUMN sizes TEXT")
            run_columns = {row[1] for row in self.db.execute("PRAGMA table_info(runs)")}
            if "command" not in run_columns:     # a store written before commands
                self.db.execute("ALTER TABLE runs ADD COLUMN command TEXT")
            if not self._has_column("counterexamples", "readable"):
                # a store written before relabelled and recognised counterexamples
                self.db.execute("ALTER TABLE counterexamples ADD COLUMN readable TEXT")
            self.db.commit()
        except sqlite3.Error as error:
            self.db.close()
            raise StoreError(f"store {str(self.path)!r} cannot be used as a store "
                             f"({error})") from None

    @classmethod
    def read_only(cls, path: str | Path) -> "Store":
        """Open an existing store for reading only: nothing is created, migrated or
        written (SQLite's read-only mode), so queries can never change a store.  Columns
        added by later versions read as NULL in an older store."""
        path = Path(path)
        if path.is_dir():
            raise StoreError(f"store {str(path)!r} is a directory, not a store file")
        if not path.is_file():
            raise StoreError(f"store {str(path)!r}: no such file (run `verifier run` first, "
                             "or name a store with --store)")
        with open(path, "rb") as handle:
            if handle.read(16) != b"SQLite format 3\x00":
                raise StoreError(f"store {str(path)!r} is not an SQLite file (a store is one)")
        store = cls.__new__(cls)
        store.path = path
        try:
            store.db = sqlite3.connect(f"file:{path.resolve()}?mode=ro", uri=True, timeout=30)
            tables = {r[0] for r in store.db.execute(
                "SELECT name FROM sqlite_master WHERE type = 'table'")}
        except sqlite3.Error as error:
            raise StoreError(f"store {str(path)!r} cannot be read ({error})") from None
        if not {"runs", "cases"} <= tables:
            store.db.close()
            raise StoreError(f"store {str(path)!r} is not a store of runs (tables: "
                             f"{', '.join(sorted(tables)[:5]) or 'none'})")
        return store

    def close(self):
        self.db.close()

    def _has_column(self, table: str, column: str) -> bool:
        return any(row[1] == column for row in self.db.execute(f"PRAGMA table_info({table})"))

    # ------------------------------------------------------------------ runs
    def open_run(self, run_id: str, request: dict, engine: str,
                 command: str | None = None) -> bool:
        """Start (or find) a run; True if it already existed (a resume).  ``command`` is
        the command line that started it (kept as first written)."""
        row = self.db.execute("SELECT run_id FROM runs WHERE run_id = ?", (run_id,)).fetchone()
        if row:
            self.db.execute("UPDATE runs SET finished = NULL WHERE run_id = ?", (run_id,))
            self.db.commit()
            return True
        self.db.execute("INSERT INTO runs (run_id, request, started, finished, engine, command) "
                        "VALUES (?, ?, ?, NULL, ?, ?)",
                        (run_id, json.dumps(request, sort_keys=True), time.time(), engine,
                         command))
        self.db.commit()
        return False

    def finish_run(self, run_id: str):
        self.db.execute("UPDATE runs SET finished = ? WHERE run_id = ?", (time.time(), run_id))
        self.db.commit()

    def unfinished_runs(self) -> list[str]:
        return [r[0] for r in self.db.execute(
            "SELECT run_id FROM runs WHERE finished IS NULL ORDER BY started DESC")]

    def latest_run(self) -> str | None:
        row = self.db.execute("SELECT run_id FROM runs ORDER BY started DESC LIMIT 1").fetchone()
        return row[0] if row else None

    def run_request(self, run_id: str) -> dict:
        row = self.db.execute("SELECT request FROM runs WHERE run_id = ?", (run_id,)).fetchone()
        return json.loads(row[0]) if row else {}

    # ----------------------------------------------------------------- cases
    def done_cases(self, run_id: str, claim: str) -> set[str]:
        return {r[0] for r in self.db.execute(
            "SELECT case_id FROM cases WHERE run_id = ? AND claim = ?", (run_id, claim))}

    def add_cases(self, run_id: str, records: list[dict]):
        """Write evaluated cases in one transaction (a case already present is kept)."""
        self._insert_cases(run_id, records)
        self.db.commit()

    def _insert_cases(self, run_id: str, records: list[dict]):
        self.db.executemany(
            "INSERT OR IGNORE INTO cases (run_id, claim, case_id, family, complex_hash, outcome, "
            "evidence, sides, witness, message, seconds, certified, sizes) "
            "VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?)",
            [(run_id, r["claim"], r["case_id"], r["family"], r["complex_hash"], r["outcome"],
              r.get("evidence"), json.dumps(r.get("sides") or []),
              json.dumps(r.get("witness")) if r.get("witness") else None,
              r.get("message"), r.get("seconds", 0.0),
              json.dumps(r["certified"]) if r.get("certified") else None,
              json.dumps(r["sizes"]) if r.get("sizes") else None) for r in records])

    def counts(self, run_id: str, claim: str) -> dict[str, int]:
        counts = {o: 0 for o in OUTCOMES}
        if self.is_sharded(run_id, claim):
            for (text,) in self.db.execute("SELECT counts FROM shard_parts WHERE run_id = ? "
                                           "AND claim = ?", (run_id, claim)):
                for outcome, n in json.loads(text).items():
                    counts[outcome] = counts.get(outcome, 0) + n
            return counts
        rows = self.db.execute("SELECT outcome, COUNT(*) FROM cases WHERE run_id = ? AND "
                               "claim = ? GROUP BY outcome", (run_id, claim))
        counts.update(dict(rows.fetchall()))
        return counts

    def seconds(self, run_id: str, claim: str) -> float:
        table = "shard_parts" if self.is_sharded(run_id, claim) else "cases"
        row = self.db.execute(f"SELECT SUM(seconds) FROM {table} WHERE run_id = ? AND "
                              "claim = ?", (run_id, claim)).fetchone()
        return float(row[0] or 0.0)

    # ---------------------------------------------------------------- shards
    def _has_shards(self) -> bool:
        return self.db.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND "
                               "name = 'shard_parts'").fetchone() is not None

    def is_sharded(self, run_id: str, claim: str) -> bool:
        """True when the claim's cases were planned in shards in this run (only its
        notable cases are then stored one by one; counts and digest come from parts)."""
        return self._has_shards() and self.db.execute(
            "SELECT 1 FROM shard_parts WHERE run_id = ? AND claim = ? LIMIT 1",
            (run_id, claim)).fetchone() is not None

    def add_shard_part(self, run_id: str, claim: str, part: dict, records: list[dict]):
        """Write one evaluated part of a shard and its notable cases in one transaction
        (a part already present is kept: nothing is counted twice)."""
        with self.db:
            self.db.execute(
                "INSERT OR IGNORE INTO shard_parts (run_id, claim, shard, start, stop, "
                "complete, cases, counts, digest_sum, seconds) VALUES (?,?,?,?,?,?,?,?,?,?)",
                (run_id, claim, part["shard"], part["start"], part["stop"],
                 int(part["complete"]), part["cases"], json.dumps(part["counts"], sort_keys=True),
                 part["sum"], part["seconds"]))
            self._insert_cases(run_id, records)

    def done_shards(self, run_id: str, claim: str) -> set[str]:
        """The shards of a claim whose parts cover every case, from the first to the last;
        the parts of the other shards are removed (they are evaluated again whole)."""
        parts: dict[str, list] = {}
        for shard, start, stop, complete in self.db.execute(
                "SELECT shard, start, stop, complete FROM shard_parts WHERE run_id = ? AND "
                "claim = ? ORDER BY shard, start", (run_id, claim)):
            parts.setdefault(shard, []).append((start, stop, complete))
        done, partial = set(), []
        for shard, pieces in parts.items():
            reach, finished = 0, False
            for start, stop, complete in pieces:
                if start != reach:
                    break
                reach, finished = stop, bool(complete)
            if finished:
                done.add(shard)
            else:
                partial.append(shard)
        if partial:
            with self.db:
                self.db.executemany("DELETE FROM shard_parts WHERE run_id = ? AND claim = ? "
                                    "AND shard = ?", [(run_id, claim, s) for s in partial])
        return done

    def digest(self, run_id: str, claim: str) -> str:
        """The digest of a claim's cases in a run, as its certificate records it: over the
        sorted case lines, or for a sharded claim from its parts (:mod:`.shards`)."""
        from .runner import digest_of
        from .shards import add_sums, sharded_digest
        if self.is_sharded(run_id, claim):
            sums = self.shard_sums(run_id, claim)
            return sharded_digest(sum(e["cases"] for e in sums),
                                  add_sums("0" * 64, *(e["sum"] for e in sums)))
        return digest_of(self.hashes(run_id, claim))

    def shard_sums(self, run_id: str, claim: str) -> list[dict]:
        """Per shard (in key order): its number of cases and digest sum, over its parts."""
        from .shards import add_sums
        table: dict[str, dict] = {}
        for shard, cases, digest_sum in self.db.execute(
                "SELECT shard, cases, digest_sum FROM shard_parts WHERE run_id = ? AND "
                "claim = ? ORDER BY shard, start", (run_id, claim)):
            entry = table.setdefault(shard, {"shard": shard, "cases": 0, "sum": "0" * 64})
            entry["cases"] += cases
            entry["sum"] = add_sums(entry["sum"], digest_sum)
        return list(table.values())

    def hashes(self, run_id: str, claim: str) -> list[tuple[str, str]]:
        """(case_id, complex_hash) of every case, sorted by case id."""
        return list(self.db.execute("SELECT case_id, complex_hash FROM cases WHERE run_id = ? "
                                    "AND claim = ? ORDER BY case_id", (run_id, claim)))

    def failing_cases(self, run_id: str, claim: str, limit: int = 5) -> list[dict]:
        rows = self.db.execute(
            "SELECT case_id, family, sides, witness FROM cases WHERE run_id = ? AND claim = ? "
            "AND outcome = 'fails' ORDER BY case_id LIMIT ?", (run_id, claim, limit))
        return [{"case_id": c, "family": f, "sides": json.loads(s or "[]"),
                 "witness": json.loads(w) if w else None} for c, f, s, w in rows]

    def problem_cases(self, run_id: str, claim: str, limit: int = 5) -> list[dict]:
        rows = self.db.execute(
            "SELECT case_id, outcome, message FROM cases WHERE run_id = ? AND claim = ? AND "
            f"outcome IN ({', '.join('?' * len(UNSETTLED))}) ORDER BY case_id LIMIT ?",
            (run_id, claim, *UNSETTLED, limit))
        return [{"case_id": c, "outcome": o, "message": m} for c, o, m in rows]

    def certified_values(self, run_id: str, claim: str, limit: int = 200) -> list[dict]:
        """The certified values (texts with their precision) recorded for a claim's cases,
        in case-id order: what a certificate keeps so that a re-check can compare."""
        rows = self.db.execute(
            "SELECT case_id, outcome, sides, certified FROM cases WHERE run_id = ? AND "
            "claim = ? AND certified IS NOT NULL ORDER BY case_id LIMIT ?",
            (run_id, claim, limit))
        return [{"case_id": c, "outcome": o, "sides": json.loads(s or "[]"),
                 "values": json.loads(v)} for c, o, s, v in rows]

    def summary(self, run_id: str) -> dict[str, dict]:
        """Per claim: outcome counts, number of cases and summed case time (one query)."""
        table: dict[str, dict] = {}
        rows = self.db.execute("SELECT claim, outcome, COUNT(*), SUM(seconds) FROM cases "
                               "WHERE run_id = ? GROUP BY claim, outcome", (run_id,))
        for claim, outcome, count, seconds in rows:
            entry = table.setdefault(claim, {"counts": {o: 0 for o in OUTCOMES}, "cases": 0,
                                             "seconds": 0.0})
            entry["counts"][outcome] = count
            entry["cases"] += count
            entry["seconds"] += seconds or 0.0
        if self._has_shards():     # sharded claims: counts and times from their parts
            parts = self.db.execute("SELECT claim, counts, cases, seconds FROM shard_parts "
                                    "WHERE run_id = ?", (run_id,))
            sharded: dict[str, dict] = {}
            for claim, counts, cases, seconds in parts:
                entry = sharded.setdefault(claim, {"counts": {o: 0 for o in OUTCOMES},
                                                   "cases": 0, "seconds": 0.0})
                for outcome, n in json.loads(counts).items():
                    entry["counts"][outcome] = entry["counts"].get(outcome, 0) + n
                entry["cases"] += cases
                entry["seconds"] += seconds or 0.0
            table.update(sharded)
        return dict(sorted(table.items()))

    def runs(self) -> list[tuple]:
        """(run_id, started, finished, engine) of every run, newest first."""
        return list(self.db.execute("SELECT run_id, started, finished, engine FROM runs "
                                    "ORDER BY started DESC"))

    # ------------------------------------------------------------ read queries
    def run_ids(self) -> list[str]:
        """Every run id, newest first."""
        return [r[0] for r in self.db.execute("SELECT run_id FROM runs ORDER BY started DESC")]

    def run_records(self) -> list[dict]:
        """Every run with its request, times, engine and command, newest first."""
        command = "command" if self._has_column("runs", "command") else "NULL"
        rows = self.db.execute(f"SELECT run_id, request, started, finished, engine, {command} "
                               "FROM runs ORDER BY started DESC")
        return [{"run_id": r, "request": json.loads(q), "started": s, "finished": f,
                 "engine": e, "command": c} for r, q, s, f, e, c in rows]

    def case_records(self, run_id: str, claim: str | None = None,
                     outcomes: tuple[str, ...] | None = None) -> list[dict]:
        """The cases of a run (optionally of one claim, with given outcomes), in (claim,
        case id) order, each with its family, hash, outcome, evidence, values, message,
        time and sizes ({variable: [vertices, simplices]}, None if not recorded)."""
        sizes = "sizes" if self._has_column("cases", "sizes") else "NULL"
        query = (f"SELECT claim, case_id, family, complex_hash, outcome, evidence, sides, "
                 f"message, seconds, {sizes} FROM cases WHERE run_id = ?")
        parameters: list = [run_id]
        if claim is not None:
            query += " AND claim = ?"
            parameters.append(claim)
        if outcomes is not None:
            query += f" AND outcome IN ({', '.join('?' * len(outcomes))})"
            parameters.extend(outcomes)
        query += " ORDER BY claim, case_id"
        return [{"claim": c, "case_id": i, "family": f, "complex_hash": h, "outcome": o,
                 "evidence": e, "sides": json.loads(s or "[]"), "message": m,
                 "seconds": t or 0.0, "sizes": json.loads(z) if z else None}
                for c, i, f, h, o, e, s, m, t, z in self.db.execute(query, parameters)]

    def claims_of_run(self, run_id: str) -> list[str]:
        """The names of the claims with cases in a run, sorted."""
        names = {r[0] for r in self.db.execute(
            "SELECT DISTINCT claim FROM cases WHERE run_id = ?", (run_id,))}
        if self._has_shards():
            names |= {r[0] for r in self.db.execute(
                "SELECT DISTINCT claim FROM shard_parts WHERE run_id = ?", (run_id,))}
        return sorted(names)

    def save_counterexample(self, run_id: str, claim: str, case_id: str, record: dict):
        """Store a minimal counterexample with its readable form (vertices 1..n, the map to
        the original labels, the catalog names it is isomorphic to); the readable form is
        also added to ``record`` under "readable"."""
        from .readable import readable
        text = json.dumps({k: v for k, v in record.items() if k != "readable"}, sort_keys=True)
        record["readable"] = readable(record.get("complexes") or {})
        self.db.execute("INSERT OR REPLACE INTO counterexamples (run_id, claim, case_id, record, "
                        "readable) VALUES (?,?,?,?,?)",
                        (run_id, claim, case_id, text,
                         json.dumps(record["readable"], sort_keys=True)))
        self.db.commit()

    def counterexample(self, run_id: str, claim: str) -> dict | None:
        """The stored counterexample with its readable form ("readable"; computed when an
        older store has none)."""
        column = "readable" if self._has_column("counterexamples", "readable") else "NULL"
        row = self.db.execute(f"SELECT record, {column} FROM counterexamples "
                              "WHERE run_id = ? AND claim = ?", (run_id, claim)).fetchone()
        if not row:
            return None
        record = json.loads(row[0])
        if row[1]:
            record["readable"] = json.loads(row[1])
        else:
            from .readable import readable
            record["readable"] = readable(record.get("complexes") or {})
        return record

    def smallest_failing(self, run_id: str, claim: str,
                         families: tuple[str, ...] = EXHAUSTIVE) -> dict | None:
        """The failing case of the exhaustive families (all of each family's cases are
        evaluated) that is smallest by (vertices, simplices), summed over the claim's
        variables, then by case id: {"case_id", "family", "vertices", "simplices"}; None
        without such a case or without recorded sizes."""
        if not self._has_column("cases", "sizes"):
            return None
        rows = self.db.execute(
            f"SELECT case_id, family, sizes FROM cases WHERE run_id = ? AND claim = ? AND "
            f"outcome = 'fails' AND sizes IS NOT NULL AND family IN "
            f"({', '.join('?' * len(families))})", (run_id, claim, *families))
        best = None
        for case_id, family, sizes in rows:
            counted = json.loads(sizes).values()
            key = (sum(v for v, _ in counted), sum(s for _, s in counted), case_id)
            if best is None or key < best[0]:
                best = (key, family)
        if best is None:
            return None
        (vertices, simplices, case_id), family = best
        return {"case_id": case_id, "family": family, "vertices": vertices,
                "simplices": simplices}

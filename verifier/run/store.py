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
import sqlite3
import time
from pathlib import Path

__all__ = ["Store", "OUTCOMES"]

OUTCOMES = ("holds", "fails", "outside", "error", "limit", "weak")

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
    PRIMARY KEY (run_id, claim, case_id)
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
        self.path.parent.mkdir(parents=True, exist_ok=True)
        self.db = sqlite3.connect(str(self.path), timeout=30)
        self.db.execute("PRAGMA journal_mode=WAL")
        self.db.execute("PRAGMA synchronous=NORMAL")
        self.db.executescript(SCHEMA)
        self.db.commit()

    def close(self):
        self.db.close()

    # ------------------------------------------------------------------ runs
    def open_run(self, run_id: str, request: dict, engine: str) -> bool:
        """Start (or find) a run; True if it already existed (a resume)."""
        row = self.db.execute("SELECT run_id FROM runs WHERE run_id = ?", (run_id,)).fetchone()
        if row:
            self.db.execute("UPDATE runs SET finished = NULL WHERE run_id = ?", (run_id,))
            self.db.commit()
            return True
        self.db.execute("INSERT INTO runs VALUES (?, ?, ?, NULL, ?)",
                        (run_id, json.dumps(request, sort_keys=True), time.time(), engine))
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
        self.db.executemany(
            "INSERT OR IGNORE INTO cases VALUES (?,?,?,?,?,?,?,?,?,?,?)",
            [(run_id, r["claim"], r["case_id"], r["family"], r["complex_hash"], r["outcome"],
              r.get("evidence"), json.dumps(r.get("sides") or []),
              json.dumps(r.get("witness")) if r.get("witness") else None,
              r.get("message"), r.get("seconds", 0.0)) for r in records])
        self.db.commit()

    def counts(self, run_id: str, claim: str) -> dict[str, int]:
        rows = self.db.execute("SELECT outcome, COUNT(*) FROM cases WHERE run_id = ? AND "
                               "claim = ? GROUP BY outcome", (run_id, claim))
        counts = {o: 0 for o in OUTCOMES}
        counts.update(dict(rows.fetchall()))
        return counts

    def seconds(self, run_id: str, claim: str) -> float:
        row = self.db.execute("SELECT SUM(seconds) FROM cases WHERE run_id = ? AND claim = ?",
                              (run_id, claim)).fetchone()
        return float(row[0] or 0.0)

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
            "outcome IN ('error', 'limit', 'weak') ORDER BY case_id LIMIT ?",
            (run_id, claim, limit))
        return [{"case_id": c, "outcome": o, "message": m} for c, o, m in rows]

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
        return table

    def runs(self) -> list[tuple]:
        """(run_id, started, finished, engine) of every run, newest first."""
        return list(self.db.execute("SELECT run_id, started, finished, engine FROM runs "
                                    "ORDER BY started DESC"))

    def save_counterexample(self, run_id: str, claim: str, case_id: str, record: dict):
        self.db.execute("INSERT OR REPLACE INTO counterexamples VALUES (?,?,?,?)",
                        (run_id, claim, case_id, json.dumps(record, sort_keys=True)))
        self.db.commit()

    def counterexample(self, run_id: str, claim: str) -> dict | None:
        row = self.db.execute("SELECT record FROM counterexamples WHERE run_id = ? AND claim = ?",
                              (run_id, claim)).fetchone()
        return json.loads(row[0]) if row else None

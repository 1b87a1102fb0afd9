"""Discoveries kept in the run store, so that ``verifier report`` can show them.

One table of our own, ``discoveries``, in the same SQLite file as the runs (the store's
own tables are created first, so the file stays a store that ``verifier run`` accepts).
A record is plain JSON: exact numbers are written as text ("3", "-1/2").
"""

from __future__ import annotations

import json
import sqlite3
import time
from pathlib import Path

__all__ = ["save", "load_all"]

SCHEMA = """
CREATE TABLE IF NOT EXISTS discoveries (
    id       INTEGER PRIMARY KEY AUTOINCREMENT,
    kind     TEXT NOT NULL,
    name     TEXT NOT NULL,
    created  REAL NOT NULL,
    record   TEXT NOT NULL
);
"""


def save(store: str | Path, kind: str, name: str, record: dict) -> None:
    """Append one discovery ("relations" or "hypotheses") to the store."""
    from ..run.store import Store
    handle = Store(store)
    try:
        handle.db.executescript(SCHEMA)
        handle.db.execute("INSERT INTO discoveries (kind, name, created, record) VALUES "
                          "(?, ?, ?, ?)", (kind, name, time.time(),
                                           json.dumps(record, sort_keys=True, default=str)))
        handle.db.commit()
    finally:
        handle.close()


def load_all(store: str | Path, latest_only: bool = True) -> list[dict]:
    """The discoveries in a store, oldest first (with ``latest_only``, the newest record
    of each kind and name); [] when there are none."""
    path = Path(store)
    if not path.is_file():
        return []
    db = sqlite3.connect(f"file:{path}?mode=ro", uri=True, timeout=30)
    try:
        try:
            rows = db.execute("SELECT id, kind, name, created, record FROM discoveries "
                              "ORDER BY id").fetchall()
        except sqlite3.OperationalError:
            return []
    finally:
        db.close()
    records = [{"id": i, "kind": k, "name": n, "created": c, **json.loads(r)}
               for i, k, n, c, r in rows]
    if latest_only:
        newest = {(r["kind"], r["name"]): r for r in records}
        records = sorted(newest.values(), key=lambda r: r["id"])
    return records

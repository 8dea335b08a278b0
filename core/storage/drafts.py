"""Notes on pairs not yet decided: saved the moment they are written, taken by the decision.

A note typed before the label must survive quitting, a crash or a walk to another pair; it
cannot wait in the screen. It is not a decision either (the log holds labels), so it waits
here, one per pair, person and role, until a decision on the pair carries it into the log.
"""

from __future__ import annotations

import sqlite3
from typing import TypeVar

from . import store

T = TypeVar("T")


def save(conn: sqlite3.Connection, pair_id: int, reviewer: str, note: str,
         role: str = "reviewer") -> None:
    """Keep ``note`` as the draft (an empty note removes it); no commit."""
    if not note.strip():
        clear(conn, pair_id, reviewer, role)
        return
    conn.execute("INSERT OR REPLACE INTO drafts VALUES (?, ?, ?, ?, ?)",
                 (int(pair_id), reviewer, role, note, store.now()))


def of(conn: sqlite3.Connection, pair_id: int, reviewer: str, role: str = "reviewer") -> str:
    try:
        row = conn.execute("SELECT note FROM drafts WHERE pair_id = ? AND reviewer = ? "
                           "AND role = ?", (int(pair_id), reviewer, role)).fetchone()
    except sqlite3.OperationalError as exc:
        return _absent(exc, "")
    return "" if row is None else str(row[0])


def clear(conn: sqlite3.Connection, pair_id: int, reviewer: str, role: str = "reviewer") -> None:
    try:
        conn.execute("DELETE FROM drafts WHERE pair_id = ? AND reviewer = ? AND role = ?",
                     (int(pair_id), reviewer, role))
    except sqlite3.OperationalError as exc:
        _absent(exc, None)


def _absent(exc: sqlite3.OperationalError, value: T) -> T:
    # An older file opened read-only has no drafts table. Asked this way rather than looked up
    # in sqlite_master first, which every decision paid for with a scan of the schema.
    if "no such table" not in str(exc):
        raise exc
    return value

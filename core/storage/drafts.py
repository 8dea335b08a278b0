"""Notes on pairs not yet decided: saved the moment they are written, taken by the decision.

A note typed before the label must survive quitting, a crash or a walk to another pair; it
cannot wait in the screen. It is not a decision either (the log holds labels), so it waits
here, one per pair, person and role, until a decision on the pair carries it into the log.
"""

from __future__ import annotations

import sqlite3

from . import store


def save(conn: sqlite3.Connection, pair_id: int, reviewer: str, note: str,
         role: str = "reviewer") -> None:
    """Keep ``note`` as the draft (an empty note removes it); no commit."""
    if not note.strip():
        clear(conn, pair_id, reviewer, role)
        return
    conn.execute("INSERT OR REPLACE INTO drafts VALUES (?, ?, ?, ?, ?)",
                 (int(pair_id), reviewer, role, note, store.now()))


def of(conn: sqlite3.Connection, pair_id: int, reviewer: str, role: str = "reviewer") -> str:
    if not store.has_table(conn, "drafts"):
        return ""
    row = conn.execute("SELECT note FROM drafts WHERE pair_id = ? AND reviewer = ? AND role = ?",
                       (int(pair_id), reviewer, role)).fetchone()
    return "" if row is None else str(row[0])


def clear(conn: sqlite3.Connection, pair_id: int, reviewer: str, role: str = "reviewer") -> None:
    if store.has_table(conn, "drafts"):
        conn.execute("DELETE FROM drafts WHERE pair_id = ? AND reviewer = ? AND role = ?",
                     (int(pair_id), reviewer, role))

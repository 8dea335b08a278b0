"""The append-only decision log and the current-label table derived from it.

Nothing is ever deleted from ``decisions``. ``current`` holds, per pair, reviewer and role
(a person may review a pair and later adjudicate it), the latest label decision that has not
been retracted; it is rebuilt from the log for the one (pair, reviewer, role) a new decision
touches (for all that a merge touches at once), so the two can never drift apart.
"""

from __future__ import annotations

import sqlite3
import uuid
from datetime import UTC, datetime, timedelta

from ..types import LABELS, Decision

_last_stamp: datetime | None = None

_COLUMNS = "decision_id, pair_id, reviewer, label, note, decided_at, seconds, supersedes, role"
_D_COLUMNS = ", ".join("d." + c.strip() for c in _COLUMNS.split(","))


def stamp() -> str:
    """UTC time, strictly increasing within this process so that 'latest' is never a tie."""
    global _last_stamp
    t = datetime.now(UTC)
    if _last_stamp is not None and t <= _last_stamp:
        t = _last_stamp + timedelta(microseconds=1)
    _last_stamp = t
    return t.isoformat(timespec="microseconds")


def row_to_decision(row: tuple) -> Decision:
    return Decision(row[0], int(row[1]), row[2], row[3], row[4] or "", row[5], float(row[6]),
                    row[7], row[8])


def refresh(conn: sqlite3.Connection, pair_id: int, reviewer: str,
            role: str = "reviewer") -> None:
    """Recompute ``current`` for one pair, reviewer and role, then the pair's queue state."""
    row = conn.execute(
        "SELECT decision_id, label, role, decided_at FROM decisions d "
        "WHERE pair_id = ? AND reviewer = ? AND role = ? AND label IS NOT NULL AND NOT EXISTS ("
        "  SELECT 1 FROM decisions r WHERE r.supersedes = d.decision_id AND r.label IS NULL) "
        "ORDER BY decided_at DESC, decision_id DESC LIMIT 1",
        (pair_id, reviewer, role)).fetchone()
    had = conn.execute("SELECT 1 FROM current WHERE pair_id = ? AND reviewer = ? AND role = ?",
                       (pair_id, reviewer, role)).fetchone() is not None
    if row is None:
        conn.execute("DELETE FROM current WHERE pair_id = ? AND reviewer = ? AND role = ?",
                     (pair_id, reviewer, role))
    else:
        conn.execute("INSERT OR REPLACE INTO current VALUES (?, ?, ?, ?, ?, ?)",
                     (pair_id, reviewer, row[2], row[0], row[1], row[3]))
    if role == "reviewer" and had != (row is not None):
        # Kept as a count, so that the queue need not count a long history on every pair.
        conn.execute("UPDATE reviewers SET standing = standing + ? WHERE name = ?",
                     (1 if row is not None else -1, reviewer))
    conn.execute(
        "UPDATE pairs SET n_labels = (SELECT count(*) FROM current c WHERE c.pair_id = ? "
        "AND c.role = 'reviewer') WHERE pair_id = ?", (pair_id, pair_id))
    conn.execute("UPDATE pairs SET open = (n_labels < need) WHERE pair_id = ?", (pair_id,))


# CROSS JOIN keeps temp.touched the outer loop: the planner, with statistics taken when the
# log was empty, scanned all of ``current`` (and all of ``decisions`` below) once per batch.
_STANDING = ("SELECT c.reviewer, count(*) FROM temp.touched t CROSS JOIN current c USING "
             "(pair_id, reviewer, role) WHERE c.role = 'reviewer' GROUP BY c.reviewer")


def refresh_many(conn: sqlite3.Connection, keys: list[tuple[int, str, str]]) -> None:
    """``refresh`` for many (pair_id, reviewer, role) at once, as a few statements over all of
    them: a merge of 25,000 decisions ran 150,000 statements one key at a time."""
    if len(keys) < 50:
        for pair_id, reviewer, role in keys:
            refresh(conn, pair_id, reviewer, role)
        return
    conn.execute("CREATE TEMP TABLE IF NOT EXISTS touched (pair_id INTEGER, reviewer TEXT, "
                 "role TEXT, PRIMARY KEY (pair_id, reviewer, role)) WITHOUT ROWID")
    conn.execute("DELETE FROM temp.touched")
    conn.executemany("INSERT OR IGNORE INTO temp.touched VALUES (?, ?, ?)",
                     [(int(p), r, o) for p, r, o in keys])
    before = dict(conn.execute(_STANDING).fetchall())
    conn.execute("DELETE FROM current WHERE (pair_id, reviewer, role) IN "
                 "(SELECT pair_id, reviewer, role FROM temp.touched)")
    # The same choice as refresh: the latest label not retracted, ties broken by id.
    conn.execute(
        "INSERT INTO current SELECT pair_id, reviewer, role, decision_id, label, decided_at "
        "FROM (SELECT d.pair_id, d.reviewer, d.role, d.decision_id, d.label, d.decided_at, "
        "  row_number() OVER (PARTITION BY d.pair_id, d.reviewer, d.role "
        "    ORDER BY d.decided_at DESC, d.decision_id DESC) AS k "
        "  FROM temp.touched t CROSS JOIN decisions d ON d.pair_id = t.pair_id "
        "  AND d.reviewer = t.reviewer AND d.role = t.role WHERE d.label IS NOT NULL "
        "  AND NOT EXISTS (SELECT 1 FROM decisions r WHERE r.supersedes = d.decision_id "
        "    AND r.label IS NULL)) WHERE k = 1")
    after = dict(conn.execute(_STANDING).fetchall())
    conn.executemany("UPDATE reviewers SET standing = standing + ? WHERE name = ?",
                     [(after.get(n, 0) - before.get(n, 0), n) for n in {*before, *after}
                      if after.get(n, 0) != before.get(n, 0)])
    # one pass over the pairs' rows and indexes, not one per column
    conn.execute(
        "UPDATE pairs SET (n_labels, open) = (SELECT count(*), count(*) < pairs.need "
        "FROM current c WHERE c.pair_id = pairs.pair_id AND c.role = 'reviewer') "
        "WHERE pair_id IN (SELECT pair_id FROM temp.touched)")
    conn.execute("DELETE FROM temp.touched")


def append(conn: sqlite3.Connection, pair_id: int, reviewer: str, label: str | None,
           note: str = "", seconds: float = 0.0, supersedes: str | None = None,
           role: str = "reviewer") -> Decision:
    """Append one decision (a label, or a retraction when ``label`` is None); no commit."""
    if label is not None and label not in LABELS:
        raise ValueError(f"unknown label {label!r}")
    d = Decision(str(uuid.uuid4()), int(pair_id), reviewer, label, note or "", stamp(),
                 float(max(0.0, seconds)), supersedes, role)
    conn.execute(f"INSERT INTO decisions ({_COLUMNS}) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
                 (d.decision_id, d.pair_id, d.reviewer, d.label, d.note, d.decided_at,
                  d.seconds, d.supersedes, d.role))
    refresh(conn, d.pair_id, reviewer, role)
    return d


def append_many(conn: sqlite3.Connection, reviewer: str, role: str,
                rows: list[tuple[int, str | None, str, str | None]]) -> list[Decision]:
    """``append`` of (pair_id, label or None, note, supersedes) for one reviewer and role, each
    pair at most once: one insert statement and one ``refresh_many``. A 25,000-row label file
    ran about ten statements a row one at a time."""
    out = []
    for pair_id, label, note, supersedes in rows:
        if label is not None and label not in LABELS:
            raise ValueError(f"unknown label {label!r}")
        out.append(Decision(str(uuid.uuid4()), int(pair_id), reviewer, label, note or "",
                            stamp(), 0.0, supersedes, role))
    conn.executemany(f"INSERT INTO decisions ({_COLUMNS}) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
                     [(d.decision_id, d.pair_id, d.reviewer, d.label, d.note, d.decided_at,
                       d.seconds, d.supersedes, d.role) for d in out])
    refresh_many(conn, [(d.pair_id, reviewer, role) for d in out])
    return out


IN_CHUNK = 900  # ids per IN (...): well under SQLite's limit of bound parameters


def current_many(conn: sqlite3.Connection, pair_ids: list[int], reviewer: str,
                 role: str = "reviewer") -> dict[int, Decision]:
    """``current_of`` for many pairs, a few hundred per query."""
    found: dict[int, Decision] = {}
    ids = sorted({int(p) for p in pair_ids})
    for at in range(0, len(ids), IN_CHUNK):
        part = ids[at:at + IN_CHUNK]
        for row in conn.execute(
                f"SELECT {_D_COLUMNS} FROM current c JOIN decisions d "
                "ON d.decision_id = c.decision_id WHERE c.reviewer = ? AND c.role = ? "
                f"AND c.pair_id IN ({', '.join('?' * len(part))})", (reviewer, role, *part)):
            found[int(row[1])] = row_to_decision(row)
    return found


def current_of(conn: sqlite3.Connection, pair_id: int, reviewer: str,
               role: str = "reviewer") -> Decision | None:
    row = conn.execute(
        f"SELECT {_D_COLUMNS} FROM current c JOIN decisions d ON d.decision_id = c.decision_id "
        "WHERE c.pair_id = ? AND c.reviewer = ? AND c.role = ?",
        (pair_id, reviewer, role)).fetchone()
    return None if row is None else row_to_decision(row)


def latest_of(conn: sqlite3.Connection, reviewer: str,
              role: str = "reviewer") -> Decision | None:
    """The reviewer's most recent label in this role that still stands: what undo takes back."""
    row = conn.execute(
        f"SELECT {_COLUMNS} FROM decisions d WHERE reviewer = ? AND role = ? "
        "AND label IS NOT NULL AND NOT EXISTS (SELECT 1 FROM decisions r "
        "WHERE r.supersedes = d.decision_id AND r.label IS NULL) "
        "ORDER BY decided_at DESC, decision_id DESC LIMIT 1", (reviewer, role)).fetchone()
    return None if row is None else row_to_decision(row)


def history(conn: sqlite3.Connection, reviewer: str, role: str = "reviewer") -> list[Decision]:
    """The reviewer's current labels in this role, oldest first: what [ and ] walk through."""
    rows = conn.execute(
        f"SELECT {_D_COLUMNS} FROM current c JOIN decisions d ON d.decision_id = c.decision_id "
        "WHERE c.reviewer = ? AND c.role = ? ORDER BY c.decided_at, c.decision_id",
        (reviewer, role)).fetchall()
    return [row_to_decision(r) for r in rows]


def log(conn: sqlite3.Connection, pair_id: int | None = None) -> list[Decision]:
    where, args = ("WHERE pair_id = ?", (pair_id,)) if pair_id is not None else ("", ())
    rows = conn.execute(f"SELECT {_COLUMNS} FROM decisions {where} "
                        "ORDER BY decided_at, decision_id", args).fetchall()
    return [row_to_decision(r) for r in rows]


def last_probabilities(conn: sqlite3.Connection, reviewer: str, n: int) -> list[float]:
    """The model's probability of the reviewer's last ``n`` decided pairs, oldest first."""
    rows = conn.execute(
        "SELECT t.probability FROM current c JOIN pairs p ON p.pair_id = c.pair_id "
        "JOIN patterns t ON t.pattern_id = p.pattern_id WHERE c.reviewer = ? "
        "AND c.role = 'reviewer' ORDER BY c.decided_at DESC LIMIT ?", (reviewer, n)).fetchall()
    return [r[0] for r in rows][::-1]

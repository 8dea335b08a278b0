"""The set-based rebuild of ``current`` that merge uses gives what one key at a time gives."""

from __future__ import annotations

import random
import shutil
import sqlite3
from pathlib import Path

from docket.core import Project
from docket.core.storage import decisions as log

COLUMNS = "decision_id, pair_id, reviewer, label, note, decided_at, seconds, supersedes, role"


def state(conn: sqlite3.Connection) -> tuple[list, list, list]:
    return (conn.execute("SELECT * FROM current ORDER BY 1, 2, 3").fetchall(),
            conn.execute("SELECT name, standing FROM reviewers ORDER BY 1").fetchall(),
            conn.execute("SELECT pair_id, n_labels, open FROM pairs ORDER BY 1").fetchall())


def test_refresh_many_equals_refresh_one_key_at_a_time(sample_project: Path,
                                                       tmp_path: Path) -> None:
    other = tmp_path / "other.docket"
    shutil.copy(sample_project, other)
    rng = random.Random(7)  # seeded: labels, retractions, roles and reviewers mixed
    with Project.open(sample_project) as a:
        pairs = [r[0] for r in a.connection.execute("SELECT pair_id FROM pairs LIMIT 120")]
        with a.transaction() as conn:
            for name in ("ana", "ben", "lead"):
                conn.execute("INSERT INTO reviewers (name, added_at) VALUES (?, '2026')", (name,))
            for _ in range(600):
                pid, who = rng.choice(pairs), rng.choice(("ana", "ben", "lead"))
                role = "adjudicator" if who == "lead" and rng.random() < 0.5 else "reviewer"
                last = log.latest_of(conn, who, role)
                if last is not None and rng.random() < 0.2:  # undo: a retraction
                    log.append(conn, last.pair_id, who, None, "", 0.0, last.decision_id, role)
                else:
                    log.append(conn, pid, who, rng.choice(("match", "non-match", "hold")),
                               role=role)
        rows = a.connection.execute(f"SELECT {COLUMNS} FROM decisions ORDER BY rowid").fetchall()
        expected = state(a.connection)
    with Project.open(other) as b, b.transaction() as conn:
        for name in ("ana", "ben", "lead"):
            conn.execute("INSERT INTO reviewers (name, added_at) VALUES (?, '2026')", (name,))
        half = len(rows) // 3  # some standing labels before the batch, as in a real merge
        for part, many in ((rows[:half], False), (rows[half:], True)):
            conn.executemany(f"INSERT INTO decisions ({COLUMNS}) VALUES "
                             f"({','.join('?' * 9)})", part)
            keys = sorted({(int(r[1]), r[2], r[8]) for r in part})
            if many:
                assert len(keys) >= 50  # the set-based path, not its small-batch fallback
                log.refresh_many(conn, keys)
            else:
                for key in keys:
                    log.refresh(conn, *key)
        assert state(conn) == expected

"""Test helpers for the project file: turning a present-day file back into an older one."""

from __future__ import annotations

import sqlite3
from pathlib import Path

TO_V2 = """
DROP INDEX decisions_pair;
DROP INDEX decisions_reviewer;
DROP INDEX decisions_time;
DROP TABLE role_grants;
DROP TABLE claims;
CREATE INDEX decisions_pair ON decisions(pair_id, reviewer);
CREATE INDEX decisions_reviewer ON decisions(reviewer, decided_at);
ALTER TABLE reviewers DROP COLUMN standing;
DELETE FROM meta WHERE key = 'records_fingerprint';
"""
TO_V1 = """
DROP TABLE drafts;
DROP TABLE missed_matches;
"""


def downgrade(path: Path, version: int) -> None:
    """The file as an older schema wrote it (version 2: no role history, claims or value hash;
    version 1: nor drafts and missed matches)."""
    conn = sqlite3.connect(path, isolation_level=None)
    conn.executescript(TO_V2 + (TO_V1 if version < 2 else ""))
    conn.execute("DELETE FROM migrations")
    conn.execute("INSERT INTO migrations VALUES (?, 'initial', '2026-01-01T00:00:00+00:00')",
                 (version,))
    conn.execute(f"PRAGMA user_version = {int(version)}")
    conn.close()

"""Test helpers for the project file: turning a present-day file back into an older one."""

from __future__ import annotations

import sqlite3
from pathlib import Path

TO_V3 = """
DROP TABLE machine_raters;
DROP TABLE queue_disagreement;
DELETE FROM meta WHERE key IN ('queue_order', 'queue_order_history');
"""
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
    """The file as an older schema wrote it (version 3: no machine raters; version 2: nor role
    history, claims or value hash; version 1: nor drafts and missed matches)."""
    conn = sqlite3.connect(path, isolation_level=None)
    steps = ((3, TO_V3), (2, TO_V2), (1, TO_V1))
    conn.executescript("".join(script for below, script in steps if version <= below))
    conn.execute("DELETE FROM migrations")
    conn.execute("INSERT INTO migrations VALUES (?, 'initial', '2026-01-01T00:00:00+00:00')",
                 (version,))
    conn.execute(f"PRAGMA user_version = {int(version)}")
    conn.close()

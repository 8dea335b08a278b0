"""The project file's migrations: each schema version after the first, and how an older file
is brought up to date (each step in its own transaction; a new file is built as the first
version migrated)."""

from __future__ import annotations

import json
import sqlite3
from collections.abc import Callable
from datetime import UTC, datetime

from .fingerprint import records_fingerprint

SCHEMA_VERSION = 6


def _now() -> str:
    return datetime.now(UTC).isoformat(timespec="microseconds")


# Version 2. drafts: a note typed on a pair not yet decided, kept until the decision takes it
# (one per pair, person and role; local to this file, like an unsent message). missed_matches:
# true matches that are not candidate pairs, recorded by their two ids; they never enter the
# queue or the gold labels, and are counted apart to show what blocking lost.
SCHEMA_V2 = (
    "CREATE TABLE drafts (pair_id INTEGER NOT NULL REFERENCES pairs(pair_id), "
    "reviewer TEXT NOT NULL, role TEXT NOT NULL DEFAULT 'reviewer', note TEXT NOT NULL, "
    "saved_at TEXT NOT NULL, PRIMARY KEY (pair_id, reviewer, role))",
    "CREATE TABLE missed_matches (missed_id TEXT PRIMARY KEY, left_id TEXT NOT NULL, "
    "right_id TEXT NOT NULL, reviewer TEXT NOT NULL, note TEXT NOT NULL DEFAULT '', "
    "recorded_at TEXT NOT NULL, UNIQUE (left_id, right_id))",
)


# Version 3. Lookups by (pair, reviewer, role) and (reviewer, role) are indexed in the order
# they are sorted, so a decision costs the same after 100,000 earlier ones as after none. Role
# grants are kept as a log, so a decision is judged by the role its maker held at the time.
# Claims are leases on served pairs, so two reviewers at work together never get one pair.
# ``reviewers.standing`` counts each reviewer's standing reviewer labels (the queue's audit
# rhythm needs it for every pair served; counting ``current`` would grow with history).
SCHEMA_V3 = """
DROP INDEX decisions_pair;
DROP INDEX decisions_reviewer;
CREATE INDEX decisions_pair ON decisions(pair_id, reviewer, role, decided_at);
CREATE INDEX decisions_reviewer ON decisions(reviewer, role, decided_at);
CREATE INDEX decisions_time ON decisions(decided_at);
CREATE TABLE role_grants (
    grant_id TEXT PRIMARY KEY, name TEXT NOT NULL, role TEXT NOT NULL, granted_by TEXT NOT NULL,
    granted_at TEXT NOT NULL, CHECK (role IN ('reviewer', 'adjudicator')));
CREATE INDEX role_grants_name ON role_grants(name, granted_at);
CREATE TABLE claims (
    pair_id INTEGER NOT NULL, reviewer TEXT NOT NULL, expires_at TEXT NOT NULL,
    PRIMARY KEY (pair_id, reviewer));
CREATE INDEX claims_reviewer ON claims(reviewer);
ALTER TABLE reviewers ADD COLUMN standing INTEGER NOT NULL DEFAULT 0;
UPDATE reviewers SET standing = (SELECT count(*) FROM current c WHERE c.reviewer = reviewers.name
    AND c.role = 'reviewer');
"""
MIGRATED_GRANTOR = "(granted before role history was kept)"

# Version 4. Machine raters: each matcher's output as one array of float64 scores
# (little-endian), one entry per candidate pair in pair-id order, NaN where the matcher said
# nothing. Ten matchers over a million pairs are then ten rows read in milliseconds, where one
# row per pair and matcher took seconds to write and to read back. ``queue_disagreement``
# holds the pairs the raters split on, for the disagreement-first queue order.
MACHINE_RATERS = ("""
CREATE TABLE machine_raters (
    name TEXT PRIMARY KEY, kind TEXT NOT NULL, threshold REAL NOT NULL, variant_group TEXT,
    role TEXT, source TEXT NOT NULL, rows INTEGER NOT NULL, given INTEGER NOT NULL,
    outside INTEGER NOT NULL, absent INTEGER NOT NULL, imported_at TEXT NOT NULL,
    n_pairs INTEGER NOT NULL, scores BLOB NOT NULL,
    CHECK (kind IN ('score', 'label', 'ensemble')),
    CHECK (role IS NULL OR role IN ('teacher', 'student')))""", """
CREATE TABLE queue_disagreement (
    pair_id INTEGER PRIMARY KEY REFERENCES pairs(pair_id), split REAL NOT NULL)""")


def _add_machine_raters(conn: sqlite3.Connection) -> None:
    for statement in MACHINE_RATERS:  # not executescript: it would commit the open transaction
        conn.execute(statement)


# Version 5. Claims carry the role they were made in, so one person reviewing in one terminal
# and adjudicating in another holds a pair in each, and neither ends the other's claims.
CLAIMS_BY_ROLE = ("""
CREATE TABLE claims_by_role (
    pair_id INTEGER NOT NULL, reviewer TEXT NOT NULL, role TEXT NOT NULL, expires_at TEXT NOT NULL,
    PRIMARY KEY (pair_id, role, reviewer), CHECK (role IN ('reviewer', 'adjudicator')))""",
    "INSERT INTO claims_by_role SELECT pair_id, reviewer, 'reviewer', expires_at FROM claims",
    "DROP TABLE claims",
    "ALTER TABLE claims_by_role RENAME TO claims",
    "CREATE INDEX claims_reviewer ON claims(reviewer, role)")


def _claims_by_role(conn: sqlite3.Connection) -> None:
    for statement in CLAIMS_BY_ROLE:
        conn.execute(statement)


def _claims_by_expiry(conn: sqlite3.Connection) -> None:
    # Version 6: lapsed claims are cleared on every claim; found by index, not by a scan.
    conn.execute("CREATE INDEX claims_expiry ON claims(expires_at)")


Migration = Callable[[sqlite3.Connection], None]


def _to_v3(conn: sqlite3.Connection) -> None:
    # Statement by statement: executescript would commit the migration's open transaction.
    for statement in SCHEMA_V3.split(";"):
        if statement.strip():
            conn.execute(statement)
    # An older file kept only each person's present role: an adjudicator is taken to have
    # held it since they were added, which is all the file can tell.
    # Its id is made from the name, so copies upgraded apart hold the same grant.
    conn.execute("INSERT INTO role_grants SELECT 'present:' || name, name, role, ?, "
                 "added_at FROM reviewers WHERE role <> 'reviewer'", (MIGRATED_GRANTOR,))
    if conn.execute("SELECT 1 FROM meta WHERE key = 'fields'").fetchone():
        # store.set_meta's row, written here: store imports this module, not the other way
        conn.execute("INSERT OR REPLACE INTO meta VALUES ('records_fingerprint', ?)",
                     (json.dumps(records_fingerprint(conn)),))


def _to_v2(conn: sqlite3.Connection) -> None:
    for statement in SCHEMA_V2:
        conn.execute(statement)


# version -> (name, function taking a file at version-1 to version)
MIGRATIONS: dict[int, tuple[str, Migration]] = {
    2: ("drafts and missed matches", _to_v2),
    3: ("indexed history, role grants, claims", _to_v3),
    4: ("machine raters", _add_machine_raters),
    5: ("claims by role", _claims_by_role),
    6: ("claims by expiry", _claims_by_expiry),
}


def migrate(conn: sqlite3.Connection, version: int, to: int = SCHEMA_VERSION) -> None:
    """Apply the registered migrations from ``version`` to ``to`` in order, each in its own
    transaction."""
    for target in range(version + 1, to + 1):
        name, func = MIGRATIONS[target]
        conn.execute("BEGIN IMMEDIATE")
        try:
            func(conn)
            conn.execute("INSERT INTO migrations VALUES (?, ?, ?)", (target, name, _now()))
            conn.execute(f"PRAGMA user_version = {target}")
            conn.execute("COMMIT")
        except BaseException:
            conn.execute("ROLLBACK")
            raise

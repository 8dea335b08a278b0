"""The project file: one SQLite database, its schema, migrations and connection settings.

WAL with synchronous=NORMAL: a committed decision survives a crash of the process (it is in
the WAL) at ~20 µs per commit; FULL would also survive power loss at ~10× the cost. Reviewers
can set ``DOCKET_SYNC=full`` for that.
"""

from __future__ import annotations

import json
import os
import sqlite3
from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from ..errors import DocketError, NotAProject
from . import file_health

APPLICATION_ID = 0x646F636B  # "dock": marks the file as a docket project
SCHEMA_VERSION = 6
BUSY_TIMEOUT_MS = 5000

SCHEMA_V1 = """
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
CREATE TABLE migrations (version INTEGER PRIMARY KEY, name TEXT NOT NULL, applied_at TEXT NOT NULL);
CREATE TABLE fields (
    position INTEGER PRIMARY KEY, name TEXT NOT NULL UNIQUE, left_column TEXT NOT NULL,
    right_column TEXT NOT NULL, kind TEXT NOT NULL, levels TEXT NOT NULL);
CREATE TABLE patterns (
    pattern_id INTEGER PRIMARY KEY, levels TEXT NOT NULL UNIQUE, n_pairs INTEGER NOT NULL,
    weight REAL NOT NULL, fs_probability REAL NOT NULL, probability REAL NOT NULL,
    priority REAL NOT NULL);
CREATE INDEX patterns_priority ON patterns(priority, pattern_id);
CREATE TABLE pairs (
    pair_id INTEGER PRIMARY KEY, left_id TEXT NOT NULL, right_id TEXT NOT NULL,
    pattern_id INTEGER NOT NULL REFERENCES patterns(pattern_id), rule TEXT,
    overlap INTEGER NOT NULL DEFAULT 0, need INTEGER NOT NULL DEFAULT 1,
    n_labels INTEGER NOT NULL DEFAULT 0, open INTEGER NOT NULL DEFAULT 1,
    audit INTEGER NOT NULL DEFAULT 0, stratum INTEGER, inclusion REAL, audit_order INTEGER
    {similarity_columns});
CREATE TABLE model (
    field TEXT NOT NULL, level INTEGER NOT NULL, level_name TEXT NOT NULL, m REAL, u REAL,
    weight REAL NOT NULL, PRIMARY KEY (field, level));
CREATE TABLE reviewers (name TEXT PRIMARY KEY, role TEXT NOT NULL DEFAULT 'reviewer',
    added_at TEXT NOT NULL);
CREATE TABLE decisions (
    decision_id TEXT PRIMARY KEY, pair_id INTEGER NOT NULL REFERENCES pairs(pair_id),
    reviewer TEXT NOT NULL, role TEXT NOT NULL DEFAULT 'reviewer', label TEXT,
    note TEXT NOT NULL DEFAULT '', decided_at TEXT NOT NULL, seconds REAL NOT NULL DEFAULT 0,
    supersedes TEXT,
    CHECK (label IS NULL OR label IN ('match', 'non-match', 'hold')));
CREATE INDEX decisions_pair ON decisions(pair_id, reviewer);
CREATE INDEX decisions_reviewer ON decisions(reviewer, decided_at);
CREATE INDEX decisions_supersedes ON decisions(supersedes);
CREATE TABLE current (
    pair_id INTEGER NOT NULL, reviewer TEXT NOT NULL, role TEXT NOT NULL,
    decision_id TEXT NOT NULL, label TEXT NOT NULL, decided_at TEXT NOT NULL,
    PRIMARY KEY (pair_id, reviewer, role));
CREATE INDEX current_reviewer ON current(reviewer, decided_at);
CREATE VIEW current_labels AS
    SELECT d.* FROM current c JOIN decisions d ON d.decision_id = c.decision_id;
"""

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

# Indexes built after the bulk load: building once is faster than maintaining during inserts.
# Lookups by left id use pairs_ids (left_id leads it), so left_id has no index of its own.
PAIR_INDEXES = """
CREATE INDEX pairs_queue ON pairs(pattern_id, open, audit);
CREATE INDEX pairs_audit ON pairs(audit, open, audit_order);
CREATE INDEX pairs_right ON pairs(right_id);
CREATE UNIQUE INDEX pairs_ids ON pairs(left_id, right_id);
"""

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
        from .fingerprint import records_fingerprint
        set_meta(conn, records_fingerprint=records_fingerprint(conn))


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


def has_table(conn: sqlite3.Connection, name: str) -> bool:
    """False for a table a later schema adds, in an older file opened read-only (unmigrated)."""
    return conn.execute("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = ?",
                        (name,)).fetchone() is not None


def now() -> str:
    return datetime.now(UTC).isoformat(timespec="microseconds")


def _configure(conn: sqlite3.Connection) -> None:
    conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    conn.execute("PRAGMA journal_mode = WAL")
    sync = "FULL" if os.environ.get("DOCKET_SYNC", "").lower() == "full" else "NORMAL"
    conn.execute(f"PRAGMA synchronous = {sync}")
    conn.execute("PRAGMA foreign_keys = ON")


def quote(name: str) -> str:
    return '"' + name.replace('"', '""') + '"'


def similarity_column(field: str) -> str:
    return quote(f"sim_{field}")


def create_file(path: Path, field_names: list[str]) -> sqlite3.Connection:
    """A new, empty project database at ``path`` (which must not exist), mode 0600."""
    fd = os.open(path, os.O_CREAT | os.O_EXCL | os.O_WRONLY, 0o600)
    os.close(fd)
    conn = sqlite3.connect(path, isolation_level=None, check_same_thread=False)
    conn.execute("PRAGMA journal_mode = OFF")  # bulk build; WAL is switched on when done
    conn.execute("PRAGMA synchronous = OFF")
    conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
    conn.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
    columns = "".join(f", {similarity_column(f)} REAL" for f in field_names)
    conn.executescript(SCHEMA_V1.replace("{similarity_columns}", columns))
    for version in range(2, SCHEMA_VERSION + 1):  # a new file is built as an old one migrated
        MIGRATIONS[version][1](conn)
    conn.execute("INSERT INTO migrations VALUES (?, ?, ?)", (SCHEMA_VERSION, "initial", now()))
    return conn


def finish_file(conn: sqlite3.Connection) -> None:
    conn.executescript(PAIR_INDEXES)
    conn.execute("ANALYZE")
    conn.execute("PRAGMA journal_mode = WAL")
    conn.close()


def schema_version(conn: sqlite3.Connection) -> int:
    return int(conn.execute("PRAGMA user_version").fetchone()[0])


def open_file(path: Path, readonly: bool = False, check: bool = True) -> sqlite3.Connection:
    """Open an existing project, checking it is one, is whole, and migrating it if older.

    Read-only, an older file is left as it is: readers check for a later table with
    ``has_table`` (merge reads copies so, and must never write to them). ``check=False`` skips
    the damage check, for a second connection of a process that has just checked the file.
    """
    file_health.check_place(path, write=not readonly)
    if not path.exists():
        raise DocketError(f"{path}: no such project; create it with 'docket new {path} ...'")
    if path.is_dir():
        raise NotAProject(f"{path}: a folder, not a docket project; check the path")
    # The header is read through SQLite, never with open(): closing any other handle on the
    # file would drop this process's SQLite locks on it (POSIX advisory locks are per process).
    probe = sqlite3.connect(f"file:{path}?mode=ro", uri=True)
    try:
        app_id = probe.execute("PRAGMA application_id").fetchone()[0]
        version = probe.execute("PRAGMA user_version").fetchone()[0]
        if app_id == APPLICATION_ID and check:
            file_health.check_integrity(probe, path)  # before any command writes
    except sqlite3.DatabaseError as exc:
        raise NotAProject(file_health.explain(exc, path)) from None
    finally:
        probe.close()
    if app_id != APPLICATION_ID:
        raise NotAProject(f"{path}: an SQLite file, but not a docket project; check the path")
    if version > SCHEMA_VERSION:
        raise DocketError(f"{path}: written by a newer docket (schema {version}, this one "
                          f"reads up to {SCHEMA_VERSION}); upgrade docket to open it")
    uri = f"file:{path}?mode=ro" if readonly else f"file:{path}"
    conn = sqlite3.connect(uri, uri=True, isolation_level=None, check_same_thread=False)
    if readonly:
        conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    else:
        _configure(conn)
        migrate(conn, version)
    return conn


def migrate(conn: sqlite3.Connection, version: int) -> None:
    """Apply registered migrations in order, each in its own transaction."""
    for target in range(version + 1, SCHEMA_VERSION + 1):
        name, func = MIGRATIONS[target]
        conn.execute("BEGIN IMMEDIATE")
        try:
            func(conn)
            conn.execute("INSERT INTO migrations VALUES (?, ?, ?)", (target, name, now()))
            conn.execute(f"PRAGMA user_version = {target}")
            conn.execute("COMMIT")
        except BaseException:
            conn.execute("ROLLBACK")
            raise


def get_meta(conn: sqlite3.Connection) -> dict[str, Any]:
    return {k: json.loads(v) for k, v in conn.execute("SELECT key, value FROM meta")}


def set_meta(conn: sqlite3.Connection, **values: Any) -> None:
    conn.executemany("INSERT OR REPLACE INTO meta VALUES (?, ?)",
                     [(k, json.dumps(v)) for k, v in values.items()])

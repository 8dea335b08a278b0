"""The project file: one SQLite database, its first schema and connection settings (later
versions and the upgrade of older files: ``migrations``).

WAL with synchronous=NORMAL: a committed decision survives a crash of the process (it is in
the WAL) at ~20 µs per commit; FULL would also survive power loss at ~10× the cost. Reviewers
can set ``DOCKET_SYNC=full`` for that.
"""

from __future__ import annotations

import json
import os
import shlex
import sqlite3
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

from ..errors import DocketError, NotAProject
from . import file_health
from .migrations import MIGRATIONS, SCHEMA_VERSION, migrate

APPLICATION_ID = 0x646F636B  # "dock": marks the file as a docket project
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

# Indexes built after the bulk load: building once is faster than maintaining during inserts.
# Lookups by left id use pairs_ids (left_id leads it), so left_id has no index of its own.
PAIR_INDEXES = """
CREATE INDEX pairs_queue ON pairs(pattern_id, open, audit);
CREATE INDEX pairs_audit ON pairs(audit, open, audit_order);
CREATE INDEX pairs_right ON pairs(right_id);
CREATE UNIQUE INDEX pairs_ids ON pairs(left_id, right_id);
"""

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
        named = path.with_name(path.name + ".docket")
        if not path.suffix and named.is_file():  # 'docket status vets' beside vets.docket
            raise DocketError(f"{path}: no such project; did you mean {named}?")
        raise DocketError(f"{path}: no such project; create it with "
                          f"'docket new {shlex.quote(str(path))} ...'")
    if path.is_dir():
        raise NotAProject(f"{path}: a folder, not a docket project; check the path")
    if file_health.special_file(path):
        raise NotAProject(f"{path}: a device, pipe or socket, not a docket project; check the "
                          "path")
    if path.stat().st_size == 0:
        raise NotAProject(f"{path}: an empty file, not a docket project; check the path, or "
                          "restore the project from a backup if it was cut short")
    # The header is read through SQLite, never with open(): closing any other handle on the
    # file would drop this process's SQLite locks on it (POSIX advisory locks are per process).
    probe = sqlite3.connect(file_health.uri(path, "ro"), uri=True)
    try:
        app_id = probe.execute("PRAGMA application_id").fetchone()[0]
        version = probe.execute("PRAGMA user_version").fetchone()[0]
        if app_id == APPLICATION_ID and check:
            file_health.check_integrity(probe, path)  # before any command writes
    except sqlite3.DatabaseError as exc:
        raise NotAProject(file_health.explain(exc, path)) from None
    finally:  # a file refused here (another program's, a newer docket's) is left as it was
        file_health.close_reader(probe, path)
    if app_id != APPLICATION_ID:
        size = path.stat().st_size
        if size < 512:  # SQLite's smallest page: a database with a table is at least this long
            raise NotAProject(f"{path}: the start of an SQLite file, only {size} bytes: not a "
                              "docket project; check the path, or restore the project from a "
                              "backup if it was cut short")
        raise NotAProject(f"{path}: an SQLite file, but not a docket project; check the path")
    if version > SCHEMA_VERSION:
        raise DocketError(f"{path}: written by a newer docket (schema {version}, this one "
                          f"reads up to {SCHEMA_VERSION}); upgrade docket to open it")
    conn = sqlite3.connect(file_health.uri(path, "ro" if readonly else None), uri=True,
                           isolation_level=None, check_same_thread=False)
    if readonly:
        conn.execute(f"PRAGMA busy_timeout = {BUSY_TIMEOUT_MS}")
    else:
        _configure(conn)
        migrate(conn, version, SCHEMA_VERSION)
    return conn


def get_meta(conn: sqlite3.Connection) -> dict[str, Any]:
    # fetched whole first: a value that is no JSON (an edited file) must not leave the query
    # open, which kept a refusing read-only open's -wal and -shm beside the file
    rows = conn.execute("SELECT key, value FROM meta").fetchall()
    return {k: json.loads(v) for k, v in rows}


def set_meta(conn: sqlite3.Connection, **values: Any) -> None:
    conn.executemany("INSERT OR REPLACE INTO meta VALUES (?, ?)",
                     [(k, json.dumps(v)) for k, v in values.items()])

"""An open project file: its connection, lock, meta, transactions and the decision log's writes.

The facade (``Project``) extends this; the modules under it (team, adjudication, exports,
evaluation) take a ``ProjectFile`` so that nothing below the facade imports it.
"""

from __future__ import annotations

import contextlib
import json
import sqlite3
import threading
import time
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any, Self

from ..errors import DocketError
from ..types import LABELS, Decision, FieldSpec
from . import claims, drafts, roles, store
from . import decisions as log
from .file_health import (
    ProjectFileError,
    check_still_writable,
    close_reader,
    damaged,
    explain,
    identity,
)

# what every command reads of the settings (meta) of a file docket built
OPENING_KEYS = ("threshold", "left_id_column", "right_id_column", "name")


class ProjectFile:
    """An open project file. Thread-safe for one writer: calls are serialised by a lock."""

    def __init__(self, path: Path, conn: sqlite3.Connection) -> None:
        self.path = path
        self._conn = conn
        self._identity = identity(path)
        self._lock = threading.RLock()
        try:
            self.meta: dict[str, Any] = store.get_meta(conn)
            self.fields = [FieldSpec(**f) for f in self.meta["fields"]]
            self.link = self.meta["mode"] == "link"
            for key in OPENING_KEYS:
                self.meta[key]
        except (KeyError, TypeError, ValueError, sqlite3.OperationalError) as exc:
            # a docket file whose settings were edited or cut away: a KeyError's traceback
            close_reader(conn, path)  # read-only or not, nothing left beside the file
            what = f"its settings lack {exc}" if isinstance(exc, KeyError) else (
                f"its settings cannot be read: {exc}")
            raise ProjectFileError(damaged(path, what)) from None

    # -- opening -----------------------------------------------------------------------------
    @classmethod
    def open(cls, path: str | Path, readonly: bool = False, check: bool = True) -> Self:
        """``check=False``: skip the damage check (a second connection to a checked file)."""
        path = Path(path)
        project = cls(path, store.open_file(path, readonly=readonly, check=check))
        project._readonly = readonly
        return project

    _readonly = False

    def close(self) -> None:
        with self._lock:
            if self._readonly:  # a look leaves no -wal or -shm beside the file
                close_reader(self._conn, self.path)
            else:
                self._conn.close()

    def __enter__(self) -> Self:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def reload(self) -> None:
        with self._lock:
            self.meta = store.get_meta(self._conn)

    def reload_if_refit(self) -> bool:
        """Read the settings again when a refit elsewhere (a label file, a merge, another
        screen) has replaced the model since they were read: a screen kept open showed the new
        probability beside the old model's factors ('probability 0.209', 'odds 1 to 1e50').
        True when it did. One small read; call it within the read it goes with."""
        with self._lock:
            row = self._conn.execute("SELECT value FROM meta WHERE key = 'refits'").fetchone()
            if (0 if row is None else json.loads(row[0])) == self.meta.get("refits", 0):
                return False
            self.meta = store.get_meta(self._conn)
            return True

    @property
    def threshold(self) -> float:
        return float(self.meta["threshold"])

    def record_ids(self, side: str) -> set[str]:
        """The ids of one side's records (``left`` in dedupe mode, whichever side is asked)."""
        table = "right_records" if side == "right" and self.link else "left_records"
        key = self.meta["right_id_column" if table == "right_records" else "left_id_column"]
        return {r for (r,) in self.connection.execute(
            f"SELECT {store.quote(key)} FROM {table}")}

    @property
    def connection(self) -> sqlite3.Connection:
        """For modules of the core that read the store directly (agreement, export)."""
        return self._conn

    @contextmanager
    def reading(self) -> Iterator[sqlite3.Connection]:
        """The connection, serialised with every other call on this project object."""
        with self._lock:
            yield self._conn

    @contextmanager
    def _snapshot(self) -> Iterator[None]:
        """Reads that see one state of the file (a read transaction), unless one is open."""
        if self._conn.in_transaction:
            yield
            return
        self._conn.execute("BEGIN")
        try:
            yield
        finally:
            self._conn.execute("COMMIT")

    @contextmanager
    def transaction(self) -> Iterator[sqlite3.Connection]:
        """One write transaction: committed when the block ends, rolled back on any error.

        An SQLite error (full disk, read-only or busy file, damage met on the way) leaves as
        a ``ProjectFileError`` whose message says what happened to the file and what to do.
        """
        with self._lock:
            check_still_writable(self.path, self._identity)
            try:
                self._begin()
            except sqlite3.Error as exc:
                raise ProjectFileError(explain(exc, self.path)) from exc
            try:
                yield self._conn
                self._conn.execute("COMMIT")
            except BaseException as exc:
                # SQLite may already have rolled back (a full disk, for one): a second rollback
                # would fail with "no transaction is active" and hide the real error.
                if self._conn.in_transaction:
                    with contextlib.suppress(sqlite3.Error):
                        self._conn.execute("ROLLBACK")
                if isinstance(exc, sqlite3.Error):
                    raise ProjectFileError(explain(exc, self.path)) from exc
                raise

    def _begin(self) -> None:
        # SQLite's own busy handler backs off to sleeps of 100 ms, so a writer working in
        # short batches with pauses between them (a bulk label) would win the lock again and
        # again; asking every millisecond takes it in one of the pauses.
        deadline = time.monotonic() + store.BUSY_TIMEOUT_MS / 1000
        self._conn.execute("PRAGMA busy_timeout = 0")
        try:
            while True:
                try:
                    self._conn.execute("BEGIN IMMEDIATE")
                    return
                except sqlite3.OperationalError as exc:
                    busy = (getattr(exc, "sqlite_errorname", "").startswith("SQLITE_BUSY")
                            or "locked" in str(exc))
                    if not busy or time.monotonic() >= deadline:
                        raise
                    time.sleep(0.001)
        finally:
            self._conn.execute(f"PRAGMA busy_timeout = {store.BUSY_TIMEOUT_MS}")

    # -- decisions ---------------------------------------------------------------------------
    def decide(self, pair_id: int, reviewer: str, label: str, note: str = "",
               seconds: float = 0.0, role: str = "reviewer") -> Decision:
        """Append a decision and commit it before returning."""
        if label not in LABELS:
            raise DocketError(f"unknown label '{label}'; use one of {', '.join(LABELS)}")
        with self.transaction() as conn:
            reviewer = roles.enter(conn, reviewer)  # a role beyond it is only ever granted
            prior = log.current_of(conn, pair_id, reviewer, role)
            claims.release(conn, reviewer, pair_id, role)
            note = note or drafts.of(conn, pair_id, reviewer, role)
            drafts.clear(conn, pair_id, reviewer, role)  # the note is in the log now
            return log.append(conn, pair_id, reviewer, label, note, seconds,
                              None if prior is None else prior.decision_id, role)

    def save_draft(self, pair_id: int, reviewer: str, note: str,
                   role: str = "reviewer") -> None:
        """Keep a note on a pair not yet decided, committed at once; the decision takes it."""
        with self.transaction() as conn:
            drafts.save(conn, pair_id, reviewer, note, role)

    def draft(self, pair_id: int, reviewer: str, role: str = "reviewer") -> str:
        with self._lock:
            return drafts.of(self._conn, pair_id, reviewer, role)

    def undo(self, reviewer: str, role: str = "reviewer") -> Decision | None:
        """Retract the reviewer's latest standing label; returns the retracted decision."""
        with self.transaction() as conn:
            last = log.latest_of(conn, reviewer, role)
            if last is not None:
                log.append(conn, last.pair_id, reviewer, None, "", 0.0, last.decision_id,
                           last.role)
                # Open again: no one else in the same role is given it meanwhile.
                claims.claim(conn, reviewer, [last.pair_id], keep=True, role=last.role)
                # Undo takes back a key pressed in haste, not the note written with it: the
                # note waits as a draft for the pair's next decision (shown, and editable, on e).
                if last.note and log.current_of(conn, last.pair_id, reviewer, last.role) is None:
                    drafts.save(conn, last.pair_id, reviewer, last.note, last.role)
        return last

"""An open project file: its connection, lock, meta, transactions and the decision log's writes.

The facade (``Project``) extends this; the modules under it (team, adjudication, exports,
evaluation) take a ``ProjectFile`` so that nothing below the facade imports it.
"""

from __future__ import annotations

import sqlite3
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any, Self

from ..errors import DocketError
from ..types import LABELS, Decision, FieldSpec
from . import decisions as log
from . import drafts, roles, store


class ProjectFile:
    """An open project file. Thread-safe for one writer: calls are serialised by a lock."""

    def __init__(self, path: Path, conn: sqlite3.Connection) -> None:
        self.path = path
        self._conn = conn
        self._lock = threading.RLock()
        self.meta: dict[str, Any] = store.get_meta(conn)
        self.fields = [FieldSpec(**f) for f in self.meta["fields"]]
        self.link = self.meta["mode"] == "link"

    # -- opening -----------------------------------------------------------------------------
    @classmethod
    def open(cls, path: str | Path, readonly: bool = False) -> Self:
        path = Path(path)
        return cls(path, store.open_file(path, readonly=readonly))

    def close(self) -> None:
        with self._lock:
            self._conn.close()

    def __enter__(self) -> Self:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def reload(self) -> None:
        with self._lock:
            self.meta = store.get_meta(self._conn)

    @property
    def threshold(self) -> float:
        return float(self.meta["threshold"])

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
    def transaction(self) -> Iterator[sqlite3.Connection]:
        """One write transaction: committed when the block ends, rolled back on any error."""
        with self._lock:
            self._conn.execute("BEGIN IMMEDIATE")
            try:
                yield self._conn
                self._conn.execute("COMMIT")
            except BaseException:
                self._conn.execute("ROLLBACK")
                raise

    # -- decisions ---------------------------------------------------------------------------
    def decide(self, pair_id: int, reviewer: str, label: str, note: str = "",
               seconds: float = 0.0, role: str = "reviewer") -> Decision:
        """Append a decision and commit it before returning."""
        if label not in LABELS:
            raise DocketError(f"unknown label '{label}'; use one of {', '.join(LABELS)}")
        with self.transaction() as conn:
            prior = log.current_of(conn, pair_id, reviewer, role)
            roles.register(conn, reviewer)  # a role beyond reviewer is only ever granted
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
        return last

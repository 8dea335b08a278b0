"""The facade's review queue: the next pairs for a reviewer, claims on them and progress.

The model's order (runs of one pattern broken up), or the split pairs first
(``matchers.split_queue``), with the audit slice (and a supplement, when one is drawn) mixed in
at a fixed rate. ``Project`` inherits these verbs.
"""

from __future__ import annotations

import sqlite3

from .errors import DocketError
from .matchers.split_queue import SplitFirst
from .ordering import queue
from .storage import claims, roles
from .storage import decisions as log
from .storage.project_file import ProjectFile
from .types import QueueItem

MOST_CLAIMED = 1000  # pairs one call may claim


class QueueVerbs(ProjectFile, SplitFirst):
    """Mixed into ``Project``."""

    def _stream(self, reviewer: str, audit: bool, n: int, exclude: tuple[int, ...],
                extra: bool = False) -> list:
        skip = f"AND p.pair_id NOT IN ({','.join(map(str, exclude))})" if exclude else ""
        order = "p.audit_order" if audit else "t.priority, t.pattern_id, p.pair_id"
        free = f"AND {claims.free_for('p')}" if self._claims_kept() else ""
        args: tuple = (int(audit), reviewer, *((reviewer, claims.now()) if free else ()))
        which, audit_col, join = "p.audit = ?", "p.audit", ""
        if extra:  # a supplement's pairs (quality.supplement), in their draw order
            which, audit_col, order = "? = 1", "1", "s.draw, p.pair_id"
            join = ("JOIN (SELECT pair_id, min(draw_order) AS draw FROM supplement_pairs "
                    "GROUP BY pair_id) s ON s.pair_id = p.pair_id ")
        rows = self._conn.execute(  # the model's order: a pool beyond n, to break its runs
            f"SELECT p.pair_id, p.left_id, p.right_id, t.probability, {audit_col}, p.overlap, "
            f"p.n_labels FROM pairs p JOIN patterns t ON t.pattern_id = p.pattern_id {join}"
            f"WHERE p.open = 1 AND {which} {skip} AND NOT EXISTS (SELECT 1 FROM current c "
            "WHERE c.pair_id = p.pair_id AND c.reviewer = ? AND c.role = 'reviewer') "
            f"{free} ORDER BY {order} LIMIT ?", (*args, n + (0 if audit else queue.POOL)))
        return rows.fetchall() if audit else queue.runs_broken(
            rows.fetchall(), log.last_probabilities(self._conn, reviewer, queue.WINDOW), n)

    def _audit_stream(self, reviewer: str, n: int, exclude: tuple[int, ...]) -> list:
        """The audit slice's next pairs, a supplement's (if any) taking every other place."""
        audit = self._stream(reviewer, True, n, exclude)
        try:  # asked this way, not looked up in sqlite_master (a scan of the schema per pair)
            extra = self._stream(reviewer, True, n, exclude, extra=True)
        except sqlite3.OperationalError as exc:
            if "no such table" not in str(exc):
                raise
            return audit  # no supplement drawn
        mixed = [r for pair in zip(extra, audit, strict=False) for r in pair]
        longer = extra if len(extra) > len(audit) else audit
        rows = mixed + longer[min(len(extra), len(audit)):]
        return list({r[0]: r for r in rows}.values())  # a pair drawn in both: shown once

    _has_claims: bool | None = None

    def _claims_kept(self) -> bool:
        # An older file opened read-only has no claims by role (nor standing counts) yet.
        if self._has_claims is None:
            self._has_claims = claims.kept(self._conn)
        return self._has_claims

    def next_pairs(self, reviewer: str, n: int = 1, exclude: tuple[int, ...] = (),
                   claim: bool = False) -> list[QueueItem]:
        """The next ``n`` pairs of this reviewer's queue, audit pairs mixed in at a fixed rate.

        Pairs that others' live claims fill are left out. With ``claim`` the pairs served are
        claimed for this reviewer in the same write transaction (``storage.claims``); without
        it nothing is written.
        """
        if not claim:
            with self._lock:  # looking only: the name is read as it would be registered
                return self._next(roles.as_kept(self._conn, reviewer), n, exclude)
        if n > MOST_CLAIMED:  # '-n 100000 --claim' took the whole queue from everyone else
            raise DocketError(f"-n {n:,} --claim: a claim keeps each pair from other reviewers "
                              f"for {claims.LEASE.seconds // 60} minutes; claim at most "
                              f"{MOST_CLAIMED:,} at once (more than anyone reviews in that "
                              "time), or leave --claim out to look only")
        with self.transaction() as conn:
            reviewer = roles.enter(conn, reviewer)
            items = self._next(reviewer, n, exclude)
            claims.claim(conn, reviewer, [i.pair_id for i in items])
        return items

    def release(self, reviewer: str, pair_id: int | None = None) -> None:
        """End the reviewer's claim on ``pair_id`` (None: on every pair they hold)."""
        with self.transaction() as conn:
            claims.release(conn, reviewer, pair_id)

    def _next(self, reviewer: str, n: int, exclude: tuple[int, ...]) -> list[QueueItem]:
        if self._claims_kept():
            row = self._conn.execute("SELECT standing FROM reviewers WHERE name = ?",
                                     (reviewer,)).fetchone()
            done = 0 if row is None else int(row[0])
        else:
            done = self._conn.execute("SELECT count(*) FROM current WHERE reviewer = ? "
                                      "AND role = 'reviewer'", (reviewer,)).fetchone()[0]
        audit = self._audit_stream(reviewer, n, exclude)
        other, split = self._others(reviewer, n, exclude)  # the model's order, or split first
        served = {r[0] for r in audit}
        other = [r for r in other if r[0] not in served]  # a supplement pair: in one stream
        every = int(self.meta.get("audit_every", queue.AUDIT_EVERY))
        out: list[QueueItem] = []
        for i in range(n):
            want_audit = (done + i) % every == every - 1
            source = audit if (want_audit and audit) or not other else other
            if not source:
                break
            pid, a, b, p, is_audit, overlap, n_labels = source.pop(0)
            reason = queue.reason_for(float(p), self.threshold, bool(is_audit),
                                      bool(overlap and n_labels), pid in split)
            out.append(QueueItem(pid, a, b, float(p), reason))
        return out

    def progress(self, reviewer: str) -> tuple[int, int]:
        """(pairs this reviewer has decided, pairs still in their queue)."""
        with self._lock:
            decided = self._conn.execute("SELECT count(*) FROM current WHERE reviewer = ? "
                                         "AND role = 'reviewer'", (reviewer,)).fetchone()[0]
            remaining = self._conn.execute(
                "SELECT count(*) FROM pairs p WHERE open = 1 AND NOT EXISTS (SELECT 1 FROM "
                "current c WHERE c.pair_id = p.pair_id AND c.reviewer = ? "
                "AND c.role = 'reviewer')",
                (reviewer,)).fetchone()[0]
        return int(decided), int(remaining)

"""The disagreement-first queue order, mixed into the facade's queue.

Where several matchers disagree, at least one of them is wrong, so a person's label there
teaches the most about the matchers. The order only wraps the model's: the pairs the raters
split on (``queue_disagreement``, written by ``queue_mode.set_mode``) come first, the most
evenly split first and ties in the model's order, then the model's order for the rest. Audit
pairs are never among them: the audit slice is drawn and shown exactly as before.
"""

from __future__ import annotations

import sqlite3
from typing import Any

from ..ordering.queue_order import split_first
from ..storage import claims


class SplitFirst:
    """The queue's non-audit rows: the model's order, or the split pairs first."""

    _conn: sqlite3.Connection
    meta: dict[str, Any]

    def _others(self, reviewer: str, n: int, exclude: tuple[int, ...]
                ) -> tuple[list, set[int]]:
        rest = self._stream(reviewer, False, n, exclude)  # type: ignore[attr-defined]
        if (self.meta.get("queue_order") or {}).get("mode") != "disagreement":
            return rest, set()
        skip = f"AND p.pair_id NOT IN ({','.join(map(str, exclude))})" if exclude else ""
        args: tuple = (reviewer,)
        free = ""
        if self._claims_kept():  # type: ignore[attr-defined]
            free, args = f"AND {claims.free_for('p')}", (reviewer, reviewer, claims.now())
        first = self._conn.execute(
            "SELECT p.pair_id, p.left_id, p.right_id, t.probability, p.audit, p.overlap, "
            "p.n_labels FROM queue_disagreement q JOIN pairs p ON p.pair_id = q.pair_id "
            "JOIN patterns t ON t.pattern_id = p.pattern_id "
            f"WHERE p.open = 1 AND p.audit = 0 {skip} AND NOT EXISTS (SELECT 1 FROM current c "
            "WHERE c.pair_id = p.pair_id AND c.reviewer = ? AND c.role = 'reviewer') "
            f"{free} ORDER BY q.split DESC, t.priority, p.pair_id LIMIT ?", (*args, n)).fetchall()
        return split_first(first, rest, n)

"""How each gold label was reached: every reviewer's label and note, and the adjudication.

The gold table says what the label is; these columns say why anyone should believe it. A
user who reads the export alone can tell a unanimous label from one an adjudicator chose
over a disagreement, and read the reason given.
"""

from __future__ import annotations

import json
import sqlite3
from dataclasses import dataclass

from ..reviewing import gold

DETAIL_COLUMNS = ("reviews", "why_adjudicated", "adjudicator", "reason", "adjudicated_at")


@dataclass(frozen=True)
class Detail:
    reviews: str  # JSON list of {"reviewer", "label", "note", "decided_at"}, oldest first
    why_adjudicated: str | None  # disagreement, hold or confirmed; None when not adjudicated
    adjudicator: str | None
    reason: str | None
    adjudicated_at: str | None

    def row(self) -> tuple[str | None, ...]:
        return (self.reviews, self.why_adjudicated, self.adjudicator, self.reason,
                self.adjudicated_at)


def _why(labels: list[str]) -> str:
    if "hold" in labels:
        return "hold"
    return "disagreement" if len(set(labels)) > 1 else "confirmed"


def details(conn: sqlite3.Connection, pair_ids: set[int]) -> dict[int, Detail]:
    """A :class:`Detail` for each pair in ``pair_ids`` (the gold pairs), by pair id.

    ``why_adjudicated`` is what the reviewers' standing labels show: a hold among them, a
    disagreement, or (reviewers agreed, an adjudicator settled it all the same, such as for a
    cluster conflict) ``confirmed``. The adjudication is the one gold follows (the latest
    standing one that counts under the policy).
    """
    reviews: dict[int, list[dict[str, str]]] = {}
    for pid, reviewer, label, note, at in conn.execute(
            "SELECT pair_id, reviewer, label, note, decided_at FROM current_labels "
            "WHERE role = 'reviewer' ORDER BY decided_at, reviewer"):
        if pid in pair_ids:
            reviews.setdefault(pid, []).append(
                {"reviewer": reviewer, "label": label, "note": note or "", "decided_at": at})
    # the adjudication gold follows: ordered by time, the latest that counts wins
    final = {pid: (who, reason, at) for pid, who, _, reason, at in gold.adjudications(conn)
             if pid in pair_ids}
    out = {}
    for pid in pair_ids:
        mine = reviews.get(pid, [])
        text = json.dumps(mine, ensure_ascii=False, separators=(",", ":"))
        if pid in final:
            who, reason, at = final[pid]
            out[pid] = Detail(text, _why([r["label"] for r in mine]), who, reason, at)
        else:
            out[pid] = Detail(text, None, None, None, None)
    return out

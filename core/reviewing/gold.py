"""Gold labels: which decided pairs count as settled, under the project's gold-label policy.

Policy (stored in the project, shown by ``status``):
- a pair needs at least ``min_reviews`` reviewer decisions (default 1);
- unanimous reviewer decisions become gold ("unanimous" with two or more, "single" with one);
- disagreements become gold only when an adjudicator decides them ("adjudicated"), and only
  a decision by someone who held the adjudicator role at the time they made it counts (the
  role grants log, ``storage.roles``), whatever role the decision row claims;
- holds never become gold: a hold from any reviewer sends the pair to adjudication, and an
  adjudicator's hold leaves it there.
"""

from __future__ import annotations

import sqlite3
from dataclasses import asdict, dataclass, field
from typing import Any

from ..storage import roles, store

DEFAULT_POLICY = {"min_reviews": 1}


@dataclass(frozen=True)
class PairLabels:
    """Every standing label on one pair, by role."""

    pair_id: int
    reviewers: dict[str, str] = field(default_factory=dict)  # reviewer -> label
    adjudicators: dict[str, str] = field(default_factory=dict)


@dataclass(frozen=True)
class Gold:
    pair_id: int
    label: str
    how: str  # unanimous, adjudicated or single
    reviewers: tuple[str, ...]
    n_reviews: int

    def to_dict(self) -> dict[str, Any]:
        d = asdict(self)
        d["reviewers"] = ";".join(self.reviewers)
        return d


def policy(conn: sqlite3.Connection) -> dict[str, Any]:
    meta = store.get_meta(conn)
    return {**DEFAULT_POLICY, **meta.get("gold_policy", {})}


def standing(conn: sqlite3.Connection) -> dict[int, PairLabels]:
    """Standing labels per pair; adjudications only from people who held the role then."""
    past = roles.history(conn)
    out: dict[int, PairLabels] = {}
    rows = conn.execute("SELECT pair_id, reviewer, role, label, decided_at FROM current "
                        "ORDER BY pair_id, decided_at")
    for pair_id, reviewer, role, label, decided_at in rows:
        entry = out.setdefault(pair_id, PairLabels(pair_id))
        if role != "adjudicator":
            entry.reviewers[reviewer] = label
        elif roles.role_at(past, reviewer, decided_at) == "adjudicator":
            entry.adjudicators[reviewer] = label
    return out


def _latest_adjudication(conn: sqlite3.Connection) -> dict[int, str]:
    """The most recent standing adjudication per pair that settles (several: latest wins).

    An adjudication settles only if its maker held the adjudicator role when making it.
    """
    past = roles.history(conn)
    return {pid: label for pid, reviewer, label, decided_at in conn.execute(
        "SELECT pair_id, reviewer, label, decided_at FROM current WHERE role = 'adjudicator' "
        "ORDER BY decided_at, decision_id")
        if roles.role_at(past, reviewer, decided_at) == "adjudicator"}


def unsettling_adjudications(conn: sqlite3.Connection) -> list[tuple[int, str, str]]:
    """(pair_id, name, decided_at) of standing adjudications made without the role then."""
    past = roles.history(conn)
    return [(int(pid), name, at) for pid, name, at in conn.execute(
        "SELECT pair_id, reviewer, decided_at FROM current WHERE role = 'adjudicator' "
        "ORDER BY pair_id, decided_at") if roles.role_at(past, name, at) != "adjudicator"]


def gold_labels(conn: sqlite3.Connection) -> list[Gold]:
    rule = policy(conn)
    final = _latest_adjudication(conn)
    out = []
    for pid, labels in sorted(standing(conn).items()):
        names = tuple(sorted(labels.reviewers))
        if pid in final:
            if final[pid] != "hold":
                out.append(Gold(pid, final[pid], "adjudicated", names, len(names)))
            continue
        values = set(labels.reviewers.values())
        if len(names) < rule["min_reviews"] or len(values) != 1 or "hold" in values:
            continue
        out.append(Gold(pid, values.pop(), "unanimous" if len(names) > 1 else "single", names,
                        len(names)))
    return out


def needs_adjudication(conn: sqlite3.Connection, extra: set[int] | None = None
                       ) -> list[tuple[int, str]]:
    """(pair_id, why) for pairs an adjudicator should settle, oldest conflict first.

    ``extra`` adds pairs from elsewhere (e.g. gold non-matches inside a cluster of matches).
    """
    final = _latest_adjudication(conn)
    out = []
    for pid, labels in sorted(standing(conn).items()):
        if pid in final and final[pid] != "hold":
            continue
        values = set(labels.reviewers.values())
        if "hold" in values:
            out.append((pid, "hold"))
        elif len(values) > 1:
            out.append((pid, "disagreement"))
        elif pid in final:
            out.append((pid, "held by adjudicator"))
    seen = {p for p, _ in out}
    out += [(p, "cluster conflict") for p in sorted(extra or ()) if p not in seen
            and not (p in final and final[p] != "hold")]
    return out

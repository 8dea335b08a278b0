"""Gold labels: which decided pairs count as settled, under the project's gold-label policy.

Policy (stored in the project, shown by ``status``):
- a pair needs at least ``min_reviews`` reviewer decisions (default 1);
- unanimous reviewer decisions become gold ("unanimous" with two or more, "single" with one);
- disagreements become gold only when an adjudicator decides them ("adjudicated"), and only
  a decision by someone who held the adjudicator role at the time they made it counts (the
  role grants log, ``storage.roles``), whatever role the decision row claims;
- holds never become gold: a hold from any reviewer sends the pair to adjudication, and an
  adjudicator's hold leaves it there;
- with ``independent_adjudication`` (off by default) an adjudicator may not settle a pair they
  decided as a reviewer (a decision later taken back counts too: they saw the pair as a
  reviewer); such an adjudication, say from a merged copy or made before the policy was set,
  does not count, and the pair waits for another adjudicator.
"""

from __future__ import annotations

import sqlite3
from dataclasses import asdict, dataclass
from typing import Any

from ..storage import roles, store
from . import labels as rules
from .labels import PairLabels

DEFAULT_POLICY: dict[str, Any] = {"min_reviews": 1, "independent_adjudication": False}


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


def set_policy(conn: sqlite3.Connection, **changes: Any) -> dict[str, Any]:
    """Store the changed rules (``min_reviews``, ``independent_adjudication``); the new policy."""
    unknown = set(changes) - set(DEFAULT_POLICY)
    if unknown:
        raise ValueError(f"no gold-policy rule {sorted(unknown)[0]}")
    stored = {**store.get_meta(conn).get("gold_policy", {}), **changes}
    store.set_meta(conn, gold_policy=stored)
    return {**DEFAULT_POLICY, **stored}


# An adjudication by someone who also decided the pair as a reviewer.
_OWN = ("EXISTS (SELECT 1 FROM decisions d WHERE d.pair_id = c.pair_id "
        "AND d.reviewer = c.reviewer AND d.role = 'reviewer')")


def adjudications(conn: sqlite3.Connection) -> list[tuple[int, str, str, str, str]]:
    """Standing adjudications that settle, oldest first: (pair_id, adjudicator, label, reason,
    decided_at).

    An adjudication settles only if its maker held the adjudicator role when making it; under
    ``independent_adjudication`` also only if they never decided the pair as a reviewer.
    """
    past = roles.history(conn)
    own = f" AND NOT {_OWN}" if policy(conn)["independent_adjudication"] else ""
    return [(pid, who, label, note or "", at) for pid, who, label, note, at in conn.execute(
        "SELECT c.pair_id, c.reviewer, c.label, c.note, c.decided_at FROM current_labels c "
        f"WHERE c.role = 'adjudicator'{own} ORDER BY c.decided_at, c.decision_id")
        if roles.role_at(past, who, at) == "adjudicator"]


def _latest_adjudication(conn: sqlite3.Connection) -> dict[int, str]:
    """The most recent standing adjudication per pair that settles (several: latest wins)."""
    return {pid: label for pid, _, label, _, _ in adjudications(conn)}


def unsettling_adjudications(conn: sqlite3.Connection) -> list[tuple[int, str, str]]:
    """(pair_id, name, decided_at) of standing adjudications made without the role then."""
    past = roles.history(conn)
    return [(int(pid), name, at) for pid, name, at in conn.execute(
        "SELECT pair_id, reviewer, decided_at FROM current WHERE role = 'adjudicator' "
        "ORDER BY pair_id, decided_at") if roles.role_at(past, name, at) != "adjudicator"]


def reviewed_by(conn: sqlite3.Connection, name: str) -> set[int]:
    """Pairs ``name`` has decided as a reviewer, a decision taken back included."""
    return {pid for (pid,) in conn.execute(
        "SELECT DISTINCT pair_id FROM decisions WHERE reviewer = ? AND role = 'reviewer'",
        (name,))}


def settled_labels(conn: sqlite3.Connection) -> dict[int, PairLabels]:
    """Standing labels per pair, the adjudications narrowed to those that settle (see
    ``adjudications``), in the order they were made."""
    out = standing(conn)
    for entry in out.values():
        entry.adjudicators.clear()
    for pid, who, label, _, _ in adjudications(conn):
        entry = out.setdefault(pid, PairLabels(pid))
        entry.adjudicators.pop(who, None)
        entry.adjudicators[who] = label
    return out


def gold_labels(conn: sqlite3.Connection) -> list[Gold]:
    """Every pair the gold rule settles (``labels.gold_label``), by pair id."""
    min_reviews = policy(conn)["min_reviews"]
    out = []
    for pid, labels in sorted(settled_labels(conn).items()):
        gold = rules.gold_label(labels, min_reviews)
        if gold is not None:
            names = tuple(sorted(labels.reviewers))
            out.append(Gold(pid, gold[0], gold[1], names, len(names)))
    return out


def fitting_labels(conn: sqlite3.Connection) -> dict[int, int]:
    """pair_id -> 1 (match) / 0 (non-match) under the fitting rule (``labels.fitting_label``)."""
    out = {}
    for pid, labels in settled_labels(conn).items():
        label = rules.fitting_label(labels)
        if label is not None:
            out[pid] = int(label == "match")
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

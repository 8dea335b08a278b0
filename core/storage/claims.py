"""Claims: a lease on each pair served to a reviewer, so that two at work together never get one.

Serving a pair with a claim writes (pair, reviewer, expiry) in ``claims`` in the same write
transaction as the queue query, so two processes asking at once are served one after the other
and the second sees the first one's claim. A pair is held back from a reviewer while the live
claims of others fill the reviews it still needs (``need - n_labels``): a non-overlap pair goes
to one reviewer at a time, an overlap pair to as many as it still needs. A claim ends when its
holder decides the pair, is served another (a reviewer holds the pairs they were served last),
or quits; otherwise it lapses at its expiry, so a crashed session holds nothing for long.

An adjudicator's claim (role 'adjudicator') holds a waiting pair back from every other
adjudicator: one adjudication settles a pair, so one adjudicator at a time is given it. Claims
in one role never count against, nor end, claims in the other.

This module knows nothing of queue order: it gives the queue a condition to add to its query,
and writes and releases claims.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterable
from datetime import UTC, datetime, timedelta

LEASE = timedelta(minutes=15)


def _iso(t: datetime) -> str:
    return t.isoformat(timespec="microseconds")


def now() -> str:
    return _iso(datetime.now(UTC))


def kept(conn: sqlite3.Connection) -> bool:
    """False in an older file opened read-only (unmigrated): no claims, or none by role."""
    return any(row[1] == "role" for row in conn.execute("PRAGMA table_info(claims)"))


def free_for(alias: str = "p") -> str:
    """SQL condition: the pair still has room for this reviewer beside others' live claims.

    Takes two parameters, in order: the reviewer's name and the present time (``now()``).
    """
    return (f"(SELECT count(*) FROM claims k WHERE k.pair_id = {alias}.pair_id "
            f"AND k.role = 'reviewer' AND k.reviewer <> ? AND k.expires_at > ?) "
            f"< {alias}.need - {alias}.n_labels")


def claim(conn: sqlite3.Connection, reviewer: str, pair_ids: Iterable[int],
          lease: timedelta = LEASE, keep: bool = False, role: str = "reviewer") -> None:
    """Hold ``pair_ids`` for ``reviewer`` in ``role`` until the lease ends; their earlier
    claims in that role end, unless ``keep`` (a pair taken back by undo joins the one on
    screen).

    Call inside the write transaction that chose the pairs.
    """
    at = datetime.now(UTC)
    # Two deletes, each an index lookup (claims_reviewer, claims_expiry); one with OR scanned.
    if not keep:
        conn.execute("DELETE FROM claims WHERE reviewer = ? AND role = ?", (reviewer, role))
    conn.execute("DELETE FROM claims WHERE expires_at <= ?", (_iso(at),))
    conn.executemany("INSERT OR REPLACE INTO claims VALUES (?, ?, ?, ?)",
                     [(int(p), reviewer, role, _iso(at + lease)) for p in pair_ids])


def release(conn: sqlite3.Connection, reviewer: str, pair_id: int | None = None,
            role: str = "reviewer") -> None:
    """End the reviewer's claim in ``role`` on one pair, or on every pair when ``pair_id`` is
    None."""
    if pair_id is None:
        conn.execute("DELETE FROM claims WHERE reviewer = ? AND role = ?", (reviewer, role))
    else:
        conn.execute("DELETE FROM claims WHERE pair_id = ? AND role = ? AND reviewer = ?",
                     (int(pair_id), role, reviewer))


def release_many(conn: sqlite3.Connection, reviewer: str, pair_ids: Iterable[int],
                 role: str = "reviewer") -> None:
    """``release`` of many pairs in one statement."""
    conn.executemany("DELETE FROM claims WHERE pair_id = ? AND role = ? AND reviewer = ?",
                     [(int(p), role, reviewer) for p in pair_ids])


def held_by_others(conn: sqlite3.Connection, name: str, role: str) -> set[int]:
    """Pairs that someone else holds a live claim on in ``role``."""
    return {int(p) for (p,) in conn.execute(
        "SELECT pair_id FROM claims WHERE role = ? AND reviewer <> ? AND expires_at > ?",
        (role, name, now()))}


def claim_first_free(conn: sqlite3.Connection, name: str, pair_ids: Iterable[int],
                     role: str = "adjudicator") -> int | None:
    """Claim for ``name`` the first of ``pair_ids`` no one else holds in ``role``; None when
    others hold them all. The earlier claims of ``name`` in that role end.

    Call inside a write transaction, so two asking at once are served one after the other.
    """
    taken = held_by_others(conn, name, role)
    first = next((int(p) for p in pair_ids if int(p) not in taken), None)
    claim(conn, name, [] if first is None else [first], role=role)
    return first


def held(conn: sqlite3.Connection) -> list[tuple[int, str, str, str]]:
    """Live claims: (pair_id, reviewer, role, expires_at), by pair."""
    return [(int(p), r, o, e) for p, r, o, e in conn.execute(
        "SELECT pair_id, reviewer, role, expires_at FROM claims WHERE expires_at > ? "
        "ORDER BY pair_id, reviewer, role", (now(),))]

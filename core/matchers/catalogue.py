"""The machine raters stored in a project: list, load, mark, remove.

Each matcher's output is one array of scores aligned with the candidate pairs in pair-id order
(``pair_ids``), NaN where the matcher said nothing; see ``migrations.MACHINE_RATERS``.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Sequence
from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

from ..errors import DocketError
from ..storage import store
from ..storage.project_file import ProjectFile

ROLES = ("teacher", "student")
KINDS = ("score", "label", "ensemble")
_COLUMNS = ("name, kind, threshold, variant_group, role, source, rows, given, outside, absent, "
            "imported_at")


@dataclass(frozen=True)
class MatcherInfo:
    """One stored matcher, without its scores.

    ``given`` counts the candidate pairs the file scored, ``outside`` its rows naming pairs of
    known records that are not candidate pairs (kept out: no audit stratum holds them) and
    ``absent`` the candidate pairs it said nothing about (predicted non-matches).
    """

    name: str
    kind: str
    threshold: float
    variant_group: str | None
    role: str | None
    source: str
    rows: int
    given: int
    outside: int
    absent: int
    imported_at: str

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


def matchers(conn: sqlite3.Connection) -> list[MatcherInfo]:
    if not store.has_table(conn, "machine_raters"):  # an older file opened read-only
        return []
    rows = conn.execute(f"SELECT {_COLUMNS} FROM machine_raters ORDER BY name").fetchall()
    return [MatcherInfo(*r) for r in rows]


def pair_ids(conn: sqlite3.Connection) -> np.ndarray:
    """Candidate pair ids in the order every stored score array follows."""
    rows = conn.execute("SELECT pair_id FROM pairs ORDER BY pair_id").fetchall()
    return np.fromiter((r[0] for r in rows), dtype=np.int64, count=len(rows))


def _check_known(conn: sqlite3.Connection, names: Sequence[str]) -> None:
    known = {m.name for m in matchers(conn)}
    unknown = [n for n in names if n not in known]
    if unknown:
        listed = ", ".join(sorted(known)) or "none yet; add some with 'docket matchers import'"
        raise DocketError(f"no matcher named {unknown[0]!r} in this project (stored: {listed})")


def load_scores(conn: sqlite3.Connection, names: Sequence[str] | None = None
                ) -> dict[str, np.ndarray]:
    """Score arrays by matcher name (all stored matchers when ``names`` is None)."""
    if names is None:
        names = [m.name for m in matchers(conn)]
    _check_known(conn, names)
    out = {}
    for name in names:
        blob, n = conn.execute("SELECT scores, n_pairs FROM machine_raters WHERE name = ?",
                               (name,)).fetchone()
        scores = np.frombuffer(blob, dtype="<f8")
        if scores.size != n:
            raise DocketError(f"matcher {name!r}: stored scores are damaged ({scores.size} of "
                              f"{n}); import it again with --replace")
        out[name] = scores
    return out


def save(conn: sqlite3.Connection, info: MatcherInfo, scores: np.ndarray) -> None:
    """Insert or replace one matcher (inside the caller's transaction)."""
    blob = np.ascontiguousarray(scores, dtype="<f8").tobytes()
    conn.execute(f"INSERT OR REPLACE INTO machine_raters ({_COLUMNS}, n_pairs, scores) "
                 "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)",
                 (*asdict(info).values(), int(scores.size), blob))


MAX_GROUP = 60  # characters, as a matcher's name


def mark(conn: sqlite3.Connection, name: str, *, group: str | None = None,
         role: str | None = None, threshold: float | None = None,
         clear_group: bool = False, clear_role: bool = False) -> None:
    """Set a matcher's variant group, role or threshold (inside the caller's transaction).

    A role is held by one matcher at a time: naming a new teacher unmarks the old one.
    """
    _check_known(conn, [name])
    if role is not None and role not in ROLES:
        raise DocketError(f"--role {role}: use teacher or student")
    if threshold is not None and not 0.0 <= threshold <= 1.0:
        raise DocketError(f"--threshold {threshold}: give a score from 0 to 1")
    if (group is not None or role is not None) and (clear_group or clear_role):
        raise DocketError("--clear takes a matcher's group and role away: give it alone")
    if group is not None and not group.strip():
        raise DocketError("--group needs a name, e.g. --group prompts")
    # as a matcher's name: an escape sequence in it was kept, and acted on every listing
    if group is not None and (len(group.strip()) > MAX_GROUP or not group.strip().isprintable()):
        raise DocketError(f"--group {group.strip()!r}: use 1 to {MAX_GROUP} characters without "
                          "line breaks or control characters")
    if group is not None or clear_group:
        conn.execute("UPDATE machine_raters SET variant_group = ? WHERE name = ?",
                     (group.strip() if group is not None else None, name))
    if role is not None:
        conn.execute("UPDATE machine_raters SET role = NULL WHERE role = ?", (role,))
    if role is not None or clear_role:
        conn.execute("UPDATE machine_raters SET role = ? WHERE name = ?",
                     (None if clear_role else role, name))
    if threshold is not None:
        conn.execute("UPDATE machine_raters SET threshold = ? WHERE name = ?",
                     (float(threshold), name))


def remove(conn: sqlite3.Connection, names: Sequence[str]) -> None:
    _check_known(conn, names)
    conn.executemany("DELETE FROM machine_raters WHERE name = ?", [(n,) for n in names])


def summary(conn: sqlite3.Connection) -> list[dict[str, Any]]:
    """What ``status`` lists per matcher."""
    return [m.to_dict() for m in matchers(conn)]


# -- the verbs the front ends call, on an open project -------------------------------------------
def listing(project: ProjectFile) -> list[dict[str, Any]]:
    with project.reading() as conn:
        return summary(conn)


def mark_all(project: ProjectFile, names: Sequence[str], *, group: str | None = None,
             role: str | None = None, threshold: float | None = None,
             clear: bool = False) -> list[dict[str, Any]]:
    """Mark every named matcher in one transaction; the listing afterwards."""
    if not names:
        raise DocketError("mark needs the names of the matchers to mark")
    if role is not None and len(names) != 1:
        raise DocketError("--role marks one matcher")
    if not (group or role or clear or threshold is not None):
        raise DocketError("mark needs --group, --role, --threshold or --clear")
    with project.transaction() as conn:
        for name in names:
            mark(conn, name, group=group, role=role, threshold=threshold, clear_group=clear,
                 clear_role=clear)
    return listing(project)


def forget(project: ProjectFile, names: Sequence[str]) -> None:
    if not names:
        raise DocketError("remove needs the names of the matchers to forget")
    with project.transaction() as conn:
        remove(conn, names)

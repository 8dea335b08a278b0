"""True matches that are not candidate pairs: what blocking lost, recorded by the two ids.

Recall from the audit slice is recall *within the candidate pairs*; a match that blocking never
paired is outside it. Reviewers come across such matches (a record's twin found while looking
at another pair, a duplicate someone reports); recording them here, counted apart from the
gold labels, gives a floor for what blocking missed and a rough reach: of the true matches
known, how many are candidates. They never enter the queue, the model or the gold labels.
"""

from __future__ import annotations

import sqlite3
import uuid
from dataclasses import asdict, dataclass
from typing import Any

from ..errors import DocketError
from ..records.id_hints import form_hint
from ..storage import roles, store
from ..storage.project_file import ProjectFile

COLUMNS = ("left_id", "right_id", "reviewer", "note", "recorded_at", "missed_id")


@dataclass(frozen=True)
class MissedMatch:
    left_id: str
    right_id: str
    reviewer: str
    note: str
    recorded_at: str
    missed_id: str

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


def _exists(conn: sqlite3.Connection, project: ProjectFile, side: str, record_id: str) -> bool:
    table = "right_records" if side == "right" and project.link else "left_records"
    key = project.meta["right_id_column" if table == "right_records" else "left_id_column"]
    return conn.execute(f"SELECT 1 FROM {table} WHERE {store.quote(key)} = ?",
                        (record_id,)).fetchone() is not None


def _as_typed(conn: sqlite3.Connection, project: ProjectFile, side: str, record_id: str) -> str:
    """The id as given where a record has it, else trimmed (a copied id's stray space): ids
    are matched exactly, and a table may hold ' 7' (it refuses ' 7' beside '7')."""
    if record_id != record_id.strip() and not _exists(conn, project, side, record_id):
        return record_id.strip()
    return record_id


def record(project: ProjectFile, left_id: str, right_id: str, reviewer: str,
           note: str = "") -> MissedMatch:
    """Record that the two records are one entity although no candidate pair holds them."""
    # checked as every reviewer's name: an escape sequence in it was kept, to be shown again
    reviewer = roles.short(roles.plain_name(reviewer, "pass --reviewer NAME, who found it"))
    with project.transaction() as conn:
        left_id, right_id = (_as_typed(conn, project, side, rid) for side, rid in
                             (("left", left_id), ("right", right_id)))
        if not project.link:
            if left_id == right_id:
                raise DocketError(f"{left_id} and {right_id} are the same record; give two ids")
            left_id, right_id = sorted((left_id, right_id))  # one table: the pair has no order
        for side, rid in (("left", left_id), ("right", right_id)):
            if not _exists(conn, project, side, rid):
                where = f"the {side} table" if project.link else "the table"
                other = "right" if side == "left" else "left"
                swapped = project.link and _exists(conn, project, other, rid)
                raise DocketError(f"no record '{rid}' in {where} of {project.path}; " + (
                    f"it is a record of the {other} table: give a left id, then a right id"
                    if swapped else "check the id (ids are matched exactly)"
                    + form_hint([rid], project.record_ids(side))))
        pair = conn.execute("SELECT pair_id FROM pairs WHERE left_id = ? AND right_id = ?",
                            (left_id, right_id)).fetchone()
        if pair is not None:
            raise DocketError(f"{left_id} and {right_id} are candidate pair {pair[0]}: decide "
                              f"it as a match instead (docket review, then / {pair[0]})")
        row = conn.execute(f"SELECT {', '.join(COLUMNS)} FROM missed_matches "
                           "WHERE left_id = ? AND right_id = ?", (left_id, right_id)).fetchone()
        if row is not None:
            return MissedMatch(*row)  # recorded before: once is enough
        found = MissedMatch(left_id, right_id, reviewer, note.strip(), store.now(),
                            str(uuid.uuid4()))
        conn.execute(f"INSERT INTO missed_matches ({', '.join(COLUMNS)}) VALUES (?, ?, ?, ?, ?, ?)",
                     tuple(asdict(found).values()))
    return found


def remove(project: ProjectFile, left_id: str, right_id: str) -> bool:
    """Take back a missed match recorded by mistake; False when there was none."""
    with project.transaction() as conn:
        a, b = (_as_typed(conn, project, side, rid) for side, rid in
                (("left", left_id), ("right", right_id)))
        if not project.link:
            a, b = sorted((a, b))
        cur = conn.execute("DELETE FROM missed_matches WHERE left_id = ? AND right_id = ?", (a, b))
    return cur.rowcount > 0


def listing(conn: sqlite3.Connection) -> list[MissedMatch]:
    """Every missed match, oldest first (none in an older file opened read-only)."""
    if not store.has_table(conn, "missed_matches"):
        return []
    return [MissedMatch(*r) for r in conn.execute(
        f"SELECT {', '.join(COLUMNS)} FROM missed_matches ORDER BY recorded_at, missed_id")]


def reach(gold_matches: int, missed: int) -> float | None:
    """Share of the known true matches that blocking made candidates (None with none known).

    Rough, and if anything too high: only the missed matches people happened to find count,
    so the true reach of blocking may be lower; it is not a design-based estimate.
    """
    known = gold_matches + missed
    return None if known == 0 else gold_matches / known


def frame(conn: sqlite3.Connection) -> Any:
    """The missed matches as a table (``docket export --what missed``), oldest first."""
    import pandas as pd
    rows = [tuple(m.to_dict()[c] for c in COLUMNS) for m in listing(conn)]
    return pd.DataFrame.from_records(rows, columns=list(COLUMNS)).astype(object)

"""Bulk decisions from a file: all of them checked first, then written in one transaction."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from ..errors import DocketError
from ..records.sources import read_frame
from ..storage import claims, roles
from ..storage import decisions as log
from ..storage.project_file import ProjectFile
from ..types import LABELS

ALIASES = {"non_match": "non-match", "nonmatch": "non-match", "no-match": "non-match"}


@dataclass
class BulkRow:
    pair_id: int
    label: str
    note: str


def read_rows(project: ProjectFile, path: Path) -> list[BulkRow]:
    frame = read_frame(path)
    cols = set(frame.columns)
    if "label" not in cols:
        raise DocketError(f"{path}: needs a 'label' column (with pair_id, or left_id and "
                          "right_id)")
    if "pair_id" in cols:
        ids = pd.to_numeric(frame["pair_id"], errors="coerce")
        bad_rows = [i + 2 for i in range(len(ids))
                    if pd.isna(ids.iloc[i]) or not float(ids.iloc[i]).is_integer()]
        if bad_rows:
            raise DocketError(f"{path}: row {bad_rows[0]}: pair_id "
                              f"{frame['pair_id'].iloc[bad_rows[0] - 2]!r} must be a whole "
                              "number (the pair_id column of 'docket next' or the scores "
                              "export)")
        known = {r[0] for r in project.connection.execute("SELECT pair_id FROM pairs")}
        pair_ids = [int(x) for x in ids]
        unknown = [p for p in pair_ids if p not in known]
        if unknown:
            raise DocketError(f"{path}: {len(unknown)} unknown pair id(s): "
                              f"{', '.join(map(str, unknown[:5]))}; nothing was written")
    elif {"left_id", "right_id"} <= cols:
        lookup = {(a, b): p for p, a, b in project.connection.execute(
            "SELECT pair_id, left_id, right_id FROM pairs")}
        pair_ids = []
        missing: list[str] = []
        for i, (a, b) in enumerate(zip(frame["left_id"], frame["right_id"], strict=True)):
            p = lookup.get((a, b))
            if p is None and not project.link:
                p = lookup.get((b, a))
            if p is None:
                missing.append(f"row {i + 2} ({a}, {b})")
            else:
                pair_ids.append(p)
        if missing:
            raise DocketError(f"{path}: {len(missing)} pair(s) are not candidate pairs of this "
                              f"project: {', '.join(missing[:3])}; nothing was written")
    else:
        raise DocketError(f"{path}: needs pair_id, or left_id and right_id, beside 'label'")
    rows = []
    notes = frame["note"] if "note" in cols else pd.Series([""] * len(frame))
    for i, (pid, label, note) in enumerate(zip(pair_ids, frame["label"], notes, strict=True)):
        lab = str(label or "").strip().lower()
        lab = ALIASES.get(lab, lab)
        if lab not in LABELS:
            raise DocketError(f"{path}: row {i + 2}: label '{label}' is not one of "
                              f"{', '.join(LABELS)}; nothing was written")
        rows.append(BulkRow(int(pid), lab, "" if note is None or pd.isna(note) else str(note)))
    return rows


def apply_rows(project: ProjectFile, reviewer: str, rows: list[BulkRow], role: str = "reviewer"
               ) -> int:
    with project.transaction() as conn:
        roles.register(conn, reviewer)
        for r in rows:
            prior = log.current_of(conn, r.pair_id, reviewer, role)
            log.append(conn, r.pair_id, reviewer, r.label, r.note, 0.0,
                       None if prior is None else prior.decision_id, role)
            claims.release(conn, reviewer, r.pair_id)
    return len(rows)


def label_once(project: ProjectFile, name: str, path: Path, adjudicator: str | None = None
               ) -> int:
    """``name``'s labels from ``path``, unless ``name`` has decisions already (a file applied
    before); ``adjudicator``, when another person, gets the adjudicator role. Returns the number
    of labels recorded. No refit: the caller decides when the queue is re-ranked."""
    from .team import add_reviewer
    if adjudicator and adjudicator != name:
        add_reviewer(project, adjudicator, "adjudicator", granted_by="docket demo")
    with project.reading() as conn:
        if conn.execute("SELECT 1 FROM decisions WHERE reviewer = ? LIMIT 1",
                        (name,)).fetchone():
            return 0
    return apply_rows(project, name, read_rows(project, path))

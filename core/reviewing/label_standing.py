"""Rows of a label file that say what already stands for the reviewer.

Running one file again (after adding rows to it, or after a run that stopped) logged every
row again: the log grew by the whole file, and "recorded 350 decisions" was said of 3 new ones.
"""

from __future__ import annotations

import warnings
from pathlib import Path

from ..storage import decisions as log
from ..storage import roles
from ..storage.project_file import ProjectFile
from ..wording import many
from .bulk import BulkRow


def new_rows(project: ProjectFile, reviewer: str, rows: list[BulkRow], path: Path,
             role: str = "reviewer") -> list[BulkRow]:
    """``rows`` without those whose label and note stand already for ``reviewer``, said in
    one warning."""
    with project.reading() as conn:
        name = roles.as_kept(conn, roles.plain_name(reviewer))
        # a few queries for the whole file: one per row took 25,000 of them
        standing = log.current_many(conn, [r.pair_id for r in rows], name, role)
        kept = []
        for r in rows:
            prior = standing.get(r.pair_id)
            if prior is None or (prior.label, prior.note or "") != (r.label, r.note):
                kept.append(r)
    if len(kept) < len(rows):
        same = len(rows) - len(kept)
        warnings.warn(f"{path}: {many(same, 'row gives', 'rows give')} the label and note "
                      f"that stand already for {name}; not recorded again", stacklevel=2)
    return kept

"""Two tables given to link that are one table twice: a copy under another name, its id
column renamed. Every record would pair with itself, and those pairs, all alike, would fill
the top of the queue and the predicted matches; what was meant was nearly always a dedupe."""

from __future__ import annotations

from .sources import Table


def copy_warning(left: Table, right: Table) -> str | None:
    """One line when ``right`` holds exactly the records of ``left`` (the same values in the
    same order, ids alike or not), else None."""
    a, b = left.frame, right.frame
    if len(a) != len(b) or len(a) < 2 or set(a.columns) != set(b.columns):
        return None
    if not a.reset_index(drop=True).equals(b[list(a.columns)].reset_index(drop=True)):
        return None
    ids = "under the same ids" if a.index.equals(b.index) else "under other ids"
    return (f"{right.path}: holds the same {len(a):,} records as {left.path} ({ids}), so each "
            "record is paired with itself and each such pair looks like a match; to find "
            "the duplicates within one table give it as --left alone")

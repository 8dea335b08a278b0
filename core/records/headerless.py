"""A text table without a header row: its first record was read as the column names.

'1,Anna Berg,Oslo' on the first line named the columns '1', 'Anna Berg' and 'Oslo'; with --id
given the build went on with that record gone and its values as field names, unsaid.
"""

from __future__ import annotations

from pathlib import Path

import pandas as pd

LOOKED_AT = 10_000  # rows: a header's values, if they are values, recur near the top
HITS = 2  # header names that are also values of their own column, for a record to be said


def first_line_a_record(path: Path, frame: pd.DataFrame, delimited: bool) -> str | None:
    """Why the header of a CSV, TSV or .txt table reads as a record, or None: two of its names
    or more are also values in their own columns below it."""
    if not delimited:
        return None  # JSON and Parquet name their values, record by record
    head = frame.head(LOOKED_AT)
    hits = [str(name) for name in frame.columns if str(name).strip()
            and bool((head[name].astype(str).str.strip() == str(name).strip()).any())]
    if len(hits) < HITS:
        return None
    shown = " and ".join(f"'{h}'" for h in hits[:2])
    return (f"{path}: its first line reads as a record, not a header: {shown} are values of "
            "their own columns too; if the file has no header row, add one (its first record "
            "was read as the column names)")

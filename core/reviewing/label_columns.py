"""The columns of a label file that ``docket label`` does not read.

A column it does not know was dropped unsaid: a 'notes' column lost every note, and a
'reviewer' column naming someone else had that person's labels recorded as the --reviewer's,
which makes two people one in every agreement figure.
"""

from __future__ import annotations

import difflib
import unicodedata
import warnings
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records.sources import row_named, row_word
from ..wording import many, noun

READ = ("pair_id", "label", "note", "left_id", "right_id")
# columns that say whose decision a row is; docket label gives every row to one reviewer
SCORES = ("probability", "log_odds", "fellegi_sunter_probability", "predicted")  # + sim_COL
WHO = ("reviewer", "reviewer_name", "rater", "annotator", "labeller", "labeler", "user")


def _folded(name: object) -> str:
    return unicodedata.normalize("NFC", str(name).strip()).casefold()


def check_columns(path: Path, frame: pd.DataFrame, reviewer: str | None) -> None:
    """Refuse a column naming other reviewers than ``reviewer``; warn of the other columns
    not read, with the column meant where one is near."""
    unread = [c for c in frame.columns if c not in READ]
    for column in unread:
        if _folded(column) not in WHO or reviewer is None:
            continue
        names = frame[column].dropna().map(lambda v: str(v).strip())
        others = sorted({n for n in names if n and _folded(n) != _folded(reviewer)})
        if others:
            shown = ", ".join(others[:3]) + ("…" if len(others) > 3 else "")
            raise DocketError(f"{path}: column '{column}' names {noun(len(others), 'reviewer')} "
                              f"{shown}, but every row would be recorded for {reviewer}; give "
                              "each reviewer's rows in a file of their own with --reviewer, or "
                              "drop the column; nothing was written")
    # the scores export with a label column filled in is a label file: its columns are known
    unread = [c for c in unread if _folded(c) not in WHO and c not in SCORES
              and not str(c).startswith("sim_")]
    if unread:
        near = [f"'{c}' (did you mean '{m[0]}'?)" if (m := difflib.get_close_matches(
            str(c).strip().lower(), READ, n=1, cutoff=0.75)) else f"'{c}'" for c in unread]
        more = f" and {len(near) - 5:,} more" if len(near) > 5 else ""
        warnings.warn(f"{path}: {many(len(unread), 'column')} not read: {', '.join(near[:5])}"
                      f"{more}; docket label reads {', '.join(READ)}", stacklevel=3)


def check_filled(path: Path, frame: pd.DataFrame) -> None:
    """A row with an id left empty was read as naming the pair (N-00005, None), and refused
    as no candidate pair, or its pair_id None as not a whole number. Rows with no label are
    named with their count: the scores export with labels filled in for a few pairs was
    refused at its first unlabelled row, as if that one were the slip."""
    for column in ("pair_id", "left_id", "right_id", "label"):
        if column not in frame.columns:
            continue
        empty = frame[column].map(lambda v: v is None or pd.isna(v) or not str(v).strip())
        at = np.flatnonzero(empty.to_numpy(dtype=bool))
        if not len(at):
            continue
        fix = ("give match, non-match or hold, or leave those rows out" if column == "label"
               else "give the ids of every row")
        if len(at) == 1:
            raise DocketError(f"{path}: {row_named(path, int(at[0]))} has no {column}; "
                              f"{fix}; nothing was written")
        word, first = row_word(path)
        listed = ", ".join(str(i + first) for i in at[:3]) + ("…" if len(at) > 3 else "")
        counted = " (counting the header as row 1)" if word == "row" else ""
        raise DocketError(f"{path}: {len(at):,} {word}s have no {column}: {word}s {listed}"
                          f"{counted}; {fix}; nothing was written")

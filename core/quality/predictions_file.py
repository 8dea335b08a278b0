"""Reading a matcher's output file: scores per candidate pair, and what was read."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd
import pyarrow as pa

from ..errors import DocketError
from ..records import decimal_commas
from ..records.formula_guard import GUARD, unguarded
from ..records.id_hints import form_hint
from ..records.sources import read_frame, row_named
from ..records.text_tables import plain_names
from ..storage.pair_keys import lookup, pair_keys
from ..storage.project_file import ProjectFile
from ..wording import many, quoted

SCORE_COLUMNS = ("score", "probability")
LABEL_COLUMNS = ("label", "predicted")
TRUE_WORDS = {"match", "1", "true", "yes", "y", "t"}
FALSE_WORDS = {"non-match", "nonmatch", "non_match", "no-match", "0", "false", "no", "n", "f"}


def _flag(values: pd.Series, path: Path) -> np.ndarray:
    text = values.map(lambda v: None if v is None else str(v).strip().lower())
    empty = text[text.isna() | text.eq("")]
    if len(empty):  # was "label value not understood: 'None'"
        raise DocketError(f"{path}: column label needs match or non-match on every row; "
                          f"{row_named(path, int(empty.index[0]))} has no value")
    bad = sorted({v for v in text if v not in TRUE_WORDS and v not in FALSE_WORDS}, key=str)
    if bad:
        raise DocketError(f"{path}: {many(len(bad), 'label value')} not understood: "
                          f"{quoted(bad)}; use match / non-match (or 1 / 0)")
    return text.isin(TRUE_WORDS).to_numpy()


def _numbers(values: pd.Series, column: str, path: Path) -> np.ndarray:
    # '0,87' beside '1', as a spreadsheet saves scores in many European locales
    if not pd.api.types.is_numeric_dtype(values) and decimal_commas.written_so(values):
        values = values.map(lambda v: v if v is None else str(v).strip().replace(",", "."))
    num = pd.to_numeric(values, errors="coerce")
    bad = values[num.isna() | ~np.isfinite(num.fillna(0.0))]
    if len(bad):
        first = bad.iloc[0]
        said = ("no value" if first is None or not str(first).strip()  # not "has None"
                else repr(first))
        raise DocketError(f"{path}: column {column} needs a number on every row; "
                          f"{row_named(path, int(bad.index[0]))} has {said}")
    return num.to_numpy(dtype=float)


def _sides_hint(project: ProjectFile, side: str, unknown: list[str]) -> str:
    """A link file whose columns hold the other side's ids, said as such."""
    other = "right" if side == "left" else "left"
    if not project.link or not set(unknown) <= project.record_ids(other):
        return ""
    return (f"; {'it is' if len(unknown) == 1 else 'they are'} the {other} table's: "
            f"{side}_id takes the {side} table's ids")


def read_predictions(project: ProjectFile, path: str | Path) -> tuple[pd.Series, dict[str, Any]]:
    """Scores per candidate pair id from a matcher's file, and what was read.

    The file (CSV, Parquet or JSONL) has left_id, right_id and a score (``score`` or
    ``probability``) or a label (``label`` or ``predicted``: match / non-match, 1 / 0). A label
    becomes score 1 or 0. Candidate pairs absent from the file get a score below every other:
    a predicted non-match. Ids that name no record are an error; pairs of known records that
    are not candidate pairs are counted and left out (no audit stratum holds them).
    """
    path = Path(path)
    frame = read_frame(path)
    frame.columns = plain_names(list(frame.columns),
                                ("left_id", "right_id", *SCORE_COLUMNS, *LABEL_COLUMNS))
    if not {"left_id", "right_id"} <= set(frame.columns):
        raise DocketError(f"{path}: needs columns left_id and right_id (found "
                          f"{', '.join(frame.columns[:8])})")
    kind = next((c for c in SCORE_COLUMNS if c in frame.columns), None)
    label_col = next((c for c in LABEL_COLUMNS if c in frame.columns), None)
    if kind is None and label_col is None:
        raise DocketError(f"{path}: needs a score column ({' or '.join(SCORE_COLUMNS)}) or a "
                          f"label column ({' or '.join(LABEL_COLUMNS)})")
    if not len(frame):  # every pair would be absent, read as a predicted non-match
        raise DocketError(f"{path}: a header and no rows; give the matcher's output, one row "
                          "per pair")
    for side in ("left", "right"):
        ids = frame[f"{side}_id"]
        if ids.isna().any():
            row = row_named(path, int(np.flatnonzero(ids.isna().to_numpy())[0]))
            raise DocketError(f"{path}: {row} has no {side}_id")
        known = project.record_ids(side)
        if ids.astype(str).str.startswith(GUARD).any():  # the scores export, as CSV
            ids = frame[f"{side}_id"] = pd.Series(unguarded(ids, known), index=frame.index,
                                                  dtype=object)
        unknown = sorted(set(ids) - known)
        if unknown:
            raise DocketError(f"{path}: {many(len(unknown), side + ' id')} "
                              f"{'names' if len(unknown) == 1 else 'name'} no record: "
                              f"{quoted(unknown)}; give ids exactly as the records have them"
                              f"{form_hint(unknown, known) or _sides_hint(project, side, unknown)}")
    if kind is not None:
        score = _numbers(frame[kind], kind, path)
    else:
        kind = label_col
        score = _flag(frame[label_col], path).astype(float)
    # one hash join in pyarrow (one table: a pair may be written either way round); every pair
    # read into a pandas index of (left id, right id) took 2.3 s and 300 MB at 1,000,000 pairs
    index = pair_keys(project.connection, project.link)
    at = lookup(index, pa.array(frame["left_id"].to_numpy(dtype=object), pa.large_string()),
                pa.array(frame["right_id"].to_numpy(dtype=object), pa.large_string()))
    inside = at >= 0
    ids = index.ids[at[inside]]
    dupes = pd.Series(ids).duplicated()
    if dupes.any():
        first = int(ids[dupes.to_numpy()][0])
        raise DocketError(f"{path}: pair {first} appears more than once; give one prediction "
                          "per pair")
    given = pd.Series(score[inside], index=ids)
    floor = (min(0.0, float(score.min())) if score.size else 0.0) - 1.0
    # in the order the pairs were read before, that of their ids (the pairs_ids index): a
    # supplement is drawn on the scores in this order
    order = np.fromiter((r[0] for r in project.connection.execute(
        "SELECT pair_id FROM pairs ORDER BY left_id, right_id")), dtype=np.int64,
        count=index.n_pairs)
    full = given.reindex(order).fillna(floor)
    info = {"file": str(path), "column": kind, "rows": len(frame),
            "candidate_pairs_given": int(inside.sum()),
            "outside_candidates": int((~inside).sum()),
            "absent_count_as_non_match": int(index.n_pairs - inside.sum()),
            "labels_only": kind in LABEL_COLUMNS, "_outside_scores": score[~inside],
            "scores_in_unit_interval": bool(score.size == 0 or
                                            (score.min() >= 0 and score.max() <= 1))}
    return full, info

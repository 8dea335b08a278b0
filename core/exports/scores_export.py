"""The scores export a part of the pairs at a time.

The whole frame of 1,000,000 pairs, read at once and then written as one CSV text, peaked at
870 MB; a part of 100,000 pairs is read (through the pair id, in order), written and let go
before the next. Only with one-to-one matching does a narrow frame of every pair come first:
a pair's prediction then depends on the others of its records.
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..matching.decision_rule import predicted
from ..storage import store
from ..storage.project_file import ProjectFile
from . import exporting

PART = 100_000  # pairs per part


def score_parts(project: ProjectFile, part: int = PART) -> Iterator[pd.DataFrame]:
    """The scores frame (the columns and rows of ``exporting.scores_frame``) in parts; at least
    one part, empty where there are no pairs."""
    sims = [store.similarity_column(f.name) for f in project.fields]
    conn = project.connection
    one_to_one = bool(project.meta.get("one_to_one"))
    flags = predicted(pd.read_sql_query(
        "SELECT p.pair_id, p.left_id, p.right_id, t.probability FROM pairs p JOIN patterns t "
        "ON t.pattern_id = p.pattern_id ORDER BY p.pair_id", conn),
        project.threshold, True) if one_to_one else None
    after, done = None, 0
    while True:
        frame = pd.read_sql_query(
            f"SELECT p.pair_id, p.left_id, p.right_id, {', '.join('p.' + s for s in sims)}, "
            "t.probability, t.weight AS log_odds, t.fs_probability AS "
            "fellegi_sunter_probability FROM pairs p JOIN patterns t "
            "ON t.pattern_id = p.pattern_id "
            + ("" if after is None else "WHERE p.pair_id > ? ")
            + "ORDER BY p.pair_id LIMIT ?", conn,
            params=(part,) if after is None else (after, part))
        if len(frame):
            # a part whose similarities are all missing is read as objects; the whole frame
            # was numbers wherever any pair had one
            numbers = list(frame.columns[3:])
            frame[numbers] = frame[numbers].astype(float)
        elif done:
            return
        yes = (flags[done:done + len(frame)] if flags is not None
               else predicted(frame, project.threshold, False))
        frame["predicted"] = np.where(yes, "match", "non-match")
        yield frame
        if len(frame) < part:
            return
        after, done = int(frame["pair_id"].iloc[-1]), done + len(frame)


def _text(frame: pd.DataFrame, kind: str, guard: bool, first: bool) -> str:
    if kind == "jsonl":
        return exporting.jsonl_text(frame)
    return exporting.csv_text(frame, guard, header=first)


def _parquet(parts: Iterator[pd.DataFrame], target: Any) -> None:
    import pyarrow.parquet as pq
    writer = None
    try:
        for frame in parts:
            table = exporting.arrow_table(frame)
            if writer is None:
                writer = pq.ParquetWriter(target, table.schema)
            writer.write_table(table.cast(writer.schema))
    finally:
        if writer is not None:
            writer.close()


def write_scores(project: ProjectFile, target: str, fmt: str | None, guard: bool = True
                 ) -> int:
    """The scores export to a file (atomically) or '-' for stdout; the number of pairs."""
    kind = exporting.output_format(target, fmt)
    n = 0

    def counted() -> Iterator[pd.DataFrame]:
        nonlocal n
        for frame in score_parts(project):
            n += len(frame)
            yield frame

    if target == "-":
        if kind == "parquet":
            exporting.parquet_to_stdout(lambda buf: _parquet(counted(), buf))
        else:
            for i, frame in enumerate(counted()):
                exporting.to_stdout(_text(frame, kind, guard, i == 0))
        return n

    def write(tmp: Path) -> None:
        if kind == "parquet":
            _parquet(counted(), tmp)
            return
        with tmp.open("w", encoding="utf-8", newline="") as out:
            for i, frame in enumerate(counted()):
                out.write(_text(frame, kind, guard, i == 0))

    exporting.atomic_write(Path(target), write)
    return n

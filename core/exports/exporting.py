"""Exports: frames of scores (and, later, gold labels) written as CSV, Parquet or JSONL."""

from __future__ import annotations

import io
import sys
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..matching.decision_rule import predicted
from ..storage import store
from ..storage.project_file import ProjectFile

FORMATS = {".csv": "csv", ".parquet": "parquet", ".pq": "parquet", ".jsonl": "jsonl",
           ".ndjson": "jsonl"}


def output_format(target: str, fmt: str | None) -> str:
    if fmt:
        if fmt not in ("csv", "parquet", "jsonl"):
            raise DocketError(f"--format {fmt}: use csv, parquet or jsonl")
        return fmt
    if target == "-":
        return "csv"
    found = FORMATS.get(Path(target).suffix.lower())
    if found is None:
        raise DocketError(f"{target}: cannot tell the format from the extension; "
                          "use .csv, .parquet or .jsonl, or pass --format")
    return found


def scores_frame(project: ProjectFile) -> pd.DataFrame:
    sims = ", ".join(f"p.{store.similarity_column(f.name)}" for f in project.fields)
    frame = pd.read_sql_query(
        f"SELECT p.pair_id, p.left_id, p.right_id, {sims}, t.weight AS match_weight, "
        "t.fs_probability, t.probability FROM pairs p JOIN patterns t "
        "ON t.pattern_id = p.pattern_id ORDER BY p.pair_id", project.connection)
    flags = predicted(frame, project.threshold, bool(project.meta.get("one_to_one")))
    frame["predicted"] = np.where(flags, "match", "non-match")
    return frame


def write_frame(frame: pd.DataFrame, target: str, fmt: str | None = None) -> None:
    """Write to a file (atomically: a temporary beside it, then renamed) or '-' for stdout."""
    kind = output_format(target, fmt)
    if target == "-":
        if kind == "parquet":
            buf = io.BytesIO()
            frame.to_parquet(buf, index=False)
            sys.stdout.buffer.write(buf.getvalue())
        elif kind == "csv":
            frame.to_csv(sys.stdout, index=False)
        else:
            frame.to_json(sys.stdout, orient="records", lines=True, force_ascii=False)
        return

    def write(tmp: Path) -> None:
        if kind == "parquet":
            frame.to_parquet(tmp, index=False)
        elif kind == "csv":
            frame.to_csv(tmp, index=False)
        else:
            frame.to_json(tmp, orient="records", lines=True, force_ascii=False)

    atomic_write(Path(target), write)


def atomic_write(path: Path, write: Callable[[Path], None]) -> None:
    """Let ``write`` fill a temporary file beside ``path``, then rename it into place."""
    tmp = path.with_name(f".{path.name}.partial")
    try:
        write(tmp)
        tmp.replace(path)
    except OSError as exc:
        tmp.unlink(missing_ok=True)
        raise DocketError(f"{path}: cannot write ({exc.strerror or exc})") from None

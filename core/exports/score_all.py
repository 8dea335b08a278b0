"""``docket score``: the project's current model applied to every pair, written as Parquet parts.

Labels made on a sample serve the whole data set: the pairs (a file, or a folder of parts of any
size) are read in batches, scored by the pure scorer with the model file's contents, and each
batch becomes one part of the output folder. The folder is written under a hidden name and
renamed when complete, so a failed run leaves nothing behind.
"""

from __future__ import annotations

import os
import shutil
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..matching import scoring
from ..matching.model_file import ScoringModel, score_pairs
from ..pairs.pair_files import _text, id_batches, open_pairs, positions, refuse_headless
from ..records.fields import masked
from ..records.sources import Table, load_table
from ..storage.file_health import no_room
from ..storage.project_file import ProjectFile


@dataclass
class ScoreJob:
    """What a worker needs to score a batch of pairs given by their ids."""

    model: ScoringModel
    left_norm: dict[str, np.ndarray]
    right_norm: dict[str, np.ndarray]
    left_index: pd.Index
    right_index: pd.Index
    names: tuple[str, str]
    where: str

    def __call__(self, frame: pd.DataFrame) -> pd.DataFrame:
        a = _text(frame.iloc[:, 0]).reset_index(drop=True)
        b = _text(frame.iloc[:, 1]).reset_index(drop=True)
        li, ri = positions(self.where, a, b, self.left_index, self.right_index, *self.names)
        out = score_pairs(self.model, self.left_norm, self.right_norm, li, ri)
        # the records' own ids: a guarded id ("'@anna") read from a CSV export stays no id
        out.insert(0, "right_id", self.right_index.to_numpy()[ri])
        out.insert(0, "left_id", self.left_index.to_numpy()[li])
        return out


def stored_tables(project: ProjectFile, left: Path | None, right: Path | None
                  ) -> tuple[Table, Table | None]:
    """The tables to score against: the files given, else the records the project holds."""
    meta = project.meta

    def stored(side: str) -> Table:
        key = meta[f"{side}_id_column"]
        with project.reading() as conn:
            frame = pd.read_sql_query(f"SELECT * FROM {side}_records", conn)
        frame = frame.set_index(key)
        frame.index = frame.index.astype(str)
        where = Path(f"{project.path.name}'s stored {side} records (pass --{side} with the "
                     "full table)")
        return Table(where, key, frame)

    def given(path: Path, side: str) -> Table:
        key = meta[f"{side}_id_column"]  # score has no --id: the project's column is the one
        return load_table(path, key, f"the project's {side} records have their ids in "
                          f"'{key}'; give --{side} a table with that column")

    if meta["mode"] != "link" and right:  # it was ignored, unsaid
        raise DocketError(f"--right {right}: {project.path.name} deduplicates one table; give "
                          "its records with --left alone")
    lt = given(left, "left") if left else stored("left")
    if meta["mode"] != "link":
        return lt, None
    return lt, given(right, "right") if right else stored("right")


def _has_columns(model: ScoringModel, table: Table, side: str) -> None:
    for f in model.fields:
        column = f.left_column if side == "left" else f.right_column
        if column not in table.frame.columns:
            raise DocketError(f"{table.path}: no column '{column}', which the model compares "
                              f"(field '{f.name}'); score with a model of these tables, or "
                              "name tables that have it with --left/--right")


def make_job(model: ScoringModel, left: Table, right: Table | None, where: str) -> ScoreJob:
    other = left if right is None else right
    _has_columns(model, left, "left")
    if right is not None:
        _has_columns(model, right, "right")
    lnorm = scoring.normalised(model.fields, masked(left.frame, model.fields, "left"), "left")
    rnorm = lnorm if right is None else scoring.normalised(
        model.fields, masked(right.frame, model.fields, "right"), "right")
    return ScoreJob(model, lnorm, rnorm, pd.Index(left.frame.index),
                    pd.Index(other.frame.index), (left.path.name, other.path.name), where)


def _target(out: Path) -> Path:
    if out.exists():
        raise DocketError(f"{out}: already exists; give a new folder for the scored parts")
    if not out.parent.exists():
        raise DocketError(f"{out.parent}: no such folder; create it first")
    tmp = out.with_name(f".{out.name}.{os.getpid()}.scoring")
    shutil.rmtree(tmp, ignore_errors=True)
    with _writing(out):
        tmp.mkdir(mode=0o700)
    return tmp


@contextmanager
def _writing(out: Path) -> Iterator[None]:
    """A folder that cannot be written (read-only, full) as one line naming it."""
    try:
        yield
    except OSError as exc:
        if no_room(exc):
            raise DocketError(f"{out}: disk full while writing the scored parts; nothing was "
                              "written; free some space, or give a folder on another disk"
                              ) from None
        raise DocketError(f"{out}: cannot write the scored parts in {out.parent} "
                          f"({exc.strerror or exc}); nothing was written; give a folder you "
                          "can write to") from None


def score_to_parts(job: ScoreJob, pairs: Path, out: Path, engine: str = "in-process",
                   workers: int = 2, scheduler: str | None = None,
                   progress: Callable[[int, int], None] | None = None) -> int:
    """Score every pair in ``pairs`` into Parquet parts in the new folder ``out``; rows written."""
    source = open_pairs(pairs)
    if pairs.is_dir() and out.resolve().is_relative_to(pairs.resolve()):
        # the next read of that folder took the scored parts for pairs, each pair twice
        raise DocketError(f"{out}: inside the folder of pairs {pairs}, where its parts would "
                          "be read as pairs too; give a folder outside it")
    tmp = _target(out)
    try:
        if engine == "dask":
            rows = _on_dask(job, source, tmp, workers, scheduler)
        else:
            rows = 0
            for i, (_, a, b) in enumerate(id_batches(source)):
                if i == 0:
                    refuse_headless(source, job.left_index, job.right_index)
                part = job(pd.DataFrame({"a": a, "b": b}))
                with _writing(out):
                    part.to_parquet(tmp / f"part-{i:05d}.parquet", index=False)
                rows += len(part)
                if progress:
                    progress(rows, max(rows, source.rows))
        with _writing(out):
            os.replace(tmp, out)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return rows


def _on_dask(job: ScoreJob, source: Any, tmp: Path, workers: int,
             scheduler: str | None) -> int:
    from ..storage.dask_engine import _modules, connect
    _, dd = _modules()
    client, cluster = connect(workers, scheduler)
    try:
        if source.is_parquet:
            raw = dd.read_parquet([str(p) for p in source.parts], columns=list(source.columns))
        else:
            _, a, b = next(id_batches(source))
            refuse_headless(source, job.left_index, job.right_index)
            raw = dd.from_pandas(pd.DataFrame({"a": a, "b": b}), npartitions=2 * workers)
        meta = pd.DataFrame({"left_id": pd.Series(dtype=object),
                             "right_id": pd.Series(dtype=object),
                             "log_odds": pd.Series(dtype=float),
                             "probability": pd.Series(dtype=float),
                             "predicted": pd.Series(dtype=bool)})
        shared = client.scatter(job, broadcast=True)
        scored = raw.map_partitions(lambda f, j: j(f), shared, meta=meta)
        import pyarrow as pa

        # the schema given, not inferred from the empty meta: text columns of an empty frame
        # hold no value to infer from, and newer dask/pyarrow refuse the placeholder
        schema = pa.schema([("left_id", pa.string()), ("right_id", pa.string()),
                            ("log_odds", pa.float64()), ("probability", pa.float64()),
                            ("predicted", pa.bool_())])
        scored.to_parquet(str(tmp), write_index=False, schema=schema,
                          name_function=lambda i: f"part-{i:05d}.parquet")
        import pyarrow.parquet as pq
        return int(sum(pq.ParquetFile(p).metadata.num_rows for p in tmp.glob("*.parquet")))
    finally:
        client.close()
        if cluster is not None:
            cluster.close()

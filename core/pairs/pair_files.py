"""Candidate pairs from a file: CSV/TSV/JSONL, one Parquet file or a folder of Parquet parts.

A folder is what Spark, Dask or DuckDB write: ``part-*.parquet`` files, perhaps in partition
subfolders, beside ``_SUCCESS`` or ``.crc`` files (names starting with ``_`` or ``.`` are
skipped). Parquet is read in bounded batches; each batch becomes *pair keys* at once
(``left position * width + right position``, one int64 per pair), so memory grows by eight
bytes per pair, never by a frame of id strings.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records.formula_guard import FORMULA_START, GUARD
from ..wording import many, quoted

BATCH = 500_000
ID_COLUMNS = ("left_id", "right_id")
PARQUET = (".parquet", ".pq")


@dataclass
class PairSource:
    """Where the pairs are and which two columns hold the ids."""

    path: Path
    parts: list[Path]  # empty for a text file
    columns: tuple[str, str]
    rows: int  # rows in the file(s), before duplicates and self pairs are dropped

    @property
    def is_parquet(self) -> bool:
        return bool(self.parts)


def _parts(path: Path) -> list[Path]:
    if path.is_file():
        return [path] if path.suffix.lower() in PARQUET else []
    found = sorted(p for p in path.rglob("*") if not p.is_dir()
                   and not any(part.startswith(("_", ".")) for part in
                               p.relative_to(path).parts))
    parts = [p for p in found if p.suffix.lower() in PARQUET]
    gone = next((p for p in parts if not p.is_file()), None)
    if gone is not None:  # a link to a part no longer there: its pairs were left out, unsaid
        raise DocketError(f"{gone}: a part that cannot be opened (a link to a file no longer "
                          "there?); restore it, or remove it if its pairs are not wanted")
    if not parts:
        raise DocketError(f"{path}: a folder with no Parquet parts; give a file of pairs or a "
                          "folder of .parquet files")
    return parts


def _choose(columns: list[str], where: Path) -> tuple[str, str]:
    if set(ID_COLUMNS) <= set(columns):
        return ID_COLUMNS
    if len(columns) < 2:
        raise DocketError(f"{where}: needs two columns, left id and right id")
    return columns[0], columns[1]


def refuse_headless(source: PairSource, left_index: pd.Index, right_index: pd.Index) -> None:
    """A text file of pairs whose first line is a pair (both cells record ids) has no header:
    read as one, its first pair was left out, unsaid."""
    if source.is_parquet or source.columns == ID_COLUMNS:
        return
    a, b = source.columns
    if a in left_index and b in right_index:
        raise DocketError(f"{source.path}: its first line ({a}, {b}) names two records, so it "
                          "is a pair, not a header; add a first line left_id,right_id")


def open_pairs(path: Path) -> PairSource:
    """Check every part's footer and columns before any work: a bad part fails at once."""
    import pyarrow.parquet as pq

    if not path.exists():
        raise DocketError(f"{path}: no such file or folder of pairs; check the path")
    from ..records.sources import refuse_special
    refuse_special(path)  # a pipe was 'a folder with no Parquet parts'
    parts = _parts(path)
    if not parts:
        return PairSource(path, [], ID_COLUMNS, -1)
    columns: tuple[str, str] | None = None
    rows = 0
    for part in parts:
        try:
            meta = pq.ParquetFile(part)
        except Exception as exc:  # pyarrow raises several types for a damaged footer
            first = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
            raise DocketError(f"{part}: not a readable Parquet part ({first}); rewrite or "
                              "remove it") from None
        names = meta.schema_arrow.names
        if columns is None:
            columns = _choose(names, part)
        missing = [c for c in columns if c not in names]
        if missing:
            raise DocketError(f"{part}: no column {missing[0]!r} (other parts have "
                              f"{columns[0]!r} and {columns[1]!r}); every part needs both")
        rows += meta.metadata.num_rows
    assert columns is not None
    return PairSource(path, parts, columns, rows)


def id_batches(source: PairSource, batch: int = BATCH
               ) -> Iterator[tuple[Path, pd.Series, pd.Series]]:
    """(part, left ids, right ids) in batches of at most ``batch`` rows, ids as text."""
    import pyarrow.parquet as pq

    if not source.is_parquet:
        from ..records.sources import read_frame
        frame = read_frame(source.path)
        cols = _choose(list(frame.columns), source.path)
        source.columns = cols
        source.rows = len(frame)
        yield source.path, frame[cols[0]], frame[cols[1]]
        return
    for part in source.parts:
        try:
            reader = pq.ParquetFile(part)
            for rb in reader.iter_batches(batch_size=batch, columns=list(source.columns)):
                a, b = rb.column(0), rb.column(1)
                yield part, _text(a.to_pandas(), a), _text(b.to_pandas(), b)
        except DocketError:
            raise
        except Exception as exc:
            first = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
            raise DocketError(f"{part}: cannot read this Parquet part ({first}); rewrite or "
                              "remove it") from None


def _text(values: pd.Series, arrow: Any = None) -> pd.Series:
    """Ids as text the way record ids are read (1.0 -> '1'), missing as None.

    ``arrow``: the same values as an Arrow array, when the caller has them (saves a copy).
    """
    if values.dtype.kind in "iu":
        return values.astype(str).astype(object)
    if values.dtype.kind == "f":
        out = values.map(lambda v: None if pd.isna(v) else
                         (str(int(v)) if float(v).is_integer() else str(v)))
        return out.astype(object)
    out = values.astype(object).where(values.notna(), None)
    doubt = _not_plain(values if arrow is None else arrow)
    if doubt is None:
        return out.map(_id_text)
    if doubt.any():
        out[doubt] = out[doubt].map(_id_text)
    return out


def _id_text(v: Any) -> str | None:
    return None if v is None or str(v).strip() == "" else str(v)


def _not_plain(values: Any) -> np.ndarray | None:
    """Which ids need ``_id_text`` (None: all of them): text starting with an ASCII letter or
    digit is neither blank nor changed by str(), and Arrow finds those in one pass instead of a
    Python call per id (a tenth of reading ten million pairs)."""
    import pyarrow as pa
    import pyarrow.compute as pc

    try:
        arr = values if isinstance(values, pa.Array | pa.ChunkedArray) else pa.array(
            values, from_pandas=True)
    except (pa.ArrowInvalid, pa.ArrowTypeError):
        return None
    if not (pa.types.is_string(arr.type) or pa.types.is_large_string(arr.type)):
        return None
    plain = pc.fill_null(pc.match_substring_regex(arr, "^[0-9A-Za-z]"), False)
    return ~np.asarray(plain, dtype=bool)


def positions(where: Path | str, a: pd.Series, b: pd.Series, left_index: pd.Index,
              right_index: pd.Index, left_name: str, right_name: str, row0: int = 1
              ) -> tuple[np.ndarray, np.ndarray]:
    """Record positions of each pair's two ids; an unknown or empty id is a user error.

    ``row0`` is the row number of the batch's first pair, for the message.
    """
    na = a.isna().to_numpy() | b.isna().to_numpy()
    if na.any():
        row = row0 + int(np.flatnonzero(na)[0])
        raise DocketError(f"{where}: row {row} has an empty id; every pair needs both ids")
    lpos, rpos = _found(left_index, a), _found(right_index, b)
    for pos, ids, side, name in ((lpos, a, "left", left_name), (rpos, b, "right", right_name)):
        if (pos < 0).any():
            bad = list(dict.fromkeys(ids[pos < 0].tolist()))
            raise DocketError(f"{where}: {many(len(bad), side + ' id')} not in {name}: "
                              f"{quoted(bad)}; give ids exactly as the records have them "
                              "(spaces and case count)")
    return lpos.astype(np.int64), rpos.astype(np.int64)


def _found(index: pd.Index, ids: pd.Series) -> np.ndarray:
    """``_lookup``, with an id a CSV export guarded ("'@anna" for '@anna') taken as the id
    it guards where the id as written names no record: the scores export given to score
    --pairs or new --pairs was refused as naming no record."""
    pos = _lookup(index, ids)
    missed = np.flatnonzero(pos < 0)
    if missed.size:
        values = ids.iloc[missed].astype(str)
        guarded = values.str.startswith(GUARD).to_numpy() & \
            values.str[1:].str.startswith(FORMULA_START).to_numpy()
        if guarded.any():
            at = missed[guarded]
            pos[at] = _lookup(index, values[guarded].str[1:])
    return pos


def _lookup(index: pd.Index, ids: pd.Series) -> np.ndarray:
    """Each id's position in ``index`` (-1: not there). Text ids are looked up in Arrow's hash
    table: a third of the time of pandas' lookup over Python strings, same positions (the ids
    are unique, compared by their characters either way)."""
    import pyarrow as pa
    import pyarrow.compute as pc

    try:
        keys = pa.array(index.to_numpy(), type=pa.string())
        wanted = pa.array(ids.to_numpy(), type=pa.string())
    except (pa.ArrowInvalid, pa.ArrowTypeError, UnicodeError):  # not all (valid) text
        return index.get_indexer(ids.to_numpy())
    found = pc.index_in(wanted, value_set=keys)
    return np.asarray(pc.fill_null(found, -1), dtype=np.int64)


def keys_of(where: Path | str, a: pd.Series, b: pd.Series, left_index: pd.Index,
            right_index: pd.Index, dedupe: bool, left_name: str, right_name: str,
            row0: int = 1) -> np.ndarray:
    """Pair keys (int64) for one batch of ids; an unknown or empty id is a user error.

    One table (``dedupe``): (a, b) and (b, a) are the same pair and a record is not a pair
    with itself, so the key always puts the smaller position first and self pairs are dropped.
    """
    li, ri = positions(where, a, b, left_index, right_index, left_name, right_name, row0)
    if dedupe:
        li, ri = np.minimum(li, ri), np.maximum(li, ri)
        keep = li != ri
        li, ri = li[keep], ri[keep]
    return li * np.int64(len(right_index)) + ri

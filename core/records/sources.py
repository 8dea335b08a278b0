"""Reading record tables: CSV, TSV, Parquet and JSONL, kept as text exactly as read."""

from __future__ import annotations

import warnings
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from ..errors import DocketError

FORMATS = {".csv": "csv", ".tsv": "tsv", ".tab": "tsv", ".parquet": "parquet", ".pq": "parquet",
           ".jsonl": "jsonl", ".ndjson": "jsonl", ".json": "jsonl"}


class EncodingWarning_(UserWarning):
    """A text file was not UTF-8 and was read as cp1252."""


@dataclass
class Table:
    """One source of records: values as strings (None when missing), indexed by the id column."""

    path: Path
    id_column: str
    frame: pd.DataFrame  # columns are the record's fields; index is the id, as text

    @property
    def columns(self) -> list[str]:
        return list(self.frame.columns)

    def __len__(self) -> int:
        return len(self.frame)


def detect_format(path: Path) -> str:
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise DocketError(
            f"{path}: unknown file type '{path.suffix or '(none)'}'; "
            "use .csv, .tsv, .parquet or .jsonl"
        )
    return fmt


def _read_text(path: Path, fmt: str) -> pd.DataFrame:
    sep = "\t" if fmt == "tsv" else ","
    for encoding in ("utf-8-sig", "cp1252"):
        try:
            if fmt == "jsonl":
                return pd.read_json(path, lines=True, dtype=False, encoding=encoding)
            return pd.read_csv(path, sep=sep, dtype=str, keep_default_na=False,
                               encoding=encoding)
        except UnicodeDecodeError:
            warnings.warn(f"{path}: not valid UTF-8; read as cp1252 (Windows Latin-1) instead",
                          EncodingWarning_, stacklevel=3)
            continue
    raise DocketError(f"{path}: cannot decode the text; save it as UTF-8")  # pragma: no cover


def read_frame(path: Path) -> pd.DataFrame:
    """Read any supported file into a frame of strings, with missing values as None."""
    if not path.exists():
        raise DocketError(f"{path}: no such file; check the path")
    if path.is_dir():
        raise DocketError(f"{path}: is a folder, not a file of records")
    fmt = detect_format(path)
    try:
        frame = pd.read_parquet(path) if fmt == "parquet" else _read_text(path, fmt)
    except DocketError:
        raise
    except pd.errors.EmptyDataError:
        raise DocketError(f"{path}: the file is empty; it needs a header row and records") from None
    except (ValueError, OSError, pd.errors.ParserError) as exc:
        first = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        raise DocketError(f"{path}: cannot read it as {fmt} ({first}); "
                          "check the file type and its contents") from None
    frame.columns = [str(c).strip() for c in frame.columns]
    return _as_text(frame)


def _as_text(frame: pd.DataFrame) -> pd.DataFrame:
    out = {}
    for col in frame.columns:
        s = frame[col]
        mask = s.isna()
        text = s.astype(object).where(~mask, None)
        text = text.map(lambda v: None if v is None else _text(v))
        out[col] = text.astype(object)
    return pd.DataFrame(out, index=frame.index)


def _text(v: object) -> str | None:
    if isinstance(v, float) and v.is_integer():
        v = int(v)
    s = str(v)
    return s if s.strip() != "" else None


def load_table(path: str | Path, id_column: str | None) -> Table:
    """Read a file of records and check its id column: present, non-empty, unique."""
    path = Path(path)
    frame = read_frame(path)
    if len(frame) == 0:
        raise DocketError(f"{path}: the table has no records; give a file with at least one row")
    if id_column is None:
        id_column = guess_id_column(frame)
        if id_column is None:
            raise DocketError(f"{path}: no id column given and none found; "
                              f"pass --id COLUMN (columns: {', '.join(frame.columns)})")
    if id_column not in frame.columns:
        raise DocketError(f"{path}: no column '{id_column}'; columns are "
                          f"{', '.join(frame.columns)}; pass the right one with --id")
    ids = frame[id_column]
    empty = ids.isna()
    if empty.any():
        rows = [str(i + 2) for i in list(empty.to_numpy().nonzero()[0][:5])]
        raise DocketError(f"{path}: column '{id_column}' is empty on row(s) {', '.join(rows)} "
                          "(counting the header as row 1); every record needs an id")
    dup = ids[ids.duplicated(keep=False)]
    if len(dup):
        first = list(dict.fromkeys(dup.tolist()))[:5]
        raise DocketError(f"{path}: column '{id_column}' has duplicate ids "
                          f"({', '.join(map(str, first))}{'…' if dup.nunique() > 5 else ''}); "
                          "ids must be unique")
    frame = frame.set_index(id_column, drop=True)
    frame.index = frame.index.astype(str)
    frame.index.name = id_column
    return Table(path=path, id_column=id_column, frame=frame)


def guess_id_column(frame: pd.DataFrame) -> str | None:
    """A column named like an id whose values are all present and unique."""
    names = [c for c in frame.columns
             if c.lower() in ("id", "ref", "key", "record_id", "uid")
             or c.lower().endswith(("_id", "_ref", "_key"))]
    for c in names:
        s = frame[c]
        if s.notna().all() and s.is_unique:
            return c
    return None

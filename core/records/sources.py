"""Reading record tables: CSV, TSV, Parquet and JSONL, kept as text exactly as read."""

from __future__ import annotations

import difflib
import stat
import warnings
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd
import pyarrow as pa

from ..errors import DocketError
from ..wording import noun
from . import cell_text
from .headerless import first_line_a_record
from .id_forms import check_written_alike
from .json_tables import read_json
from .normalise import visible
from .text_tables import EncodingWarning_ as EncodingWarning_
from .text_tables import check_names, is_sqlite, read_delimited
from .totals_row import totals_row

# .txt: what a spreadsheet saves as "Text (Tab delimited)" or "Unicode Text" (UTF-16, tabs);
# its separator is read from its header
FORMATS = {".csv": "csv", ".tsv": "tsv", ".tab": "tsv", ".txt": "text", ".parquet": "parquet",
           ".pq": "parquet", ".jsonl": "jsonl", ".ndjson": "jsonl", ".json": "jsonl"}
MAX_COLUMNS = 999  # sqlite-utils writes a record as one statement of at most 999 values
NULLABLE_INTEGERS = {pa.int8(): pd.Int8Dtype(), pa.int16(): pd.Int16Dtype(),
                     pa.int32(): pd.Int32Dtype(), pa.int64(): pd.Int64Dtype(),
                     pa.uint8(): pd.UInt8Dtype(), pa.uint16(): pd.UInt16Dtype(),
                     pa.uint32(): pd.UInt32Dtype(), pa.uint64(): pd.UInt64Dtype()}


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


# suffixes a table of records is often given in, with what to do ('x.csv.gz' was 'unknown
# file type .gz', leaving the user to guess that docket reads no compressed file)
PACKED_SUFFIXES = {**dict.fromkeys((".gz", ".bz2", ".xz", ".zst", ".zip", ".7z"),
                                   "a compressed file; unpack it first and give the table"),
                   **dict.fromkeys((".xlsx", ".xlsm", ".xls", ".ods"),
                                   "a spreadsheet; save the sheet as CSV and give that")}


def refuse_special(path: Path) -> None:
    """A named pipe (mkfifo, or '<(zcat t.csv.gz)') was read more than once, and the second
    read waited for a writer for ever; /dev/zero was 'UTF-16 without a byte-order mark'."""
    try:
        mode = path.stat().st_mode
    except OSError:
        return  # missing: each reader says so in its own words
    if not (stat.S_ISREG(mode) or stat.S_ISDIR(mode)):
        raise DocketError(f"{path}: a pipe or device, not a file; save what it gives to a "
                          "file and give that")


def detect_format(path: Path) -> str:
    refuse_special(path)
    fmt = FORMATS.get(path.suffix.lower())
    if fmt is None and path.suffix.lower() in PACKED_SUFFIXES:
        raise DocketError(f"{path}: {PACKED_SUFFIXES[path.suffix.lower()]} "
                          "(CSV, TSV, Parquet or JSON lines)")
    if fmt is None and is_sqlite(path):  # 'label P --from colleague.docket', meaning merge
        raise DocketError(f"{path}: an SQLite database (a docket project?), not a table; "
                          "decisions in a copy of this project come in with 'docket merge "
                          "PROJECT COPY'")
    if fmt is None:
        raise DocketError(
            f"{path}: unknown file type '{path.suffix or '(none)'}'; "
            "use .csv, .tsv, .txt, .parquet or .jsonl"
        )
    return fmt



def _read_text(path: Path, fmt: str) -> pd.DataFrame:
    return read_json(path) if fmt == "jsonl" else read_delimited(path, fmt)


def _read_parquet(path: Path) -> pd.DataFrame:
    # names first: two columns of one name are a valid Parquet file, which pandas refused
    # as "Multiple matches for FieldRef.Name(name)", read as a damaged file
    import pyarrow.parquet as pq
    check_names(path, pq.read_schema(path).names)
    # integers stay integers where a value is missing: pandas' default took the column through
    # a float, and 12345678901234567 was read as ...568
    frame = pq.read_table(path).to_pandas(types_mapper=NULLABLE_INTEGERS.get)
    # a table pandas wrote with set_index('id') keeps its id as the frame's index: a column of
    # the file like any other ("no column 'id'; columns are name, town"), unlike an unnamed one
    named = [n for n in frame.index.names if n is not None]
    return frame.reset_index(level=named) if named else frame


def read_frame(path: Path) -> pd.DataFrame:
    """Read any supported file into a frame of strings, with missing values as None."""
    if not path.exists():
        # '-' is standard output to export, and was 'no such file' here
        raise DocketError(f"{path}: no such file; " + (
            "a table is read from a file, not standard input: save it to one and give its "
            "path" if str(path) == "-" else "check the path"))
    if path.is_dir():
        raise DocketError(f"{path}: is a folder, not a file of records; a table is read from "
                          "one file, so join its parts into one (CSV, TSV, Parquet or JSON "
                          "lines)")
    fmt = detect_format(path)
    try:
        frame = _read_parquet(path) if fmt == "parquet" else _read_text(path, fmt)
    except DocketError:
        raise
    except pd.errors.EmptyDataError:
        raise DocketError(f"{path}: the file is empty; it needs a header row and records") from None
    except (ValueError, OSError, pd.errors.ParserError) as exc:
        first = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        raise DocketError(f"{path}: cannot read it as {fmt} ({first}); "
                          "check the file type and its contents") from None
    if frame.shape[1] > MAX_COLUMNS:
        raise DocketError(f"{path}: {frame.shape[1]:,} columns, more than the {MAX_COLUMNS:,} a "
                          "project can hold; keep only the id and the columns worth comparing "
                          "or showing")
    check_names(path, list(frame.columns))
    frame.columns = [str(c).strip() for c in frame.columns]
    return cell_text.as_text(_without_blank_names(path, frame))


def _holds_values(column: pd.Series) -> bool:
    return bool((column.notna() & column.astype(str).str.strip().ne("")).any())


def _without_blank_names(path: Path, frame: pd.DataFrame) -> pd.DataFrame:
    """A column with no name is left out when it holds nothing (a separator at the end of
    every row, as spreadsheets write), and refused when it holds values: what it is, only
    the user can say."""
    keep = []
    for position, name in enumerate(frame.columns, start=1):
        if name:
            keep.append(position - 1)
        elif _holds_values(frame.iloc[:, position - 1]):
            # JSON and Parquet have keys and names, not a header
            named = {"jsonl": f'the key "" (column {position})', "parquet":
                     f"column {position}, named \"\","}.get(detect_format(path))
            raise DocketError(f"{path}: {named} holds values; give it a name, or remove it"
                              if named else f"{path}: column {position} has no name in the "
                              "header but holds values; name it, or remove the column")
    return frame if len(keep) == frame.shape[1] else frame.iloc[:, keep]


def load_table(path: str | Path, id_column: str | None,
               fix: str = "pass the right one with --id") -> Table:
    """Read a file of records and check its id column: present, non-empty, unique. ``fix``
    says what to do when the column is absent."""
    path = Path(path)
    frame = read_frame(path)
    if len(frame) == 0:
        raise DocketError(f"{path}: the table has no records; give a file with at least one row")
    taken = next((c for c in frame.columns if c.casefold() == "rowid"), None)
    if taken is not None:  # a column so named hides SQLite's own row number, which search needs
        raise DocketError(f"{path}: column '{taken}' has the name SQLite keeps for its row "
                          f"numbers; rename it (for example to '{taken}_1')")
    delimited = detect_format(path) in ("csv", "tsv", "text")
    headless = first_line_a_record(path, frame, delimited)
    totals = totals_row(frame, delimited)
    if id_column is None:
        # an id-like column with gaps or repeats is still the id: say what is wrong with it
        id_column = guess_id_column(frame) or next(iter(id_like(frame)), None)
        if id_column is None:
            raise DocketError(headless or f"{path}: no id column given and none found; "
                              f"pass --id COLUMN (columns: {', '.join(frame.columns)})")
    if id_column not in frame.columns:
        near = [c for c in frame.columns if c.casefold() == id_column.casefold()] or \
            difflib.get_close_matches(id_column, list(frame.columns), n=1, cutoff=0.75)
        raise DocketError(f"{path}: no column '{id_column}'; "
                          + (f"did you mean '{near[0]}'? " if near else "")
                          + f"columns are {', '.join(frame.columns)}; {fix}")
    ids = frame[id_column]
    empty = ids.isna().to_numpy()
    if empty.any():
        more = "…" if empty.sum() > 5 else ""
        # rows of separators alone, a spreadsheet's leftovers below the data, hold no record
        blank = bool(frame[empty].isna().to_numpy().all())
        they = ("it is", "it") if empty.sum() == 1 else ("they are", "them")
        last = f"{row_named(path, len(frame) - 1)} holds {totals}: a totals row, not a " \
            "record; delete it" if totals and empty[-1] else ""
        raise DocketError(f"{path}: column '{id_column}' is empty on "
                          f"{rows_named(path, empty.nonzero()[0][:5])}{more}; " + (
                              f"{they[0]} empty in every column: delete {they[1]}" if blank
                              else last or "every record needs an id"))
    dup = ids[ids.duplicated(keep=False)]
    if len(dup):
        first = list(dict.fromkeys(dup.tolist()))[:5]
        rows = rows_named(path, np.flatnonzero((ids == first[0]).to_numpy())[:3])
        raise DocketError(f"{path}: column '{id_column}' has duplicate ids "
                          f"({', '.join(map(str, first))}{'…' if dup.nunique() > 5 else ''}; "
                          f"'{first[0]}' on {rows}); ids must be unique")
    check_written_alike(path, id_column, ids, lambda at: rows_named(path, at))
    frame = frame.set_index(id_column, drop=True)
    frame.index = frame.index.astype(str)
    frame.index.name = id_column
    if headless:
        warnings.warn(headless, stacklevel=2)
    if totals:
        warnings.warn(f"{path}: its last row, {row_named(path, len(frame) - 1)}, holds "
                      f"{totals}: a spreadsheet's totals row? It is read as a record (id "
                      f"'{visible(frame.index[-1])}'); delete it if so", stacklevel=2)
    return Table(path=path, id_column=id_column, frame=frame)


def row_word(path: Path) -> tuple[str, int]:
    """How a file's rows are counted, as a person finds them: a text table's "row" with its
    header as row 1 (the row an editor or spreadsheet shows), a Parquet or JSON file's
    "record" from 1, since it has no header (its second line was named "row 3"). The word and
    what to add to a position from 0."""
    return ("row", 2) if detect_format(path) in ("csv", "tsv", "text") else ("record", 1)


def row_named(path: Path, position: int) -> str:
    word, first = row_word(path)
    return f"{word} {position + first}"


def rows_named(path: Path, positions: Sequence[int] | np.ndarray) -> str:
    """Several rows, counted as :func:`row_word` says."""
    word, first = row_word(path)
    named = f"{noun(len(positions), word)} {', '.join(str(i + first) for i in positions)}"
    return named + (" (counting the header as row 1)" if word == "row" else "")


def id_like(frame: pd.DataFrame) -> list[str]:
    """Columns named like an id, in file order."""
    return [c for c in frame.columns if c.lower() in ("id", "ref", "key", "record_id", "uid")
            or c.lower().endswith(("_id", "_ref", "_key"))]


def guess_id_column(frame: pd.DataFrame) -> str | None:
    """A column named like an id whose values are all present and unique."""
    for c in id_like(frame):
        s = frame[c]
        if s.notna().all() and s.is_unique:
            return c
    return None

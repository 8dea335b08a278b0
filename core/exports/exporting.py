"""Exports: frames of scores (and, later, gold labels) written as CSV, Parquet or JSONL."""

from __future__ import annotations

import io
import json
import os
import shlex
import sys
import tempfile
from collections.abc import Callable, Iterable
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..matching.decision_rule import predicted
from ..records.formula_guard import FORMULA_START, GUARD
from ..storage import store
from ..storage.file_health import holds_database, no_room, output_cut_short, special_file
from ..storage.project_file import ProjectFile

FORMATS = {".csv": "csv", ".parquet": "parquet", ".pq": "parquet", ".jsonl": "jsonl",
           ".ndjson": "jsonl"}


def refuse_folder(target: str, example: str = "export.csv") -> None:
    """An export goes to a file: '-o .' or '-o exports/' was "cannot tell the format from the
    extension", or with --format "cannot write (Device or resource busy)"."""
    if target != "-" and (target.endswith(("/", os.sep)) or Path(target).is_dir()):
        raise DocketError(f"{target}: is a folder; give the export a file name in it, as "
                          f"{shlex.quote(str(Path(target) / example))}")


def output_format(target: str, fmt: str | None) -> str:
    refuse_folder(target, f"export.{fmt or 'csv'}")
    if fmt:
        if fmt not in ("csv", "parquet", "jsonl"):
            raise DocketError(f"--format {fmt}: use csv, parquet or jsonl")
        # CSV in a file named .parquet is unreadable where its name sends it (a .txt or any
        # other name is the user's own choice)
        named = FORMATS.get(Path(target).suffix.lower()) if target != "-" else None
        if named is not None and named != fmt:
            raise DocketError(f"{target}: its name says {named} but --format {fmt} was given; "
                              f"drop --format, or name the file "
                              f"{shlex.quote(str(Path(target).with_suffix('.' + fmt)))}")
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
        f"SELECT p.pair_id, p.left_id, p.right_id, {sims}, t.probability, "
        "t.weight AS log_odds, t.fs_probability AS fellegi_sunter_probability "
        "FROM pairs p JOIN patterns t "
        "ON t.pattern_id = p.pattern_id ORDER BY p.pair_id", project.connection)
    flags = predicted(frame, project.threshold, bool(project.meta.get("one_to_one")))
    frame["predicted"] = np.where(flags, "match", "non-match")
    return frame


def guarded(frame: pd.DataFrame) -> pd.DataFrame:
    """Text cells that a spreadsheet would run as a formula, prefixed with an apostrophe.

    Only text columns: numbers (a negative weight) are not formulas. Common practice for CSV
    injection (OWASP, "CSV Injection"): prefix cells beginning with = + - @ tab or CR. Text
    is pandas' string dtype as well as object: pandas 3 reads SQL text as strings, and the
    scores export's ids went out unguarded ('=SUM(A1)', '@anna').
    """
    out = frame.copy()
    for col in out.columns:
        if out[col].dtype == object or isinstance(out[col].dtype, pd.StringDtype):
            out[col] = out[col].map(lambda v: GUARD + v if isinstance(v, str)
                                    and v.startswith(FORMULA_START) else v)
    return out


def csv_text(frame: pd.DataFrame, guard: bool = True, header: bool = True) -> str:
    """CSV with CRLF line ends (RFC 4180), so a field holding a bare CR or LF is quoted too."""
    return floats_as_text(guarded(frame) if guard else frame).to_csv(
        index=False, lineterminator="\r\n", header=header)


def floats_as_text(frame: pd.DataFrame) -> pd.DataFrame:
    """Each float64 column as the text pandas writes for it in a CSV (numpy's ``str`` of the
    value, '' where missing), each distinct value formatted once. pandas formats every cell:
    4.4 s of the 9.6 s of the scores of 1,000,000 pairs, whose probabilities are one per
    pattern and similarities few. Distinct by their bits, so -0.0 stays '-0.0'. Called after
    the formula guard: a negative number is no formula."""
    out = None
    for i, dtype in enumerate(frame.dtypes):
        if dtype != np.float64:
            continue
        values = frame.iloc[:, i].to_numpy()
        codes, uniques = pd.factorize(values.view(np.int64))
        text = uniques.view(np.float64).astype(str).astype(object)[codes]
        text[np.isnan(values)] = ""
        out = frame.copy(deep=False) if out is None else out
        out.isetitem(i, text)
    return frame if out is None else out


def jsonl_text(frame: pd.DataFrame) -> str:
    """One JSON object per line, each line ended; no rows is no lines (pandas writes one empty
    line for them, which a JSON-lines reader takes for a broken record)."""
    if not len(frame):
        return ""
    text = frame.to_json(orient="records", lines=True, force_ascii=False)
    return text if text.endswith("\n") else text + "\n"


def write_jsonl_parts(parts: Iterable[list[dict[str, Any]]], target: str) -> int:
    """JSON lines, one part of the records after another, to a file (atomically, via a
    temporary beside it) or '-' for stdout; the number of records. A part is written before
    the next is asked for, so only one is held at a time."""
    n = 0

    def lines(part: list[dict[str, Any]]) -> str:
        nonlocal n
        n += len(part)
        return "".join(json.dumps(r, ensure_ascii=False) + "\n" for r in part)

    if target == "-":
        for part in parts:
            to_stdout(lines(part))
        return n

    def write(tmp: Path) -> None:
        with tmp.open("w", encoding="utf-8") as out:
            for part in parts:
                out.write(lines(part))

    atomic_write(Path(target), write)
    return n


def to_stdout(text: str | bytes) -> None:
    """Export data on standard output: exact bytes to a pipe; to a terminal, as printed text."""
    if isinstance(text, str) and sys.stdout.isatty():
        sys.stdout.write(text)  # a terminal gets what every printed line gets: no raw controls
        sys.stdout.flush()
        return
    sys.stdout.flush()
    try:
        write_all(sys.stdout.buffer, text.encode("utf-8") if isinstance(text, str) else text)
    except BrokenPipeError:
        raise  # the reader stopped reading: the front end ends quietly
    except OSError as exc:
        raise DocketError(output_cut_short(exc)) from None


def write_all(out: Any, data: bytes | memoryview) -> None:
    """All of ``data`` to the binary stream ``out``, flushed. A write may take only part (a file
    on a disk that fills): 98 KB of a 3.6 MB export went out, and the command said nothing and
    ended with 0. Writing the rest raises the error instead."""
    view = memoryview(data)
    while view:
        view = view[out.write(view):]
    out.flush()


def write_parquet(frame: pd.DataFrame, target: Any) -> None:
    """Parquet with text as Arrow ``string`` whichever pandas wrote it (pandas 3 would make it
    ``large_string``, pandas 2 ``string``), so a file's schema does not depend on the install.

    A text column that holds no value (no adjudication yet, an export of no rows) would be
    Arrow's ``null`` type: such a file and a later one holding values could not be read as
    one dataset ("Unsupported cast from string to null"), so it is ``string`` too.
    """
    import pyarrow.parquet as pq

    pq.write_table(arrow_table(frame), target)


def arrow_table(frame: pd.DataFrame) -> Any:
    """The frame as an Arrow table, its text columns ``string`` (see ``write_parquet``)."""
    import pyarrow as pa

    table = pa.Table.from_pandas(frame, preserve_index=False)
    schema = pa.schema([pa.field(f.name, pa.string())
                        if pa.types.is_large_string(f.type) or pa.types.is_null(f.type)
                        else f for f in table.schema], metadata=table.schema.metadata)
    return table.cast(schema)


def parquet_to_stdout(fill: Callable[[io.BytesIO], object]) -> None:
    """Parquet made by ``fill`` in memory, then written to stdout; never to a terminal."""
    if sys.stdout.isatty():  # binary, record values in it raw: a terminal would act
        raise DocketError("--format parquet -o -: Parquet is binary, not for a "
                          "terminal; write it to a file (-o FILE.parquet) or pipe it")
    buf = io.BytesIO()
    fill(buf)
    to_stdout(buf.getvalue())


def write_frame(frame: pd.DataFrame, target: str, fmt: str | None = None,
                guard: bool = True) -> None:
    """Write to a file (atomically: a temporary beside it, then renamed) or '-' for stdout.

    ``guard``: CSV cells that a spreadsheet would take for a formula start with an apostrophe.
    """
    kind = output_format(target, fmt)
    if target == "-":
        if kind == "parquet":
            parquet_to_stdout(lambda buf: write_parquet(frame, buf))
        elif kind == "csv":
            to_stdout(csv_text(frame, guard))
        else:
            to_stdout(jsonl_text(frame))
        return

    def write(tmp: Path) -> None:
        if kind == "parquet":
            write_parquet(frame, tmp)
        elif kind == "csv":
            tmp.write_text(csv_text(frame, guard), encoding="utf-8", newline="")
        else:
            tmp.write_text(jsonl_text(frame), encoding="utf-8", newline="")

    atomic_write(Path(target), write)


def atomic_write(path: Path, write: Callable[[Path], object]) -> None:
    """Let ``write`` fill a temporary file beside ``path``, then rename it into place.

    The temporary has a name of its own (two exports to one path at once do not share it)
    and is created readable by the owner alone, like the project file: exports hold records.
    The rename gives the export that mode whatever the file it replaces had. It never replaces
    a database: '-o vets.docket --format csv' wrote the gold labels over the project itself.
    """
    if holds_database(path):
        raise DocketError(f"{path}: is an SQLite database (a docket project?), which an export "
                          "never replaces; write the export to another file")
    if special_file(path):
        _write_through(path, write)
        return
    if path.is_symlink():  # the link stays; the file it names is replaced
        path = Path(os.path.realpath(path))
    try:
        fd, name = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".partial", dir=path.parent)
    except OSError as exc:
        if not path.parent.is_dir():
            raise DocketError(f"{path}: cannot write: the folder {path.parent} does not exist; "
                              "create it or write elsewhere") from None
        raise DocketError(f"{path}: cannot write ({exc.strerror or exc})") from None
    os.close(fd)
    tmp = Path(name)
    try:
        write(tmp)
        os.chmod(tmp, 0o600)  # a writer may have replaced the file rather than filled it
        tmp.replace(path)
    except BaseException as exc:
        tmp.unlink(missing_ok=True)
        if isinstance(exc, OSError):
            raise cannot_write(path, exc) from None
        raise


def cannot_write(path: Path, exc: OSError) -> DocketError:
    """An export that could not be written, in one line; a full disk said as such (pyarrow
    said 'Error writing bytes to file. Detail: [errno 28] No space left on device')."""
    if no_room(exc):
        return DocketError(f"{path}: disk full; nothing was written; free some space, or write "
                           "the export elsewhere")
    return DocketError(f"{path}: cannot write ({exc.strerror or exc})")



def _write_through(path: Path, write: Callable[[Path], object]) -> None:
    """Write into a device, pipe or socket itself ('-o /dev/stdout', a named pipe): renaming a
    temporary over it replaced /dev/null with a file. The export is made in a private
    temporary (a Parquet writer seeks), then copied in through one descriptor; a terminal is
    refused, as '-o -' prints record values inert there."""
    try:
        fd = os.open(path, os.O_WRONLY)
    except OSError as exc:
        raise DocketError(f"{path}: cannot write ({exc.strerror or exc})") from None
    try:
        if os.isatty(fd):
            raise DocketError(f"{path}: is a terminal; show the export there with -o -, which "
                              "prints record values inert")
        with tempfile.TemporaryDirectory(prefix="docket-export-") as folder:
            made = Path(folder) / path.name
            write(made)
            with open(fd, "wb", closefd=False) as out, made.open("rb") as source:
                while chunk := source.read(1 << 20):
                    write_all(out, chunk)
    except OSError as exc:
        raise cannot_write(path, exc) from None
    finally:
        os.close(fd)

"""Text files of records read as their authors meant them, or refused with the row to fix.

The encoding comes from a byte-order mark when there is one (UTF-8, UTF-16 and UTF-32 files
written by spreadsheets carry one), else UTF-8, else cp1252 with a warning. A ``.csv`` whose
header holds no comma but semicolons, tabs or bars is read with that separator, with a
warning naming it. A row with fewer or more fields than the header is an error naming its
line. JSON files are read by :mod:`json_tables`.
"""

from __future__ import annotations

import codecs
import csv
import io
import sys
import warnings
from pathlib import Path
from typing import Any

import pandas as pd

from ..errors import DocketError
from .mixed_text import mixed_line

HEAD_BYTES = 1 << 16
BOMS = ((codecs.BOM_UTF32_LE, "utf-32"), (codecs.BOM_UTF32_BE, "utf-32"),
        (codecs.BOM_UTF8, "utf-8-sig"), (codecs.BOM_UTF16_LE, "utf-16"),
        (codecs.BOM_UTF16_BE, "utf-16"))
SEPARATORS = {",": "commas", ";": "semicolons", "\t": "tabs", "|": "bars"}


class EncodingWarning_(UserWarning):
    """A text file was not UTF-8 and was read as cp1252."""


def bom_encoding(head: bytes) -> str | None:
    """The encoding a byte-order mark at the start of ``head`` names, if any."""
    for bom, name in BOMS:  # UTF-32 LE first: its mark begins with UTF-16 LE's
        if head.startswith(bom):
            return name
    return None


# The first bytes of files that are often given a .csv or .jsonl name by mistake (common
# practice: each format's magic number, from its specification)
PACKED = ((b"\x1f\x8b", "a gzip-compressed file; unpack it first"),
          (b"PK\x03\x04", "a zip archive (or a spreadsheet, which is one); unpack it, or "
                          "save the sheet as CSV"),
          (b"\xfd7zXZ\x00", "an xz-compressed file; unpack it first"),
          (b"SQLite format 3\x00", "an SQLite database, not a table of records"))


def is_sqlite(path: Path) -> bool:
    """Whether ``path`` begins as an SQLite database does (a docket project is one)."""
    try:
        with path.open("rb") as f:
            return f.read(16) == PACKED[-1][0]
    except OSError:
        return False


def _packed(path: Path, head: bytes) -> str | None:
    found = next((what for magic, what in PACKED if head.startswith(magic)), None)
    if found is None and head[:3] == b"BZh" and head[4:10] == b"1AY&SY":  # "BZh9" + block mark
        found = "a bzip2-compressed file; unpack it first"
    if found is None and head.startswith(b"PAR1"):  # a header "PAR1,..." is text: check the end
        with path.open("rb") as f:
            f.seek(max(0, path.stat().st_size - 4))
            if f.read(4) == b"PAR1":
                found = "a Parquet file; name it .parquet"
    return found


def refuse_packed(path: Path, head: bytes) -> None:
    packed = _packed(path, head)
    if packed:
        raise DocketError(f"{path}: {packed}")


def _encodings(path: Path, head: bytes) -> list[str]:
    refuse_packed(path, head)
    named = bom_encoding(head)
    if named:
        return [named]
    if head.count(b"\x00") > len(head) // 4:
        raise DocketError(f"{path}: looks like UTF-16 or UTF-32 without a byte-order mark; "
                          "save it as UTF-8")
    return ["utf-8", "cp1252"]


def _header(text: str, sep: str) -> list[str]:
    # newline="": rows end at CR, LF or CRLF as in the file (a file of CR-only line ends, as
    # old spreadsheets on a Mac write, stopped the reader with an error)
    return next(csv.reader(io.StringIO(text, newline=""), delimiter=sep), [])


def choose_separator(path: Path, head_text: str, expected: str) -> str:
    """``expected``, unless the header holds none of it and another separator splits it."""
    if len(_header(head_text, expected)) > 1:
        return expected
    counts = {sep: len(_header(head_text, sep)) for sep in SEPARATORS if sep != expected}
    best = max(counts, key=lambda s: counts[s])
    if counts[best] <= 1:
        return expected  # one column: nothing better to offer
    warnings.warn(f"{path}: the header is separated by {SEPARATORS[best]}, not "
                  f"{SEPARATORS[expected]}; read with {best!r} as the separator",
                  UserWarning, stacklevel=4)
    return best


def separator_hint(head_text: str) -> str | None:
    """The separator a first line 'sep=;' names: a spreadsheet's hint, written by programs
    that export for it and honoured when it opens the file. It was read as the header, and
    the file refused as "line 2 has 3 of the header's 2 fields"."""
    first = head_text.lstrip("\ufeff").split("\n", 1)[0].rstrip("\r")
    if len(first) == 5 and first[:4].lower() == "sep=" and first[4] not in "\"'\r":
        return first[4]
    return None


def header_separator(head_text: str) -> str:
    """The separator that splits the header most (tab first on a tie): a .txt file says
    nothing of its separator, so none is expected and none is warned of."""
    return max(("\t", ",", ";", "|"), key=lambda sep: len(_header(head_text, sep)))


def _ascii_lower(name: str) -> str:
    # SQLite, which keeps the records, tells column names apart ignoring ASCII letter case only
    return "".join(ch.lower() if ch.isascii() else ch for ch in name)


def check_names(path: Path, names: list[str]) -> None:
    """Column names must stay distinct once spaces at their ends are trimmed, and in the
    project file, where 'Name' and 'name' are one column; none may hold a NUL."""
    seen: dict[str, tuple[int, str]] = {}
    for position, raw in enumerate(names, start=1):
        name = str(raw).strip()
        if not name:
            continue  # a blank header cell: see sources.read_frame
        if "\x00" in name:  # SQLite's statements end at a NUL: the build ended in a traceback
            raise DocketError(f"{path}: column {position}'s name '{name}' holds a NUL character "
                              "(\\x00), which the project file cannot keep; rename the column")
        key = _ascii_lower(name)
        if key in seen:
            first, other = seen[key]
            if other == name:
                raise DocketError(f"{path}: columns {first} and {position} are both named "
                                  f"'{name}' (spaces at the ends do not count); rename one")
            raise DocketError(f"{path}: columns {first} and {position} are named '{other}' and "
                              f"'{name}', which differ only in letter case, and the project "
                              "file cannot keep them apart; rename one")
        seen[key] = (position, name)


def plain_names(names: list[str], wanted: tuple[str, ...]) -> list[str]:
    """``names`` with each that is one of ``wanted`` but for letter case or end spaces written
    as wanted: a file of decisions or scores headed 'Pair_ID,Label' means pair_id and label.
    Left as they are where that would make two columns one."""
    by = {w.lower(): w for w in wanted}
    renamed = [by.get(str(n).strip().lower(), n) for n in names]
    return renamed if len(set(renamed)) == len(renamed) else names


def check_widths(path: Path, encoding: str, sep: str, skip: bool = False) -> None:
    """Every row has as many fields as the header (a short row would pass silently), and none
    is the header again (it would be read as a record whose id is the id column's name).
    ``skip``: the first line is a separator hint, before the header."""
    # the csv module refuses a value over 131,072 characters, which pandas reads: a long
    # text (an abstract, a note) is a record's value like any other
    limit = csv.field_size_limit(sys.maxsize)
    with path.open(encoding=encoding, newline="") as f:
        # strict: a value with text after its closing quote ('"Bob" Smith') was read as
        # 'Bob Smith', and a quote never closed made the rest of the file one value
        rows = csv.reader(f, delimiter=sep, strict=True)
        try:
            if skip:
                next(rows, None)
            header = _header_key(next(rows, []))
            if rows.line_num and len(header) <= 1 and not any(header):  # a blank first line
                _blank_header(path, rows)
            width = len(header)
            # a row is the header again only if its first cell is, in any case: one cheap test
            # per row first (keying every cell of every row took 18 s of 20 on 1,000,000 rows)
            first = header[0].lower() if header else None
            start = rows.line_num + 1  # the line the next row begins on
            for row in rows:
                if row and row[0].strip().lstrip("\ufeff").strip().lower() == first \
                        and _header_key(row) == header:  # files joined end to end
                    raise DocketError(
                        f"{path}: line {rows.line_num} repeats the header (were two files "
                        "joined?); remove that line, or read the files one at a time")
                if row and len(row) != width:
                    raise DocketError(
                        f"{path}: line {start} has {len(row)} of the header's {width} fields"
                        f"{_quote_runs_on(start, rows.line_num)}; give every row one value per "
                        f"column (empty ones too), and quote values that hold {sep!r}")
                start = rows.line_num + 1
        except csv.Error as exc:
            raise DocketError(_quoting(path, exc, start, rows.line_num)) from None
        finally:
            csv.field_size_limit(limit)


def _quote_runs_on(start: int, end: int) -> str:
    """Why a row read as one runs over several lines: a quote opened and closed lines later.
    The refusal named the last line it swallowed, not the one holding the quote."""
    if end == start:
        return ""
    return (f" (a value there opens a quote that closes only on line {end}: close it on its "
            "line, or double a quote meant as a character)")


def _quoting(path: Path, exc: csv.Error, start: int, line: int) -> str:
    """What a strict reading of the rows met, named by its line."""
    if "unexpected end of data" in str(exc):
        return (f"{path}: line {start}: a value opens a quote that never closes; close it, or "
                "double a quote meant as a character")
    if "expected after" in str(exc):
        return (f"{path}: line {line}: a value goes on after its closing quote (as in "
                '"Bob" Smith); quote the whole value and double the quotes inside it '
                '("""Bob"" Smith"), or leave its quotes out')
    return f"{path}: line {line}: {exc}; check the file's contents"


def _blank_header(path: Path, rows: Any) -> None:
    """A blank first line above the header was 'line 2 has 2 of the header's 0 fields', and a
    file of blank lines 'line 3 repeats the header'."""
    for row in rows:
        if any(cell.strip() for cell in row):
            raise DocketError(f"{path}: line 1, where the header belongs, is blank; delete the "
                              f"blank lines above the header (the column names, on line "
                              f"{rows.line_num})")
    raise DocketError(f"{path}: the file holds only blank lines; it needs a header row and "
                      "records")


def _header_key(row: list[str]) -> list[str]:
    """A row as a header is recognised again: each name trimmed, in ASCII lower case (one column
    to the project file), without a byte-order mark. Files joined end to end whose second kept
    its mark, or wrote 'ID,Name', were read with a record whose id was '\ufeffid' or 'ID'."""
    return [_ascii_lower(c.strip().lstrip("\ufeff").strip()) for c in row]


def _undecodable(path: Path, encoding: str, marked: str | None) -> str:
    """Why the text cannot be read, with the first line that fails when lines can be told
    apart in the bytes (UTF-8 and cp1252; not UTF-16 or UTF-32)."""
    where = ""
    if encoding in ("utf-8-sig", "cp1252"):
        with path.open("rb") as f:
            for n, line in enumerate(f, start=1):
                try:
                    line.decode(encoding)
                except UnicodeDecodeError:
                    where = f" (line {n})"
                    break
    if marked:  # the mark said one encoding and the bytes are another
        name = "UTF-8" if marked == "utf-8-sig" else marked.upper()
        return (f"{path}: begins with a {name} byte-order mark but is not {name} text{where}; "
                "save it as UTF-8")
    return f"{path}: neither UTF-8 nor {encoding} text{where}; save it as UTF-8"


def holds_nul(path: Path, encoding: str) -> bool:
    """Whether the text holds a NUL character anywhere (read a block at a time)."""
    if encoding.startswith(("utf-16", "utf-32")):  # their NUL bytes are parts of characters
        with path.open(encoding=encoding, newline="") as text:
            while chars := text.read(1 << 20):
                if "\x00" in chars:
                    return True
        return False
    with path.open("rb") as raw:
        while block := raw.read(1 << 20):
            if b"\x00" in block:
                return True
    return False


def read_delimited(path: Path, fmt: str) -> pd.DataFrame:
    """A CSV, TSV or .txt file as a frame of strings ("" where a field is empty)."""
    with path.open("rb") as f:
        head = f.read(HEAD_BYTES)
    for encoding in _encodings(path, head):
        try:
            head_text = head.decode(encoding, errors="ignore" if len(head) == HEAD_BYTES
                                    else "strict")
            hint = separator_hint(head_text)
            if hint is not None:  # the header is the line after it
                head_text = head_text.split("\n", 1)[1] if "\n" in head_text else ""
            sep = hint or (header_separator(head_text) if fmt == "text" else
                           choose_separator(path, head_text, "\t" if fmt == "tsv" else ","))
            header = _header(head_text, sep)
            check_names(path, header)
            if encoding == "cp1252" and (mixed := mixed_line(path, sep, header)):
                raise DocketError(mixed)
            check_widths(path, encoding, sep, skip=hint is not None)
            # pandas' C reader before 3.0 ends a value at a NUL ('n\x00q' became 'n'): a file
            # holding one is read by its Python reader, slower and exact
            engine = "python" if holds_nul(path, encoding) else "c"
            frame = pd.read_csv(path, sep=sep, dtype=str, keep_default_na=False,
                                encoding=encoding, engine=engine,
                                skiprows=1 if hint is not None else None)
            if len(header) == frame.shape[1]:  # the names as written, not pandas' "Unnamed: 2"
                frame.columns = header
        except UnicodeDecodeError:
            if encoding != "utf-8":
                raise DocketError(_undecodable(path, encoding, bom_encoding(head))) from None
            continue
        if encoding == "cp1252":  # said once it is read, so a refusal stays one line
            warnings.warn(f"{path}: not valid UTF-8; read as cp1252 (Windows Latin-1) instead",
                          EncodingWarning_, stacklevel=3)
        return frame
    raise DocketError(f"{path}: cannot decode the text; save it as UTF-8")  # pragma: no cover

"""A text file of two encodings: UTF-8 throughout but for a line pasted in from elsewhere.

Read whole as cp1252, as a file that is not UTF-8 is, every UTF-8 name in the other lines
turns to mojibake ('José' to 'JosÃ©'), with only a warning that the file is not UTF-8. No one
decoding reads such a file right, so the line that differs is named instead.
"""

from __future__ import annotations

import csv
from pathlib import Path


def mixed_line(path: Path, sep: str, header: list[str]) -> str | None:
    """Why ``path`` cannot be read as one encoding, naming the first line (and column) that is
    not UTF-8, when other lines hold UTF-8 text beyond ASCII; None when no line does (a file
    written wholly in cp1252, which is then read as such)."""
    first: tuple[int, bytes] | None = None
    utf8_beyond_ascii = False
    with path.open("rb") as f:
        for n, line in enumerate(f, start=1):
            if line.isascii():
                continue
            try:
                line.decode("utf-8")
                utf8_beyond_ascii = True
            except UnicodeDecodeError:
                first = first or (n, line)
            if first and utf8_beyond_ascii:
                break
    if first is None or not utf8_beyond_ascii:
        return None
    n, line = first
    column = _column(line, sep, header)
    return (f"{path}: line {n:,}{column} is not UTF-8, though the file's other lines are: it "
            "mixes two encodings (that line perhaps Latin-1), which no one reading gets right; "
            "fix that line's letters, or save the file as UTF-8 from where it came")


def _column(line: bytes, sep: str, header: list[str]) -> str:
    # the line's fields as cp1252 text (any byte reads), each tried back as UTF-8
    fields = next(csv.reader([line.decode("cp1252").rstrip("\r\n")], delimiter=sep), [])
    for i, field in enumerate(fields):
        try:
            field.encode("cp1252").decode("utf-8")
        except (UnicodeDecodeError, UnicodeEncodeError):
            return f", column '{header[i]}'," if i < len(header) else f", field {i + 1},"
    return ""

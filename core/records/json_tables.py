"""JSON files of records: JSON lines or one array of objects, each record one flat object."""

from __future__ import annotations

import json
import re
import warnings
from pathlib import Path

import pandas as pd

from ..errors import DocketError
from .text_tables import HEAD_BYTES, bom_encoding, refuse_packed

JSON_KINDS = {int: "a number", float: "a number", str: "a string", bool: "true or false",
              list: "an array", type(None): "null"}


# a \uD800 .. \uDFFF escape: half of a UTF-16 pair, which json.loads keeps as a lone surrogate
# where its other half is missing (an emoji cut in two); UTF-8 cannot hold one, so it stopped
# the build in a traceback (UnicodeEncodeError) the first time pandas or SQLite met it
HALF_PAIR = re.compile(r"\\u[dD][89a-fA-F][0-9a-fA-F]{2}")
LONE = re.compile("[\ud800-\udfff]")


class _Twice(Exception):
    pass


def _no_key_twice(pairs: list[tuple[str, object]]) -> dict[str, object]:
    """An object as a dict, refused when it gives a key twice ({"name": "Anna", "name": "Bo"}):
    the reader kept the last silently, where a CSV header with a column twice is refused."""
    seen: dict[str, object] = {}
    for key, value in pairs:
        if key in seen:
            raise _Twice(key)
        seen[key] = value
    return seen


def _twice(path: Path, where: str, key: _Twice) -> DocketError:
    return DocketError(f"{path}: {where} gives the key '{key}' twice, and which one is meant "
                       "cannot be told; give each key once")


def read_json(path: Path) -> pd.DataFrame:
    """JSON lines, or one JSON array of objects (one object per record).

    Parsed by Python's json, values kept as parsed: pandas' reader took every number of a
    column with a gap through a float, so 12345678901234567 was read as ...568 (two records
    then agreed on a number neither holds), and refused an integer past 64 bits as no JSON.
    """
    with path.open("rb") as f:
        head = f.read(HEAD_BYTES)
    refuse_packed(path, head)  # a Parquet or gzip file named .jsonl was "not utf-8 text"
    encoding = bom_encoding(head) or "utf-8"
    first = head.decode(encoding, errors="ignore").lstrip("\ufeff \t\r\n")[:1]
    try:
        if first != "[":
            lines, halves = _json_lines(path, encoding)
            return _flat(path, pd.DataFrame(_whole(path, lines, halves), dtype=object))
        text = path.read_text(encoding=encoding)
        data = json.loads(text, object_pairs_hook=_no_key_twice)
    except _Twice as key:
        raise _twice(path, "an object", key) from None
    except UnicodeDecodeError:
        raise DocketError(f"{path}: not {encoding} text; save it as UTF-8") from None
    except json.JSONDecodeError as exc:
        raise DocketError(f"{path}: not valid JSON ({exc}); give one array of objects or "
                          "JSON lines") from None
    odd = next((i for i, v in enumerate(data) if not isinstance(v, dict)), None)
    if odd is not None:
        kind = JSON_KINDS.get(type(data[odd]), type(data[odd]).__name__)
        raise DocketError(f"{path}: item {odd + 1} of the JSON array is {kind}, not an "
                          "object; give one object per "
                          'record, e.g. [{"id": 1, "name": "..."}]')
    return _flat(path, pd.DataFrame(_whole(path, data, HALF_PAIR.search(text) is not None),
                                    dtype=object))


def _whole(path: Path, records: list[dict[str, object]], halves: bool) -> list[dict[str, object]]:
    """Lone surrogates (``HALF_PAIR``) in keys and values as U+FFFD, the character that stands
    for one that cannot be read, with a warning naming the first; before pandas sees them."""
    if not halves:
        return records
    first, n = "", 0

    def fixed(text: str, where: str) -> str:
        nonlocal first, n
        if not LONE.search(text):
            return text
        n += 1
        first = first or where
        return LONE.sub("\ufffd", text)

    out = []
    for k, record in enumerate(records, start=1):
        if not isinstance(record, dict):
            out.append(record)  # refused as no object, by its number, further on
            continue
        out.append({fixed(key, f"record {k}, the key '{LONE.sub('?', key)}'"):
                    fixed(v, f"record {k}, '{LONE.sub('?', key)}'") if isinstance(v, str) else v
                    for key, v in record.items()})
    if n:
        more = f" ({n:,} such values in all)" if n > 1 else ""
        warnings.warn(f"{path}: {first} holds half of a UTF-16 pair (an escape \\uD800 to "
                      f"\\uDFFF without its other half), which is no character; read as "
                      f"U+FFFD{more}", stacklevel=2)
    return out


def _json_lines(path: Path, encoding: str) -> tuple[list[dict[str, object]], bool]:
    """Each line that is not blank, as one JSON object; the first that is none is named. And
    whether any line holds an escape of half a UTF-16 pair (``HALF_PAIR``)."""
    rows = []
    halves = False
    with path.open(encoding=encoding) as f:  # lines end at LF, CRLF or CR alike
        for n, line in enumerate(f, start=1):
            if not line.strip():
                continue
            halves = halves or HALF_PAIR.search(line) is not None
            try:
                value = json.loads(line, object_pairs_hook=_no_key_twice)
            except _Twice as key:
                raise _twice(path, f"line {n}", key) from None
            except json.JSONDecodeError as exc:
                raise DocketError(f"{path}: line {n} is not valid JSON ({exc.msg}); give one "
                                  "JSON object per line") from None
            if not isinstance(value, dict):
                kind = JSON_KINDS.get(type(value), type(value).__name__)
                raise DocketError(f"{path}: line {n} is {kind}, not an object; give one JSON "
                                  "object per line")
            rows.append(value)
    return rows, halves


def _flat(path: Path, frame: pd.DataFrame) -> pd.DataFrame:
    """Refuse nested values: a record is one flat object (``{"records": [...]}`` is not)."""
    for col in frame.columns:
        if frame[col].dtype == object:
            nested = frame[col].map(lambda v: isinstance(v, (list, dict))).to_numpy()
            if nested.any():
                i = int(nested.nonzero()[0][0])
                kind = "a list" if isinstance(frame[col].iloc[i], list) else "an object"
                raise DocketError(f"{path}: record {i + 1}, '{col}' holds {kind}; give one "
                                  "flat object per record (values text, numbers or null)")
    return frame

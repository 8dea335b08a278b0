"""The records fingerprint: what makes two files copies of one project.

It is a hash over every stored record value (column names included) and every candidate pair
(pair id, left id, right id), as the file holds them. Two projects built from different
records that share ids and a pairs file therefore differ, and a copy cannot pass as the
project by carrying the project's fingerprint in its ``meta``: merge recomputes the copy's
from the file. A build works out the same digest from the rows it has just written.
"""

from __future__ import annotations

import hashlib
import json
import sqlite3
from collections.abc import Iterable, Iterator
from typing import Any

_BATCH = 20_000
KIND = "sha256 over record values and candidate pairs"


Rows = list  # one batch: a list of tuples, as fetchmany gives it


def _digest(tables: Iterable[tuple[str, list[str], Iterable[Rows]]],
            pairs: Iterable[Rows]) -> str:
    h = hashlib.sha256()
    for table, names, batches in tables:
        h.update(json.dumps([table, names]).encode())
        for rows in batches:
            h.update(repr(rows).encode("utf-8", "surrogatepass"))
    h.update(b"pairs")
    for rows in pairs:
        h.update(repr(rows).encode("utf-8", "surrogatepass"))
    return h.hexdigest()[:32]


def _fetched(cur: sqlite3.Cursor) -> Iterator[Rows]:
    while rows := cur.fetchmany(_BATCH):
        yield rows


def _sliced(columns: list[list]) -> Iterator[Rows]:
    for start in range(0, len(columns[0]), _BATCH):
        yield list(zip(*(c[start:start + _BATCH] for c in columns), strict=True))


def _quote(name: str) -> str:
    return '"' + name.replace('"', '""') + '"'


def records_fingerprint(conn: sqlite3.Connection) -> str:
    """Hex digest over the records tables (by id) and the pairs (by pair id).

    Reads ``meta`` itself, so that the store's migrations can call it (no import of the store).
    """
    meta = {k: json.loads(v) for k, v in conn.execute(
        "SELECT key, value FROM meta WHERE key IN ('mode', 'left_id_column', 'right_id_column')")}
    tables = [("left_records", meta["left_id_column"])]
    if meta.get("mode") == "link":
        tables.append(("right_records", meta["right_id_column"]))
    read = []
    for table, key in tables:
        cur = conn.execute(f"SELECT * FROM {table} ORDER BY {_quote(key)}")
        read.append((table, [d[0] for d in cur.description], _fetched(cur)))
    return _digest(read, _fetched(conn.execute(
        "SELECT pair_id, left_id, right_id FROM pairs ORDER BY pair_id")))


def fingerprint_of_written(tables: list[tuple[str, str, Any]], pair_ids: list[int],
                           left_ids: list[str], right_ids: list[str]) -> str:
    """:func:`records_fingerprint` of what a build has just written, from the frames it wrote
    (name, id column, frame of str or missing) and the pairs in pair id order, without reading
    the file back (that read was a tenth of a million-pair build).

    The rows are the file's: missing values are NULL there, and ORDER BY on text compares UTF-8
    bytes, which is Arrow's order for strings.
    """
    import pyarrow as pa
    import pyarrow.compute as pc

    given = []
    for table, key, frame in tables:
        order = pc.sort_indices(pa.array(frame.index.tolist(), pa.large_string())).to_numpy()
        sub = frame.iloc[order]
        columns = [sub.index.tolist(),
                   *(sub[c].to_numpy(dtype=object, na_value=None).tolist() for c in sub.columns)]
        given.append((table, [key, *map(str, frame.columns)], _sliced(columns)))
    return _digest(given, _sliced([pair_ids, left_ids, right_ids]))

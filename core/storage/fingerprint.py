"""The records fingerprint: what makes two files copies of one project.

It is a hash over every stored record value (column names included) and every candidate pair
(pair id, left id, right id), read from the file itself. Two projects built from different
records that share ids and a pairs file therefore differ, and a copy cannot pass as the
project by carrying the project's fingerprint in its ``meta``: merge recomputes the copy's.
"""

from __future__ import annotations

import hashlib
import json
import sqlite3

_BATCH = 20_000
KIND = "sha256 over record values and candidate pairs"


def _feed(h: hashlib._Hash, cur: sqlite3.Cursor) -> None:
    while rows := cur.fetchmany(_BATCH):
        h.update(repr(rows).encode("utf-8", "surrogatepass"))


def _quote(name: str) -> str:
    return '"' + name.replace('"', '""') + '"'


def records_fingerprint(conn: sqlite3.Connection) -> str:
    """Hex digest over the records tables (by id) and the pairs (by pair id).

    Reads ``meta`` itself, so that the store's migrations can call it (no import of the store).
    """
    meta = {k: json.loads(v) for k, v in conn.execute(
        "SELECT key, value FROM meta WHERE key IN ('mode', 'left_id_column', 'right_id_column')")}
    h = hashlib.sha256()
    tables = [("left_records", meta["left_id_column"])]
    if meta.get("mode") == "link":
        tables.append(("right_records", meta["right_id_column"]))
    for table, key in tables:
        cur = conn.execute(f"SELECT * FROM {table} ORDER BY {_quote(key)}")
        h.update(json.dumps([table, [d[0] for d in cur.description]]).encode())
        _feed(h, cur)
    h.update(b"pairs")
    _feed(h, conn.execute("SELECT pair_id, left_id, right_id FROM pairs ORDER BY pair_id"))
    return h.hexdigest()[:32]

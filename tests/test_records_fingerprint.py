"""The records fingerprint a build works out from memory is the one read back from the file."""

from __future__ import annotations

import json
import sqlite3

import pandas as pd
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.storage import fingerprint
from docket.core.storage.writer import write_records

TEXT = st.characters(exclude_categories=["Cs"])  # lone surrogates cannot be stored at all
VALUES = st.one_of(st.none(), st.text(TEXT, max_size=5),
                   st.sampled_from(["it's", 'say "hi"', "Zoë", "\x00a", "ß", "\U0001f600"]))
IDS = st.text(TEXT, min_size=1, max_size=4)


@settings(max_examples=25, deadline=None)
@given(st.lists(IDS, min_size=1, max_size=30, unique=True), st.data())
def test_written_fingerprint_is_the_files(ids: list[str], data: st.DataObject) -> None:
    values = data.draw(st.lists(VALUES, min_size=len(ids), max_size=len(ids)))
    frame = pd.DataFrame({"name": pd.Series(values, dtype=object),
                          "note": pd.Series([float("nan")] * len(ids), dtype=object)},
                         index=pd.Index(ids, name="ref"))
    conn = sqlite3.connect(":memory:", isolation_level=None)
    conn.execute("CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT)")
    conn.executemany("INSERT INTO meta VALUES (?, ?)",
                     [("mode", json.dumps("dedupe")), ("left_id_column", json.dumps("ref"))])
    conn.execute("CREATE TABLE pairs (pair_id INTEGER PRIMARY KEY, left_id TEXT, right_id TEXT)")
    pairs = [(i + 1, ids[i], ids[-1 - i]) for i in range(len(ids))]
    conn.executemany("INSERT INTO pairs VALUES (?, ?, ?)", pairs[::-1])
    conn.execute("BEGIN")
    write_records(conn, "left_records", frame, "ref")
    want = fingerprint.records_fingerprint(conn)
    got = fingerprint.fingerprint_of_written([("left_records", "ref", frame)],
                                             *map(list, zip(*pairs, strict=True)))
    assert got == want

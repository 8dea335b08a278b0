"""The records side of ``docket new``: each per-record step beside the one-value-at-a-time way.

    nice python bench/records_side.py [--records 250000] [--work /tmp/docket_records]

Synthetic person records (bench/keys.py's generator: names, streets, towns, postcodes, emails,
birth dates, with typos) are read from Parquet and taken through the steps a build runs once per
record. Each step is timed in CPU seconds both ways in the same run, alternating, best of
``--repeat``, and the ratio printed (new / one at a time; below 1 is faster):

1. record values into text: one Python call per cell vs a column at a time (Arrow);
2. normalising each field's distinct values: the per-value function vs
   distinct.per_distinct (Arrow for ASCII words, names, codes and yyyy-m-d dates);
3. the records fingerprint: read back from the file vs worked out from the rows just written.

Both ways give the same values (checked here as well as in the tests).
"""

from __future__ import annotations

import argparse
import sqlite3
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
from keys import write_records  # the bench folder's own generator

from docket.core.matching import scoring
from docket.core.records import fields as fieldmod
from docket.core.records import normalise, sources
from docket.core.storage import fingerprint, writer


def per_cell(frame: pd.DataFrame) -> pd.DataFrame:
    """Values as text one cell at a time: a Python call per cell."""
    out = {}
    for col in frame.columns:
        s = frame[col].astype(object)
        out[col] = pd.Series([None if pd.isna(v) else sources._text(v) for v in s],
                             index=frame.index, dtype=object)
    return pd.DataFrame(out, index=frame.index)


def per_value(frame: pd.DataFrame, specs: list) -> dict[str, np.ndarray]:
    """Each distinct value through its normaliser, one Python call per value."""
    out = {}
    for f in specs:
        codes, uniques = pd.factorize(pd.Series(frame[f.left_column], dtype=object))
        func = normalise.NORMALISERS[f.kind]
        out[f.name] = np.array([*map(func, uniques), None], dtype=object)[codes]
    return out


def cpu(func: Callable[[], object], repeat: int) -> tuple[float, object]:
    best, result = float("inf"), None
    for _ in range(repeat):
        t = time.process_time()
        result = func()
        best = min(best, time.process_time() - t)
    return best, result


def written(frame: pd.DataFrame) -> tuple[sqlite3.Connection, list[list]]:
    conn = sqlite3.connect(":memory:", isolation_level=None)
    conn.execute("CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT)")
    conn.executemany("INSERT INTO meta VALUES (?, ?)",
                     [("mode", '"dedupe"'), ("left_id_column", '"id"')])
    conn.execute("CREATE TABLE pairs (pair_id INTEGER PRIMARY KEY, left_id TEXT, right_id TEXT)")
    ids = frame.index.tolist()
    pairs = [list(range(1, len(ids) + 1)), ids, ids[::-1]]
    conn.executemany("INSERT INTO pairs VALUES (?, ?, ?)", zip(*pairs, strict=True))
    conn.execute("BEGIN")
    writer.write_records(conn, "left_records", frame, "id")
    return conn, pairs


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--records", type=int, default=250_000)
    parser.add_argument("--repeat", type=int, default=2)
    parser.add_argument("--work", type=Path, default=Path(tempfile.gettempdir()) /
                        "docket_records")
    args = parser.parse_args()
    n = args.records
    left, _, _ = write_records(args.work / "csv", n, n, n, 7)
    parquet = args.work / f"left_{n}.parquet"
    if not parquet.exists():
        pd.read_csv(left, dtype=str).to_parquet(parquet, index=False)
    raw = pd.read_parquet(parquet)
    print(f"{n:,} records, {raw.shape[1] - 1} fields besides the id, from Parquet")
    rows = []

    old_t, old = cpu(lambda: per_cell(raw), args.repeat)
    new_t, new = cpu(lambda: sources._as_text(raw), args.repeat)
    assert all(old[c].tolist() == new[c].tolist() for c in raw.columns)
    rows.append(("values into text", old_t, new_t))

    table = new.set_index("id")
    table.index = table.index.astype(str)
    specs = fieldmod.resolve_fields(table, None, "left", None, {}, {})
    old_t, old = cpu(lambda: per_value(table, specs), args.repeat)
    new_t, new = cpu(lambda: scoring.normalised(specs, table, "left"), args.repeat)
    assert all(old[f.name].tolist() == new[f.name].tolist() for f in specs)
    rows.append((f"normalising ({', '.join(f.kind for f in specs)})", old_t, new_t))

    conn, pairs = written(table)
    old_t, old = cpu(lambda: fingerprint.records_fingerprint(conn), args.repeat)
    new_t, new = cpu(lambda: fingerprint.fingerprint_of_written(
        [("left_records", "id", table)], *pairs), args.repeat)
    assert old == new
    rows.append(("records fingerprint", old_t, new_t))

    print(f"{'step':58s} {'one at a time':>14s} {'now':>8s} {'ratio':>7s}")
    for name, a, b in rows:
        print(f"{name:58s} {a:12.2f} s {b:6.2f} s {b / a:7.2f}")
    a, b = sum(r[1] for r in rows), sum(r[2] for r in rows)
    print(f"{'together':58s} {a:12.2f} s {b:6.2f} s {b / a:7.2f}")


if __name__ == "__main__":
    main()

"""Finding shuffled matcher files' rows among 1,000,000 candidate pairs: one lookup per file
against one lookup for all of them, side by side in one run.

The candidate pairs (200,000 left records, five candidates each) sit in an SQLite table as in
a project file. Each of five files lists every pair in its own shuffled order. pyarrow builds
the hash of the million candidate keys anew for every lookup call, and once for all the chunks
of one call: "per file" is the import as it was (one call per file), "batched" is
``pair_keys.lookup_many`` as the import now calls it. CPU seconds beside the wall clock (the
machine may be shared).

Run: ``nice python bench/matchers_lookup.py`` (about a minute).
"""

from __future__ import annotations

import sqlite3
import sys
import time
from pathlib import Path

import numpy as np
import pyarrow as pa

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
from docket.core.storage.pair_keys import lookup, lookup_many, pair_keys

N_LEFT, PER_LEFT, N_FILES = 200_000, 5, 5


def candidates() -> tuple[sqlite3.Connection, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(11)
    left = np.repeat(np.arange(N_LEFT), PER_LEFT)
    right = rng.integers(0, N_LEFT, left.size)
    keep = np.unique(left * N_LEFT + right, return_index=True)[1]
    left, right = left[keep], right[keep]
    conn = sqlite3.connect(":memory:")
    conn.execute("CREATE TABLE pairs (pair_id INTEGER PRIMARY KEY, left_id TEXT, right_id TEXT)")
    conn.executemany("INSERT INTO pairs VALUES (?, ?, ?)",
                     ((i + 1, f"L{a:07d}", f"R{b:07d}") for i, (a, b) in
                      enumerate(zip(left.tolist(), right.tolist(), strict=True))))
    return conn, left, right


def clock() -> tuple[float, float]:
    return time.perf_counter(), time.process_time()


def main() -> None:
    conn, left, right = candidates()
    n = left.size
    files = []
    for seed in range(N_FILES):
        order = np.random.default_rng(seed).permutation(n)
        files.append((pa.array([f"L{a:07d}" for a in left[order].tolist()]),
                      pa.array([f"R{b:07d}" for b in right[order].tolist()]), order))
    index = pair_keys(conn, link=True)  # built once, outside the clock, as the import does
    columns = [(a, b) for a, b, _ in files]
    results = {}
    for name in ("per file", "batched"):
        wall, cpu = clock()
        if name == "per file":
            found = [lookup(index, a, b) for a, b in columns]
        else:
            found = lookup_many(index, columns)
        w, c = clock()
        for got, (_, _, order) in zip(found, files, strict=True):
            assert np.array_equal(got, order), name  # pair ids are 1..n in insertion order
        results[name] = (w - wall, c - cpu)
    print(f"{N_FILES} shuffled files, each listing all {n:,} candidate pairs")
    for name, (w, c) in results.items():
        print(f"{name:9s} {w / N_FILES:6.2f} s per file ({c / N_FILES:5.2f} s CPU)")
    print(f"batched / per file: {results['batched'][1] / results['per file'][1]:.2f} of the CPU, "
          f"{results['batched'][0] / results['per file'][0]:.2f} of the wall time")


if __name__ == "__main__":
    main()

"""Finding many (left id, right id) rows among the candidate pairs at once (a matcher's file,
for import or for evaluate --predictions).

A million candidate pairs are read from the project file as one text (``group_concat``), split
and joined into one key per pair by pyarrow, and each matcher file's rows are joined the same
way and looked up with one hash join (``pyarrow.compute.index_in``). The keys join the two ids
with a character that no candidate pair's ids hold, checked by counting, so a key names one
pair. Row by row in Python, or through a pandas index of strings, the same lookup took
seconds per file; here it is a fraction of a second.

pyarrow builds the hash of the value set (the million candidate keys) anew for each call, at
about the cost of looking up a million rows; it builds it once for all the chunks of one
call. So ``lookup_many`` looks up the rows of several files in one call (bench/matchers_lookup.py
measures it against one call per file).
"""

from __future__ import annotations

import sqlite3
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from ..errors import DocketError

# Control characters ids seldom hold: the first one that no candidate pair's ids hold joins
# the two ids of a key.
SEPARATORS = ("\x1f", "\x1e", "\x1d", "\x1c", "\x01")


@dataclass(frozen=True)
class PairKeys:
    """One key per candidate pair and each key's position in pair-id order."""

    keys: pa.Array  # left id, separator, right id
    position: np.ndarray  # position in pair-id order (``catalogue.pair_ids``) of keys[i]
    separator: str
    link: bool
    ids: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))  # pair ids,
    # in pair-id order: ids[position[i]] is the pair of keys[i]

    @property
    def n_pairs(self) -> int:
        return len(self.keys)


def _text(conn: sqlite3.Connection, sep: str) -> str:
    # The pair id travels with its ids, so the order group_concat follows does not matter.
    code = ord(sep)
    row = conn.execute(f"SELECT group_concat(pair_id || char({code}) || left_id || "
                       f"char({code}) || right_id, char({code})) FROM pairs").fetchone()
    return row[0] or ""


def pair_keys(conn: sqlite3.Connection, link: bool) -> PairKeys:
    n = conn.execute("SELECT count(*) FROM pairs").fetchone()[0]
    for sep in SEPARATORS:
        text = _text(conn, sep)
        if n == 0 or text.count(sep) == 3 * n - 1:  # no id holds the separator
            break
    else:
        raise DocketError("the candidate pairs' ids hold every control character docket "
                          "could join them with (\\x1f, \\x1e, \\x1d, \\x1c, \\x01); "
                          "rebuild the project with ids free of at least one")
    if n == 0:
        empty = pa.array([], pa.large_string())
        return PairKeys(empty, np.zeros(0, dtype=np.int64), sep, link)
    parts = pc.split_pattern(pa.array([text], pa.large_string()), sep).flatten()
    del text
    every = np.arange(0, 3 * n, 3)
    ids = pc.cast(parts.take(pa.array(every)), pa.int64()).to_numpy()
    keys = join(parts.take(pa.array(every + 1)), parts.take(pa.array(every + 2)), sep)
    position = np.empty(n, dtype=np.int64)
    position[np.argsort(ids, kind="stable")] = np.arange(n)
    return PairKeys(keys, position, sep, link, np.sort(ids))


def join(left: pa.Array | pa.ChunkedArray, right: pa.Array | pa.ChunkedArray,
         sep: str) -> pa.Array:
    big = pa.large_string()
    out = pc.binary_join_element_wise(left.cast(big), right.cast(big), pa.scalar(sep, big))
    return out.combine_chunks() if isinstance(out, pa.ChunkedArray) else out


def lookup(index: PairKeys, left: pa.ChunkedArray | pa.Array,
           right: pa.ChunkedArray | pa.Array) -> np.ndarray:
    """Position in pair-id order of each (left, right) row, -1 where it is no candidate pair
    (in one table, a pair may be written either way round)."""
    return lookup_many(index, [(left, right)])[0]


def lookup_many(index: PairKeys, files: Sequence[tuple[pa.ChunkedArray | pa.Array,
                                                       pa.ChunkedArray | pa.Array]]
                ) -> list[np.ndarray]:
    """``lookup`` for the (left, right) columns of each file, with one hash of the candidate
    keys for all of them."""
    found = _find(index, [join(a, b, index.separator) for a, b in files])
    if not index.link:
        misses = [np.flatnonzero(f < 0) for f in found]
        swapped = _find(index, [join(b.take(pa.array(m)), a.take(pa.array(m)), index.separator)
                                for (a, b), m in zip(files, misses, strict=True)])
        for f, m, again in zip(found, misses, swapped, strict=True):
            f[m] = again
    return found


def _find(index: PairKeys, keys: list[pa.Array]) -> list[np.ndarray]:
    sizes = [len(k) for k in keys]
    if not index.n_pairs or not sum(sizes):
        return [np.full(n, -1, dtype=np.int64) for n in sizes]
    hit = pc.index_in(pa.chunked_array(keys, pa.large_string()), value_set=index.keys)
    at = hit.fill_null(-1).to_numpy().astype(np.int64)
    at = np.where(at >= 0, index.position[at.clip(0)], -1)
    return np.split(at, np.cumsum(sizes)[:-1])

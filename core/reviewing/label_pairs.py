"""The pairs a label file's rows name, asked of the pairs' indexes a few hundred rows at a time.

Reading every pair of the project into a dictionary first took 1.2 s and about 300 MB at
1,000,000 pairs, for a file of a few rows as for one of 25,000.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterable
from pathlib import Path

import pandas as pd

from ..errors import DocketError
from ..records.sources import row_named
from ..storage.project_file import ProjectFile

CHUNK = 400  # rows per query: two bound parameters each, well under SQLite's limit


def ids_of_ends(conn: sqlite3.Connection, ends: Iterable[tuple[object, object]]
                ) -> dict[tuple[str, str], int]:
    """The pair id of each (left_id, right_id) that is a candidate pair, through ``pairs_ids``."""
    wanted = sorted({(a, b) for a, b in ends if isinstance(a, str) and isinstance(b, str)})
    found: dict[tuple[str, str], int] = {}
    for at in range(0, len(wanted), CHUNK):
        part = wanted[at:at + CHUNK]
        values = ", ".join(["(?, ?)"] * len(part))
        for pid, a, b in conn.execute(
                f"SELECT p.pair_id, p.left_id, p.right_id FROM (VALUES {values}) v "
                "JOIN pairs p ON p.left_id = v.column1 AND p.right_id = v.column2",
                [x for pair in part for x in pair]):
            found[(a, b)] = int(pid)
    return found


def ends_of_ids(conn: sqlite3.Connection, pair_ids: Iterable[int]
                ) -> dict[int, tuple[str, str]]:
    """(left_id, right_id) of each of ``pair_ids`` that is a pair of the project."""
    ids = sorted({int(p) for p in pair_ids if -2 ** 63 <= int(p) < 2 ** 63})  # SQLite's range
    found: dict[int, tuple[str, str]] = {}
    for at in range(0, len(ids), CHUNK * 2):
        part = ids[at:at + CHUNK * 2]
        for pid, a, b in conn.execute(
                "SELECT pair_id, left_id, right_id FROM pairs "
                f"WHERE pair_id IN ({', '.join('?' * len(part))})", part):
            found[int(pid)] = (a, b)
    return found


def check_ids_agree(project: ProjectFile, path: Path, frame: pd.DataFrame,
                     pair_ids: list[int], ends: dict[int, tuple[str, str]]) -> None:
    """Rows that give a pair id and record ids name one pair both ways. Pair ids belong to one
    build: from another copy or an edited file they named other pairs, and the ids beside
    them were ignored, so the labels went to the wrong pairs, unsaid."""
    for i, (pid, a, b) in enumerate(zip(pair_ids, frame["left_id"], frame["right_id"],
                                        strict=True)):
        pair = ends[pid]
        if (a, b) != pair and (project.link or (b, a) != pair):
            raise DocketError(f"{path}: {row_named(path, i)}: pair {pid} is {pair[0]} and "
                              f"{pair[1]}, but the row names {a} and {b}; give the pair ids "
                              "of this project (docket next or the scores export), or leave the "
                              "pair_id column out; nothing was written")

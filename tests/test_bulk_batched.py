"""A label file written in batched statements leaves the project as row-by-row writing did."""

from __future__ import annotations

import random
import shutil
import sqlite3
from pathlib import Path

from docket.core import Project
from docket.core.reviewing.bulk import BulkRow, apply_rows, read_rows
from docket.core.reviewing.label_standing import new_rows
from docket.core.storage import claims, roles
from docket.core.storage import decisions as log


def _one_row_at_a_time(p: Project, reviewer: str, rows: list[BulkRow]) -> None:
    """How apply_rows wrote before its statements were batched: three calls per row."""
    with p.transaction() as conn:
        roles.register(conn, reviewer)
        for r in rows:
            prior = log.current_of(conn, r.pair_id, reviewer)
            log.append(conn, r.pair_id, reviewer, r.label, r.note, 0.0,
                       None if prior is None else prior.decision_id)
            claims.release(conn, reviewer, r.pair_id)


def _state(conn: sqlite3.Connection) -> tuple[list, ...]:
    # decision ids and times differ from run to run; what each decision took back does not
    return (conn.execute("SELECT pair_id, reviewer, role, label FROM current ORDER BY 1, 2, 3"
                         ).fetchall(),
            conn.execute("SELECT name, standing FROM reviewers ORDER BY 1").fetchall(),
            conn.execute("SELECT pair_id, n_labels, open FROM pairs ORDER BY 1").fetchall(),
            conn.execute("SELECT pair_id, reviewer FROM claims ORDER BY 1, 2").fetchall(),
            conn.execute("SELECT d.pair_id, d.reviewer, d.label, d.note, s.label FROM decisions d "
                         "LEFT JOIN decisions s ON s.decision_id = d.supersedes "
                         "ORDER BY 1, 2, d.decided_at").fetchall())


def _prepare(path: Path, ids: list[int]) -> None:
    with Project.open(path) as p:
        for pid in ids[:40]:  # ana's earlier labels, some of which the file changes
            p.decide(pid, "ana", "hold", note="unsure")
        for pid in ids[20:60]:
            p.decide(pid, "ben", "match")
        with p.transaction() as conn:
            claims.claim(conn, "ana", ids[100:130])
            claims.claim(conn, "ben", ids[130:140])


def test_batched_rows_leave_what_one_row_at_a_time_left(sample_project: Path,
                                                        tmp_path: Path) -> None:
    with Project.open(sample_project) as p:
        ids = [r[0] for r in p.connection.execute("SELECT pair_id FROM pairs ORDER BY pair_id")]
    rng = random.Random(11)  # seeded labels and notes
    chosen = rng.sample(ids, 300)
    other = tmp_path / "other.docket"
    shutil.copy(sample_project, other)
    _prepare(sample_project, chosen)
    _prepare(other, chosen)
    rows = [BulkRow(pid, rng.choice(("match", "non-match", "hold")), rng.choice(("", "moved")))
            for pid in chosen[:250]]
    with Project.open(sample_project) as p:
        kept = new_rows(p, "ana", rows, Path("labels.csv"))
        # batches of 7, 40 and 500: refresh_many's one-key fallback and its set-based path
        for part, batch in ((kept[:30], 7), (kept[30:120], 40), (kept[120:], 500)):
            apply_rows(p, "ana", part, batch=batch, seconds=float("inf"), pause=0)
        batched = _state(p.connection)
    with Project.open(other) as q:
        with q.reading() as conn:
            prior = {pid: log.current_of(conn, pid, "ana") for pid in chosen}
        unchanged = [r for r in rows if (d := prior[r.pair_id]) is None
                     or (d.label, d.note) != (r.label, r.note)]
        assert [r.pair_id for r in unchanged] == [r.pair_id for r in kept]
        _one_row_at_a_time(q, "ana", unchanged)
        assert _state(q.connection) == batched


def test_the_pairs_a_file_names_are_those_the_whole_table_gave(sample_project: Path,
                                                               tmp_path: Path) -> None:
    with Project.open(sample_project) as p:
        table = p.connection.execute("SELECT pair_id, left_id, right_id FROM pairs").fetchall()
    rng = random.Random(5)  # seeded choice of 900 pairs: more than one query's worth
    picked = rng.sample(table, 900)
    rows = tmp_path / "labels.csv"
    rows.write_text("left_id,right_id,label\n" + "".join(f"{a},{b},match\n"
                                                        for _, a, b in picked), encoding="utf-8")
    by_id = tmp_path / "by_id.csv"
    by_id.write_text("pair_id,left_id,right_id,label\n" + "".join(
        f"{pid},{a},{b},non-match\n" for pid, a, b in picked), encoding="utf-8")
    with Project.open(sample_project) as p:
        assert [r.pair_id for r in read_rows(p, rows)] == [pid for pid, _, _ in picked]
        assert [r.pair_id for r in read_rows(p, by_id)] == [pid for pid, _, _ in picked]

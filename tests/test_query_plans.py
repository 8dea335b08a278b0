"""Serving and deciding a pair: every statement finds its rows through an index.

The next-pair target (p99 <= 5 ms at any size, bench/next_pair.py) rests on this: no
statement on the way scans a table. The one walk allowed is the queue's: patterns in
priority order (an index, stopped by LIMIT), each probed for open pairs by index.
"""

from __future__ import annotations

import sqlite3
from pathlib import Path

from docket.core import Project
from docket.core.reviewing import adjudication
from docket.core.reviewing.team import add_reviewer

QUEUE_WALK = "SCAN t USING INDEX patterns_priority"


def plans(conn: sqlite3.Connection, statements: list[str]) -> dict[str, list[str]]:
    out = {}
    for sql in dict.fromkeys(statements):
        if sql.lstrip().split()[0].upper() in {"SELECT", "INSERT", "UPDATE", "DELETE"}:
            out[sql] = [r[3] for r in conn.execute("EXPLAIN QUERY PLAN " + sql)]
    return out


def test_serving_deciding_and_claiming_scan_no_table(sample_project: Path) -> None:
    with Project.open(sample_project) as project:
        add_reviewer(project, "lead", "adjudicator")
        # a name's first use reads every known name once (to refuse "Maya" beside "maya"): a
        # table of people, not of pairs, and not on the way of a reviewer already working
        project.ensure_reviewer("maya")
        conn = project.connection
        seen: list[str] = []
        conn.set_trace_callback(seen.append)
        for _ in range(3):
            item = project.next_pairs("maya", 1, claim=True)[0]
            project.decide(item.pair_id, "maya", "match", "same phone")
        project.undo("maya")
        project.next_pairs("maya", 5)
        project.release("maya")
        adjudication.serve(project, "lead", [item.pair_id])
        adjudication.release(project, "lead")
        conn.set_trace_callback(None)
        found = plans(conn, seen)
    assert len(found) >= 15
    scans = {sql: [step for step in plan if step.startswith("SCAN") and step != QUEUE_WALK]
             for sql, plan in found.items()}
    assert {sql: steps for sql, steps in scans.items() if steps} == {}

"""Schema 3: history lookups use an index in their own order; older files are upgraded."""

from __future__ import annotations

import shutil
from pathlib import Path

from docket.core import Project
from docket.core.reviewing.team import add_reviewer, list_reviewers
from docket.core.storage import store
from docket.core.storage.fingerprint import records_fingerprint
from docket.core.storage.migrations import MIGRATED_GRANTOR
from tests.store_support import downgrade

# The lookup every decision makes (decisions.refresh): it must be a search on the
# (pair, reviewer, role) index, never a walk over the reviewer's whole history.
REFRESH = ("SELECT decision_id FROM decisions d WHERE pair_id = ? AND reviewer = ? AND role = ? "
           "AND label IS NOT NULL ORDER BY decided_at DESC, decision_id DESC LIMIT 1")


def test_decision_lookup_is_indexed_by_pair(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        plan = " ".join(r[3] for r in p.connection.execute(
            "EXPLAIN QUERY PLAN " + REFRESH, (1, "maya", "reviewer")))
        assert "decisions_pair" in plan and "decisions_reviewer" not in plan
        since = " ".join(r[3] for r in p.connection.execute(
            "EXPLAIN QUERY PLAN SELECT count(*) FROM decisions WHERE decided_at > ?", ("x",)))
        assert "decisions_time" in since


def test_a_version_2_file_is_upgraded_in_place(sample_project: Path, tmp_path: Path) -> None:
    with Project.open(sample_project) as p:
        add_reviewer(p, "ines", "adjudicator", granted_by="lead")
        p.decide(p.next_pairs("maya", 1)[0].pair_id, "maya", "match")
        want = p.meta["records_fingerprint"]
    assert len(want) == 32
    downgrade(sample_project, 2)
    readonly_copy = tmp_path / "ro.docket"
    shutil.copy(sample_project, readonly_copy)

    with Project.open(sample_project) as p:
        conn = p.connection
        assert store.schema_version(conn) == store.SCHEMA_VERSION
        assert p.meta["records_fingerprint"] == want == records_fingerprint(conn)
        grants = conn.execute("SELECT name, role, granted_by FROM role_grants").fetchall()
        assert grants == [("ines", "adjudicator", MIGRATED_GRANTOR)]
        assert len(p.decisions()) == 1
        assert conn.execute("SELECT standing FROM reviewers WHERE name = 'maya'").fetchone() == (1,)
        assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    # Read-only, an older file is left as it is, and its present roles read as the upgrade
    # would record them.
    with Project.open(readonly_copy, readonly=True) as p:
        assert store.schema_version(p.connection) == 2
        people = {r["name"]: r for r in list_reviewers(p)}
        assert people["ines"]["granted_by"] == MIGRATED_GRANTOR


def test_fingerprint_covers_record_values(sample_project: Path, tmp_path: Path) -> None:
    other = tmp_path / "other.docket"
    shutil.copy(sample_project, other)
    with Project.open(sample_project) as a, Project.open(other) as b:
        assert records_fingerprint(a.connection) == records_fingerprint(b.connection)
        column = b.meta["left_id_column"]
        with b.transaction() as conn:
            conn.execute(f"UPDATE left_records SET owner = 'someone else' WHERE "
                         f"{store.quote(column)} = (SELECT min({store.quote(column)}) "
                         "FROM left_records)")
        assert records_fingerprint(a.connection) != records_fingerprint(b.connection)


def test_standing_counts_follow_decide_undo_and_merge(sample_project: Path, tmp_path: Path) -> None:
    from docket.core.reviewing.merge import merge

    other = tmp_path / "copy.docket"
    shutil.copy(sample_project, other)
    with Project.open(other) as p:
        for item in p.next_pairs("ravi", 3):
            p.decide(item.pair_id, "ravi", "match")
    with Project.open(sample_project) as p:
        a, b, c = p.next_pairs("maya", 3)
        p.decide(a.pair_id, "maya", "match")
        p.decide(b.pair_id, "maya", "hold")
        p.decide(b.pair_id, "maya", "non-match")  # a change, not another label
        p.undo("maya")
        p.undo("maya")
        add_reviewer(p, "maya", "adjudicator", granted_by="lead")
        p.decide(c.pair_id, "maya", "match", role="adjudicator")  # not a reviewer label
        merge(p, [other])
        conn = p.connection
        counted = dict(conn.execute("SELECT reviewer, count(*) FROM current "
                                    "WHERE role = 'reviewer' GROUP BY reviewer"))
        kept = dict(conn.execute("SELECT name, standing FROM reviewers"))
    assert counted == {"maya": 1, "ravi": 3} and kept == counted

"""The project store (file mode, WAL, schema, append-only log) and the queue's rules."""

from __future__ import annotations

import os
import sqlite3
import stat
from pathlib import Path

import numpy as np

from docket.core import Project
from docket.core.ordering import queue
from docket.core.report import status
from docket.core.storage import store
from tests.conftest import sample_spec


def test_file_is_private_wal_and_versioned(sample_project_file: Path) -> None:
    assert stat.S_IMODE(os.stat(sample_project_file).st_mode) == 0o600
    conn = sqlite3.connect(sample_project_file)
    assert conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
    assert conn.execute("PRAGMA user_version").fetchone()[0] == store.SCHEMA_VERSION
    assert conn.execute("SELECT version, name FROM migrations").fetchall() == [
        (store.SCHEMA_VERSION, "initial")]
    assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"


def test_undo_appends_a_retraction_and_nothing_is_deleted(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        first, second = p.next_pairs("maya", 2)
        d1 = p.decide(first.pair_id, "maya", "match", note="same pet and phone", seconds=4.2)
        p.decide(second.pair_id, "maya", "non-match")
        undone = p.undo("maya")
        assert undone is not None and undone.pair_id == second.pair_id
        log = p.decisions()
        assert len(log) == 3 and log[-1].is_retraction and log[-1].supersedes == undone.decision_id
        assert p.current_label(second.pair_id, "maya") is None
        kept = p.current_label(first.pair_id, "maya")
        assert kept is not None and kept.note == "same pet and phone" and kept.seconds == 4.2
        # the undone pair is back in maya's queue
        assert second.pair_id in [i.pair_id for i in p.next_pairs("maya", 5)]
        # changing a past decision appends a new one that supersedes it
        changed = p.decide(first.pair_id, "maya", "hold")
        assert changed.supersedes == d1.decision_id and len(p.decisions()) == 4
        assert [d.label for d in p.history("maya")] == ["hold"]


def test_overlap_pairs_need_two_reviewers(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        conn = p.connection
        overlap_id = conn.execute(
            "SELECT pair_id FROM pairs WHERE overlap = 1 LIMIT 1").fetchone()[0]
        single_id = conn.execute("SELECT pair_id FROM pairs WHERE overlap = 0 AND audit = 0 "
                                 "LIMIT 1").fetchone()[0]
        p.decide(overlap_id, "maya", "match")
        p.decide(single_id, "maya", "match")
        state = dict(conn.execute("SELECT pair_id, open FROM pairs WHERE pair_id IN (?, ?)",
                                  (overlap_id, single_id)).fetchall())
        assert state == {overlap_id: 1, single_id: 0}
        p.decide(overlap_id, "ravi", "match")
        assert conn.execute("SELECT open FROM pairs WHERE pair_id = ?",
                            (overlap_id,)).fetchone()[0] == 0


def test_audit_slice_mixed_in_at_a_fixed_rate(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        reasons = [i.reason for i in p.next_pairs("maya", 20)]
        every = p.meta["audit_every"]
        assert [i for i, r in enumerate(reasons) if r == "audit"] == \
            list(range(every - 1, 20, every))


def test_audit_inclusion_probabilities() -> None:
    rng = np.random.default_rng(0)
    prob = np.concatenate([rng.random(5000) * 0.01, rng.random(300), 0.99 + rng.random(200) / 100])
    s = queue.draw_audit(prob, 400, seed=1)
    assert s.selected.sum() == 400
    for h, (big, drawn) in s.sizes.items():
        members = s.stratum == h
        assert members.sum() == big and s.selected[members].sum() == drawn
        assert np.allclose(s.inclusion[members], drawn / big)
    assert (queue.draw_audit(prob, 400, seed=1).selected == s.selected).all()  # deterministic


def test_refit_is_deterministic(sample_project_file: Path, tmp_path: Path) -> None:
    results = []
    for name in ("a", "b"):
        path = tmp_path / f"{name}.docket"
        Project.create(sample_spec(path))
        with Project.open(path) as p:
            for item in p.next_pairs("maya", 30):
                p.decide(item.pair_id, "maya", "match" if item.probability > 0.5 else "non-match")
            p.refit()
            results.append((p.meta["fs_model"], p.connection.execute(
                "SELECT probability FROM patterns ORDER BY pattern_id").fetchall()))
    assert results[0] == results[1]


def test_busy_timeout_lets_two_connections_write(sample_project: Path) -> None:
    with Project.open(sample_project) as a, Project.open(sample_project) as b:
        x, y = a.next_pairs("maya", 2)
        a.decide(x.pair_id, "maya", "match")
        b.decide(y.pair_id, "ravi", "non-match")
        assert len(a.decisions()) == 2


def test_registered_migrations_upgrade_an_older_file(sample_project: Path, monkeypatch) -> None:
    from docket.core.storage import store

    def add_column(conn: sqlite3.Connection) -> None:
        conn.execute("ALTER TABLE reviewers ADD COLUMN email TEXT")

    later = store.SCHEMA_VERSION + 1
    monkeypatch.setattr(store, "SCHEMA_VERSION", later)
    monkeypatch.setitem(store.MIGRATIONS, later, ("reviewer e-mail", add_column))
    with Project.open(sample_project) as p:
        conn = p.connection
        assert conn.execute("PRAGMA user_version").fetchone()[0] == later
        assert [r[0] for r in conn.execute("SELECT version FROM migrations ORDER BY 1")] == [
            later - 1, later]
        assert "email" in [r[1] for r in conn.execute("PRAGMA table_info(reviewers)")]


def test_a_version_1_file_gains_every_later_table(sample_project: Path) -> None:
    from tests.store_support import downgrade

    downgrade(sample_project, 1)  # make it a file written by version 1
    with Project.open(sample_project, readonly=True) as p:  # read-only: left as it is
        assert p.draft(1, "maya") == "" and p.missed_matches() == []
        assert status(p)["matchers"] == []
    with Project.open(sample_project) as p:  # upgraded through every step
        conn = p.connection
        assert conn.execute("PRAGMA user_version").fetchone()[0] == store.SCHEMA_VERSION
        assert [r[0] for r in conn.execute("SELECT version FROM migrations ORDER BY 1")] == \
            list(range(1, store.SCHEMA_VERSION + 1))
        assert store.has_table(conn, "machine_raters")
        pid = p.next_pairs("maya", 1)[0].pair_id
        p.save_draft(pid, "maya", "kept")
        assert p.draft(pid, "maya") == "kept"


def test_overlap_pairs_can_need_three_reviewers(tmp_path: Path) -> None:
    path = tmp_path / "k3.docket"
    Project.create(sample_spec(path, overlap=1.0, overlap_reviewers=3))
    with Project.open(path) as p:
        pid = p.next_pairs("a", 1)[0].pair_id
        for i, name in enumerate(("a", "b", "c")):
            assert p.connection.execute("SELECT open FROM pairs WHERE pair_id = ?",
                                        (pid,)).fetchone()[0] == 1, i
            p.decide(pid, name, "match")
        assert p.connection.execute("SELECT open FROM pairs WHERE pair_id = ?",
                                    (pid,)).fetchone()[0] == 0


def test_another_process_reading_does_not_break_our_connections(sample_project: Path) -> None:
    # A user may inspect the file with sqlite3 while docket runs, and the screens open a second
    # connection for background work: both must keep working side by side.
    import subprocess
    import sys
    holder = ("import sqlite3, sys; c = sqlite3.connect(sys.argv[1]); "
              "c.execute('SELECT count(*) FROM decisions').fetchone(); print('ready', flush=True); "
              "sys.stdin.read(); c.execute('SELECT count(*) FROM pairs').fetchone()")
    with Project.open(sample_project) as first:
        item = first.next_pairs("maya", 1)[0]
        other = subprocess.Popen([sys.executable, "-c", holder, str(sample_project)],
                                 stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
        try:
            assert other.stdout is not None and other.stdout.readline().strip() == "ready"
            first.decide(item.pair_id, "maya", "match")
            with Project.open(sample_project) as second:
                assert len(second.decisions()) == 1
                second.decide(second.next_pairs("ravi", 1)[0].pair_id, "ravi", "non-match")
            assert len(first.decisions()) == 2
        finally:
            other.communicate("", timeout=30)
        assert other.returncode == 0


def test_find_by_pair_id_record_id_and_text(sample_project: Path, tmp_path: Path) -> None:
    with Project.open(sample_project) as p:
        pid, left_id, right_id = p.connection.execute(
            "SELECT pair_id, left_id, right_id FROM pairs ORDER BY pair_id LIMIT 1").fetchone()
        assert p.find(str(pid)) == [pid]
        assert pid in p.find(right_id)
        owner = p.record("left", left_id)["owner"]
        assert pid in p.find(owner)
    # one table: a record found by its text may sit on either side of its pairs
    path = tmp_path / "one.docket"
    from docket.core import NewProject
    from tests.conftest import SAMPLE
    Project.create(NewProject(path=path, left=SAMPLE / "practice_north.csv",
                              id_column="client_id", rules=["postcode"]))
    with Project.open(path) as p:
        pid, a, b = p.connection.execute(
            "SELECT pair_id, left_id, right_id FROM pairs ORDER BY pair_id LIMIT 1").fetchone()
        assert pid in p.find(p.record("right", b)["owner"])
        assert pid in p.find(p.record("left", a)["owner"])

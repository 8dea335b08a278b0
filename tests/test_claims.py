"""Claims on served pairs: two reviewers at once never get one non-overlap pair."""

from __future__ import annotations

import os
import sqlite3
import stat
from datetime import timedelta
from pathlib import Path

from docket.core import Project
from docket.core.storage import claims
from docket.tui.cli import main

from .team_load import run_team


def _claims(path: Path) -> list[tuple[int, str]]:
    with sqlite3.connect(path) as conn:
        return conn.execute("SELECT pair_id, reviewer FROM claims ORDER BY 1, 2").fetchall()


def test_two_reviewers_are_served_different_pairs(sample_project: Path) -> None:
    with Project.open(sample_project) as a, Project.open(sample_project) as b:
        first = {i.pair_id: i for i in a.next_pairs("ana", 8, claim=True)}
        second = {i.pair_id: i for i in b.next_pairs("ben", 8, claim=True)}
        need = dict(a.connection.execute("SELECT pair_id, need FROM pairs"))
        shared = set(first) & set(second)
        # Only a pair that still needs two reviewers may go to both.
        assert all(need[pid] >= 2 for pid in shared)
        assert len(first) == len(second) == 8
        # Without the claims both would have been given the same queue.
        assert [i.pair_id for i in a.next_pairs("cleo", 8)] != list(first)


def test_a_claim_ends_on_decide_on_the_next_claim_and_on_release(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        one, two = p.next_pairs("ana", 2, claim=True)
        p.decide(one.pair_id, "ana", "match")
        assert _claims(sample_project) == [(two.pair_id, "ana")]
        (three,) = p.next_pairs("ana", 1, claim=True)  # a reviewer holds what they got last
        assert _claims(sample_project) == [(three.pair_id, "ana")]
        p.release("ana")
        assert _claims(sample_project) == []


def test_a_pair_taken_back_by_undo_is_held_beside_the_one_on_screen(sample_project: Path
                                                                     ) -> None:
    with Project.open(sample_project) as p:
        (one,) = p.next_pairs("ana", 1, claim=True)
        p.decide(one.pair_id, "ana", "non-match")
        (two,) = p.next_pairs("ana", 1, claim=True)
        p.undo("ana")
        assert _claims(sample_project) == sorted([(one.pair_id, "ana"), (two.pair_id, "ana")])
        need = dict(p.connection.execute("SELECT pair_id, need FROM pairs"))
        served = {i.pair_id for i in p.next_pairs("ben", 20)}
        assert all(pid not in served for pid in (one.pair_id, two.pair_id) if need[pid] == 1)
        p.release("ana")
        assert one.pair_id in {i.pair_id for i in p.next_pairs("ben", 20)}


def test_a_lapsed_claim_holds_nothing(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        (first,) = p.next_pairs("ana", 1)
        with p.transaction() as conn:
            claims.claim(conn, "ana", [first.pair_id], lease=timedelta(seconds=-1))
        assert p.next_pairs("ben", 1)[0].pair_id == first.pair_id
        with p.transaction() as conn:
            claims.claim(conn, "ana", [first.pair_id])
        assert p.next_pairs("ben", 1)[0].pair_id != first.pair_id
        assert [c[:2] for c in claims.held(p.connection)] == [(first.pair_id, "ana")]


def test_next_without_claim_only_looks(sample_project: Path, capsys) -> None:
    with sqlite3.connect(sample_project) as conn:
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    before = sample_project.read_bytes()
    os.chmod(sample_project, stat.S_IRUSR)  # a read-only project works for looking
    try:
        assert main(["next", str(sample_project), "--reviewer", "zoe", "-n", "3"]) == 0
    finally:
        os.chmod(sample_project, stat.S_IRUSR | stat.S_IWUSR)
    assert len(capsys.readouterr().out.strip().splitlines()) == 4
    assert sample_project.read_bytes() == before
    assert not Path(f"{sample_project}-wal").exists() or \
        Path(f"{sample_project}-wal").stat().st_size == 0
    with sqlite3.connect(sample_project) as conn:
        assert conn.execute("SELECT count(*) FROM reviewers").fetchone()[0] == 0

    assert main(["next", str(sample_project), "--reviewer", "zoe", "-n", "3", "--claim"]) == 0
    assert len(_claims(sample_project)) == 3
    with sqlite3.connect(sample_project) as conn:
        assert conn.execute("SELECT name FROM reviewers").fetchall() == [("zoe",)]
    # '-n 100000 --claim' took every pair of the queue from everyone else for 15 minutes
    capsys.readouterr()
    assert main(["next", str(sample_project), "--reviewer", "ann", "-n", "1001", "--claim"]) == 2
    assert "-n 1,001 --claim: a claim keeps each pair from other reviewers for 15 minutes; " \
        "claim at most 1,000 at once" in capsys.readouterr().err
    assert len(_claims(sample_project)) == 3


def test_two_reviewers_and_an_adjudicator_at_once(sample_project: Path) -> None:
    # A short round of bench/team_load.py (which runs it for 30 s).
    report = run_team(sample_project, decisions=40)
    assert report.errors == []
    assert report.decisions["ana"] == report.decisions["ben"] == 40
    assert report.lost == 0
    assert report.decided_twice == [] and report.over_need == []

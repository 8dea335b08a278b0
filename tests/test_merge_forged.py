"""Forged copies: a merge takes roles from the receiving project and refuses what it cannot trust.

One test per way a copy was found to fool a merge: adding an adjudicator, a demoted
adjudicator's later adjudications, a decision dated 9999, an unknown role, and a project built
from other records with the same ids and pairs file.
"""

from __future__ import annotations

import json
import shutil
import sqlite3
from pathlib import Path

import pytest

from docket.core import NewProject, Project
from docket.core.reviewing import gold
from docket.core.reviewing.merge import merge
from docket.core.reviewing.team import add_reviewer

from .team_support import LEFT, RIGHT, run, tiny_project
from .test_merge import snapshot


@pytest.fixture
def target(tmp_path: Path) -> Path:
    """A tiny project where ana and ben disagree on pair 1 (so it waits for adjudication)."""
    path = tiny_project(tmp_path / "t")
    with Project.open(path) as p:
        p.decide(1, "ana", "match")
        p.decide(1, "ben", "non-match")
    return path


def copy_of(src: Path, name: str) -> Path:
    dst = src.with_name(name)
    shutil.copy(src, dst)
    return dst


def gold_of(path: Path) -> dict[int, str]:
    with Project.open(path) as p:
        return {g.pair_id: g.how for g in gold.gold_labels(p.connection)}


def test_a_copy_that_adds_an_adjudicator_settles_nothing(target: Path, capsys) -> None:
    other = copy_of(target, "laptop.docket")
    with Project.open(other) as p:
        add_reviewer(p, "zoe", "adjudicator", granted_by="zoe")
        p.decide(1, "zoe", "match", "same phone", role="adjudicator")
    assert gold_of(other) == {1: "adjudicated"}  # in the copy it looks settled

    assert run(["merge", str(target), str(other)]) == 0
    out = capsys.readouterr().out
    assert "role left out: " in out and "zoe is adjudicator there (granted by zoe" in out
    assert "--accept-roles" in out
    with Project.open(target) as p:
        present = dict(p.connection.execute("SELECT name, role FROM reviewers"))
        assert present["zoe"] == "reviewer"
        assert gold.needs_adjudication(p.connection) == [(1, "disagreement")]
    assert 1 not in gold_of(target)

    # Accepted on purpose, the grant comes in with its time, and the adjudication counts.
    with Project.open(target) as p:
        result = merge(p, [other], accept_roles=True)
        assert result.roles_accepted and [c.name for c in result.role_changes] == ["zoe"]
        granted = p.connection.execute("SELECT granted_by FROM role_grants WHERE name = 'zoe'")
        assert granted.fetchall() == [("zoe",)]
    assert gold_of(target) == {1: "adjudicated"}


def test_a_demoted_adjudicator_settles_nothing_after_the_demotion(target: Path) -> None:
    with Project.open(target) as p:
        add_reviewer(p, "ines", "adjudicator", granted_by="lead")
        p.decide(2, "ana", "match")
        p.decide(2, "ben", "hold")
        p.decide(2, "ines", "match", "same date of birth", role="adjudicator")
    other = copy_of(target, "laptop.docket")  # ines still an adjudicator in her copy
    with Project.open(target) as p:
        add_reviewer(p, "ines", "reviewer", granted_by="lead")
    with Project.open(other) as p:
        p.decide(1, "ines", "match", "settled offline", role="adjudicator")
    with Project.open(target) as p:
        result = merge(p, [other])
        assert result.added == 1 and result.unconfirmed_adjudicators == ("ines",)
        assert [(c.name, c.role, c.grant_id) for c in result.role_changes] == [
            ("ines", "adjudicator", None)]
    # Made while she held the role, pair 2 stays settled; pair 1, decided after, does not.
    assert gold_of(target) == {2: "adjudicated"}


def _forge(path: Path, sql: str, *args: object) -> None:
    conn = sqlite3.connect(path, isolation_level=None)
    conn.execute(sql, args)
    conn.close()


def _refused(target: Path, other: Path, capsys, words: str) -> None:
    before = snapshot(target)
    assert run(["merge", str(target), str(other)]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and str(other) in err and words in err
    assert "nothing was merged" in err
    assert snapshot(target) == before


def test_a_decision_dated_9999_is_refused(target: Path, capsys) -> None:
    other = copy_of(target, "laptop.docket")
    with Project.open(other) as p:
        p.decide(1, "ana", "non-match")
    _forge(other, "UPDATE decisions SET decided_at = '9999-12-31T00:00:00.000000+00:00' "
           "WHERE reviewer = 'ana' AND label = 'non-match'")
    _refused(target, other, capsys, "more than 1 hour ahead of this machine's clock")


def test_an_unknown_role_is_refused(target: Path, capsys) -> None:
    other = copy_of(target, "laptop.docket")
    with Project.open(other) as p:
        p.decide(3, "ana", "match")
    _forge(other, "UPDATE decisions SET role = 'superuser' WHERE pair_id = 3")
    _refused(target, other, capsys, "'superuser', which docket does not know")

    other = copy_of(target, "laptop2.docket")
    _forge(other, "UPDATE reviewers SET role = 'superuser' WHERE name = 'ben'")
    _refused(target, other, capsys, "reviewer ben has the role 'superuser'")


def _given_pairs(folder: Path, name: str, left: str) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "left.csv").write_text(left, encoding="utf-8")
    (folder / "right.csv").write_text(RIGHT, encoding="utf-8")
    (folder / "pairs.csv").write_text("left_id,right_id\n1,a\n2,b\n3,c\n4,d\n",
                                      encoding="utf-8")
    path = folder / name
    Project.create(NewProject(path=path, left=folder / "left.csv", right=folder / "right.csv",
                              id_column="id", pairs_file=folder / "pairs.csv"))
    return path


def test_other_records_with_the_same_ids_and_pairs_are_refused(tmp_path: Path, capsys) -> None:
    ours = _given_pairs(tmp_path / "a", "p.docket", LEFT)
    theirs = _given_pairs(tmp_path / "b", "p.docket", LEFT.replace("Anna Berg", "Anne Borg"))
    with Project.open(theirs) as p:
        p.decide(1, "ana", "match")
    _refused(ours, theirs, capsys, "a different project")

    # Carrying this project's fingerprints in its meta does not help: the copy's are recomputed.
    with Project.open(ours) as p:
        meta = {k: p.meta[k] for k in ("fingerprint", "records_fingerprint")}
    for key, value in meta.items():
        _forge(theirs, "UPDATE meta SET value = ? WHERE key = ?", json.dumps(value), key)
    _refused(ours, theirs, capsys, "a different project")

"""Adjudication in the core: the role check, the queue, the gold-label policy, reviews, undo."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from docket.core import DocketError, Project
from docket.core.reviewing import adjudication as adj
from docket.core.reviewing.gold import gold_labels
from docket.core.reviewing.team import add_reviewer

from .team_support import tiny_project


@pytest.fixture(scope="module")
def tiny_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tiny_project(tmp_path_factory.mktemp("tiny"))


@pytest.fixture
def project(tiny_file: Path, tmp_path: Path):
    copy = tmp_path / "t.docket"
    copy.write_bytes(tiny_file.read_bytes())
    with Project.open(copy) as p:
        add_reviewer(p, "ines", "adjudicator")
        yield p


def ids(p: Project) -> list[int]:
    return [r[0] for r in p.connection.execute("SELECT pair_id FROM pairs ORDER BY pair_id")]


def gold(p: Project) -> dict[int, tuple[str, str]]:
    return {g.pair_id: (g.label, g.how) for g in gold_labels(p.connection)}


def test_only_adjudicators_may_adjudicate_and_are_told_how(project: Project) -> None:
    first = ids(project)[0]
    project.decide(first, "maya", "match")
    assert adj.is_adjudicator(project, "ines") and not adj.is_adjudicator(project, "maya")
    assert not adj.is_adjudicator(project, "nobody")
    before = project.connection.execute("SELECT count(*) FROM decisions").fetchone()[0]
    for name in ("maya", "nobody"):
        with pytest.raises(DocketError) as err:
            adj.adjudicate(project, first, name, "match", "looks right")
        message = str(err.value)
        assert "\n" not in message and f"{name} is not an adjudicator" in message
        assert f"docket reviewers {project.path} add {name} --role adjudicator" in message
        with pytest.raises(DocketError):
            adj.undo(project, name)
    # the refused attempt left no decision and granted no role
    assert project.connection.execute("SELECT count(*) FROM decisions").fetchone()[0] == before
    assert not adj.is_adjudicator(project, "nobody")


def test_an_adjudication_needs_a_reason_a_label_and_a_pair(project: Project) -> None:
    first = ids(project)[0]
    for label, reason, pair in (("match", "", first), ("match", "   ", first),
                                ("maybe", "why", first), ("match", "why", 10_000)):
        with pytest.raises(DocketError):
            adj.adjudicate(project, pair, "ines", label, reason)
    d = adj.adjudicate(project, first, "ines", "non-match", "  different birth year  ", 12.0)
    stored = project.decisions(first)[-1]
    assert (stored.role, stored.label, stored.note, stored.seconds) == (
        "adjudicator", "non-match", "different birth year", 12.0)
    assert stored.decision_id == d.decision_id


def test_queue_holds_disagreements_and_holds_but_not_unanimous_pairs(project: Project) -> None:
    agree, differ, held, single = ids(project)[:4]
    for pid, a, b in ((agree, "match", "match"), (differ, "match", "non-match"),
                      (held, "non-match", "hold")):
        project.decide(pid, "maya", a)
        project.decide(pid, "otto", b, "same address, different birth year?" if b == "hold"
                       else "")
    project.decide(single, "maya", "non-match")
    waiting = sorted([(differ, "disagreement"), (held, "hold")])
    assert adj.queue(project) == waiting
    assert adj.queue(project, extra={agree}) == [*waiting, (agree, "cluster conflict")]


def test_policy_holds_never_gold_disagreements_only_when_adjudicated(project: Project) -> None:
    agree, differ, held = ids(project)[:3]
    for pid, a, b in ((agree, "match", "match"), (differ, "match", "non-match"),
                      (held, "hold", "hold")):
        project.decide(pid, "maya", a)
        project.decide(pid, "otto", b)
    assert gold(project) == {agree: ("match", "unanimous")}

    adj.adjudicate(project, differ, "ines", "match", "same phone and pet")
    adj.adjudicate(project, held, "ines", "hold", "ask the practice")
    assert gold(project) == {agree: ("match", "unanimous"), differ: ("match", "adjudicated")}
    assert adj.queue(project) == [(held, "hold")]  # an adjudicator's hold leaves it waiting

    adj.adjudicate(project, held, "ines", "non-match", "practice says two people")
    assert gold(project)[held] == ("non-match", "adjudicated")
    assert adj.queue(project) == []


def test_reviews_flag_the_adjudicators_own_earlier_label(project: Project) -> None:
    pid = ids(project)[0]
    project.decide(pid, "maya", "match", "same pet", seconds=3.0)
    project.decide(pid, "ines", "match", seconds=2.0)
    project.undo("ines")
    project.decide(pid, "ines", "non-match", "moved?", seconds=4.0)
    adj.adjudicate(project, pid, "ines", "hold", "need the old address", seconds=5.0)
    reviews = adj.reviews_of(project, pid, "ines")
    assert [(r.reviewer, r.role, r.label, r.own) for r in reviews] == [
        ("maya", "reviewer", "match", False), ("ines", "reviewer", "non-match", True),
        ("ines", "adjudicator", "hold", False)]
    assert [r.seconds for r in reviews] == [3.0, 6.0, 5.0]  # time spent, retracted included
    assert reviews[0].note == "same pet" and reviews[1].note == "moved?"
    assert all(r.decided_at for r in reviews)
    assert not any(r.own for r in adj.reviews_of(project, pid, "otto"))


def test_undo_takes_back_the_latest_adjudication(project: Project) -> None:
    a, b = ids(project)[:2]
    for pid in (a, b):
        project.decide(pid, "maya", "match")
        project.decide(pid, "otto", "non-match")
    assert adj.undo(project, "ines") is None  # nothing to undo yet
    adj.adjudicate(project, a, "ines", "match", "same phone")
    second = adj.adjudicate(project, b, "ines", "non-match", "born 1968, not 1966")
    taken = adj.undo(project, "ines")
    assert taken is not None and taken.decision_id == second.decision_id
    assert adj.queue(project) == [(b, "disagreement")]
    assert gold(project) == {a: ("match", "adjudicated")}
    with sqlite3.connect(project.path) as conn:  # the log keeps both, plus the retraction
        rows = conn.execute("SELECT label, supersedes FROM decisions WHERE role = 'adjudicator' "
                            "ORDER BY decided_at").fetchall()
    assert [r[0] for r in rows] == ["match", "non-match", None]
    assert rows[2][1] == second.decision_id


def test_independent_adjudication_leaves_own_pairs_to_another(project: Project) -> None:
    a, b, c = ids(project)[:3]
    for pid in (a, b, c):
        project.decide(pid, "maya", "match")
        project.decide(pid, "otto", "non-match")
    project.decide(c, "ines", "match")
    project.undo("ines")  # a label taken back still means ines saw c as a reviewer
    adj.adjudicate(project, a, "ines", "match", "flagged, but allowed by default")
    assert gold(project)[a] == ("match", "adjudicated")
    assert project.gold_policy()["independent_adjudication"] is False
    project.decide(b, "ines", "non-match")  # ines reviews b too, now as a reviewer
    project.set_gold_policy(independent_adjudication=True)
    assert adj.set_aside_for(project, "ines") == {b, c}
    before = project.connection.execute("SELECT count(*) FROM decisions").fetchone()[0]
    for pid in (b, c):
        with pytest.raises(DocketError, match="independent adjudicator") as err:
            adj.adjudicate(project, pid, "ines", "match", "mine")
        assert "\n" not in str(err.value)
    assert project.connection.execute("SELECT count(*) FROM decisions").fetchone()[0] == before
    assert gold(project)[a] == ("match", "adjudicated")  # ines never reviewed a
    add_reviewer(project, "lee", "adjudicator")
    adj.adjudicate(project, b, "lee", "non-match", "different birth years")
    assert gold(project)[b] == ("non-match", "adjudicated")
    # an own adjudication made under the old policy (or merged in) stops counting
    project.set_gold_policy(independent_adjudication=False)
    adj.adjudicate(project, c, "ines", "match", "allowed again")
    assert gold(project)[c] == ("match", "adjudicated")
    project.set_gold_policy(independent_adjudication=True)
    assert c not in gold(project) and (c, "disagreement") in adj.queue(project)
    with pytest.raises(ValueError):
        project.set_gold_policy(no_such_rule=1)
    with pytest.raises(DocketError):
        project.set_gold_policy(min_reviews=0)


def test_policy_command_shows_and_sets_the_rules(project: Project, capsys) -> None:
    from docket.tui.cli import main
    path = str(project.path)
    assert main(["policy", path]) == 0
    assert "may settle a pair they reviewed" in capsys.readouterr().out
    assert main(["policy", path, "--independent-adjudication", "--min-reviews", "2"]) == 0
    out = capsys.readouterr().out
    assert "may not settle a pair they decided as a reviewer" in out and "note:" not in out
    # more reviewers than the queue plans for any pair: said, since then nothing becomes gold
    assert main(["policy", path, "--min-reviews", "3"]) == 0
    assert ("note: the queue plans at most 2 reviewers for a pair"
            in capsys.readouterr().out)
    assert main(["policy", path, "--min-reviews", "2"]) == 0
    capsys.readouterr()
    assert main(["policy", path, "--json"]) == 0
    assert '"independent_adjudication": true' in capsys.readouterr().out
    assert main(["status", path]) == 0
    assert "by an adjudicator who did not review the pair" in capsys.readouterr().out
    with pytest.raises(SystemExit) as done:
        main(["policy", path, "--independent-adjudication", "--adjudicator-may-settle-own"])
    assert done.value.code == 2

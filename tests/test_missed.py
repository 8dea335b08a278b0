"""Missed matches: true matches that no candidate pair holds, recorded by id and counted apart."""

from __future__ import annotations

import json
from pathlib import Path

import pandas as pd
import pytest

from docket.core import DocketError, Project
from docket.core.reviewing.missed import reach
from docket.tui.cli import main


def not_a_candidate(project: Project) -> tuple[str, str]:
    """A left and a right id that blocking did not pair (the sample has plenty)."""
    lefts = [r for (r,) in project.connection.execute(
        "SELECT client_id FROM left_records ORDER BY client_id LIMIT 50")]
    rights = [r for (r,) in project.connection.execute(
        "SELECT ref FROM right_records ORDER BY ref LIMIT 50")]
    pairs = set(project.connection.execute("SELECT left_id, right_id FROM pairs"))
    return next((a, b) for a in lefts for b in rights if (a, b) not in pairs)


def test_recorded_once_refused_for_candidates_and_unknown_ids(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        a, b = not_a_candidate(p)
        first = p.record_missed(a, b, "maya", "same owner, moved house")
        again = p.record_missed(a, b, "ines")  # once is enough: the first stays
        assert again == first and len(p.missed_matches()) == 1
        pid, ca, cb = p.connection.execute("SELECT pair_id, left_id, right_id FROM pairs "
                                           "LIMIT 1").fetchone()
        with pytest.raises(DocketError, match=f"candidate pair {pid}"):
            p.record_missed(ca, cb, "maya")
        with pytest.raises(DocketError, match="no record 'NOPE'"):
            p.record_missed("NOPE", b, "maya")
        # given the other way round, it was 'check the id (ids are matched exactly)'
        with pytest.raises(DocketError, match=f"no record '{b}' in the left table of .*; it is "
                           "a record of the right table: give a left id, then a right id"):
            p.record_missed(b, a, "maya")
        # A missed match is no candidate and no gold label: the queue never sees it.
        assert p.connection.execute("SELECT count(*) FROM pairs WHERE left_id = ? AND "
                                    "right_id = ?", (a, b)).fetchone()[0] == 0
        assert p.remove_missed(a, b) and not p.remove_missed(a, b)
        assert p.missed_matches() == []


def test_status_and_export_count_them_apart(sample_project: Path, tmp_path: Path,
                                            capsys) -> None:
    with Project.open(sample_project) as p:
        a, b = not_a_candidate(p)
        pid = p.next_pairs("maya", 1)[0].pair_id
        p.decide(pid, "maya", "match")
        audit = next(i for i in p.next_pairs("maya", 10) if i.reason == "audit")
        p.decide(audit.pair_id, "maya", "non-match")  # so that evaluate has a labelled slice
    path = str(sample_project)
    out = tmp_path / "missed.csv"
    assert main(["evaluate", path]) == 0
    assert (f"blocking reach (the share of true matches that are candidates) is not measured: "
            f"record matches blocking left out with docket missed {path} add") in \
        capsys.readouterr().out
    assert main(["export", path, "--what", "missed", "-o", str(out)]) == 0
    assert capsys.readouterr().err.strip() == (  # none yet: how to record one
        f"wrote 0 rows to {out}: no missed match recorded (docket missed {path} add LEFT RIGHT "
        "records a true match that no candidate pair holds)")
    assert main(["missed", path, "add", a, b, "--reviewer", "maya", "--note", "twins"]) == 0
    assert "1 in all" in capsys.readouterr().out
    assert main(["status", path, "--json"]) == 0
    info = json.loads(capsys.readouterr().out)
    assert info["missed_matches"]["count"] == 1 and info["gold_labels"] == 2
    assert info["missed_matches"]["reach"] == pytest.approx(0.5)  # 1 gold match, 1 missed
    assert main(["status", path]) == 0
    assert "the candidates hold 50.0% of the 2 matches known" in capsys.readouterr().out
    # evaluate gave 'blocking reach:' and the reduction ratio only, which is no reach
    assert main(["evaluate", path]) == 0
    assert ("blocking reach: the candidates hold 50.0% of the 2 matches known (1 recorded with "
            "docket missed") in capsys.readouterr().out
    assert main(["evaluate", path, "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["scope"]["blocking"]["missed"]["count"] == 1
    assert main(["export", path, "--what", "missed", "-o", str(out)]) == 0
    back = pd.read_csv(out, dtype=str, keep_default_na=False)
    assert back[["left_id", "right_id", "reviewer", "note"]].values.tolist() == [
        [a, b, "maya", "twins"]]
    assert main(["missed", path, "add", a, "NOPE", "--reviewer", "maya"]) == 2


def test_reach_is_the_share_of_known_matches_that_are_candidates() -> None:
    # common practice: reach (pair completeness) = true matches among candidates / all known
    assert reach(0, 0) is None
    assert reach(9, 1) == pytest.approx(0.9)


def test_an_id_with_a_space_at_its_start_is_taken_as_written(tmp_path: Path) -> None:
    # ' =r5' is a record of its own (a table refuses ' 7' only beside '7'); the command
    # trimmed every id it was given, so ' =r5' read '=r5' and was 'no record', and an id
    # with a stray space of its own ('r1 ') still names 'r1'
    from docket.core import NewProject
    table = tmp_path / "people.csv"
    table.write_text("id,name,town\n =r5,ann vale,esk\nr1,bo marsh,bly\nr2,cy moor,esk\n"
                     "r3,di ford,bly\n", encoding="utf-8")
    path = tmp_path / "p.docket"
    Project.create(NewProject(path=path, left=table, id_column="id", rules=["town"]))
    with Project.open(path) as p:
        pairs = set(p.connection.execute("SELECT left_id, right_id FROM pairs"))
        assert (" =r5", "r1") not in pairs and ("r1", " =r5") not in pairs
        found = p.record_missed(" =r5", "r1 ", "maya")
        assert (found.left_id, found.right_id) == (" =r5", "r1")
        assert p.remove_missed("r1", " =r5") and p.missed_matches() == []

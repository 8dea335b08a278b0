"""docket demo: built without opening, reused, refused into a file or over decisions."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main


def test_demo_builds_without_opening(tmp_path: Path, capsys, monkeypatch) -> None:
    assert main(["demo", "--dir", str(tmp_path), "--no-open"]) == 0
    out = capsys.readouterr().out
    assert "vet-clients" in out and "Records may be personal data" in out
    assert main(["demo", "--dir", str(tmp_path), "--no-open"]) == 0  # reuses it
    out = capsys.readouterr().out
    assert "using the existing demo project" in out
    assert "personal data" not in out  # the caution is said at creation, not on every status

    # after the screen, the commands to try next: the screens of agreement and evaluate were
    # named nowhere, and a newcomer met their text alone
    monkeypatch.setattr("docket.tui.cli_screens._run_review", lambda *a: None)
    monkeypatch.setattr("docket.tui.cli_screens.need_terminal", lambda command: None)
    assert main(["demo", "--dir", str(tmp_path)]) == 0
    out = capsys.readouterr().out
    assert "next, try:" in out and "add --screen to agreement and evaluate" in out


def test_demo_refuses_the_invented_second_reviewer_s_name(tmp_path: Path, capsys) -> None:
    assert main(["demo", "--dir", str(tmp_path / "d"), "--no-open", "--reviewer", "Ines"]) == 2
    assert "second reviewer" in capsys.readouterr().err
    assert not (tmp_path / "d").exists()


def test_demo_for_a_user_named_near_its_second_reviewer(tmp_path: Path, capsys) -> None:
    # ines and the user inez are two people, added on purpose: a slip's refusal is not for them
    assert main(["demo", "--dir", str(tmp_path), "--no-open", "--reviewer", "inez"]) == 0
    assert "second reviewer ines: 350 labels" in capsys.readouterr().out
    with Project.open(tmp_path / "vet-clients.docket", readonly=True) as p:
        assert sorted(p.connection.execute("SELECT name, role FROM reviewers")) == [
            ("ines", "reviewer"), ("inez", "adjudicator")]


def test_demo_into_no_folder_name_is_one_line(tmp_path: Path, capsys,
                                             monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)  # --dir '' built the demo in the current folder
    assert main(["demo", "--dir", "", "--no-open"]) == 2
    err = capsys.readouterr().err.strip()
    assert "--dir '': give the demo a folder" in err and "\n" not in err, err
    assert not list(tmp_path.iterdir())


def test_demo_into_a_file_is_one_line(tmp_path: Path, capsys) -> None:
    (tmp_path / "taken").write_text("notes")
    assert main(["demo", "--dir", str(tmp_path / "taken"), "--no-open"]) == 2
    err = capsys.readouterr().err.strip()
    assert "taken: a file, not a folder" in err and "\n" not in err, err
    assert main(["demo", "--dir", str(tmp_path / "taken" / "sub"), "--no-open"]) == 2
    err = capsys.readouterr().err.strip()
    assert "cannot make the folder" in err and "\n" not in err, err
    assert (tmp_path / "taken").read_text() == "notes"


def test_demo_fresh_refuses_to_discard_decisions_unless_told(tmp_path: Path, capsys) -> None:
    assert main(["demo", "--dir", str(tmp_path), "--no-open", "--reviewer", "kim"]) == 0
    path = tmp_path / "vet-clients.docket"
    with Project.open(path) as p:
        p.decide(p.next_pairs("kim", 1)[0].pair_id, "kim", "match")
    capsys.readouterr()
    assert main(["demo", "--dir", str(tmp_path), "--no-open", "--fresh"]) == 2
    err = capsys.readouterr().err
    assert "1 decision by 1 reviewer that" in err and "--discard-decisions" in err
    with Project.open(path, readonly=True) as p:
        assert len(p.history("kim")) == 1  # nothing was touched
    assert main(["demo", "--dir", str(tmp_path), "--no-open", "--fresh",
                 "--discard-decisions"]) == 0
    with Project.open(path, readonly=True) as p:
        assert p.history("kim") == []

"""One name per person: a name with control characters refused by every command that
registers one, either Unicode form (NFC, NFD) one reviewer, a known name in another letter
case refused naming the known one, and an older file's names kept as they were stored."""

from __future__ import annotations

import shlex
import sqlite3
import unicodedata
from pathlib import Path

import pytest

from docket.core import DocketError, Project
from docket.core.reviewing.team import add_reviewer, list_reviewers
from docket.tui.review_app import make_app

from . import team_support
from .team_support import pair_ids, run

# the tiny project's fixtures (team_support.py), under the names the tests ask for
tiny_file, tiny = team_support.tiny_file, team_support.tiny

NFC = unicodedata.normalize("NFC", "José")
NFD = unicodedata.normalize("NFD", "José")


@pytest.mark.parametrize("name, said", [
    ("ines\x1b[31m", "holds control characters"), ("a\nb", "holds control characters"),
    ("rtl\u202e", "holds control characters"),
    # a file's text given as the name was accepted, and widened every list of reviewers
    ("x" * 5000, "reviewer name 'xxxxxxxxxxxxxxxxxxxx…' is 5,000 characters long")])
def test_every_command_that_registers_a_name_refuses_control_characters_or_a_text(
        name: str, said: str, tiny: Path, tmp_path: Path, capsys) -> None:
    labels = tmp_path / "labels.csv"
    labels.write_text(f"pair_id,label\n{pair_ids(tiny)[0]},match\n", encoding="utf-8")
    before = tiny.read_bytes()
    for argv in (["next", str(tiny), "--reviewer", name, "--claim"],
                 ["label", str(tiny), "--reviewer", name, "--from", str(labels)],
                 ["reviewers", str(tiny), "add", name],
                 # names recorded beside a fact were not checked: an escape was kept
                 ["reviewers", str(tiny), "add", "lee", "--by", name],
                 ["missed", str(tiny), "add", "x", "y", "--reviewer", name]):
        assert run(argv) == 2
        err = capsys.readouterr().err.strip()
        assert said in err and "\n" not in err, err
    assert tiny.read_bytes() == before


def _names(path: Path) -> list[str]:
    with Project.open(path) as p:
        return [r["name"] for r in list_reviewers(p)]


def test_a_name_in_another_case_is_refused_by_every_command_naming_the_known_one(
        tiny: Path, tmp_path: Path, capsys) -> None:
    assert run(["reviewers", str(tiny), "add", "Ana"]) == 0
    capsys.readouterr()
    labels = tmp_path / "labels.csv"
    labels.write_text(f"pair_id,label\n{pair_ids(tiny)[0]},match\n", encoding="utf-8")
    before = tiny.read_bytes()
    for argv in (["next", str(tiny), "--reviewer", "ana", "--claim"],
                 ["label", str(tiny), "--reviewer", "ANA", "--from", str(labels)],
                 ["reviewers", str(tiny), "add", "ana", "--role", "adjudicator"]):
        assert run(argv) == 2, argv
        err = capsys.readouterr().err.strip()
        assert "differs only in letter case or accents from 'Ana'" in err, err
        assert "use 'Ana'" in err, err
        assert "\n" not in err and "Traceback" not in err
    assert tiny.read_bytes() == before
    with Project.open(tiny) as p:
        with pytest.raises(DocketError, match="'Ana'"):
            p.decide(pair_ids(tiny)[0], "aNa", "match")
        with pytest.raises(DocketError, match="'Ana'"):
            make_app(tiny, "ana")
    assert _names(tiny) == ["Ana"]


def test_a_name_with_other_accents_is_refused_as_the_known_one(tiny: Path, tmp_path: Path,
                                                              capsys) -> None:
    # 'inés' beside 'ines' became a second reviewer: one person's labels on an overlap pair
    # then counted as two reviewers agreeing
    labels = tmp_path / "labels.csv"
    labels.write_text(f"pair_id,label\n{pair_ids(tiny)[0]},match\n", encoding="utf-8")
    assert run(["label", str(tiny), "--reviewer", "ines", "--from", str(labels)]) == 0
    capsys.readouterr()
    before = tiny.read_bytes()
    for name in ("inés", "Inès", "INES"):
        assert run(["label", str(tiny), "--reviewer", name, "--from", str(labels)]) == 2
        err = capsys.readouterr().err.strip()
        assert f"reviewer '{name}' differs only in letter case or accents from 'ines'" in err
    assert tiny.read_bytes() == before
    assert run(["reviewers", str(tiny), "add", "inez"]) == 0  # another letter: another name
    assert _names(tiny) == ["ines", "inez"]


def test_names_in_either_unicode_form_are_one_reviewer(tiny: Path) -> None:
    assert NFC != NFD
    with Project.open(tiny) as p:
        assert add_reviewer(p, NFD).name == NFC
        assert p.ensure_reviewer(NFC) == NFC
        assert p.decide(pair_ids(tiny)[0], NFD, "match").reviewer == NFC
        assert p.current_label(pair_ids(tiny)[0], NFC) is not None
    assert _names(tiny) == [NFC]


def test_a_file_written_before_names_were_normalised_keeps_its_names(tiny: Path) -> None:
    # an older file holds a name as it was typed (here NFD) and both "Ana" and "ana"
    with sqlite3.connect(tiny) as conn:
        conn.executemany("INSERT INTO reviewers (name, role, added_at) VALUES (?, ?, ?)",
                         [(NFD, "adjudicator", "2026-01-01T00:00:00"),
                          ("Ana", "reviewer", "2026-01-01T00:00:00"),
                          ("ana", "reviewer", "2026-01-01T00:00:00")])
    first, second = pair_ids(tiny)[:2]
    with Project.open(tiny) as p:
        assert p.ensure_reviewer(NFC) == NFD  # typed either way, it is the stored name
        assert p.decide(first, NFC, "match").reviewer == NFD
        assert p.require_adjudicator(NFC) == NFD
        assert p.decide(second, "Ana", "match").reviewer == "Ana"  # an exact name is taken
        assert p.decide(second, "ana", "non-match").reviewer == "ana"
        with pytest.raises(DocketError, match="letter case"):
            p.ensure_reviewer("ANA")
    assert sorted(_names(tiny)) == sorted([NFD, "Ana", "ana"])


def test_adjudicate_under_another_case_names_the_adjudicator(tiny: Path, capsys) -> None:
    assert run(["reviewers", str(tiny), "add", "Ines", "--role", "adjudicator"]) == 0
    capsys.readouterr()
    with Project.open(tiny) as p:
        assert p.require_adjudicator(" Ines ") == "Ines"
        with pytest.raises(DocketError, match="use 'Ines'"):
            p.require_adjudicator("ines")


def test_next_without_claim_reads_the_name_as_the_project_keeps_it(tiny: Path, capsys) -> None:
    with sqlite3.connect(tiny) as conn:  # an older file's name, as it was typed there
        conn.execute("INSERT INTO reviewers (name, role, added_at) VALUES (?, 'reviewer', ?)",
                     (NFD, "2026-01-01T00:00:00"))
    first = pair_ids(tiny)[0]
    with Project.open(tiny) as p:
        p.decide(first, NFD, "match")
        assert first not in [i.pair_id for i in p.next_pairs(NFC, 50)]  # their own work known
        with pytest.raises(DocketError, match="letter case"):
            p.next_pairs(NFC.upper(), 1)
    assert run(["next", str(tiny), "--reviewer", "JOSÉ"]) == 2
    assert "letter case" in capsys.readouterr().err


def test_a_new_name_one_slip_from_a_known_one_is_added_on_purpose_first(
        tiny: Path, tmp_path: Path, capsys) -> None:
    # 'ins' for 'ines' became a reviewer of its own: the same person's labels on an overlap
    # pair counted as two reviewers agreeing
    labels = tmp_path / "labels.csv"
    labels.write_text(f"pair_id,label\n{pair_ids(tiny)[0]},match\n", encoding="utf-8")
    assert run(["label", str(tiny), "--reviewer", "ines", "--from", str(labels)]) == 0
    capsys.readouterr()
    before = tiny.read_bytes()
    for name, argv in (("ins", ["label", str(tiny), "--reviewer", "ins", "--from", str(labels)]),
                       ("inse", ["next", str(tiny), "--reviewer", "inse"]),
                       ("in es", ["next", str(tiny), "--reviewer", "in es", "--claim"])):
        assert run(argv) == 2, argv
        err = capsys.readouterr().err.strip()
        assert (f"reviewer '{name}' is new to this project, and one character from 'ines', "
                "who is in it already: if that is you, use 'ines'; if another person, add "
                f"them first with 'docket reviewers {tiny} add {shlex.quote(name)}'") in err, err
    assert tiny.read_bytes() == before
    # from the project's own folder the file is named as typed, not by its whole path
    with pytest.MonkeyPatch.context() as patch:
        patch.chdir(tiny.parent)
        assert run(["next", tiny.name, "--reviewer", "ins"]) == 2
        assert f"'docket reviewers {tiny.name} add ins'" in capsys.readouterr().err
    # named on purpose, the person works under that name; short names are often two people
    assert run(["reviewers", str(tiny), "add", "ins"]) == 0
    assert run(["label", str(tiny), "--reviewer", "ins", "--from", str(labels)]) == 0
    assert run(["label", str(tiny), "--reviewer", "lee", "--from", str(labels)]) == 0
    assert run(["label", str(tiny), "--reviewer", "leo", "--from", str(labels)]) == 0
    # numbered on purpose: a team's raters, a second account
    for name in ("rater1", "rater2", "rater12", "ines2"):
        assert run(["label", str(tiny), "--reviewer", name, "--from", str(labels)]) == 0, name
    assert _names(tiny) == ["ines", "ines2", "ins", "lee", "leo", "rater1", "rater12", "rater2"]

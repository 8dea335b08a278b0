"""``--mask``: either side's column names, unknown names refused, masked columns never searched,
names with a comma given whole."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import build_parser, main
from docket.tui.masking import Mask, expand_mask, parse_mask


def test_find_does_not_search_masked_columns(sample_project: Path) -> None:
    with Project.open(sample_project) as project:
        email = project.record("left", "N-00001")["email"]
        owner = project.record("left", "N-00001")["owner"]
        assert email and owner
        assert project.find(email)  # unmasked, the guess is confirmed...
        assert project.find(email, skip={"EMAIL"}) == []  # ...masked, it is not
        # Masking the right-hand name of the owner field hides the left-hand column too.
        # (The email, heloran_lemelle@..., holds the owner's words too, and find matches words:
        # masked with it, nothing confirms the guess; left shown, the email itself tells.)
        mask = Mask.of(expand_mask(project, ["owner_name", "email"]))
        assert project.find(owner)
        assert project.find(owner, skip=mask.columns) == []
        # Ids are not masked values: a pair is still found by its record id.
        assert project.find("N-00001", skip=mask.columns)


def test_mask_accepts_either_sides_names(sample_project: Path) -> None:
    with Project.open(sample_project) as project:
        for given in (["owner_name"], ["owner"], ["OWNER"]):
            mask = Mask.of(expand_mask(project, given))
            assert mask.applies("owner") and mask.applies("owner_name"), given
        mask = Mask.of(expand_mask(project, ["date_of_birth", "phone"]))
        assert mask.applies("born") and mask.applies("phone") and not mask.applies("email")


@pytest.mark.parametrize("command", ["review", "adjudicate"])
def test_unknown_mask_column_is_an_error_with_a_suggestion(
        command: str, sample_project: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["reviewers", str(sample_project), "add", "ines", "--role", "adjudicator"]) == 0
    capsys.readouterr()
    before = sample_project.read_bytes()
    code = main([command, str(sample_project), "--reviewer", "ines", "--mask", "phone,emial"])
    err = [x for x in capsys.readouterr().err.splitlines() if x.strip()]
    assert code == 2 and len(err) == 1, err
    assert "--mask emial" in err[0] and "did you mean 'email'" in err[0]
    assert sample_project.read_bytes() == before
    with sqlite3.connect(sample_project) as conn:
        assert [r[0] for r in conn.execute("SELECT name FROM reviewers")] == ["ines"]


def test_a_column_whose_name_holds_a_comma_can_be_masked(tmp_path: Path, capsys) -> None:
    # '--mask "last, first"' was split into 'last' and 'first', and refused: no way to mask it
    table = ('id,"last, first",email\n1,"Berg, Anna",anna@example.org\n'
             '2,"Dahl, Jon",jon@example.org\n3,"Lund, Kari",kari@example.org\n')
    for side in ("left", "right"):
        (tmp_path / f"{side}.csv").write_text(table, encoding="utf-8")
    project = tmp_path / "comma.docket"
    assert main(["new", str(project), "--left", str(tmp_path / "left.csv"), "--right",
                 str(tmp_path / "right.csv"), "--id", "id", "--block", "*"]) == 0
    args = build_parser().parse_args(["review", str(project), "--mask", "Last, First ",
                                      "--mask", "email,id"])
    with Project.open(project) as p:
        mask = Mask.of(expand_mask(p, parse_mask(args.mask)))
    assert mask.applies("last, first") and mask.applies("email") and mask.applies("id")
    assert not mask.applies("last")
    capsys.readouterr()
    before = project.read_bytes()
    assert main(["review", str(project), "--reviewer", "ines", "--mask", "last,first"]) == 2
    err = capsys.readouterr().err.strip()
    assert err == ("docket: --mask last (in 'last,first'): no such column; a name that holds a "
                   "comma goes whole in a --mask of its own; columns are 'id', 'last, first', "
                   "'email'"), err
    assert project.read_bytes() == before


@pytest.mark.parametrize("command", ["review", "adjudicate"])
@pytest.mark.parametrize("value", ["", " ", ","])
def test_a_mask_that_names_no_column_is_an_error(command: str, value: str, sample_project: Path,
                                                 capsys) -> None:
    # '--mask "$COLS"' with COLS unset opened the screen with nothing masked
    assert main(["reviewers", str(sample_project), "add", "ines", "--role", "adjudicator"]) == 0
    capsys.readouterr()
    code = main([command, str(sample_project), "--reviewer", "ines", "--mask", value])
    err = capsys.readouterr().err.strip()
    assert code == 2 and err == (f"docket: --mask {value!r} names no column; give the columns "
                                 "to mask, for example --mask email,phone"), err

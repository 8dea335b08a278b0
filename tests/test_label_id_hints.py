"""Label files whose ids nearly name a candidate pair: the hint says how (another Unicode
form, leading zeros dropped, a link's two ids swapped)."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main


def _every_pair_of(tmp_path: Path, rows: str) -> Path:
    """A project of the records ``rows`` (id,name lines), every pair a candidate."""
    from docket.core import NewProject
    table = tmp_path / "r.csv"
    table.write_text("id,name\n" + rows, encoding="utf-8")
    project = tmp_path / "r.docket"
    Project.create(NewProject(path=project, left=table, id_column="id", rules=["*"]))
    return project


def test_ids_in_another_unicode_form_are_named_so(tmp_path: Path, capsys) -> None:
    # a file saved with decomposed accents ('e' + U+0308) named no record, and the message
    # showed ids that look like the records' own: "row 2 (Zoë-1, Zoë-2) is not a candidate"
    import unicodedata

    project = _every_pair_of(tmp_path, "Zoë-1,Arlo Vesk\nZoë-2,Arlo Vesk\nBo-3,Cai Sint\n")
    nfd = [unicodedata.normalize("NFD", i) for i in ("Zoë-1", "Zoë-2")]
    labels = tmp_path / "l.csv"
    labels.write_text(f"left_id,right_id,label\n{nfd[0]},{nfd[1]},match\n", encoding="utf-8")
    scores = tmp_path / "s.csv"
    scores.write_text(f"left_id,right_id,score\n{nfd[0]},Bo-3,0.5\n", encoding="utf-8")
    for argv in (["label", str(project), "--reviewer", "ana", "--from", str(labels)],
                 ["evaluate", str(project), "--predictions", str(scores)],
                 ["matchers", str(project), "import", str(scores)],
                 ["missed", str(project), "add", nfd[0], "Bo-3", "--reviewer", "ana"]):
        assert main(argv) == 2
        err = capsys.readouterr().err
        assert "'Zoe\\u0308-1' is the record id 'Zo\\xeb-1' in another Unicode form" in err, err
    labels.write_text("left_id,right_id,label\nZoë-1,Bo-9,match\n", encoding="utf-8")
    assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
    assert "Unicode" not in capsys.readouterr().err


def test_ids_that_lost_their_leading_zeros_are_named_so(tmp_path: Path, capsys) -> None:
    # a label file saved from a spreadsheet holds '7' for the record '000007'
    project = _every_pair_of(tmp_path, "000007,Arlo Vesk\n000008,Arlo Vesk\n09,Bo Rask\n"
                                       "9,Bo Rask\n")
    labels = tmp_path / "l.csv"
    for row, hint in (("7,000008", "'7' looks like the record id '000007' with its leading "
                       "zeros dropped"), ("8,9", "'8' looks like the record id '000008'"),
                      ("000007,10", "")):
        labels.write_text(f"left_id,right_id,label\n{row},match\n", encoding="utf-8")
        assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
        err = capsys.readouterr().err
        assert (hint in err) if hint else "leading zeros" not in err, err


def test_a_link_row_with_its_ids_swapped_is_named_so(tiny_tables, tmp_path: Path,
                                                      capsys) -> None:
    # "(a, 1) is not a candidate pair", where (1, a) is one: the sides were swapped
    left, right = tiny_tables
    project = tmp_path / "t.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "*"]) == 0
    labels = tmp_path / "l.csv"
    labels.write_text("left_id,right_id,label\na,1,match\n", encoding="utf-8")
    capsys.readouterr()
    assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
    assert "1 of them is a pair with its ids the other way round" in capsys.readouterr().err
    labels.write_text("left_id,right_id,label\n1,zz,match\n", encoding="utf-8")
    assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
    assert "other way round" not in capsys.readouterr().err
    scores = tmp_path / "s.csv"
    scores.write_text("left_id,right_id,score\na,1,0.5\n", encoding="utf-8")
    assert main(["evaluate", str(project), "--predictions", str(scores)]) == 2
    assert "it is the right table's: left_id takes the left table's ids" in \
        capsys.readouterr().err


def test_ids_with_spaces_at_their_ends_or_in_other_case_are_named_so(tmp_path: Path,
                                                                     capsys) -> None:
    # the message quoted 'Bo-3 ' beside the pair and left the user to spot the space
    with pytest.warns(UserWarning, match="differ only in letter case"):  # said at the build
        project = _every_pair_of(tmp_path, "Ay-1,Arlo Vesk\nAy-2,Arlo Vesk\nBo-3,Cai Sint\n"
                                           "Kit-4,Dag Lunn\nKIT-4,Dag Lunn\n")
    cases = [("Bo-3 ", "'Bo-3 ' has spaces at its ends, and the record id is 'Bo-3'"),
             ("bo-3", "'bo-3' is the record id 'Bo-3' in other letter case")]
    for given, said in cases:
        labels = tmp_path / "l.csv"
        labels.write_text(f"left_id,right_id,label\nAy-1,{given},match\n", encoding="utf-8")
        scores = tmp_path / "s.csv"
        scores.write_text(f"left_id,right_id,score\n{given},Ay-2,0.5\n", encoding="utf-8")
        commands = [["label", str(project), "--reviewer", "ana", "--from", str(labels)],
                    ["evaluate", str(project), "--predictions", str(scores)],
                    ["matchers", str(project), "import", str(scores)]]
        if given == given.strip():  # missed trims the ids it is given
            commands.append(["missed", str(project), "add", given, "Ay-2", "--reviewer", "ana"])
        for argv in commands:
            assert main(argv) == 2
            err = capsys.readouterr().err
            assert said in err and len(err.splitlines()) == 1, err
    # two records one but for letter case (Kit-4, KIT-4): no guess between them
    labels.write_text("left_id,right_id,label\nAy-1,kit-4,match\n", encoding="utf-8")
    assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
    assert "letter case" not in capsys.readouterr().err


def test_ids_with_invisible_characters_are_named_so(tmp_path: Path, capsys) -> None:
    # an id copied from a web page kept a zero-width space: 'N-7' and 'N-7\u200b' look alike
    project = _every_pair_of(tmp_path, "N-7,Arlo Vesk\nN-8,Arlo Vesk\n")
    labels = tmp_path / "l.csv"
    labels.write_text("left_id,right_id,label\nN-7\u200b,N-8,match\n", encoding="utf-8")
    assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
    err = capsys.readouterr().err
    assert "'N-7\\u200b' is the record id 'N-7' with invisible characters in it" in err, err


def test_ids_written_as_decimal_numbers_are_named_so(tmp_path: Path, capsys) -> None:
    # a score file written from a column of floats holds '17.0' for the record '17'
    project = _every_pair_of(tmp_path, "17,Arlo Vesk\n18,Arlo Vesk\n")
    labels = tmp_path / "l.csv"
    for row, hint in (("17.0,18", "'17.0' looks like the record id '17' written as a decimal "
                       "number"), ("17.5,18", "")):
        labels.write_text(f"left_id,right_id,label\n{row},match\n", encoding="utf-8")
        assert main(["label", str(project), "--reviewer", "ana", "--from", str(labels)]) == 2
        err = capsys.readouterr().err
        assert (hint in err) if hint else "written as a decimal" not in err, err


def test_ids_that_the_table_wrote_as_decimal_numbers_are_named_so(tmp_path: Path,
                                                                  capsys) -> None:
    # a CSV saved from a column of floats writes its ids '0.0', '1.0'; the other table of the
    # link writes '0', '1', so a label file's left_id '0' was among the known ids and the
    # refusal gave no hint at all
    left, right = tmp_path / "l.csv", tmp_path / "r.csv"
    left.write_text("id,name\n0.0,Arlo Vesk\n1.0,Cai Sint\n", encoding="utf-8")
    right.write_text("id,name\n0,Arlo Vesk\n1,Cai Sint\n", encoding="utf-8")
    project = tmp_path / "f.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "*"]) == 0
    capsys.readouterr()
    labels = tmp_path / "labels.csv"
    for row, hint in (("0,0", "'0' looks like the record id '0.0', which the table writes as "
                       "a decimal number"), ("0.0,0", None), ("7,0", "")):
        labels.write_text(f"left_id,right_id,label\n{row},match\n", encoding="utf-8")
        code = main(["label", str(project), "--reviewer", "ana", "--from", str(labels)])
        err = capsys.readouterr().err
        assert code == (0 if hint is None else 2), err
        assert (hint in err) if hint else "decimal number" not in err, err

"""Text tables as spreadsheets save them: a .txt file ("Text (Tab delimited)", or "Unicode
Text", UTF-16 with a byte-order mark and tabs), read with the separator its header uses (it
was refused as "unknown file type '.txt'"), and a first line 'sep=;' naming the separator."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main

from .test_bad_input import assert_one_line_error, run

ROWS = [("id", "name", "town"), ("1", "Zoë Ærø", "Malmö"), ("2", "Zoe Aero", "Malmo"),
        ("3", "Jürgen Roß", "Köln"), ("4", "Jurgen Ross", "Koln")]


@pytest.mark.parametrize("sep, encoding", [("\t", "utf-16"), ("\t", "utf-8"), (",", "utf-8"),
                                           (";", "cp1252")],
                         ids=["unicode-text", "tab", "comma", "semicolon-cp1252"])
def test_a_txt_table_is_read_with_its_own_separator(
        sep: str, encoding: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    left = tmp_path / "clients.txt"
    left.write_bytes("".join(sep.join(r) + "\r\n" for r in ROWS).encode(encoding))
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--id", "id", "--block", "*"]) == 0
    err = capsys.readouterr().err
    assert "separated by" not in err  # a .txt promises no separator, so none is warned of
    with Project.open(path, readonly=True) as p:
        names = {r: n for r, n in p.connection.execute("SELECT id, name FROM left_records")}
    assert names == {r[0]: r[1] for r in ROWS[1:]}


def test_a_txt_label_file_and_a_ragged_txt_table(sample_project: Path, tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str]) -> None:
    labels = tmp_path / "labels.txt"
    labels.write_text("pair_id\tlabel\n1\tmatch\n2\tnon-match\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "ana", "--from", str(labels)]) == 0
    capsys.readouterr()
    ragged = tmp_path / "ragged.txt"
    ragged.write_text("id\tname\n1\tAnna\n2\tBo\tBergen\n", encoding="utf-8")
    code, err = run(capsys, "new", str(tmp_path / "r.docket"), "--left", str(ragged),
                    "--id", "id")
    assert_one_line_error(code, err, "ragged.txt: line 3 has 3 of the header's 2 fields")
    assert not (tmp_path / "r.docket").exists()


@pytest.mark.parametrize("mark", ["", "\ufeff"], ids=["plain", "bom"])
def test_a_separator_hint_line_names_the_separator(mark: str, tmp_path: Path,
                                                   capsys: pytest.CaptureFixture[str]) -> None:
    # 'sep=;' before the header, as programs exporting for a spreadsheet write it: it was read
    # as the header, and the file refused as "line 2 has 3 of the header's 2 fields"
    left = tmp_path / "clients.csv"
    left.write_text(mark + "sep=;\r\n" + "".join(";".join(r) + "\r\n" for r in ROWS),
                    encoding="utf-8")
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--id", "id", "--block", "*"]) == 0
    assert "separated by" not in capsys.readouterr().err
    with Project.open(path, readonly=True) as p:
        names = {r: n for r, n in p.connection.execute("SELECT id, name FROM left_records")}
    assert names == {r[0]: r[1] for r in ROWS[1:]}
    # a ragged row is named by its line in the file, the hint counted
    left.write_text("sep=;\nid;name\n1;Anna\n2;Bo;Vik\n", encoding="utf-8")
    code, err = run(capsys, "new", str(tmp_path / "r.docket"), "--left", str(left), "--id",
                    "id")
    assert_one_line_error(code, err, "clients.csv: line 4 has 3 of the header's 2 fields")


def test_a_separator_hint_in_a_matcher_file(sample_project: Path, tmp_path: Path,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    rows = tmp_path / "rater.csv"
    rows.write_text("sep=;\nleft_id;right_id;score\nN-00005;S-10731;0.9\n", encoding="utf-8")
    assert main(["matchers", str(sample_project), "import", str(rows)]) == 0
    assert "stored matcher rater" in capsys.readouterr().out


def test_a_table_without_a_header_row_is_said_to_want_one(tmp_path: Path,
                                                          capsys: pytest.CaptureFixture[str]
                                                          ) -> None:
    # its first record was read as the column names: without --id, 'no id column found
    # (columns: 1, Anna Berg, Oslo)'; with --id, built with that record gone, unsaid
    left = tmp_path / "export.csv"
    left.write_text("N-1,Anna Berg,Oslo\nN-2,Anna Berg,Oslo\nN-3,Bo Lind,Vik\nN-4,Bo Lind,Vik\n",
                    encoding="utf-8")
    said = (f"{left}: its first line reads as a record, not a header: 'Anna Berg' and 'Oslo' "
            "are values of their own columns too; if the file has no header row, add one")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(left))
    assert_one_line_error(code, err, said)
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(left), "--id", "N-1"]) == 0
    assert said in capsys.readouterr().err
    # a header whose names are no values of their own columns says nothing
    left.write_text("id,name,town\nN-1,Anna Berg,Oslo\nN-2,Anna Berg,Oslo\n", encoding="utf-8")
    assert main(["new", str(tmp_path / "r.docket"), "--left", str(left)]) == 0
    assert "reads as a record" not in capsys.readouterr().err


def test_a_matcher_file_split_by_semicolons(sample_project: Path, tmp_path: Path,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    # its fast reader split at commas alone, read one column 'left_id;right_id;score' and
    # refused the file as naming no left_id
    rows = tmp_path / "rater.csv"
    rows.write_text("left_id;right_id;score\nN-00005;S-10731;0.9\n", encoding="utf-8")
    assert main(["matchers", str(sample_project), "import", str(rows)]) == 0
    out, err = capsys.readouterr()
    assert "stored matcher rater" in out and "separated by semicolons" in err

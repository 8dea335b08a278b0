"""CSV files as spreadsheets and other programs write them: any line end, a byte-order mark,
values across lines, names that clash only in letter case, blank header cells, long values,
columns that hold no value.
Each is read as meant or refused in one line naming the file and what to change."""

from __future__ import annotations

import json
from pathlib import Path

import pyarrow as pa
import pyarrow.parquet as pq
import pytest

from docket.core import Project
from docket.tui.cli import main

from .test_bad_input import assert_one_line_error, run

ROWS = [("1", "Tove Marsk", "Oslo"), ("2", "Tove Mask", "Oslo"), ("3", "Ivo Brenn", "Vik"),
        ("4", "Ivo Bren", "Vik")]


def _csv(rows: list[tuple[str, ...]], end: str, header: str = "id,name,town") -> str:
    return end.join([header, *(",".join(r) for r in rows)]) + end


def _build(tmp_path: Path, left: Path, capsys: pytest.CaptureFixture[str]) -> Project:
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--id", "id", "--block", "town"]) == 0, \
        capsys.readouterr().err
    capsys.readouterr()
    return Project.open(path, readonly=True)


@pytest.mark.parametrize("end", ["\n", "\r\n", "\r"], ids=["LF", "CRLF", "CR"])
@pytest.mark.parametrize("bom", [False, True], ids=["plain", "bom"])
def test_every_line_end_with_or_without_a_mark_reads_the_same_records(
        end: str, bom: bool, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # CR alone (old spreadsheets on a Mac) ended in a traceback from the header's reader
    rows = [*ROWS[:3], ("4", '"Ivo' + end + 'Bren"', "Vik")]  # a value across two lines
    left = tmp_path / "t.csv"
    left.write_bytes(("\ufeff" if bom else "").encode() + _csv(rows, end).encode())
    with _build(tmp_path, left, capsys) as project:
        assert project.record("left", "1") == {"name": "Tove Marsk", "town": "Oslo"}
        assert project.record("left", "4")["name"] in {"Ivo\nBren", "Ivo\r\nBren", "Ivo\rBren"}
        assert project.record("left", "4")["town"] == "Vik"
        assert project.record_columns() == ["id", "name", "town"]


@pytest.mark.parametrize("header, said", [
    ("id,Name,name", "columns 2 and 3 are named 'Name' and 'name'"),
    ("ID,name,id", "columns 1 and 3 are named 'ID' and 'id'"),
    ("id,name,NAME ", "columns 2 and 3 are named 'name' and 'NAME'")])
def test_names_that_differ_only_in_letter_case_are_refused_in_one_line(
        header: str, said: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # SQLite keeps the records and ignores ASCII case in column names: the build ended in
    # "duplicate column name: sim_name", naming the project file, not the table
    left = tmp_path / "case.csv"
    left.write_text(_csv([(*r, "x") for r in ROWS], "\n", header), encoding="utf-8")
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: {said}", "letter case", "rename one")
    assert not project.exists()


def test_a_nameless_empty_column_from_a_trailing_separator_is_left_out(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # pandas named it "Unnamed: 3", and it was compared as a text field that is always missing
    left = tmp_path / "t.csv"
    left.write_text(_csv([(*r, "") for r in ROWS], "\r\n", "id,name,town,"), encoding="utf-8")
    with _build(tmp_path, left, capsys) as project:
        assert project.record_columns() == ["id", "name", "town"]
        assert [f.name for f in project.fields] == ["name", "town"]


@pytest.mark.parametrize("name, text, said", [
    ("blank.csv", _csv([(r[0], "x", *r[1:]) for r in ROWS], "\n", "id, ,name,town"),
     "column 2 has no name in the header but holds values; name it"),
    # a JSON file has no header, and was said to ('column 2 has no name in the header')
    ("blank.json", '[{"id": "1", "": "x", "name": "Tove"}, {"id": "2", "": null, "name": "Bo"}]',
     'the key "" (column 2) holds values; give it a name'),
])
def test_a_nameless_column_holding_values_is_refused_by_its_position(
        name: str, text: str, said: str, tmp_path: Path,
        capsys: pytest.CaptureFixture[str]) -> None:
    left = tmp_path / name
    left.write_text(text, encoding="utf-8")
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: {said}")
    assert not project.exists()


def test_a_value_longer_than_the_csv_modules_limit_is_read_whole(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # the row check refused it ("field larger than field limit (131072)"), though pandas reads it
    import csv
    long = "Brenn " * 30_000  # 180,000 characters
    left = tmp_path / "long.csv"
    left.write_text(_csv([*ROWS[:3], ("4", f'"{long}"', "Vik")], "\n"), encoding="utf-8")
    before = csv.field_size_limit()
    with _build(tmp_path, left, capsys) as project:
        assert project.record("left", "4")["name"] == long
    assert csv.field_size_limit() == before  # the module's limit is as it was


def test_two_tables_whose_columns_differ_only_in_case_are_compared_column_by_column(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # 'Name,Town' beside 'name,town' was "no columns in common"; a --map still goes first
    left, right = tmp_path / "l.csv", tmp_path / "r.csv"
    left.write_text(_csv(ROWS, "\n", "id,Name,TOWN"), encoding="utf-8")
    right.write_text(_csv([(f"s{a}", b, c) for a, b, c in ROWS], "\n", "id,name,town"),
                     encoding="utf-8")
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "*"]) == 0, capsys.readouterr().err
    with Project.open(path, readonly=True) as project:
        assert [(f.name, f.left_column, f.right_column) for f in project.fields] == [
            ("Name", "Name", "name"), ("TOWN", "TOWN", "town")]
    assert main(["new", str(path), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "*", "--map", "TOWN=name", "--force"]) == 0
    with Project.open(path, readonly=True) as project:
        assert [(f.left_column, f.right_column) for f in project.fields] == [("TOWN", "name")]
    capsys.readouterr()


def test_a_second_header_from_files_joined_end_to_end_is_refused_by_its_line(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # it was read as a record whose id is "id"
    left = tmp_path / "joined.csv"
    left.write_bytes(b"\xef\xbb\xbf" + (_csv(ROWS[:2], "\r\n") + _csv(ROWS[2:], "\n")).encode())
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: line 4 repeats the header", "remove that line")
    assert not project.exists()


@pytest.mark.parametrize("second", ["\ufeffid,name,town", "ID,Name,Town", " id ,NAME, town"])
def test_a_second_header_with_its_own_mark_or_other_case_is_refused(
        second: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # two exports joined, each with a byte-order mark, gave a record whose id was '\ufeffid'
    left = tmp_path / "joined.csv"
    left.write_text("\ufeff" + _csv(ROWS[:2], "\n") + _csv(ROWS[2:], "\n", second),
                    encoding="utf-8")
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: line 4 repeats the header", "remove that line")
    assert not project.exists()


def test_a_utf8_mark_over_other_bytes_is_named_with_the_line(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # it said "neither UTF-8 nor utf-8-sig text", naming a codec and no line
    left = tmp_path / "marked.csv"
    left.write_bytes(b"\xef\xbb\xbfid,name\n1,Tove\n2,Caf\xe9 Brenn\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: begins with a UTF-8 byte-order mark but is not "
                          "UTF-8 text (line 3)", "save it as UTF-8")
    other = tmp_path / "other.csv"
    other.write_bytes(b"id,name\n1,Tove\n2,\xff\x81\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(other), "--id",
                    "id")
    assert_one_line_error(code, err, "neither UTF-8 nor cp1252 text (line 3)")


@pytest.mark.parametrize("encoding", ["utf-8", "utf-16"])
def test_a_value_holding_a_nul_is_read_whole(tmp_path: Path, encoding: str,
                                             capsys: pytest.CaptureFixture[str]) -> None:
    # pandas' C reader before 3.0 ended the value at the NUL ('Vi\x00k' became 'Vi')
    left = tmp_path / "nul.csv"
    left.write_text(_csv([*ROWS[:3], ("4", "Ivo\x00Bren", "Vik")], "\n"), encoding=encoding)
    with _build(tmp_path, left, capsys) as project:
        assert project.record("left", "4")["name"] == "Ivo\x00Bren"
        assert project.record("left", "3")["name"] == "Ivo Brenn"


def test_a_column_without_values_is_left_out_and_said(tmp_path: Path, capsys) -> None:
    # it was compared: every pair 'missing' there, yet status weighed its 'exact' level
    # (x7.7) and the screens showed it on every pair
    (tmp_path / "l.csv").write_text("id,name,email,fax\n1,Ana Berg,,\n2,Bo Lind,,\n"
                                    "3,Cy Dahl,,\n", encoding="utf-8")
    (tmp_path / "r.csv").write_text("id,name,email,fax\n1,Ana Berg,a@b.no,\n2,Bo Lindh,,\n"
                                    "3,Cy Dal,,\n", encoding="utf-8")
    project = tmp_path / "p.docket"
    assert main(["new", str(project), "--left", str(tmp_path / "l.csv"), "--right",
                 str(tmp_path / "r.csv"), "--block", "*"]) == 0
    out, err = capsys.readouterr()
    assert "fields compared: name (name)\n" in out
    assert err.splitlines() == [
        f"docket: warning: column 'email' holds no value in {tmp_path / 'l.csv'}; not "
        "compared (give --field email:KIND to compare it anyway)",
        f"docket: warning: column 'fax' holds no value in {tmp_path / 'l.csv'} or in "
        f"{tmp_path / 'r.csv'}; not compared (give --field fax:KIND to compare it anyway)"]
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(tmp_path / "l.csv"),
                 "--right", str(tmp_path / "r.csv"), "--block", "*",
                 "--field", "email:code"]) == 0  # asked for: compared
    assert "fields compared: name (name), email (code)" in capsys.readouterr().out


def test_a_column_of_one_value_throughout_is_left_out_and_said(tmp_path: Path, capsys) -> None:
    # 'country' NO in every record, 'source' naming each file: compared, each gave every pair
    # one level, weighed x1 and shown on every card
    names = ["Ana Berg", "Bo Lind", "Cy Dahl", "Di Ek", "Eva Sund"]
    for side, source in (("l", "north"), ("r", "south")):
        (tmp_path / f"{side}.csv").write_text("id,name,country,source\n" + "".join(
            f"{k},{names[k % 5]} {k},NO,{source}\n" for k in range(25)), encoding="utf-8")
    left, right = tmp_path / "l.csv", tmp_path / "r.csv"
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(left), "--right", str(right),
                 "--id", "id", "--block", "*"]) == 0
    out, err = capsys.readouterr()
    assert "fields compared: name (name)\n" in out
    assert err.splitlines() == [
        f"docket: warning: column '{col}' holds one value in every record of {left} ('{a}') "
        f"and of {right} ('{b}'), which tells no pair apart; not compared (give --field "
        f"{col}:KIND to compare it anyway)" for col, a, b in (("country", "NO", "NO"),
                                                           ("source", "north", "south"))]
    assert main(["new", str(tmp_path / "q.docket"), "--left", str(left), "--right", str(right),
                 "--id", "id", "--block", "*", "--field", "country:code"]) == 0  # asked for
    assert "fields compared: name (name), country (code)" in capsys.readouterr().out
    # a toy table all in Oslo keeps its town: in three records one value may be chance
    toy = tmp_path / "toy.csv"
    toy.write_text("id,name,town\n1,Anna,Oslo\n2,Anne,Oslo\n3,Jon,Oslo\n", encoding="utf-8")
    assert main(["new", str(tmp_path / "t.docket"), "--left", str(toy), "--id", "id",
                 "--block", "town"]) == 0
    assert "town" in capsys.readouterr().out


def test_many_columns_of_one_value_are_said_in_one_line(tmp_path: Path, capsys) -> None:
    wide = tmp_path / "w.csv"
    wide.write_text("id,name,a,b,c,d\n" + "".join(f"{k},Name {k % 7},x,y,z,w\n"
                                                  for k in range(30)), encoding="utf-8")
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(wide), "--id", "id"]) == 0
    assert capsys.readouterr().err.splitlines() == [
        "docket: warning: 4 columns hold one value in every record, which tells no pair "
        "apart: 'a', 'b', 'c' and 1 more; not compared (give --field COL:KIND to compare one "
        "anyway)"]
    same = tmp_path / "same.csv"  # nothing left to compare is one line saying why
    same.write_text("id,name\n" + "".join(f"{k},Anna\n" for k in range(30)), encoding="utf-8")
    code, err = run(capsys, "new", str(tmp_path / "s.docket"), "--left", str(same), "--id", "id")
    assert_one_line_error(code, err, f"{same}: no column to compare tells records apart: "
                          f"column 'name' holds one value in every record of {same} ('Anna')")


@pytest.mark.parametrize("suffix", [".csv", ".jsonl", ".parquet"])
def test_a_column_name_holding_a_nul_is_refused_by_its_position(
        suffix: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # the build ended in a traceback: "ValueError: embedded null character" from SQLite
    left = tmp_path / f"nul{suffix}"
    if suffix == ".csv":
        left.write_text(_csv([(*r, "x") for r in ROWS], "\n", "id,name,town,no\x00te"),
                        encoding="utf-8")
    elif suffix == ".jsonl":
        left.write_text("".join(json.dumps({"id": i, "name": n, "town": t, "no\x00te": "x"})
                                + "\n" for i, n, t in ROWS), encoding="utf-8")
    else:
        pq.write_table(pa.table({"id": [r[0] for r in ROWS], "name": [r[1] for r in ROWS],
                                 "town": [r[2] for r in ROWS], "no\x00te": ["x"] * 4}), left)
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: column 4's name 'no\\x00te' holds a NUL",
                          "rename the column")
    assert sorted(p.name for p in tmp_path.iterdir()) == [left.name]


@pytest.mark.parametrize("suffix", [".csv", ".tsv"])
def test_a_value_that_goes_on_after_its_closing_quote_is_refused(
        suffix: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # '"Bob" Smith' was read as 'Bob Smith': the record changed without a word
    sep = "," if suffix == ".csv" else "\t"
    left = tmp_path / f"q{suffix}"
    left.write_text(sep.join(["id", "name", "town"]) + "\n" + sep.join(["1", "Ivo", "Vik"])
                    + "\n" + sep.join(["2", '"Bob" Smith', "Vik"]) + "\n", encoding="utf-8")
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: line 3: a value goes on after its closing quote",
                          '"""Bob"" Smith"')
    assert not project.exists()


@pytest.mark.parametrize(("text", "said"), [
    ("\n" + _csv(ROWS, "\n"), "line 1, where the header belongs, is blank; delete the blank "
     "lines above the header (the column names, on line 2)"),
    ("  \r\n\r\n" + _csv(ROWS, "\r\n"), "line 1, where the header belongs, is blank; delete "
     "the blank lines above the header (the column names, on line 3)"),
    ("  \n\n  \n", "the file holds only blank lines; it needs a header row and records"),
    ("", "the file is empty; it needs a header row and records")],
    ids=["blank line", "spaces and blank line", "only blank lines", "nothing"])
def test_a_blank_line_where_the_header_belongs_is_named(
        text: str, said: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # 'line 2 has 3 of the header's 0 fields', and for blank lines alone 'line 3 repeats
    # the header (were two files joined?)'
    left = tmp_path / "export.csv"
    left.write_text(text, encoding="utf-8", newline="")
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, f"{left}: {said}")
    assert not project.exists()

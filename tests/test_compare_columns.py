"""--compare COLS: a table of many columns is compared on the few named. A 200-column table
was refused for its level patterns, and the way out was 172 --field COL:skip options."""

from __future__ import annotations

import csv
from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main

from .test_bad_input import assert_one_line_error, run


def _wide(path: Path) -> Path:
    # 1 id and 199 columns, each holding a few values: far more patterns than 2^63
    with path.open("w", newline="", encoding="utf-8") as f:
        out = csv.writer(f)
        out.writerow(["id", "name, full"] + [f"c{i}" for i in range(198)])
        for k in range(30):
            out.writerow([k, f"Name {k % 9}"] + [f"v{(k + j) % 5}{k % 3}" for j in range(198)])
    return path


def test_a_wide_table_is_refused_with_the_way_out(tmp_path: Path, capsys) -> None:
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left",
                    str(_wide(tmp_path / "wide.csv")), "--id", "id")
    assert_one_line_error(code, err, "199 fields to compare", "the first 31 fit",
                          "--compare COLS")
    assert not (tmp_path / "p.docket").exists()


def test_compare_keeps_only_the_columns_named(tmp_path: Path, capsys) -> None:
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(_wide(tmp_path / "wide.csv")), "--id", "id",
                 "--compare", '"name, full",c5, c9']) == 0
    assert "fields compared: name, full (name), c5 (code), c9 (code)" in capsys.readouterr().out
    with Project.open(path, readonly=True) as p:
        assert [f.name for f in p.fields] == ["name, full", "c5", "c9"]
        # the rest are kept as records, shown and not compared
        assert len(p.connection.execute("SELECT * FROM left_records").description) == 200


def test_compare_names_a_column_of_either_table(tiny_tables: tuple[Path, Path],
                                                tmp_path: Path, capsys) -> None:
    left, right = tiny_tables
    right.write_text(right.read_text(encoding="utf-8").replace("id,name,", "id,full_name,"),
                     encoding="utf-8")
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--right", str(right), "--id", "id",
                 "--map", "name=full_name", "--compare", "full_name,born", "--block", "*"]) == 0
    with Project.open(path, readonly=True) as p:
        assert [(f.left_column, f.right_column) for f in p.fields] == [
            ("name", "full_name"), ("born", "born")]
    # town is left out by choice, so it is not warned of as a column without a partner
    assert "town" not in capsys.readouterr().err


@pytest.mark.parametrize("value, needle", [
    ("Name", "--compare Name: no column to compare of that name; did you mean 'name'? (the "
             "columns to choose from: name, town, born)"),
    ("", "--compare '' names no field; name one or more, comma-separated"),
    ('"name', "--compare \"name: a quote is not closed"),
])
def test_compare_refuses_a_name_it_cannot_use(value: str, needle: str,
                                              tiny_tables: tuple[Path, Path], tmp_path: Path,
                                              capsys) -> None:
    left, right = tiny_tables
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(left), "--right",
                    str(right), "--id", "id", "--compare", value)
    assert_one_line_error(code, err, needle)
    assert not (tmp_path / "p.docket").exists()

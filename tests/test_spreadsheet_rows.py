"""Rows a spreadsheet's author adds around the records, saved with them as CSV."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import pandas as pd
import pytest

from docket.core import Project
from docket.core.records.totals_row import totals_row

from .test_bad_input import assert_one_line_error, run

RECORDS = ["1,Tove Marsk,Oslo,\"1,200.50\"", "2,Tove Mask,Oslo,\"1,200.50\"",
           "3,Ivo Brenn,Vik,310.00", "4,Ivo Bren,Vik,310.00"]


def _table(tmp_path: Path, last: str) -> Path:
    path = tmp_path / "sheet.csv"
    path.write_bytes(b"\xef\xbb\xbf" + "\r\n".join(["id,name,town,amount", *RECORDS, last, ""])
                     .encode())
    return path


def test_a_totals_row_with_its_label_in_the_id_is_said_and_kept(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # it was read as record 'Total', silently, and paired with every record of its amount
    left = _table(tmp_path, 'Total,,,"3,021.00"')
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id",
                    "--block", "town")
    assert code == 0, err
    said = [line for line in err.splitlines() if "totals" in line]
    assert len(said) == 1, err
    assert "row 6" in said[0] and "'Total' and numbers alone" in said[0], said[0]
    with Project.open(project, readonly=True) as p:
        assert p.record("left", "Total")["amount"] == "3,021.00"  # kept: only the user knows


def test_a_totals_row_without_an_id_is_refused_saying_what_it_is(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    left = _table(tmp_path, ',Summe:,,"3.021,00"')
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id")
    assert_one_line_error(code, err, "row 6", "'Summe:' and numbers alone",
                          "a totals row, not a record; delete it")
    assert not project.exists()


@pytest.mark.parametrize("last", [
    "Total,Total Fuel Ltd,Harbour Road,12.00",  # a firm of that name has an address
    "5,Ana Sum,Vik,12.00",  # a word inside a value is no label
    "Total,Sum,,12.00",  # two labels: not the sheet's one totals label
])
def test_a_record_that_merely_holds_the_word_is_not_called_a_totals_row(last: str) -> None:
    assert totals_row(_frame(last), delimited=True) is None


def test_only_text_tables_are_looked_at() -> None:
    assert totals_row(_frame('Total,,,"3,021.00"'), delimited=True) is not None
    assert totals_row(_frame('Total,,,"3,021.00"'), delimited=False) is None


def _frame(last: str) -> pd.DataFrame:
    rows = list(csv.reader(io.StringIO("\n".join([*RECORDS, last]))))
    return pd.DataFrame([[v or None for v in r] for r in rows],
                        columns=["id", "name", "town", "amount"])

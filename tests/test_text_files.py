"""A table saved as .txt, as a spreadsheet saves "Text (Tab delimited)" or "Unicode Text"
(UTF-16 with a byte-order mark, tabs): read with the separator its header uses. It was
refused as "unknown file type '.txt'"."""

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

"""Options and streams given wrongly: a table from standard input, an id column not found."""

from __future__ import annotations

from pathlib import Path

import pytest

from .test_bad_input import assert_one_line_error, run


def test_a_table_from_standard_input_is_said_to_need_a_file(
        sample_project: Path, tmp_path: Path, monkeypatch, capsys) -> None:
    # '--from -' (as export writes '-o -') was '-: no such file; check the path'
    monkeypatch.chdir(tmp_path)
    for argv in (["label", str(sample_project), "--reviewer", "ana", "--from", "-"],
                 ["evaluate", str(sample_project), "--predictions", "-"]):
        code, err = run(capsys, *argv)
        assert_one_line_error(code, err, "-: no such file; a table is read from a file, not "
                                         "standard input")


@pytest.mark.parametrize("options, needles", [
    # the hint named --id to someone who had given --left-id
    (["--left-id", "Client_ID", "--right-id", "ref"],
     ["no column 'Client_ID'; did you mean 'client_id'?", "with --left-id"]),
    (["--left-id", "client_id", "--right-id", "reff"],
     ["no column 'reff'; did you mean 'ref'?", "with --right-id"]),
    (["--id", "client_id"], ["practice_south.csv: no column 'client_id'; columns are ref,",
                             "with --right-id"]),
])
def test_an_id_column_not_found_names_the_option_and_the_nearest_column(
        options: list[str], needles: list[str], tmp_path: Path, capsys) -> None:
    sample = Path(__file__).resolve().parent.parent / "sample"
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left",
                    str(sample / "practice_north.csv"), "--right",
                    str(sample / "practice_south.csv"), *options)
    assert_one_line_error(code, err, *needles)

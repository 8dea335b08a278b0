"""A link of a table with a copy of itself (its id column renamed) says so: each record would
be paired with itself, and a dedupe of the one table was meant."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from docket.tui.cli import main


def _tables(tmp: Path) -> tuple[Path, Path]:
    frame = pd.DataFrame({"id": [f"c{i}" for i in range(30)],
                          "name": [f"Ilvan Drevan{i % 10}" for i in range(30)],
                          "town": [f"Orvale{i % 3}" for i in range(30)]})
    frame.to_csv(tmp / "a.csv", index=False)
    frame.rename(columns={"id": "ref"}).to_csv(tmp / "b.csv", index=False)
    return tmp / "a.csv", tmp / "b.csv"


def test_a_copy_with_its_ids_renamed_is_named(tmp_path: Path, capsys) -> None:
    a, b = _tables(tmp_path)
    assert main(["new", str(tmp_path / "s.docket"), "--left", str(a), "--right", str(b),
                 "--left-id", "id", "--right-id", "ref", "--block", "town"]) == 0
    err = capsys.readouterr().err
    assert "b.csv: holds the same 30 records as" in err and "under the same ids" in err
    assert "give it as --left alone" in err


def test_tables_that_differ_in_one_value_are_not_a_copy(tmp_path: Path, capsys) -> None:
    a, b = _tables(tmp_path)
    other = pd.read_csv(b, dtype=str)
    other.loc[29, "name"] = "Merot Uskol"
    other["ref"] = "r" + other["ref"]
    other.to_csv(b, index=False)
    assert main(["new", str(tmp_path / "s.docket"), "--left", str(a), "--right", str(b),
                 "--left-id", "id", "--right-id", "ref", "--block", "town"]) == 0
    assert "holds the same" not in capsys.readouterr().err

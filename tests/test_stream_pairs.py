"""Candidate pairs streamed from Parquet: one file or a folder of parts, bad parts refused."""

from __future__ import annotations

import sqlite3
import sys
from pathlib import Path

import pandas as pd
import pytest

from docket.core import NewProject, Project
from docket.core.pairs.pair_files import id_batches, open_pairs
from tests.test_bad_input import assert_one_line_error, run

SAMPLE = Path(__file__).resolve().parent.parent / "sample"


def _pairs(n_left: int = 40) -> pd.DataFrame:
    north = pd.read_csv(SAMPLE / "practice_north.csv", dtype=str)["client_id"][:n_left]
    south = pd.read_csv(SAMPLE / "practice_south.csv", dtype=str)["ref"][:30]
    return pd.DataFrame([(a, b) for a in north for b in south], columns=["left_id", "right_id"])


def _spec(path: Path, pairs: Path, **kw) -> NewProject:
    return NewProject(path=path, left=SAMPLE / "practice_north.csv",
                      right=SAMPLE / "practice_south.csv", left_id="client_id", right_id="ref",
                      column_map={"owner": "owner_name", "born": "date_of_birth"},
                      pairs_file=pairs, **kw)


def _rows(path: Path) -> list[tuple]:
    with sqlite3.connect(path) as conn:
        return sorted(conn.execute(
            "SELECT p.left_id, p.right_id, t.levels, t.probability FROM pairs p "
            "JOIN patterns t USING (pattern_id)"))


def _parts(frame: pd.DataFrame, folder: Path, n: int) -> Path:
    """A folder as a distributed engine writes it: parts, a marker file, a hidden checksum."""
    folder.mkdir()
    size = -(-len(frame) // n)
    for i in range(n):
        frame.iloc[i * size:(i + 1) * size].to_parquet(folder / f"part-{i:05d}.parquet",
                                                       index=False)
    (folder / "_SUCCESS").write_text("")
    (folder / ".part-00000.parquet.crc").write_text("x")
    return folder


def test_folder_of_parts_gives_the_same_project_as_one_csv(tmp_path: Path) -> None:
    frame = _pairs()
    csv = tmp_path / "pairs.csv"
    frame.to_csv(csv, index=False)
    folder = _parts(frame, tmp_path / "pairs", 4)
    Project.create(_spec(tmp_path / "a.docket", csv))
    Project.create(_spec(tmp_path / "b.docket", folder))
    assert _rows(tmp_path / "a.docket") == _rows(tmp_path / "b.docket")
    assert len(_rows(tmp_path / "b.docket")) == len(frame)


def test_batches_are_bounded(tmp_path: Path) -> None:
    frame = _pairs()
    path = tmp_path / "pairs.parquet"
    frame.to_parquet(path, index=False, row_group_size=100)
    source = open_pairs(path)
    sizes = [len(a) for _, a, _ in id_batches(source, batch=256)]
    assert source.rows == len(frame) and sum(sizes) == len(frame)
    assert max(sizes) <= 256 and len(sizes) > 1


def _bad_folder(tmp_path: Path, case: str) -> tuple[Path, str]:
    frame = _pairs(10)
    folder = _parts(frame, tmp_path / "pairs", 3)
    if case == "unknown id":
        extra = pd.DataFrame({"left_id": ["N-nope"], "right_id": [frame.right_id[0]]})
        extra.to_parquet(folder / "part-00009.parquet", index=False)
        return folder, "N-nope"
    if case == "missing column":
        frame[["left_id"]].to_parquet(folder / "part-00009.parquet", index=False)
        return folder, "right_id"
    if case == "part gone":  # a link to a part moved away: its pairs were left out, unsaid
        (folder / "part-00009.parquet").symlink_to(tmp_path / "moved.parquet")
        return folder, "part-00009.parquet: a part that cannot be opened"
    (folder / "part-00009.parquet").write_bytes(b"PAR1 not really parquet PAR1")
    return folder, "part-00009.parquet"


@pytest.mark.parametrize("case", ["unknown id", "missing column", "corrupt part", "part gone"])
def test_bad_part_one_line_exit_2_nothing_left(case: str, tmp_path: Path, capsys) -> None:
    folder, needle = _bad_folder(tmp_path, case)
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(SAMPLE / "practice_north.csv"),
                    "--right", str(SAMPLE / "practice_south.csv"), "--left-id", "client_id",
                    "--right-id", "ref", "--map", "owner=owner_name",
                    "--map", "born=date_of_birth", "--pairs", str(folder))
    assert_one_line_error(code, err, needle)
    assert [p.name for p in tmp_path.iterdir() if "docket" in p.name] == []


def test_folder_without_parts(tmp_path: Path, capsys) -> None:
    (tmp_path / "empty").mkdir()
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left",
                    str(SAMPLE / "practice_north.csv"), "--id", "client_id",
                    "--pairs", str(tmp_path / "empty"))
    assert_one_line_error(code, err, "no Parquet parts")


def test_without_dask_the_engine_says_how_to_install(tmp_path: Path, capsys,
                                                     monkeypatch) -> None:
    monkeypatch.setitem(sys.modules, "distributed", None)  # as if the extra were absent
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left",
                    str(SAMPLE / "practice_north.csv"), "--id", "client_id",
                    "--engine", "dask")
    assert_one_line_error(code, err, "pip install 'docket[dask]'")

"""A small project of data nobody tuned the screens for, built once per session.

Forty columns a record; ids of 200 characters that differ only at their end; a value of
5,000 characters; right-to-left text, combining marks, emoji and wide CJK characters; values
that look like markup or hold escape sequences, tabs and newlines; an empty column and a
column that is missing on every record. Pairs are given: record i with record i on the
other side, and with record i + 1.
"""

from __future__ import annotations

import json
import warnings
from pathlib import Path

import pytest

from docket.core import NewProject, Project
from tests.fixtures_review import copy_project

N = 6
NAMES = ["محمد عبد الله", "שרה כהן", "Zoe\u0308 A\u030angstro\u0308m", "山田 太郎", "김민준",
         "👩‍👩‍👧 Ola"]
TOWNS = ["東京都新宿区西新宿二丁目", "القاهرة", "Tel Aviv-Yafo", "서울특별시 강남구", "Ørsta",
         "大阪府大阪市北区梅田"]
ODD = ["[bold]loud[/bold]", "[/]", "[link=x]click[/link]", "\x1b[31mred\x1b[0m", "tab\there",
       "line one\nline two"]
EXTRA = 32  # f00 ... f31: with the nine named columns and the id, 42 columns a record
COMPARED = 6  # of them compared (a project compares at most two dozen); the rest are shown
ESSAY = ("lorem ipsum dolor sit amet " * 200)[:5000]


def long_id(side: str, i: int) -> str:
    return f"{side}-" + "x" * 190 + f"-{i:07d}"  # 200 characters; they differ at the end


def record(side: str, i: int) -> dict[str, str]:
    row = {"id": long_id(side, i), "name": NAMES[i], "town": TOWNS[i], "note": ODD[i],
           "essay": ESSAY if i % 2 else ESSAY[: 4000 + i], "empty": "",
           "code": f"C{i}{i}" if side == "L" else f"C{i}{(i * 7) % 10}"}
    row["gone"] = ""  # missing on every record of both sides
    for j in range(EXTRA):
        shift = 0 if side == "L" or j % 3 else 1  # a third of them differ on the right
        row[f"f{j:02d}"] = ("" if (i + j) % 4 == 0 else
                            f"{ODD[(i + j + shift) % len(ODD)]}{NAMES[j % N]}")
    return row


def build_odd(folder: Path) -> Path:
    for side in ("L", "R"):
        with open(folder / f"{side}.jsonl", "w", encoding="utf-8") as fh:
            for i in range(N):
                fh.write(json.dumps(record(side, i), ensure_ascii=False) + "\n")
    lines = ["left_id,right_id"]
    for i in range(N):
        lines += [f"{long_id('L', i)},{long_id('R', i)}",
                  f"{long_id('L', i)},{long_id('R', (i + 1) % N)}"]
    (folder / "pairs.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
    skipped = {f"f{j:02d}": "skip" for j in range(COMPARED, EXTRA)}
    path = folder / "odd.docket"
    with warnings.catch_warnings():  # the empty columns are said to be left out, as meant
        warnings.simplefilter("ignore")
        Project.create(NewProject(path=path, left=folder / "L.jsonl",
                                  right=folder / "R.jsonl", id_column="id",
                                  pairs_file=folder / "pairs.csv",
                                  kinds={"essay": "longtext", **skipped}, seed=0))
    return path


@pytest.fixture(scope="session")
def odd_master(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return build_odd(tmp_path_factory.mktemp("odd"))


@pytest.fixture
def odd_project(odd_master: Path, tmp_path: Path) -> Path:
    return copy_project(odd_master, tmp_path)

"""Helpers for the team tests: a tiny project (and its fixtures), and the CLI."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from docket.core import NewProject, Project
from docket.tui import cli

LEFT = """id,name,town,born
1,Anna Berg,Oslo,1980-01-02
2,Jon Dahl,Bergen,1975-05-06
3,Kari Lund,Oslo,1990-12-11
4,Per Moe,Bergen,1966-03-03
"""
RIGHT = """id,name,town,born
a,Anna Berg,Oslo,1980-01-02
b,Jon Dal,Bergen,1975-06-05
c,Kari Lund,Oslo,1990-11-12
d,Eva Moe,Bergen,1968-03-03
"""


def tiny_project(folder: Path, name: str = "tiny.docket", left: str = LEFT,
                 right: str = RIGHT) -> Path:
    """Eight candidate pairs (every left and right record in the same town)."""
    folder.mkdir(parents=True, exist_ok=True)
    lpath, rpath = folder / f"{name}.left.csv", folder / f"{name}.right.csv"
    lpath.write_text(left, encoding="utf-8")
    rpath.write_text(right, encoding="utf-8")
    path = folder / name
    Project.create(NewProject(path=path, left=lpath, right=rpath, id_column="id",
                              rules=["town"], kinds={"born": "date"}, overlap=0.5))
    return path


def run(argv: list[str]) -> int:
    """``docket ARGV`` as the installed command runs it."""
    return cli.main(argv)


@pytest.fixture(scope="module")
def tiny_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return tiny_project(tmp_path_factory.mktemp("tiny"))


@pytest.fixture
def tiny(tiny_file: Path, tmp_path: Path) -> Path:
    copy = tmp_path / "t.docket"
    copy.write_bytes(tiny_file.read_bytes())
    return copy


def pair_ids(path: Path) -> list[int]:
    with sqlite3.connect(path) as conn:
        return [r[0] for r in conn.execute("SELECT pair_id FROM pairs ORDER BY pair_id")]

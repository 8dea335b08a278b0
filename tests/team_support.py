"""Helpers for the team tests: a tiny project, and the CLI with the team commands present."""

from __future__ import annotations

import argparse
from pathlib import Path
from unittest import mock

from docket.core import NewProject, Project
from docket.tui import cli
from docket.tui.cli_team import register

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


_real_build_parser = cli.build_parser


def _with_team_commands() -> argparse.ArgumentParser:
    parser = _real_build_parser()
    sub = next(a for a in parser._actions if a.dest == "command")
    if "agreement" not in sub.choices:  # not wired into cli.py yet
        register(sub)
    return parser


def run(argv: list[str]) -> int:
    """``docket ARGV`` as the installed command runs it, team commands included."""
    with mock.patch.object(cli, "build_parser", _with_team_commands):
        return cli.main(argv)

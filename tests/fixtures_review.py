"""Fixtures for the review-screen tests: the sample project, a hostile one, a frozen clock.

Projects are built once per session and copied per test, so each test owns its file.
"""

from __future__ import annotations

import asyncio
import functools
import json
import re
import shutil
import sqlite3
from collections.abc import Callable, Coroutine
from html import unescape
from pathlib import Path
from typing import Any

import pytest

from docket.core import NewProject, Project
from docket.tui.review_app import ReviewApp, make_app
from docket.tui.screens import ReviewScreen

REPO = Path(__file__).resolve().parents[1]
SAMPLE = REPO / "sample"
BIG = ("lorem ipsum dolor sit amet " * 4000)[:100_000]  # a 100 kB value
HOSTILE_LEFT = [
    {"id": "L1", "name": "[bold red]x[/]", "town": "[link=https://example.org]y[/]",
     "code": "\x1b[2J", "about": BIG, "source": "[i]ledger[/i]"},
    {"id": "L2", "name": "Anna\u202eBerg", "town": "Oslo\x00", "code": "AB12",
     "about": "short text here", "source": "\x1b]8;;https://example.org\x07click\x1b]8;;\x07"},
    {"id": "L3", "name": "Bo Ek", "town": "Umeå", "code": "ZZ99", "about": "x",
     "source": "plain"},
]
HOSTILE_RIGHT = [
    {"id": "R1", "name": "[bold red]x[/] ", "town": "[link=https://example.org]y[/]",
     "code": "\x1b[2K", "about": BIG[:5000] + "CHANGED" + BIG[5007:]},
    {"id": "R2", "name": "Anna Berg", "town": "Oslo", "code": "AB21",
     "about": "short text there"},
    {"id": "R3", "name": "Bo Ek", "town": "Umea", "code": "ZZ99", "about": "y"},
]


async def settle(pilot) -> None:
    """Let the screen catch up and every worker finish."""
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()


def pilot_test(func: Callable[..., Coroutine[Any, Any, None]]) -> Callable[..., None]:
    """Run an async test body in its own event loop (no asyncio plugin is installed)."""
    @functools.wraps(func)
    def run(*args: Any, **kwargs: Any) -> None:
        asyncio.run(func(*args, **kwargs))
    return run


class FrozenClock:
    """A clock that moves only when a test says so (pace and time-on-pair are then fixed)."""

    def __init__(self, start: float = 1000.0) -> None:
        self.now = start

    def __call__(self) -> float:
        return self.now

    def advance(self, seconds: float) -> None:
        self.now += seconds


def _build_sample(path: Path) -> Path:
    Project.create(NewProject(
        path=path, left=SAMPLE / "practice_north.csv", right=SAMPLE / "practice_south.csv",
        left_id="client_id", right_id="ref",
        column_map={"owner": "owner_name", "born": "date_of_birth"}, seed=0))
    return path


def _build_hostile(folder: Path) -> Path:
    for name, rows in (("left", HOSTILE_LEFT), ("right", HOSTILE_RIGHT)):
        with open(folder / f"{name}.jsonl", "w", encoding="utf-8") as fh:
            for row in rows:
                fh.write(json.dumps(row) + "\n")
    (folder / "pairs.csv").write_text("left_id,right_id\nL1,R1\nL2,R2\nL3,R3\nL1,R2\n")
    path = folder / "hostile.docket"
    Project.create(NewProject(path=path, left=folder / "left.jsonl",
                              right=folder / "right.jsonl", id_column="id",
                              pairs_file=folder / "pairs.csv", seed=0))
    return path


@pytest.fixture(scope="session")
def review_sample_master(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return _build_sample(tmp_path_factory.mktemp("sample") / "sample.docket")


@pytest.fixture(scope="session")
def review_hostile_master(tmp_path_factory: pytest.TempPathFactory) -> Path:
    return _build_hostile(tmp_path_factory.mktemp("hostile"))


def copy_project(master: Path, folder: Path) -> Path:
    target = folder / master.name
    shutil.copy(master, target)
    return target


@pytest.fixture
def review_sample(review_sample_master: Path, tmp_path: Path) -> Path:
    return copy_project(review_sample_master, tmp_path)


@pytest.fixture
def review_hostile(review_hostile_master: Path, tmp_path: Path) -> Path:
    return copy_project(review_hostile_master, tmp_path)


@pytest.fixture
def frozen_clock() -> FrozenClock:
    return FrozenClock()


AppFactory = Callable[..., ReviewApp]


@pytest.fixture
def review_app(tmp_path: Path, frozen_clock: FrozenClock) -> AppFactory:
    """``review_app(path, reviewer="maya", **kw)``: the real app, frozen clock, no user keymap."""
    def build(path: Path, reviewer: str = "maya", **kw: object) -> ReviewApp:
        kw.setdefault("clock", frozen_clock)
        kw.setdefault("keymap_file", tmp_path / "no-keymap.toml")
        return make_app(path, reviewer, **kw)  # type: ignore[arg-type]
    return build


def screen_text(app: ReviewApp) -> str:
    """The characters on screen, from the app's own screenshot (tags stripped)."""
    svg = app.export_screenshot()
    texts = re.findall(r"<text[^>]*>(.*?)</text>", svg, flags=re.S)
    return unescape("".join(texts)).replace("\xa0", " ")


# helpers the review-screen test files share
SIZE = (120, 40)


def rows(path: Path, sql: str, args: tuple = ()) -> list[tuple]:
    with sqlite3.connect(path) as conn:
        return conn.execute(sql, args).fetchall()


def log(path: Path) -> list[tuple]:
    return rows(path, "SELECT pair_id, reviewer, label, note, seconds, supersedes FROM decisions "
                      "ORDER BY decided_at")


async def press(pilot, *keys: str) -> None:
    """Press each key and let the screen catch up before the next."""
    for key in keys:
        await pilot.press(key)
        await pilot.pause()


def review(app) -> ReviewScreen:
    assert isinstance(app.screen, ReviewScreen)
    return app.screen

"""A small deterministic team project for the adjudication, agreement and quality screens.

Built once per session from the sample project (``sample_project_file`` in conftest), then
copied per test. Labels follow the sample's truth file, with set departures:

- maya and ines label 24 overlap pairs (12 true matches); ines differs on 5, holds 2;
- lead (the adjudicator) labelled one of the disagreements as a reviewer earlier;
- maya labels 160 audit pairs, so the quality screen has design-based estimates;
- four pairs a-x, b-x, b-y, a-y form a cycle: three gold matches and one gold non-match,
  a cluster conflict.

Every decision carries a fixed time spent, so what the screens show never depends on the
clock; the app gets a frozen clock.
"""

from __future__ import annotations

import csv
import shutil
from dataclasses import dataclass
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.reviewing.bulk import BulkRow, apply_rows
from docket.core.reviewing.team import add_reviewer
from docket.tui.team_app import TeamApp, make_team_app
from tests.fixtures_review import FrozenClock, settle

TRUTH = Path(__file__).resolve().parents[1] / "sample" / "truth.csv"
SHARED = 24
FLIPPED = (1, 4, 9, 15, 20)  # indexes of shared pairs on which ines says the opposite
HELD = (6, 12)  # ines holds these
LEAD_OWN = 4  # lead labelled this shared pair (one of the flipped ones) as a reviewer
AUDIT = 160


@dataclass(frozen=True)
class Layout:
    """Pair ids of the interesting parts, for the tests to aim at."""

    shared: tuple[int, ...]
    flipped: tuple[int, ...]
    held: tuple[int, ...]
    lead_own: int
    conflict_non_match: int
    conflict_matches: tuple[int, ...]


def _truth() -> set[tuple[str, str]]:
    with open(TRUTH, newline="", encoding="utf-8") as fh:
        return {(r["left_id"], r["right_id"]) for r in csv.DictReader(fh)}


def _cycle(conn, taken: set[int]) -> tuple[int, int, int, int]:
    """Pair ids of a-x, b-x, b-y, a-y: four candidate pairs closing a cycle."""
    row = conn.execute(
        "SELECT p1.pair_id, p2.pair_id, p3.pair_id, p4.pair_id FROM pairs p1 "
        "JOIN pairs p2 ON p2.right_id = p1.right_id AND p2.left_id > p1.left_id "
        "JOIN pairs p3 ON p3.left_id = p2.left_id AND p3.right_id > p1.right_id "
        "JOIN pairs p4 ON p4.left_id = p1.left_id AND p4.right_id = p3.right_id "
        f"WHERE p1.audit = 0 AND p2.audit = 0 AND p3.audit = 0 AND p4.audit = 0 "
        f"AND p1.pair_id NOT IN ({','.join(map(str, taken))}) "
        "ORDER BY p1.pair_id LIMIT 1").fetchone()
    assert row is not None, "the sample has no four-pair cycle"
    return tuple(int(x) for x in row)  # type: ignore[return-value]


def build_team(path: Path) -> Layout:
    truth = _truth()
    with Project.open(path) as project:
        conn = project.connection
        for name, role in (("lead", "adjudicator"), ("maya", "reviewer"),
                           ("ines", "reviewer")):
            add_reviewer(project, name, role)
        ends = {pid: (a, b) for pid, a, b in conn.execute(
            "SELECT pair_id, left_id, right_id FROM pairs")}

        def true_label(pid: int) -> str:
            return "match" if ends[pid] in truth else "non-match"

        overlap = [r[0] for r in conn.execute(
            "SELECT pair_id FROM pairs WHERE overlap = 1 AND audit = 0 ORDER BY pair_id")]
        # half true matches, half non-matches, so that kappa has both categories to work on
        half = SHARED // 2
        shared = sorted([p for p in overlap if true_label(p) == "match"][:half] +
                        [p for p in overlap if true_label(p) == "non-match"][:half])
        maya, ines = [], []
        for i, pid in enumerate(shared):
            right = true_label(pid)
            maya.append(BulkRow(pid, right, "same pet and phone" if i == 1 else ""))
            label = right
            if i in FLIPPED:
                label = "non-match" if right == "match" else "match"
            if i in HELD:
                label = "hold"
            ines.append(BulkRow(pid, label, "moved? new street" if i in HELD else ""))
        audit = [r[0] for r in conn.execute(
            f"SELECT pair_id FROM pairs WHERE audit = 1 ORDER BY audit_order LIMIT {AUDIT}")]
        maya += [BulkRow(pid, true_label(pid), "") for pid in audit]
        ax, bx, by, ay = _cycle(conn, {*shared, *audit})
        maya += [BulkRow(pid, "match", "") for pid in (ax, bx, by)]
        maya.append(BulkRow(ay, "non-match", "different owner"))
        apply_rows(project, "maya", maya)
        apply_rows(project, "ines", ines)
        apply_rows(project, "lead", [BulkRow(shared[LEAD_OWN], "match", "same vet, I think")])
        # bulk rows carry no time; the screens show time spent, so give each a fixed one
        with project.transaction() as c:
            c.execute("UPDATE decisions SET seconds = CASE reviewer WHEN 'maya' THEN 7 "
                      "WHEN 'ines' THEN 12 ELSE 31 END")
    return Layout(tuple(shared), tuple(shared[i] for i in FLIPPED),
                  tuple(shared[i] for i in HELD), shared[LEAD_OWN], ay, (ax, bx, by))


@pytest.fixture(scope="session")
def team_master(sample_project_file: Path, tmp_path_factory: pytest.TempPathFactory
                ) -> tuple[Path, Layout]:
    path = tmp_path_factory.mktemp("team") / "team.docket"
    shutil.copy(sample_project_file, path)
    return path, build_team(path)


@pytest.fixture
def team(team_master: tuple[Path, Layout], tmp_path: Path) -> tuple[Path, Layout]:
    """A private copy of the team project and where its interesting pairs are."""
    master, layout = team_master
    copy = tmp_path / master.name
    shutil.copy(master, copy)
    return copy, layout


@pytest.fixture
def team_app(tmp_path: Path):
    """``team_app(path, adjudicator="lead", **kw)``: the real app, frozen clock, no keymap."""
    def build(path: Path, adjudicator: str = "lead", **kw: object) -> TeamApp:
        kw.setdefault("clock", FrozenClock())
        kw.setdefault("keymap_file", tmp_path / "no-keymap.toml")
        return make_team_app(path, adjudicator, **kw)  # type: ignore[arg-type]
    return build


async def press(pilot, *keys: str) -> None:
    """Press each key (the pilot waits for each to be handled), then settle."""
    for key in keys:
        await pilot.press(key)
    await settle(pilot)


async def decide(pilot, key: str, reason: str) -> None:
    """A decision key, then the reason, entered at once rather than key by key (the typing
    itself is tested once); the screen is settled afterwards."""
    from textual.widgets import Input

    await pilot.press(key)
    await pilot.pause()
    pilot.app.screen.query_one("#reason-input", Input).value = reason
    await pilot.press("enter")
    await settle(pilot)

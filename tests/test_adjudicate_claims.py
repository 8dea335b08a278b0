"""The adjudication screen claims the pair it shows: two adjudicators at work together are
never shown one pair, and the claim ends on deciding and on quitting."""

from __future__ import annotations

import sqlite3
from pathlib import Path

from docket.core import Project
from docket.core.exports.gold_export import adjudication_queue
from docket.core.reviewing import adjudication
from docket.core.reviewing.team import add_reviewer
from docket.tui.screens.adjudicate import AdjudicateScreen
from tests.fixtures_review import pilot_test
from tests.screens_support import decide, settle

SIZE = (120, 40)


def claims_of(path: Path) -> list[tuple[int, str, str]]:
    with sqlite3.connect(path) as conn:
        return conn.execute("SELECT pair_id, reviewer, role FROM claims ORDER BY 1, 2").fetchall()


def test_two_adjudicators_asking_at_once_are_served_different_pairs(team):
    path, _ = team
    with Project.open(path) as a, Project.open(path) as b:
        add_reviewer(a, "ada", "adjudicator")
        waiting = [pid for pid, _ in adjudication_queue(a)]
        first = adjudication.serve(a, "lead", waiting)
        second = adjudication.serve(b, "ada", waiting)  # the same stale queue
        assert first == waiting[0] and second == waiting[1]
        assert adjudication.held_by_others(b, "ada") == {first}
        # a reviewer's claim in the same name is another role: neither ends the other
        a.next_pairs("lead", 1, claim=True)
        assert (first, "lead", "adjudicator") in claims_of(path)
        adjudication.release(a, "lead")
        assert [c for c in claims_of(path) if c[2] == "adjudicator"] == [
            (second, "ada", "adjudicator")]
        assert [c[1:] for c in claims_of(path) if c[1] == "lead"] == [("lead", "reviewer")]
        # others' claims fill every waiting pair: nothing to serve
        assert adjudication.serve(a, "lead", [second]) is None


@pilot_test
async def test_the_screen_claims_its_pair_and_gives_it_back(team, team_app):
    path, layout = team
    with Project.open(path) as project:
        add_reviewer(project, "ada", "adjudicator")
        assert adjudication.serve(project, "ada", [layout.flipped[0]]) == layout.flipped[0]
    app = team_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, AdjudicateScreen)
        first = screen.pair_id  # the lead's first pair would be flipped[0]; ada holds it
        assert first is not None and first != layout.flipped[0]
        assert layout.flipped[0] not in [pid for pid, _ in screen.queue or ()]
        assert claims_of(path) == sorted([(layout.flipped[0], "ada", "adjudicator"),
                                          (first, "lead", "adjudicator")])
        await decide(pilot, "s", "same owner")
        after = screen.pair_id
        assert after not in (None, first, layout.flipped[0])
        assert (after, "lead", "adjudicator") in claims_of(path)
        assert (first, "lead", "adjudicator") not in claims_of(path)
    assert claims_of(path) == [(layout.flipped[0], "ada", "adjudicator")]

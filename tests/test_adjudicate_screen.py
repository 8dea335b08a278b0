"""Pilot tests of the adjudication screen on a small team project (see screens_support)."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from docket.core import DocketError, Project
from docket.core.reviewing.gold import gold_labels
from docket.core.reviewing.team import add_reviewer
from docket.tui import cli
from docket.tui.screens.adjudicate import AdjudicateScreen
from docket.tui.screens.agreement import AgreementScreen
from docket.tui.screens.quality import QualityScreen
from docket.tui.screens.reason import ReasonScreen
from docket.tui.screens.team_help import TeamHelp
from docket.tui.widgets.reviews import ReviewsPanel
from tests.fixtures_review import pilot_test, screen_text
from tests.screens_support import decide, press, settle

SIZE = (120, 40)


def adjudications(path: Path) -> list[tuple]:
    with sqlite3.connect(path) as conn:
        return conn.execute(
            "SELECT pair_id, reviewer, label, note, seconds, supersedes, role FROM decisions "
            "WHERE role = 'adjudicator' ORDER BY decided_at").fetchall()


def gold(path: Path) -> dict[int, tuple[str, str]]:
    with Project.open(path, readonly=True) as project:
        return {g.pair_id: (g.label, g.how) for g in gold_labels(project.connection)}


def screen(app) -> AdjudicateScreen:
    assert isinstance(app.screen, AdjudicateScreen)
    return app.screen


def panel(app) -> str:
    return screen(app).query_one(ReviewsPanel).content.plain  # type: ignore[union-attr]


def test_a_non_adjudicator_is_refused_before_any_screen(team, team_app, capsys):
    path, _ = team
    for name in ("maya", "nobody"):
        with pytest.raises(DocketError, match=f"{name} is not an adjudicator"):
            team_app(path, name)
    assert cli.main(["adjudicate", str(path), "--reviewer", "maya"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "maya is not an adjudicator" in err
    assert f"docket reviewers {path} add maya --role adjudicator" in err
    assert adjudications(path) == []


@pilot_test
async def test_deciding_asks_for_a_reason_and_stores_an_adjudication(team, team_app):
    path, layout = team
    app = team_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = screen(app).pair_id
        assert first == layout.flipped[0] and screen(app).standing.why == "disagreement"
        waiting = len(screen(app).queue)
        assert "gold   none until settled" in panel(app)
        app.clock.advance(4.5)
        await press(pilot, "s")
        assert isinstance(app.screen, ReasonScreen)
        # the example names this project's own fields, not one data set's
        assert app.screen.query_one("#reason-input").placeholder.startswith(
            "why this label, e.g. what in owner, ")
        await pilot.press(*"same pet", "enter")
        await settle(pilot)
        assert screen(app).pair_id != first
        assert len(screen(app).queue) == waiting - 1 and screen(app).decided == 1
        assert "1 decided" in screen_text(app)
    (pair, who, label, note, seconds, sup, role), = adjudications(path)
    assert (pair, who, label, note, seconds, sup, role) == (
        first, "lead", "match", "same pet", 4.5, None, "adjudicator")
    # the gold-label policy: the disagreement became gold only now, as adjudicated
    assert gold(path)[first] == ("match", "adjudicated")


@pilot_test
async def test_an_empty_reason_is_refused_and_escape_writes_nothing(team, team_app):
    path, _ = team
    app = team_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = screen(app).pair_id
        await press(pilot, "d", "enter")
        assert isinstance(app.screen, ReasonScreen)
        assert "A reason is needed" in screen_text(app)
        await press(pilot, "space", "space", "enter")
        assert isinstance(app.screen, ReasonScreen)
        await press(pilot, *"no", "escape")
        assert screen(app).pair_id == first
    assert adjudications(path) == []


@pilot_test
async def test_undo_appends_a_retraction_and_brings_the_pair_back(team, team_app):
    path, _ = team
    app = team_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = screen(app).pair_id
        await decide(pilot, "d", "different owner")
        await press(pilot, "z")
        s = screen(app)
        assert (s.mode, s.pair_id) == ("aside", first)
        assert "undone (non-match)" in screen_text(app)
        assert first in [pid for pid, _ in s.queue]
        await press(pilot, "escape")  # back to the queue: the undone pair is first again
        assert (screen(app).mode, screen(app).pair_id) == ("queue", first)
        await press(pilot, "z")  # nothing left to undo: no new row
    (pair, _, label, _, _, sup, role), (pair2, _, label2, _, _, sup2, role2) = \
        adjudications(path)
    assert (pair, label, sup, role) == (first, "non-match", None, "adjudicator")
    assert (pair2, label2, role2) == (first, None, "adjudicator") and sup2 is not None
    assert first not in gold(path)


@pilot_test
async def test_own_earlier_label_is_flagged_and_names_show(team, team_app):
    path, layout = team
    app = team_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert "your own earlier label" not in panel(app)
        assert "maya" in panel(app) and "ines" in panel(app)
        await decide(pilot, "h", "ask maya")  # held: asked again last
        assert screen(app).pair_id == layout.lead_own
        text = panel(app)
        assert "▲ your own earlier label" in text and "same vet, I think" in text
        assert [line.split()[0] for line in text.splitlines() if "0:" in line] == [
            "maya", "ines", "lead"]


@pilot_test
async def test_blind_hides_names_but_keeps_labels_notes_and_the_own_flag(team, team_app):
    path, layout = team
    app = team_app(path, blind=True)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await decide(pilot, "h", "later")
        assert screen(app).pair_id == layout.lead_own
        text = panel(app)
        for name in ("maya", "ines", "lead"):
            assert name not in text
        assert "reviewer 1" in text and "reviewer 3" in text and "same vet, I think" in text
        assert "▲ your own earlier label" in text
        assert "names hidden" in screen_text(app)
        await press(pilot, "left_square_bracket")  # lead's own hold, shown as "you"
        assert "you" in panel(app) and "reason later" in panel(app)


@pilot_test
async def test_gold_policy_holds_never_become_gold_unanimous_pairs_never_wait(team,
                                                                             team_app):
    path, layout = team
    app = team_app(path)
    unanimous = next(p for p in layout.shared if p not in (*layout.flipped, *layout.held,
                                                          layout.lead_own))
    assert gold(path)[unanimous][1] == "unanimous"
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        waiting = dict(screen(app).queue)
        assert unanimous not in waiting
        assert all(waiting[p] == "hold" for p in layout.held)
        assert waiting[layout.conflict_non_match] == "cluster conflict"
        assert not any(p in gold(path) for p in (*layout.held, *layout.flipped))
        # the queue runs by pair id: two disagreements, then the first hold
        await decide(pilot, "s", "same")
        await decide(pilot, "d", "differs")
        assert screen(app).pair_id == layout.held[0]
        assert "a reviewer could not tell" in panel(app)
        await decide(pilot, "h", "needs the clinic's records")
        assert screen(app).queue[-1][0] == layout.held[0]  # still waiting, asked again last
        await decide(pilot, "s", "same")
        assert screen(app).pair_id == layout.held[1]
        await decide(pilot, "s", "same chip number")
        assert layout.held[1] not in dict(screen(app).queue)
    settled = gold(path)
    assert settled[layout.held[1]] == ("match", "adjudicated")
    assert layout.held[0] not in settled  # an adjudicator's hold is no gold label either


@pilot_test
async def test_history_agreement_quality_help_and_quit(team, team_app):
    path, _ = team
    app = team_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        first = screen(app).pair_id
        await decide(pilot, "s", "same")
        await press(pilot, "left_square_bracket")
        s = screen(app)
        assert (s.mode, s.pair_id) == ("history", first)
        assert "your adjudication 1 of 1" in screen_text(app)
        assert "match (adjudicated)" in panel(app)
        await press(pilot, "right_square_bracket")
        assert screen(app).mode == "queue"
        await press(pilot, "a")
        assert isinstance(app.screen, AgreementScreen)
        await press(pilot, "escape", "g")
        assert isinstance(app.screen, QualityScreen)
        await press(pilot, "escape", "question_mark")
        assert isinstance(app.screen, TeamHelp)
        text = screen_text(app)
        for binding in AdjudicateScreen.BINDINGS:
            assert binding.id in text, binding.id
        await press(pilot, "escape", "q")
    assert not app.is_running


@pilot_test
async def test_an_empty_queue_says_so_and_what_to_do_next(sample_project, team_app):
    with Project.open(sample_project) as project:
        add_reviewer(project, "lead", "adjudicator")
    app = team_app(sample_project)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        text = screen_text(app)
        assert "Nothing waits for adjudication" in text and "docket export" in text
        await press(pilot, "s")
        assert isinstance(app.screen, AdjudicateScreen)  # no reason asked: nothing to decide
    assert adjudications(sample_project) == []


def test_adjudication_120x40(snap_compare, team, team_app):
    path, _ = team
    assert snap_compare(team_app(path), terminal_size=SIZE, run_before=settle)



def test_notes_and_names_are_shown_literally_and_blind_names_are_stand_ins():
    from docket.core.reviewing.adjudication import Review
    from docket.core.types import PairCard
    from docket.tui.widgets.reviews import PairStanding, blind_aliases, reviews_text

    card = PairCard(7, "L1", "R1", 0.5, 0.0, 0.0, "uncertain", ())
    reviews = (Review("[bold]eve[/]", "match", "[red]x[/] \x1b[2J\u202e", 3.0, "", False),
               Review("bo", "hold", "", 1.0, "", True),
               Review("lead", "non-match", "why", 2.0, "", False, "adjudicator"))
    standing = PairStanding("hold", reviews)
    text = reviews_text(card, standing, "lead", blind=False).plain
    assert "[bold]eve[/]" in text and "[red]x[/]" in text  # a long note wraps, indented
    assert "    \\x1b[2J⟨U+202E⟩" in text
    assert "\x1b" not in text and "you" in text and "▲ your own earlier label" in text
    blind = reviews_text(card, standing, "lead", blind=True).plain
    assert "eve" not in blind and " bo " not in blind
    assert "reviewer 1" in blind and "reviewer 2" in blind
    aliases = blind_aliases(["maya", "ines", "lead"])
    assert sorted(aliases.values()) == ["reviewer A", "reviewer B", "reviewer C"]
    assert aliases == blind_aliases(["lead", "maya", "ines"])  # the order given is no clue


def test_a_long_note_wraps_under_its_reviewer():
    # the panel wrapped a note to its left edge, where its second line read as the start of
    # the next entry
    from rich.text import Text

    from docket.tui.widgets.reviews import hanging

    note = "same address, different birth year? and a much longer note that goes on"
    lines = hanging(Text("  note " + note), 28).plain.splitlines()
    assert lines[0] == "  note same address,"
    assert all(line.startswith("    ") and len(line) <= 28 for line in lines[1:])
    assert " ".join(" ".join(lines).split()) == "note " + note
    assert hanging(Text("  note same pet and phone"), 28).plain == "  note same pet and phone\n"


def test_the_clock_column_of_the_reviews_is_named():
    # 'ines  hold  0:00' left a newcomer to guess what 0:00 was: a time of day, or nothing
    from docket.core.reviewing.adjudication import Review
    from docket.core.types import PairCard
    from docket.tui.widgets.reviews import PairStanding, reviews_text

    card = PairCard(7, "L1", "R1", 0.5, 0.0, 0.0, "uncertain", ())
    standing = PairStanding("hold", (Review("ines", "hold", "", 0.0, "", False),
                                     Review("maya", "match", "", 75.0, "", False)))
    lines = reviews_text(card, standing, "lead", blind=False).plain.splitlines()
    head = next(line for line in lines if line.startswith("reviewers (2)"))
    rows = [line for line in lines if line.startswith(("ines", "maya"))]
    assert head.endswith("time") and rows[0].endswith("0:00") and rows[1].endswith("1:15")
    assert {len(head)} == {len(row) for row in rows}  # 'time' over the clocks


@pilot_test
async def test_pairs_sent_while_the_screen_is_open_come_with_r_or_on_coming_back(
        sample_project, team_app):
    # Seen in a terminal: the empty queue said new pairs arrive as reviewers label, and a
    # disagreement labelled meanwhile never came until the screen was opened again.
    from docket.core.reviewing.bulk import BulkRow, apply_rows
    with Project.open(sample_project) as project:
        add_reviewer(project, "lead", "adjudicator")
        first, second = [r[0] for r in project.connection.execute(
            "SELECT pair_id FROM pairs WHERE overlap = 1 ORDER BY pair_id LIMIT 2")]
    app = team_app(sample_project)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        assert screen(app).queue == [] and "r looks again" in screen(app)._empty_message().plain
        with Project.open(sample_project) as other:  # two reviewers, beside the screen
            apply_rows(other, "maya", [BulkRow(first, "match", "")])
            apply_rows(other, "ines", [BulkRow(first, "non-match", "")])
        await press(pilot, "r")
        assert screen(app).pair_id == first and screen(app).standing.why == "disagreement"
        with Project.open(sample_project) as other:
            apply_rows(other, "ines", [BulkRow(second, "hold", "")])
        await press(pilot, "a")
        assert isinstance(app.screen, AgreementScreen)
        await press(pilot, "escape")
        assert [pid for pid, _ in screen(app).queue] == [first, second]

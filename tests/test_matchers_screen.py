"""Pilot tests of the matchers screen and of the pairs where a matcher fails."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.matchers.failures import failures
from docket.core.matchers.importing import import_matchers
from docket.tui.screens.matcher_failures import MatcherFailuresScreen
from docket.tui.screens.matchers import MatchersScreen
from docket.tui.screens.pair_detail import PairDetailScreen
from tests.fixtures_review import pilot_test, screen_text
from tests.matchers_support import (
    SAMPLE_TRUTH,
    answer_audit,
    candidates,
    flipped,
    is_match,
    label_file,
)
from tests.screens_support import press, settle

SIZE = (120, 40)


@pytest.fixture
def rated(sample_project: Path, tmp_path: Path) -> Path:
    with Project.open(sample_project) as p:
        answer_audit(p, SAMPLE_TRUTH)
        frame = candidates(p)
        y = is_match(frame, SAMPLE_TRUTH)
        import_matchers(p, [label_file(tmp_path / "m.csv", frame,
                                       {"exact": y, "noisy": flipped(y, 0.05, 4)})])
    return sample_project


def test_failures_are_the_gold_disagreements_grouped_by_differing_fields(rated: Path) -> None:
    with Project.open(rated, readonly=True) as p:
        assert failures(p, "exact") == []
        groups = failures(p, "noisy")
        fields = {f.name for f in p.fields}
    sizes = [len(g.failures) for g in groups]
    assert sizes == sorted(sizes, reverse=True) and sum(sizes) > 0
    for g in groups:
        assert set(g.differing) <= fields
        assert all(f.differing == g.differing for f in g.failures)
        assert all(f.kind in ("false match", "missed match") for f in g.failures)
    # a field whose values agree is no difference, at any exact level: 'exact, common' (a
    # frequent value's own level) was listed as differing, 'Osric Stobwell' on both sides
    with Project.open(rated, readonly=True) as p:
        for g in groups:
            for f in g.failures:
                levels = {r.field: r.level_name for r in p.card(f.pair_id, "").fields}
                assert all(not levels[name].startswith("exact") for name in g.differing)
                assert all(name in g.differing for name, lv in levels.items()
                           if not lv.startswith("exact") and lv != "missing")


@pilot_test
async def test_the_table_then_where_a_matcher_fails_masked(rated, team_app):
    with Project.open(rated, readonly=True) as p:
        groups = failures(p, "noisy")
    app = team_app(rated, start="matchers", mask=("email", "phone"))
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, MatchersScreen)
        table = screen.query_one("#matchers-table")
        assert table.row_count == 3  # exact, noisy and the model
        row = [c.plain for c in table.get_row("exact")]
        assert row[3].startswith("1.000") and row[6] == "1.000"
        shown = screen_text(app)
        assert "paired F1 differences" in shown
        # each verdict on a line of its own, saying F1 as the table heads it: at 80 columns it
        # wrapped to the left edge, 'no difference in f1' under a column headed F1
        lines = shown.splitlines()
        verdicts = [i for i, line in enumerate(lines) if "→ " in line]
        assert verdicts and all(lines[i].strip().startswith("→ ") and " − " in lines[i - 1]
                                and " f1 " not in lines[i] for i in verdicts)
        table.move_cursor(row=table.get_row_index("noisy"))
        await press(pilot, "enter")
        fails = app.screen
        assert isinstance(fails, MatcherFailuresScreen)
        listed = fails.query_one("#failures-table")
        assert listed.row_count == len(groups) + sum(len(g.failures) for g in groups)
        text = screen_text(app)
        # a heading of nine fields is cut at the table's width ('... born diffe')
        assert groups[0].label[:60] in text and "gets wrong" in text
        with Project.open(rated, readonly=True) as p:
            emails = {v for (v,) in p.connection.execute("SELECT email FROM left_records")
                      if v and len(v) > 8}
        assert not any(e in text for e in emails)  # masked as set
        # the cursor starts on the first pair, not on its group's heading (Enter did nothing)
        assert listed.cursor_row == 1
        listed.move_cursor(row=0)
        await press(pilot, "enter")
        assert isinstance(app.screen, MatcherFailuresScreen)
        assert [n.message for n in app._notifications][-1].startswith("A group's heading")
        listed.move_cursor(row=1)  # the first pair of the largest group
        await press(pilot, "enter")
        assert isinstance(app.screen, PairDetailScreen)
        await press(pilot, "escape", "escape")
        assert isinstance(app.screen, MatchersScreen)


def test_the_screen_refuses_an_unknown_mask_column_before_opening(rated: Path, capsys) -> None:
    from docket.tui.cli import main
    assert main(["evaluate", str(rated), "--matchers", "--screen", "--mask", "emial"]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "emial" in err, err


@pilot_test
async def test_the_table_and_the_failures_keep_every_figure_at_80x24(rated, team_app):
    # the F1 column was cut and kappa and the audit pairs were out of sight to the right; and
    # where a matcher fails, a group's list of fields sat in the 'left' column, as wide as the
    # longest list, so the right ids and the differing values were out of sight
    app = team_app(rated, start="matchers")
    async with app.run_test(size=(80, 24)) as pilot:
        await settle(pilot)
        table = app.screen.query_one("#matchers-table")
        width = sum(col.get_render_width(table) for col in table.columns.values())
        assert width <= table.region.width and table.region.right <= 80
        labels = [c.label.plain for c in table.columns.values()]
        assert labels == ["matcher", "thr", "precision", "recall", "F1", "κ gold", "audit"]
        row = [c.plain for c in table.get_row("exact")]
        assert row[2].startswith("1.00 [") and "–" in row[2] and row[5] == "1.000"
        table.move_cursor(row=table.get_row_index("noisy"))
        await press(pilot, "enter")
        listed = app.screen.query_one("#failures-table")
        widths = [c.get_render_width(listed) for c in listed.columns.values()]
        assert sum(widths[:4]) < 60  # pair, error, left, right: each no wider than its ids
        text = screen_text(app)
        assert "right" in text and "differing values" in text and " differ" in text
        # a group's count sat in the 'pair' column, where '2' read as a pair id
        heads = [[c.plain for c in listed.get_row(key)] for key in listed.rows
                 if str(key.value).startswith("group:")]
        assert heads and all(h[0] == "" and re.match(r"\d+ pairs?: ", h[4]) for h in heads)
        # the values ran past the right edge ('Averil Bremford ≠ Averil Bremfo'), the rest out
        # of sight but for a sideways scroll: they wrap in the room the ids leave, a line a field
        assert sum(widths) <= listed.scrollable_content_region.width
        tall = [row for row in listed.ordered_rows if row.height > 1]
        assert tall and not listed.max_scroll_x
        values = [listed.get_row(key)[4].plain for key in listed.rows
                  if not str(key.value).startswith("group:")]
        assert any(len(v.splitlines()) > 1 and " ≠ " in v.splitlines()[1] for v in values)
        await pilot.resize_terminal(120, 40)
        await settle(pilot)
        assert sum(c.get_render_width(listed) for c in listed.columns.values()) > 100
        await press(pilot, "escape")
        row = [c.plain for c in table.get_row("exact")]
        assert row[1] == "label" and row[3].startswith("1.000 [")  # wide: as before


@pilot_test
async def test_escape_on_the_screen_opened_alone_keeps_it(rated, team_app):
    # 'docket evaluate --matchers --screen' then Escape took the only screen away: a blank
    # terminal, where q did nothing (only ctrl+q quit)
    app = team_app(rated, start="matchers")
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot)
        await press(pilot, "escape")
        assert isinstance(app.screen, MatchersScreen)
        await press(pilot, "q")
    assert app.return_code is not None or not app.is_running

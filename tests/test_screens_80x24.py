"""Every screen at 80×24: the pair card fits, the key bar leads with the decision keys, and the
tables keep their columns. Snapshots of the adjudication, agreement and quality screens at
this size sit beside the review screen's (``test_review_snapshots``).
"""

from __future__ import annotations

from textual.containers import VerticalScroll

from docket.tui.screens.help import key_rows
from docket.tui.widgets import KeyBar
from tests.fixtures_review import pilot_test, screen_text
from tests.screens_support import press, settle

SMALL = (80, 24)


def bar_text(app) -> str:
    return app.screen.query_one(KeyBar).render().plain


@pilot_test
async def test_a_nine_field_pair_fits_at_80x24_without_scrolling(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SMALL) as pilot:
        await settle(pilot)
        for _ in range(6):  # several pairs, long e-mails among them
            card = app.screen.card
            assert card is not None and len(card.fields) == 9
            box = app.screen.query_one("#card-box", VerticalScroll)
            assert box.max_scroll_y == 0
            text = screen_text(app)
            assert "born" in text
            await press(pilot, "s")


@pilot_test
async def test_full_values_key_lets_the_card_scroll_and_back(review_sample, review_app):
    app = review_app(review_sample)
    async with app.run_test(size=SMALL) as pilot:
        await settle(pilot)
        shortened = "shortened to fit" in screen_text(app)
        await press(pilot, "w")
        box = app.screen.query_one("#card-box", VerticalScroll)
        assert "shortened to fit" not in screen_text(app)
        assert (box.max_scroll_y > 0) == shortened  # in full it no longer fits, if it did not
        await press(pilot, "w")
        assert ("shortened to fit" in screen_text(app)) == shortened


@pilot_test
async def test_key_bar_keeps_declared_order_when_keys_are_remapped(review_sample, review_app,
                                                                   tmp_path):
    keymap = tmp_path / "keymap.toml"
    keymap.write_text('match = "m"\nnon-match = "n"\nhold = "k"\n', encoding="utf-8")
    app = review_app(review_sample, keymap_file=keymap)
    async with app.run_test(size=SMALL) as pilot:
        await settle(pilot)
        bar = bar_text(app)
        assert bar.startswith("m match n non-match k hold"), bar
        for shown in ("c others", "x columns", "? more", "q quit"):
            assert shown in bar
        assert len(bar) <= SMALL[0]
        await press(pilot, "left_square_bracket")  # nothing decided yet: stays in the queue
        await press(pilot, "m", "left_square_bracket")
        assert "esc queue" in bar_text(app)  # the way back appears where it can be seen


@pilot_test
async def test_key_bar_says_when_keys_are_left_out_and_help_lists_them(review_sample,
                                                                      review_app):
    # at 80 columns '[ ] history' and 'w full values' had no room, and the bar read '? help'
    # as if it showed every key
    app = review_app(review_sample)
    async with app.run_test(size=SMALL) as pilot:
        await settle(pilot)
        bar = bar_text(app)
        assert bar.startswith("s match d non-match h hold") and bar.endswith("? more q quit")
        assert "[ ] history" not in bar and "w full values" not in bar and len(bar) <= 80
        listed = {r.description for r in key_rows(app.screen, app.get_key_display, {})}
        assert {"back", "fwd", "full values"} <= listed  # help lists what the bar left out
    app = review_app(review_sample)
    async with app.run_test(size=(120, 40)) as pilot:
        await settle(pilot)
        bar = bar_text(app)
        for shown in ("w full values", "[ ] history", "/ find", "? help", "q quit"):
            assert shown in bar, bar  # room for every key: help is help again


@pilot_test
async def test_quality_table_keeps_every_column_at_80x24(team, team_app):
    path, _ = team
    app = team_app(path, start="quality")
    async with app.run_test(size=SMALL) as pilot:
        await settle(pilot)
        table = app.screen.query_one("#threshold-table")
        assert table.region.right <= SMALL[0]
        width = sum(col.get_render_width(table) for col in table.columns.values())
        assert width <= table.region.width, "a column would be cut or need scrolling"
        text = screen_text(app)
        assert "predicted" in text and "F1" in text and "]" in text


def test_adjudication_80x24(snap_compare, team, team_app):
    path, _ = team
    assert snap_compare(team_app(path), terminal_size=SMALL, run_before=settle)


def test_agreement_80x24(snap_compare, team, team_app):
    path, _ = team
    assert snap_compare(team_app(path, start="agreement"), terminal_size=SMALL,
                        run_before=settle)


def test_quality_80x24(snap_compare, team, team_app):
    path, _ = team
    assert snap_compare(team_app(path, start="quality"), terminal_size=SMALL,
                        run_before=settle)

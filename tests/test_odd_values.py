"""Untuned values on the pair card: long text, markup-like, wide and right-to-left."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Input

from docket.tui import literal
from docket.tui.widgets.card_lines import shorten
from tests.fixtures_review import pilot_test, press, settle
from tests.odd_data import ESSAY


def test_a_value_cut_at_a_space_has_one_space_before_its_marker() -> None:
    # 'lorem  … [+3,402 characters]': the cut fell after a space, and the marker added one
    text = literal.literal_text(ESSAY[:4002]).plain
    assert text.endswith("lorem … [+3,403 characters]") and "  …" not in text


def test_a_long_value_shortened_keeps_its_start_beside_the_marker() -> None:
    # cut in the middle, a 4,951-character text read 'lor…m  … [+4,351 characters]' at 80
    # columns: its 600th character shown as if it were the last, between two ellipses
    value = literal.literal_text(ESSAY[:4951])
    assert shorten(value, 28).plain == "lorem … [+4,352 characters]"  # the space cut too
    assert shorten(value, 40).plain == "lorem ipsum dolor … [+4,352 characters]"
    assert shorten(value, 10).plain == "lorem ips…"  # no room for the marker: the start, cut


NOTE = ("the surname changed after marriage and the street is new but the pet is the same old "
        "dog and the phone matches an earlier record from the north practice END")


@pilot_test
async def test_a_long_note_is_shortened_to_the_panel_and_says_so(odd_project, review_app):
    # the note ran past the evidence panel's foot at 80x24, its end cut off unseen
    from docket.tui.widgets.evidence import _height

    for size, whole in (((80, 24), False), ((120, 40), True)):
        app = review_app(odd_project)
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await press(pilot, "e")
            app.screen.query_one(Input).value = NOTE  # as if typed (or pasted)
            await press(pilot, "enter")
            panel = app.screen.query_one("#evidence")
            shown = Text(panel.render().plain)
            assert _height(shown, panel.content_size.width) <= panel.content_size.height
            assert ("END" in shown.plain) == whole, size
            assert ("e shows the whole note" in shown.plain) != whole

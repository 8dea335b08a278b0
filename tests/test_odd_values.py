"""Untuned values on the pair card: long text, markup-like, wide and right-to-left."""

from __future__ import annotations

from docket.tui import literal
from docket.tui.widgets.card_lines import shorten
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

"""Untuned values on the pair card: long text, markup-like, wide and right-to-left."""

from __future__ import annotations

from docket.tui import literal
from docket.tui.widgets.card_lines import shorten
from tests.odd_data import ESSAY


def test_a_long_value_shortened_keeps_its_start_beside_the_marker() -> None:
    # cut in the middle, a 4,951-character text read 'lor…m  … [+4,351 characters]' at 80
    # columns: its 600th character shown as if it were the last, between two ellipses
    value = literal.literal_text(ESSAY[:4951])
    assert shorten(value, 28).plain == "lorem … [+4,351 characters]"
    assert shorten(value, 40).plain == "lorem ipsum dolor … [+4,351 characters]"
    assert shorten(value, 10).plain == "lorem ips…"  # no room for the marker: the start, cut

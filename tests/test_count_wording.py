"""Counts printed with their nouns agree in number (common practice of English grammar)."""

from __future__ import annotations

from docket.core.wording import noun
from docket.tui.figures import labelled_text, many


def test_one_is_singular_and_every_other_count_plural() -> None:
    assert many(1, "audit pair") == "1 audit pair"
    assert many(0, "audit pair") == "0 audit pairs"
    assert many(2, "match") == "2 matches"
    assert many(1500, "log entry", "log entries") == "1,500 log entries"


def test_a_noun_without_its_count_agrees_too() -> None:
    assert [noun(n, "row") for n in (0, 1, 2)] == ["rows", "row", "rows"]
    assert noun(3, "box") == "boxes" and noun(1, "entry", "entries") == "entry"


def test_the_labelled_share_agrees_with_its_counts() -> None:
    assert labelled_text({"labelled": 1, "drawn": 1, "matches": 1}) == (
        "1 of 1 drawn pair has gold labels (1 match)")
    assert labelled_text({"labelled": 3, "drawn": 40, "matches": 0}, "; 1 held") == (
        "3 of 40 drawn pairs have gold labels (0 matches; 1 held)")

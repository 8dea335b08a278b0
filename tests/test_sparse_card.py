"""The pair card of a sparse table: fields that neither record holds go on one line."""

from __future__ import annotations

import math

from docket.core.types import FieldComparison, PairCard
from docket.tui.widgets.pair_card import CardOptions, card_text


def _row(name: str, left: str | None, right: str | None, part: float = 0.0) -> FieldComparison:
    both = left is not None and right is not None
    return FieldComparison(name, "text", left, right, 1.0 if both else None, 0,
                           "exact" if both else "missing", part)


def _card(rows: list[FieldComparison]) -> PairCard:
    return PairCard(pair_id=7, left_id="S1", right_id="S2", probability=0.5, log_odds=0.0,
                    base_log_odds=0.0, reason="uncertain", fields=tuple(rows), link=False)


def _lines(card: PairCard, width: int) -> list[str]:
    text, _ = card_text(card, CardOptions(stacked=width < 84), width)
    return text.plain.splitlines()


def test_fields_missing_on_both_sides_share_one_line() -> None:
    # a supplier register of fourteen columns, ten of them nearly empty: at 80x24 the card was
    # rows of '— missing —' beside '— missing —', and the one field holding a value below the
    # screen's edge
    rows = [_row("name", "Venpol Ltd", "Venpol Ltd"),
            *(_row(f"extra_{k}", None, None) for k in range(7)),
            _row("extra_7", "Daltor", None), _row("fax", "", "  ")]
    for width in (52, 86, 120):
        lines = _lines(_card(rows), width)
        said = [line for line in lines if "missing on both" in line]
        assert said[0].startswith("8 fields missing on both: extra_0, extra_1"), lines
        shown = " ".join(line.strip() for line in lines)
        assert all(f"extra_{k}" in shown for k in range(7)) and "fax" in shown  # wrapped
        assert sum("— missing —" in line for line in lines) == 1, lines  # extra_7's right side
        assert any(line.lstrip().startswith("extra_7") for line in lines), lines
        assert len(lines) <= 10, lines  # header, name, extra_7 (two lines stacked), the rest


def test_one_such_field_or_one_the_ranker_weighs_keeps_its_row() -> None:
    # a missing value the refit's ranker weighs (its factor not x1) keeps its row, or the
    # factors shown would not multiply out to the odds
    lines = _lines(_card([_row("name", "A", "A"), _row("fax", None, None)]), 120)
    assert not any("missing on both" in line for line in lines)
    weighed = [_row("name", "A", "A"), _row("fax", None, None, math.log(3)),
               _row("web", None, None), _row("vat", None, None)]
    lines = _lines(_card(weighed), 120)
    assert any(line.startswith("fax") and "×3" in line for line in lines), lines
    assert any(line.startswith("2 fields missing on both: web, vat") for line in lines), lines


def test_the_names_on_that_line_are_shown_literally() -> None:
    rows = [_row("[bold]x[/bold]", None, None), _row("a\x1bb", None, None)]
    text = "\n".join(_lines(_card(rows), 120))
    assert "[bold]x[/bold]" in text and "\\x1b" in text and "\x1b" not in text

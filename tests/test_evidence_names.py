"""The evidence panel names each field in the odds steps as fully as the panel's width allows.

The names were cut at 10 cells at any width, so 'description' read 'descripti…' on a
120-column screen with half the panel's line empty.
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from docket.core import NewProject, Project, factor_text
from docket.core.types import FieldComparison, PairCard
from docket.tui.diff import PLAIN
from docket.tui.widgets.evidence import PANEL_TEXT, evidence_text, odds_steps
from tests.fixtures_review import pilot_test
from tests.screens_support import settle

NARROW_TEXT = 20  # the panel at 64-109 columns: 24 cells less border and padding


def _card(names: dict[str, float]) -> PairCard:
    fields = tuple(FieldComparison(field=n, kind="text", left="a", right="b", similarity=0.5,
                                   level=1, level_name="similar", contribution=c)
                   for n, c in names.items())
    total = -8.0 + sum(names.values())
    return PairCard(pair_id=1, left_id="p1", right_id="p2",
                    probability=1 / (1 + math.exp(-total)), log_odds=total,
                    base_log_odds=-8.0, reason="uncertain", fields=fields)


PRODUCTS = {"description": -2.16, "price": 2.15, "manufacturer": 1.81, "title": -0.41}


def _step_lines(text: str) -> list[str]:
    lines = text.splitlines()
    start = lines.index("from the start") + 2
    return lines[start:start + len(odds_steps(_card(PRODUCTS)))]


def test_names_are_whole_at_both_widths_and_factors_line_up() -> None:
    card = _card(PRODUCTS)
    for width in (PANEL_TEXT, NARROW_TEXT):
        steps = _step_lines(evidence_text(card, PLAIN, width=width).plain)
        names = [line.split()[0] for line in steps[:3]]
        assert names == ["description", "price", "manufacturer"], (width, steps)
        assert steps[3].split()[:2] == ["1", "more"]
        assert all(len(line) <= width for line in steps), steps
        assert len({line.rindex(" ") for line in steps}) == 1, steps  # one column of factors
        shown = [line.split()[-1] for line in steps]
        assert shown == [factor_text(p) for _, p in odds_steps(card)]


def test_a_name_too_long_for_the_panel_is_cut_and_its_factor_kept() -> None:
    card = _card({"manufacturer_country_of_origin": 3.0, "price": -1.0})
    for width in (PANEL_TEXT, NARROW_TEXT):
        steps = _step_lines(evidence_text(card, PLAIN, width=width).plain)[:2]
        assert all(len(line) <= width for line in steps), steps
        assert "…" in steps[0].split()[0] and steps[0].split()[-1] == "×20"
        assert steps[0].startswith("  manufa")
        assert steps[0].split()[0].endswith("origin")  # cut in the middle, its end kept


def test_the_steps_still_multiply_out_to_the_odds() -> None:
    # what is listed (each field, then the rest in one step) adds up to the card's log-odds
    card = _card(PRODUCTS)
    total = card.base_log_odds + sum(p for _, p in odds_steps(card))
    assert total == pytest.approx(card.log_odds)


def _products(folder, audit: int | None = None) -> Path:
    rows = [("p1", "Venka blender C925", "Venka blender C925 with steel body", "Venka Works",
             "166.46"),
            ("p2", "Venka blender K526", "Venka blender K526 with quiet motor", "Venka Works",
             "164.99"),
            ("p3", "Torlum kettle A120", "Torlum kettle A120 cordless", "Torlum", "30.00"),
            ("p4", "Torlum kettle a120", "Torlum kettle A120 w/ cordless", "Torlum Works",
             "30.90")]
    (folder / "products.csv").write_text(
        "id,title,description,manufacturer,price\n"
        + "".join(",".join(r) + "\n" for r in rows), encoding="utf-8")
    (folder / "pairs.csv").write_text("left_id,right_id\np1,p2\np3,p4\np1,p3\n")
    path = folder / "products.docket"
    Project.create(NewProject(path=path, left=folder / "products.csv", id_column="id",
                              pairs_file=folder / "pairs.csv", seed=0, audit=audit))
    return path


def _names_whole(app) -> None:
    rendered = app.screen.query_one("#evidence").render().plain
    for name, _ in odds_steps(app.screen.card)[:3]:
        assert f"  {name} " in rendered, (app.size, rendered)
    assert "…" not in rendered, rendered


@pilot_test
async def test_the_panel_names_the_fields_at_120x40_and_80x24(tmp_path, review_app) -> None:
    path = _products(tmp_path)
    for size, then in (((120, 40), (80, 24)), ((80, 24), (120, 40))):
        app = review_app(path)
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            _names_whole(app)
            await pilot.resize_terminal(*then)  # the panel narrows or widens: drawn again
            await settle(pilot)
            _names_whole(app)


def test_the_model_is_named_on_its_line_at_80_columns() -> None:
    # 'model   Fellegi–Sunter' is 22 cells: in the 20-cell panel 'model' stood alone on its
    # line and the model's name under it
    card = _card(PRODUCTS)
    lines = evidence_text(card, PLAIN, width=NARROW_TEXT).plain.splitlines()
    assert "model Fellegi–Sunter" in lines
    lines = evidence_text(card, PLAIN, width=PANEL_TEXT).plain.splitlines()
    assert "model   Fellegi–Sunter" in lines  # lined up with 'queued  ' where there is room


def test_a_probability_near_0_or_1_stays_whole_in_the_narrow_panel() -> None:
    # 'probability < 0.000001' is 22 cells: in the 20-cell panel it wrapped at its space, the
    # '<' at the end of one line and the number alone on the next
    from dataclasses import replace

    for log_odds, shown in ((-30.0, "< 0.000001"), (30.0, "> 0.999999"), (0.0, "0.500")):
        card = replace(_card(PRODUCTS), probability=1 / (1 + math.exp(-log_odds)))
        for width in (NARROW_TEXT, PANEL_TEXT):
            lines = evidence_text(card, PLAIN, width=width).plain.splitlines()
            assert all(len(line) <= width for line in lines[:2]), (width, lines[:2])
            assert f"probability {shown}" in lines[0] or lines[1].strip() == shown, lines[:2]
    card = replace(_card(PRODUCTS), probability=1e-9)
    assert evidence_text(card, PLAIN, width=PANEL_TEXT).plain.startswith(
        "probability < 0.000001")  # on one line where the panel has room


def test_the_other_candidates_counts_fit_the_narrow_panel() -> None:
    # 'first 34 · second 36' (one table deduplicated) took 22 cells of the 20-cell panel at
    # 80 columns, 'second 36' wrapping to a line of its own
    from dataclasses import replace

    def counts(card: PairCard, width: int) -> list[str]:
        lines = evidence_text(card, PLAIN, width=width).plain.splitlines()
        at = lines.index("other candidates") + 1
        return lines[at:lines.index("  c: look at them")]

    dedupe = replace(_card(PRODUCTS), link=False, left_candidates=34, right_candidates=36)
    assert counts(dedupe, PANEL_TEXT) == ["  first 34 · second 36"]
    assert counts(dedupe, NARROW_TEXT) == ["  first   34", "  second  36"]
    link = replace(dedupe, link=True, left_candidates=15, right_candidates=1234)
    assert counts(link, NARROW_TEXT) == ["  left      15", "  right  1,234"]
    assert counts(replace(link, right_candidates=34), NARROW_TEXT) == ["  left 15 · right 34"]


def _panel_lines(app) -> list[str]:
    """The evidence panel's lines as drawn (wrapped at its width), border and padding off."""
    from textual.geometry import Region

    panel = app.screen.query_one("#evidence")
    strips = panel.render_lines(Region(0, 0, *panel.outer_size))
    return [strip.text.strip("│ ").rstrip() for strip in strips]


@pilot_test
async def test_why_the_pair_is_queued_takes_two_lines_at_most(tmp_path, review_app) -> None:
    # 'queued  likely non-match (to confirm)' wrapped over three lines of the 20-cell panel at
    # 80 columns ('queued  likely' / 'non-match (to' / 'confirm)')
    path = _products(tmp_path, audit=0)  # no audit slice: three clear non-matches
    for size in ((80, 24), (120, 40)):
        app = review_app(path)
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            assert app.screen.card.reason == "likely non-match"
            lines = _panel_lines(app)
            start = next(i for i, x in enumerate(lines) if x.startswith("queued"))
            end = lines.index("other candidates")
            assert 1 <= end - start <= 2, (size, lines[start:end])
            assert " ".join(lines[start:end]).split() == \
                ["queued", "likely", "non-match", "(to", "check)"], size


def test_every_reason_for_queueing_takes_two_lines_at_most_at_80_and_120_columns() -> None:
    # 'audit sample and overlap (a second reviewer sees it too)' took four lines of the 20-cell
    # panel, the audit, overlap, disagreement and candidate reasons three
    from dataclasses import replace

    from rich.console import Console

    from docket.tui.widgets.evidence import REASONS

    for reason, words in REASONS.items():
        card = replace(_card(PRODUCTS), reason=reason)
        for width in (NARROW_TEXT, PANEL_TEXT):
            text = evidence_text(card, PLAIN, width=width)
            lines = [x.plain.rstrip() for x in text.wrap(Console(width=width), width)]
            start = next(i for i, x in enumerate(lines) if x.startswith("queued"))
            shown = lines[start:lines.index("other candidates")]
            most = 3 if reason == "audit, overlap" and width == NARROW_TEXT else 2
            assert len(shown) <= most, (width, shown)
            assert " ".join(shown).split() == f"queued  {words}".split(), (width, shown)


def test_a_value_too_long_for_its_line_goes_on_under_itself() -> None:
    # 'model   logistic,' then 'from labels' at the left edge, and 'queued  uncertain' then
    # '(hardest first)', read as lines of their own; indented where that costs no line
    from dataclasses import replace

    card = replace(_card(PRODUCTS), model="logistic")
    lines = evidence_text(card, PLAIN, width=NARROW_TEXT).plain.splitlines()
    assert lines[lines.index("model   logistic,") + 1] == "  from labels"
    assert lines[lines.index("queued  uncertain") + 1] == "  (hardest first)"
    wide = evidence_text(card, PLAIN, width=PANEL_TEXT).plain.splitlines()
    assert wide[wide.index("model   logistic, from") + 1] == "  labels"
    assert wide[wide.index("queued  uncertain") + 1] == "  (hardest first)"  # not 'first)'
    doubt = replace(card, reason="likely non-match")
    lines = evidence_text(doubt, PLAIN, width=NARROW_TEXT).plain.splitlines()
    assert lines[lines.index("queued  likely") + 1] == "non-match (to check)"  # two lines

"""Untuned values on the pair card: long text, markup-like, wide and right-to-left."""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Input

from docket.tui import literal
from docket.tui.widgets.card_lines import shorten
from tests.fixtures_review import pilot_test, press, screen_text, settle
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


@pilot_test
async def test_a_placeholder_is_named_so_on_the_card(tmp_path, review_app):
    # 'N/A' beside 'N/A' (read as missing, as meant) stood under the word 'unread'
    import warnings

    from docket.core import NewProject, Project

    for side in ("L", "R"):
        rows = ["id,name,phone"] + [
            f"{side}{i},Anna Berg{i},{'N/A' if i % 2 else f'555-01{i:02d}'}" for i in range(10)]
        (tmp_path / f"{side}.csv").write_text("\n".join(rows) + "\n", encoding="utf-8")
    (tmp_path / "pairs.csv").write_text(
        "left_id,right_id\n" + "".join(f"L{i},R{i}\n" for i in range(10)), encoding="utf-8")
    path = tmp_path / "p.docket"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # 'N/A' stands for no value: said, as meant
        Project.create(NewProject(path=path, left=tmp_path / "L.csv", right=tmp_path / "R.csv",
                                  id_column="id", pairs_file=tmp_path / "pairs.csv", seed=0))
    with Project.open(path) as p:
        assert next(f for f in p.fields if f.name == "phone").missing == ("N/A",)
        pid = p.find("L1")[0]
    # at 80 columns the level has 9 cells: 'placeholder' read 'placehol…'
    for size in ((120, 40), (80, 24)):
        app = review_app(path)
        async with app.run_test(size=size) as pilot:
            await settle(pilot)
            await press(pilot, "slash", *str(pid), "enter", "enter")
            lines = screen_text(app).splitlines()
            at = next(i for i, x in enumerate(lines) if "phone" in x and "N/A" in x)
            shown = lines[at] + lines[at + 1]  # the level goes under the similarity
            assert "no value" in shown and "unread" not in shown and "…" not in shown, shown


def test_field_names_keep_their_ends_and_wide_names_their_cells() -> None:
    # cut at the end, 'customer_address_line_1' and '..._2' both read 'customer_addr…', and a
    # column of CJK names was as wide as their count of characters: '住所住 …'
    from docket.core.types import FieldComparison, PairCard
    from docket.tui.widgets.pair_card import CardOptions, card_text

    names = ["住所住所住所", "名前", "customer_address_line_1", "customer_address_line_2"]
    fields = tuple(FieldComparison(field=n, kind="text", left="a", right="b", similarity=0.5,
                                   level=1, level_name="similar", contribution=0.3)
                   for n in names)
    card = PairCard(pair_id=1, left_id="l", right_id="r", probability=0.5, log_odds=0.0,
                    base_log_odds=-1.2, reason="uncertain", fields=fields)
    lines = card_text(card, CardOptions(), 54)[0].plain.splitlines()
    shown = [x.split()[0] for x in lines[1:] if x.strip() and not x.startswith(" ")]
    assert shown == ["住所住所住所", "名前", "custome…line_1", "custome…line_2"]

"""Record values are shown literally: no markup, no escapes reaching the terminal, no layout break.

Also the character highlights (rapidfuzz opcodes) and masking, with hypothesis invariants.
"""

from __future__ import annotations

import io
import math
import unicodedata

from hypothesis import given, settings
from hypothesis import strategies as st
from rich.console import Console
from rich.text import Text

from docket.tui import literal
from docket.tui.diff import PLAIN, Palette, differing, paired, render
from docket.tui.masking import MASK_CHAR, Mask, mask_flags, masked, parse_mask
from docket.tui.widgets import KeyBar, PairCardView, StatusLine
from tests.fixtures_review import BIG, copy_project, pilot_test, screen_text

HOSTILE = ["[bold red]x[/]", "[link=https://example.org]y[/]", "\x1b[2J", "\u202e", "\x00",
           "a\u2066b\u2069c", "\x9b31m", "tab\there", "line\nbreak", "\u200bzero"]
UNSAFE = {"Cc", "Cf", "Zl", "Zp", "Cs", "Co"}


def painted(text) -> str:
    """What Rich would send to a terminal for ``text``."""
    out = io.StringIO()
    Console(file=out, force_terminal=True, color_system="truecolor", width=80).print(text)
    return out.getvalue()


def test_markup_is_not_interpreted():
    for value in HOSTILE[:2]:
        text = literal.literal_text(value)
        assert text.plain == value and not text.spans
        assert value in painted(text)


def test_control_format_and_bidi_characters_are_made_visible():
    assert literal.visible("\x1b[2J") == "\\x1b[2J"
    assert literal.visible("\x00") == "\\x00"
    assert literal.visible("\u202e") == "⟨U+202E⟩"
    assert literal.visible("tab\there") == "tab\\there"
    assert literal.visible("\x9b31m") == "\\x9b31m"
    for value in HOSTILE:
        shown = literal.literal_text(value).plain
        assert not any(unicodedata.category(c) in UNSAFE for c in shown), value
        out = painted(literal.literal_text(value))
        for raw in ("\x1b[2J", "\x1b]8", "\u202e", "\x00", "\x9b", "\u2066"):
            assert raw not in out


def test_edge_spaces_are_marked_and_inner_spaces_kept():
    assert literal.literal_text(" Flat  [B] ").plain == "·Flat  [B]·"
    assert literal.literal_text("   ").plain == "···"


def test_long_values_are_capped_with_a_marker():
    text = literal.literal_text(BIG)
    assert text.plain.startswith(BIG[:100])
    assert f"[+{len(BIG) - len(BIG[:literal.CAP].rstrip()):,} characters]" in text.plain
    assert len(text.plain) < literal.CAP + 40


def test_a_long_value_shortened_to_one_line_keeps_its_markers_whole():
    from docket.tui.widgets.card_lines import shorten
    right = BIG[:5000] + "CHANGED" + BIG[5007:]
    for value in (literal.literal_text(BIG), paired(BIG, right, "longtext", PLAIN)[1]):
        for width in (28, 40, 80):
            line = shorten(value, width).plain
            assert len(line) <= width and "…" in line, line
            # a marker is whole or gone: never "…7 characters]", a count that is not there
            for piece in ("characters]", "[+", "characters] …"):
                if piece in line:
                    assert literal.CUT_MARK.search(line) or literal.LEAD_MARK.match(line), line
    assert shorten(literal.literal_text(BIG), 28).plain.endswith(
        f" … [+{len(BIG) - len(BIG[:literal.CAP].rstrip()):,} characters]")


def test_a_word_too_long_for_its_line_breaks_after_a_mark():
    # Folded at the edge of a card at 80 columns (26 cells), an e-mail one cell too long read
    # 'desmelle.remion@example.ne' over a lone 't', a domain that looked mistyped
    from rich.cells import cell_len

    from docket.tui.widgets.card_lines import wrap
    _, right = paired("grees.remion@example.net", "desmelle.remion@example.net", "code",
                         PLAIN)
    lines = wrap(right, 26)
    assert [line.plain for line in lines] == ["desmelle.remion@example.", "net"]
    # the highlights go with their characters: the differing start, nothing in 'net'
    assert right.spans and lines[0].spans == right.spans and not lines[1].spans
    # breaking after a mark only past a third of the line; else at the edge, as before
    assert [x.plain for x in wrap(Text("a@" + "b" * 30), 26)] == ["a@" + "b" * 24, "b" * 6]
    assert [x.plain for x in wrap(Text("x" * 60), 26)] == ["x" * 26, "x" * 26, "x" * 8]
    # a space comes first; wide characters are counted in cells
    assert [x.plain for x in wrap(Text("Flat 5, " + "y" * 30), 26)] == ["Flat 5,", "y" * 26,
                                                                        "y" * 4]
    assert all(cell_len(x.plain) <= 15 for x in wrap(Text("山田太郎" * 10), 15))
    assert [x.plain for x in wrap(Text("one\n" + "z" * 30), 26)] == ["one", "z" * 26, "z" * 4]


def test_long_value_window_holds_the_first_difference():
    right = BIG[:5000] + "CHANGED" + BIG[5007:]
    left_text, right_text = paired(BIG, right, "longtext", PLAIN)
    assert "CHANGED" in right_text.plain
    assert right_text.plain.startswith("[") and "characters] …" in right_text.plain
    assert len(right_text.plain) < literal.CAP + 80
    assert any(span.style == PLAIN.differs for span in right_text.spans)
    assert "[+" in left_text.plain


@settings(max_examples=80, deadline=None)
@given(st.text(max_size=60))
def test_nothing_unsafe_survives(value: str):
    shown = literal.literal_text(value, cap=40).plain
    assert not any(unicodedata.category(c) in UNSAFE for c in shown)
    assert len(shown) <= 10 * 40 + 40


def test_character_highlights_mark_what_differs():
    left, right = differing("14 Larch Rise", "14 Larch Rd")
    assert [c for c, f in zip("14 Larch Rise", left, strict=True) if f] == list("ise")
    assert [c for c, f in zip("14 Larch Rd", right, strict=True) if f] == ["d"]
    assert differing("same", "same") == ([False] * 4, [False] * 4)
    left, right = differing("Toby Tarncombe", "Kasimira Dąbiński")  # no confetti
    assert all(left) and all(right)


def test_long_text_is_compared_token_by_token():
    a = "the quick brown fox jumps over the lazy dog"
    b = "the quick brown cat jumps over the lazy dog"
    left, right = differing(a, b, tokens=True)
    assert "".join(c for c, f in zip(a, left, strict=True) if f) == "fox"
    assert "".join(c for c, f in zip(b, right, strict=True) if f) == "cat"


@settings(max_examples=80, deadline=None)
@given(st.text(max_size=30), st.text(max_size=30), st.booleans())
def test_unhighlighted_characters_are_common_to_both(a: str, b: str, tokens: bool):
    lf, rf = differing(a, b, tokens)
    assert len(lf) == len(a) and len(rf) == len(b)
    keep_a = "".join(c for c, f in zip(a, lf, strict=True) if not f)
    keep_b = "".join(c for c, f in zip(b, rf, strict=True) if not f)
    assert keep_a == keep_b
    if a == b:
        assert not any(lf)


def test_masking_hides_the_middle_and_keeps_the_shape():
    assert masked("k.nowak@example.net") == "k.••••k@example.net"
    assert masked("07700 900431") == "07••• ••••31"
    assert masked("Katarzyna Nowak") == "K•••••••a N•••k"
    assert parse_mask(" email, phone ,") == [" email, phone ,"]  # split by expand_mask
    assert parse_mask(["email", "last, first"]) == ["email", "last, first"]
    assert Mask.of(["Email"]).applies("email") and not Mask.of(["email"]).applies("phone")


@settings(max_examples=80, deadline=None)
@given(st.text(max_size=40))
def test_masking_never_hides_spaces_or_changes_length(value: str):
    flags = mask_flags(value)
    assert len(flags) == len(value)
    assert not any(f for c, f in zip(value, flags, strict=True) if c.isspace() or c == "@")


def test_masked_differences_stay_highlighted():
    left, right = paired("07700 900431", "07700 900413", "code", PLAIN, mask=True)
    assert MASK_CHAR in left.plain and left.plain.endswith("31")
    hot = [left.plain[s.start:s.end] for s in left.spans if s.style == PLAIN.differs]
    assert "".join(hot) == "31"
    left, right = paired("anna.berg@example.org", "anna.borg@example.org", "code", PLAIN,
                         mask=True)
    hot = [right.plain[s.start:s.end] for s in right.spans if s.style == PLAIN.differs]
    assert hot and set("".join(hot)) == {MASK_CHAR}  # hidden, but where it differs shows


def test_missing_is_shown_as_missing():
    assert render(None, PLAIN).plain == "— missing —"
    left, right = paired(None, "x", "name", PLAIN)
    assert left.plain == "— missing —" and right.plain == "x"


@pilot_test
async def test_hostile_records_render_literally_at_both_sizes(review_hostile_master, review_app,
                                                             tmp_path):
    for size in ((80, 24), (120, 40)):
        folder = tmp_path / f"{size[0]}"
        folder.mkdir()
        app = review_app(copy_project(review_hostile_master, folder))
        async with app.run_test(size=size) as pilot:
            await pilot.pause()
            await app.workers.wait_for_complete()
            seen = ""
            for _ in range(4):  # every pair of the project
                await pilot.pause()
                seen += screen_text(app)
                svg = app.export_screenshot()
                for raw in ("\x1b", "\u202e", "\x00"):
                    assert raw not in svg
                screen = app.screen
                assert screen.query_one(StatusLine).region.y == 0
                assert screen.query_one(KeyBar).region.y == size[1] - 1
                assert screen.query_one(PairCardView).region.right <= size[0]
                await pilot.press("x")
                await pilot.pause()
                screen.query_one("#card-box").scroll_end(animate=False)  # extras come last
                await pilot.pause()
                seen += screen_text(app)
                await pilot.press("x", "s")
            expected = ["[bold red]x[/]", "\\x1b[2J", "⟨U+202E⟩", "\\x00", "[i]ledger[/i]",
                        "\\x1b]8;;", "characters]"]
            if size[0] >= 120:  # at 80 columns the longest value wraps over two lines
                expected.append("[link=https://example.org]y[/]")
            for value in expected:
                assert value in seen, (size, value)


def test_no_color_palette_uses_attributes_not_colours(monkeypatch, review_sample, review_app):
    monkeypatch.setenv("NO_COLOR", "1")
    app = review_app(review_sample)
    assert app.no_color
    palette = Palette.from_variables(app.get_css_variables(), app.no_color)
    assert palette.differs.reverse and palette.differs.color is None


def test_equal_by_comparison_but_different_text_is_underlined_not_lit():
    left, right = paired("solvi_rossen@example.net", "solvirossen@example.net", "code", PLAIN,
                         quiet=True)
    marked = [left.plain[s.start:s.end] for s in left.spans if s.style == PLAIN.quiet +
              PLAIN.subtle]
    assert marked == ["_"] and not any(s.style == PLAIN.differs for s in right.spans)
    left, right = paired("1963-10-03", "03/10/1963", "date", PLAIN, quiet=True)
    assert all(s.style == PLAIN.quiet for s in left.spans + right.spans)


def test_a_missing_value_shows_the_factor_the_model_gives_it() -> None:
    # The card showed '—' for every missing value, yet after a refit the ranker can weigh
    # one (the sample: born missing x2), so the card's factors did not multiply out to the odds.
    from docket.tui.widgets.pair_card import factor_cell

    assert factor_cell(0.0, PLAIN, missing=True).plain == "—"  # Fellegi–Sunter: no evidence
    assert factor_cell(math.log(2.0), PLAIN, missing=True).plain == "×2"
    assert factor_cell(-math.log(3.0), PLAIN, missing=True).plain == "÷3"


def test_a_value_the_kind_cannot_read_is_named_not_called_missing() -> None:
    # 'ca. 120' beside '120' in a number field: the level is 'missing', and the card showed
    # both values with 'missing' under them, which the reviewer could not square.
    from docket.core.types import FieldComparison, PairCard
    from docket.tui.widgets.pair_card import CardOptions, card_text

    def card(left: str | None) -> PairCard:
        row = FieldComparison(field="price", kind="number", left=left, right="120",
                              similarity=None, level=4, level_name="missing", contribution=0.0)
        return PairCard(pair_id=1, left_id="a1", right_id="b1", probability=0.5, log_odds=0.0,
                        base_log_odds=0.0, reason="uncertain", fields=(row,))

    for stacked, width in ((True, 60), (False, 100)):
        opts = CardOptions(stacked=stacked)
        text, _ = card_text(card("ca. 120"), opts, width)
        assert "no number" in text.plain and "missing" not in text.plain
        text, _ = card_text(card(None), opts, width)
        assert "no number" not in text.plain and "missing" in text.plain

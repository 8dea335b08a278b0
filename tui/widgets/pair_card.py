"""The pair card: one aligned row per compared field, left beside right (or stacked)."""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field, replace

from rich.text import Text
from textual.containers import VerticalScroll
from textual.widget import Widget
from textual.widgets import Static

from docket.core import factor_text
from docket.core.types import FieldComparison, FieldSpec, PairCard

from .. import literal
from ..diff import PLAIN, Palette, paired
from ..masking import Mask
from .card_lines import BAR_CELLS, SHORTENED, Columns, Lines, wrap

STACK_BELOW = 84  # card widths below this put the right value under the left one
EIGHTHS = " ▏▎▍▌▋▊▉"
SHORT_LEVELS = {"day/month swapped": "d/m swap", "within a month": "≤ month",
                "exact, rare": "rare", "exact, common": "common",
                "close, swapped": "swapped"}  # names in each other's columns (name_swap)


@dataclass(frozen=True)
class CardOptions:
    """How to draw a card, apart from the card itself."""

    palette: Palette = PLAIN
    mask: Mask = field(default_factory=Mask)
    show_extra: bool = False
    stacked: bool = False
    full_values: bool = False  # wrap every long value, even when the card must then scroll
    # each field's values read as missing ('N/A', 'XX1 1XX'), so that the card can say so
    placeholders: Mapping[str, frozenset[str]] = field(default_factory=dict)


def placeholders_of(fields: Iterable[FieldSpec]) -> dict[str, frozenset[str]]:
    """The values each field reads as missing, for :class:`CardOptions`."""
    return {f.name: frozenset(f.missing) for f in fields if f.missing}


def similarity_bar(sim: float | None, cells: int = BAR_CELLS) -> str:
    """``0.83 ████▏`` style: the number and a bar of ``cells`` cells in eighths."""
    if sim is None:
        return "   —"
    eighths = round(max(0.0, min(1.0, sim)) * cells * 8)
    full, part = divmod(eighths, 8)
    bar = "█" * full + (EIGHTHS[part] if part else "")
    return f"{sim:4.2f} {bar:<{cells}}"


def factor_cell(part: float, palette: Palette, missing: bool = False) -> Text:
    """How much this field multiplies the odds ("×12", "÷3.5"). A missing value is no
    evidence to Fellegi–Sunter ("—"); the refit's ranker may weigh it by what labels showed,
    and then its factor is shown, or the card's factors would not multiply out to the odds."""
    text = factor_text(part)
    if missing and text == "×1":
        return Text("—", palette.muted)
    if text == "×1":
        return Text(text, palette.muted)
    return Text(text, palette.positive if part > 0 else palette.negative)


UNREAD = {"number": "no number", "date": "no date"}


def _level_text(row: FieldComparison, placeholders: frozenset[str] = frozenset()) -> str:
    """The level as the card names it. 'missing' where both sides hold text means a value the
    field's kind cannot read ('ca. 120' as a number), or one that stands for no value ('N/A'):
    it counts as missing, but the reviewer sees two values under the word 'missing' and
    cannot tell why. A placeholder is named so, 'no value': 'unread' beside 'N/A' said nothing
    of it, and 'placeholder' was cut to 'placehol…' in the 9 cells of a card at 80 columns."""
    both = bool((row.left or "").strip()) and bool((row.right or "").strip())
    if row.level_name == "missing" and both:
        if {(row.left or "").strip(), (row.right or "").strip()} & placeholders:
            return "no value"
        return UNREAD.get(row.kind, "unread")
    return SHORT_LEVELS.get(row.level_name, row.level_name)


def _is_quiet(row: FieldComparison) -> bool:
    return (row.level_name.startswith("exact") and row.left is not None
            and row.right is not None)


def _empty_on_both(rows: Iterable[FieldComparison]) -> list[str]:
    """The fields that neither record holds and that move no odds, when two or more: in a
    sparse table (a supplier register of forty columns, most of them empty) the card was
    rows of '— missing —' beside '— missing —', and the one field holding a value was below
    the screen's edge at 80x24. They go on one line; a field the ranker weighs missing, its
    factor not x1, keeps its row, so that the factors shown still multiply out to the odds."""
    names = [r.field for r in rows if not (r.left or "").strip() and not (r.right or "").strip()
             and factor_text(r.contribution) == "×1"]
    return names if len(names) >= 2 else []


def _empty_line(names: list[str], palette: Palette) -> Text:
    """'3 fields missing on both: fax, web, vat', wrapped to the card's width."""
    line = Text(f"{len(names)} fields missing on both: ", palette.muted)
    for i, name in enumerate(names):
        if i:
            line.append(", ", palette.muted)
        line.append_text(literal.record_id(name, 24, escape_style=palette.escape))
    return line


def _masked(row: FieldComparison, mask: Mask) -> bool:
    return bool(mask) and mask.applies(row.field)


def _name(name: str, quiet: bool, palette: Palette, width: int = 14) -> Text:
    """A field's name in its column, its middle left out where it is longer: cut at the end,
    'customer_address_line_1' and '..._2' both read 'customer_addr…'."""
    text = literal.record_id(name, width, escape_style=palette.escape)
    text.stylize(palette.quiet if quiet else palette.heading)
    return text


def card_text(card: PairCard, opts: CardOptions, width: int,
              max_lines: int | None = None) -> tuple[Text, int]:
    """The card as one ``Text`` of fixed-width lines, and its number of lines.

    With ``max_lines`` (the room on screen), long values wrap only while the card still fits;
    past that the tallest rows are shortened to one line with '…' and a last line says so,
    unless ``opts.full_values`` asks for every value in full. Values are built literally (see
    :mod:`docket.tui.diff`); nothing here parses markup.
    """
    p = opts.palette
    cols = Columns.fit(width, [f.field for f in card.fields], opts.stacked)
    out = Lines(cols, p.muted)
    first, second = card.sides
    marks = (first[0].upper(), second[0].upper())  # L and R, or F and S
    head = [Text(f"{first} / {second}", p.muted)] if cols.stacked else [
        Text(first, p.muted), Text(second, p.muted)]
    out.add(Text("field", p.muted), Text(" "), head, [Text("sim", p.muted)],
            Text("odds", p.muted))
    cells = 3 if cols.stacked else BAR_CELLS
    empty = _empty_on_both(card.fields)
    for row in card.fields:
        if row.field in empty:
            continue
        quiet = _is_quiet(row)
        missing = row.left is None or row.right is None
        left, right = paired(row.left, row.right, row.kind, p,
                             mask=_masked(row, opts.mask), quiet=quiet)
        name = _name(row.field, quiet, p, cols.name)
        sim = Text(similarity_bar(row.similarity, cells), p.quiet if quiet else p.muted)
        weight = factor_cell(row.contribution, p, missing)
        level_name = "" if quiet else _level_text(row, opts.placeholders.get(row.field,
                                                                             frozenset()))
        level = Text(level_name, p.muted)
        if cols.stacked:
            out.add(name, Text(marks[0], p.muted), [left], [sim], weight)
            out.add(None, Text(marks[1], p.muted), [right], [level] if level_name else [], None)
        else:
            shown = [sim, level] if level_name not in ("different", "missing") and \
                level_name else [sim]
            out.add(name, None, [left, right], shown, weight)
    for line in wrap(_empty_line(empty, p), width) if empty else []:
        out.line(line, width)
    if opts.show_extra:
        _extra_rows(out, card, opts, width)
    too_tall = max_lines is not None and out.height() > max_lines
    if too_tall and not opts.full_values and out.fit(max_lines - 1):  # type: ignore[operator]
        out.line(Text(SHORTENED, p.muted), width)
    text = out.render()
    return text, out.count


def _extra_rows(out: Lines, card: PairCard, opts: CardOptions, width: int) -> None:
    p = opts.palette
    marks = tuple(side[0].upper() for side in card.sides)
    keys = list(dict.fromkeys([*card.left_extra, *card.right_extra]))
    heading = "not compared" if keys else "not compared: no other columns"
    out.line(Text(heading, p.muted), width)
    absent = Text("(no such column)", p.missing)
    for key in keys:
        masked = bool(opts.mask) and opts.mask.applies(key)
        lv = card.left_extra.get(key)
        rv = card.right_extra.get(key)
        left, right = paired(lv, rv, "text", p, mask=masked)
        if key not in card.left_extra:
            left = absent
        if key not in card.right_extra:
            right = absent
        name = _name(key, False, p, out.cols.name)
        if out.cols.stacked:
            out.add(name, Text(marks[0], p.muted), [left], [], None)
            out.add(None, Text(marks[1], p.muted), [right], [], None)
        else:
            out.add(name, None, [left, right], [], None)


def card_title(card: PairCard, palette: Palette, width: int = 0) -> Text:
    """'pair 12 · L-17 ↔ R-4' for a box ``width`` cells wide (0: not laid out yet). The ids
    share what the box's top edge leaves (24 cells each at most): at 80 columns a title of
    two long ids ran past it and the border cut the right id at its end, where long ids differ.
    """
    title = Text("pair ", palette.muted)
    title.append(str(card.pair_id), palette.heading)
    title.append(" · ", palette.muted)
    room = (width - 6 - title.cell_len - 3) // 2 if width else 24  # corners and ' ↔ '
    cells = max(8, min(24, room))
    title.append_text(literal.record_id(card.left_id, cells, palette.escape))
    title.append(" ↔ ", palette.muted)
    title.append_text(literal.record_id(card.right_id, cells, palette.escape))
    return title


class CardBox(VerticalScroll):
    """The scrolling box around the pair card, its title the pair and its records' ids.

    The title's ids are cut to the box's width, again whenever the box is resized (also
    while a modal screen is over it): resized from 200 columns to 80, the title kept its
    wide ids and the border cut the right one at its end ('R-xxxxxxxxxx……').
    """

    _titled: tuple[PairCard, Palette] | None = None
    _title_key: tuple[str, Palette] | None = None

    def title_for(self, card: PairCard | None, palette: Palette = PLAIN,
                  text: str = "") -> str:
        """Title the box for ``card`` (None: ``text`` instead); the title's text."""
        self._titled = None if card is None else (card, palette)
        title = Text(text) if card is None else card_title(card, palette, self.size.width)
        key = (title.plain, palette)  # a new theme repaints it in its colours
        if key != self._title_key:  # the same title is not set again on every key
            self._title_key = key
            self.border_title = title
        return title.plain

    @property
    def title_text(self) -> str:
        return "" if self._title_key is None else self._title_key[0]

    def on_resize(self) -> None:
        if self._titled is not None:
            self.title_for(*self._titled)


class PairCardView(Static):
    """Shows one :class:`PairCard`; re-lays itself out (side by side or stacked) on resize."""

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__("", id=id)
        self._card: PairCard | None = None
        self._opts = CardOptions()
        self._message: Text | None = None
        self._laid_out: tuple[int, int] = (0, 0)  # (width, lines) of the text last shown
        self._room = 0
        self._full = False  # kept from pair to pair, like the reviewer's other view choices

    @property
    def content_width(self) -> int:
        return self.size.width or max(20, self.app.size.width - 34)

    @property
    def room(self) -> int:
        """Lines the card can show without scrolling: its box's height, or a guess before
        the first layout (the screen less the status line, key bar and borders)."""
        box = self.parent
        height = box.scrollable_content_region.height if isinstance(box, Widget) else 0
        return height if height > 0 else max(5, self.app.size.height - 4)

    @property
    def stacked(self) -> bool:
        return self.content_width < STACK_BELOW

    def show(self, card: PairCard, opts: CardOptions) -> None:
        self._card, self._message = card, None
        self._opts = replace(opts, full_values=self._full)
        self._paint()

    def toggle_full_values(self) -> None:
        """Every long value in full (the card may scroll), or shortened to fit (the default)."""
        self._full = not self._full
        self._opts = replace(self._opts, full_values=self._full)
        self._paint()

    def show_message(self, message: Text) -> None:
        self._card, self._message = None, message
        self._laid_out = (0, 0)
        self.update(message)

    def repaint(self) -> None:
        self._paint()

    def _paint(self) -> None:
        if self._card is None:
            if self._message is not None:
                self.update(self._message)
            return
        width = self.content_width
        opts = replace(self._opts, stacked=width < STACK_BELOW)
        self._opts = opts
        self._room = self.room
        text, lines = card_text(self._card, opts, width, self._room)
        # Same width and number of lines: the widget's size cannot change, skip the layout.
        layout = (width, lines) != self._laid_out
        self._laid_out = (width, lines)
        self.update(text, layout=layout)

    def on_resize(self) -> None:
        self.refit()

    def refit(self) -> None:
        """Lay the card out again if its width or the room for it has changed (resizes)."""
        if self._card is not None and (self._laid_out[0], self._room) != (self.content_width,
                                                                          self.room):
            self._paint()

"""The pair card: one aligned row per compared field, left beside right (or stacked)."""

from __future__ import annotations

import io
from dataclasses import dataclass, field

from rich.console import Console
from rich.text import Text
from textual.widgets import Static

from docket.core.types import FieldComparison, PairCard

from .. import literal
from ..diff import PLAIN, Palette, paired
from ..masking import Mask

STACK_BELOW = 84  # card widths below this put the right value under the left one
BAR_CELLS = 5
EIGHTHS = " ▏▎▍▌▋▊▉"
SHORT_LEVELS = {"day/month swapped": "d/m swap", "within a month": "≤ month"}


@dataclass(frozen=True)
class CardOptions:
    """How to draw a card, apart from the card itself."""

    palette: Palette = PLAIN
    mask: Mask = field(default_factory=Mask)
    show_extra: bool = False
    stacked: bool = False


def similarity_bar(sim: float | None, cells: int = BAR_CELLS) -> str:
    """``0.83 ████▏`` style: the number and a bar of ``cells`` cells in eighths."""
    if sim is None:
        return "   —"
    eighths = round(max(0.0, min(1.0, sim)) * cells * 8)
    full, part = divmod(eighths, 8)
    bar = "█" * full + (EIGHTHS[part] if part else "")
    return f"{sim:4.2f} {bar:<{cells}}"


def weight_text(weight: float, palette: Palette, missing: bool = False) -> Text:
    if missing or abs(weight) < 0.005:
        return Text("  0.0" if not missing else "    0", palette.muted)
    style = palette.positive if weight > 0 else palette.negative
    return Text(f"{weight:+5.1f}", style)


def _is_quiet(row: FieldComparison) -> bool:
    return row.level == 0 and row.left is not None and row.right is not None


def _masked(row: FieldComparison, mask: Mask) -> bool:
    return bool(mask) and mask.applies(row.field)


def _name(name: str, quiet: bool, palette: Palette, width: int = 14) -> Text:
    text = literal.one_line(name, width, escape_style=palette.escape)
    text.stylize(palette.quiet if quiet else palette.heading)
    return text


@dataclass(frozen=True)
class Columns:
    """Cell widths of the card's columns for one content width."""

    name: int  # the field-name column
    value: int  # each of left and right (side by side), or the one value column (stacked)
    sim: int
    weight: int = 5
    stacked: bool = False

    @classmethod
    def fit(cls, width: int, names: list[str], stacked: bool) -> Columns:
        name = max(5, min(14, max((len(n) for n in names), default=5)))
        cells = 3 if stacked else BAR_CELLS
        sim = 6 + cells
        fixed = name + sim + 5 + 4 + (1 if stacked else 0)  # four gaps; stacked: L/R marker
        value = max(8, width - fixed) if stacked else max(8, (width - fixed) // 2)
        return cls(name, value, sim, 5, stacked)


_WRAP_CONSOLE = Console(file=io.StringIO(), width=400, color_system=None, legacy_windows=False)


def _wrap(text: Text, width: int) -> list[Text]:
    if text.cell_len <= width and "\n" not in text.plain:
        return [text]
    return list(text.wrap(_WRAP_CONSOLE, width, overflow="fold"))


def _cell(text: Text | None, width: int, right: bool = False) -> Text:
    if text is None or not text.plain:
        return Text(" " * width)
    out = text.copy()
    out.truncate(width, overflow="ellipsis")
    pad = " " * max(0, width - out.cell_len)
    return Text(pad).append_text(out) if right else out.append(pad)


class _Lines:
    """The card's text, one fixed-width line at a time (wrapped here, not by the widget)."""

    def __init__(self, cols: Columns) -> None:
        self.cols = cols
        self.text = Text(no_wrap=True, overflow="crop", end="")
        self.count = 0

    def line(self, text: Text, width: int) -> None:
        """One line across the whole card (a section heading)."""
        if self.count:
            self.text.append("\n")
        self.count += 1
        self.text.append_text(_cell(text, width))

    def add(self, name: Text | None, marker: Text | None, cells: list[Text | None],
            sim: list[Text], weight: Text | None) -> None:
        c = self.cols
        wrapped = [_wrap(cell, c.value) if cell is not None else [] for cell in cells]
        height = max([1, len(sim), *(len(w) for w in wrapped)])
        for i in range(height):
            if self.count:
                self.text.append("\n")
            self.count += 1
            self.text.append_text(_cell(name if i == 0 else None, c.name))
            self.text.append(" ")
            if c.stacked:
                self.text.append_text(_cell(marker if i == 0 else None, 1))
                self.text.append(" ")
            for lines in wrapped:
                self.text.append_text(_cell(lines[i] if i < len(lines) else None, c.value))
                self.text.append(" ")
            self.text.append_text(_cell(sim[i] if i < len(sim) else None, c.sim))
            self.text.append(" ")
            self.text.append_text(_cell(weight if i == 0 else None, c.weight, right=True))


def card_text(card: PairCard, opts: CardOptions, width: int) -> tuple[Text, int]:
    """The card as one ``Text`` of fixed-width lines, and its number of lines.

    Values are built literally (see :mod:`docket.tui.diff`); nothing here parses markup.
    """
    p = opts.palette
    cols = Columns.fit(width, [f.field for f in card.fields], opts.stacked)
    out = _Lines(cols)
    head = [Text("left / right", p.muted)] if cols.stacked else [Text("left", p.muted),
                                                                   Text("right", p.muted)]
    out.add(Text("field", p.muted), Text(" "), head, [Text("sim", p.muted)],
            Text("wt", p.muted))
    cells = 3 if cols.stacked else BAR_CELLS
    for row in card.fields:
        quiet = _is_quiet(row)
        missing = row.left is None or row.right is None
        left, right = paired(row.left, row.right, row.kind, p,
                             mask=_masked(row, opts.mask), quiet=quiet)
        name = _name(row.field, quiet, p)
        sim = Text(similarity_bar(row.similarity, cells), p.quiet if quiet else p.muted)
        weight = weight_text(row.weight, p, missing)
        level_name = "" if quiet else SHORT_LEVELS.get(row.level_name, row.level_name)
        level = Text(level_name, p.muted)
        if cols.stacked:
            out.add(name, Text("L", p.muted), [left], [sim], weight)
            out.add(None, Text("R", p.muted), [right], [level] if level_name else [], None)
        else:
            shown = [sim, level] if row.level_name not in ("different", "missing") and \
                level_name else [sim]
            out.add(name, None, [left, right], shown, weight)
    if opts.show_extra:
        _extra_rows(out, card, opts, width)
    return out.text, out.count


def _extra_rows(out: _Lines, card: PairCard, opts: CardOptions, width: int) -> None:
    p = opts.palette
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
        name = _name(key, False, p)
        if out.cols.stacked:
            out.add(name, Text("L", p.muted), [left], [], None)
            out.add(None, Text("R", p.muted), [right], [], None)
        else:
            out.add(name, None, [left, right], [], None)


def card_title(card: PairCard, palette: Palette) -> Text:
    title = Text("pair ", palette.muted)
    title.append(str(card.pair_id), palette.heading)
    title.append(" · ", palette.muted)
    title.append_text(literal.one_line(card.left_id, 24, palette.escape))
    title.append(" ↔ ", palette.muted)
    title.append_text(literal.one_line(card.right_id, 24, palette.escape))
    return title


class PairCardView(Static):
    """Shows one :class:`PairCard`; re-lays itself out (side by side or stacked) on resize."""

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__("", id=id)
        self._card: PairCard | None = None
        self._opts = CardOptions()
        self._message: Text | None = None
        self._laid_out: tuple[int, int] = (0, 0)  # (width, lines) of the text last shown

    @property
    def content_width(self) -> int:
        return self.size.width or max(20, self.app.size.width - 34)

    @property
    def stacked(self) -> bool:
        return self.content_width < STACK_BELOW

    def show(self, card: PairCard, opts: CardOptions) -> None:
        self._card, self._opts, self._message = card, opts, None
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
        opts = CardOptions(self._opts.palette, self._opts.mask, self._opts.show_extra,
                           width < STACK_BELOW)
        self._opts = opts
        text, lines = card_text(self._card, opts, width)
        # Same width and number of lines: the widget's size cannot change, skip the layout.
        layout = (width, lines) != self._laid_out
        self._laid_out = (width, lines)
        self.update(text, layout=layout)

    def on_resize(self) -> None:
        if self._card is not None and self._laid_out[0] != self.content_width:
            self._paint()

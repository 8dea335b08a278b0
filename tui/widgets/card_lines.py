"""The pair card's lines: column widths, wrapping, shortening with '…', and fitting the room.

Every line is built here at a fixed width, so the widget never wraps anything itself and a
value's highlights (see :mod:`docket.tui.diff`) survive wrapping and shortening alike.
"""

from __future__ import annotations

import io
import re
from dataclasses import dataclass

from rich.cells import cell_len
from rich.console import Console
from rich.style import Style
from rich.text import Text

from .. import literal

BAR_CELLS = 5
MIN_BODY = 4  # cells of a long value kept beside its markers; fewer, and the markers go


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
        # cells, not characters: a column of CJK names was half as wide as its names
        name = max(5, min(14, max((cell_len(literal.visible(n)) for n in names), default=5)))
        cells = 3 if stacked else BAR_CELLS
        sim = 6 + cells
        fixed = name + sim + 5 + 4 + (1 if stacked else 0)  # four gaps; stacked: L/R marker
        value = max(8, width - fixed) if stacked else max(8, (width - fixed) // 2)
        return cls(name, value, sim, 5, stacked)


_WRAP_CONSOLE = Console(file=io.StringIO(), width=400, color_system=None, legacy_windows=False)


MARKS = frozenset("@.-_/,;:")  # a word too long for its line is broken after one of these
SPACES = re.compile(r"\s+")


def wrap(text: Text, width: int) -> list[Text]:
    if text.cell_len <= width and "\n" not in text.plain:
        return [text]
    if all(cell_len(word) <= width for word in SPACES.split(text.plain)):
        return list(text.wrap(_WRAP_CONSOLE, width, overflow="fold"))
    return [piece for line in text.split("\n", allow_blank=True)
            for piece in _broken(line, width)]


def _broken(line: Text, width: int) -> list[Text]:
    """``line`` in pieces of at most ``width`` cells, broken after a space where one is on
    the line, else after a mark ('@', '.', '-', ...) past its first third, else at the edge.
    Folded at the edge, an e-mail one cell too long read 'desmelle.remion@example.ne' with a
    lone 't' under it, a domain that looked mistyped beside 'example.net' on the other side."""
    plain, cuts = line.plain, []
    start, cells, after_space, after_mark = 0, 0, None, None
    for i, char in enumerate(plain):
        wide = cell_len(char)
        if cells + wide > width and i > start:
            at = after_space or (after_mark if after_mark and after_mark - start > width // 3
                                 else i)
            cuts.append(at)
            start, cells = at, cell_len(plain[at:i])
            after_space = after_mark = None
            for j in range(at, i):  # breaks on the part carried to the new line
                after_space, after_mark = _after(plain[j], j, after_space, after_mark)
        cells += wide
        after_space, after_mark = _after(char, i, after_space, after_mark)
    pieces = list(line.divide(cuts))
    for piece in pieces:
        piece.rstrip()
    return pieces


def _after(char: str, i: int, space: int | None, mark: int | None) -> tuple[int | None, int | None]:
    if char == " ":
        return i + 1, mark
    return space, (i + 1 if char in MARKS else mark)


def shorten(text: Text, width: int, mark_style: str | Style = "") -> Text:
    """``text`` in at most ``width`` cells, its middle replaced by '…' when it is longer.

    The middle goes, not the end: where two values differ is as often at the end (an e-mail's
    domain, a house number) as at the start.
    """
    text = Text(text.plain.replace("\n", " "), spans=text.spans)  # one line, same highlights
    if text.cell_len <= width:
        return text
    # A long value's markers stay whole: cut in two, " … [+99,407 characters]" read as "…7
    # characters]", a count that is not there
    plain = text.plain
    lead, cut = literal.LEAD_MARK.match(plain), literal.CUT_MARK.search(plain)
    front, back = (lead.end() if lead else 0), (cut.start() if cut else len(plain))
    room = width - cell_len(plain[:front]) - cell_len(plain[back:])
    if lead or cut:
        # The part shown of a long value ends (or starts) where the marker is, not where the
        # value does: its middle cut, 'lor…m … [+4,351 characters]' showed its 600th
        # character as if it were the last. It is cut on the marker's side instead.
        body = text[front:back]
        if room >= MIN_BODY:
            inner, before, after = room, text[:front], text[back:]
        else:  # no room for the markers: an ellipsis stands where each was
            inner = width - bool(lead) - bool(cut)
            before = Text("…", mark_style) if lead else Text()
            after = Text("…", mark_style) if cut else Text()
        from_end = bool(lead) and not cut  # only the start is left out: keep the end
        n = literal.fill(body.plain[::-1] if from_end else body.plain, inner)
        kept = body[len(body.plain) - n:] if from_end else body[:n]
        if from_end:
            kept.left_crop(len(kept.plain) - len(kept.plain.lstrip(" ")))
        else:
            kept.rstrip()  # 'lorem  … [+4,351': the marker brings its own space
        return Text.assemble(before, kept, after)
    return literal.middle_cut(text, width, mark_style)


def cell(text: Text | None, width: int, right: bool = False) -> Text:
    if text is None or not text.plain:
        return Text(" " * width)
    out = text.copy()
    out.truncate(width, overflow="ellipsis")
    pad = " " * max(0, width - out.cell_len)
    return Text(pad).append_text(out) if right else out.append(pad)


@dataclass
class _Row:
    name: Text | None
    marker: Text | None
    cells: list[Text | None]
    sim: list[Text]
    weight: Text | None
    one_line: bool = False  # shortened with '…' instead of wrapped

    def height(self, value_width: int) -> int:
        wrapped = [] if self.one_line else [len(wrap(c, value_width)) for c in self.cells
                                            if c is not None]
        return max([1, len(self.sim), *wrapped])


class Lines:
    """The card's text, one fixed-width line at a time (wrapped here, not by the widget)."""

    def __init__(self, cols: Columns, mark_style: str | Style = "") -> None:
        self.cols = cols
        self.text = Text(no_wrap=True, overflow="crop", end="")
        self.count = 0
        self.rows: list[_Row | Text] = []  # a row, or a heading across the whole card
        self.mark_style = mark_style

    def line(self, text: Text, width: int) -> None:
        """One line across the whole card (a section heading)."""
        self.rows.append(cell(text, width))

    def add(self, name: Text | None, marker: Text | None, cells: list[Text | None],
            sim: list[Text], weight: Text | None) -> None:
        self.rows.append(_Row(name, marker, cells, sim, weight))

    def height(self) -> int:
        return sum(1 if isinstance(r, Text) else r.height(self.cols.value) for r in self.rows)

    def fit(self, max_lines: int) -> bool:
        """Shorten the tallest rows to one line until the card fits; True if any was."""
        rows = sorted((r for r in self.rows if isinstance(r, _Row)),
                      key=lambda r: -r.height(self.cols.value))
        changed = False
        for row in rows:
            if self.height() <= max_lines or row.height(self.cols.value) == 1:
                break
            row.one_line = changed = True
        return changed

    def _emit(self, text: Text) -> None:
        if self.count:
            self.text.append("\n")
        self.count += 1
        self.text.append_text(text)

    def render(self) -> Text:
        for row in self.rows:
            if isinstance(row, Text):
                self._emit(row)
            else:
                self._render_row(row)
        return self.text

    def _render_row(self, row: _Row) -> None:
        c = self.cols
        wrapped = [([] if cell is None else [shorten(cell, c.value, self.mark_style)]
                    if row.one_line else wrap(cell, c.value)) for cell in row.cells]
        height = max([1, len(row.sim), *(len(w) for w in wrapped)])
        for i in range(height):
            line = cell(row.name if i == 0 else None, c.name)
            line.append(" ")
            if c.stacked:
                line.append_text(cell(row.marker if i == 0 else None, 1))
                line.append(" ")
            for lines in wrapped:
                line.append_text(cell(lines[i] if i < len(lines) else None, c.value))
                line.append(" ")
            line.append_text(cell(row.sim[i] if i < len(row.sim) else None, c.sim))
            line.append(" ")
            line.append_text(cell(row.weight if i == 0 else None, c.weight, right=True))
            self._emit(line)


SHORTENED = "… shortened to fit; w shows every value in full"

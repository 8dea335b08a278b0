"""Record values shown as text, never interpreted.

Values reach the screen only as plain characters in a ``rich.text.Text`` (no markup parsing),
and every character a terminal or the layout could act on is replaced by a visible stand-in:
C0/C1 control characters (ESC, NUL, TAB, newline...) as ``\\x1b``-style escapes, and format
characters (BiDi overrides and isolates, zero-width characters, line separators) as
``⟨U+202E⟩``. Leading and trailing spaces are shown as ``·`` so that they can be seen. Very
long values are cut at ``CAP`` characters with a marker saying how much was left out.
"""

from __future__ import annotations

import re

from rich.cells import cell_len
from rich.style import Style, StyleType
from rich.text import Text

from .characters import is_plain, stand_in
from .characters import visible as visible  # re-exported: the note editor uses it

CAP = 600  # characters of one value shown on the pair card
EDGE_SPACE = "·"


def _style(style: StyleType) -> Style:
    return Style.parse(style) if isinstance(style, str) else style


def edge_spaces(value: str) -> tuple[int, int]:
    """How many spaces lead and trail ``value`` (a value of only spaces counts as leading)."""
    lead = len(value) - len(value.lstrip(" "))
    if lead == len(value):
        return lead, 0
    return lead, len(value) - len(value.rstrip(" "))


def append_literal(text: Text, value: str, style: StyleType = "",
                   escape_style: StyleType = "", start: int = 0, edges: tuple[int, int] = (0, 0),
                   full_length: int | None = None) -> None:
    """Append ``value`` to ``text`` literally, stand-ins carrying ``escape_style``.

    ``start``, ``edges`` and ``full_length`` let a caller append a value in pieces (one per
    highlight run) while still marking the leading/trailing spaces of the whole value.
    """
    if not value:
        return
    total = len(value) if full_length is None else full_length
    lead, trail = edges
    escape = _style(style) + _style(escape_style)
    edge_from = total - trail
    if is_plain(value) and start >= lead and start + len(value) <= edge_from:
        text.append(value, style)
        return
    run: list[str] = []
    for offset, char in enumerate(value):
        pos = start + offset
        shown = stand_in(char)
        if shown is None and char == " " and (pos < lead or pos >= edge_from):
            shown = EDGE_SPACE
        if shown is None:
            run.append(char)
            continue
        if run:
            text.append("".join(run), style)
            run = []
        text.append(shown, escape)
    if run:
        text.append("".join(run), style)


def capped(value: str, cap: int = CAP) -> tuple[str, int]:
    """The part of ``value`` that is shown, and how many characters were left out."""
    if len(value) <= cap:
        return value, 0
    shown = value[:cap].rstrip(" ")  # the marker brings its own space: 'lorem  … [+3,402'
    return shown, len(value) - len(shown)


def cut_marker(left_out: int) -> str:
    return f" … [+{left_out:,} characters]"


def lead_marker(left_out: int) -> str:
    """Before the part shown of a long value whose start is left out."""
    return f"[{left_out:,} characters] … "


# The two markers as they end and begin a shown value, so that shortening keeps them whole
CUT_MARK = re.compile(r" … \[\+[\d,]+ characters\]$")
LEAD_MARK = re.compile(r"^\[[\d,]+ characters\] … ")


def literal_text(value: str | None, style: StyleType = "", escape_style: StyleType = "bold",
                 cap: int = CAP, missing: str = "— missing —",
                 missing_style: StyleType = "italic") -> Text:
    """A whole value as a ``Text``: escaped, edge spaces marked, capped; None as missing."""
    text = Text(no_wrap=False, overflow="fold")
    if value is None:
        text.append(missing, missing_style)
        return text
    shown, left_out = capped(value, cap)
    lead, trail = edge_spaces(value)
    append_literal(text, shown, style, escape_style, edges=(lead, 0 if left_out else trail),
                   full_length=len(shown))
    if left_out:
        text.append(cut_marker(left_out), escape_style)
    return text


def one_line(value: str | None, width: int, escape_style: StyleType = "bold",
             missing: str = "— missing —") -> Text:
    """A value squeezed onto one line of at most ``width`` cells (for lists and titles)."""
    text = literal_text(value, escape_style=escape_style, cap=max(width * 2, 8), missing=missing)
    text.no_wrap = True
    text.truncate(width, overflow="ellipsis")
    return text


def middle_cut(text: Text, width: int, mark_style: StyleType = "") -> Text:
    """``text`` (one line) in at most ``width`` cells, its middle replaced by '…'."""
    if text.cell_len <= width:
        return text
    keep = max(1, width - 1)
    head = fill(text.plain, (keep + 1) // 2)
    tail = fill(text.plain[::-1], keep // 2)
    return Text.assemble(text[:head], ("…", mark_style), text[len(text.plain) - tail:])


def fill(chars: str, cells: int) -> int:
    """How many of ``chars``, from the start, fill at most ``cells`` cells."""
    used = n = 0
    for ch in chars:
        used += cell_len(ch)
        if used > cells:
            break
        n += 1
    return n


def record_id(value: str, width: int, escape_style: StyleType = "bold") -> Text:
    """A record's id on one line of at most ``width`` cells, its middle left out.

    Ids of 200 characters that differ only at their end ('L-xxxx…x-000073') were cut at the
    end, so that two records' ids read the same in a title or a list; the end stays now.
    """
    if len(value) > 4 * width:  # each end keeps 2 x width characters, more than it shows
        value = value[:2 * width] + value[-2 * width:]
    text = literal_text(value, escape_style=escape_style, cap=len(value))
    text.no_wrap = True
    return middle_cut(text, width)

"""Which characters of two values differ, and the two values as highlighted ``Text``.

The alignment comes from rapidfuzz's ``Indel.opcodes`` (insertions and deletions only, so a
changed stretch shows up on both sides); long text is aligned token by token so that a moved
or changed word lights up as a word rather than as scattered letters. All text is built with
``Text.append(value, style)`` through :mod:`docket.tui.literal`: record values are never
parsed as markup.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from rapidfuzz.distance import Indel
from rich.style import Style
from rich.text import Text

from . import literal
from .masking import MASK_CHAR, mask_flags

TOKENS_FROM = 80  # values longer than this (or of kind longtext) are compared token by token
FULL_DIFF = 20_000  # characters of each value aligned; past this a first difference is not sought
_TOKEN = re.compile(r"\s+|[^\s]+")


@dataclass(frozen=True)
class Palette:
    """Styles for painting values, taken from the app's theme (or plain for NO_COLOR)."""

    differs: Style  # characters present on one side only
    quiet: Style  # rows whose values are equal
    escape: Style  # stand-ins for control and format characters
    missing: Style
    positive: Style  # weights pushing towards match
    negative: Style
    muted: Style
    heading: Style
    subtle: Style  # what differs in the raw text of values the comparison found equal

    @classmethod
    def from_variables(cls, v: dict[str, str], no_color: bool = False) -> Palette:
        """Build from ``App.get_css_variables()``; with no colour, attributes carry meaning."""
        if no_color:
            return cls(Style(reverse=True, bold=True), Style(dim=True), Style(underline=True),
                       Style(italic=True, dim=True), Style(bold=True), Style(italic=True),
                       Style(dim=True), Style(bold=True), Style(underline=True))

        def colour(name: str, fallback: str) -> str:
            value = v.get(name, fallback)
            return value if re.fullmatch(r"#[0-9A-Fa-f]{6}", value) else fallback

        return cls(
            differs=Style(color=colour("text-warning", "#FFC473"),
                          bgcolor=colour("warning-muted", "#593E19"), bold=True),
            quiet=Style(color=colour("foreground-darken-3", "#A2A2A2"), dim=True),
            escape=Style(color=colour("text-error", "#D17E92"), bold=True),
            missing=Style(color=colour("foreground-darken-3", "#A2A2A2"), italic=True),
            positive=Style(color=colour("text-success", "#8AD4A1")),
            negative=Style(color=colour("text-error", "#D17E92")),
            muted=Style(color=colour("foreground-darken-3", "#A2A2A2")),
            heading=Style(color=colour("text-primary", "#57A5E2"), bold=True),
            subtle=Style(underline=True, color=colour("text-warning", "#FFC473")),
        )


PLAIN = Palette.from_variables({}, no_color=True)


def _spans(value: str, tokens: bool) -> list[tuple[int, int]]:
    if not tokens:
        return [(i, i + 1) for i in range(len(value))]
    return [m.span() for m in _TOKEN.finditer(value)]


def differing(left: str, right: str, tokens: bool = False) -> tuple[list[bool], list[bool]]:
    """Per character of each value: True where it is not part of the common alignment.

    A common stretch too short to mean anything (one letter, or one space between changed
    words) that sits between two changed stretches is counted as changed too, so that two
    unrelated names do not come out as confetti.
    """
    ls, rs = _spans(left, tokens), _spans(right, tokens)
    a = [left[s:e] for s, e in ls] if tokens else left
    b = [right[s:e] for s, e in rs] if tokens else right
    lf = [True] * len(left)
    rf = [True] * len(right)
    ops = [op for op in Indel.opcodes(a, b) if op.src_start < op.src_end
           or op.dest_start < op.dest_end]
    for k, op in enumerate(ops):
        if op.tag != "equal":
            continue
        inner = 0 < k < len(ops) - 1
        chars = ls[op.src_end - 1][1] - ls[op.src_start][0]
        trivial = (chars < 2 or left[ls[op.src_start][0]:ls[op.src_end - 1][1]].isspace())
        if inner and trivial:
            continue
        for i in range(ls[op.src_start][0], ls[op.src_end - 1][1]):
            lf[i] = False
        for i in range(rs[op.dest_start][0], rs[op.dest_end - 1][1]):
            rf[i] = False
    return lf, rf


def use_tokens(left: str, right: str, kind: str) -> bool:
    return kind == "longtext" or max(len(left), len(right)) > TOKENS_FROM


def window_start(differs: list[bool] | None, length: int, cap: int) -> int:
    """Where the shown part of a long value starts: at the top, unless its first difference
    would fall outside the part shown; then a little before that difference."""
    if length <= cap or not differs:
        return 0
    first = next((i for i, d in enumerate(differs) if d), 0)
    if first < cap * 3 // 4:
        return 0
    return max(0, min(first - cap // 4, length - cap))


def render(value: str | None, palette: Palette, *, differs: list[bool] | None = None,
           mask: bool = False, base: Style | None = None, cap: int = literal.CAP,
           hot: Style | None = None) -> Text:
    """One value as ``Text``: highlighted where ``differs``, masked, escaped and capped.

    A value longer than ``cap`` is shown in part, with markers for what is left out before
    and after; the part shown holds the value's first difference (see :func:`window_start`).
    """
    if value is None:
        return Text("— missing —", palette.missing)
    style = base or Style()
    start = window_start(differs, len(value), cap)
    shown = value[start:start + cap]
    if start + cap < len(value):  # cut here: the marker brings its own space
        shown = shown.rstrip(" ")
    left_out = len(value) - start - len(shown)
    flags = (differs or [])[start:start + cap]
    hide = mask_flags(shown) if mask else None
    lead, trail = literal.edge_spaces(value)
    edges = (max(0, lead - start), 0 if left_out else trail)
    text = Text(overflow="fold")
    if start:
        text.append(literal.lead_marker(start), palette.muted)
    hot = style + (hot or palette.differs)
    escape = palette.escape
    n = len(shown)

    def flag(k: int) -> bool:
        return k < len(flags) and bool(flags[k])

    i = 0
    while i < n:
        d = flag(i)
        h = bool(hide[i]) if hide else False
        j = i + 1
        while j < n and flag(j) == d and (bool(hide[j]) if hide else False) == h:
            j += 1
        piece = MASK_CHAR * (j - i) if h else shown[i:j]
        literal.append_literal(text, piece, hot if d else style, escape, start=i, edges=edges,
                               full_length=n)
        i = j
    if left_out:
        text.append(literal.cut_marker(left_out), palette.muted)
    return text


def paired(left: str | None, right: str | None, kind: str, palette: Palette, *,
           highlight: bool = True, mask: bool = False, quiet: bool = False,
           cap: int = literal.CAP) -> tuple[Text, Text]:
    """Both values of a field, each highlighted where it differs from the other.

    A ``quiet`` row (the comparison found the values equal) is drawn dim, and what still
    differs in the raw text (an underscore, casing, a ``+44``) is only underlined; dates are
    left alone there, since two ways of writing one date differ in nearly every character.
    """
    base = palette.quiet if quiet else None
    if quiet:
        highlight = highlight and kind != "date"
    if not highlight or left is None or right is None or left == right:
        return (render(left, palette, mask=mask, base=base, cap=cap),
                render(right, palette, mask=mask, base=base, cap=cap))
    a, b = left[:FULL_DIFF], right[:FULL_DIFF]
    lf, rf = differing(a, b, use_tokens(left, right, kind))
    hot = palette.subtle if quiet else palette.differs
    return (render(left, palette, differs=lf, mask=mask, base=base, cap=cap, hot=hot),
            render(right, palette, differs=rf, mask=mask, base=base, cap=cap, hot=hot))

"""The evidence panel: why the model thinks what it thinks about the pair on screen."""

from __future__ import annotations

import io
import textwrap
from dataclasses import dataclass

from rich.cells import cell_len
from rich.console import Console
from rich.text import Text
from textual.widgets import Static

from docket.core import factor_text, odds_text
from docket.core.types import PairCard

from .. import literal
from ..diff import PLAIN, Palette
from ..figures import probability_text

# why the pair is queued, after 'queued  ': 'likely non-match (to confirm)' took three lines of
# the 20-cell panel at 80 columns; '(to check)' keeps 'non-match (to check)' to the second.
# Each takes two lines at most there (audit and overlap at once, three), and at 120 columns.
REASONS = {
    "uncertain": "uncertain (hardest first)",
    "likely match": "likely match (to check)",
    "likely non-match": "likely non-match (to check)",
    "audit": "audit (keeps estimates honest)",
    "overlap": "overlap (a second reviewer too)",
    "audit, overlap": "audit and overlap (a second reviewer too)",
    "disagreement": "matchers differ (shown first)",
    "candidate": "from another record's candidates",
}
SHOWN = 3  # fields listed one by one in the odds steps; the rest share one line
NAME_CELLS = 10  # short names keep one column for the factors, as wide as this
PANEL_TEXT = 26  # cells of text in the panel at its wide width (30, less border and padding)
NOTE_CAP = 200  # characters of the reviewer's note shown, fewer where the panel is short
SHORT_MODEL = {"fellegi-sunter": "Fellegi–Sunter", "logistic": "logistic, from labels"}


@dataclass(frozen=True)
class YourSide:
    """What this reviewer (only this one: review is blind) has said about the pair."""

    label: str | None = None  # their current label, when the pair was decided before
    note: str = ""  # the note saved with it, or the note waiting for the decision
    note_pending: bool = False


def _row(text: Text, name: str, value: Text, width: int = 13) -> None:
    text.append(f"{name:<{width}}")
    text.append_text(value)
    text.append("\n")


def _line(text: Text, label: str, value: str, p: Palette, width: int) -> None:
    """``label`` and its value, the values lined up, closer only where that keeps the value
    on the line: 'model   Fellegi–Sunter' (22 cells) in a 20-cell panel left 'model' alone on
    its line, its value under it."""
    one_space = 8 + cell_len(value) > width >= len(label) + 1 + cell_len(value)
    head = f"{label} " if one_space else f"{label:<8}"
    text.append(head, p.muted)
    # A value too long for its line goes on two spaces in, so that its rest ('from labels',
    # '(hardest first)') does not stand at the left edge like a label of its own; only where
    # that costs no extra line ('non-match (to check)' fills the narrow panel's line).
    flush = textwrap.wrap(head + value, width, break_on_hyphens=False)
    hung = textwrap.wrap(head + value, width, subsequent_indent="  ", break_on_hyphens=False)
    lines = hung if len(hung) <= len(flush) else flush
    main, _, aside = value.partition(" (")  # 'uncertain' / '(hardest first)', not 'first)'
    whole = [head + main, "  (" + aside]
    if aside and len(flush) == 2 and all(cell_len(x) <= width for x in whole):
        lines = whole
    text.append("\n".join([lines[0][len(head):], *lines[1:]]) + "\n")


def odds_steps(card: PairCard) -> list[tuple[str, float]]:
    """The fields that changed the odds most, strongest first, the rest folded into one step.

    Each step multiplies the odds; together with the starting odds they give, exactly, the odds
    of the probability shown (the contributions are the ranking model's own).
    """
    parts = sorted(((f.field, f.contribution) for f in card.fields),
                   key=lambda fc: -abs(fc[1]))
    shown = [fc for fc in parts[:SHOWN] if abs(fc[1]) >= 0.05]
    rest = parts[len(shown):]
    if rest:
        shown.append((f"{len(rest)} more", sum(c for _, c in rest)))
    return shown


def step_lines(steps: list[tuple[str, float]], width: int) -> list[tuple[str, int, str]]:
    """Each step as (name, cells kept of it, factor), the factors in one column within ``width``.

    The names get what the widest factor leaves, so a field name is cut only when the panel is
    too narrow for it and the factor beside it, never while room is left empty.
    """
    factors = [factor_text(part) for _, part in steps]
    widest = max((len(f) for f in factors), default=0)
    room = max(4, width - 3 - widest)  # two cells of indent, one between name and factor
    keep = min(room, max([NAME_CELLS] + [cell_len(n) for n, _ in steps]))
    return [(name, keep, f) for (name, _), f in zip(steps, factors, strict=True)]


def candidate_lines(card: PairCard, width: int) -> list[str]:
    """How many other candidate pairs name each record: one line where it fits in ``width``
    cells, else one line a side, the counts lined up ('first 34 · second 36' wrapped in the
    20-cell panel at 80 columns, its second count alone on the next line)."""
    sides = tuple(zip(card.sides, (f"{card.left_candidates:,}", f"{card.right_candidates:,}"),
                      strict=True))
    one = " · ".join(f"{side} {n}" for side, n in sides)
    if cell_len(one) <= width:
        return [one]
    name = max(len(side) for side, _ in sides)
    count = max(len(n) for _, n in sides)
    return [f"{side:<{name}}  {n:>{count}}" for side, n in sides]


def evidence_text(card: PairCard, palette: Palette, you: YourSide = YourSide(),
                  model_note: str = "", width: int = PANEL_TEXT,
                  note_cap: int = NOTE_CAP) -> Text:
    p = palette
    text = Text()
    # labels as narrow as they go: "1 to 3.7k" must fit beside "odds" in a 20-column panel
    shown = probability_text(card.probability)
    if 12 + cell_len(shown) > width:  # '< 0.000001' wrapped at its space, '<' left behind
        text.append("probability\n")
        _row(text, "  ", Text(shown, p.heading), 2)
    else:
        _row(text, "probability", Text(shown, p.heading), 12)
    _row(text, "odds", Text(odds_text(card.log_odds),
                            p.positive if card.log_odds > 0 else p.negative), 8)
    text.append("from the start\n", p.muted)
    _row(text, "  ", Text(odds_text(card.base_log_odds), p.muted), 2)
    steps = odds_steps(card)
    for (name, keep, factor), (_, part) in zip(step_lines(steps, width), steps, strict=True):
        text.append("  ")
        shown = literal.record_id(name, keep, p.escape)  # its end kept: names differ there
        text.append_text(shown)
        text.append(" " * (1 + keep - shown.cell_len))
        text.append(factor + "\n", p.positive if part > 0 else
                    p.negative if part < 0 else p.muted)
    _line(text, "model", SHORT_MODEL.get(card.model, card.model), p, width)
    _line(text, "queued", REASONS.get(card.reason, card.reason), p, width)
    text.append("other candidates\n", p.muted)
    text.append("".join(f"  {line}\n" for line in candidate_lines(card, width - 2)))
    if card.left_candidates or card.right_candidates:
        text.append("  c: look at them\n", p.muted)
    if you.label is not None:
        text.append("you: ", p.muted)
        text.append(you.label + "\n", p.heading)
    if you.note:
        text.append("note, for your decision: " if you.note_pending else "note ", p.muted)
        text.append_text(literal.literal_text(you.note, escape_style=p.escape, cap=note_cap))
        text.append("\n")
        if len(you.note) > note_cap:
            text.append("e shows the whole note\n", p.muted)
    if model_note:
        text.append(model_note + "\n", p.muted)
    text.rstrip()
    return text


def _height(text: Text, width: int) -> int:
    """The lines ``text`` takes, wrapped to ``width`` cells as the panel wraps it."""
    return len(text.wrap(_CONSOLE, max(1, width)))


_CONSOLE = Console(file=io.StringIO(), width=400, color_system=None, legacy_windows=False)


class EvidencePanel(Static):
    """Shows :func:`evidence_text` for the pair on screen."""

    BORDER_TITLE = "evidence"
    _shown: tuple[PairCard | None, Palette, YourSide, str] | None = None

    def show(self, card: PairCard | None, palette: Palette = PLAIN, you: YourSide = YourSide(),
             model_note: str = "") -> None:
        self._shown = (card, palette, you, model_note)
        # The panel's size comes from the layout, not from its text: no layout pass needed.
        if card is None:
            self.update(Text(model_note, palette.muted), layout=False)
            return
        width = self.content_size.width or PANEL_TEXT  # before the first layout: the wide size
        room = self.content_size.height
        # A long note ran past the panel's foot at 80x24, its end (and a refit's message
        # after it) cut off unseen: it is shortened to the lines the panel has, and says so.
        for cap in (NOTE_CAP, 120, 60, 24):
            text = evidence_text(card, palette, you, model_note, width, cap)
            if not you.note or not room or _height(text, width) <= room:
                break
        self.update(text, layout=False)

    def on_resize(self) -> None:
        # the names' room follows the panel's width (narrower below 110 columns)
        if self._shown is not None:
            self.show(*self._shown)

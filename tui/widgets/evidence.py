"""The evidence panel: why the model thinks what it thinks about the pair on screen."""

from __future__ import annotations

import math
from dataclasses import dataclass

from rich.text import Text
from textual.widgets import Static

from docket.core.types import PairCard

from .. import literal
from ..diff import PLAIN, Palette

REASONS = {
    "uncertain": "uncertain (hardest first)",
    "audit": "audit sample (keeps estimates honest)",
    "overlap": "overlap (a second reviewer sees it too)",
    "candidate": "opened from another record's candidates",
}
TOP = 2  # fields listed as pushing up and down


@dataclass(frozen=True)
class YourSide:
    """What this reviewer (only this one: review is blind) has said about the pair."""

    label: str | None = None  # their current label, when the pair was decided before
    note: str = ""  # the note saved with it, or the note waiting for the decision
    note_pending: bool = False


def probability_text(prob: float) -> str:
    """Three decimals; towards 0 or 1, the digits it takes to show the distance to the end.

    0.9994, not "1 - 6e-04": read left to right like any other probability, at most ten
    characters wide, and never a bare 1 or 0 the model did not give.
    """
    if 0.001 <= prob <= 0.999:
        return f"{prob:.3f}"
    if prob <= 0.0 or prob >= 1.0:
        return "0" if prob <= 0.0 else "1"
    gap = min(prob, 1.0 - prob)
    if gap < 1e-6:
        return "< 0.000001" if prob < 0.5 else "> 0.999999"
    digits = max(4, -math.floor(math.log10(gap)))
    return f"{prob:.{digits}f}"


def _row(text: Text, name: str, value: Text, width: int = 13) -> None:
    text.append(f"{name:<{width}}")
    text.append_text(value)
    text.append("\n")


def pushing(card: PairCard) -> tuple[list[tuple[str, float]], list[tuple[str, float]]]:
    """The fields whose weights push the pair most towards match and towards non-match."""
    weights = [(f.field, f.weight) for f in card.fields if f.left is not None and
               f.right is not None]
    ups = sorted((w for w in weights if w[1] > 0), key=lambda w: -w[1])[:TOP]
    downs = sorted((w for w in weights if w[1] < 0), key=lambda w: w[1])[:TOP]
    return ups, downs


def evidence_text(card: PairCard, palette: Palette, you: YourSide = YourSide(),
                  model_note: str = "") -> Text:
    p = palette
    text = Text()
    _row(text, "probability", Text(probability_text(card.probability), p.heading))
    total = card.weight
    _row(text, "match weight", Text(f"{total:+.1f}", p.positive if total > 0 else p.negative))
    _row(text, "  prior", Text(f"{card.prior_weight:+.1f}", p.muted))
    ups, downs = pushing(card)
    for title, rows, style in (("pushing up", ups, p.positive), ("pushing down", downs,
                                                                   p.negative)):
        text.append(title + "\n", p.muted)
        if not rows:
            text.append("  (none)\n", p.muted)
        for name, weight in rows:
            text.append("  ")
            text.append_text(literal.one_line(name, 10, p.escape))
            text.append(" " * max(1, 11 - min(len(name), 10)))
            text.append(f"{weight:+.1f}\n", style)
    text.append("queued  ", p.muted)
    text.append(REASONS.get(card.reason, card.reason) + "\n")
    text.append("other candidates\n", p.muted)
    first, second = card.sides
    text.append(f"  {first} {card.left_candidates:,} · {second} {card.right_candidates:,}\n")
    if card.left_candidates or card.right_candidates:
        text.append("  c: look at them\n", p.muted)
    if you.label is not None:
        text.append("you: ", p.muted)
        text.append(you.label + "\n", p.heading)
    if you.note:
        text.append("note, for your decision: " if you.note_pending else "note ", p.muted)
        text.append_text(literal.literal_text(you.note, escape_style=p.escape, cap=200))
        text.append("\n")
    if model_note:
        text.append(model_note + "\n", p.muted)
    text.rstrip()
    return text


class EvidencePanel(Static):
    """Shows :func:`evidence_text` for the pair on screen."""

    BORDER_TITLE = "evidence"

    def show(self, card: PairCard | None, palette: Palette = PLAIN, you: YourSide = YourSide(),
             model_note: str = "") -> None:
        # The panel's size comes from the layout, not from its text: no layout pass needed.
        if card is None:
            self.update(Text(model_note, palette.muted), layout=False)
            return
        self.update(evidence_text(card, palette, you, model_note), layout=False)

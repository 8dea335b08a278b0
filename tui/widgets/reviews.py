"""The reviews panel: what every reviewer said about the pair on screen, for an adjudicator.

It takes the evidence panel's place on the adjudication screen. Names are shown, or with
``--blind`` replaced by "reviewer 1", "reviewer 2"... numbered per pair in the order they
decided, so an adjudicator weighs the labels and notes rather than the people. The
adjudicator's own earlier label is always flagged: they are about to settle a pair they
labelled themselves.
"""

from __future__ import annotations

import hashlib
import textwrap
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass

from rich.console import Console
from rich.style import Style
from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll
from textual.visual import VisualType
from textual.widgets import Static

from docket.core import odds_text
from docket.core.types import PairCard, Review

from .. import literal
from ..diff import PLAIN, Palette
from ..figures import probability_text
from .status_line import clock_text

WHY = {  # each short enough for one line of the panel
    "disagreement": "reviewers' labels differ",
    "hold": "a reviewer could not tell",
    "held by adjudicator": "held at adjudication",
    "cluster conflict": "gold matches chain records that a gold non-match keeps apart",
}
NOTE_CAP = 300  # characters of one note shown in the panel
NAME_WIDTH = 12  # name, label and time fit a 32-cell panel beside a side-by-side card
ROW_REST = 16  # cells of a review line besides the name: label, time and two spaces


@dataclass(frozen=True)
class ConflictInfo:
    """The cluster conflict a pair belongs to, as the panel names it."""

    cluster: int
    members: int
    match_pairs: tuple[int, ...]
    non_match_pairs: tuple[int, ...]


@dataclass(frozen=True)
class PairStanding:
    """Everything the panel shows besides the card: why queued, the labels, the gold label."""

    # disagreement, hold, held by adjudicator, cluster conflict; "" when not waiting; None
    # when the caller does not know (a pair opened from a list): then nothing is said
    why: str | None = ""
    reviews: tuple[Review, ...] = ()
    gold: tuple[str, str] | None = None  # (label, how) when the pair is gold now
    conflict: ConflictInfo | None = None


def blind_aliases(names: Iterable[str]) -> dict[str, str]:
    """Stable stand-ins "reviewer A", "reviewer B"... for a whole project.

    The order is a hash of each name, not the names' alphabetical order, so the letters say
    nothing about who is who.
    """
    ordered = sorted(set(names), key=lambda n: hashlib.sha256(n.encode("utf-8")).hexdigest())
    out = {}
    for i, name in enumerate(ordered):
        letters, k = "", i
        while True:
            letters = chr(ord("A") + k % 26) + letters
            k = k // 26 - 1
            if k < 0:
                break
        out[name] = f"reviewer {letters}"
    return out


def shown_names(reviews: Sequence[Review], blind: bool,
                aliases: Mapping[str, str] | None = None) -> list[str]:
    """The name to show for each review: the person's, or a stand-in when blind.

    Blind stand-ins are numbered per pair ("reviewer 1", "reviewer 2"), unless ``aliases``
    gives reviewers the project-wide ones a list beside the pair already uses.
    """
    if not blind:
        return [r.reviewer for r in reviews]
    numbers: dict[tuple[str, str], int] = {}
    out = []
    for r in reviews:
        role = "adjudicator" if r.role == "adjudicator" else "reviewer"
        if role == "reviewer" and aliases and r.reviewer in aliases:
            out.append(aliases[r.reviewer])
            continue
        key = (role, r.reviewer)
        if key not in numbers:
            numbers[key] = sum(1 for k in numbers if k[0] == role) + 1
        out.append(f"{role} {numbers[key]}")
    return out


def label_style(label: str, palette: Palette) -> Style:
    if label == "match":
        return palette.positive
    if label == "non-match":
        return palette.negative
    return palette.heading


def _review_lines(text: Text, reviews: Sequence[Review], names: Sequence[str], me: str,
                  palette: Palette, heading: str, note_word: str, width: int) -> None:
    p = palette
    # the clock column named: '0:00' beside a label read as a time of day, or as nothing
    head = f"{heading} ({len(reviews)})"
    text.append(f"{head:<{width + ROW_REST - 4}}time\n", p.muted)
    for review, name in zip(reviews, names, strict=True):
        if review.reviewer == me:
            who = Text("you", p.heading)
        else:
            who = literal.record_id(name, width, p.escape)  # its end kept: names differ there
        who.truncate(width, overflow="ellipsis", pad=True)
        text.append_text(who)
        text.append(" ")
        text.append(f"{review.label:<9}", label_style(review.label, p))
        text.append(f" {clock_text(review.seconds):>5}\n", p.muted)
        if review.own:
            text.append("  ▲ your own earlier label\n", p.escape)
        if review.note:
            note = Text()  # the label muted, the note itself not
            note.append(f"  {note_word} ", p.muted)
            note.append_text(literal.literal_text(review.note, escape_style=p.escape,
                                                  cap=NOTE_CAP))
            text.append_text(hanging(note, width + ROW_REST))


def hanging(note: Text, width: int, indent: int = 4) -> Text:
    """``note`` wrapped to ``width`` with its later lines indented, so that a long note reads
    as one under its reviewer: the panel wrapped it to the left edge, where it looked like
    the start of the next entry."""
    first = note.wrap(_MEASURE, max(8, width))[0]  # the first line has the whole width
    rest = note[len(first):]
    out = Text()
    first.rstrip()
    out.append_text(first)
    out.append("\n")
    rest = rest[len(rest.plain) - len(rest.plain.lstrip()):]
    if rest.plain:
        for line in rest.wrap(_MEASURE, max(8, width - indent)):
            line.rstrip()
            out.append(" " * indent)
            out.append_text(line)
            out.append("\n")
    return out


_MEASURE = Console(width=200, no_color=True)  # wrap() asks a console for tab size only


def reviews_text(card: PairCard, standing: PairStanding, adjudicator: str, blind: bool,
                 palette: Palette = PLAIN, aliases: Mapping[str, str] | None = None,
                 name_width: int = NAME_WIDTH) -> Text:
    """The panel's text. Notes and names are shown literally (never parsed as markup)."""
    p = palette
    text = Text()
    if standing.why is not None:
        text.append("queued ", p.muted)
        if standing.why:
            text.append(standing.why + "\n", p.heading)
            why = WHY.get(standing.why, standing.why)
            text.append("\n".join(textwrap.wrap(why, max(12, name_width + ROW_REST),
                                                initial_indent="  ", subsequent_indent="  "))
                        + "\n", p.muted)
        else:
            text.append("not waiting for adjudication\n")
    if standing.conflict is not None:
        c = standing.conflict
        text.append(f"  cluster {c.cluster}: {c.members} records; gold matches in pairs "
                    f"{_ids(c.match_pairs)}; gold non-match in pairs "
                    f"{_ids(c.non_match_pairs)}\n",
                    p.muted)
    text.append("model  ", p.muted)
    # two short lines rather than one that wraps in a narrow panel
    text.append(f"p {probability_text(card.probability)}\n       odds {odds_text(card.log_odds)}\n")
    names = shown_names(standing.reviews, blind, aliases)
    people = [(r, n) for r, n in zip(standing.reviews, names, strict=True)
              if r.role != "adjudicator"]
    settled = [(r, n) for r, n in zip(standing.reviews, names, strict=True)
               if r.role == "adjudicator"]
    text.append("\n")
    if people:
        _review_lines(text, [r for r, _ in people], [n for _, n in people], "", p,
                      "reviewers", "note", name_width)
    else:
        text.append("no reviewer labels on this pair\n", p.muted)
    if settled:
        text.append("\n")
        _review_lines(text, [r for r, _ in settled], [n for _, n in settled],
                      adjudicator, p, "adjudications", "reason", name_width)
    text.append("\ngold   ", p.muted)
    if standing.gold is None:
        text.append("none until settled" if standing.why else "none", p.heading)
        text.append("\n")
    else:
        label, how = standing.gold
        text.append(label, label_style(label, p))
        text.append(f" ({how})\n", p.muted)
    text.rstrip()
    return text


def _ids(ids: Sequence[int], most: int = 6) -> str:
    shown = ", ".join(map(str, ids[:most]))
    return shown + (f" +{len(ids) - most}" if len(ids) > most else "") if ids else "—"


class ReviewsPanel(VerticalScroll):
    """Shows :func:`reviews_text` for the pair on screen, or a plain message; it scrolls.

    A plain text widget does not scroll: five reviewers with notes of a few lines each ran
    past the panel's foot at 80x24, and the adjudicator saw two of the five labels, and not
    the gold line, with nothing to say so. The text now sits in a scrolling box (a scroll bar
    shows when it is taller; Tab focuses it, the arrow keys or the wheel scroll it).
    """

    BORDER_TITLE = "reviews"

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._shown: tuple | None = None  # what show() was last given, for a resize

    def compose(self) -> ComposeResult:
        yield Static("", classes="reviews-text")

    @property
    def content(self) -> VisualType:
        """What the panel shows now."""
        return self.query_one(".reviews-text", Static).content

    def show(self, card: PairCard, standing: PairStanding, adjudicator: str, blind: bool,
             palette: Palette = PLAIN, aliases: Mapping[str, str] | None = None) -> None:
        self._shown = (card, standing, adjudicator, blind, palette, aliases)
        # a cell kept for the scroll bar, shown or not: text drawn for the width without it
        # wrapped again once the bar appeared ('time' alone on a line)
        width = self.content_region.width - 1 if self.content_region.width else (
            NAME_WIDTH + ROW_REST)
        self._text(reviews_text(card, standing, adjudicator, blind, palette, aliases,
                                max(6, width - ROW_REST)))

    def _text(self, text: Text) -> None:
        self.query_one(".reviews-text", Static).update(text)
        self.scroll_home(animate=False)  # a new pair's reviews start at their top

    def on_resize(self) -> None:
        if self._shown is not None:
            self.show(*self._shown)

    def show_message(self, message: Text) -> None:
        self._shown = None
        self._text(message)

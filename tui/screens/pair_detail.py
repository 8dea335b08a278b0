"""One pair looked at from the agreement or quality screen: the card and everyone's labels.

Read-only: nothing is decided here (adjudication happens on the adjudication screen).
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.widgets import Static

from ..diff import Palette
from ..widgets import CardOptions, PairCardView
from ..widgets.key_bar import KeyBar
from ..widgets.pair_card import CardBox, placeholders_of
from ..widgets.reviews import PairStanding, ReviewsPanel
from .team_base import TeamScreen

HELP = (
    "One pair as it stands: the card with the characters that differ highlighted, and beside "
    "it every label, note and time given on it, and its gold label if it has one. Nothing is "
    "decided here: settle a disagreement on the adjudication screen. Escape goes back to the "
    "list this pair was opened from."
)


class PairDetailScreen(TeamScreen):
    HELP = HELP
    HORIZONTAL_BREAKPOINTS: ClassVar[list[tuple[int, str]] | None] = [
        (0, "-tiny"), (64, "-narrow"), (110, "-wide")]
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "back", "back", id="detail-back", tooltip="back to the list"),
        Binding("x", "extra", "columns", id="detail-extra-columns",
                tooltip="show or hide the columns that are not compared"),
        Binding("w", "full_values", "full values", show=False, id="detail-full-values",
                tooltip="show in full the values shortened with … to fit, or shorten again"),
        Binding("question_mark", "help", "help", key_display="?", id="detail-help",
                tooltip="this help"),
        Binding("q", "quit", "quit", id="detail-quit", tooltip="quit docket"),
    ]

    def __init__(self, pair_id: int, heading: Text | None = None,
                 aliases: Mapping[str, str] | None = None) -> None:
        super().__init__()
        self.pair_id = pair_id
        self.heading = heading or Text()
        self.aliases = aliases
        self.show_extra = False

    def compose(self) -> ComposeResult:
        yield Static(self.heading, id="detail-heading")
        with Horizontal(id="body"):
            with CardBox(id="card-box"):
                yield PairCardView(id="card")
            yield ReviewsPanel(id="reviews")
        yield KeyBar()

    def on_mount(self) -> None:
        self._paint()

    def _paint(self) -> None:
        app = self.team_app
        palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        project = app.project
        card = project.card(self.pair_id, "")
        reviews = project.reviews_of(self.pair_id, app.adjudicator)
        gold = next(((g.label, g.how) for g in project.gold_labels()
                     if g.pair_id == self.pair_id), None)
        self.query_one(PairCardView).show(card, CardOptions(
            palette, app.mask, self.show_extra, placeholders=placeholders_of(project.fields)))
        box = self.query_one(CardBox)
        box.title_for(card, palette)
        panel = self.query_one(ReviewsPanel)
        panel.show(card, PairStanding(None, tuple(reviews), gold), app.adjudicator, app.blind,
                   palette, self.aliases)
        panel.border_title = "reviews · names hidden" if app.blind else "reviews"

    def action_full_values(self) -> None:
        self.query_one(PairCardView).toggle_full_values()

    def on_resize(self) -> None:
        # A taller or shorter terminal changes the room for the card, not its width.
        self.call_after_refresh(self.query_one(PairCardView).refit)

    def action_extra(self) -> None:
        self.show_extra = not self.show_extra
        self._paint()

"""The adjudication screen: one waiting pair at a time, every reviewer's label beside the card.

The pair card is the review screen's; the reviews panel replaces the evidence panel. A
decision key asks for a reason, then saves the adjudication (role 'adjudicator', the reason
as its note) before moving on. The queue (disagreements, holds, cluster conflicts) is worked
out in a worker after every change; between two refreshes the screen steps through the copy
it has, so the next pair is on screen at once. The pair on screen is claimed (the review
screen's lease, in the adjudicator role), so two adjudicators at work together are never shown
one pair; the claim ends on deciding, on being served the next pair, and on quitting.
"""

from __future__ import annotations

import contextlib
import sqlite3
from functools import partial
from typing import TYPE_CHECKING, ClassVar, cast

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.screen import Screen

from docket.core.errors import DocketError
from docket.core.types import PairCard

from .. import bindings as shared
from ..diff import PLAIN, Palette
from ..navigation import Mode, Move, Navigator
from ..widgets import CardOptions, Pace, PairCardView, StatusLine
from ..widgets.key_bar import KeyBar
from ..widgets.pair_card import CardBox, placeholders_of
from ..widgets.reviews import ConflictInfo, PairStanding, ReviewsPanel
from .adjudication_queue import HELD, AdjudicationQueue
from .help import key_rows
from .reason import ReasonScreen
from .team_help import ADJUDICATION, TeamHelp

if TYPE_CHECKING:
    from ..hosts import TeamHost

class AdjudicateScreen(AdjudicationQueue, Screen[None]):
    HORIZONTAL_BREAKPOINTS: ClassVar[list[tuple[int, str]] | None] = [
        (0, "-tiny"), (64, "-narrow"), (110, "-wide")]
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("s", "decide('match')", "match", id="match",
                tooltip="final label: same entity (then give a reason)"),
        Binding("d", "decide('non-match')", "non-match", id="non-match",
                tooltip="final label: different entities (then give a reason)"),
        Binding("h", "decide('hold')", "hold", id="hold",
                tooltip="cannot settle it yet: hold it (it stays in the queue)"),
        Binding("z", "undo", "undo", id="undo", tooltip="take back your latest adjudication"),
        # The key bar keeps this order and leaves out what does not fit (help lists it all).
        Binding("escape", "to_queue", "queue", id="to-queue",
                tooltip="leave your history or an undone pair, back to the queue"),
        shared.EXTRA_COLUMNS,
        Binding("a", "agreement", "agreement", id="agreement",
                tooltip="how far the reviewers agree, and their disagreements"),
        Binding("g", "quality", "quality", id="quality",
                tooltip="precision and recall from the audit slice; clusters and conflicts"),
        Binding("r", "look_again", "look again", id="adjudication-reload",
                tooltip="read the queue again: pairs reviewers have sent since"),
        *shared.history("adjudications"),
        # last: the card itself names w where a value is shortened
        shared.FULL_VALUES,
        shared.HELP,
        shared.QUIT,
        shared.REDRAW,
    ]

    @property
    def mode(self) -> Mode:
        return self.nav.mode

    def __init__(self) -> None:
        super().__init__()
        self.nav: Navigator[int] = Navigator()
        self.queue: list[tuple[int, str]] | None = None  # None until the first worker is back
        self.held: list[int] = []  # pairs this adjudicator held in this session: asked last
        self.generation = 0
        self.conflicts: dict[int, ConflictInfo] = {}
        self.gold: dict[int, tuple[str, str]] = {}
        self.pair_id: int | None = None
        self.card: PairCard | None = None
        self.standing = PairStanding()
        self.where = ""
        self.shown_at = 0.0
        self.show_extra = False
        self.decided = 0
        self.for_others = 0
        self.claimed = 0
        self.palette: Palette = PLAIN
        self._footer_in_queue = True

    @property
    def team_app(self) -> TeamHost:
        return cast("TeamHost", self.app)

    # -- building ----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield StatusLine(id="status")
        with Horizontal(id="body"):
            with CardBox(id="card-box"):
                yield PairCardView(id="card")
            yield ReviewsPanel(id="reviews")
        yield KeyBar()

    def on_mount(self) -> None:
        app = self.team_app
        self._set_palette()
        app.theme_changed_signal.subscribe(self, lambda _theme: self._on_theme())
        self.pace = Pace(app.clock())
        self.query_one(StatusLine).set_who(app.project_name, app.adjudicator)
        self._refresh_queue()
        self._paint()
        self.set_interval(1.0, self._tick)

    def _set_palette(self) -> None:
        self.palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)

    def _on_theme(self) -> None:
        self._set_palette()
        self._paint()

    # -- showing a pair ----------------------------------------------------------------------
    def _show(self, pair_id: int | None, mode: Mode, where: str = "",
              keep_time: bool = False) -> None:
        app = self.team_app
        self.nav.mode, self.pair_id, self.where = mode, pair_id, where
        if pair_id is None:
            self.card, self.standing = None, PairStanding()
        else:
            why = self._why(pair_id)
            self.card = app.project.card(pair_id, why or "adjudication")
            reviews = app.project.reviews_of(pair_id, app.adjudicator)
            self.standing = PairStanding(why, tuple(reviews), self.gold.get(pair_id),
                                         self.conflicts.get(pair_id))
        if not keep_time:
            self.shown_at = app.clock()
        if (mode == "queue") != self._footer_in_queue:
            self._footer_in_queue = mode == "queue"
            self.refresh_bindings()
        self._paint()

    def _show_queue(self) -> None:
        parked = self.nav.take_parked()
        waiting = [pid for pid, _ in self.queue or ()]
        if parked is not None and parked in waiting:
            waiting.remove(parked)
            waiting.insert(0, parked)
        self._show(self._serve(waiting), "queue")

    def _paint(self) -> None:
        app = self.team_app
        card_view = self.query_one(PairCardView)
        box = self.query_one(CardBox)
        panel = self.query_one(ReviewsPanel)
        if self.card is None:
            card_view.show_message(self._empty_message())
            box.title_for(None, text="adjudication queue empty" if self.queue is not None
                          else "adjudication")
            box.border_subtitle = None
            panel.show_message(Text(""))
        else:
            card_view.show(self.card, CardOptions(
                self.palette, app.mask, self.show_extra,
                placeholders=placeholders_of(app.project.fields)))
            box.title_for(self.card, self.palette)
            box.border_subtitle = Text(self.where) if self.where else None
            panel.show(self.card, self.standing, app.adjudicator, app.blind, self.palette)
        panel.border_title = "reviews · names hidden" if app.blind else "reviews"
        status = self.query_one(StatusLine)
        status.set_counts(self.decided, None if self.queue is None else len(self.queue))
        self._tick()

    def _tick(self) -> None:
        now = self.team_app.clock()
        on_pair = None if self.card is None else now - self.shown_at
        self.query_one(StatusLine).set_timing(self.pace.per_minute(now), on_pair)

    # -- deciding ----------------------------------------------------------------------------
    def action_decide(self, label: str) -> None:
        if self.pair_id is None:
            self.notify("Nothing to decide: the adjudication queue is empty.",
                        severity="warning")
            return
        fields = () if self.card is None else tuple(f.field for f in self.card.fields)
        self.app.push_screen(ReasonScreen(self.pair_id, label, fields),
                             partial(self._save, self.pair_id, label))

    def _save(self, pair_id: int, label: str, reason: str | None) -> None:
        app = self.team_app
        if reason is None:
            self.notify("Cancelled: nothing was written.")
            return
        try:
            app.project.adjudicate(pair_id, app.adjudicator, label, reason,
                                   app.clock() - self.shown_at)
        except (DocketError, sqlite3.Error) as exc:
            self.notify(f"Not saved: {exc}. The pair stays on screen.",
                        severity="error", markup=False)
            return
        self.pace.record(app.clock())
        if self.queue is not None:
            self.queue = [e for e in self.queue if e[0] != pair_id]
            if pair_id in self.held:
                self.held.remove(pair_id)
            if label == "hold":
                self.held.append(pair_id)
                self.queue.append((pair_id, HELD))
        self._refresh_queue()
        self._go(self.nav.after_decision())

    def action_undo(self) -> None:
        app = self.team_app
        try:
            undone = app.project.undo_adjudication(app.adjudicator)
        except (DocketError, sqlite3.Error) as exc:
            self.notify(f"Undo not saved: {exc}", severity="error", markup=False)
            return
        if undone is None:
            self.notify("Nothing to undo: you have no standing adjudication.")
            return
        if undone.pair_id in self.held:
            self.held.remove(undone.pair_id)
        # The queue pair on screen is not parked: still waiting, it comes back in its turn.
        self._refresh_queue()
        self._show(undone.pair_id, "aside", f"undone ({undone.label}): decide again")

    # -- moving around -----------------------------------------------------------------------
    def _go(self, move: Move) -> None:
        if move.message:
            self.notify(move.message)
        elif move.to == "history" and move.pair_id is not None:
            self._show(move.pair_id, "history", self.nav.where("your adjudication"))
        elif move.to == "queue":
            self._show_queue()

    def action_back(self) -> None:
        app = self.team_app
        self._go(self.nav.back(
            lambda: [d.pair_id for d in app.project.history(app.adjudicator, role="adjudicator")],
            self.pair_id, "No adjudications yet to look back at.",
            "This is your first adjudication."))

    def action_forward(self) -> None:
        self._go(self.nav.forward("You are at the newest pair."))

    def action_to_queue(self) -> None:
        if self.mode != "queue":
            self._show_queue()

    def action_full_values(self) -> None:
        self.query_one(PairCardView).toggle_full_values()

    def on_resize(self) -> None:
        # A taller or shorter terminal changes the room for the card, not its width.
        self.call_after_refresh(self.query_one(PairCardView).refit)

    def action_extra(self) -> None:
        self.show_extra = not self.show_extra
        self._paint()

    def action_look_again(self) -> None:
        self._refresh_queue()
        self.notify("Reading the adjudication queue again.")

    def on_screen_resume(self) -> None:
        # back from agreement, quality or help: reviewers may have sent pairs meanwhile
        if self.queue is not None:
            self._refresh_queue()

    def action_agreement(self) -> None:
        from .agreement import AgreementScreen
        self.app.push_screen(AgreementScreen())

    def action_quality(self) -> None:
        from .quality import QualityScreen
        self.app.push_screen(QualityScreen())

    def action_help(self) -> None:
        app = self.team_app
        rows = key_rows(self, app.get_key_display, app.keymap.keymap)
        self.app.push_screen(TeamHelp(rows, app.keymap.path, app.keymap.problems,
                                      ADJUDICATION))

    def action_quit(self) -> None:
        self.app.exit()

    def on_unmount(self) -> None:
        # Quitting gives the pair on screen back at once; if the file cannot be written now,
        # the claim lapses at its expiry all the same.
        app = self.team_app
        with contextlib.suppress(DocketError, sqlite3.Error):
            app.project.release_adjudication(app.adjudicator)

    def action_redraw(self) -> None:
        self._paint()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "to_queue":
            return self.mode != "queue"
        return True

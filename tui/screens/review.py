"""The review screen: one candidate pair at a time, decided with one key, saved at once.

Where the pair on screen comes from is the screen's ``mode``: the reviewer's ``queue``; their
``history`` (walked with ``[`` and ``]``); or ``aside``, a pair opened from find, from another
record's candidates, or brought back by undo. Deciding a pair always moves on: to the next
queue pair, the next history pair, or (from aside) back to the queue pair that was left.
Nothing here holds statistics or SQL; it asks :class:`~docket.core.project.Project` and draws.
"""

from __future__ import annotations

import sqlite3
from typing import TYPE_CHECKING, ClassVar, cast

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal
from textual.screen import Screen

from docket.core.errors import DocketError
from docket.core.types import Decision, PairCard, QueueItem

from .. import bindings as shared
from ..diff import PLAIN, Palette
from ..navigation import Mode, Navigator
from ..widgets import CardOptions, EvidencePanel, KeyBar, Pace, PairCardView, StatusLine, YourSide
from ..widgets.pair_card import CardBox, placeholders_of
from .help import HelpScreen, key_rows
from .review_background import ReviewBackground
from .review_moves import ReviewMoves
from .review_notes import ReviewNotes

if TYPE_CHECKING:
    from ..hosts import ReviewHost


class ReviewScreen(ReviewNotes, ReviewMoves, ReviewBackground, Screen[None]):
    HORIZONTAL_BREAKPOINTS: ClassVar[list[tuple[int, str]] | None] = [
        (0, "-tiny"), (64, "-narrow"), (110, "-wide")]
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("s", "decide('match')", "match", id="match",
                tooltip="same entity: record a match"),
        Binding("d", "decide('non-match')", "non-match", id="non-match",
                tooltip="different entities: record a non-match"),
        Binding("h", "decide('hold')", "hold", id="hold",
                tooltip="cannot tell: hold it for adjudication"),
        Binding("z", "undo", "undo", id="undo", tooltip="take back your latest decision"),
        Binding("e", "note", "note", id="note", tooltip="write a note on this pair"),
        Binding("l", "later", "later", id="later", show=False,
                tooltip="not now: it comes back when nothing else is left"),
        # The key bar shows bindings in this order and leaves out what does not fit (help
        # lists it): the ones a newcomer cannot guess come before those they can.
        Binding("escape", "to_queue", "queue", id="to-queue",
                tooltip="leave history or a found pair, back to the queue"),
        Binding("c", "candidates", "others", id="candidates",
                tooltip="the other candidate pairs of these two records"),
        shared.EXTRA_COLUMNS,
        *shared.history("decisions"),
        Binding("slash", "find", "find", key_display="/", id="find",
                tooltip="find a pair by pair id, record id or text"),
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
        self.nav: Navigator[QueueItem] = Navigator()
        self.item: QueueItem | None = None
        self.card: PairCard | None = None
        self.mine: Decision | None = None  # this reviewer's own current label on the pair
        self.pending_note = ""
        self.where = ""
        self.shown_at = 0.0
        self.show_extra = False
        self.decided: int = 0
        self.remaining: int | None = None
        self.since_refit = 0
        self.refitting = False
        self.model_note = ""
        self.refits_seen: int | None = None  # the model's refit count as last shown
        self.palette: Palette = PLAIN
        self._footer_in_queue = True
        self._where_shown = ""
        self._scrolled_for = -1

    @property
    def review_app(self) -> ReviewHost:
        return cast("ReviewHost", self.app)

    # -- building ----------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        yield StatusLine(id="status")
        with Horizontal(id="body"):
            with CardBox(id="card-box"):
                yield PairCardView(id="card")
            yield EvidencePanel(id="evidence")
        yield KeyBar()

    def on_mount(self) -> None:
        app = self.review_app
        self._set_palette()
        app.theme_changed_signal.subscribe(self, lambda _theme: self._on_theme())
        self.pace = Pace(app.clock())
        self.query_one(StatusLine).set_who(app.project_name, app.reviewer)
        self._show_queue()
        self._count()
        self.set_interval(1.0, self._tick)

    def _set_palette(self) -> None:
        self.palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)

    def _on_theme(self) -> None:
        self._set_palette()
        self._paint()

    # -- showing a pair ----------------------------------------------------------------------
    def _show(self, item: QueueItem | None, mode: Mode, where: str = "") -> None:
        project = self.review_app.project
        self.nav.mode, self.item, self.where, self.pending_note = mode, item, where, ""
        self.card = None if item is None else project.card(item.pair_id, item.reason)
        self._follow_refits()
        self.mine = None if item is None else project.current_label(item.pair_id,
                                                                   self.review_app.reviewer)
        if item is not None and self.mine is None:  # a note written earlier, not yet decided
            self.pending_note = project.draft(item.pair_id, self.review_app.reviewer)
        self.shown_at = self.review_app.clock()
        if (mode == "queue") != self._footer_in_queue:
            # Only when "back to the queue" appears or goes: the footer rebuilds itself on
            # every refresh_bindings, which would cost a frame's worth of widgets per pair.
            self._footer_in_queue = mode == "queue"
            self.refresh_bindings()
        self._paint()

    def _show_queue(self) -> None:
        app = self.review_app
        parked = self.nav.take_parked()
        if parked is not None and app.project.current_label(parked.pair_id,
                                                            app.reviewer) is None:
            self._show(parked, "queue")
            return
        self._show(app.serve_next(), "queue")

    def _show_pair(self, pair_id: int, mode: Mode, where: str) -> None:
        card = self.review_app.project.card(pair_id)
        self._show(QueueItem(pair_id, card.left_id, card.right_id, card.probability,
                             card.reason), mode, where)

    def _paint(self) -> None:
        """Draw the pair on screen; the app's ``on_painted`` hook runs after the frame."""
        card_view = self.query_one(PairCardView)
        box = self.query_one(CardBox)
        evidence = self.query_one(EvidencePanel)
        if self.card is None:
            card_view.show_message(Text(
                "Nothing left in your queue. [ looks back at your decisions; / finds a pair; "
                "q quits.", self.palette.muted))
            box.title_for(None, text="queue empty")
            box.border_subtitle = None
            self._where_shown = ""
            evidence.show(None, self.palette, model_note=self.model_note)
        else:
            opts = CardOptions(self.palette, self.review_app.mask, self.show_extra,
                               placeholders=placeholders_of(self.review_app.project.fields))
            card_view.show(self.card, opts)
            box.title_for(self.card, self.palette)
            if self.where != self._where_shown:
                self._where_shown = self.where
                box.border_subtitle = Text(self.where) if self.where else None
            you = YourSide(None if self.mine is None else self.mine.label,
                           self.pending_note or ("" if self.mine is None else self.mine.note),
                           bool(self.pending_note))
            evidence.show(self.card, self.palette, you, self.model_note)
            if box.scroll_y and self.card.pair_id != self._scrolled_for:
                box.scroll_home(animate=False)  # a new pair starts at its top
            self._scrolled_for = self.card.pair_id
        self._status()
        hook = self.review_app.on_painted
        if hook is not None:
            self.call_after_refresh(hook)

    def _status(self) -> None:
        status = self.query_one(StatusLine)
        status.set_counts(self.decided, self.remaining)
        self._tick()

    def _tick(self) -> None:
        now = self.review_app.clock()
        on_pair = None if self.card is None else now - self.shown_at
        self.query_one(StatusLine).set_timing(self.pace.per_minute(now), on_pair)

    # -- deciding ----------------------------------------------------------------------------
    def action_decide(self, label: str) -> None:
        app = self.review_app
        if self.item is None:
            self.notify("Nothing to decide: your queue is empty.", severity="warning")
            return
        before = self.mine
        note = self.pending_note or ("" if before is None else before.note)
        try:
            app.project.decide(self.item.pair_id, app.reviewer, label, note,
                               app.clock() - self.shown_at)
        except (DocketError, sqlite3.Error) as exc:
            self.notify(f"Not saved: {exc}. The pair stays on screen.",
                        severity="error", markup=False)
            return
        if before is None:
            self._counted(+1)
        self.pace.record(app.clock())
        self._after_decision()
        self._advance()

    def _counted(self, change: int) -> None:
        self.decided += change
        if self.remaining is not None:
            self.remaining = max(0, self.remaining - change)
        self.review_app.counted += change

    def _advance(self) -> None:
        self._go(self.nav.after_decision())

    def action_undo(self) -> None:
        app = self.review_app
        try:
            undone = app.project.undo(app.reviewer)
        except (DocketError, sqlite3.Error) as exc:
            self.notify(f"Undo not saved: {exc}", severity="error", markup=False)
            return
        if undone is None:
            self.notify("Nothing to undo.")
            return
        if app.project.current_label(undone.pair_id, app.reviewer) is None:
            self._counted(-1)
        # The queue pair on screen (if any) is not parked: still undecided, it comes back in
        # its turn once the undone pair is decided again.
        self._show_pair(undone.pair_id, "aside", f"undone ({undone.label}): decide again")

    def action_full_values(self) -> None:
        self.query_one(PairCardView).toggle_full_values()

    def on_resize(self) -> None:
        # A taller or shorter terminal changes the room for the card, not its width.
        self.call_after_refresh(self.query_one(PairCardView).refit)

    def action_extra(self) -> None:
        self.show_extra = not self.show_extra
        self._paint()

    def action_help(self) -> None:
        app = self.review_app
        rows = key_rows(self, app.get_key_display, app.keymap.keymap)
        self.app.push_screen(HelpScreen(rows, app.keymap.path, app.keymap.problems,
                                        app.mask.columns))

    def action_quit(self) -> None:
        self.app.exit()

    def action_redraw(self) -> None:
        """Paint the same card again (no commit, no queue step): also the benchmark's baseline."""
        self._paint()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "to_queue":
            return self.mode != "queue"
        return True


def binding_ids() -> list[str]:
    """Every binding id that a keymap file may remap."""
    return [b.id for b in ReviewScreen.BINDINGS if isinstance(b, Binding) and b.id]


def default_keys() -> dict[str, str]:
    """Each binding id's default key(s), for the keymap file's check of keys it takes."""
    return {b.id: b.key for b in ReviewScreen.BINDINGS if isinstance(b, Binding) and b.id}

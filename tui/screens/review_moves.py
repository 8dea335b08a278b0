"""The review screen's moves: back and forward through the reviewer's history, back to the
queue, and pairs opened aside from find or from another record's candidates. Mixed into
``ReviewScreen``; where each move lands is the ``Navigator``'s rule."""

from __future__ import annotations

from typing import TYPE_CHECKING

from docket.core.types import PairCard, QueueItem

from ..figures import many
from ..navigation import Mode, Move, Navigator
from .find import Group, PairPicker

if TYPE_CHECKING:
    from ..hosts import ReviewHost


class ReviewMoves:
    if TYPE_CHECKING:  # set by ReviewScreen
        nav: Navigator[QueueItem]
        item: QueueItem | None
        card: PairCard | None
        review_app: ReviewHost
        mode: Mode

        def notify(self, message: str) -> None: ...
        def _show_pair(self, pair_id: int, mode: Mode, where: str) -> None: ...
        def _show_queue(self) -> None: ...

    def _go(self, move: Move) -> None:
        if move.message:
            self.notify(move.message)
        elif move.to == "history" and move.pair_id is not None:
            self._show_pair(move.pair_id, "history", self.nav.where("history"))
        elif move.to == "queue":
            self._show_queue()

    def action_back(self) -> None:
        app = self.review_app
        self._go(self.nav.back(lambda: [d.pair_id for d in app.project.history(app.reviewer)],
                               self.item, "No decisions yet to look back at.",
                               "This is your first decision."))

    def action_forward(self) -> None:
        self._go(self.nav.forward("You are at the newest pair."))

    def action_later(self) -> None:
        if self.mode != "queue" or self.item is None:
            self.notify("Only the queue's pair can be put off; Escape goes back to the queue.")
            return
        self.review_app.put_off(self.item.pair_id)
        self._show_queue()

    def action_to_queue(self) -> None:
        if self.mode != "queue":
            self._show_queue()

    def _open_aside(self, pair_id: int | None) -> None:
        if pair_id is None:
            return
        self.nav.open_aside(self.item)
        self._show_pair(pair_id, "aside", "opened: deciding returns to the queue")

    def action_find(self) -> None:
        app = self.review_app
        self.app.push_screen(PairPicker(app.project, app.reviewer, app.mask,
                                        title="find a pair", finder=app.find),
                             self._open_aside)

    def action_candidates(self) -> None:
        app = self.review_app
        if self.card is None:
            return
        groups = []
        for side, rid, name in (("left", self.card.left_id, self.card.sides[0]),
                                ("right", self.card.right_id, self.card.sides[1])):
            others = tuple(q.pair_id for q in app.project.candidates_of(side, rid)
                           if q.pair_id != self.card.pair_id)
            groups.append(Group(f"{name} record: {many(len(others), 'other candidate')}",
                                others, rid))
        self.app.push_screen(PairPicker(app.project, app.reviewer, app.mask,
                                        title="other candidates", search=False,
                                        groups=tuple(groups)), self._open_aside)

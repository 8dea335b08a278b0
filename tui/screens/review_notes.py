"""The review screen's notes: a note written before deciding is saved at once as a draft
and goes with the decision; a note on a decided pair is saved with its label again. Mixed into
``ReviewScreen``."""

from __future__ import annotations

import sqlite3
from typing import TYPE_CHECKING

from docket.core.errors import DocketError
from docket.core.types import Decision, QueueItem

from .note import NoteScreen

if TYPE_CHECKING:
    from ..hosts import ReviewHost


class ReviewNotes:
    if TYPE_CHECKING:  # set by ReviewScreen (a textual Screen)
        item: QueueItem | None
        mine: Decision | None
        pending_note: str
        shown_at: float
        review_app: ReviewHost

        def notify(self, message: str, **options: object) -> None: ...
        def _paint(self) -> None: ...

    def action_note(self) -> None:
        if self.item is None:
            return
        initial = self.pending_note or ("" if self.mine is None else self.mine.note)
        self.app.push_screen(NoteScreen(self.item.pair_id, initial, self.mine is not None),
                             self._save_note)

    def _save_note(self, note: str | None) -> None:
        if note is None or self.item is None:
            return
        app = self.review_app
        if self.mine is None:
            try:  # saved now: quitting before the decision must not lose it
                app.project.save_draft(self.item.pair_id, app.reviewer, note)
            except (DocketError, sqlite3.Error) as exc:
                self.notify(f"Note not saved: {exc}", severity="error", markup=False)
                return
            self.pending_note = note
            self.notify("Note saved; it goes with your decision on this pair.")
        else:
            try:
                self.mine = app.project.decide(self.item.pair_id, app.reviewer,
                                               str(self.mine.label), note,
                                               app.clock() - self.shown_at)
            except (DocketError, sqlite3.Error) as exc:
                self.notify(f"Note not saved: {exc}", severity="error", markup=False)
                return
            self.shown_at = app.clock()
            self.notify("Note saved.")
        self._paint()

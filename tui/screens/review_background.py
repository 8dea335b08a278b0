"""The review screen's background work: recounting the queue and refitting the model in
worker threads, so a decision never waits for either. Mixed into ``ReviewScreen``."""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.worker import Worker, WorkerState

from ..widgets import StatusLine

if TYPE_CHECKING:
    from ..hosts import Recount, ReviewHost


class ReviewBackground:
    if TYPE_CHECKING:  # set by ReviewScreen (a textual Screen)
        review_app: ReviewHost
        since_refit: int
        refitting: bool
        model_note: str
        refits_seen: int | None
        decided: int
        remaining: int | None

        def _status(self) -> None: ...
        def query_one(self, selector: type[StatusLine]) -> StatusLine: ...
        def run_worker(self, work: object, **options: object) -> Worker: ...
        def notify(self, message: str, **options: object) -> None: ...

    def _follow_refits(self) -> None:
        """After reading a card: when the model was refit since the last one, here or by
        another command (a label file, a merge, another reviewer's screen), the panel says so
        and the counts are taken again; they had gone on from before ('40 decided' after a
        label file had recorded 197 more)."""
        meta = self.review_app.project.meta
        refits = int(meta.get("refits", 0))
        if self.refits_seen is not None and refits != self.refits_seen:
            labels = int(meta.get("fs_model", {}).get("labels_used", 0))
            self.model_note = f"model refit: {labels} labels, {meta.get('ranker')}"
            self._count()
        self.refits_seen = refits

    def _count(self) -> None:
        app = self.review_app
        self.run_worker(app.recount, thread=True, group="count",
                        name="count", exit_on_error=False)

    def _after_decision(self) -> None:
        app = self.review_app
        self.since_refit += 1
        if app.refit_every and self.since_refit >= app.refit_every and not self.refitting:
            self.since_refit = 0
            self.refitting = True
            self.query_one(StatusLine).set_who(app.project_name, app.reviewer, "refitting")
            # A refit that fails (the file busy, say) is reported; the review goes on.
            self.run_worker(app.refit, thread=True, group="refit",
                            name="refit", exit_on_error=False)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        worker, app = event.worker, self.review_app
        if worker.group == "refit" and event.state in (WorkerState.ERROR,
                                                       WorkerState.SUCCESS):
            self.refitting = False
            self.query_one(StatusLine).set_who(app.project_name, app.reviewer)
        if event.state == WorkerState.ERROR:
            self.notify(f"{worker.name} failed: {worker.error}", severity="error",
                        markup=False)
            return
        if event.state != WorkerState.SUCCESS:
            return
        count: Recount = worker.result
        if worker.group == "refit":
            self.model_note = count.note
            app.project.reload()
            self.refits_seen = int(app.project.meta.get("refits", 0))
        moved = app.counted - count.counted_at  # decisions made while the worker counted
        self.decided, self.remaining = count.decided + moved, max(0, count.remaining - moved)
        self._status()

"""The adjudication screen's queue: read in a worker after every change (disagreements, holds,
cluster conflicts, less what the policy leaves to others and what other adjudicators hold on
screen), served one claimed pair at a time. Mixed into ``AdjudicateScreen``."""

from __future__ import annotations

import shlex
import sqlite3
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from rich.text import Text
from textual.worker import Worker, WorkerState

from docket.core.errors import DocketError
from docket.core.project import Project

from ..diff import Palette
from ..figures import many
from ..navigation import Mode
from ..widgets.reviews import ConflictInfo

if TYPE_CHECKING:
    from ..hosts import TeamHost

HELD = "held by adjudicator"


@dataclass(frozen=True)
class QueueState:
    """What a queue worker found: the waiting pairs and what the panel says about them."""

    generation: int
    entries: tuple[tuple[int, str], ...]  # (pair_id, why), in the core's order
    conflicts: dict[int, ConflictInfo] = field(default_factory=dict)
    gold: dict[int, tuple[str, str]] = field(default_factory=dict)  # pair -> (label, how)
    decided: int = 0  # this adjudicator's standing adjudications
    for_others: int = 0  # waiting pairs the policy leaves to another adjudicator
    claimed: int = 0  # waiting pairs another adjudicator has on screen now


def load_queue(project: Project, adjudicator: str, generation: int) -> QueueState:
    """Worker thread: the adjudication queue with conflicts and gold labels, on ``project``."""
    aside = project.set_aside_for(adjudicator)
    waiting = project.adjudication_queue()
    mine = [e for e in waiting if e[0] not in aside]
    taken = project.held_by_other_adjudicators(adjudicator)
    entries = tuple(e for e in mine if e[0] not in taken)
    found: dict[int, ConflictInfo] = {}
    for c in project.conflicts():
        info = ConflictInfo(c.cluster, len(c.members), c.match_pairs, c.non_match_pairs)
        for pid in (*c.match_pairs, *c.non_match_pairs):
            found[pid] = info
    gold = {g.pair_id: (g.label, g.how) for g in project.gold_labels()}
    decided = len(project.history(adjudicator, role="adjudicator"))
    return QueueState(generation, entries, found, gold, decided, len(waiting) - len(mine),
                      len(mine) - len(entries))


class AdjudicationQueue:
    if TYPE_CHECKING:  # set by AdjudicateScreen (a textual Screen)
        team_app: TeamHost
        generation: int
        held: list[int]
        queue: list[tuple[int, str]] | None
        conflicts: dict[int, ConflictInfo]
        gold: dict[int, tuple[str, str]]
        decided: int
        for_others: int
        claimed: int
        pair_id: int | None
        mode: Mode
        where: str
        palette: Palette

        def notify(self, message: str, **options: object) -> None: ...
        def run_worker(self, work: object, **options: object) -> Worker: ...
        def _show(self, pair_id: int | None, mode: Mode, where: str = "",
                  keep_time: bool = False) -> None: ...
        def _show_queue(self) -> None: ...
        def _paint(self) -> None: ...

    def _refresh_queue(self) -> None:
        self.generation += 1
        app, generation = self.team_app, self.generation

        def work() -> QueueState:
            with app.reader() as project:
                return load_queue(project, app.adjudicator, generation)

        self.run_worker(work, thread=True, exit_on_error=False, group="queue",
                        name="adjudication queue")

    def _ordered(self, entries: tuple[tuple[int, str], ...]) -> list[tuple[int, str]]:
        held = {p: i for i, p in enumerate(self.held)}
        first = [e for e in entries if e[0] not in held]
        last = sorted((e for e in entries if e[0] in held), key=lambda e: held[e[0]])
        return first + last

    def _why(self, pair_id: int) -> str:
        return next((why for pid, why in self.queue or () if pid == pair_id), "")

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        worker = event.worker
        if worker.group != "queue":
            return
        if event.state == WorkerState.ERROR:
            self.notify(f"The adjudication queue could not be read: {worker.error}",
                        severity="error", markup=False)
            return
        if event.state != WorkerState.SUCCESS:
            return
        state: QueueState = worker.result
        if state.generation != self.generation:
            return  # a later change started a newer count; wait for that one
        self.queue = self._ordered(state.entries)
        self.conflicts, self.gold, self.decided = state.conflicts, state.gold, state.decided
        self.for_others, self.claimed = state.for_others, state.claimed
        if self.pair_id is None and self.mode == "queue":
            self._show_queue()
        elif self.pair_id is not None:
            self._show(self.pair_id, self.mode, self.where, keep_time=True)
        else:
            self._paint()

    def _serve(self, waiting: list[int]) -> int | None:
        """The first waiting pair no other adjudicator holds, claimed for this one."""
        if not waiting:
            return None
        app = self.team_app
        try:
            return app.project.serve_adjudication(app.adjudicator, waiting)
        except (DocketError, sqlite3.Error) as exc:
            # Shown unclaimed rather than not at all: the adjudication itself still saves.
            self.notify(f"Pair not claimed: {exc}", severity="warning", markup=False)
            return waiting[0]

    def _empty_message(self) -> Text:
        if self.queue is None:
            return Text("Reading the adjudication queue…", self.palette.muted)
        path = self.team_app.project.path
        settled = ("Nothing waits for adjudication: every disagreement, hold and cluster "
                   "conflict is settled.")
        if self.for_others:
            are = "is" if self.for_others == 1 else "are"
            settled = (f"Nothing more for you: {many(self.for_others, 'waiting pair')} you "
                       f"decided as a reviewer {are} left to another adjudicator (the project's "
                       "policy).")
        if self.claimed or self.queue:  # what is left waits on others' screens
            left = self.claimed + len(self.queue or ())
            settled += (f" {many(left, 'waiting pair')} {'is' if left == 1 else 'are'} on "
                        "another adjudicator's screen; "
                        f"{'it comes' if left == 1 else 'they come'} back here if left.")
        return Text(
            f"{settled}\n\nWhat next: [ looks back at your adjudications; a shows how far the "
            "reviewers agree; g shows the model's quality; q quits. New pairs come as "
            f"reviewers label overlap pairs (docket review {shlex.quote(str(path))}): r looks "
            "again for them. Export the "
            f"gold labels with: docket export {shlex.quote(str(path))} --what gold -o gold.csv",
            self.palette.muted)

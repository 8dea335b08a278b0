"""Where the pair on screen comes from, and where a key takes the reviewer next.

One walker serves the review and the adjudication screens, and knows nothing of Textual:
a screen asks it for a :class:`Move` and shows what the move names.

Modes: ``queue`` (the next pair to decide), ``history`` (the person's own decisions, walked
with back and forward over a trail fixed when the walk begins) and ``aside`` (a pair opened
from find, from a record's candidates, or brought back by undo). Leaving the queue parks the
queue pair, so coming back shows it again rather than serving a new one.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Generic, Literal, TypeVar

Mode = Literal["queue", "history", "aside"]
T = TypeVar("T")


@dataclass(frozen=True)
class Move:
    """What to show: a history pair (``pair_id``), the queue, or nothing new (``stay``),
    with a message to tell when the key could not move."""

    to: Literal["history", "queue", "stay"]
    pair_id: int | None = None
    message: str = ""


@dataclass
class Navigator(Generic[T]):
    """Mode, parked queue pair and history trail of one screen.

    ``T`` is whatever the screen keeps for its queue pair (a queue item or a pair id).
    """

    mode: Mode = "queue"
    parked: T | None = None
    trail: list[int] = field(default_factory=list)
    pos: int = 0

    def park(self, current: T | None) -> None:
        """Keep the queue pair on screen before leaving the queue for history or aside."""
        if self.mode == "queue" and current is not None:
            self.parked = current

    def take_parked(self) -> T | None:
        parked, self.parked = self.parked, None
        return parked

    def where(self, noun: str) -> str:
        """"history 3 of 7", with the screen's own noun."""
        return f"{noun} {self.pos + 1} of {len(self.trail)}"

    def back(self, load_trail: Callable[[], list[int]], current: T | None,
             none_yet: str, at_first: str) -> Move:
        """One step back in history, starting the walk at the newest decision."""
        if self.mode != "history":
            trail = load_trail()
            if not trail:
                return Move("stay", message=none_yet)
            self.park(current)
            self.trail, self.pos = trail, len(trail) - 1
        elif self.pos == 0:
            return Move("stay", message=at_first)
        else:
            self.pos -= 1
        return Move("history", self.trail[self.pos])

    def forward(self, at_newest: str) -> Move:
        """One step forward in history; past its end, back to the queue."""
        if self.mode == "queue":
            return Move("stay", message=at_newest)
        if self.mode == "history" and self.pos + 1 < len(self.trail):
            self.pos += 1
            return Move("history", self.trail[self.pos])
        return Move("queue")

    def after_decision(self) -> Move:
        """Deciding moves on: to the next history pair while walking it, else the queue."""
        if self.mode == "history":
            self.pos += 1
            if self.pos < len(self.trail):
                return Move("history", self.trail[self.pos])
        return Move("queue")

    def open_aside(self, current: T | None) -> None:
        self.park(current)

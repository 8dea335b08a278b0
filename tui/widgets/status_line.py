"""The status line: who is reviewing, how far they are, their pace, time on this pair."""

from __future__ import annotations

from collections import deque
from dataclasses import dataclass, field

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import ProgressBar, Static

from .. import literal

PACE_WINDOW = 300.0  # seconds of recent decisions the pace is worked out over


@dataclass
class Pace:
    """Decisions per minute over the last few minutes of this session."""

    started: float
    times: deque[float] = field(default_factory=deque)

    def record(self, now: float) -> None:
        self.times.append(now)
        while self.times and self.times[0] < now - PACE_WINDOW:
            self.times.popleft()

    def per_minute(self, now: float) -> float | None:
        while self.times and self.times[0] < now - PACE_WINDOW:
            self.times.popleft()
        span = min(PACE_WINDOW, now - self.started)
        if len(self.times) < 2 or span <= 0:
            return None
        return len(self.times) * 60.0 / span


def clock_text(seconds: float) -> str:
    seconds = max(0, int(seconds))
    if seconds >= 3600:
        return f"{seconds // 3600}:{seconds % 3600 // 60:02d}:{seconds % 60:02d}"
    return f"{seconds // 60}:{seconds % 60:02d}"


class StatusLine(Horizontal):
    """One line at the top of the review screen; shorter wording when the terminal is narrow."""

    COMPACT_BELOW = 100

    def __init__(self, *, id: str | None = None) -> None:
        super().__init__(id=id)
        self._who: tuple[str, str, str] = ("", "", "")
        self._counts: tuple[int, int | None] = (0, None)
        self._timing: tuple[float | None, float | None] = (None, None)
        self._shown: dict[str, str] = {}

    def _put(self, part: str, text: Text, sized: bool) -> None:
        """Update one part if its text changed; lay out again only if its width may have."""
        old = self._shown.get(part)
        if old == text.plain:
            return
        self._shown[part] = text.plain
        layout = sized and (old is None or len(old) != len(text.plain))
        self.query_one(f"#status-{part}", Static).update(text, layout=layout)

    def compose(self) -> ComposeResult:
        yield Static(id="status-who")
        yield Static(id="status-counts")
        yield ProgressBar(total=1, show_percentage=False, show_eta=False, id="status-bar")
        yield Static(id="status-pace")

    @property
    def compact(self) -> bool:
        return (self.size.width or self.app.size.width) < self.COMPACT_BELOW

    def on_resize(self) -> None:
        self._shown.clear()
        self.set_who(*self._who)
        self.set_counts(*self._counts)
        self.set_timing(*self._timing)

    def set_who(self, project: str, reviewer: str, busy: str = "") -> None:
        self._who = (project, reviewer, busy)
        text = Text() if self.compact else Text("docket · ", "bold")
        text.append_text(literal.one_line(project, 14 if self.compact else 20))
        text.append(" · ")
        text.append_text(literal.record_id(reviewer, 12 if self.compact else 16))
        if busy:
            text.append(f" · {busy}", "italic")  # a word: a symbol would need explaining
        self._put("who", text, sized=True)

    def set_counts(self, decided: int, remaining: int | None) -> None:
        self._counts = (decided, remaining)
        bar = self.query_one("#status-bar", ProgressBar)
        if remaining is None:
            self._put("counts", Text(f"{decided:,} decided · counting…"), sized=True)
            bar.update(total=1, progress=0)
            return
        if self.compact:
            self._put("counts", Text(f"{decided:,} done · {remaining:,} to go"), sized=True)
        else:
            self._put("counts", Text(f"{decided:,} decided · {remaining:,} in queue"),
                      sized=True)
        bar.update(total=max(1, decided + remaining), progress=decided)

    def set_timing(self, per_minute: float | None, on_pair: float | None) -> None:
        self._timing = (per_minute, on_pair)
        pace = "—/min" if per_minute is None else f"{per_minute:.0f}/min"
        text = Text(pace)
        if on_pair is not None:
            text.append(f" · {clock_text(on_pair)}" + ("" if self.compact else " on pair"))
        self._put("pace", text, sized=False)

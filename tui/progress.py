"""A progress display on stderr for long core work; the core only sees a plain callback."""

from __future__ import annotations

import sys
import time
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

from .terminal import unwrapped


@contextmanager
def progress_bar(enabled: bool = True) -> Iterator[Any]:
    """Yield a ``(step, done, total)`` callback drawing one bar per step (only on a terminal)."""
    if not enabled or not sys.stderr.isatty():
        yield lambda step, done, total: None
        return
    from rich.console import Console
    from rich.progress import BarColumn, Progress, TaskProgressColumn, TextColumn, TimeElapsedColumn

    bars = Progress(TextColumn("{task.description:<24}"), BarColumn(), TaskProgressColumn(),
                    TimeElapsedColumn(), console=Console(file=unwrapped(sys.stderr)),
                    transient=False)
    tasks: dict[str, Any] = {}
    started = time.monotonic()

    def update(step: str, done: int, total: int) -> None:
        if step not in tasks:
            # Show the bars only once the work has lasted long enough to be worth watching.
            if time.monotonic() - started > 0.3 and not bars.live.is_started:
                bars.start()
            tasks[step] = bars.add_task(step, total=max(total, 1))
        bars.update(tasks[step], completed=done, total=max(total, 1))

    try:
        yield update
    finally:
        if bars.live.is_started:
            bars.stop()


@contextmanager
def working(step: str, enabled: bool = True) -> Iterator[None]:
    """One bar that pulses with the time spent, for work that has no count to show (a query, a
    file written in one call): on a terminal only, and only once it has lasted 0.3 s."""
    if not enabled or not sys.stderr.isatty():
        yield
        return
    import threading

    from rich.console import Console
    from rich.progress import BarColumn, Progress, TextColumn, TimeElapsedColumn

    bars = Progress(TextColumn("{task.description:<24}"), BarColumn(), TimeElapsedColumn(),
                    console=Console(file=unwrapped(sys.stderr)), transient=True,
                    redirect_stdout=False, redirect_stderr=False)
    bars.add_task(step, total=None)
    lock = threading.Lock()
    done = False

    def show() -> None:
        with lock:
            if not done:
                bars.start()

    timer = threading.Timer(0.3, show)
    timer.daemon = True
    timer.start()
    try:
        yield
    finally:
        timer.cancel()
        with lock:
            done = True
            if bars.live.is_started:
                bars.stop()

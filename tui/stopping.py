"""SIGTERM and SIGHUP end a command the way Ctrl-C does.

Left to Python's defaults, either signal ends the process where it stands: ``docket label``
stopped that way kept the decisions of the batches it had written (6,129 of 118,591), a build
or an export left its hidden temporary beside the target, a screen left the terminal reporting
the mouse with the cursor hidden, and nothing was said. Raised as ``KeyboardInterrupt``, the
signal runs the roll-backs and clean-ups Ctrl-C runs. A screen is asked to quit instead, as
``q`` does (its decisions are saved as they are made), so the terminal is given back.
"""

from __future__ import annotations

import asyncio
import signal
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from types import FrameType

from docket.core.errors import Interrupted

STOPS = ("SIGTERM", "SIGHUP")  # by name: Windows has no SIGHUP
INTERRUPT_EXIT = 130  # 128 + SIGINT, as a shell reports Ctrl-C

_received: list[int] = []
_quit_screen: list[Callable[[], None]] = []


@contextmanager
def stop_signals() -> Iterator[None]:
    """While the command runs, a stop signal raises ``KeyboardInterrupt`` (or quits a screen)."""
    previous = {}
    for name in STOPS:
        number = getattr(signal, name, None)
        # an ignored signal was someone's choice (nohup, a supervisor): it stays ignored
        if number is None or signal.getsignal(number) is signal.SIG_IGN:
            continue
        previous[number] = signal.signal(number, _stop)
    try:
        yield
    finally:
        for number, handler in previous.items():
            signal.signal(number, handler)
        _received.clear()


def _stop(number: int, _frame: FrameType | None) -> None:
    first = not _received
    _received.append(number)
    loop = _screen_loop()
    if loop is not None:
        if first:  # the screen quits between two of its own steps, never inside a write
            loop.call_soon_threadsafe(_quit_screen[-1])
            return
        raise KeyboardInterrupt  # a second signal: the screen did not quit
    if first:
        raise KeyboardInterrupt
    # a second signal while the first one's roll-back runs would cut the roll-back short


def _screen_loop() -> asyncio.AbstractEventLoop | None:
    if not _quit_screen:
        return None
    try:
        return asyncio.get_running_loop()  # the handler runs in the screen's thread
    except RuntimeError:  # not started yet, or stopped: nothing is drawn to give back
        return None


def received() -> str | None:
    """The name of the stop signal that arrived, if one did (``'SIGTERM'``)."""
    return signal.Signals(_received[0]).name if _received else None


def exit_code() -> int:
    """128 + the signal's number, as a shell reports a process a signal ended."""
    return 128 + _received[0] if _received else INTERRUPT_EXIT


@contextmanager
def quitting_screen(quit_screen: Callable[[], None]) -> Iterator[None]:
    """While a screen runs, a stop signal calls ``quit_screen`` (``app.exit``) in its loop;
    once it has quit, the command ends as interrupted."""
    _quit_screen.append(quit_screen)
    try:
        yield
    finally:
        _quit_screen.pop()
    if _received:
        raise Interrupted("the screen was closed; every decision made on it is saved")

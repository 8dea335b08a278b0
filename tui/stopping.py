"""SIGTERM and SIGHUP end a command the way Ctrl-C does.

Left to Python's defaults, either signal ends the process where it stands: ``docket label``
stopped that way kept the decisions of the batches it had written (6,129 of 118,591), a build
or an export left its hidden temporary beside the target, a screen left the terminal reporting
the mouse with the cursor hidden, and nothing was said. Raised as ``KeyboardInterrupt``, the
signal runs the roll-backs and clean-ups Ctrl-C runs. A screen is asked to quit instead, as
``q`` does (its decisions are saved as they are made), so the terminal is given back.

Once the command's work is complete and its result printed (:func:`work_done`), a stop signal
no longer interrupts anything: the command ends with its own exit code, as it would have a
moment later. Left to the default, a signal in those last moments (the interpreter's exit
takes a tenth of a second) ended a finished command with 143 and no line, which read as work
lost when none was. Ctrl-C (SIGINT) is held the same way once the work is done: left to
Python's own handler, a Ctrl-C in those moments ended a finished ``docket new`` or ``label``
as killed (-2, nothing said) or as "interrupted" although its work was complete.
"""

from __future__ import annotations

import asyncio
import os
import signal
import sys
import threading
from collections.abc import Callable, Iterator
from contextlib import contextmanager, suppress
from types import FrameType

from docket.core.errors import Interrupted

STOPS = ("SIGTERM", "SIGHUP", "SIGINT")  # by name: Windows has no SIGHUP
SAID = ("SIGTERM", "SIGHUP")  # named in 'interrupted by ...': Ctrl-C is the user's own key
INTERRUPT_EXIT = 130  # 128 + SIGINT, as a shell reports Ctrl-C

_received: list[int] = []
_quit_screen: list[Callable[[], None]] = []
_done: list[int] = []  # the command's own exit code, once its work is complete
_late: list[int] = []  # the signals that end a finished command with its own code
_watchdog: list[threading.Timer] = []  # ends a screen whose quit hangs (_watch_the_quit)
GRACE = 5.0  # seconds a screen has to quit after a stop signal; it takes well under one


@contextmanager
def stop_signals(to_the_end: bool = False) -> Iterator[None]:
    """While the command runs, a stop signal raises ``KeyboardInterrupt`` (or quits a screen).

    With ``to_the_end`` (the installed command, whose process ends after it), a command whose
    work is done keeps a handler through the interpreter's exit that ends the process with the
    command's own code; otherwise the previous handlers are given back.
    """
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
        late = _done[0] if _done and to_the_end else None
        for number, handler in previous.items():
            signal.signal(number, handler if late is None else _finished(late))
        _late[:] = list(previous) if late is not None else []
        _received.clear()
        _done.clear()


def work_done(code: int) -> None:
    """The command has done its work and printed its result: it ends with ``code`` whatever
    stop signal comes now."""
    _done[:] = [code]


def _finished(code: int) -> Callable[[int, FrameType | None], None]:
    def end(_number: int, _frame: FrameType | None) -> None:
        for stream in (sys.stdout, sys.stderr):  # what the command printed is already out
            with suppress(OSError, ValueError):  # a closed pipe or stream: nothing to give
                stream.flush()
        os._exit(code)  # the exit's own clean-up is what the signal asks to skip
    return end


def at_the_last() -> None:
    """Run last at exit: the interpreter then sets a Python handler back to the default (the
    signal would end the process as killed), but leaves an ignored signal ignored, for the
    tenth of a second its own clean-up takes, where nothing is left that could hang."""
    for number in _late:
        signal.signal(number, signal.SIG_IGN)


def _stop(number: int, _frame: FrameType | None) -> None:
    if _done:  # the work is complete: the command returns its own code a moment later
        return
    first = not _received
    _received.append(number)
    loop = _screen_loop()
    if loop is not None:
        if first:  # the screen quits between two of its own steps, never inside a write
            loop.call_soon_threadsafe(_quit_screen[-1])
            _watch_the_quit()
            return
        raise KeyboardInterrupt  # a second signal: the screen did not quit
    if first:
        raise KeyboardInterrupt
    # a second signal while the first one's roll-back runs would cut the roll-back short


def _watch_the_quit() -> None:
    """If the screen has not quit after ``GRACE`` seconds, end the process there.

    With its terminal gone (SIGHUP when a terminal window or tmux session is closed), Textual's
    writer thread can die on the closed terminal and its quit then waits forever on a full
    queue: the process stayed alive with nobody to see it. Every decision is its own committed
    transaction, so ending the process loses none, and a refit cut short is rolled back by
    SQLite when the file is next opened."""
    timer = threading.Timer(GRACE, _give_up)
    timer.daemon = True
    _watchdog[:] = [timer]
    timer.start()


def _give_up() -> None:
    if _quit_screen:  # still on the screen: its quit hangs
        _hard_exit(exit_code())


def _hard_exit(code: int) -> None:
    os._exit(code)


def _screen_loop() -> asyncio.AbstractEventLoop | None:
    if not _quit_screen:
        return None
    try:
        return asyncio.get_running_loop()  # the handler runs in the screen's thread
    except RuntimeError:  # not started yet, or stopped: nothing is drawn to give back
        return None


def received() -> str | None:
    """The name of the stop signal that arrived, if one did and it is worth naming
    (``'SIGTERM'``; Ctrl-C's SIGINT is not)."""
    name = signal.Signals(_received[0]).name if _received else None
    return name if name in SAID else None


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
        for timer in _watchdog:
            timer.cancel()
        _watchdog.clear()
    if _received:
        raise Interrupted("the screen was closed; every decision made on it is saved")

"""Leaving a screen clean: the last frame is wiped before the terminal is handed back.

A terminal with an alternate screen restores what was there before (the build log of
``docket demo``, say) whatever we do. One without it (or with it turned off, as some
multiplexers and IDE terminals do) would keep the last frame, and what the command prints
next would land on top of it. Clearing while still in application mode costs nothing in the
first case and wipes the frame in the second.
"""

from __future__ import annotations

from textual.driver import Driver

CLEAR = "\x1b[2J\x1b[H"  # erase the display, cursor to the top left


def clearing(base: type[Driver]) -> type[Driver]:
    """``base`` with a display clear before it leaves application mode."""

    class Clearing(base):  # type: ignore[valid-type,misc]
        def stop_application_mode(self) -> None:
            self.write(CLEAR)
            super().stop_application_mode()

    Clearing.__name__ = f"Clearing{base.__name__}"
    return Clearing

"""Whether an error was a Ctrl-C's, for the entry point and the command line alike.

Imports nothing: the entry point asks it before any library has loaded.
"""

from __future__ import annotations


def interrupt_within(exc: BaseException) -> bool:
    """True for an error that a Ctrl-C or stop signal caused: a ``KeyboardInterrupt`` in its
    causes, which a library turned into its own error on the way up (pybind11 turns one met
    while a scipy module loads into ``ImportError: initialization failed``, a traceback)."""
    at: BaseException | None = exc
    for _ in range(20):  # a chain of causes is short; a loop in it must not hang the start
        if at is None:
            return False
        if isinstance(at, KeyboardInterrupt):
            return True
        at = at.__cause__ or at.__context__
    return False

"""The installed ``docket`` command's entry point, kept free of heavy imports.

Loading the command line (pandas, numpy, the facade) takes about half a second, before
``cli.main`` handles Ctrl-C; pressed then, it ended in a traceback through the import machinery
instead of docket's one line.
"""

from __future__ import annotations

import sys

from .interrupts import interrupt_within

INTERRUPT_EXIT = 130  # 128 + SIGINT, as stopping.py and a shell report Ctrl-C


def run() -> None:
    try:
        from .cli import run as run_command
    except (KeyboardInterrupt, ImportError) as exc:
        # pybind11 turns a Ctrl-C met while a module loads into ImportError ('initialization
        # failed'), the interrupt kept as its cause
        if not interrupt_within(exc):
            raise
        print("docket: interrupted while starting; nothing was done", file=sys.stderr)
        sys.exit(INTERRUPT_EXIT)
    run_command()

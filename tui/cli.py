"""The ``docket`` command: the top-level parser, and each ``cli_*`` module's commands under it.

Every command module has the same shape: ``register(sub)`` declares its commands (options, help
and example beside the function that runs them), and each function makes one facade call and
prints what it returns.
"""

from __future__ import annotations

import argparse
import atexit
import contextlib
import os
import sqlite3
import sys
import warnings

from . import (
    cli_gold,
    cli_matchers,
    cli_missed,
    cli_policy,
    cli_project,
    cli_scale,
    cli_screens,
    cli_supplement,
    cli_team,
)
from .cli_base import Formatter, version, warn_line
from .cli_checks import Parser, parse
from .interrupts import interrupt_within
from .stopping import at_the_last, exit_code, received, stop_signals, work_done
from .terminal import output_closed, safe_streams, said


def build_parser() -> argparse.ArgumentParser:
    parser = Parser(
        prog="docket", formatter_class=Formatter,
        description="Review candidate record pairs, measure agreement and export gold labels.",
        epilog="Start with:  docket demo")
    parser.add_argument("--version", action="version", version=f"docket {version()}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    for module in (cli_project, cli_screens, cli_team, cli_gold, cli_missed, cli_policy,
                   cli_matchers, cli_scale, cli_supplement):
        module.register(sub)
    return parser


def run() -> None:
    """The installed ``docket`` command: :func:`main`, then the process ends with its code (a
    stop signal during the interpreter's exit, after the work, ends it with that code too)."""
    atexit.register(at_the_last)  # registered first, so that it runs after every other
    sys.exit(main(to_the_end=True))


def main(argv: list[str] | None = None, to_the_end: bool = False) -> int:
    if output_closed():  # refused before any work: what it did could not be said
        if sys.stderr is not None:
            print("docket: standard output is closed; give the command somewhere to write "
                  "(>/dev/null to drop what it prints)", file=sys.stderr)
        return 2
    with safe_streams(), warnings.catch_warnings():  # every line printed reaches it inert
        warnings.simplefilter("default")  # each distinct message once
        warnings.filterwarnings("ignore", message="DataFrame is highly fragmented")
        # Dask's advice to whoever wrote the graph (docket --engine dask ships the records'
        # keys in it), which the user of the command cannot act on
        warnings.filterwarnings("ignore", message="Sending large graph of size")
        # warnings for developers, not users: a library's deprecations, and a file left open
        # by an import that a Ctrl-C cut short ("unclosed file ... .pyc") before 'interrupted'
        for category in (DeprecationWarning, PendingDeprecationWarning, ResourceWarning):
            warnings.filterwarnings("ignore", category=category)
        warnings.showwarning = warn_line  # one line each, on standard error
        with stop_signals(to_the_end):
            code = _main(argv)
            work_done(code)  # what went wrong, too, was said: the code stands
            return code


def _main(argv: list[str] | None) -> int:
    parser = build_parser()
    words = sys.argv[1:] if argv is None else list(argv)
    if words[:1] == ["help"]:  # 'docket help export', as many tools take it: that --help
        words = [*words[1:2], "--help"]
    args = parse(parser, words)
    if not getattr(args, "func", None):
        parser.print_help()
        return 0
    from docket.core.errors import DocketError
    try:
        code = int(args.func(args) or 0)
        sys.stdout.flush()  # a full disk met by the last lines is reported, not lost at exit
        work_done(code)  # a stop signal from now on changes nothing: the result stands
        return code
    except DocketError as exc:
        with contextlib.suppress(Exception):  # standard error itself may be what failed
            from .folding import to_stderr
            to_stderr(f"docket: {said(exc)}")
        return exc.exit_code
    except sqlite3.Error as exc:  # the file met trouble mid-command (full disk, busy, damage)
        from docket.core import file_trouble

        from .folding import to_stderr
        to_stderr(f"docket: {said(file_trouble(exc, getattr(args, 'project', None) or 'project'))}")
        return 2
    except KeyboardInterrupt as exc:  # what stands, when some of the work did
        return _interrupted(said(exc))
    except BrokenPipeError:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 0
    except Exception as exc:  # last: a re-raise here skips the clauses after it
        if not interrupt_within(exc):
            raise
        return _interrupted("")  # the error was the interrupt's, turned on its way up


def _interrupted(what_stands: str) -> int:
    by = f" by {received()}" if received() else ""
    with contextlib.suppress(OSError):  # after SIGHUP the terminal may be gone
        from .folding import to_stderr
        to_stderr(f"docket: interrupted{by}; {what_stands or 'nothing was half-written'}")
    return exit_code()


if __name__ == "__main__":  # pragma: no cover
    run()

"""What every command module of the CLI shares: declaring a command, opening a project, the
reviewer's name, the one-line warning. The ``cli_*`` modules import this; nothing here imports
them.
"""

from __future__ import annotations

import argparse
import getpass
import os
import shutil
import textwrap
from collections.abc import Callable
from typing import Any

from .figures import many
from .terminal import said


class Formatter(argparse.RawDescriptionHelpFormatter):
    """Help at most 100 columns wide, and no wider than the terminal.

    Descriptions are written one paragraph to a line; each is wrapped at word ends here (a
    terminal of 80 columns cut them mid-word), while indented lines, such as a command to
    type, stay as written.
    """

    def __init__(self, prog: str) -> None:
        columns = shutil.get_terminal_size((102, 24)).columns  # piped: as wide as it may be
        super().__init__(prog, max_help_position=32, width=max(40, min(100, columns - 2)))

    def _fill_text(self, text: str, width: int, indent: str) -> str:
        out = []
        for line in text.splitlines():
            if not line.strip() or line[:1].isspace():
                out.append(indent + line)
            else:
                out.append(textwrap.fill(line, width, initial_indent=indent,
                                         subsequent_indent=indent, break_long_words=False,
                                         break_on_hyphens=False))
        return "\n".join(out) + ("\n" if text.endswith("\n") else "")


def command(sub: argparse._SubParsersAction, name: str, summary: str, description: str,
             example: str, func: Callable[[argparse.Namespace], int]) -> argparse.ArgumentParser:
    p = sub.add_parser(name, help=summary, description=f"{summary}\n\n{description}".strip(),
                       epilog=f"example:\n  {example}", formatter_class=Formatter)
    p.set_defaults(func=func)
    return p


def version() -> str:
    from importlib.metadata import PackageNotFoundError
    from importlib.metadata import version as v
    try:
        return v("docket")
    except PackageNotFoundError:  # running from a source tree
        return "0+unknown"


def default_reviewer(given: str | None, option: str = "--reviewer") -> str:
    """The name given, else $DOCKET_REVIEWER, else the user's. A name given empty is refused:
    '--reviewer "$WHO"' with $WHO unset recorded a whole file of labels as the user's own."""
    if given is not None and not given.strip():
        from docket.core import DocketError
        raise DocketError(f"{option} {given!r}: a reviewer needs a name; give one, or leave "
                          f"{option} out for $DOCKET_REVIEWER or your user name")
    name = given or os.environ.get("DOCKET_REVIEWER") or getpass.getuser()
    return name.strip()


MASK_HELP = ("show these columns partly masked; repeatable, and a column whose name holds a "
             "comma goes whole in one --mask")


def warn_line(message: Warning | str, category: type, *rest: Any, **kw: Any) -> None:
    """How the command line shows a warning: one line, no source excerpt."""
    # said: a value inside (a column name) may hold a newline, which would forge a line
    from .folding import to_stderr
    to_stderr(f"docket: warning: {said(message)}")


def open_project(path: str, readonly: bool = False) -> Any:
    from docket.core import Project
    return Project.open(path, readonly=readonly)


def refuse_to_discard(path: str, option: str, keep: str = "") -> None:
    """A rebuild over a project that holds people's decisions (any but ``keep``'s), or that
    cannot be read to count them, needs saying so with --discard-decisions; a file that is no
    project is left to the build."""
    from docket.core import DocketError
    from docket.core.errors import NotAProject

    try:
        with open_project(path, readonly=True) as project:
            n, people = project.decisions_by_others(keep)
    except NotAProject:
        return
    except DocketError as exc:  # a newer docket's project, a damaged one: it was replaced
        raise DocketError(f"{str(exc).rstrip('.')}; so {option} cannot tell what decisions it "
                          f"holds: copy the file to keep them, then pass {option} "
                          "--discard-decisions") from None
    if n:
        raise DocketError(f"{path} holds {many(n, 'decision')} by {many(people, 'reviewer')} "
                          f"that {option} would discard; copy the file to keep them, then pass "
                          f"{option} --discard-decisions")


def refit_words(result: Any) -> str:
    """What a refit after label or merge did, for its line of output."""
    if result.superseded:
        return ("refit: not written, as another process had meanwhile refit the model on "
                "later decisions; that model stands")
    return f"refit: ranker {result.ranker}, {many(result.labels, 'labelled pair')} used"

"""What the command line checks before any command runs: value ranges and misspellings.

A mistake here is one line on standard error, exit code 2, naming the option and what to
give instead; a misspelled command, option or choice gets the nearest correct one suggested.
"""

from __future__ import annotations

import argparse
import difflib
import math
import re
import shlex
import sys
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any, NoReturn

_CHOICE = re.compile(r"invalid choice: '([^']*)' \(choose from (.*)\)")


def share(text: str) -> float:
    """A number from 0 to 1 (a probability or a share of pairs)."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number; give one from 0 to 1, "
                                         "e.g. 0.5") from None
    if not 0.0 <= value <= 1.0:
        raise argparse.ArgumentTypeError(f"{text} is outside 0 to 1; give a number from 0 to 1, "
                                         "e.g. 0.5")
    return value


LARGEST = 2**63 - 1  # the largest whole number SQLite and numpy's int64 hold
MOST_WORKERS = 256  # processes on one machine; a typo of many digits must not fork them all
MOST_LISTED = 10**9  # pairs one 'next' lists; the queue reads a pool beyond it in one query


def finite(text: str) -> float:
    """Any number but nan and the infinities, which float() reads and the figures cannot use."""
    try:
        value = float(text)
    except ValueError:
        value = math.nan
    if not math.isfinite(value):
        raise argparse.ArgumentTypeError(f"{text!r} is not a number; give one, e.g. 0.5")
    return value


def at_least(low: int, high: int = LARGEST) -> Callable[[str], int]:
    """A whole number from ``low`` to ``high``."""
    def whole(text: str) -> int:
        try:
            value = int(text.replace("_", "").replace(",", ""))
        except ValueError:
            raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
        if value < low:
            raise argparse.ArgumentTypeError(f"{text} is too small; give {low} or more")
        if value > high:
            raise argparse.ArgumentTypeError(f"{text} is too large; give at most {high:,}")
        return value
    whole.__name__ = f"whole number ≥ {low}"
    return whole


def check_engine(args: argparse.Namespace) -> None:
    """A --scheduler is a Dask scheduler: given without --engine dask it would go unused."""
    if getattr(args, "scheduler", None) and getattr(args, "engine", None) != "dask":
        from docket.core.errors import DocketError
        raise DocketError(f"--scheduler {args.scheduler}: a Dask scheduler; add --engine dask")


def nearest(word: str, choices: Sequence[str]) -> str | None:
    found = difflib.get_close_matches(word, list(choices), n=1, cutoff=0.6)
    return found[0] if found else None


def _hint(message: str) -> str:
    m = _CHOICE.search(message)
    if m:
        best = nearest(m[1], re.findall(r"'([^']*)'", m[2]))
        if best:
            return f"; did you mean '{best}'?"
    return ""


GIVEN = "_given_once"  # the namespace's record of the one-value options given so far


class _Once(argparse._StoreAction):
    """An option that takes one value, refused when given twice with two values: argparse kept
    the last unsaid, so 'label --from a.csv --from b.csv' recorded b.csv alone, and
    '--reviewer ana --reviewer ben' gave ana's file to ben."""

    def __call__(self, parser: argparse.ArgumentParser, namespace: argparse.Namespace,
                 values: Any, option_string: str | None = None) -> None:
        given: dict[str, Any] = namespace.__dict__.setdefault(GIVEN, {})
        if self.dest in given and given[self.dest] != values:
            parser.error(f"argument {'/'.join(self.option_strings)}: given twice, "
                         f"{given[self.dest]!r} and {values!r}; give it once")
        given[self.dest] = values
        setattr(namespace, self.dest, values)


class Parser(argparse.ArgumentParser):
    """argparse with one-line errors and suggestions (argparse has its own only from 3.14),
    and options of one value that may be given once."""

    def error(self, message: str) -> NoReturn:
        from .folding import for_stderr
        self.exit(2, for_stderr(f"{self.prog}: {message}{_hint(message)} (see '{self.prog} "
                                "--help')") + "\n")

    def add_argument(self, *names: Any, **kwargs: Any) -> argparse.Action:
        if names and str(names[0]).startswith("-") and kwargs.get("action") in (None, "store"):
            kwargs["action"] = _Once
        return super().add_argument(*names, **kwargs)


def _options(parser: argparse.ArgumentParser) -> list[str]:
    return [s for a in parser._actions for s in a.option_strings]


def chosen_parser(parser: argparse.ArgumentParser, args: argparse.Namespace
                  ) -> argparse.ArgumentParser:
    """The (sub-)parser of the command that ``args`` names, e.g. that of ``reviewers add``."""
    return _parsers(parser, args)[-1]


def _parsers(parser: argparse.ArgumentParser, args: argparse.Namespace
             ) -> list[argparse.ArgumentParser]:
    """The parsers from the top to the command's own: docket, reviewers, reviewers add."""
    chain = [parser]
    for dest in ("command", "action"):
        sub = next((a for a in chain[-1]._actions if isinstance(a, argparse._SubParsersAction)),
                   None)
        name = getattr(args, dest, None)
        if sub is None or name not in sub.choices:
            break
        chain.append(sub.choices[name])
    return chain


def _rest_of_a_list(command: argparse.ArgumentParser, args: argparse.Namespace,
                    extra: list[str]) -> list[str]:
    """Words after an option that belong to the command's list of files or names.

    argparse fills a ``nargs="*"`` (or ``"+"``) positional before the first option, so in
    ``matchers P import --name m file.csv`` the file was left over as "unrecognized".
    """
    lists = [a for a in command._actions if not a.option_strings and a.nargs in ("*", "+")
             and isinstance(getattr(args, a.dest, None), list)]
    if len(lists) != 1 or any(w.startswith("-") for w in extra):
        return extra
    getattr(args, lists[0].dest).extend(extra)
    return []


PATHS = {"FILE", "PATH", "FOLDER", "FILE|-", "OTHER", "FILE|NAME"}  # the metavars of paths
# Names whose empty value ("$IDCOL" unset) read as not given: --left-id '' guessed the id
# column, --of ',' took every matcher, --scheduler '' started a local cluster.
NAMED = {"COL": "column name", "A,B,...": "list of names", "ADDRESS": "address"}


def _no_empty_path(parser: argparse.ArgumentParser, args: argparse.Namespace) -> None:
    """An empty path ('--predictions ""', as an unset shell variable gives) is refused, and so
    is an empty column name or list of names (``NAMED``). A path read as '.', "a folder", and
    where the option is optional as not given at all: evaluate ran without the predictions
    asked for, new blocked instead of reading --pairs."""
    for command in _parsers(parser, args):
        for action in command._actions:
            what = ("path" if action.metavar in PATHS or action.dest == "project"
                    else NAMED.get(str(action.metavar)))
            if what is None:
                continue
            value = getattr(args, action.dest, None)
            given = value if isinstance(value, list) else [value]
            if any(isinstance(v, str) and not (v if what == "path" else v.replace(",", ""))
                   .strip() for v in given):
                name = "/".join(action.option_strings) or action.metavar or action.dest
                command.error(f"argument {name}: an empty {what}; " + (
                    "give a file or folder name" if what == "path" else
                    "give one, or leave the option out"))


def _subcommands(parser: argparse.ArgumentParser) -> dict[str, argparse.ArgumentParser]:
    sub = next((a for a in parser._actions if isinstance(a, argparse._SubParsersAction)), None)
    return {} if sub is None else dict(sub.choices)


def _actions(command: argparse.ArgumentParser) -> list[str]:
    """What a command taking 'PROJECT ACTION' does: its sub-commands, or the choices of the
    positional after the project (matchers)."""
    places = [a for a in command._actions if not a.option_strings]
    if len(places) < 2 or places[0].dest != "project":
        return []
    if isinstance(places[1], argparse._SubParsersAction):
        return list(places[1].choices)
    return [str(c) for c in places[1].choices or ()]


def _sqlite(path: Path) -> bool:
    try:
        with path.open("rb") as f:
            return f.read(16) == b"SQLite format 3\x00"
    except OSError:
        return False


def _project_first(parser: argparse.ArgumentParser, argv: list[str]) -> None:
    """A command of actions given its action before the project ('docket reviewers list
    vets.docket', as other tools order it) is refused with the order it takes: it was
    "invalid choice: 'vets.docket' (choose from 'add', 'list')", of a command given 'list'."""
    if len(argv) < 2 or "-h" in argv or "--help" in argv:
        return
    command = _subcommands(parser).get(argv[0])
    if command is None or argv[1] not in _actions(command) or Path(argv[1]).exists():
        return
    rest = argv[2:]
    words = [w for w in rest if not w.startswith("-")]
    project = next((w for w in words if w.endswith(".docket")),  # a file to import is no project
                   next((w for w in words if _sqlite(Path(w))), None))
    if project is None:
        order = f"{command.prog} PROJECT {argv[1]} ..."
    else:
        rest.remove(project)
        order = " ".join(shlex.quote(w) for w in [*command.prog.split(), project, argv[1],
                                                   *rest])
    command.error(f"the project comes first, then what to do with it: {order}")


def parse(parser: argparse.ArgumentParser, argv: list[str] | None) -> argparse.Namespace:
    """Parse ``argv``; an unknown option is refused with the nearest option of its command."""
    _project_first(parser, sys.argv[1:] if argv is None else argv)
    args, extra = parser.parse_known_args(argv)
    _no_empty_path(parser, args)
    if extra:
        command = chosen_parser(parser, args)
        extra = _rest_of_a_list(command, args, extra)
    if extra:
        hints = [f"did you mean {best}?" for word in extra if word.startswith("-")
                 for best in [nearest(word.split("=")[0], _options(command))] if best]
        command.error(f"unrecognized arguments: {' '.join(extra)}"
                      + (f"; {' '.join(hints)}" if hints else ""))
    return args

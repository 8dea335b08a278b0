"""Long lines of a report folded at word ends to the terminal's width, under their label.

``status``, ``evaluate`` and ``agreement`` write one line per fact, many of them over 100
characters; an 80-column terminal cut them mid-word ("no / t refit yet"), the rest of the line
at the left edge under the labels. On a terminal each such line now continues under the start
of its own text; a table row (two or more gaps of spaces) stays as it is, since folding it would
break its columns. Piped or redirected output is not folded: a line stays one line for grep.
"""

from __future__ import annotations

import re
import shutil
import sys
import textwrap

GAP = re.compile(r" {2,}")
LABEL_CELLS = 24  # text before one gap up to this wide is a label ("model        ...")


def _hang(line: str) -> int | None:
    """Where the folded lines of ``line`` start, or None for a table row."""
    lead = len(line) - len(line.lstrip(" "))
    gaps = list(GAP.finditer(line, lead))
    if len(gaps) >= 2:
        return None
    if gaps and gaps[0].start() - lead <= LABEL_CELLS:
        return gaps[0].end()
    return lead + 2


def fold(text: str, width: int) -> str:
    """``text`` with each line wider than ``width`` folded at word ends (see the module)."""
    out = []
    for line in text.split("\n"):
        hang = _hang(line) if len(line) > width else None
        if hang is None or hang > width // 2:
            out.append(line)
            continue
        out.append("\n".join(textwrap.wrap(line, width, subsequent_indent=" " * hang,
                                           break_long_words=False, break_on_hyphens=False,
                                           drop_whitespace=True)))
    return "\n".join(out)


def echo(text: str) -> None:
    """Print ``text``, folded to the terminal's width when standard output is one."""
    if sys.stdout.isatty():
        text = fold(text, max(40, shutil.get_terminal_size().columns))
    print(text)

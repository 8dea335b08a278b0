"""Long lines of a report folded at word ends to the terminal's width, under their label.

``status``, ``evaluate`` and ``agreement`` write one line per fact, many of them over 100
characters; an 80-column terminal cut them mid-word ("no / t refit yet"), the rest of the line
at the left edge under the labels. On a terminal each such line now continues under the start
of its own text; a row of figures (two or more gaps of spaces, as a table's) folds only at
its gaps, so that no figure is cut in two. Piped or redirected output is not folded: a line
stays one line for grep.
"""

from __future__ import annotations

import re
import shutil
import sys
import textwrap

GAP = re.compile(r" {2,}")
LABEL_CELLS = 24  # text before one gap up to this wide is a label ("model        ...")


def _hang(line: str) -> int | None:
    """Where the folded lines of ``line`` start, or None for a row of figures set apart by
    gaps of spaces (a table row, 'observed 0.89  chance 0.66  PABAK ...')."""
    lead = len(line) - len(line.lstrip(" "))
    gaps = list(GAP.finditer(line, lead))
    if len(gaps) >= 2:
        return None
    if gaps and gaps[0].start() - lead <= LABEL_CELLS:
        return gaps[0].end()
    return lead + 2


def _second(line: str) -> int:
    """The column of a figure row's second figure, where its rest goes on."""
    lead = len(line) - len(line.lstrip(" "))
    gap = GAP.search(line, lead)
    return gap.end() if gap else lead + 2


def _at_gaps(line: str, width: int, hang: int) -> list[str]:
    """A row of figures folded only where it has a gap of spaces, so that no figure is cut
    in two ('prevalence inde' / 'x -0.5676'), its rest from column ``hang``."""
    lead = len(line) - len(line.lstrip(" "))
    parts = re.split(r"( {2,})", line[lead:])  # figure, gap, figure, gap, ...
    lines, now = [], " " * lead + parts[0]
    for gap, part in zip(parts[1::2], parts[2::2], strict=True):
        if len(now) + len(gap) + len(part) <= width:
            now += gap + part  # the gap as written: a table's columns stay lined up
        else:
            lines.append(now)
            now = " " * hang + part
    return [*lines, now]


def _rows_hang(rows: list[str], width: int) -> int:
    """One column for the rest of every row of a table, the one most of its rows have their
    second figure at ('predicted', '915' and, after '*      0.5', '612' had three)."""
    columns = [_second(row) for row in rows]
    best = max(sorted(set(columns), reverse=True), key=columns.count)  # a tie: the later
    return best if best <= width // 2 else 2


def fold(text: str, width: int) -> str:
    """``text`` with each line wider than ``width`` folded at word ends (see the module)."""
    lines = text.split("\n")
    out: list[str] = []
    i = 0
    while i < len(lines):
        line = lines[i]
        if _hang(line) is None:  # a run of figure rows: one table, folded alike
            j = i
            while j < len(lines) and _hang(lines[j]) is None:
                j += 1
            hang = _rows_hang(lines[i:j], width)
            for row in lines[i:j]:
                out += [row] if len(row) <= width else _at_gaps(row, width, hang)
            i = j
            continue
        hang = _hang(line) or 0
        if len(line) <= width or hang > width // 2:
            out.append(line)
        else:
            out += textwrap.wrap(line, width, subsequent_indent=" " * hang,
                                 break_long_words=False, break_on_hyphens=False)
        i += 1
    return "\n".join(out)


def width() -> int | None:
    """The columns ``echo`` folds to, or None when standard output is not a terminal."""
    return max(40, shutil.get_terminal_size().columns) if sys.stdout.isatty() else None


def echo(text: str) -> None:
    """Print ``text``, folded to the terminal's width when standard output is one."""
    columns = width()
    if columns is not None:
        text = fold(text, columns)
    print(text)

"""Long lines of a report folded at word ends to the terminal's width, under their label.

``status``, ``evaluate`` and ``agreement`` write one line per fact, many of them over 100
characters; an 80-column terminal cut them mid-word ("no / t refit yet"), the rest of the line
at the left edge under the labels. On a terminal each such line now continues under the start
of its own text; a row of figures (two or more gaps of spaces, as a table's) folds only at
its gaps, so that no figure is cut in two. Piped or redirected output is not folded: a line
stays one line for grep. Widths are terminal cells, as printed (``characters.visible``): a
CJK character takes two, so a line of them folded by its count of characters ran to 104
cells of an 80-column terminal.
"""

from __future__ import annotations

import re
import shutil
import sys

from rich.cells import cell_len

from .characters import visible

GAP = re.compile(r" {2,}")
LABEL_CELLS = 24  # text before one gap up to this wide is a label ("model        ...")


def cells(text: str) -> int:
    """The terminal cells ``text`` takes as printed (its stand-ins included)."""
    return cell_len(visible(text))


def _hang(line: str) -> int | None:
    """Where the folded lines of ``line`` start, or None for a row of figures set apart by
    gaps of spaces (a table row, 'observed 0.89  chance 0.66  PABAK ...')."""
    lead = len(line) - len(line.lstrip(" "))
    gaps = list(GAP.finditer(line, lead))
    if len(gaps) >= 2:
        return None
    if gaps and cells(line[lead:gaps[0].start()]) <= LABEL_CELLS:
        return cells(line[:gaps[0].end()])
    return lead + 2


def _second(line: str) -> int:
    """The column of a figure row's second figure, where its rest goes on."""
    lead = len(line) - len(line.lstrip(" "))
    gap = GAP.search(line, lead)
    return cells(line[:gap.end()]) if gap else lead + 2


def _at_gaps(line: str, width: int, hang: int) -> list[str]:
    """A row of figures folded only where it has a gap of spaces, so that no figure is cut
    in two ('prevalence inde' / 'x -0.5676'), its rest from column ``hang``."""
    lead = len(line) - len(line.lstrip(" "))
    parts = re.split(r"( {2,})", line[lead:])  # figure, gap, figure, gap, ...
    lines, now = [], " " * lead + parts[0]
    for gap, part in zip(parts[1::2], parts[2::2], strict=True):
        if cells(now) + len(gap) + cells(part) <= width:
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
                out += [row] if cells(row) <= width else _at_gaps(row, width, hang)
            i = j
            continue
        hang = _hang(line) or 0
        if cells(line) <= width or hang > width // 2:
            out.append(line)
        else:
            out += _words(line, width, hang)
        i += 1
    return "\n".join(out)


def _words(line: str, width: int, hang: int) -> list[str]:
    """``line`` folded at its spaces into lines of at most ``width`` cells (a word wider than
    that stays whole on a line of its own), the second and later ``hang`` cells in. A list of
    items set apart by ' · ' folds between its items, each continuation beginning with its
    '·': folded at any space, 'similar ×2.2' was cut from its factor."""
    if " · " not in line:
        return _plain_words(line, width, hang)
    lead = len(line) - len(line.lstrip(" "))
    first, *items = line[lead:].split(" · ")
    lines, now = [], " " * lead + first
    for item in items:
        if cells(now) + 3 + cells(item) <= width:
            now += " · " + item
        else:
            lines.append(now)
            now = " " * hang + "· " + item
    out: list[str] = []
    for part in [*lines, now]:  # an item wider than a line: at its spaces
        out += [part] if cells(part) <= width else _plain_words(part, width, hang)
    return out


def _plain_words(line: str, width: int, hang: int) -> list[str]:
    lead = len(line) - len(line.lstrip(" "))
    parts = re.split(r"( +)", line[lead:])  # word, spaces, word, ...
    lines, now = [], " " * lead + parts[0]
    for space, word in zip(parts[1::2], parts[2::2], strict=True):
        if not word:  # spaces that end the line
            continue
        if cells(now) + len(space) + cells(word) <= width:
            now += space + word
        else:
            lines.append(now)
            now = " " * hang + word
    return [*lines, now]


def width() -> int | None:
    """The columns ``echo`` folds to, or None when standard output is not a terminal."""
    return max(40, shutil.get_terminal_size().columns) if sys.stdout.isatty() else None


def echo(text: str) -> None:
    """Print ``text``, folded to the terminal's width when standard output is one."""
    columns = width()
    if columns is not None:
        text = fold(text, columns)
    print(text)


def to_stderr(line: str) -> None:
    """An error or warning (one line, see ``terminal.said``) on standard error, folded at word
    ends when that is a terminal: at 80 columns the terminal cut 'docket new''s warnings
    mid-word ('not compare' / 'd', '--keep-placeh' / 'olders'). Piped, it stays one line."""
    print(for_stderr(line), file=sys.stderr)


def for_stderr(text: str) -> str:
    """``text`` folded for standard error when that is a terminal (else as it is)."""
    if sys.stderr.isatty():
        return fold(text, max(40, shutil.get_terminal_size().columns))
    return text

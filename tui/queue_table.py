"""The lines ``docket next`` prints: one row per pair where that fits in 80 columns.

The id columns are as wide as the ids listed, not a fixed 22 cells, so short ids leave the
reason room. Ids too long for one row (two UUIDs and a reason take 97 cells) put the right id
under the left one instead; ids too long for that (the left id beside the pair id, probability
and reason leaves it about 39 cells) each take a line of their own under their pair's row.
An id is cut only where it is wider than a whole line less the indent, in its middle (its
start and its end kept, where long ids differ), with an ellipsis and a last line saying
that ``--json`` lists every id whole, since ids are what a reviewer copies.
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.cells import cell_len, set_cell_size

from docket.core.types import QueueItem

from .figures import probability_text
from .terminal import padded, shown

WIDTH = 80  # a terminal's width by default, and what a pasted listing keeps
PAIR, PROBABILITY = 8, 11  # pair ids up to 99,999,999; "probability" is the widest cell
GAP = "  "
INDENT = " " * (PAIR + len(GAP))  # ids under their pair's row start under the left id column
CUT_NOTE = "(an id with … in it is cut to fit; docket next --json lists every id whole)"


def _row(pair: object, left: str | None, probability: str, why: str, left_w: int) -> str:
    ids = [] if left is None else [padded(left, left_w)]
    return GAP.join([f"{pair:>{PAIR}}", *ids, f"{probability:>{PROBABILITY}}", why])


def _fitted(value: str, room: int) -> tuple[str, bool]:
    """``shown(value)`` whole if it fits ``room`` cells, else cut to them in the middle: ids of
    200 characters that differ at their end, cut there, were listed all alike."""
    text = shown(value)
    if cell_len(text) <= room:
        return text, False
    head = set_cell_size(text, room // 2).rstrip()
    back = set_cell_size(text[::-1], room - 1 - cell_len(head))[::-1]
    while cell_len(back) and cell_len(head) + 1 + cell_len(back) > room:  # a wide character
        back = back[1:]
    return head + "…" + back.lstrip(), True


def queue_lines(items: Sequence[QueueItem], width: int = WIDTH) -> list[str]:
    """The header and the rows of the pairs ``items``, each line at most ``width`` cells."""
    left_w = max([len("left_id")] + [cell_len(shown(i.left_id)) for i in items])
    right_w = max([len("right_id")] + [cell_len(shown(i.right_id)) for i in items])
    why = max((cell_len(shown(i.reason)) for i in items), default=3)
    fixed = PAIR + PROBABILITY + why + 3 * len(GAP)
    if fixed + left_w + right_w + len(GAP) <= width:
        return [GAP.join((f"{'pair_id':>{PAIR}}", padded("left_id", left_w),
                          padded("right_id", right_w), f"{'probability':>{PROBABILITY}}", "why"))
                ] + [GAP.join((f"{i.pair_id:>{PAIR}}", padded(i.left_id, left_w),
                               padded(i.right_id, right_w),
                               f"{probability_text(i.probability):>{PROBABILITY}}",
                               shown(i.reason))) for i in items]
    if fixed + max(left_w, right_w) <= width:
        both = max(left_w, right_w)
        out = [_row("pair_id", "left_id", "probability", "why", both), f"{INDENT}right_id"]
        for i in items:
            out.append(_row(i.pair_id, i.left_id, probability_text(i.probability),
                            shown(i.reason), both))
            out.append(f"{INDENT}{shown(i.right_id)}")
        return out
    room = width - len(INDENT)
    out = [_row("pair_id", None, "probability", "why", 0), f"{INDENT}left_id",
           f"{INDENT}right_id"]
    any_cut = False
    for i in items:
        out.append(_row(i.pair_id, None, probability_text(i.probability), shown(i.reason), 0))
        for rid in (i.left_id, i.right_id):
            text, cut = _fitted(rid, room)
            out.append(f"{INDENT}{text}")
            any_cut = any_cut or cut
    return out + ([CUT_NOTE] if any_cut else [])

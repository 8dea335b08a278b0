"""The lines ``docket next`` prints: one row per pair where that fits in 80 columns.

The id columns are as wide as the ids listed, not a fixed 22 cells, so short ids leave the
reason room. Ids too long for one row (two UUIDs and a reason take 97 cells) put the right id
under the left one instead: ids are never cut, since they are what a reviewer copies.
"""

from __future__ import annotations

from collections.abc import Sequence

from rich.cells import cell_len

from docket.core.types import QueueItem

from .figures import probability_text
from .terminal import padded, shown

WIDTH = 80  # a terminal's width by default, and what a pasted listing keeps
PAIR, PROBABILITY = 8, 11  # pair ids up to 99,999,999; "probability" is the widest cell
GAP = "  "


def queue_lines(items: Sequence[QueueItem], width: int = WIDTH) -> list[str]:
    """The header and the rows of the pairs ``items``, each line at most ``width`` cells
    unless an id alone is wider than the stacked form's room."""
    left_w = max([len("left_id")] + [cell_len(shown(i.left_id)) for i in items])
    right_w = max([len("right_id")] + [cell_len(shown(i.right_id)) for i in items])
    why = max((cell_len(shown(i.reason)) for i in items), default=3)
    if PAIR + left_w + right_w + PROBABILITY + why + 4 * len(GAP) <= width:
        return [GAP.join((f"{'pair_id':>{PAIR}}", padded("left_id", left_w),
                          padded("right_id", right_w), f"{'probability':>{PROBABILITY}}", "why"))
                ] + [GAP.join((f"{i.pair_id:>{PAIR}}", padded(i.left_id, left_w),
                               padded(i.right_id, right_w),
                               f"{probability_text(i.probability):>{PROBABILITY}}",
                               shown(i.reason))) for i in items]
    both = max(left_w, right_w)
    indent = " " * (PAIR + len(GAP))
    out = [GAP.join((f"{'pair_id':>{PAIR}}", padded("left_id", both),
                     f"{'probability':>{PROBABILITY}}", "why")), f"{indent}right_id"]
    for i in items:
        out.append(GAP.join((f"{i.pair_id:>{PAIR}}", padded(i.left_id, both),
                             f"{probability_text(i.probability):>{PROBABILITY}}",
                             shown(i.reason))))
        out.append(f"{indent}{shown(i.right_id)}")
    return out

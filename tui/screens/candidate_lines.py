"""The lines of one record's other candidates (key ``c``): each other record's first values.

The list showed the first field alone, so a person's candidates read 'Mirosz Włoarek' five
times over; their pet, street, town and birth date tell them apart. Every line of a group
starts its values at the same column, under the values of the record they are read against.
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text

from docket.core.types import PairCard

from .. import literal
from ..figures import probability_text
from ..masking import Mask, masked

ID_CELLS = 14  # a record id is cut here
PROBABILITY_CELLS = 10  # the widest probability_text ('> 0.999999')
SUMMARY_CELLS = 30  # the least room for the values beside the ids; with less, a line of their
INDENT = 9  # own, under the ids
SUMMARY_VALUE = 24  # one long value is cut here, so the fields after it still show
MIN_VALUE = 6  # a value that would get less room than this is left out, not cut to 'J…'


@dataclass(frozen=True)
class Layout:
    """Where the parts of a group's lines go, the same for every line of the group."""

    id_cells: int
    column: int  # where the values start
    beside: bool  # on the line of the ids, or on a line of their own under them
    box: int  # cells of a line in the list


def layout(other_ids: list[str], box: int) -> Layout:
    ids = min(ID_CELLS, max([1] + [literal.record_id(i, ID_CELLS).cell_len for i in other_ids]))
    column = 7 + 2 + ids + 2 + len("p ") + PROBABILITY_CELLS + 2
    beside = box - column >= SUMMARY_CELLS
    return Layout(ids, column if beside else INDENT, beside, box)


def summary(values: list[str | None], cells: int) -> Text:
    """The first of ``values`` that fit in ``cells``, escaped, joined by ' · ' (missing: —)."""
    text = Text(no_wrap=True, overflow="ellipsis")
    for value in values:
        sep = " · " if text.cell_len else ""
        room = min(SUMMARY_VALUE, cells - text.cell_len - len(sep))
        if text.cell_len and room < MIN_VALUE:
            break
        text.append(sep, "dim")
        text.append_text(literal.one_line(value, max(1, room), missing="—"))
    return text


def side_values(card: PairCard, left: bool, mask: Mask) -> list[str | None]:
    """One record's compared values in the card's order, masked where the mask says."""
    out = []
    for f in card.fields:
        value = f.left if left else f.right
        hide = bool(mask) and mask.applies(f.field)
        out.append(value if value is None or not hide else masked(value))
    return out


def _padded(text: Text, cells: int) -> None:
    text.append(" " * max(0, cells - text.cell_len))


def other_line(card: PairCard, record: str, at: Layout, mask: Mask,
               label: str | None = None) -> Text:
    """Pair ``card`` among ``record``'s candidates: the other record's id and values."""
    left = card.left_id != record  # the other record is the left one
    text = Text(f"{card.pair_id:>7}  ", no_wrap=True, overflow="ellipsis")
    text.append_text(literal.record_id(card.left_id if left else card.right_id, at.id_cells))
    _padded(text, 7 + 2 + at.id_cells)
    text.append(f"  p {probability_text(card.probability)}")
    if at.beside:
        _padded(text, at.column)
    else:
        text.append("\n" + " " * at.column)
    mine = "" if label is None else f"  your label: {label}"
    text.append_text(summary(side_values(card, left, mask), at.box - at.column - len(mine)))
    text.append(mine, "italic")
    return text


def record_line(heading: str, card: PairCard, record: str, at: Layout, mask: Mask) -> Text:
    """The group's heading, and under it ``record``'s own values, at the values' column."""
    text = Text(heading, "bold")
    text.append("  ")
    text.append_text(literal.record_id(record, ID_CELLS))
    text.append("\n" + " " * at.column)
    text.append_text(summary(side_values(card, card.left_id == record, mask),
                             at.box - at.column))
    return text


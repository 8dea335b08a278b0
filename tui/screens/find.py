"""``/`` and ``c``: pick a pair, found by id or text, or among a record's other candidates."""

from __future__ import annotations

from collections.abc import Callable, Collection
from dataclasses import dataclass
from functools import partial
from typing import ClassVar, cast

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, OptionList, Static
from textual.widgets.option_list import Option
from textual.worker import Worker, WorkerState

from docket.core.project import Project
from docket.core.types import PairCard

from .. import literal
from ..figures import many, probability_text
from ..masking import Mask
from . import candidate_lines

LIMIT = 50
Finder = Callable[[str, int, Collection[str]], list[int]]  # Project.find's text, limit, skip
VALUE_CELLS = 18  # the least room for each of the two values beside the ids; with less,
INDENT = 9  # they take a line of their own, under the ids
BOX_MAX, BOX_SHARE, BOX_INNER = 110, 0.9, 14  # review.tcss #picker-box; borders, padding,
# the list's own border and scroll bar, and a few cells spare (a line that overflows wraps)


@dataclass(frozen=True)
class Group:
    """A heading and the pairs under it (for the candidates of one record)."""

    heading: str
    pair_ids: tuple[int, ...]
    record: str | None = None  # the record every pair of the group names, if one does


def _line_layout(cards: list[PairCard]) -> tuple[int, int, int]:
    """Cells of the widest left id, right id and probability among ``cards``: each line's
    values start at one column. The values of 'p 0.00002' and 'p 0.0004' lines began a cell
    apart, so the found names zig-zagged down the list."""
    def widest(values: list[str], cells: int) -> int:
        return max([1, *(literal.record_id(v, cells).cell_len for v in values)])
    return (widest([c.left_id for c in cards], candidate_lines.ID_CELLS),
            widest([c.right_id for c in cards], candidate_lines.ID_CELLS),
            widest([probability_text(c.probability) for c in cards], 12))


def _pad(text: Text, cells: int) -> None:
    text.append(" " * max(0, cells - text.cell_len))


class PairPicker(ModalScreen[int | None]):
    """Returns the chosen pair id, or None. Shows only this reviewer's own labels."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "close", id="picker-close")]

    def __init__(self, project: Project, reviewer: str, mask: Mask, *, title: str,
                 search: bool = True, groups: tuple[Group, ...] = (),
                 finder: Finder | None = None) -> None:
        super().__init__()
        self.project = project
        self.finder = finder  # searches on a connection of its own (in the worker's thread)
        self._search: Worker | None = None
        self.reviewer = reviewer
        self.mask = mask
        self.title_text = title
        self.search = search
        self.groups = groups
        self._filled: tuple[Group, ...] = ()  # what the list shows, laid out again on resize

    def compose(self) -> ComposeResult:
        with Vertical(id="picker-box") as box:
            box.border_title = self.title_text
            if self.search:
                yield Input(placeholder="pair id, record id, or words of a record",
                            id="picker-input")
            yield OptionList(id="picker-results")
            yield Static(Text("Enter opens the pair · Escape closes"), id="picker-hint")

    def on_mount(self) -> None:
        if self.search:
            self.query_one(Input).focus()
        else:
            self._fill(self.groups)
            self.query_one(OptionList).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        # A search runs in a worker: text that no index finds is looked for in every value of
        # every record, 0.16 s over 200,000 records of four short fields and far longer over
        # long text, and the screen froze until it was done (keys, the clock, Escape).
        event.stop()
        self._fill((Group(f"searching for ‘{literal.visible(event.value)}’ …", ()),))
        finder = self.finder or self.project.find
        self._search = self.run_worker(
            partial(finder, event.value, LIMIT, self.mask.columns), thread=True,
            exclusive=True, group="find", name="find", exit_on_error=False)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker is not self._search:  # an earlier search, overtaken
            return
        if event.state == WorkerState.SUCCESS:
            self._found(cast(list[int], event.worker.result))
        elif event.state == WorkerState.ERROR:
            self._fill((Group(f"the search failed: {event.worker.error}", ()),))

    def _found(self, found: list[int]) -> None:
        # "50 pairs (first 50)" read as a contradiction; the search stops at LIMIT, so say
        # that more may match and how to narrow it
        if len(found) >= LIMIT:
            heading = f"the first {LIMIT} pairs found; more may match: add words to narrow"
        elif found:
            heading = many(len(found), "pair") + " found"
        else:
            heading = ("no pair found: try a pair id, a record id, or the start of a word "
                       "of a value")
            if self.mask:  # a masked e-mail typed in found nothing, and said not why
                heading += " (masked columns are never searched)"
        self._fill((Group(heading, tuple(found)),))
        results = self.query_one(OptionList)
        if found:
            results.focus()

    def on_resize(self) -> None:
        """The lines again for the new width, the same pair under the cursor. Opened at 120
        columns and narrowed to 80, the lines kept their wide layout and wrapped mid-value,
        the second half under the pair id."""
        if not self._filled:
            return
        results = self.query_one(OptionList)
        at = results.highlighted
        chosen = None if at is None else results.get_option_at_index(at).id
        self._fill(self._filled)
        if chosen is not None:
            results.highlighted = results.get_option_index(chosen)

    def _fill(self, groups: tuple[Group, ...]) -> None:
        self._filled = groups
        results = self.query_one(OptionList)
        results.clear_options()
        options: list[Option] = []
        for group in groups:
            if group.record is not None:
                options += self._record_group(group, group.record)
                continue
            options.append(Option(Text(group.heading, "bold"), disabled=True))
            cards = [self.project.card(pid) for pid in group.pair_ids[:LIMIT]]
            at = _line_layout(cards)
            options += [Option(self._line(card, at), id=str(card.pair_id)) for card in cards]
        results.add_options(options)
        first = next((i for i, o in enumerate(options) if not o.disabled), None)
        if first is not None:
            results.highlighted = first

    def _record_group(self, group: Group, record: str) -> list[Option]:
        """One record's candidates: that record's values under the heading, and each other
        record's values at the same column."""
        cards = [self.project.card(pid) for pid in group.pair_ids[:LIMIT]]
        if not cards:
            return [Option(Text(group.heading, "bold"), disabled=True)]
        at = candidate_lines.layout([c.right_id if c.left_id == record else c.left_id
                                     for c in cards], self._room(0))
        out = [Option(candidate_lines.record_line(group.heading, cards[0], record, at,
                                                  self.mask), disabled=True)]
        for card in cards:
            mine = self.project.current_label(card.pair_id, self.reviewer)
            out.append(Option(candidate_lines.other_line(
                card, record, at, self.mask, None if mine is None else mine.label),
                id=str(card.pair_id)))
        return out

    def _line(self, card: PairCard, at: tuple[int, int, int]) -> Text:
        mine = self.project.current_label(card.pair_id, self.reviewer)
        text = Text(f"{card.pair_id:>7}  ", no_wrap=True, overflow="ellipsis")
        left_cells, right_cells, prob_cells = at
        text.append_text(literal.record_id(card.left_id, candidate_lines.ID_CELLS))
        _pad(text, 9 + left_cells)
        text.append(" ↔ ")
        text.append_text(literal.record_id(card.right_id, candidate_lines.ID_CELLS))
        _pad(text, 9 + left_cells + 3 + right_cells)
        text.append(f"  p {probability_text(card.probability):<{prob_cells}}  ")
        if card.fields:
            label = 22 if mine is not None else 0
            cells = self._value_cells(text.cell_len + 3 + label)
            if cells < VALUE_CELLS:  # beside the ids they would wrap mid-line at 80 columns:
                text.rstrip()        # a line of their own, under the ids
                text.append("\n" + " " * INDENT)
                cells = max(VALUE_CELLS // 3, self._value_cells(INDENT + 3 + label))
            # each side's first values, as many as fit: the first field alone read one
            # name for five different people
            for left, end in ((True, " / "), (False, "")):
                text.append_text(candidate_lines.summary(
                    candidate_lines.side_values(card, left, self.mask), cells))
                text.append(end)
        if mine is not None:
            text.append(f"  your label: {mine.label}", "italic")
        return text

    def _room(self, used: int) -> int:
        """What the box leaves beside ``used`` cells of a line."""
        return min(BOX_MAX, int(self.app.size.width * BOX_SHARE)) - BOX_INNER - used

    def _value_cells(self, used: int) -> int:
        """Room for each value: what the box leaves beside ``used`` cells. Product
        titles cut at 18 cells all read 'Ashgrove silent f…' on a 120-column terminal with 40
        cells of the line empty, and a found word was seldom in sight."""
        return self._room(used) // 2

    def on_option_list_option_selected(self, event: OptionList.OptionSelected) -> None:
        event.stop()
        if event.option.id is not None:
            self.dismiss(int(event.option.id))

    def action_cancel(self) -> None:
        self.dismiss(None)

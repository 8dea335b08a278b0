"""Where one matcher fails: the gold-labelled pairs it gets wrong, grouped by the fields that
differ between the two records (``core.matchers.failures``), largest group first.

Each pair shows what kind of error it is (false match, missed match) and the differing values,
masked where ``--mask`` says. Enter opens the pair with its reviews.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.widgets import DataTable, Footer, Static
from textual.worker import Worker, WorkerState

from docket.core import FailureGroup
from docket.core.project import Project

from ..characters import visible
from ..diff import PLAIN, Palette
from ..figures import many
from ..masking import Mask, masked
from .pair_detail import PairDetailScreen
from .team_base import TeamScreen

SHOWN = 300  # pairs listed at most; the counts still cover all
MIN_VALUES = 24  # the least room for the differing values; narrower, the table scrolls sideways
SCROLLBAR = 2  # cells the table's vertical scroll bar takes when its rows overflow
HELP = (
    "The gold-labelled pairs on which this matcher disagrees with the gold label, grouped by "
    "the compared fields whose values differ between the two records (missing values do not "
    "count as differing), the largest group first. A false match is a pair it calls a match "
    "that the gold calls a non-match; a missed match the other way. Enter shows the pair."
)


@dataclass(frozen=True)
class Listed:
    groups: list[FailureGroup]
    values: dict[int, list[tuple[str, str | None, str | None]]]  # pair -> differing values


def differing_values(project: Project, groups: list[FailureGroup]) -> dict[int, list]:
    """Worker thread: the differing fields' values of the first ``SHOWN`` pairs."""
    out: dict[int, list] = {}
    for group in groups:
        for f in group.failures:
            if len(out) >= SHOWN:
                return out
            card = project.card(f.pair_id, "")
            out[f.pair_id] = [(r.field, r.left, r.right) for r in card.fields
                              if r.field in group.differing]
    return out


def shown(value: str | None, field: str, mask: Mask) -> str:
    if value is None:
        return "— missing —"
    return visible(masked(value) if mask and mask.applies(field) else value)


class MatcherFailuresScreen(TeamScreen):
    HELP = HELP
    CSS_PATH = "matchers.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "open", "pair", id="failures-open", priority=True,
                tooltip="the pair under the cursor, with its reviews"),
        Binding("question_mark", "help", "help", key_display="?", id="failures-help",
                tooltip="this help"),
        Binding("escape", "back", "back", id="failures-back", tooltip="back to the matchers"),
        Binding("q", "quit", "quit", id="failures-quit", tooltip="quit docket"),
    ]

    def __init__(self, name: str) -> None:
        super().__init__()
        self.matcher = name
        self.palette: Palette = PLAIN
        self._listed: Listed | None = None

    def compose(self) -> ComposeResult:
        yield Static(id="failures-head")
        yield DataTable(id="failures-table", cursor_type="row", zebra_stripes=True)
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        self.query_one("#failures-head", Static).update(
            Text(f"Finding where {visible(self.matcher)} disagrees with the gold…"))
        app = self.team_app

        def work() -> Listed:
            with app.reader() as project:
                groups = project.matcher_failures(self.matcher)
                return Listed(groups, differing_values(project, groups))

        self.run_worker(work, thread=True, exit_on_error=False, group="failures",
                        name="failures", exclusive=True)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group != "failures":
            return
        if event.state == WorkerState.ERROR:
            self.query_one("#failures-head", Static).update(
                Text(f"The pairs could not be listed: {event.worker.error}"))
        elif event.state == WorkerState.SUCCESS:
            self._paint(event.worker.result)

    def on_resize(self) -> None:
        if self._listed is not None:
            self.call_after_refresh(self._paint, self._listed)

    def _paint(self, listed: Listed) -> None:
        self._listed = listed
        p, mask = self.palette, self.team_app.mask
        total = sum(len(g.failures) for g in listed.groups)
        head = Text(f"where {visible(self.matcher)} fails · ", "bold")
        head.append(f"{many(total, 'gold-labelled pair')} it gets wrong, in "
                    f"{many(len(listed.groups), 'group')} by the fields that differ" if total else
                    "no gold-labelled pair disagrees with it")
        self.query_one("#failures-head", Static).update(head)
        table = self.query_one("#failures-table", DataTable)
        at = table.cursor_row if table.row_count else 1
        table.clear(columns=True)
        rows: list[tuple[list[Text], str]] = []
        for group in listed.groups:
            # the heading in the last column: in 'left' it made that column as wide as the
            # longest list of fields, pushing the right ids and the values out of sight; its
            # count too, which in the 'pair' column read as a pair id ('2')
            rows.append(([Text(""), Text(""), Text(""), Text(""),
                          Text(f"{many(len(group.failures), 'pair')}: {group.label}",
                               p.heading)], f"group:{group.label}"))
            for f in group.failures:
                if f.pair_id not in listed.values:
                    continue
                diff = "\n".join(f"{fld}: {shown(a, fld, mask)} ≠ {shown(b, fld, mask)}"
                                  for fld, a, b in listed.values[f.pair_id])  # a line each
                rows.append(([Text(str(f.pair_id)), Text(f.kind), Text(visible(f.left_id)),
                              Text(visible(f.right_id)), Text(diff)], str(f.pair_id)))
        for label in ("pair", "error", "left", "right"):
            table.add_column(Text(label, p.muted))
        # The values wrap in the room the other columns leave: on one line they ran past the
        # right edge at 80 columns ('Averil Bremford ≠ Averil Bremfo'), the rest of them out
        # of sight but for a sideways scroll nothing on screen mentioned.
        table.add_column(Text("differing values", p.muted), width=self._room(table, rows))
        for cells, key in rows:
            table.add_row(*cells, key=key, height=None)
        if table.row_count > 1:  # on the first pair: the first row is its group's heading,
            table.move_cursor(row=max(1, min(at, table.row_count - 1)))  # where Enter did nothing

    @staticmethod
    def _room(table: DataTable, rows: list[tuple[list[Text], str]]) -> int:
        """Cells left for the differing values beside the first four columns (each as wide
        as its widest cell or heading, plus the table's padding on both sides)."""
        pad = 2 * table.cell_padding
        used = sum(max(len(label), *(cells[i].cell_len for cells, _ in rows)) + pad
                   for i, label in enumerate(("pair", "error", "left", "right")))
        width = table.scrollable_content_region.width or table.app.size.width
        return max(MIN_VALUES, width - used - pad - SCROLLBAR)

    def action_open(self) -> None:
        table = self.query_one("#failures-table", DataTable)
        if not table.row_count:
            return
        key = str(table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value)
        if key.isdigit():
            self.app.push_screen(PairDetailScreen(int(key)))
        else:
            self.notify("A group's heading: move to one of its pairs to open it.")

"""One cluster conflict: its member records and the gold labels that make it.

The members are shown with their compared fields (masked where ``--mask`` says); the pairs
are the gold matches that chain the records together and the gold non-match(es) that the chain
contradicts. Enter on a pair opens it with everyone's labels.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING, ClassVar, cast

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.coordinate import Coordinate
from textual.screen import Screen
from textual.widgets import DataTable, Static

from docket.core.types import ClusterConflict

from .. import literal
from ..diff import Palette
from ..masking import masked
from ..widgets.key_bar import KeyBar
from ..widgets.reviews import label_style
from .pair_detail import PairDetailScreen

if TYPE_CHECKING:
    from ..hosts import TeamHost

MOST_PAIRS = 200  # pairs listed for one cluster; a larger one is cut with a note
VALUE_WIDTH = 22


def pair_ids(ids: Sequence[int]) -> str:
    """'pair 4' or 'pairs 1, 2, 3'."""
    return f"{'pair' if len(ids) == 1 else 'pairs'} {', '.join(map(str, ids))}"


class ConflictScreen(Screen[None]):
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "open", "open pair", id="conflict-open", priority=True,
                tooltip="the gold-labelled pair under the cursor, with everyone's labels"),
        Binding("escape", "back", "back", id="conflict-back", tooltip="back to the clusters"),
        Binding("q", "quit", "quit", id="conflict-quit", tooltip="quit docket"),
    ]

    def __init__(self, conflict: ClusterConflict) -> None:
        super().__init__()
        self.conflict = conflict

    @property
    def team_app(self) -> TeamHost:
        return cast("TeamHost", self.app)

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="conflict-body"):
            yield Static(id="conflict-head")
            yield DataTable(id="conflict-members", cursor_type="row", zebra_stripes=True)
            yield Static(id="conflict-pairs-head")
            yield DataTable(id="conflict-pairs", cursor_type="row", zebra_stripes=True)
        yield KeyBar()

    def on_mount(self) -> None:
        app, c = self.team_app, self.conflict
        p = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        head = Text(f"cluster {c.cluster} · {len(c.members)} records", "bold")
        # pair ids said to be pairs: 'gold non-match 4 says' read as four non-matches
        head.append(f" · the gold matches of {pair_ids(c.match_pairs[:12])}"
                    f"{' …' if len(c.match_pairs) > 12 else ''} join them, but the gold "
                    f"non-match of {pair_ids(c.non_match_pairs)} says two of them differ. One "
                    "of these labels is wrong: the pairs wait for adjudication.", p.muted)
        self.query_one("#conflict-head", Static).update(head)
        members = self.query_one("#conflict-members", DataTable)
        fields = app.project.fields
        for label in ("side", "record", *[f.name for f in fields]):
            members.add_column(literal.one_line(label, VALUE_WIDTH, p.escape))
        for side, rid in c.members:
            record = app.project.record(side or "left", rid)
            cells = [Text(side or "—", p.muted), literal.record_id(rid, VALUE_WIDTH, p.escape)]
            for f in fields:
                value = record.get(f.right_column if side == "right" else f.left_column)
                if value is not None and app.mask and app.mask.applies(f.name):
                    value = masked(value)
                cells.append(literal.one_line(value, VALUE_WIDTH, p.escape))
            members.add_row(*cells)
        pairs = self.query_one("#conflict-pairs", DataTable)
        for label in ("pair", "gold label", "left", "right"):
            pairs.add_column(Text(label, p.muted))
        listed = [(pid, "non-match") for pid in c.non_match_pairs] + \
            [(pid, "match") for pid in c.match_pairs]
        for pid, label in listed[:MOST_PAIRS]:
            card = app.project.card(pid, "")
            pairs.add_row(Text(str(pid)), Text(label, label_style(label, p)),
                          literal.record_id(card.left_id, VALUE_WIDTH, p.escape),
                          literal.record_id(card.right_id, VALUE_WIDTH, p.escape), key=str(pid))
        more = f" (first {MOST_PAIRS} of {len(listed):,})" if len(listed) > MOST_PAIRS else ""
        self.query_one("#conflict-pairs-head", Static).update(
            Text(f"gold labels in this cluster{more} · Enter opens a pair", p.muted))
        pairs.focus()

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        if event.data_table.id != "conflict-pairs":
            return
        event.stop()
        self._open(int(str(event.row_key.value)))

    def action_open(self) -> None:
        table = self.query_one("#conflict-pairs", DataTable)
        if not table.row_count:
            return
        key = table.coordinate_to_cell_key(Coordinate(table.cursor_row, 0)).row_key
        self._open(int(str(key.value)))

    def _open(self, pair_id: int) -> None:
        heading = Text(f"pair {pair_id} in cluster {self.conflict.cluster} · Escape goes back")
        self.app.push_screen(PairDetailScreen(pair_id, heading))

    def action_back(self) -> None:
        self.app.pop_screen()

    def action_quit(self) -> None:
        self.app.exit()

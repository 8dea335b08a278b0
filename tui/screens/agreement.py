"""The agreement screen: the reviewer-by-reviewer kappa matrix, and each pair's disagreements.

The figures come from the facade's ``AgreementReport``, worked out in a worker. A cell holds
Cohen's kappa with its 95 % CI, the number of pairs it rests on and the Landis & Koch band;
Enter on a cell lists where those two reviewers differ, and Enter on one of those opens the
pair with both labels and notes. With ``--blind`` the reviewers are "reviewer A", "B"...
"""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.coordinate import Coordinate
from textual.widgets import DataTable, Static
from textual.worker import Worker, WorkerState

from docket.core.results import AgreementReport

from .. import literal
from ..diff import PLAIN, Palette
from ..figures import many
from ..widgets.key_bar import KeyBar
from ..widgets.reviews import blind_aliases, label_style
from .agreement_text import NAME_WIDTH, cell_text, detail_text, overall_text
from .pair_detail import PairDetailScreen
from .team_base import TeamScreen
from .team_help import AGREEMENT

ID_CELLS, MIN_ID_CELLS = 16, 10  # a record id in the disagreements, at most and at least
MIN_NOTE_CELLS = 8

class AgreementScreen(TeamScreen):
    HELP = AGREEMENT
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "open", "disagreements", id="agreement-open", priority=True,
                tooltip="list the disagreements of the reviewer pair under the cursor"),
        Binding("h", "holds", "holds", id="agreement-holds",
                tooltip="count hold as a third category, or (again) as no rating"),
        Binding("r", "reload", "recount", id="agreement-reload",
                tooltip="work the figures out again from the latest labels"),
        Binding("question_mark", "help", "help", key_display="?", id="agreement-help",
                tooltip="this help"),
        Binding("escape", "back", "back", id="agreement-back",
                tooltip="back to the screen you came from"),
        Binding("q", "quit", "quit", id="agreement-quit", tooltip="quit docket"),
    ]

    def __init__(self, standalone: bool = False) -> None:
        super().__init__()
        self.standalone = standalone
        self.include_hold = False
        self.report: AgreementReport | None = None
        self.shown: dict[str, str] = {}  # reviewer -> name on screen
        self.entries: dict[tuple[str, str], dict[str, Any]] = {}
        self.palette: Palette = PLAIN

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="agree-body"):
            yield Static(id="agree-head")
            yield DataTable(id="agree-matrix", cursor_type="cell", zebra_stripes=True)
            yield Static(id="agree-detail")
            yield Static(id="agree-overall")
        yield KeyBar()

    def on_mount(self) -> None:
        self.palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        self.query_one("#agree-head", Static).update(Text("Working out agreement…"))
        self._load()

    def _load(self) -> None:
        app, include_hold = self.team_app, self.include_hold

        def work() -> AgreementReport:
            with app.reader() as project:
                return project.agreement(include_hold=include_hold)

        self.run_worker(work, thread=True, exit_on_error=False, group="agreement", name="agreement",
                        exclusive=True)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group != "agreement":
            return
        if event.state == WorkerState.ERROR:
            self.query_one("#agree-head", Static).update(
                Text(f"Agreement could not be worked out: {event.worker.error}"))
            return
        if event.state == WorkerState.SUCCESS:
            report: AgreementReport = event.worker.result
            if report.include_hold == self.include_hold:
                self._paint(report)

    # -- painting ----------------------------------------------------------------------------
    def _paint(self, report: AgreementReport) -> None:
        app, p = self.team_app, self.palette
        self.report = report
        names = list(report.reviewers)
        self.shown = blind_aliases(names) if app.blind else {n: n for n in names}
        names.sort(key=lambda n: self.shown[n])
        self.entries = {}
        for r in report.reviewer_pairs:
            self.entries[(r["reviewer_a"], r["reviewer_b"])] = r
            self.entries[(r["reviewer_b"], r["reviewer_a"])] = r
        head = Text(f"agreement · {app.project_name} · ", "bold")
        head.append(many(len(names), "reviewer"))
        head.append(" · holds counted as a third category" if report.include_hold else
                    " · holds count as no rating", p.muted)
        if not report.reviewer_pairs:
            head.append("\nNo two reviewers have pairs in common yet: agreement needs overlap "
                        "pairs decided by two reviewers (docket review, or docket label).",
                        p.heading)
        self.query_one("#agree-head", Static).update(head)
        table = self.query_one(DataTable)
        table.clear(columns=True)
        for name in names:
            table.add_column(literal.record_id(self.shown[name], NAME_WIDTH, p.escape),
                             key=name)
        for row in names:
            cells: list[Text] = []
            for col in names:
                if col == row:
                    given = report.reviewers[row]
                    cells.append(Text(f"{many(given['labels'], 'label')}\n"
                                      f"{many(given['holds'], 'hold')}", p.muted))
                else:
                    cells.append(cell_text(self.entries.get((row, col)), p))
            table.add_row(*cells, height=2, key=row,
                          label=literal.record_id(self.shown[row], NAME_WIDTH, p.escape))
        self.query_one("#agree-overall", Static).update(overall_text(report, self.shown, p))
        if report.reviewer_pairs:  # start on the reviewer pair with most pairs used
            top = max(report.reviewer_pairs, key=lambda r: r["n"])
            a, b = sorted((top["reviewer_a"], top["reviewer_b"]), key=names.index)
            table.move_cursor(row=names.index(a), column=names.index(b))
        self._detail_at(table.cursor_coordinate.row, table.cursor_coordinate.column)
        if names:
            table.focus()

    def _pair_at(self, row: int, column: int) -> tuple[str, str] | None:
        table = self.query_one(DataTable)
        if self.report is None or not table.is_valid_coordinate(Coordinate(row, column)):
            return None
        key = table.coordinate_to_cell_key(Coordinate(row, column))
        a, b = str(key.row_key.value), str(key.column_key.value)
        return (a, b) if a != b and (a, b) in self.entries else None

    def _detail_at(self, row: int, column: int) -> None:
        found = self._pair_at(row, column)
        detail = self.query_one("#agree-detail", Static)
        if found is None:  # with no pairs in common there is no such cell to move to
            hint = ("Move to a cell of two reviewers to see every figure; Enter lists their "
                    "disagreements." if self.entries else
                    "Once two reviewers have decided the same pairs, their cell here shows "
                    "every figure, and Enter lists their disagreements.")
            detail.update(Text(hint, self.palette.muted))
            return
        detail.update(detail_text(self.entries[found], self.shown, self.palette))

    def on_data_table_cell_highlighted(self, event: DataTable.CellHighlighted) -> None:
        self._detail_at(event.coordinate.row, event.coordinate.column)

    def on_data_table_cell_selected(self, event: DataTable.CellSelected) -> None:
        event.stop()
        self._open(event.coordinate.row, event.coordinate.column)

    def _open(self, row: int, column: int) -> None:
        found = self._pair_at(row, column)
        if found is None:
            self.notify("Choose a cell of two reviewers with pairs in common.")
            return
        self.app.push_screen(DisagreementsScreen(*found, self.shown))

    # -- actions -----------------------------------------------------------------------------
    def action_open(self) -> None:
        table = self.query_one(DataTable)
        self._open(table.cursor_coordinate.row, table.cursor_coordinate.column)

    def action_holds(self) -> None:
        self.include_hold = not self.include_hold
        self.query_one("#agree-head", Static).update(Text("Working out agreement…"))
        self._load()

    def action_reload(self) -> None:
        self._load()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "back":
            return not self.standalone
        return True


class DisagreementsScreen(TeamScreen):
    """Where two reviewers labelled the same pairs differently; Enter opens a pair."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "open", "open pair", id="disagreements-open", priority=True,
                tooltip="the pair under the cursor, with both labels and notes"),
        Binding("escape", "back", "back", id="disagreements-back",
                tooltip="back to the kappa matrix"),
        Binding("q", "quit", "quit", id="disagreements-quit", tooltip="quit docket"),
    ]

    def __init__(self, a: str, b: str, shown: dict[str, str]) -> None:
        super().__init__()
        self.a, self.b = a, b
        self.shown = shown
        self.rows: list[dict[str, Any]] = []

    def compose(self) -> ComposeResult:
        yield Static(id="disagree-head")
        yield DataTable(id="disagree-table", cursor_type="row", zebra_stripes=True)
        yield KeyBar()

    def on_mount(self) -> None:
        app = self.team_app
        p = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        self.rows = app.project.disagreements(self.a, self.b)
        sa, sb = self.shown.get(self.a, self.a), self.shown.get(self.b, self.b)
        head = Text(f"{many(len(self.rows), 'disagreement')} of ", "bold")
        head.append_text(literal.record_id(sa, NAME_WIDTH, p.escape))
        head.append(" and ", "bold")
        head.append_text(literal.record_id(sb, NAME_WIDTH, p.escape))
        head.append(" (a hold against a label counts) · Enter opens the pair", p.muted)
        self.query_one("#disagree-head", Static).update(head)
        table = self.query_one(DataTable)
        for label in ("pair", "left", "right"):
            table.add_column(Text(label, p.muted))
        for name in (sa, sb):
            table.add_column(literal.record_id(name, NAME_WIDTH, p.escape))
            table.add_column(Text("note", p.muted))
        note, id_cells = self._cells()
        for r in self.rows:
            table.add_row(Text(str(r["pair_id"])),
                          literal.record_id(r["left_id"], id_cells, p.escape),
                          literal.record_id(r["right_id"], id_cells, p.escape),
                          Text(r["label_a"], label_style(r["label_a"], p)),
                          literal.one_line(r["note_a"] or "—", note, p.escape),
                          Text(r["label_b"], label_style(r["label_b"], p)),
                          literal.one_line(r["note_b"] or "—", note, p.escape),
                          key=str(r["pair_id"]))
        table.focus()

    def _cells(self) -> tuple[int, int]:
        """Each note's share of the line, and each id's: at 28 cells the second reviewer's
        note was out of sight at 80 columns, its heading cut to 'no', and at 120 notes were
        cut with room to spare ('surname changed? the rest a…'). Ids give up cells (16 down
        to 10) before a note goes below 8: two 200-character ids and a 12-cell name put the
        second note out of sight again."""
        pair = max([4, *(len(str(r["pair_id"])) for r in self.rows)])
        labels = sum(max(len("non-match"), literal.record_id(self.shown.get(n, n),
                                                             NAME_WIDTH).cell_len)
                     for n in (self.a, self.b))  # a label column is as wide as its name
        widest = max([5, *(literal.record_id(str(r[k]), ID_CELLS).cell_len
                           for r in self.rows for k in ("left_id", "right_id"))])
        for ids in range(widest, min(widest, MIN_ID_CELLS) - 1, -1):
            used = pair + 2 * ids + labels + 7 * 2 + 2  # cell padding, scroll bar
            note = (self.app.size.width - used) // 2
            if note >= MIN_NOTE_CELLS:
                break
        return max(MIN_NOTE_CELLS, min(48, note)), ids

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        self._open(int(str(event.row_key.value)))

    def action_open(self) -> None:
        table = self.query_one(DataTable)
        if not self.rows or not table.is_valid_row_index(table.cursor_row):
            self.notify("No disagreement to open.")
            return
        key = table.coordinate_to_cell_key(Coordinate(table.cursor_row, 0)).row_key
        self._open(int(str(key.value)))

    def _open(self, pair_id: int) -> None:
        p = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        heading = Text(f"pair {pair_id}: a disagreement of ", p.muted)
        heading.append_text(literal.record_id(self.shown.get(self.a, self.a), NAME_WIDTH))
        heading.append(" and ", p.muted)
        heading.append_text(literal.record_id(self.shown.get(self.b, self.b), NAME_WIDTH))
        heading.append(" · Escape goes back to the list", p.muted)
        self.app.push_screen(PairDetailScreen(pair_id, heading, self.shown))

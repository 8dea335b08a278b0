"""The matchers screen: every stored machine rater side by side, as ``evaluate --matchers``.

One row per matcher: precision, recall and F1 with intervals from the audit slice, kappa
against the gold, the audit pairs the figures rest on; below, the paired F1 differences, the
variants' stability and the teacher-and-student check. Enter on a row opens the pairs where
that matcher disagrees with the gold, grouped by the fields that differ. Worked out in a worker.
"""

from __future__ import annotations

from typing import Any, ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import VerticalScroll
from textual.widgets import DataTable, Footer, Static
from textual.worker import Worker, WorkerState

from docket.core.errors import DocketError

from ..characters import visible
from ..diff import PLAIN, Palette
from ..figures import labelled_text
from ..matchers_report import HEADERS, distillation_lines, matcher_rows
from .quality_table import NARROW_BELOW, interval
from .team_base import TeamScreen

INTERVALS = (3, 4, 5)  # the cells of precision, recall and F1 in a matcher's row

HELP = (
    "Every machine rater stored in the project, judged on the audit slice like the model: "
    "precision, recall and F1 at the matcher's own threshold with 95 % intervals, Cohen's kappa "
    "against the gold labels and the audit pairs the figures rest on. Below: the paired "
    "difference in F1 of every two matchers on the same audit pairs (one beats another only "
    "when the interval excludes 0), how often prompt variants flip, and the student against "
    "its teacher. Enter on a matcher lists the pairs where it disagrees with the gold, grouped "
    "by the fields that differ (masked as --mask says)."
)


class MatchersScreen(TeamScreen):
    HELP = HELP
    CSS_PATH = "matchers.tcss"
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "failures", "where it fails", id="matchers-failures", priority=True,
                tooltip="the pairs where the matcher under the cursor disagrees with the gold"),
        Binding("r", "reload", "recount", id="matchers-reload",
                tooltip="work everything out again from the latest labels"),
        Binding("question_mark", "help", "help", key_display="?", id="matchers-help",
                tooltip="this help"),
        Binding("escape", "back", "back", id="matchers-back",
                tooltip="back to the screen you came from"),
        Binding("q", "quit", "quit", id="matchers-quit", tooltip="quit docket"),
    ]

    def __init__(self, standalone: bool = False) -> None:
        super().__init__()
        self.standalone = standalone
        self.report: dict[str, Any] | None = None
        self.palette: Palette = PLAIN

    def compose(self) -> ComposeResult:
        yield Static(id="matchers-head")
        with VerticalScroll(id="matchers-body"):
            yield DataTable(id="matchers-table", cursor_type="row", zebra_stripes=True)
            yield Static(id="matchers-notes")
        yield Footer(compact=True)

    def on_mount(self) -> None:
        self.palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        self.query_one("#matchers-head", Static).update(Text("Working out the matchers…"))
        self._load()

    def _load(self) -> None:
        app = self.team_app

        def work() -> dict[str, Any] | str:
            with app.reader() as project:
                try:
                    return project.side_by_side()
                except DocketError as exc:
                    return str(exc)

        self.run_worker(work, thread=True, exit_on_error=False, group="matchers",
                        name="matchers", exclusive=True)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group != "matchers":
            return
        head = self.query_one("#matchers-head", Static)
        if event.state == WorkerState.ERROR:
            head.update(Text(f"The figures could not be worked out: {event.worker.error}"))
        elif event.state == WorkerState.SUCCESS:
            result = event.worker.result
            if isinstance(result, str):
                head.update(Text(f"matchers · no figures yet: {result}"))
                return
            self.report = result
            self._paint(result)

    def _paint(self, report: dict[str, Any]) -> None:
        p = self.palette
        a = report["audit"]
        head = Text(f"matchers · {self.team_app.project_name} · ", "bold")
        head.append(f"audit slice: {labelled_text(a)}; {report['confidence']:.0%} intervals")
        self.query_one("#matchers-head", Static).update(head)
        self._table(report)
        self.query_one("#matchers-notes", Static).update(notes_text(report, p))

    def _table(self, report: dict[str, Any]) -> None:
        # Below 110 columns the F1 column was cut and kappa and the audit pairs sat out of
        # sight: intervals as the quality screen's narrow table gives them, and no 'kind'
        narrow = (self.size.width or self.app.size.width) < NARROW_BELOW
        self._narrow = narrow
        table = self.query_one("#matchers-table", DataTable)
        table.clear(columns=True)
        keep = [i for i, h in enumerate(HEADERS) if not (narrow and h == "kind")]
        for i in keep:
            table.add_column(Text(HEADERS[i], self.palette.muted))
        for m, cells in zip(report["matchers"], matcher_rows(report), strict=True):
            shown = [Text(c) for c in cells]
            if narrow:
                for i, k in zip(INTERVALS, ("precision", "recall", "f1"), strict=True):
                    shown[i] = interval(m[k], True)
            table.add_row(*(shown[i] for i in keep), key=m["name"])

    _narrow: bool | None = None

    def on_resize(self) -> None:
        narrow = (self.size.width or self.app.size.width) < NARROW_BELOW
        if self.report is not None and narrow != self._narrow:
            self._table(self.report)

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        # opened alone from the shell (--screen) there is no screen to go back to: Escape
        # took this one away and left a blank terminal where q did nothing
        return not self.standalone if action == "back" else True

    def action_reload(self) -> None:
        self._load()

    def action_failures(self) -> None:
        table = self.query_one("#matchers-table", DataTable)
        if self.report is None or not table.row_count:
            return
        name = str(table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value)
        from .matcher_failures import MatcherFailuresScreen
        self.app.push_screen(MatcherFailuresScreen(name))


def notes_text(report: dict[str, Any], palette: Palette = PLAIN) -> Text:
    """Paired F1 differences, variants and distillation below the table (values literal)."""
    p = palette
    text = Text("κ gold: " + report["notes"]["kappa_gold"] + "\n", p.muted)
    text.append("paired F1 differences (same audit pairs)\n", p.heading)
    for d in (d for d in report["differences"] if d["measure"] == "f1"):
        value = "—" if d["difference"] is None else \
            f"{d['difference']:+.3f} [{d['low']:+.3f}, {d['high']:+.3f}]"
        # the verdict on a line of its own: beside the figures it wrapped to the left edge at
        # 80 columns, where it read as the start of the next difference
        text.append(f"  {visible(d['first'])} − {visible(d['second'])}: {value}\n")
        text.append(f"    → {visible(d['verdict'])}\n", p.muted)
    for v in report["variants"]:
        text.append(f"variants {visible(v['group'])}: ", p.heading)
        if "note" in v:
            text.append(v["note"] + "\n")
            continue
        kappa = v["fleiss_kappa"]
        text.append(f"flip on {v['flip_share']:.2%} of pairs; Fleiss' kappa "
                    + ("undefined" if kappa is None else f"{kappa:.3f}") + "\n")
    if report["distillation"] is not None:
        for line in distillation_lines(report["distillation"]):
            text.append(line + "\n")
    text.append(f"queue order: {report['queue_order']['text']}", p.muted)
    return text

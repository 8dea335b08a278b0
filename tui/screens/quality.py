"""The quality screen: how good the model is, honestly, and where the gold labels contradict.

Three tabs. Plots: the score of gold-labelled pairs by label, and the precision–recall curve
(design-based from the audit slice, with the naive curve beside it). Thresholds: the table of
``quality.evaluate`` with intervals, the naive figures marked biased, and the note that recall is
within the candidate pairs. Clusters: the conflicts, clusters of gold matches holding a gold
non-match (Enter shows the members). Everything is worked out in a worker (``quality_data.py``).
"""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.coordinate import Coordinate
from textual.widgets import DataTable, Static, TabbedContent, TabPane
from textual.worker import Worker, WorkerState
from textual_plotext import PlotextPlot

from .. import literal
from ..diff import PLAIN, Palette
from ..figures import count_ticks, labelled_text, many, tallest_bin
from ..widgets.key_bar import KeyBar
from ..widgets.plot_legend import PlotLegend, Series
from .conflict import ConflictScreen
from .pr_plot import PR_TITLE, draw_pr
from .quality_data import QualityData, load_quality
from .quality_table import NARROW_BELOW, fill_threshold_table, notes_text
from .team_base import TeamScreen
from .team_help import QUALITY

BINS = 20
# each series: its colour, the plot's marker for it, and that marker as the legend shows it;
# the marks differ as well as the colours, so that the legend reads without colour
HISTOGRAMS = {"non-match": ((0, 130, 200), "sd", "██"), "match": ((230, 25, 75), "▒", "▒▒")}
# Each plot's title is a line of the screen above the plot: the plotting library leaves out a
# title that does not fit beside the canvas's centre (about 37 cells of a 40-cell plot), so at
# 80 columns neither plot said what it showed. These fit the 38 cells a plot's line has there.
SCORE_TITLE = "gold-labelled pairs at each score"


class QualityScreen(TeamScreen):
    HELP = QUALITY
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("1", "tab('tab-plots')", "plots", id="quality-plots",
                tooltip="score by gold label and the precision-recall curve"),
        Binding("2", "tab('tab-thresholds')", "thresholds", id="quality-thresholds",
                tooltip="precision, recall and F1 per threshold, with intervals"),
        Binding("3", "tab('tab-clusters')", "clusters", id="quality-clusters",
                tooltip="clusters of gold matches and their conflicts"),
        Binding("enter", "open", "members", id="quality-open", priority=True,
                tooltip="clusters tab: the members and gold labels of the conflict under "
                        "the cursor"),
        Binding("r", "reload", "recount", id="quality-reload",
                tooltip="work everything out again from the latest labels"),
        Binding("question_mark", "help", "help", key_display="?", id="quality-help",
                tooltip="this help"),
        Binding("escape", "back", "back", id="quality-back",
                tooltip="back to the screen you came from"),
        Binding("q", "quit", "quit", id="quality-quit", tooltip="quit docket"),
    ]

    def __init__(self, standalone: bool = False) -> None:
        super().__init__()
        self.standalone = standalone
        self.data: QualityData | None = None
        self.palette: Palette = PLAIN
        self._narrow: bool | None = None

    def compose(self) -> ComposeResult:
        yield Static(id="quality-head")
        with TabbedContent(id="quality-tabs", initial="tab-thresholds"):
            with TabPane("plots", id="tab-plots"), Horizontal(id="quality-plots"):
                with Vertical(classes="quality-plot"):
                    yield Static(Text(SCORE_TITLE), id="score-title", classes="plot-title")
                    yield PlotextPlot(id="score-plot")
                    yield PlotLegend(id="score-legend", classes="plot-legend")
                with Vertical(classes="quality-plot"):
                    yield Static(Text(PR_TITLE), id="pr-title", classes="plot-title")
                    yield PlotextPlot(id="pr-plot")
                    yield PlotLegend(id="pr-legend", classes="plot-legend")
            with TabPane("thresholds", id="tab-thresholds"), VerticalScroll():
                yield DataTable(id="threshold-table", cursor_type="row", zebra_stripes=True)
                yield Static(id="threshold-notes")
            with TabPane("clusters", id="tab-clusters"), VerticalScroll():
                yield Static(id="cluster-summary")
                yield DataTable(id="conflict-table", cursor_type="row", zebra_stripes=True)
        yield KeyBar()

    def on_mount(self) -> None:
        self.palette = Palette.from_variables(self.app.get_css_variables(), self.app.no_color)
        self.query_one("#quality-head", Static).update(Text("Working out the quality figures…"))
        self._load()

    def _load(self) -> None:
        app = self.team_app

        def work() -> QualityData:
            with app.reader() as project:
                return load_quality(project)

        self.run_worker(work, thread=True, exit_on_error=False, group="quality", name="quality",
                        exclusive=True)

    def on_worker_state_changed(self, event: Worker.StateChanged) -> None:
        if event.worker.group != "quality":
            return
        if event.state == WorkerState.ERROR:
            self.query_one("#quality-head", Static).update(
                Text(f"The quality figures could not be worked out: {event.worker.error}"))
        elif event.state == WorkerState.SUCCESS:
            self.data = event.worker.result
            self._paint()

    def on_resize(self) -> None:
        narrow = (self.size.width or self.app.size.width) < NARROW_BELOW
        if self.data is not None and narrow != self._narrow:
            self._table(self.data)

    # -- painting ----------------------------------------------------------------------------
    def _paint(self) -> None:
        data, p = self.data, self.palette
        if data is None:
            return
        head = Text(f"quality · {self.team_app.project_name} · ", "bold")
        if data.report is None:
            head.append(f"no estimates yet: {data.problem}", p.heading)
        else:
            a = data.report.audit
            head.append(f"from the audit slice: {labelled_text(a)}; "
                        f"{data.report.confidence:.0%} intervals")
        self.query_one("#quality-head", Static).update(head)
        self._table(data)
        self._plots(data)
        self._clusters(data)

    def _table(self, data: QualityData) -> None:
        p = self.palette
        table = self.query_one("#threshold-table", DataTable)
        table.clear(columns=True)
        notes = self.query_one("#threshold-notes", Static)
        if data.report is None:
            notes.update(Text(f"No threshold table yet: {data.problem}", p.heading))
            return
        narrow = (self.size.width or self.app.size.width) < NARROW_BELOW
        self._narrow = narrow
        fill_threshold_table(table, data.report, p, narrow)
        report = data.report
        notes.update(notes_text(report, p))

    def _plots(self, data: QualityData) -> None:
        scores = self.query_one("#score-plot", PlotextPlot)
        plt = scores.plt
        plt.clear_figure()
        # no y label: the library writes it on the x label's row, from the left edge, and
        # leaves out an x label that would touch it ("gold-labelled pairs" hid this one even at
        # 120 columns); the title above says what the bars count
        plt.xlabel("model score (match probability)")
        shown = []
        top = 0
        for label, (color, marker, mark) in HISTOGRAMS.items():
            values = data.scores.get(label, [])
            if values:
                plt.hist(values, bins=BINS, marker=marker, color=color)
                shown.append(Series(f"gold {label} ({len(values):,})", color, mark))
                top = max(top, tallest_bin(values, BINS))
        if top:  # counts of pairs are whole numbers; the library's own ticks had decimals
            ticks = count_ticks(top)
            plt.yticks(ticks, [f"{t:,}" for t in ticks])
        plt.xlim(0, 1)
        scores.refresh()
        self.query_one("#score-legend", PlotLegend).show(shown)
        pr = self.query_one("#pr-plot", PlotextPlot)
        pr.plt.clear_figure()
        title, shown = draw_pr(pr.plt, data.curve, data.report)
        self.query_one("#pr-title", Static).update(Text(title))
        pr.refresh()
        self.query_one("#pr-legend", PlotLegend).show(shown)

    def _clusters(self, data: QualityData) -> None:
        p = self.palette
        summary = Text()
        if data.cluster_problem:
            summary.append(data.cluster_problem, p.heading)
        elif not data.clusters:
            summary.append("No clusters yet: no gold match joins two records. No conflicts.",
                           p.muted)
        else:
            hold = "holds" if data.clusters == 1 else "hold"
            summary.append(f"{many(data.clusters, 'cluster')} of two or more records {hold} "
                           f"{data.clustered:,} records (largest {data.largest:,}), from the "
                           "gold matches. ")
            if data.conflicts:
                summary.append(f"{many(len(data.conflicts), 'conflict')}: a chain of gold "
                               "matches joins two records that a gold non-match keeps apart. "
                               f"{'It waits' if len(data.conflicts) == 1 else 'They wait'} in "
                               "the adjudication queue. Enter shows the members.",
                               p.heading)
            else:
                summary.append("No conflicts: no gold non-match falls inside a cluster.",
                               p.muted)
        self.query_one("#cluster-summary", Static).update(summary)
        table = self.query_one("#conflict-table", DataTable)
        table.clear(columns=True)
        table.display = bool(data.conflicts)  # no column headings over no rows
        # the pairs named as pairs: 'gold non-match 4' read as a count of four
        for label in ("cluster", "records", "gold non-match (pair)",
                      "held together by gold matches (pairs)"):
            table.add_column(Text(label, p.muted))
        for c in data.conflicts:
            members = Text(f"{len(c.members)}: ", no_wrap=True)
            for k, (_, rid) in enumerate(c.members[:4]):  # each id's end kept: long ids
                members.append(", " if k else "")          # differ there
                members.append_text(literal.record_id(rid, 18, p.escape))
            members.truncate(44, overflow="ellipsis")
            table.add_row(Text(str(c.cluster)), members,
                          Text(", ".join(map(str, c.non_match_pairs))),
                          Text(", ".join(map(str, c.match_pairs[:12])) +
                               (" …" if len(c.match_pairs) > 12 else "")),
                          key=str(c.cluster))

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        if event.data_table.id != "conflict-table":
            return
        event.stop()
        self._open(int(str(event.row_key.value)))

    def action_open(self) -> None:
        table = self.query_one("#conflict-table", DataTable)
        if not table.row_count:
            self.notify("No conflict to open: no gold non-match falls inside a cluster.")
            return
        key = table.coordinate_to_cell_key(Coordinate(table.cursor_row, 0)).row_key
        self._open(int(str(key.value)))

    def _open(self, cluster: int) -> None:
        found = next((c for c in self.data.conflicts if c.cluster == cluster), None) \
            if self.data is not None else None
        if found is not None:
            self.app.push_screen(ConflictScreen(found))

    def on_tabbed_content_tab_activated(self, event: TabbedContent.TabActivated) -> None:
        self.refresh_bindings()  # Enter opens a conflict only on the clusters tab

    # -- actions -----------------------------------------------------------------------------
    def action_tab(self, tab: str) -> None:
        self.query_one(TabbedContent).active = tab
        focus = {"tab-thresholds": "#threshold-table", "tab-clusters": "#conflict-table"}
        if tab in focus:
            self.query_one(focus[tab], DataTable).focus()

    def action_reload(self) -> None:
        self.query_one("#quality-head", Static).update(Text("Working out the quality figures…"))
        self._load()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "back":
            return not self.standalone
        if action == "open":
            tabs = self.query(TabbedContent)
            return bool(tabs) and tabs.first().active == "tab-clusters"
        return True

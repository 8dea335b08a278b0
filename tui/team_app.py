"""The adjudicator's app: the adjudication screen, and the agreement and quality screens.

``run_adjudicate`` is what ``docket adjudicate`` calls; ``run_agreement`` and ``run_quality``
open the agreement or the quality screen on its own (for ``--screen`` options). The app shares
the review screen's stylesheet and adds ``screens.tcss``.

The UI thread owns one connection to the project. Anything that reads the whole project (the
adjudication queue with its cluster conflicts, agreement, evaluation) runs in a thread worker
on a read-only connection of its own (``reader()``), so keys never wait on it.
"""

from __future__ import annotations

import os
import time
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path, PurePath
from typing import ClassVar, Literal

from textual.binding import Binding
from textual.driver import Driver
from textual.screen import Screen

from docket.core.project import Project

from .keymap import LoadedKeymap, load_keymap
from .masking import Mask, expand_mask
from .screen_exit import clearing
from .stopping import quitting_screen
from .terminal import need_terminal
from .toasts import OneToastEach

Clock = Callable[[], float]
Start = Literal["adjudicate", "agreement", "quality", "matchers"]


def binding_ids() -> list[str]:
    """Every binding id of these screens (and of the review screen: one keymap file serves
    both apps, so its review-only entries are not reported as unknown here)."""
    from .screens.adjudicate import AdjudicateScreen
    from .screens.agreement import AgreementScreen, DisagreementsScreen
    from .screens.matcher_failures import MatcherFailuresScreen
    from .screens.matchers import MatchersScreen
    from .screens.pair_detail import PairDetailScreen
    from .screens.quality import ConflictScreen, QualityScreen
    from .screens.review import binding_ids as review_ids
    ids = list(review_ids())
    for screen in (AdjudicateScreen, AgreementScreen, DisagreementsScreen, PairDetailScreen,
                   QualityScreen, ConflictScreen, MatchersScreen, MatcherFailuresScreen):
        ids += [b.id for b in screen.BINDINGS if isinstance(b, Binding) and b.id]
    return list(dict.fromkeys(ids))


class TeamApp(OneToastEach):
    """Adjudication, agreement and quality for one project; ``start`` says which comes first."""

    CSS_PATH: ClassVar[list[str | PurePath]] = ["review.tcss", "screens.tcss"]
    TITLE = "docket"
    ENABLE_COMMAND_PALETTE = False

    def get_driver_class(self) -> type[Driver]:
        return clearing(super().get_driver_class())  # no stale frame after quitting

    def __init__(self, project: Project, adjudicator: str = "", *, start: Start = "adjudicate",
                 blind: bool = False, mask: Sequence[str] = (), clock: Clock = time.monotonic,
                 keymap_file: Path | None = None) -> None:
        super().__init__()
        self.project = project
        self.adjudicator = adjudicator.strip()
        self.start = start
        self.blind = blind
        self.mask = Mask.of(mask)
        self.clock = clock
        from .screens.adjudicate import AdjudicateScreen
        decides = {b.id: b.key for b in AdjudicateScreen.BINDINGS  # where keys decide
                   if isinstance(b, Binding) and b.id}
        self.keymap: LoadedKeymap = load_keymap(binding_ids(), keymap_file, decides)

    @property
    def project_name(self) -> str:
        return str(self.project.meta.get("name") or self.project.path.stem)

    @contextmanager
    def reader(self) -> Iterator[Project]:
        """A connection of its own for one worker, closed when it is done (any thread).

        It only reads, but is opened read-write when the file allows: a read-only SQLite
        connection to a WAL file that another connection is writing can fail with a disk
        I/O error (seen while adjudications were being saved).
        """
        project = open_project(self.project.path)
        try:
            yield project
        finally:
            project.close()

    def first_screen(self) -> Screen[None]:
        if self.start == "agreement":
            from .screens.agreement import AgreementScreen
            return AgreementScreen(standalone=True)
        if self.start == "matchers":
            from .screens.matchers import MatchersScreen
            return MatchersScreen(standalone=True)
        if self.start == "quality":
            from .screens.quality import QualityScreen
            return QualityScreen(standalone=True)
        from .screens.adjudicate import AdjudicateScreen
        return AdjudicateScreen()

    def on_mount(self) -> None:
        if self.keymap.keymap:
            self.set_keymap(self.keymap.keymap)
        for problem in self.keymap.problems:
            self.notify(problem, title="keymap", severity="warning", markup=False, timeout=8)
        self.push_screen(self.first_screen())


def open_project(path: Path) -> Project:
    """Read-write where the file may be written (see ``TeamApp.reader``), else read-only."""
    return Project.open(path, readonly=path.exists() and not os.access(path, os.W_OK))


def make_team_app(path: Path | str, adjudicator: str = "", *, start: Start = "adjudicate",
                  blind: bool = False, mask: Sequence[str] = (), clock: Clock | None = None,
                  keymap_file: Path | None = None) -> TeamApp:
    """Open the project and build the app; for ``adjudicate``, refuse a non-adjudicator.

    Raises ``DocketError`` (a one-line message) before any screen exists: no such project,
    or ``adjudicator`` is not registered with the adjudicator role.
    """
    project = Project.open(Path(path)) if start == "adjudicate" else open_project(Path(path))
    try:
        if start == "adjudicate":
            adjudicator = project.require_adjudicator(adjudicator)
        mask = expand_mask(project, mask)
    except BaseException:
        project.close()
        raise
    return TeamApp(project, adjudicator, start=start, blind=blind, mask=mask,
                   clock=clock or time.monotonic, keymap_file=keymap_file)


def _run(app: TeamApp, command: str) -> None:
    try:
        need_terminal(command)  # after the checks that name a bad project, name or mask
        with quitting_screen(app.exit):
            app.run()
    finally:
        app.project.close()


def run_adjudicate(path: Path, adjudicator: str, blind: bool = False,
                   mask: Sequence[str] = ()) -> None:
    """Open the adjudication screen for ``adjudicator`` until they quit.

    Raises ``DocketError`` before the screen opens when they are not an adjudicator.
    """
    _run(make_team_app(path, adjudicator, start="adjudicate", blind=blind, mask=mask),
         "adjudicate")


def run_agreement(path: Path, mask: Sequence[str] = ()) -> None:
    """Open the agreement screen on its own until the user quits; it writes nothing."""
    _run(make_team_app(path, start="agreement", mask=mask), "agreement --screen")


def run_quality(path: Path, mask: Sequence[str] = ()) -> None:
    """Open the quality screen on its own until the user quits; it writes nothing."""
    _run(make_team_app(path, start="quality", mask=mask), "evaluate --screen")


def run_matchers(path: Path, mask: Sequence[str] = ()) -> None:
    """Open the matchers screen on its own until the user quits; it writes nothing."""
    _run(make_team_app(path, start="matchers", mask=mask), "evaluate --matchers --screen")

"""The review app: ``run_review`` is what ``docket review`` calls; ``make_app`` builds it for tests.

The UI thread owns one connection to the project; refits and full recounts run in thread
workers on a second connection (``background()``), so input never waits on them. SQLite in
WAL mode lets the UI keep reading and committing decisions while a refit reads.
"""

from __future__ import annotations

import contextlib
import gc
import threading
import time
from collections.abc import Callable, Collection, Sequence
from pathlib import Path

from textual.binding import Binding
from textual.driver import Driver

from docket.core.errors import DocketError
from docket.core.project import Project
from docket.core.types import QueueItem

from .hosts import Recount
from .keymap import LoadedKeymap, load_keymap
from .masking import Mask, expand_mask
from .screen_exit import clearing
from .screens.review import ReviewScreen, binding_ids, default_keys
from .stopping import quitting_screen
from .terminal import need_terminal
from .toasts import OneToastEach

Clock = Callable[[], float]
RECOUNTS = 3  # counts a recount makes at most while decisions keep coming


class ReviewApp(OneToastEach):
    """One reviewer, one project, one pair at a time."""

    CSS_PATH = "review.tcss"
    TITLE = "docket"
    ENABLE_COMMAND_PALETTE = False

    def get_driver_class(self) -> type[Driver]:
        return clearing(super().get_driver_class())  # no stale frame after quitting

    def __init__(self, project: Project, reviewer: str, mask: Sequence[str] = (), *,
                 clock: Clock = time.monotonic, refit_every: int | None = None,
                 keymap_file: Path | None = None) -> None:
        super().__init__()
        self.project = project
        self.reviewer = reviewer
        self.mask = Mask.of(mask)
        self.clock = clock
        every = project.meta.get("refit_every", 25) if refit_every is None else refit_every
        self.refit_every: int = max(0, int(every))
        self.keymap: LoadedKeymap = load_keymap(binding_ids(), keymap_file, default_keys())
        self.counted = 0  # net change in this reviewer's decided pairs during the session
        self.later: list[int] = []  # pairs put off this session: served once nothing else is
        self.on_painted: Callable[[], None] | None = None  # tests and benchmarks: frame is up
        self._background: Project | None = None
        self._background_lock = threading.Lock()
        self._clash_reported = False

    @property
    def project_name(self) -> str:
        return str(self.project.meta.get("name") or self.project.path.stem)

    def background(self) -> Project:
        """The second connection, opened on first use (from a worker thread)."""
        with self._background_lock:
            if self._background is None:
                self._background = Project.open(self.project.path, check=False)
            return self._background

    def serve_next(self) -> QueueItem | None:
        """The next pair of this reviewer's queue, claimed so that no one else is given it;
        the pairs put off come back once nothing else is left."""
        later = tuple(self.later)
        try:
            items = self.project.next_pairs(self.reviewer, 1, later, claim=True)
        except DocketError as exc:  # a busy or read-only file: show the pair all the same
            self.notify(f"Pair not claimed: {exc}", severity="warning", markup=False)
            items = self.project.next_pairs(self.reviewer, 1, later)
        if not items and later:
            self.later.clear()
            self.notify(f"Only the {'pair' if len(later) == 1 else 'pairs'} you put off "
                        f"{'is' if len(later) == 1 else 'are'} left: back in turn.")
            return self.serve_next()
        return items[0] if items else None

    def put_off(self, pair_id: int) -> None:
        """Leave the pair on screen undecided for now: it is not served again this session
        until the queue holds nothing else, and others may be given it meanwhile."""
        self.later.append(pair_id)
        with contextlib.suppress(DocketError):
            self.project.release(self.reviewer, pair_id)

    def recount(self) -> Recount:
        """Worker thread: this reviewer's decided and remaining pairs, counted in full, with
        the session's ``counted`` as it stood when they were counted (read on both sides of
        the count, and counted again if a decision came between). Taken when the worker
        started, a refit's count, made after its seconds of fitting, held the decisions made
        meanwhile and had them added again: 26 decisions read '27 done'."""
        for _ in range(RECOUNTS):
            before = self.counted
            decided, remaining = self.background().progress(self.reviewer)
            if self.counted == before:
                break
        return Recount(decided, remaining, before)

    def find(self, text: str, limit: int, skip: Collection[str]) -> list[int]:
        """Worker thread: find's search, on the second connection."""
        return self.background().find(text, limit, skip)

    def refit(self) -> Recount:
        """Worker thread: refit the model and re-rank the queue, then count again."""
        result = self.background().refit()
        count = self.recount()
        return Recount(count.decided, count.remaining, count.counted_at,
                       "model refit: another process refit on later decisions; theirs stands"
                       if result.superseded else
                       f"model refit: {result.labels} labels, {result.ranker}")

    def on_mount(self) -> None:
        if self.keymap.keymap:
            self.set_keymap(self.keymap.keymap)
        for problem in self.keymap.problems:
            self.notify(problem, title="keymap", severity="warning", markup=False, timeout=8)
        self.push_screen(ReviewScreen())
        # Everything built so far (Textual, the project, the first card) lives for the whole
        # session; moving it out of the collector's reach takes the collector's pauses out of
        # the key-to-paint time (measured: p99 from ~40 ms to ~20 ms on a busy machine).
        self.call_after_refresh(gc.freeze)

    def handle_bindings_clash(self, clashed_bindings: set[Binding], node: object) -> None:
        if not self._clash_reported:
            self._clash_reported = True
            ids = ", ".join(sorted(b.id or b.action for b in clashed_bindings))
            self.notify(f"Two bindings share a key ({ids}); check {self.keymap.path}",
                        title="keymap", severity="warning", markup=False, timeout=8)

    def on_unmount(self) -> None:
        # Quitting gives this reviewer's claimed pair back at once; if the file cannot be
        # written now, the claim lapses at its expiry all the same.
        with contextlib.suppress(DocketError):
            self.project.release(self.reviewer)
        with self._background_lock:
            if self._background is not None:
                self._background.close()
                self._background = None


def make_app(path: Path | str, reviewer: str, mask: Sequence[str] = (), *,
             clock: Clock | None = None, refit_every: int | None = None,
             keymap_file: Path | None = None) -> ReviewApp:
    """Open the project and build the app (errors such as a missing file raise here)."""
    project = Project.open(Path(path))
    try:
        mask = expand_mask(project, mask)  # an unknown column fails before anything is written
        reviewer = project.ensure_reviewer(reviewer)
    except BaseException:
        project.close()
        raise
    return ReviewApp(project, reviewer, mask, clock=clock or time.monotonic,
                     refit_every=refit_every, keymap_file=keymap_file)


def run_review(path: Path, reviewer: str, mask: list[str]) -> None:
    """Open the review screen on ``reviewer``'s queue in ``path`` until they quit."""
    need_terminal("review")  # before make_app registers the reviewer
    app = make_app(path, reviewer, mask)
    try:
        with quitting_screen(app.exit):
            app.run()
    finally:
        app.project.close()

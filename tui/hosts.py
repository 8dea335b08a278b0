"""What a screen needs from the app that shows it, stated as protocols.

Screens depend on these, never on the app classes, so the apps (which import the screens) and
the screens import each other in one direction only.
"""

from __future__ import annotations

from collections.abc import Callable, Collection
from contextlib import AbstractContextManager
from dataclasses import dataclass
from typing import Any, Protocol

from docket.core.project import Project
from docket.core.types import QueueItem

from .keymap import LoadedKeymap
from .masking import Mask


@dataclass(frozen=True)
class Recount:
    """A full count made by a worker on the second connection."""

    decided: int
    remaining: int
    counted_at: int  # the app's ``counted`` when the pairs were counted
    note: str = ""  # what a refit did, for the evidence panel


class Host(Protocol):
    """Shared by both apps: the open project, the clock, the keymap and the theme."""

    project: Project
    mask: Mask
    clock: Callable[[], float]
    keymap: LoadedKeymap
    theme_changed_signal: Any

    @property
    def project_name(self) -> str: ...

    def get_key_display(self, binding: Any) -> str: ...


class ReviewHost(Host, Protocol):
    """The review app, as the review screen sees it."""

    reviewer: str
    counted: int
    refit_every: int
    on_painted: Callable[[], None] | None

    def serve_next(self) -> QueueItem | None: ...

    def put_off(self, pair_id: int) -> None: ...

    def recount(self) -> Recount: ...

    def refit(self) -> Recount: ...

    def find(self, text: str, limit: int, skip: Collection[str]) -> list[int]: ...


class TeamHost(Host, Protocol):
    """The adjudicator's app, as the adjudication, agreement and quality screens see it."""

    adjudicator: str
    blind: bool

    def reader(self) -> AbstractContextManager[Project]: ...

"""The facade's verbs over stored machine raters: import, mark, remove, ensembles, the queue
order they set, the side-by-side report and one matcher's failures. ``Project`` inherits them;
the work is done in ``matchers/``."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .storage.project_file import ProjectFile

if TYPE_CHECKING:
    from .matchers.failures import FailureGroup
    from .matchers.importing import ReadMatcher


class MatcherVerbs(ProjectFile):
    """Mixed into ``Project``."""

    def matchers(self) -> list[dict[str, Any]]:
        """Every stored matcher, as ``docket matchers PROJECT list`` shows it."""
        from .matchers.catalogue import listing
        return listing(self)

    def import_matchers(self, paths: Sequence[str | Path], *, name: str | None = None,
                        replace: bool = False, threshold: float = 0.5,
                        group: str | None = None, role: str | None = None
                        ) -> list[ReadMatcher]:
        """Read, check and store matchers' files in one transaction: all of them, or none."""
        from .matchers.importing import import_matchers
        return import_matchers(self, paths, name=name, replace=replace, threshold=threshold,
                               group=group, role=role)

    def mark_matchers(self, names: Sequence[str], *, group: str | None = None,
                      role: str | None = None, threshold: float | None = None,
                      clear: bool = False) -> list[dict[str, Any]]:
        from .matchers.catalogue import mark_all
        return mark_all(self, names, group=group, role=role, threshold=threshold, clear=clear)

    def forget_matchers(self, names: Sequence[str]) -> None:
        from .matchers.catalogue import forget
        forget(self, names)

    def store_ensemble(self, name: str, members: Sequence[str], method: str,
                       with_reviewers: bool = False, replace: bool = False) -> None:
        from .matchers.ensembles import store_ensemble
        store_ensemble(self, name, members, method, with_reviewers, replace)

    def choose_queue_order(self, mode: str, members: Sequence[str] | None = None
                           ) -> dict[str, Any]:
        """Switch the queue order (``docket.core.QUEUE_ORDERS``); what it is afterwards."""
        from .matchers.queue_mode import choose_order
        return choose_order(self, mode, members)

    def side_by_side(self) -> dict[str, Any]:
        """The report of ``docket evaluate --matchers``."""
        from .matchers.side_by_side import side_by_side
        return side_by_side(self)

    def matcher_failures(self, name: str) -> list[FailureGroup]:
        """The matcher's disagreements with the gold labels, grouped, largest group first."""
        from .matchers.failures import failures
        return failures(self, name)

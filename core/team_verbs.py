"""The facade's verbs over people's labels: reviewers, agreement, labels from files, copies
merged, adjudication. ``Project`` inherits them, so front ends never import ``reviewing``."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .errors import DocketError, Interrupted
from .results import AgreementReport
from .storage import file_health
from .storage.file_health import ProjectFileError
from .storage.project_file import ProjectFile
from .wording import many

if TYPE_CHECKING:
    from .reviewing.merge import MergeResult
    from .reviewing.team import ReviewerChange
    from .storage.refit import RefitResult
    from .types import ClusterConflict, Decision, Review


class TeamVerbs(ProjectFile):
    """Mixed into ``Project``; the work is done in ``reviewing/``."""

    if TYPE_CHECKING:  # defined on Project
        def refit(self) -> RefitResult: ...

    # -- reviewers ---------------------------------------------------------------------------
    def add_reviewer(self, name: str, role: str = "reviewer",
                     granted_by: str = "") -> ReviewerChange:
        from .reviewing.team import add_reviewer
        return add_reviewer(self, name, role, granted_by=granted_by)

    def reviewers(self) -> list[dict[str, Any]]:
        from .reviewing.team import list_reviewers
        return list_reviewers(self)

    # -- agreement ---------------------------------------------------------------------------
    def agreement(self, include_hold: bool = False) -> AgreementReport:
        from .reviewing.team import agreement_report
        return AgreementReport.from_dict(agreement_report(self, include_hold=include_hold))

    def disagreements(self, a: str, b: str) -> list[dict[str, Any]]:
        from .reviewing.team import disagreements
        return disagreements(self, a, b)

    # -- labels from elsewhere ---------------------------------------------------------------
    def label_from(self, path: str | Path, reviewer: str,
                   progress: Callable[[str, int, int], None] | None = None
                   ) -> tuple[int, RefitResult | None]:
        """Every row of a labels file for ``reviewer`` (all checked before any is written),
        then a refit; (decisions recorded, the refit: None when nothing new was recorded).
        ``progress(step, done, total)`` hears of each step and of each batch of rows
        written."""
        from .reviewing.bulk import apply_rows, read_rows
        from .reviewing.label_standing import new_rows
        say = progress or (lambda step, done, total: None)
        say("checking the rows", 0, 1)
        rows = new_rows(self, reviewer, read_rows(self, Path(path), reviewer), Path(path))
        say("checking the rows", 1, 1)
        n = apply_rows(self, reviewer, rows,
                       progress=lambda done: say("recording decisions", done, len(rows)))
        if not n:  # a file run again: 10 s of refit over labels that changed in nothing
            return 0, None
        say("refitting the model", 0, 1)
        result = self._refit_after(f"the {many(n, 'decision')} for {reviewer} are recorded")
        say("refitting the model", 1, 1)
        return n, result

    def label_once(self, name: str, path: str | Path, adjudicator: str | None = None) -> int:
        from .reviewing.bulk import label_once
        return label_once(self, name, Path(path), adjudicator)

    def merge(self, others: list[Path], accept_roles: bool = False
              ) -> tuple[MergeResult, RefitResult | None]:
        """Decisions from offline copies; a refit when anything new came in."""
        from .reviewing.merge import merge
        result = merge(self, [Path(p) for p in others], accept_roles=accept_roles)
        return result, (self._refit_after(f"the {many(result.added, 'decision')} merged are "
                                          "recorded") if result.added else None)

    def _refit_after(self, kept: str) -> RefitResult:
        # a Ctrl-C in the refit comes after the decisions were committed: "nothing was
        # half-written" would send the user to record them all again
        try:
            return self.refit()
        except KeyboardInterrupt:
            raise Interrupted(f"{kept}; the refit was cut short, so the model stays as it "
                              "was until the next one (a review or label refits it)") from None
        except ProjectFileError as exc:
            # a full disk in the refit said 'disk full; nothing was saved' of decisions that
            # were all recorded
            why = ("the disk is full; free some space" if file_health.disk_full(exc)
                   else str(exc))
            raise DocketError(f"{self.path}: {kept}; the refit could not be written ({why}), "
                              "so the model stays as it was until the next one (a review or "
                              "label refits it)") from None

    # -- adjudication ------------------------------------------------------------------------
    def require_adjudicator(self, name: str) -> str:
        """The adjudicator's name as the project keeps it; refused unless one."""
        from .reviewing.adjudication import require_adjudicator
        return require_adjudicator(self, name)

    def set_aside_for(self, adjudicator: str) -> set[int]:
        from .reviewing.adjudication import set_aside_for
        return set_aside_for(self, adjudicator)

    def reviews_of(self, pair_id: int, adjudicator: str) -> list[Review]:
        from .reviewing.adjudication import reviews_of
        return reviews_of(self, pair_id, adjudicator)

    def adjudicate(self, pair_id: int, adjudicator: str, label: str, reason: str,
                   seconds: float = 0.0) -> Decision:
        from .reviewing.adjudication import adjudicate
        return adjudicate(self, pair_id, adjudicator, label, reason, seconds)

    def undo_adjudication(self, adjudicator: str) -> Decision | None:
        from .reviewing.adjudication import undo
        return undo(self, adjudicator)

    def serve_adjudication(self, adjudicator: str, waiting: list[int]) -> int | None:
        """Claim and return the first of ``waiting`` no other adjudicator holds (None when
        they hold them all); this adjudicator's earlier claim ends."""
        from .reviewing.adjudication import serve
        return serve(self, adjudicator, waiting)

    def held_by_other_adjudicators(self, adjudicator: str) -> set[int]:
        from .reviewing.adjudication import held_by_others
        return held_by_others(self, adjudicator)

    def release_adjudication(self, adjudicator: str) -> None:
        """Give back every pair this adjudicator holds (on quitting)."""
        from .reviewing.adjudication import release
        release(self, adjudicator)

    def adjudication_queue(self) -> list[tuple[int, str]]:
        """(pair id, why) of every pair waiting for an adjudicator, in queue order."""
        from .exports.gold_export import adjudication_queue
        return adjudication_queue(self)

    def conflicts(self) -> list[ClusterConflict]:
        from .exports.gold_export import conflicts
        return conflicts(self)

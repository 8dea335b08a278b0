"""The facade's report verbs: status, the model's and a matcher file's evaluation, clusters
and exports. ``Project`` inherits them; the work is done in ``quality/``, ``exports/`` and
``report.py``, loaded only when a report is asked for (they need pandas)."""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .results import Evaluation, StatusReport
from .storage.project_file import ProjectFile

if TYPE_CHECKING:
    import pandas as pd

    from .types import ClusterConflict


class ReportVerbs(ProjectFile):
    """Mixed into ``Project``."""

    def status(self) -> StatusReport:
        from .report import status
        with self.reading():
            return StatusReport.from_dict(status(self))

    # -- evaluation --------------------------------------------------------------------------
    def evaluate(self, thresholds: Sequence[float] | None = None,
                 target_precision: float | None = None,
                 target_recall: float | None = None, scores: pd.Series | None = None
                 ) -> Evaluation:
        """The model judged on the audit slice (see ``quality.evaluate.evaluate``); ``scores``
        from ``model_scores``, when the caller has them already."""
        from .quality.evaluate import evaluate
        return Evaluation.from_dict(evaluate(self, thresholds, target_precision,
                                             target_recall, scores=scores))

    def evaluate_predictions(self, path: str | Path, threshold: float | None = None,
                             thresholds: Sequence[float] | None = None,
                             target_precision: float | None = None,
                             target_recall: float | None = None,
                             supplement: bool = False) -> Evaluation:
        """A matcher's file judged like the model, plus its kappa as a machine rater; with
        ``supplement``, from the supplement drawn on its scores (``quality.supplement``)."""
        from .quality.evaluate import evaluate_predictions
        return Evaluation.from_dict(evaluate_predictions(
            self, path, threshold, thresholds, target_precision, target_recall,
            supplement=supplement))

    def draw_supplement(self, path: str | Path, size: int | None = None,
                        seed: int | None = None) -> dict[str, Any]:
        """Draw and store a second audit sample on a matcher's scores: its design, as a dict
        (fingerprint, file, size, seed, strata: stratum -> [N_h, n_h])."""
        from .quality.supplement import draw_supplement
        return draw_supplement(self, path, size, seed).to_dict()

    def model_scores(self) -> pd.Series:
        """The model's score of every candidate pair, by pair id."""
        from .quality.evaluate import model_scores
        return model_scores(self)

    # -- exports -----------------------------------------------------------------------------
    def clusters_frame(self, all_records: bool = False) -> pd.DataFrame:
        from .exports.gold_export import clusters_frame
        return clusters_frame(self, all_records)

    def clusters_and_conflicts(self) -> tuple[pd.DataFrame, list[ClusterConflict]]:
        """The clusters frame and the conflicts, the gold labels read once for both."""
        from .exports.gold_export import clusters_and_conflicts
        return clusters_and_conflicts(self)

    def refuse_over_sources(self, target: str) -> None:
        """Refuse an export ``target`` that is a table this project was built from."""
        from .exports.over_sources import refuse_over_sources
        refuse_over_sources(self.meta, target)

    def scores_frame(self) -> pd.DataFrame:
        from .exports.exporting import scores_frame
        return scores_frame(self)

    def export_rows(self, what: str, *, test_share: float = 0.2, seed: int = 0,
                    split_by: str = "record", all_records: bool = False,
                    for_lm: bool = False, lm_template: str | None = None) -> Any:
        """The rows of ``docket export --what`` (gold, training, clusters, conflicts,
        missed): a frame, or with ``for_lm`` the records to be made a chunk at a time
        (``records()`` gives them all at once); write them with ``docket.core.write_rows``."""
        from .exports.export_kinds import export_rows
        return export_rows(self, what, test_share=test_share, seed=seed, split_by=split_by,
                           all_records=all_records, for_lm=for_lm, lm_template=lm_template)

    def model_file(self) -> dict[str, Any]:
        """The current model as the small JSON-ready file ``docket score --model`` reads."""
        from .matching.model_file import from_meta
        return from_meta(self.meta).to_dict()

    def scoring_job(self, pairs: str | Path, model: str | Path | None = None,
                    left: str | Path | None = None, right: str | Path | None = None) -> Any:
        """What ``docket score`` runs over a pairs file: this project's model (or the model
        file given) and its records (or the tables given); run it with
        ``docket.core.score_to_parts``."""
        from .exports.score_all import make_job, stored_tables
        from .matching.model_file import ScoringModel, from_meta
        if model:
            from .records.sources import refuse_special
            refuse_special(Path(model))  # --model /dev/zero was read until memory ran out
        scorer = ScoringModel.load(model) if model else from_meta(self.meta)
        tables = stored_tables(self, Path(left) if left else None,
                               Path(right) if right else None)
        return make_job(scorer, *tables, str(pairs))

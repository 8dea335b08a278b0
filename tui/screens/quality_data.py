"""What the quality screen shows, worked out in a worker thread: the evaluation (at its
default thresholds and on a fine grid for the curve), the scores of gold-labelled pairs, and
the clusters and their conflicts. Each part that cannot be worked out says why instead."""

from __future__ import annotations

from dataclasses import dataclass, field

from docket.core.errors import DocketError
from docket.core.project import Project
from docket.core.results import Evaluation
from docket.core.types import ClusterConflict

CURVE = tuple(round(0.025 * i, 3) for i in range(1, 40))  # thresholds of the drawn curve


@dataclass(frozen=True)
class QualityData:
    """What the worker found; a part that could not be worked out says why instead."""

    report: Evaluation | None = None  # the evaluation at its default thresholds
    curve: Evaluation | None = None  # the evaluation on a fine grid, for the curve
    problem: str = ""  # why there is no report
    scores: dict[str, list[float]] = field(default_factory=dict)  # gold label -> scores
    conflicts: tuple[ClusterConflict, ...] = ()
    clusters: int = 0  # clusters of two or more records
    largest: int = 0
    clustered: int = 0  # records in those clusters
    cluster_problem: str = ""


def load_quality(project: Project) -> QualityData:
    """Worker thread: evaluation, scores by gold label, clusters and conflicts."""
    report = curve = None
    problem = cluster_problem = ""
    by_pair = project.model_scores()  # read once: every pair's score, for three uses
    try:
        report = project.evaluate(scores=by_pair)
        curve = project.evaluate(thresholds=CURVE, scores=by_pair)
    except DocketError as exc:
        problem = str(exc)
    except (ValueError, ArithmeticError) as exc:  # a figure the estimator could not form
        problem = f"the estimates could not be worked out ({exc})"
    scores: dict[str, list[float]] = {"match": [], "non-match": []}
    for g in project.gold_labels():
        scores.setdefault(g.label, []).append(float(by_pair.get(g.pair_id, 0.0)))
    found: tuple[ClusterConflict, ...] = ()
    clusters = largest = clustered = 0
    try:
        frame, listed = project.clusters_and_conflicts()
        found = tuple(listed)
        sizes = frame.drop_duplicates("cluster")["cluster_size"]
        multi = sizes[sizes >= 2]
        clusters, clustered = len(multi), int(multi.sum())
        largest = int(multi.max()) if len(multi) else 0
    except (DocketError, ValueError) as exc:
        cluster_problem = f"clusters could not be formed ({exc})"
    return QualityData(report, curve, problem, scores, found, clusters, largest, clustered,
                       cluster_problem)

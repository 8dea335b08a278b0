"""The predictions of every matcher over the candidate pairs, with the labelled audit slice
beside them: what every figure of the side-by-side report is computed from."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..quality.audit_data import no_gold_yet
from ..quality.audit_sample import AuditSample
from ..quality.evaluate import model_scores, sample_from
from ..reviewing.gold import gold_labels
from ..storage.project_file import ProjectFile
from . import catalogue

MODEL = "(model)"  # the project's own model, shown beside the matchers for reference


@dataclass
class Judged:
    """The predictions of every matcher, in pair-id order, with the audit slice beside them."""

    names: list[str]
    infos: dict[str, catalogue.MatcherInfo | None]
    predicted: dict[str, np.ndarray]  # bool per candidate pair
    given: dict[str, np.ndarray]  # bool per candidate pair: the matcher said something
    pair_ids: np.ndarray
    audit_at: np.ndarray  # positions of labelled audit pairs in pair-id order
    sample: AuditSample  # score unused (0): each matcher's predictions are set per figure
    gold_at: np.ndarray  # positions of every gold-labelled pair
    gold_y: np.ndarray  # 1 match, 0 non-match, per gold_at
    strata_at: dict[int, np.ndarray]  # positions of every candidate pair of each stratum

    def sample_for(self, name: str) -> AuditSample:
        """The audit sample scored by one matcher's predictions (1.0 / 0.0), with its
        predictions over every candidate pair of each stratum as the ``population``, so its
        predicted matches per stratum are counted, not estimated (as ``evaluate`` does for the
        model)."""
        pred = self.predicted[name].astype(float)
        return self.sample.rescored(pred[self.audit_at],
                                    population={h: pred[at] for h, at in self.strata_at.items()})


def predictions(scores: np.ndarray, threshold: float) -> np.ndarray:
    """score >= threshold; a pair the matcher said nothing about is a predicted non-match."""
    return np.nan_to_num(scores, nan=-1.0) >= threshold


def _info(infos: dict[str, catalogue.MatcherInfo | None], name: str) -> catalogue.MatcherInfo:
    info = infos[name]
    assert info is not None  # only the model has no stored info, and it has no stored scores
    return info


def gather(project: ProjectFile, names: Sequence[str] | None = None,
           with_model: bool = True) -> Judged:
    conn = project.connection
    infos: dict[str, catalogue.MatcherInfo | None] = {
        m.name: m for m in catalogue.matchers(conn) if names is None or m.name in names}
    scores = catalogue.load_scores(conn, list(infos) if names is None else list(names))
    ids = catalogue.pair_ids(conn)
    predicted = {n: predictions(s, _info(infos, n).threshold) for n, s in scores.items()}
    given = {n: ~np.isnan(s) for n, s in scores.items()}
    if with_model:
        model = model_scores(project).reindex(ids).to_numpy(dtype=float)
        predicted[MODEL] = model >= project.threshold
        given[MODEL] = np.ones(ids.size, dtype=bool)
        infos[MODEL] = None
    gold = {g.pair_id: int(g.label == "match") for g in gold_labels(conn)}
    audit = conn.execute("SELECT pair_id, stratum, inclusion FROM pairs WHERE audit = 1 "
                         "ORDER BY pair_id").fetchall()
    kept = [(p, h, pi) for p, h, pi in audit if p in gold]
    if not kept:
        drawn = len(audit)
        raise no_gold_yet(project, drawn)
    strata = {int(h): v for h, v in project.meta.get("audit_strata", {}).items()}
    sample = sample_from(np.zeros(len(kept)), [gold[p] for p, _, _ in kept],
                         [h for _, h, _ in kept], [pi for _, _, pi in kept], strata)
    g_ids = np.fromiter(gold, dtype=np.int64, count=len(gold))
    every = np.array([-1 if h is None else h for (h,) in conn.execute(
        "SELECT stratum FROM pairs ORDER BY pair_id")], dtype=np.int64)
    strata_at = {int(h): np.flatnonzero(every == h) for h in np.unique(every) if h >= 0}
    return Judged(list(predicted), infos, predicted, given, ids,
                  np.searchsorted(ids, [p for p, _, _ in kept]), sample,
                  np.searchsorted(ids, g_ids), np.fromiter(gold.values(), dtype=np.int64,
                                                           count=len(gold)), strata_at)


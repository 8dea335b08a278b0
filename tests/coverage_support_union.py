"""Coverage of the audit slice and a supplement judged together (``quality.union_design``),
by simulation: shared by the suite and bench/.

Each run draws the audit slice on the population's strata score and, independently, a
supplement on the matcher's own score (both with ``core.queue.draw_audit``), labels every drawn
pair (or the first ``first`` of each in draw order) from the truth, and checks whether each
interval holds the true figure counted over all candidate pairs.
"""

from __future__ import annotations

from collections.abc import Iterable

import numpy as np

from docket.core.ordering import queue
from docket.core.quality.estimates import MEASURES, threshold_table
from docket.core.quality.union_design import UnionDesign, union_sample

from .coverage_support import true_figures


def _first(drawn: queue.AuditSlice, first: int | None) -> np.ndarray:
    at = np.flatnonzero(drawn.selected)
    return at if first is None else at[np.argsort(drawn.order[at])][:first]


def union_run(truth: np.ndarray, strata_score: np.ndarray, score: np.ndarray, seed: int,
              thresholds: Iterable[float], first: int | None = None
              ) -> dict[tuple[float, str], tuple[bool, float]]:
    """Per (threshold, figure): whether the interval held the truth, and its width."""
    size = queue.default_audit_size(truth.size)
    audit = queue.draw_audit(strata_score, size, seed)
    extra = queue.draw_audit(np.clip(score, 0.0, 1.0), size, seed + 1_000_003)
    label = np.full(truth.size, np.nan)
    for drawn in (audit, extra):
        at = _first(drawn, first)
        label[at] = truth[at]
    design = UnionDesign(score, label, np.zeros(truth.size, dtype=bool), audit.stratum,
                         extra.stratum, audit.selected, extra.selected)
    sample, _ = union_sample(design)
    out = {}
    for e in threshold_table(sample, thresholds):
        want = true_figures(truth, score, e.threshold)
        for m in MEASURES:
            iv = getattr(e, m)
            ok = iv.low is not None and iv.low - 1e-12 <= want[m] <= iv.high + 1e-12
            out[(e.threshold, m)] = (ok, np.nan if iv.low is None else iv.high - iv.low)
    return out


def union_coverage(truth: np.ndarray, strata_score: np.ndarray, score: np.ndarray,
                   seeds: Iterable[int], thresholds: Iterable[float], first: int | None = None
                   ) -> dict[tuple[float, str], tuple[float, float]]:
    """Share of runs whose interval held the truth, and the median width, per figure."""
    hits: dict[tuple[float, str], list[tuple[bool, float]]] = {}
    ts = list(thresholds)
    for seed in seeds:
        for key, found in union_run(truth, strata_score, score, seed, ts, first).items():
            hits.setdefault(key, []).append(found)
    return {k: (float(np.mean([ok for ok, _ in v])), float(np.nanmedian([w for _, w in v])))
            for k, v in hits.items()}

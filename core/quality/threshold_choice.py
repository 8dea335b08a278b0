"""Choosing a threshold that meets a target precision or recall on the audit slice."""

from __future__ import annotations

import numpy as np

from .audit_sample import AuditSample


def suggest_threshold(sample: AuditSample, target_precision: float | None = None,
                      target_recall: float | None = None) -> float | None:
    """A threshold meeting one target, on the point estimates; None when none meets it.

    Give exactly one target. With ``target_precision``: the lowest threshold whose estimated
    precision reaches it (precision need not rise with the threshold; this is the first that
    does). With ``target_recall``: the highest threshold whose estimated recall reaches it.
    Candidates are the distinct audit scores, since estimates change only there. The choice
    ignores sampling error and is itself tuned on the sample: check ``estimate_at`` for the
    interval at the chosen threshold before relying on it.
    """
    if (target_precision is None) == (target_recall is None):
        raise ValueError("give exactly one of target_precision and target_recall")
    order = np.argsort(sample.score, kind="stable")
    w = sample.weights()[order]
    wy = w * sample.label[order]
    # suffix sums: everything from position i on is predicted positive at threshold score[i]
    tail_w, tail_wy = np.cumsum(w[::-1])[::-1], np.cumsum(wy[::-1])[::-1]
    ts, first = np.unique(sample.score[order], return_index=True)
    if target_precision is not None:
        hits = np.flatnonzero(tail_wy[first] / tail_w[first] >= target_precision)
        return float(ts[hits[0]]) if hits.size else None
    if not wy.sum() > 0:
        return None  # no labelled match: recall is undefined
    hits = np.flatnonzero(tail_wy[first] / wy.sum() >= target_recall)
    return float(ts[hits[-1]]) if hits.size else None

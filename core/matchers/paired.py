"""Paired differences between two matchers judged on the same audit pairs.

Precision, recall and F1 of a matcher are each a ratio of Horvitz–Thompson totals,
R = sum w y / sum w x over the labelled audit pairs (precision: y = right and predicted, x =
predicted; recall: x = match; F1: y = 2 TP, x = predicted + match). Two matchers are judged on
the very same pairs, so their estimates are correlated and the variance of the difference is
not the sum of the two variances. Linearised (Taylor) variance of D = R_A - R_B: each pair
carries d = (y_A - R_A x_A) / X_A - (y_B - R_B x_B) / X_B, and
var(D) = sum_h N_h^2 (1 - m_h / N_h) s_h^2(d) / m_h over the strata (s_h^2 the sample
variance of d within stratum h), which is the stratified SRS variance of a total applied to
the linearised variable. Source: common practice (design-based survey estimation, the
linearisation of a ratio estimator); the interval is D +/- z sqrt(var(D)).

Two matchers that agree on every audit pair get a difference of exactly 0 with no spread: the
sample cannot tell them apart, and the verdict says no difference is shown.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

from ..quality.audit_sample import AuditSample
from ..quality.intervals import z_value

MEASURES = ("precision", "recall", "f1")
METHOD = "linearised variance of the difference of two ratio estimators (stratified)"


@dataclass(frozen=True)
class PairedDifference:
    """``first`` minus ``second`` on one measure; ``verdict`` says what the data support."""

    first: str
    second: str
    measure: str
    difference: float | None
    low: float | None
    high: float | None
    disagreeing_audit_pairs: int
    verdict: str
    method: str = METHOD

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


def _parts(measure: str, pred: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    tp = (pred & y).astype(float)
    if measure == "precision":
        return tp, pred.astype(float)
    if measure == "recall":
        return tp, y.astype(float)
    return 2.0 * tp, pred.astype(float) + y.astype(float)


def _residual(w: np.ndarray, num: np.ndarray, den: np.ndarray) -> tuple[float, np.ndarray] | None:
    total = float(w @ den)
    if not total > 0:
        return None
    ratio = float(w @ num) / total
    return ratio, (num - ratio * den) / total


def stratified_variance(sample: AuditSample, d: np.ndarray) -> float:
    """Stratified SRS variance of the estimated total of ``d`` (per labelled pair)."""
    var = 0.0
    for h, m_h in sample.labelled_counts().items():
        if m_h < 2:
            continue  # one label: its stratum's variance cannot be estimated
        big_n = sample.stratum_sizes[h]
        s2 = float(np.var(d[sample.stratum == h], ddof=1))
        var += big_n ** 2 * (1.0 - m_h / big_n) * s2 / m_h
    return var


def paired_difference(sample: AuditSample, first: str, pred_first: np.ndarray, second: str,
                      pred_second: np.ndarray, measure: str,
                      confidence: float = 0.95) -> PairedDifference:
    """``measure`` of ``first`` minus that of ``second``, both predicting on ``sample``'s pairs
    (``pred_*``: bool per labelled audit pair, in the sample's order)."""
    if measure not in MEASURES:
        raise ValueError(f"measure must be one of {MEASURES}")
    y = sample.label == 1
    w = sample.weights()
    a = _residual(w, *_parts(measure, pred_first, y))
    b = _residual(w, *_parts(measure, pred_second, y))
    split = int(np.sum(pred_first != pred_second))
    if a is None or b is None:
        return PairedDifference(first, second, measure, None, None, None, split,
                                f"{measure} undefined for one of them on the audit slice")
    diff = a[0] - b[0]
    half = z_value(confidence) * float(np.sqrt(stratified_variance(sample, a[1] - b[1])))
    low, high = diff - half, diff + half
    if low > 0:
        verdict = f"{first} has the higher {measure}"
    elif high < 0:
        verdict = f"{second} has the higher {measure}"
    else:
        verdict = f"no difference in {measure} shown at {confidence:.0%}"
    return PairedDifference(first, second, measure, diff, low, high, split, verdict)

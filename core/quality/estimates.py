"""Honest quality estimates of a matcher from the audit slice.

Labels chosen by the uncertainty queue over-represent pairs near the decision boundary, so their
plain precision and recall say little about the candidate pairs as a whole. The audit slice is a
stratified random sample (strata = probability bins, simple random sampling without replacement
within each stratum), so each labelled audit pair stands for N_h / m_h candidate pairs and
precision, recall and F1 are ratios of Horvitz–Thompson totals:

    precision = TP / (TP + FP),  recall = TP / (TP + FN),  F1 = 2 TP / (2 TP + FP + FN).

A pair is a predicted match when its score is at or above the threshold.

Intervals. All three ratios get the same Korn–Graubard-type interval: Clopper–Pearson at the
effective sample size p (1 - p) / var, where var is the linearised (Taylor) variance of a ratio
of stratified totals, sum_h N_h^2 (1 - m_h / N_h) s_h^2 / m_h / X^2 with s_h^2 the variance of
z = y - R x within stratum h (method "linearised-korn-graubard"; source: common practice in
design-based survey estimation, the Korn–Graubard construction named from memory).

The zero-count allowance. A stratum whose labels show no error of a kind (no false positive
among its predicted matches, no missed match among its matches), or no pair of the ratio's
domain at all (no labelled predicted match), adds no variance, though errors may hide among its
unlabelled pairs. When errors are rare most strata show none and the plain design variance makes
the intervals far too narrow. So such a stratum is given, for its variance only, half a pair of
each kind it lacks (add-half smoothing, the posterior mean under the Jeffreys prior), and keeps
the larger of the two variances; the linearisation point R is the ratio with these half pairs
counted. A stratum with no predicted match in its labels so gets an allowance for the share of
predicted matches it may hold unseen. The point estimates never include the half pairs.

Holds. Held audit pairs (no one has settled them) are the hard ones, not missing at random:
``hold_bounds`` counts them all wrong, then all right, and keeps the outer interval bounds.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import replace

import numpy as np

from ..intervals import clopper_pearson, wilson, z_value
from .audit_sample import AuditSample, Bounds, Interval, QualityEstimate
from .known_domains import known_domains
from .threshold_choice import suggest_threshold  # noqa: F401  (part of this module's API)

LINEARISED = "linearised-korn-graubard"
WILSON = "wilson"
NAIVE = "naive-unweighted"
SMOOTHING = 0.5  # pseudo-count of each unseen kind in a stratum
MEASURES = ("precision", "recall", "f1")
# per measure: (y, x) from the cells (tp, fp, fn) of one pair, and the error cells it watches
_Y_X = {"precision": ((1, 0, 0), (1, 1, 0)), "recall": ((1, 0, 0), (1, 0, 1)),
        "f1": ((2, 0, 0), (2, 1, 1))}


def _cells(score: np.ndarray, label: np.ndarray, threshold: float) -> np.ndarray:
    """(n, 3) of 0/1: true positive, false positive, missed match."""
    pred = score >= threshold
    y = label == 1
    return np.stack([pred & y, pred & ~y, ~pred & y], axis=1).astype(float)


def _pseudo(cells_h: np.ndarray, measure: str, a: float) -> np.ndarray:
    """The half pairs a stratum is allowed for ``measure``: rows of cells, times ``a``."""
    tp, fp, fn = cells_h.sum(axis=0)
    need_p, need_r = tp == 0 or fp == 0, tp == 0 or fn == 0
    rows = []
    if (measure == "precision" and need_p) or (measure == "recall" and need_r) or \
            (measure == "f1" and (need_p or need_r)):
        rows.append((1.0, 0.0, 0.0))
    if need_p and measure in ("precision", "f1"):
        rows.append((0.0, 1.0, 0.0))
    if need_r and measure in ("recall", "f1"):
        rows.append((0.0, 0.0, 1.0))
    return a * np.array(rows).reshape(-1, 3)


def _unit_var(z: np.ndarray, freq: np.ndarray, m: int) -> float:
    """Variance of z over rows counted ``freq`` times, as an unbiased estimate from ``m`` real
    units: the half pairs shift the shares, not the number of pairs the spread rests on."""
    total = float(freq.sum())
    mean = float(freq @ z) / total
    return float(freq @ (z - mean) ** 2) / total * m / (m - 1.0)


def ratio_interval(sample: AuditSample, cells: np.ndarray, measure: str, confidence: float,
                   allowance: float = SMOOTHING) -> Interval:
    """One of precision, recall or F1 with its interval, from the (n, 3) cells of the sample."""
    y_of, x_of = (np.asarray(v, dtype=float) for v in _Y_X[measure])
    y, x = cells @ y_of, cells @ x_of
    w = sample.weights()
    big_x = float(w @ x)
    if not big_x > 0:
        return Interval(None, None, None, LINEARISED)
    point = float(w @ y) / big_x
    parts = []  # per stratum: (N_h, m_h, rows of y, rows of x, pseudo y, pseudo x, pseudo freq)
    num, den = float(w @ y), big_x
    for h, idx in sample.stratum_index().items():
        big_n, m_h = sample.stratum_sizes[h], idx.size
        pseudo = _pseudo(cells[idx], measure, allowance) if big_n > m_h else np.zeros((0, 3))
        freq = pseudo.sum(axis=1)
        unit = pseudo / np.where(freq > 0, freq, 1.0)[:, None]
        py, px = unit @ y_of, unit @ x_of
        num += big_n / m_h * float(freq @ py)
        den += big_n / m_h * float(freq @ px)
        parts.append((big_n, m_h, y[idx], x[idx], py, px, freq))
    centre = num / den
    var = 0.0
    for big_n, m_h, yh, xh, py, px, freq in parts:
        if m_h < 2 or big_n <= m_h:
            continue
        z = yh - centre * xh
        s2 = _unit_var(z, np.ones_like(z), m_h)
        if freq.size:
            s2 = max(s2, _unit_var(np.concatenate([z, py - centre * px]),
                                   np.concatenate([np.ones_like(z), freq]), m_h))
        var += big_n ** 2 * (1.0 - m_h / big_n) / m_h * s2
    var /= big_x ** 2
    spread = centre * (1.0 - centre)
    wx = w[x > 0]  # no spread to go by: Kish's effective sample size of the domain
    n_eff = spread / var if var > 0 and spread > 0 else float(wx.sum() ** 2 / (wx ** 2).sum())
    n_eff = min(n_eff, big_x)
    return Interval(point, *clopper_pearson(point * n_eff, n_eff, confidence), LINEARISED)


def _total_interval(sample: AuditSample, y: np.ndarray, confidence: float) -> Interval:
    """HT total of ``y`` with its linearised (Wald) interval, never below the labelled count."""
    w = sample.weights()
    total, var = float(w @ y), 0.0
    for h, idx in sample.stratum_index().items():
        big_n, m_h = sample.stratum_sizes[h], idx.size
        if m_h >= 2 and big_n > m_h:
            var += big_n ** 2 * (1.0 - m_h / big_n) / m_h * float(np.var(y[idx], ddof=1))
    half = z_value(confidence) * var ** 0.5
    return Interval(total, max(float(y.sum()), total - half), total + half, "linearised-wald")


def _estimate(sample: AuditSample, t: float, confidence: float) -> QualityEstimate:
    cells = _cells(sample.score, sample.label, t)
    if sample.population is not None:
        precision, recall, f1, matches, pp, tp = known_domains(sample, t, cells, confidence)
    else:
        w = sample.weights()
        tp, fp, _ = (float(v) for v in w @ cells)
        pp = tp + fp
        precision = ratio_interval(sample, cells, "precision", confidence)
        recall = ratio_interval(sample, cells, "recall", confidence)
        f1 = ratio_interval(sample, cells, "f1", confidence)
        matches = _total_interval(sample, sample.label.astype(float), confidence)
    return QualityEstimate(
        threshold=t, precision=precision, recall=recall, f1=f1, true_matches=matches,
        predicted_positives=pp, true_positives=tp, n_labelled=sample.n_labelled,
        n_pairs=sample.n_pairs(), confidence=confidence, method=LINEARISED,
        held=sample.n_held)


def hold_bounds(sample: AuditSample, threshold: float, confidence: float = 0.95
                ) -> dict[str, Bounds]:
    """Each figure with the held pairs counted all wrong, then all right (see module notes)."""
    pred = sample.held_score >= threshold
    worst = sample.with_held(np.where(pred, 0, 1))
    best = sample.with_held(np.where(pred, 1, 0))
    low, high = _estimate(worst, threshold, confidence), _estimate(best, threshold, confidence)
    return {m: Bounds(getattr(low, m).value, getattr(high, m).value, getattr(low, m).low,
                      getattr(high, m).high) for m in MEASURES}


def threshold_table(sample: AuditSample, thresholds: Iterable[float],
                    confidence: float = 0.95) -> list[QualityEstimate]:
    """``estimate_at`` for each threshold."""
    ts = [float(t) for t in thresholds]
    if not ts:
        return []
    if sample.n_labelled == 0:
        raise ValueError("the audit slice has no labelled pairs yet")
    out = []
    for t in ts:
        e = _estimate(sample, t, confidence)
        if sample.n_held:
            b = hold_bounds(sample, t, confidence)
            e = replace(e, precision_bounds=b["precision"], recall_bounds=b["recall"],
                        f1_bounds=b["f1"])
        out.append(e)
    return out


def estimate_at(sample: AuditSample, threshold: float,
                confidence: float = 0.95) -> QualityEstimate:
    """Design-based precision, recall and F1 of "score >= threshold" over the candidate pairs.

    Point estimates are ratios of Horvitz–Thompson totals (weights N_h / m_h, see
    ``AuditSample``); each carries the linearised Korn–Graubard interval with the zero-count
    allowance (see the module notes). With held pairs in the slice, ``*_bounds`` hold the
    figures with every held pair wrong and every one right.
    """
    return threshold_table(sample, [threshold], confidence)[0]


def _wilson(x: float, n: float, confidence: float) -> Interval:
    if not n > 0:
        return Interval(None, None, None, WILSON)
    return Interval(float(x / n), *wilson(x, n, confidence), WILSON)


def naive_estimate(probabilities: Sequence[float] | np.ndarray, labels: Sequence[int] | np.ndarray,
                   threshold: float, confidence: float = 0.95) -> QualityEstimate:
    """Plain precision, recall and F1 from every label, unweighted: marked ``biased``.

    Shown beside the design-based estimate so the gap is visible; the Wilson intervals only
    describe the labelled pairs, not the candidate pairs.
    """
    p = np.asarray(probabilities, dtype=float)
    y = np.asarray(labels)
    if p.shape != y.shape or p.ndim != 1:
        raise ValueError("probabilities and labels must be one-dimensional and equally long")
    if not np.all(np.isin(y, (0, 1))):
        raise ValueError("labels must be 1 (match) or 0 (non-match)")
    pred = p >= threshold
    match = y == 1
    tp, pp, m = int(np.sum(pred & match)), int(pred.sum()), int(match.sum())
    return QualityEstimate(
        threshold=float(threshold),
        precision=_wilson(tp, pp, confidence),
        recall=_wilson(tp, m, confidence),
        f1=Interval(2 * tp / (pp + m) if pp + m else None, None, None, "none"),
        true_matches=Interval(float(m), None, None, "count"),
        predicted_positives=float(pp),
        true_positives=float(tp),
        n_labelled=int(y.size),
        n_pairs=int(y.size),
        confidence=confidence,
        method=NAIVE,
        biased=True,
    )

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

import math
from collections.abc import Iterable, Sequence
from dataclasses import replace

import numpy as np

from .audit_sample import AuditSample, Bounds, Interval, QualityEstimate
from .intervals import clopper_pearson, wilson, z_value
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


def _share(x: float, n: int, big: int, seen_kind: bool, a: float = SMOOTHING
           ) -> tuple[float, float, float]:
    """Share x / n of one domain of a stratum (n labelled of ``big`` pairs): the point, the
    share for the spread, and the variance of big times the share.

    Where the labels show one kind only (and ``seen_kind`` allows it), the variance is the
    larger of the plain and the add-half one; where the domain has pairs but no label, the
    share is unknown: NaN (the caller fills in the pooled share), with the widest variance
    and the spread of the share 1/2 that goes with it.
    """
    if big == 0:
        return 0.0, 0.0, 0.0
    if n == 0:
        return math.nan, 0.5, big ** 2 * 0.25
    p = x / n
    fpc = 1.0 - n / big
    var = big ** 2 * fpc * (p * (1.0 - p) * n / max(n - 1, 1)) / n
    smooth = p
    if seen_kind and (x == 0 or x == n) and big > n:
        smooth = (x + a) / (n + 2.0 * a)
        var = max(var, big ** 2 * fpc * smooth * (1.0 - smooth) / max(n - 1, 1))
    return p, smooth, var


def _korn_graubard(point: float, spread_at: float, var: float, cap: float,
                   confidence: float) -> Interval:
    spread = spread_at * (1.0 - spread_at)
    n_eff = spread / var if var > 0 and spread > 0 else cap
    n_eff = max(min(n_eff, cap), 1e-9)
    return Interval(point, *clopper_pearson(point * n_eff, n_eff, confidence), LINEARISED)


def _known_domains(sample: AuditSample, t: float, cells: np.ndarray, confidence: float
                   ) -> tuple[Interval, Interval, Interval, Interval, float, float]:
    """Precision, recall, F1 and true matches when each stratum's count of predicted matches
    is known (``AuditSample.population``).

    Within stratum h the PP_h predicted matches and the N_h - PP_h others are two domains of
    known size, each sampled at random: T = sum PP_h p_h (p_h the share of matches among the
    labelled predicted pairs) and F = sum (N_h - PP_h) r_h (r_h among the labelled others), so
    precision = T / PP, recall = T / (T + F), F1 = 2 T / (T + PP + F), with the delta-method
    variance from var T and var F (independent: disjoint labels). A stratum with predicted
    matches but none labelled counts them at the share of the strata that have some (pooled),
    with the widest variance, (PP_h / 2)^2; likewise for the other domain.
    """
    counts = sample.predicted_counts(t) or {}
    parts = []
    for h, idx in sample.stratum_index().items():
        pp_h, rest = counts.get(h, 0), sample.stratum_sizes[h] - counts.get(h, 0)
        tp, fp, fn = cells[idx].sum(axis=0)
        a_h, b_h = int(tp + fp), idx.size - int(tp + fp)
        parts.append((pp_h, _share(tp, a_h, pp_h, True), rest,
                      _share(fn, b_h, rest, tp + fn > 0)))

    def pooled(domain: int) -> float:  # 0: the predicted matches, 1: the other pairs
        seen = [(part[2 * domain], part[2 * domain + 1][0]) for part in parts
                if not math.isnan(part[2 * domain + 1][0])]
        total = sum(size for size, _ in seen)
        return sum(size * v for size, v in seen) / total if total else 0.5

    fill_p, fill_r = pooled(0), pooled(1)
    big_t = big_f = var_t = var_f = sm_t = sm_f = 0.0
    for pp_h, (p, ps, vt), rest, (r, rs, vf) in parts:
        p = fill_p if math.isnan(p) else p  # the spread keeps the share 1/2 of the variance
        r = fill_r if math.isnan(r) else r
        big_t, sm_t, var_t = big_t + pp_h * p, sm_t + pp_h * ps, var_t + vt
        big_f, sm_f, var_f = big_f + rest * r, sm_f + rest * rs, var_f + vf
    big_pp = float(sum(counts.get(h, 0) for h in sample.labelled_counts()))
    nothing = Interval(None, None, None, LINEARISED)
    precision = nothing if big_pp == 0 else _korn_graubard(
        big_t / big_pp, sm_t / big_pp, var_t / big_pp ** 2, big_pp, confidence)
    m = big_t + big_f
    recall = nothing if m <= 0 else _korn_graubard(
        big_t / m, sm_t / max(sm_t + sm_f, 1e-300),
        (big_f ** 2 * var_t + big_t ** 2 * var_f) / m ** 4, m, confidence)
    d = big_t + big_pp + big_f
    f1 = nothing if d <= 0 else _korn_graubard(
        2 * big_t / d, 2 * sm_t / max(sm_t + big_pp + sm_f, 1e-300),
        ((2 * (big_pp + big_f)) ** 2 * var_t + (2 * big_t) ** 2 * var_f) / d ** 4,
        d / 2.0, confidence)
    half = z_value(confidence) * (var_t + var_f) ** 0.5
    found = float(sample.label.sum())
    matches = Interval(m, max(found, m - half), m + half, "linearised-wald")
    return precision, recall, f1, matches, big_pp, big_t


def _estimate(sample: AuditSample, t: float, confidence: float) -> QualityEstimate:
    cells = _cells(sample.score, sample.label, t)
    if sample.population is not None:
        precision, recall, f1, matches, pp, tp = _known_domains(sample, t, cells, confidence)
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

"""Honest quality estimates of a matcher from the audit slice.

Labels chosen by the uncertainty queue over-represent pairs near the decision boundary, so their
plain precision and recall say little about the candidate pairs as a whole. The audit slice is a
stratified random sample (strata = probability bins, simple random sampling without replacement
within each stratum), so each labelled audit pair stands for a known number of candidate pairs and
precision, recall and F1 are ratios of Horvitz–Thompson totals.

A pair is a predicted match when its score is at or above the threshold.

Intervals. Precision and recall, which are proportions, get a Korn–Graubard-type interval:
Clopper–Pearson at the effective sample size p (1 - p) / var, where var is the linearised
(Taylor) variance of a ratio of stratified totals, with a zero-count allowance (``method``
"smoothed-korn-graubard"). Why the allowance: a stratum whose labelled predicted matches are
all matches (or whose labelled matches were all found) adds no variance, though errors may hide
among its unlabelled pairs. When errors are rare (a one-to-one matcher: about 1 % false
positives and missed matches) most strata show none, and the plain design variance makes the
intervals far too narrow: on DBLP-ACM they held the true precision and recall in 40 and 42 of
50 redrawn audit slices. So such a stratum's share x / n is taken as (x + 1/2) / (n + 1), as if
half a pair of the unseen kind had been labelled (add-half smoothing, the posterior mean under
the Jeffreys prior), and keeps the larger of the two variances. Source: common practice
(design-based survey estimation); the Korn–Graubard construction is named from memory. With the
allowance the one-to-one slices hold the truth 50/50 and 50/50, the plain project's 46/50 and
50/50, and median widths barely move: what widens are the intervals of slices that saw no error.

F1 and the total of true matches get percentile intervals from the stratified rescaling
bootstrap (Rao–Wu: m_h - 1 draws with replacement inside each stratum, weights rescaled with
the finite-population correction), seeded so that a call is repeatable; they lack the
allowance. When every labelled pair carries the same weight (a self-weighting design) the
Horvitz–Thompson ratios equal the plain proportions, and precision and recall get the Wilson
score interval on the plain counts.

Known weakness, shared by every design-based interval: a stratum whose labels hold no match
adds nothing to recall's variance, though matches may hide in it. The note of each estimate
bounds how many could.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np

from .audit_sample import AuditSample, Interval, QualityEstimate
from .intervals import clopper_pearson, wilson

BOOTSTRAP = "stratified-bootstrap"
WILSON = "wilson"
KORN_GRAUBARD = "smoothed-korn-graubard"
SMOOTHING = 0.5  # pseudo-count of the unseen kind in a stratum that shows only one
NAIVE = "naive-unweighted"




def _columns(sample: AuditSample, thresholds: Sequence[float]) -> np.ndarray:
    """Per pair and threshold: [match and predicted, predicted, match], as (n, 3 * T)."""
    pred = sample.score[:, None] >= np.asarray(thresholds, dtype=float)[None, :]
    y = sample.label[:, None].astype(float)
    cols = np.stack([pred * y, pred.astype(float), np.broadcast_to(y, pred.shape)], axis=2)
    return cols.reshape(sample.n_labelled, 3 * len(thresholds))


def _replicate_totals(sample: AuditSample, values: np.ndarray, n_boot: int,
                      seed: int) -> np.ndarray:
    """Rao–Wu rescaling bootstrap replicates of the weighted totals of ``values`` (n, k).

    In a stratum with m_h >= 2 labels, each replicate draws m_h - 1 of them with replacement
    (counts r_i) and gives pair i the weight w_i (1 - lam + lam * m_h / (m_h - 1) * r_i) with
    lam = sqrt(1 - m_h / N_h); the replicate variance of a total then matches the stratified
    SRS variance including the finite-population correction. A stratum with one label keeps
    its weight in every replicate: its variance cannot be estimated.
    """
    rng = np.random.default_rng(seed)
    w = sample.weights()
    out = np.zeros((n_boot, values.shape[1]))
    for h, m_h in sorted(sample.labelled_counts().items(), key=lambda kv: str(kv[0])):
        idx = np.flatnonzero(sample.stratum == h)
        base = w[idx]
        if m_h < 2:
            out += base @ values[idx]
            continue
        lam = math.sqrt(max(0.0, 1.0 - m_h / sample.stratum_sizes[h]))
        draws = rng.multinomial(m_h - 1, np.full(m_h, 1.0 / m_h), size=n_boot)
        factor = (1.0 - lam) + lam * m_h / (m_h - 1) * draws
        out += (factor * base) @ values[idx]
    return out


def _kish(weights: np.ndarray) -> float:
    return float(weights.sum() ** 2 / np.square(weights).sum()) if weights.size else 0.0


def _wilson(x: float, n: float, confidence: float) -> Interval:
    if not n > 0:
        return Interval(None, None, None, WILSON)
    return Interval(float(x / n), *wilson(x, n, confidence), WILSON)


def _percentile(num: float, den: float, rep_num: np.ndarray, rep_den: np.ndarray,
                confidence: float) -> Interval:
    # rescaled weights stay positive, so no replicate denominator is empty when den is not
    if not den > 0:
        return Interval(None, None, None, BOOTSTRAP)
    alpha = 1.0 - confidence
    low, high = np.quantile(rep_num / rep_den, [alpha / 2.0, 1.0 - alpha / 2.0])
    return Interval(float(num / den), float(low), float(high), BOOTSTRAP)


def _stratum_totals(sample: AuditSample, values: np.ndarray) -> tuple[np.ndarray, ...]:
    """Per labelled stratum: m_h, N_h and the column sums of ``values`` (rows: strata)."""
    strata = sorted(sample.labelled_counts().items(), key=lambda kv: str(kv[0]))
    m = np.array([m_h for _, m_h in strata], dtype=float)
    big_n = np.array([sample.stratum_sizes[h] for h, _ in strata], dtype=float)
    sums = np.stack([values[sample.stratum == h].sum(axis=0) for h, _ in strata])
    return m, big_n, sums


def _z_variance(share: np.ndarray, q: np.ndarray, ratio: np.ndarray,
                m: np.ndarray) -> np.ndarray:
    """Sample variance (ddof 1) of z = right - ratio * in_domain over the m_h labels of each
    stratum, a share q of them in the domain and a share ``share`` of those right."""
    mean = q * (share - ratio)
    second = q * (share * (1.0 - ratio) ** 2 + (1.0 - share) * ratio ** 2)
    return m / np.maximum(m - 1.0, 1.0) * np.maximum(second - mean ** 2, 0.0)


def _smoothed_ratio(num: np.ndarray, den: np.ndarray, m: np.ndarray, big_n: np.ndarray,
                    allowance: float = SMOOTHING) -> tuple[np.ndarray, np.ndarray]:
    """Smoothed ratio and its linearised variance, per column of the (strata, k) label counts.

    ``den`` counts the labelled pairs of the domain (predicted matches for precision, matches
    for recall) in each stratum and ``num`` those of them that are right. Where a stratum's
    labelled domain pairs are all of one kind (no error, or nothing right), its share
    p_h = num / den gets the allowance (num + a) / (den + 2 a), a = ``allowance``, as if a
    fraction of one pair of the unseen kind had been labelled; the stratum then keeps whichever
    of the two variances is larger, so the allowance does not narrow its share. R, the ratio
    recomputed from the allowed shares, is the linearisation point: with z = right - R in_domain
    per pair, var = sum_h N_h^2 (1 - m_h / N_h) s_h^2 / m_h / D^2, s_h^2 the variance of z
    within stratum h and D the estimated domain total. Strata with one label add nothing:
    their variance cannot be estimated.
    """
    weight = (big_n / m)[:, None]
    total = (weight * den).sum(axis=0)
    seen = den > 0
    share = np.divide(num, den, out=np.zeros_like(num), where=seen)
    one_kind = seen & ((num == 0) | (num == den))
    allowed = np.divide(num + allowance, den + 2.0 * allowance, out=share.copy(), where=one_kind)
    ratio = np.divide((weight * den * allowed).sum(axis=0), total, out=np.zeros_like(total),
                      where=total > 0)
    q, m_col = den / m[:, None], m[:, None]
    s2 = np.maximum(_z_variance(share, q, ratio, m_col), _z_variance(allowed, q, ratio, m_col))
    s2 = np.where(m_col >= 2, s2, 0.0)
    per_stratum = (big_n ** 2 * (1.0 - m / big_n) / m)[:, None] * s2
    var = np.divide(per_stratum.sum(axis=0), total ** 2, out=np.zeros_like(total),
                    where=total > 0)
    return ratio, var


def _korn_graubard(num: float, den: float, smoothed: float, var: float, confidence: float,
                   domain_weights: np.ndarray) -> Interval:
    """Clopper–Pearson at the effective sample size p~ (1 - p~) / var around the HT ratio.

    ``smoothed`` (p~) and ``var`` come from ``_smoothed_ratio``; thanks to the smoothing they
    stay informative when the sample shows no error at all (HT ratio 0 or 1). Should the
    variance still be nil (every domain stratum a census or a single label) the Kish effective
    size of the pairs in the denominator stands in. The effective size is capped at the
    estimated number of pairs in the denominator.
    """
    if not den > 0:
        return Interval(None, None, None, KORN_GRAUBARD)
    p = float(num / den)
    spread = smoothed * (1.0 - smoothed)
    n_eff = spread / var if var > 0 and spread > 0 else _kish(domain_weights)
    n_eff = min(n_eff, float(den))
    return Interval(p, *clopper_pearson(p * n_eff, n_eff, confidence), KORN_GRAUBARD)


def _design_note(sample: AuditSample, confidence: float) -> list[str]:
    notes = []
    labelled = sample.labelled_counts()
    missing = sorted((h for h, n in sample.stratum_sizes.items() if n and h not in labelled),
                     key=str)
    if missing:
        left_out = sum(sample.stratum_sizes[h] for h in missing)
        notes.append(f"strata {missing} ({left_out} pairs) have no labels and are left out")
    drawn = sum(sample.drawn[h] for h in labelled)
    if sample.n_labelled < drawn:
        notes.append(f"{sample.n_labelled} of {drawn} drawn audit pairs labelled; the rest are "
                     "taken as missing at random within their stratum")
    single = sorted((h for h, m in labelled.items() if m == 1 and sample.stratum_sizes[h] > 1),
                    key=str)
    if single:
        notes.append(f"strata {single} have one label each: their variance is not estimated")
    # a stratum whose labels hold no match adds no variance, yet matches may hide in it
    no_match = sorted((h for h, m in labelled.items() if sample.stratum_sizes[h] > m
                       and not sample.label[sample.stratum == h].any()), key=str)
    if no_match:
        hidden = sum(sample.stratum_sizes[h] * clopper_pearson(0, labelled[h], confidence)[1]
                     for h in no_match)
        notes.append(f"no labelled match in strata {no_match}: their matches count as 0, though "
                     f"up to {hidden:.0f} could hide there ({confidence:.0%} bound per stratum)")
    return notes


def threshold_table(
    sample: AuditSample,
    thresholds: Iterable[float],
    confidence: float = 0.95,
    n_boot: int = 2000,
    seed: int = 0,
) -> list[QualityEstimate]:
    """``estimate_at`` for each threshold, all from the same bootstrap replicates."""
    ts = [float(t) for t in thresholds]
    if not ts:
        return []
    if sample.n_labelled == 0:
        raise ValueError("the audit slice has no labelled pairs yet")
    if n_boot < 2:
        raise ValueError("n_boot must be at least 2")
    values = _columns(sample, ts)
    w = sample.weights()
    point = w @ values
    reps = _replicate_totals(sample, values, n_boot, seed)
    m_h, big_n, sums = _stratum_totals(sample, values)
    tp_h = sums[:, 0::3]
    p_smooth, p_var = _smoothed_ratio(tp_h, sums[:, 1::3], m_h, big_n)
    r_smooth, r_var = _smoothed_ratio(tp_h, sums[:, 2::3], m_h, big_n)
    self_weighting = sample.is_self_weighting()
    raw = values.sum(axis=0)  # unweighted counts, for Wilson when the design is self-weighting
    n_pairs = sum(sample.stratum_sizes[h] for h in sample.labelled_counts())
    design = _design_note(sample, confidence)
    alpha = 1.0 - confidence
    result = []
    for k, t in enumerate(ts):
        tp, pp, m = (float(v) for v in point[3 * k: 3 * k + 3])
        r_tp, r_pp, r_m = (reps[:, 3 * k + j] for j in range(3))
        if self_weighting:
            x_tp, x_pp, x_m = raw[3 * k: 3 * k + 3]
            precision = _wilson(x_tp, x_pp, confidence)
            recall = _wilson(x_tp, x_m, confidence)
        else:
            predicted = values[:, 3 * k + 1] > 0
            precision = _korn_graubard(tp, pp, p_smooth[k], p_var[k], confidence, w[predicted])
            recall = _korn_graubard(tp, m, r_smooth[k], r_var[k], confidence,
                                    w[sample.label == 1])
        notes = list(design)
        if precision.value is None:
            notes.append("no labelled pair scores at or above the threshold: precision undefined")
        if recall.value is None:
            notes.append("no labelled match: recall undefined")
        m_low, m_high = np.quantile(r_m, [alpha / 2.0, 1.0 - alpha / 2.0])
        result.append(QualityEstimate(
            threshold=t,
            precision=precision,
            recall=recall,
            f1=_percentile(2 * tp, pp + m, 2 * r_tp, r_pp + r_m, confidence),
            true_matches=Interval(m, float(m_low), float(m_high), BOOTSTRAP),
            predicted_positives=pp,
            true_positives=tp,
            n_labelled=sample.n_labelled,
            n_pairs=int(n_pairs),
            confidence=confidence,
            method=WILSON if self_weighting else KORN_GRAUBARD,
            note="; ".join(notes),
        ))
    return result


def estimate_at(
    sample: AuditSample,
    threshold: float,
    confidence: float = 0.95,
    n_boot: int = 2000,
    seed: int = 0,
) -> QualityEstimate:
    """Design-based precision, recall and F1 of "score >= threshold" over all candidate pairs.

    Point estimates are ratios of Horvitz–Thompson totals (weights N_h / m_h, see
    ``AuditSample``). Precision and recall carry Korn–Graubard intervals on the linearised
    variance with the zero-count allowance (``method`` "smoothed-korn-graubard", see the
    module notes); they need no replicates. F1 and the total of true matches carry percentile
    intervals ("stratified-bootstrap") from ``n_boot`` replicates drawn from ``seed``, so the
    same call gives the same answer. When the design is self-weighting, precision and recall
    carry the Wilson interval on the plain counts instead (``method`` "wilson"). Each interval
    names its own method.
    """
    return threshold_table(sample, [threshold], confidence, n_boot, seed)[0]


def suggest_threshold(
    sample: AuditSample,
    target_precision: float | None = None,
    target_recall: float | None = None,
) -> float | None:
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


def naive_estimate(
    probabilities: Sequence[float] | np.ndarray,
    labels: Sequence[int] | np.ndarray,
    threshold: float,
    confidence: float = 0.95,
) -> QualityEstimate:
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
        note="unweighted, from every label: queue-chosen labels over-represent uncertain pairs, "
             "so this describes the labelled pairs, not the candidate pairs",
    )

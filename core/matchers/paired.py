"""Paired differences between two matchers judged on the same audit pairs.

Each matcher is judged as ``docket evaluate`` judges the model (``quality.known_domains``):
its prediction is known for every candidate pair, so within stratum h its PP_h predicted
matches and its N_h - PP_h other pairs are counted, and the labelled audit pairs give the share
of matches in each (p_h among the labelled predicted ones, r_h among the others). Then
T = sum PP_h p_h (true positives), F = sum (N_h - PP_h) r_h (missed matches), precision T / PP,
recall T / (T + F) and F1 2 T / (T + PP + F). Counting PP_h matters: a matcher's scattered
false positives among the tens of thousands of near-certain non-matches of the bottom stratum,
estimated from the dozen of them the audit slice happens to hold, swing the estimate and skew
the ratio far more than its interval allows.

Two matchers are judged on the very same pairs, so their estimates are correlated and the
variance of the difference is not the sum of the two variances. Linearised (Taylor) variance of
D = R_A - R_B: a labelled pair i of stratum h that a matcher predicts a match carries
u_i = (m_h / N_h) (PP_h / a_h) (y_i - p_h) for T (a_h of the m_h labelled pairs are predicted
matches; u_i = 0 otherwise), the others carry v_i likewise for F; the figures' linearised
variables are u / PP (precision), (F u - T v) / M^2 (recall, M = T + F) and
2 ((PP + F) u - T v) / D^2 (F1, D = T + PP + F). With d the first matcher's minus the second's,
var(D) = sum_h N_h^2 (1 - m_h / N_h) s_h^2(d) / m_h (s_h^2 the sample variance of d within
stratum h): the stratified SRS variance of a total applied to the linearised variable. Source:
common practice (design-based survey estimation, linearisation of a ratio estimator, domains of
known size); the interval is D +/- z sqrt(var(D)).

Zero counts. A domain whose labels show one kind only (no false positive among a matcher's
labelled predicted matches, say) adds no variance, though errors may hide among its unlabelled
pairs; as in ``quality.known_domains`` it is allowed half a pair of the other kind for its
variance (see ``difference_variance``). Measured on DBLP-ACM (bench/matchers_coverage.py) this
makes the precision and F1 intervals conservative, the recall ones near their stated rate.

Unseen domains. Where a matcher predicts matches in a stratum but none of them is labelled (or
the reverse), the share there is unknown: the point counts it at the pooled share of the
labelled domains, as ``evaluate`` does, and the interval is widened to take in the intervals
with the first matcher's unseen pairs all wrong and the second's all right, and the reverse.

Two matchers that predict alike on every candidate pair get a difference of exactly 0 with no
spread: the sample cannot tell them apart, and the verdict says no difference is shown.
"""

from __future__ import annotations

from collections.abc import Hashable
from dataclasses import asdict, dataclass
from typing import Any

import numpy as np

from ..intervals import z_value
from ..quality.audit_sample import AuditSample

MEASURES = ("precision", "recall", "f1")
# as the tables head them: a verdict said 'no difference in f1' under a column headed F1
MEASURE_NAMES = {"precision": "precision", "recall": "recall", "f1": "F1"}
METHOD = ("linearised variance of the difference of two ratio estimators (stratified, each "
          "matcher's predicted matches counted per stratum)")
SMOOTHING = 0.5  # pseudo-count of each unseen kind in a domain, as in quality.known_domains
POOLED, WRONG, RIGHT = "pooled", "wrong", "right"  # what an unseen domain's share is taken as


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


def predicted_counts(sample: AuditSample) -> dict[Hashable, float]:
    """PP_h of a sample scored 1.0 / 0.0 by a matcher, from its ``population``; where the
    project keeps a sample of a stratum's pairs (a sampled build), scaled up to N_h."""
    if sample.population is None:
        raise ValueError("a paired difference needs each matcher's predictions over every "
                         "candidate pair (the sample's population)")
    return {h: float(np.sum(v >= 0.5)) * sample.stratum_sizes.get(h, v.size) / max(v.size, 1)
            for h, v in sample.population.items()}


def _domains(sample: AuditSample) -> list[tuple[float, np.ndarray, float, np.ndarray]]:
    """Per stratum: (PP_h, labelled predicted positions, N_h - PP_h, labelled other ones)."""
    counts = predicted_counts(sample)
    pred = sample.score >= 0.5
    out = []
    for h, idx in sample.stratum_index().items():
        pp = counts.get(h, 0.0)
        out.append((pp, idx[pred[idx]], sample.stratum_sizes[h] - pp, idx[~pred[idx]]))
    return out


def _pooled(parts: list[tuple[float, np.ndarray]], y: np.ndarray) -> float:
    seen = [(size, at) for size, at in parts if at.size]
    total = sum(size for size, _ in seen)
    return sum(size * float(y[at].mean()) for size, at in seen) / total if total else 0.5


@dataclass(frozen=True)
class _Totals:
    """One matcher on the sample: PP, T, F and, per labelled pair, whether it is a predicted
    match, the scale m_h / N_h * size / labelled of its domain, the domain's share of matches,
    and the weight of its half-pair allowance (0 where its domain shows both kinds)."""

    pp: float
    t: float
    f: float
    pred: np.ndarray
    scale: np.ndarray
    share: np.ndarray
    allow: np.ndarray


def _totals(sample: AuditSample, fill: str) -> _Totals:
    y = (sample.label == 1).astype(float)
    domains = _domains(sample)
    shares = {POOLED: (_pooled([(d[0], d[1]) for d in domains], y),
                       _pooled([(d[2], d[3]) for d in domains], y)),
              WRONG: (0.0, 1.0), RIGHT: (1.0, 0.0)}[fill]
    scale, share, allow = np.zeros(y.size), np.zeros(y.size), np.zeros(y.size)
    total = [0.0, 0.0]
    for (h, idx), (pp, at_p, rest, at_o) in zip(sample.stratum_index().items(), domains,
                                                strict=True):
        # as in evaluate: the other pairs of a stratum whose labels hold no match get none
        any_match = bool(y[idx].any())
        for side, (size, at) in enumerate(((pp, at_p), (rest, at_o))):
            p = float(y[at].mean()) if at.size else shares[side]
            total[side] += size * p
            scale[at], share[at] = idx.size / sample.stratum_sizes[h] * size / max(at.size, 1), p
            if at.size and size > at.size and p in (0.0, 1.0) and (side == 0 or any_match):
                allow[at] = SMOOTHING / at.size
    return _Totals(float(sum(d[0] for d in domains)), total[0], total[1], sample.score >= 0.5,
                   scale, share, allow)


@dataclass(frozen=True)
class _Figure:
    """A figure and its linearised variable as a function of a labelled pair's answer:
    gain * (y - share) (``gain`` holds the derivative of the figure by each domain total)."""

    value: float
    gain: np.ndarray
    share: np.ndarray
    allow: np.ndarray

    def at(self, y: np.ndarray) -> np.ndarray:
        return self.gain * (y - self.share)


def _figure(sample: AuditSample, measure: str, fill: str) -> _Figure | None:
    """The figure with its linearised variable; None where undefined."""
    s = _totals(sample, fill)
    if measure == "precision":
        value, by_t, by_f = (s.t / s.pp, 1.0 / s.pp, 0.0) if s.pp > 0 else (None, 0.0, 0.0)
    elif measure == "recall":
        m = s.t + s.f
        value, by_t, by_f = (s.t / m, s.f / m ** 2, -s.t / m ** 2) if m > 0 else (None, 0, 0)
    else:
        d = s.t + s.pp + s.f
        value, by_t, by_f = ((2 * s.t / d, 2 * (s.pp + s.f) / d ** 2, -2 * s.t / d ** 2)
                             if d > 0 else (None, 0.0, 0.0))
    if value is None:
        return None
    return _Figure(value, s.scale * np.where(s.pred, by_t, by_f), s.share, s.allow)


def _weighted_var(z: np.ndarray, freq: np.ndarray, m: int) -> float:
    """Variance of z over rows counted ``freq`` times, as an unbiased estimate from ``m`` real
    pairs: the half pairs shift the shares, not the number of pairs the spread rests on."""
    mean = float(freq @ z) / float(freq.sum())
    return float(freq @ (z - mean) ** 2) / float(freq.sum()) * m / (m - 1.0)


def difference_variance(sample: AuditSample, a: _Figure, b: _Figure) -> float:
    """Stratified SRS variance of the linearised difference, with the add-half allowance of
    ``quality.known_domains``: a stratum where a matcher has a domain whose labels show one
    kind only also gets, for each of that domain's pairs, the pair with the other answer,
    weighing half a pair in all, and keeps the larger of the two variances. The other answer
    counts for each matcher whose domain of that pair shows one kind only (for the other, the
    pair stays as labelled: its domain there shows both kinds or is not allowed any), so two
    matchers that predict alike still cancel."""
    y = (sample.label == 1).astype(float)
    real = a.at(y) - b.at(y)
    flip = a.at(np.where(a.allow > 0, 1.0 - y, y)) - b.at(np.where(b.allow > 0, 1.0 - y, y))
    freq = np.maximum(a.allow, b.allow)
    var = 0.0
    for h, idx in sample.stratum_index().items():
        big_n, m_h = sample.stratum_sizes[h], idx.size
        if m_h < 2 or big_n <= m_h:
            continue  # one label: no spread to go by; a census: no sampling error
        ones = np.ones(m_h)
        s2 = _weighted_var(real[idx], ones, m_h)
        if freq[idx].any():
            s2 = max(s2, _weighted_var(np.concatenate([real[idx], flip[idx]]),
                                       np.concatenate([ones, freq[idx]]), m_h))
        var += big_n ** 2 * (1.0 - m_h / big_n) * s2 / m_h
    return var


def _unseen(sample: AuditSample) -> bool:
    return any((pp > 0 and not at_p.size) or (rest > 0 and not at_o.size)
               for pp, at_p, rest, at_o in _domains(sample))


def _interval(first: AuditSample, second: AuditSample, measure: str, fill_first: str,
              fill_second: str, confidence: float) -> tuple[float, float, float] | None:
    a, b = _figure(first, measure, fill_first), _figure(second, measure, fill_second)
    if a is None or b is None:
        return None
    diff = a.value - b.value
    half = z_value(confidence) * float(np.sqrt(difference_variance(first, a, b)))
    return diff, diff - half, diff + half


def paired_difference(first_sample: AuditSample, first: str, second_sample: AuditSample,
                      second: str, measure: str, confidence: float = 0.95) -> PairedDifference:
    """``measure`` of ``first`` minus that of ``second``. Each sample is the same audit sample
    scored 1.0 / 0.0 by that matcher's predictions, with its predictions over every candidate
    pair as the population (``Judged.sample_for``)."""
    if measure not in MEASURES:
        raise ValueError(f"measure must be one of {MEASURES}")
    if not first_sample.same_design(second_sample):
        raise ValueError("the two matchers must be judged on the same audit pairs")
    split = int(np.sum((first_sample.score >= 0.5) != (second_sample.score >= 0.5)))
    point = _interval(first_sample, second_sample, measure, POOLED, POOLED, confidence)
    if point is None:
        return PairedDifference(
            first, second, measure, None, None, None, split,
            f"{MEASURE_NAMES[measure]} undefined for one of them on the audit slice")
    diff, low, high = point
    if _unseen(first_sample) or _unseen(second_sample):
        for fills in ((WRONG, RIGHT), (RIGHT, WRONG)):
            bound = _interval(first_sample, second_sample, measure, *fills, confidence)
            if bound is not None:
                low, high = min(low, bound[1]), max(high, bound[2])
    said = MEASURE_NAMES[measure]
    if low > 0:
        verdict = f"{first} has the higher {said}"
    elif high < 0:
        verdict = f"{second} has the higher {said}"
    else:
        verdict = f"no difference in {said} shown at {confidence:.0%}"
    return PairedDifference(first, second, measure, diff, low, high, split, verdict)

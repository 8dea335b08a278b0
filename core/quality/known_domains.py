"""Precision, recall and F1 when every candidate pair's score is known, so that the predicted
matches of each stratum are counted, not estimated (``AuditSample.population``).

Within stratum h the PP_h predicted matches and the N_h - PP_h other pairs are two domains of
known size, each sampled at random by the audit slice: T = sum PP_h p_h (p_h the share of
matches among the labelled predicted pairs) and F = sum (N_h - PP_h) r_h (r_h among the labelled
others), so precision = T / PP, recall = T / (T + F), F1 = 2 T / (T + PP + F), with the
delta-method variance from var T and var F (independent: disjoint labels), and the Korn–Graubard
interval at the effective sample size (see ``estimates``). A domain whose labels show one kind
only gets the add-half allowance for its variance.

Few labels in a domain. The figure's uncertainty often rests on one small domain: on DBLP-ACM,
the ~10 labelled pairs among the 243 pairs of the top stratum that the refit model scores below
0.9, half of them matches. Two things then made the recall interval too short above (it held the
truth in 0.927 of 300 seeded slices, missing high in 0.063): a variance estimated from ten pairs
is itself uncertain, and the Clopper–Pearson shape of a figure near 1 is skewed downwards while
the error, coming from a share near one half, is not. So each domain's variance is scaled by
(t_{n-1} / z)^2 (never past the variance whose normal interval spans the share's whole range),
and the interval is never shorter on either side than the normal one on the same variance
(0.967 of the same 300 slices, half-width 0.043 against 0.035; common practice, the pairing of
the two named from memory).

One kind seen. A domain whose labels show one kind only (32 labelled predicted matches, all
matches) may still hold a few per cent of the other: on DBLP-ACM an outside matcher's top
stratum held 5 % false matches, its 32 labels none in a fifth of the slices, and precision at
0.9 held the truth in 0.900 of 200 (the truth below the interval each time). The add-half
allowance is too small there, and symmetric where the risk is not: the unseen kind can only
move the share one way. So that side alone gets the variance whose normal interval reaches the
Jeffreys upper bound of the unseen kind's share (Brown, Cai & DasGupta 2001), carried through
to each figure on the side it moves it (precision, recall and F1 all fall with unseen false
matches among the predicted and with unseen missed matches among the others). Same 200 slices:
1.000, width unchanged (0.263); the other side of every interval is as before.

Both kinds seen, share far from one half. A share estimated at 17 of 19 where the truth is
0.71 (the refit model's pairs of its second-highest stratum that it scores below 0.9) makes its
own variance too small on the side towards one half: recall at 0.9 with the whole slice held
the truth in 0.935 of 200 slices, every miss with the truth above the interval. So each side of
such a domain also gets what it takes for its normal interval to reach that side of the Wilson
interval of x of n (Wilson 1927), carried through as above: 0.980 of the same slices, width
0.058 against 0.056.

No match seen. A stratum whose labels hold no match at all (most often the lowest, tens of
thousands of pairs the model scores below 0.01) counted its missed matches as exactly 0, with
no variance: on the invented people the default slice draws about 480 of its 32,774 pairs,
which hide 13 matches, and the recall interval at 0.2 held the truth in 0.735 of 200 slices
(every miss with the truth below it); on DBLP-ACM's label-free model with 200 audit labels in
0.385. Labels that show no match among n of N pairs rule out few: the share of missed matches
among them gets, on the side that lowers recall and F1 only, the variance of half a match in
n + 1 (add-half, the posterior mean under the Jeffreys prior; Brown, Cai & DasGupta 2001), and
that side is worked out through the figure itself (T / (T + F + z sd), not the linearised
T^2 var / M^4, which overstates a large allowance). The point still counts them as 0. Same 200
slices: 1.000 and 1.000; the people's recall width at 0.2 0.014 -> 0.047. With 50 labels the
recall intervals are 0.5-0.7 wide: 50 labels say little about tens of thousands of pairs
(bench/estimate_bias.py; DEVELOPERS.md, "Audit labels scored by fits without them").

Unseen domains. A domain with pairs but no labelled pair (predicted matches in a stratum whose
labels hold none, say) has a share the labels cannot estimate. Its point counts predicted
matches at the precision of the 20 labelled predicted pairs nearest in score to the domain's
median (design-weighted), other pairs at the share of the strata that have labels (pooled).
Pooled, the predicted matches read high: after a refit on 400 audit labels of the invented
people about 215 pairs of the lowest label-free stratum score 0.2 or more and none is labelled,
and precision at 0.2 read +0.033 high over 12 seeds (seed 7: 0.923, truth 0.851; priced by
score: 0.864). The interval does not pretend to know more: its
lower bound is that of the figures with every unseen pair wrong (predicted ones non-matches,
others missed matches), its upper bound that with every one right: bounds, as for holds.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..intervals import beta_quantile, clopper_pearson, wilson, z_value
from .audit_sample import AuditSample, Interval

LINEARISED = "linearised-korn-graubard"
SMOOTHING = 0.5


def _share(x: float, n: int, big: int, seen_kind: bool, confidence: float,
           a: float = SMOOTHING) -> tuple[float, float, float, float, float]:
    """Share x / n of one domain of a stratum (n labelled of ``big`` pairs): the point, the
    share for the spread, the variance of big times the share (NaN point: no label), and the
    variance to add below and above for a kind the labels do not show.

    Where the labels show one kind only (and ``seen_kind`` allows it), the variance is the
    larger of the plain and the add-half one, and the side the unseen kind would move the
    share to gets what it takes for the normal interval to reach the Jeffreys bound of the
    unseen kind's share (see the module notes). Where they show both, the variance is itself
    estimated from the n labels, so it is scaled by (t_{n-1} / z)^2, as a t interval would be
    for a share measured on few pairs, but never past the variance whose normal interval spans
    the whole range of the share (0 to 1) or the plain one, whichever is larger; and each side
    gets what it takes to reach that side of the Wilson interval. Where the stratum's labels
    hold no match at all (``seen_kind`` false), a share of missed matches at 0 gets the
    add-half variance above it.
    """
    if big == 0:
        return 0.0, 0.0, 0.0, 0.0, 0.0
    if n == 0:
        return math.nan, math.nan, 0.0, 0.0, 0.0
    p = x / n
    fpc = 1.0 - n / big
    var = big ** 2 * fpc * (p * (1.0 - p) * n / max(n - 1, 1)) / n
    smooth, down, up = p, 0.0, 0.0
    if seen_kind and (x == 0 or x == n) and big > n:
        smooth = (x + a) / (n + 2.0 * a)
        var = max(var, big ** 2 * fpc * smooth * (1.0 - smooth) / max(n - 1, 1))
        extra = max(0.0, fpc * (big * unseen_share(n, confidence) / z_value(confidence)) ** 2
                    - var)
        down, up = (extra, 0.0) if x == n else (0.0, extra)
    elif x == 0 and big > n:
        # no labelled match in the stratum at all: half a match's worth above, not nothing
        # (see "No match seen" in the module notes)
        smooth_up = a / (n + 2.0 * a)
        up = max(0.0, big ** 2 * fpc * smooth_up * (1.0 - smooth_up) / max(n - 1, 1) - var)
    elif 0 < x < n and n >= 2:
        whole_range = (big * max(p, 1.0 - p) / z_value(confidence)) ** 2
        var = min(var * t_ratio(n - 1, confidence), max(var, whole_range))
        low, high = wilson(x, n, confidence)
        z = z_value(confidence)
        down = max(0.0, fpc * (big * (p - low) / z) ** 2 - var)
        up = max(0.0, fpc * (big * (high - p) / z) ** 2 - var)
    return p, smooth, var, down, up


def unseen_share(n: int, confidence: float) -> float:
    """How large the share of a kind not seen among n labelled pairs may be: the Jeffreys
    upper bound for 0 of n (Brown, Cai & DasGupta 2001, Statistical Science 16(2))."""
    return beta_quantile(0.5 + confidence / 2.0, 0.5, n + 0.5)


def t_ratio(df: int, confidence: float) -> float:
    """(t_df / z)^2 at the two-sided ``confidence`` (Student 1908; common practice)."""
    from scipy.stats import t as student  # imported on first use (the review screen never needs it)

    return float((student.ppf(0.5 + confidence / 2.0, df) / z_value(confidence)) ** 2)


def _korn_graubard(point: float, spread_at: float, var: float, cap: float,
                   confidence: float, sides: tuple[float, float] = (0.0, 0.0)) -> Interval:
    spread = spread_at * (1.0 - spread_at)
    n_eff = spread / var if var > 0 and spread > 0 else cap
    n_eff = max(min(n_eff, cap), 1e-9)
    low, high = clopper_pearson(point * n_eff, n_eff, confidence)
    z = z_value(confidence)
    # never narrower on either side than the plain normal interval, with what an unseen kind
    # adds on its side
    if var + sides[0] > 0:
        low = min(low, max(0.0, point - z * math.sqrt(var + sides[0])))
    if var + sides[1] > 0:
        high = max(high, min(1.0, point + z * math.sqrt(var + sides[1])))
    return Interval(point, low, high, LINEARISED)


@dataclass(frozen=True)
class _Domain:
    size: int
    point: float  # NaN: no labelled pair
    spread: float
    var: float
    down: float = 0.0  # variance added below for a kind the labels do not show
    up: float = 0.0  # and above


def _moved(figure: Callable[[float], float], var_up: float, z: float) -> float:
    """The variance whose normal half-width is what F's allowance above, added to F whole,
    takes off ``figure`` (of the extra missed matches): recall T / (T + F) and F1 fall ever
    more slowly as F grows, so the linearised T^2 var / M^4 overstated a large allowance (the
    sample with 160 audit labels: recall's lower end 0.07, where T / (T + F + z sd) is 0.52).
    Equal to it for a small one."""
    if not var_up > 0:
        return 0.0
    return ((figure(0.0) - figure(z * math.sqrt(var_up))) / z) ** 2


def _figures(parts: list[tuple[_Domain, _Domain]], fill_p: float, fill_r: float,
             big_pp: float, confidence: float) -> tuple[Interval, Interval, Interval, float,
                                                        float, float]:
    """The three figures with unseen domains at the shares given (fixed: no variance)."""
    big_t = big_f = var_t = var_f = sm_t = sm_f = 0.0
    t_dn = t_up = f_dn = f_up = 0.0
    for pred, other in parts:
        p, ps = (fill_p, fill_p) if math.isnan(pred.point) else (pred.point, pred.spread)
        r, rs = (fill_r, fill_r) if math.isnan(other.point) else (other.point, other.spread)
        big_t, sm_t, var_t = big_t + pred.size * p, sm_t + pred.size * ps, var_t + pred.var
        big_f, sm_f, var_f = big_f + other.size * r, sm_f + other.size * rs, var_f + other.var
        t_dn, t_up, f_dn, f_up = t_dn + pred.down, t_up + pred.up, f_dn + other.down, \
            f_up + other.up
    nothing = Interval(None, None, None, LINEARISED)
    precision = nothing if big_pp == 0 else _korn_graubard(
        big_t / big_pp, sm_t / big_pp, var_t / big_pp ** 2, big_pp, confidence,
        (t_dn / big_pp ** 2, t_up / big_pp ** 2))

    def both(dt: float, df: float, a: float, b: float) -> float:  # added to var of a T + b F
        return a ** 2 * dt + b ** 2 * df

    m = big_t + big_f
    z = z_value(confidence)
    # recall and F1 rise with T and fall with F: their low side takes T's down and F's up
    recall = nothing if m <= 0 else _korn_graubard(
        big_t / m, sm_t / max(sm_t + sm_f, 1e-300),
        (big_f ** 2 * var_t + big_t ** 2 * var_f) / m ** 4, m, confidence,
        (big_f ** 2 * t_dn / m ** 4 + _moved(lambda e: big_t / (m + e), f_up, z),
         both(t_up, f_dn, big_f, big_t) / m ** 4))
    d = big_t + big_pp + big_f
    ga, gb = 2 * (big_pp + big_f), 2 * big_t
    f1 = nothing if d <= 0 else _korn_graubard(
        2 * big_t / d, 2 * sm_t / max(sm_t + big_pp + sm_f, 1e-300),
        (ga ** 2 * var_t + gb ** 2 * var_f) / d ** 4, d / 2.0, confidence,
        (ga ** 2 * t_dn / d ** 4 + _moved(lambda e: 2 * big_t / (d + e), f_up, z),
         both(t_up, f_dn, ga, gb) / d ** 4))
    return precision, recall, f1, big_t, m, var_t + var_f


def _outer(point: Interval, worst: Interval, best: Interval) -> Interval:
    if point.value is None or worst.low is None or best.high is None:
        return point
    return Interval(point.value, min(worst.low, point.value), max(best.high, point.value),
                    point.method)


LIKE = 20  # labelled predicted pairs nearest in score that price an unseen domain


def _like_scored(sample: AuditSample, h: object, t: float, cells: np.ndarray,
                 pred: _Domain) -> _Domain:
    """An unseen domain of predicted matches priced at the precision of the LIKE labelled
    predicted pairs nearest in score to its median (design-weighted), not of all of them: a
    refit lifts pairs of the lowest stratum just over a low threshold, where precision is
    lower than among the strata's sure matches (see the module notes)."""
    scores = sample.population[h] if sample.population is not None else np.zeros(0)
    mine = scores[scores >= t]
    labelled = np.flatnonzero(sample.score >= t)
    if not mine.size or not labelled.size:
        return pred
    near = labelled[np.argsort(np.abs(sample.score[labelled] - np.median(mine)),
                               kind="stable")[:LIKE]]
    w = sample.weights()[near]
    share = float(w @ cells[near, 0] / w.sum())
    return _Domain(pred.size, share, share, 0.0)


def known_domains(sample: AuditSample, t: float, cells: np.ndarray, confidence: float
                  ) -> tuple[Interval, Interval, Interval, Interval, float, float]:
    """Precision, recall, F1, true matches, predicted matches and true positives at ``t``."""
    counts = sample.predicted_counts(t) or {}
    parts = []
    for h, idx in sample.stratum_index().items():
        pp_h, rest = counts.get(h, 0), sample.stratum_sizes[h] - counts.get(h, 0)
        tp, fp, fn = cells[idx].sum(axis=0)
        a_h, b_h = int(tp + fp), idx.size - int(tp + fp)
        parts.append((_Domain(pp_h, *_share(tp, a_h, pp_h, True, confidence)),
                      _Domain(rest, *_share(fn, b_h, rest, tp + fn > 0, confidence))))

    def pooled(side: int) -> float:  # 0: the predicted matches, 1: the other pairs
        seen = [d[side] for d in parts if not math.isnan(d[side].point)]
        total = sum(d.size for d in seen)
        return sum(d.size * d.point for d in seen) / total if total else 0.5

    big_pp = float(sum(counts.get(h, 0) for h in sample.labelled_counts()))
    point_parts = [(_like_scored(sample, h, t, cells, pred), other) if math.isnan(pred.point)
                   and pred.size else (pred, other)
                   for h, (pred, other) in zip(sample.stratum_index(), parts, strict=True)]
    precision, recall, f1, big_t, m, var = _figures(point_parts, pooled(0), pooled(1), big_pp,
                                                    confidence)
    if any(math.isnan(d.point) and d.size for pair in parts for d in pair):
        worst = _figures(parts, 0.0, 1.0, big_pp, confidence)
        best = _figures(parts, 1.0, 0.0, big_pp, confidence)
        precision, recall, f1 = (_outer(v, w, b) for v, w, b in
                                 zip((precision, recall, f1), worst[:3], best[:3], strict=True))
    half = z_value(confidence) * var ** 0.5
    found = float(sample.label.sum())
    matches = Interval(m, max(found, m - half), m + half, "linearised-wald")
    return precision, recall, f1, matches, big_pp, big_t

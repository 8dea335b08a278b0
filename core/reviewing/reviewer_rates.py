"""Each reviewer's sensitivity and specificity from the Dawid–Skene model, where the data can
tell them apart, with intervals from a bootstrap over pairs.

Identification. With two reviewers the two-class model has more parameters than their joint
table has free cells: any fit is one of many that explain the labels equally well. With three
reviewers who each share pairs with both others it is identified (the three two-way tables pin
each reviewer's error rates down). So the rates are reported only when some three reviewers
share at least ``MIN_SHARED`` pairs two by two; otherwise the summary says why not.

Holds are a third response of the two classes (a reviewer may hold a match or a non-match), so
``hold_rate`` per class is reported beside the rates; the classes stay match and non-match.

Intervals: percentile bootstrap over pairs (units resampled with replacement, EM restarted from
the fitted values), ``N_BOOT`` replicates, seeded, widened where needed to hold the Wilson
interval of the pairs each rate rests on (``_counted_bounds``). When few pairs carry two or
more labels the rates rest mostly on the model's assumptions, and the summary warns.
"""

from __future__ import annotations

from collections.abc import Hashable, Mapping
from dataclasses import dataclass
from itertools import combinations

import numpy as np

from ..intervals import wilson
from .dawid_skene import dawid_skene

CLASSES = ("match", "non-match")
MIN_SHARED = 10  # pairs two reviewers must share to count as overlapping
FEW_MULTI = 50  # fewer pairs than this with two or more labels: warn
N_BOOT = 100
SMOOTHING = 0.01


@dataclass(frozen=True)
class Rate:
    value: float
    low: float | None
    high: float | None


@dataclass(frozen=True)
class ReviewerRates:
    name: str
    labels: int
    sensitivity: Rate
    specificity: Rate
    hold_rate_match: float | None  # P(hold | match), when holds are responses
    hold_rate_non_match: float | None


@dataclass(frozen=True)
class RatesSummary:
    """The Dawid–Skene fit, or ``reason`` why none is shown."""

    identified: bool
    reason: str
    units: int
    units_rated_twice: int
    iterations: int
    converged: bool
    prior_match: float | None
    reviewers: tuple[ReviewerRates, ...]
    warning: str
    method: str
    posterior: Mapping[Hashable, float]  # pair -> P(match)


def _triangle(labels: Mapping[str, Mapping[int, str]]) -> tuple[str, ...] | None:
    shared = {(a, b): len(set(labels[a]) & set(labels[b])) for a, b in combinations(labels, 2)}
    for a, b, c in combinations(labels, 3):
        if min(shared[(a, b)], shared[(a, c)], shared[(b, c)]) >= MIN_SHARED:
            return (a, b, c)
    return None


def _encode(ratings: list[tuple[int, str, str]], responses: tuple[str, ...]
            ) -> tuple[tuple[np.ndarray, np.ndarray, np.ndarray], list[int], list[str]]:
    units: dict[int, int] = {}
    raters: dict[str, int] = {}
    cols: tuple[list[int], list[int], list[int]] = ([], [], [])
    index = {r: i for i, r in enumerate(responses)}
    for unit, rater, label in ratings:
        cols[0].append(units.setdefault(unit, len(units)))
        cols[1].append(raters.setdefault(rater, len(raters)))
        cols[2].append(index[label])
    obs = tuple(np.asarray(c, dtype=np.intp) for c in cols)
    return obs, list(units), list(raters)  # type: ignore[return-value]


def _bootstrap(obs: tuple[np.ndarray, np.ndarray, np.ndarray], n_units: int, n_raters: int,
               n_resp: int, priors: np.ndarray, theta: np.ndarray, n_boot: int,
               rng: np.random.Generator, rounds: int = 60, tol: float = 1e-4) -> np.ndarray:
    """EM on ``n_boot`` resamples of the pairs at once, each restarted from the fit."""
    from scipy import sparse

    unit, rater, label = obs
    n_obs = unit.size
    to_unit = sparse.csr_matrix((np.ones(n_obs), (unit, np.arange(n_obs))),
                                shape=(n_units, n_obs))
    to_cell = sparse.csr_matrix((np.ones(n_obs), (np.arange(n_obs), rater * n_resp + label)),
                                shape=(n_obs, n_raters * n_resp))
    weight = rng.multinomial(n_units, np.full(n_units, 1.0 / n_units), size=n_boot)  # (B, U)
    pri = np.tile(priors, (n_boot, 1))
    th = np.tile(theta, (n_boot, 1, 1, 1))
    k = priors.size
    for _ in range(rounds):
        # E-step: log P(class) + sum of log P(label | class) over each unit's ratings
        per_obs = np.log(th[:, rater, :, label])  # (n_obs, B, k): advanced indices go first
        per_unit = (to_unit @ per_obs.reshape(n_obs, -1)).reshape(
            n_units, n_boot, k).transpose(1, 0, 2) + np.log(pri)[:, None, :]
        per_unit -= per_unit.max(axis=2, keepdims=True)
        post = np.exp(per_unit)
        post /= post.sum(axis=2, keepdims=True)
        wpost = post * weight[:, :, None]  # (B, U, k)
        new_pri = (wpost.sum(axis=1) + SMOOTHING) / (weight.sum(axis=1)[:, None] + k * SMOOTHING)
        on_obs = wpost[:, unit, :]  # (B, n_obs, k)
        counts = (to_cell.T @ on_obs.transpose(1, 0, 2).reshape(n_obs, -1)).reshape(
            n_raters, n_resp, n_boot, k).transpose(2, 0, 3, 1) + SMOOTHING
        new_th = counts / counts.sum(axis=3, keepdims=True)
        moved = max(float(np.abs(new_th - th).max()), float(np.abs(new_pri - pri).max()))
        pri, th = new_pri, new_th
        if moved <= tol:
            break
    return th


def _counted_bounds(obs: tuple[np.ndarray, np.ndarray, np.ndarray], post: np.ndarray,
                    n_raters: int, confidence: float) -> np.ndarray:
    """(rater, class, low/high): the Wilson interval of each rate from the pairs behind it.

    A rater's pairs of class k are counted by their posterior share of k, and those they gave
    k likewise. A rate near 1 gives every bootstrap resample a fit near 1 too, so the
    percentile interval alone held three reviewers' true 0.95 in 63 % of 40-pair samples; no
    interval may be narrower than the count of pairs it rests on allows.
    """
    unit, rater, label = obs
    out = np.zeros((n_raters, post.shape[1], 2))
    for k in range(post.shape[1]):
        n = np.bincount(rater, weights=post[unit, k], minlength=n_raters)
        x = np.bincount(rater, weights=post[unit, k] * (label == k), minlength=n_raters)
        for i in range(n_raters):
            out[i, k] = wilson(float(x[i]), float(n[i]), confidence)
    return out


def reviewer_rates(labels: Mapping[str, Mapping[int, str]], include_hold: bool,
                   n_boot: int = N_BOOT, seed: int = 0,
                   confidence: float = 0.95) -> RatesSummary | None:
    """Dawid–Skene rates per reviewer from reviewer -> pair -> label (see the module notes)."""
    responses = (*CLASSES, "hold") if include_hold else CLASSES
    ratings = [(pid, name, label) for name, given in labels.items()
               for pid, label in given.items() if label in responses]
    if not ratings:
        return None
    per_unit: dict[int, int] = {}
    for pid, _, _ in ratings:
        per_unit[pid] = per_unit.get(pid, 0) + 1
    multi = sum(v >= 2 for v in per_unit.values())
    method = (f"Dawid–Skene EM, two classes, responses {', '.join(responses)}; intervals: "
              f"percentile bootstrap over pairs, {n_boot} replicates, at least the Wilson "
              "interval of the pairs each rate rests on")
    triangle = _triangle(labels)
    if triangle is None:
        return RatesSummary(False, "not identified: needs three reviewers who share at least "
                            f"{MIN_SHARED} pairs two by two (with two reviewers many error "
                            "rates explain the labels equally well)", len(per_unit), multi, 0,
                            False, None, (), "", method, {})
    fit = dawid_skene(ratings, CLASSES, responses=responses, smoothing=SMOOTHING, tol=1e-6)
    obs, units, raters = _encode(ratings, responses)
    pos = {r: i for i, r in enumerate(raters)}
    theta = np.array([fit.confusion[r] for r in raters])
    priors = np.array([fit.priors[c] for c in CLASSES])
    boot = _bootstrap(obs, len(units), len(raters), len(responses), priors, theta, n_boot,
                      np.random.default_rng(seed))  # (n_boot, raters, classes, responses)
    alpha = 1.0 - confidence
    floor = _counted_bounds(obs, np.array([[fit.posteriors[u][c] for c in CLASSES]
                                           for u in units]), len(raters), confidence)

    def rate(i: int, k: int) -> Rate:
        lo, hi = np.quantile(boot[:, i, k, k], [alpha / 2, 1 - alpha / 2])
        return Rate(float(theta[i, k, k]), float(min(lo, floor[i, k, 0])),
                    float(max(hi, floor[i, k, 1])))

    counts = {name: len(given) for name, given in labels.items()}
    rows = tuple(ReviewerRates(
        name, counts.get(name, 0), rate(pos[name], 0), rate(pos[name], 1),
        float(theta[pos[name], 0, 2]) if include_hold else None,
        float(theta[pos[name], 1, 2]) if include_hold else None) for name in raters)
    warning = ""
    if multi < FEW_MULTI:
        carry = "1 pair carries" if multi == 1 else f"{multi} pairs carry"
        warning = (f"only {carry} two or more labels: the rates rest mostly on the "
                   "model's assumption that reviewers err independently")
    return RatesSummary(True, "", len(units), multi, fit.iterations, fit.converged,
                        fit.priors["match"], rows, warning, method,
                        {u: fit.posteriors[u]["match"] for u in units})

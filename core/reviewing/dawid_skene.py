"""Dawid & Skene (1979) latent-class model of reviewer error, fitted by EM.

Each unit has an unseen true class with prior probability pi_k; each reviewer r has a confusion
matrix theta_r[k, l] = P(r gives label l | true class k), and reviewers err independently
given the true class. EM alternates: posteriors of each unit's class given the labels (E-step),
then priors and confusion matrices from those posteriors (M-step). Unlike kappa, this says
*which* reviewer is reliable, and in which direction they err.

Pure numpy; ratings come in as plain (unit, reviewer, label) triples.
"""

from __future__ import annotations

import math
from collections.abc import Hashable, Iterable, Mapping, Sequence
from dataclasses import dataclass, fields
from typing import Any

import numpy as np

from .agreement import json_ready


@dataclass(frozen=True)
class DawidSkeneResult:
    """A fitted Dawid-Skene model.

    ``confusion[r][k][l]`` is P(reviewer r gives label categories[l] | true class
    categories[k]); each row sums to 1. With two categories ``sensitivity[r]`` is
    P(r says positive | positive) and ``specificity[r]`` P(r says the other | the other);
    with more categories both are None. ``labels`` holds each unit's most probable class (a
    tie goes to the category listed first).
    """

    categories: tuple[str, ...]
    positive: str | None
    priors: dict[str, float]
    confusion: dict[Hashable, list[list[float]]]
    sensitivity: dict[Hashable, float] | None
    specificity: dict[Hashable, float] | None
    posteriors: dict[Hashable, dict[str, float]]
    labels: dict[Hashable, str]
    iterations: int
    converged: bool
    log_likelihood: float

    def to_dict(self) -> dict[str, Any]:
        # Not dataclasses.asdict: it would deep-copy every posterior only to copy it again.
        return json_ready({f.name: getattr(self, f.name) for f in fields(self)})


def _m_step(
    post: np.ndarray, obs: tuple[np.ndarray, np.ndarray, np.ndarray], n_raters: int, s: float,
    unit_weight: np.ndarray,
) -> tuple[np.ndarray, np.ndarray]:
    unit, rater, label = obs
    k = post.shape[1]
    priors = (unit_weight @ post + s) / (unit_weight.sum() + k * s)
    counts = np.full((n_raters, k, k), s)
    cell = rater * k + label
    for true in range(k):
        counts[:, true, :] += np.bincount(
            cell, weights=post[unit, true] * unit_weight[unit], minlength=n_raters * k
        ).reshape(n_raters, k)
    return priors, counts / counts.sum(axis=2, keepdims=True)


def _e_step(
    priors: np.ndarray,
    theta: np.ndarray,
    obs: tuple[np.ndarray, np.ndarray, np.ndarray],
    n_units: int,
    unit_weight: np.ndarray,
) -> tuple[np.ndarray, float]:
    unit, rater, label = obs
    log_theta = np.log(theta)
    log_joint = np.tile(np.log(priors), (n_units, 1))
    for true in range(priors.size):
        log_joint[:, true] += np.bincount(
            unit, weights=log_theta[rater, true, label], minlength=n_units
        )
    top = log_joint.max(axis=1, keepdims=True)
    weights = np.exp(log_joint - top)
    total = weights.sum(axis=1, keepdims=True)
    return weights / total, float(unit_weight @ (top + np.log(total)).ravel())


def dawid_skene(
    ratings: Iterable[tuple[Hashable, Hashable, str]],
    categories: Sequence[str],
    max_iter: int = 200,
    tol: float = 1e-8,
    *,
    positive: str = "match",
    smoothing: float = 0.01,
    unit_weights: Mapping[Hashable, float] | None = None,
) -> DawidSkeneResult:
    """Fit the Dawid-Skene model to (unit, reviewer, label) triples.

    EM starts from majority vote: each unit's initial class probabilities are its vote shares
    (so a tie starts even, with no arbitrary tie-break). It stops when the log-likelihood
    changes by less than ``tol`` (relative) or after ``max_iter`` rounds; ``converged`` says
    which. ``smoothing`` is a pseudo-count added to every prior and confusion cell, keeping a
    reviewer who never used some label from getting probability 0 (and a log of -inf).
    Deterministic: the same ratings in the same order give the same result. ``positive`` names
    the class for sensitivity and specificity when there are exactly two categories.
    ``unit_weights`` counts a unit as that many identical units (default 1 each): a million
    pairs rated by a few raters hold only a few distinct label patterns, fitted once each.
    """
    cats = tuple(categories)
    k = len(cats)
    if k < 2 or len(set(cats)) != k:
        raise ValueError(f"need at least two distinct categories, got {list(cats)}")
    if k == 2 and positive not in cats:
        raise ValueError(f"positive class {positive!r} is not one of {list(cats)}")
    if max_iter < 1 or smoothing < 0:
        raise ValueError("max_iter must be at least 1 and smoothing at least 0")
    cat_index = {c: i for i, c in enumerate(cats)}
    unit_index: dict[Hashable, int] = {}
    rater_index: dict[Hashable, int] = {}
    columns: tuple[list[int], list[int], list[int]] = ([], [], [])
    for unit, rater, label in ratings:
        if label not in cat_index:
            raise ValueError(f"label {label!r} is not one of {list(cats)}")
        columns[0].append(unit_index.setdefault(unit, len(unit_index)))
        columns[1].append(rater_index.setdefault(rater, len(rater_index)))
        columns[2].append(cat_index[label])
    if not columns[0]:
        raise ValueError("no ratings to fit")
    obs = (
        np.asarray(columns[0], dtype=np.intp),
        np.asarray(columns[1], dtype=np.intp),
        np.asarray(columns[2], dtype=np.intp),
    )
    n_units, n_raters = len(unit_index), len(rater_index)
    unit_weight = np.ones(n_units)
    if unit_weights is not None:
        unit_weight = np.array([float(unit_weights.get(u, 1.0)) for u in unit_index])
        if np.any(~(unit_weight > 0)):
            raise ValueError("unit weights must be positive")

    votes = np.zeros((n_units, k))
    np.add.at(votes, (obs[0], obs[2]), 1.0)
    post = votes / votes.sum(axis=1, keepdims=True)
    previous, log_lik, converged, rounds = -math.inf, -math.inf, False, 0
    while rounds < max_iter:
        rounds += 1
        priors, theta = _m_step(post, obs, n_raters, smoothing, unit_weight)
        post, log_lik = _e_step(priors, theta, obs, n_units, unit_weight)
        if abs(log_lik - previous) <= tol * max(1.0, abs(log_lik)):
            converged = True
            break
        previous = log_lik

    raters = list(rater_index)
    sensitivity = specificity = None
    pos = cat_index.get(positive) if k == 2 else None
    if pos is not None:
        neg = 1 - pos
        sensitivity = {r: float(theta[i, pos, pos]) for i, r in enumerate(raters)}
        specificity = {r: float(theta[i, neg, neg]) for i, r in enumerate(raters)}
    best = post.argmax(axis=1)
    rows = post.tolist()
    return DawidSkeneResult(
        categories=cats,
        positive=positive if pos is not None else None,
        priors={c: float(priors[i]) for i, c in enumerate(cats)},
        confusion={r: theta[i].tolist() for i, r in enumerate(raters)},
        sensitivity=sensitivity,
        specificity=specificity,
        posteriors={u: dict(zip(cats, rows[i], strict=True)) for u, i in unit_index.items()},
        labels={u: cats[best[i]] for u, i in unit_index.items()},
        iterations=rounds,
        converged=converged,
        log_likelihood=log_lik,
    )

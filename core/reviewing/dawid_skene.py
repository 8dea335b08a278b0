"""Dawid & Skene (1979) latent-class model of reviewer error, fitted by EM.

Each unit has an unseen true class with prior probability pi_k; each reviewer r has a confusion
matrix theta_r[k, l] = P(r gives response l | true class k), and reviewers err independently
given the true class. The responses may outnumber the classes: a hold is a third response of
the two classes match and non-match, never a class of its own. EM alternates: posteriors of each
unit's class given the labels (E-step), then priors and confusion matrices from those posteriors
(M-step), until no parameter moves by more than the tolerance. Unlike kappa, this says *which*
reviewer is reliable, and in which direction they err.

General crowd-labelling libraries fit this model too; docket keeps these few lines of numpy so
that the fit runs in the project's process with no further dependency, and so that the
bootstrap over pairs (``bootstrap_rates``) can restart EM from the fitted values.

Ratings come in as plain (unit, reviewer, label) triples.
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

    ``confusion[r][k][l]`` is P(reviewer r gives label responses[l] | true class
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
    responses: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        # Not dataclasses.asdict: it would deep-copy every posterior only to copy it again.
        return json_ready({f.name: getattr(self, f.name) for f in fields(self)})


Obs = tuple[np.ndarray, np.ndarray, np.ndarray]


def _m_step(post: np.ndarray, obs: Obs, n_raters: int, n_resp: int, s: float,
            unit_weight: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    unit, rater, label = obs
    _n_units, k = post.shape
    wpost = post if unit_weight is None else post * unit_weight[:, None]
    priors = (wpost.sum(axis=0) + s) / (wpost.sum() + k * s)
    counts = np.full((n_raters, k, n_resp), s)
    cell = rater * n_resp + label
    for true in range(k):
        counts[:, true, :] += np.bincount(
            cell, weights=wpost[unit, true], minlength=n_raters * n_resp
        ).reshape(n_raters, n_resp)
    return priors, counts / counts.sum(axis=2, keepdims=True)


def fit_em(obs: Obs, n_units: int, n_raters: int, k: int, n_resp: int, max_iter: int,
           tol: float, smoothing: float, start: tuple[np.ndarray, np.ndarray] | None = None,
           unit_weight: np.ndarray | None = None
           ) -> tuple[np.ndarray, np.ndarray, np.ndarray, float, int, bool]:
    """EM from majority vote (or from ``start``: priors, theta); stops on the parameters.

    ``unit_weight`` counts each unit that many times (a bootstrap resample)."""
    if start is None:
        votes = np.full((n_units, k), 1e-9)
        named = obs[2] < k
        np.add.at(votes, (obs[0][named], obs[2][named]), 1.0)
        post = votes / votes.sum(axis=1, keepdims=True)
        priors, theta = _m_step(post, obs, n_raters, n_resp, smoothing, unit_weight)
    else:
        priors, theta = start
    converged, rounds, log_lik = False, 0, -math.inf
    while rounds < max_iter:
        rounds += 1
        post, log_lik = _e_step(priors, theta, obs, n_units, unit_weight)
        new_priors, new_theta = _m_step(post, obs, n_raters, n_resp, smoothing, unit_weight)
        moved = max(float(np.abs(new_priors - priors).max()),
                    float(np.abs(new_theta - theta).max()))
        priors, theta = new_priors, new_theta
        if moved <= tol:
            converged = True
            break
    post, log_lik = _e_step(priors, theta, obs, n_units, unit_weight)
    return priors, theta, post, log_lik, rounds, converged


def _e_step(
    priors: np.ndarray,
    theta: np.ndarray,
    obs: tuple[np.ndarray, np.ndarray, np.ndarray],
    n_units: int,
    unit_weight: np.ndarray | None = None,
) -> tuple[np.ndarray, float]:
    unit, rater, label = obs
    log_theta = np.log(theta)
    log_joint = np.tile(np.log(priors), (n_units, 1))  # units with weight 0 still get a row
    for true in range(priors.size):
        log_joint[:, true] += np.bincount(
            unit, weights=log_theta[rater, true, label], minlength=n_units
        )
    top = log_joint.max(axis=1, keepdims=True)
    weights = np.exp(log_joint - top)
    total = weights.sum(axis=1, keepdims=True)
    per_unit = (top + np.log(total)).ravel()
    weighted = per_unit if unit_weight is None else unit_weight * per_unit
    return weights / total, float(np.sum(weighted))


def dawid_skene(
    ratings: Iterable[tuple[Hashable, Hashable, str]],
    categories: Sequence[str],
    max_iter: int = 2000,
    tol: float = 1e-7,
    *,
    positive: str = "match",
    smoothing: float = 0.01,
    responses: Sequence[str] | None = None,
    unit_weights: Mapping[Hashable, float] | None = None,
) -> DawidSkeneResult:
    """Fit the Dawid-Skene model to (unit, reviewer, label) triples.

    ``categories`` are the latent classes; ``responses`` (default: the classes) the labels a
    reviewer may give, e.g. match, non-match and hold for the two classes match and non-match.
    EM starts from majority vote over the labels that name a class: each unit's initial class
    probabilities are its vote shares (a tie, or only holds, starts even). It stops when no
    prior or confusion entry moves by more than ``tol`` in a round, or after ``max_iter``
    rounds; ``converged`` says which. ``smoothing`` is a pseudo-count added to every prior and
    confusion cell, keeping a reviewer who never used some label from getting probability 0
    (and a log of -inf). Deterministic: the same ratings in the same order give the same
    result. ``positive`` names the class for sensitivity and specificity with two classes.
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
    resp = cats if responses is None else tuple(responses)
    if resp[:k] != cats or len(set(resp)) != len(resp):
        raise ValueError(f"responses must start with the classes {list(cats)}, got {list(resp)}")
    cat_index = {c: i for i, c in enumerate(resp)}
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
    unit_weight = None
    if unit_weights is not None:
        unit_weight = np.array([float(unit_weights.get(u, 1.0)) for u in unit_index])
        if np.any(~(unit_weight > 0)):
            raise ValueError("unit weights must be positive")
    priors, theta, post, log_lik, rounds, converged = fit_em(
        obs, n_units, n_raters, k, len(resp), max_iter, tol, smoothing,
        unit_weight=unit_weight)

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
        responses=resp,
    )

"""A small L2-regularised logistic regression on one-hot levels (Newton's method, numpy only).

Used to rank the queue once both classes have labels, when it measures better than the
Fellegi–Sunter posterior: it does not assume fields are independent.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


def one_hot(patterns: np.ndarray, n_levels: list[int], offset: np.ndarray) -> np.ndarray:
    """A bias, the Fellegi–Sunter log-odds, then each field's levels in cumulative coding.

    The log-odds column lets a few labels recalibrate the whole model, while the level columns,
    held near zero by the penalty, learn only the corrections the labels support (fields that
    are not independent). Far from any label the ranker falls back to the calibrated FS score.
    A field of k levels (missing last) gets k - 1 columns: "at least as good as level j" for
    each present level j but the worst, then "missing". The penalty thus shrinks the *step*
    from one level to the next, not each level's weight, so fine bands with few labels each
    borrow strength from their neighbours.
    """
    cols = [np.ones((len(patterns), 1)), np.asarray(offset, dtype=float)[:, None]]
    for f, k in enumerate(n_levels):
        lv = patterns[:, f][:, None]
        missing = lv == k - 1
        steps = (lv <= np.arange(k - 2)[None, :]) & ~missing
        cols.append(np.hstack([steps, missing]).astype(float))
    return np.hstack(cols)


def level_effects(block: np.ndarray) -> np.ndarray:
    """Per level (missing last), the log-odds one field's columns of :func:`one_hot` add."""
    block = np.asarray(block, dtype=float)
    steps, missing = block[:-1], block[-1]
    # Level l is "at least as good as" every level j >= l: the sum of those steps.
    cumulative = np.cumsum(steps[::-1])[::-1]
    return np.concatenate([cumulative, [0.0, missing]])


@dataclass
class Logistic:
    coef: np.ndarray

    def probability(self, x: np.ndarray) -> np.ndarray:
        return 1.0 / (1.0 + np.exp(-np.clip(x @ self.coef, -50, 50)))


def fit_logistic(x: np.ndarray, y: np.ndarray, weight: np.ndarray | None = None,
                 l2: float = 1.0, iters: int = 50) -> Logistic:
    """Weighted maximum likelihood with an L2 penalty (not on the bias); deterministic."""
    w = np.ones(len(y)) if weight is None else np.asarray(weight, dtype=float)
    beta = np.zeros(x.shape[1])
    penalty = np.full(x.shape[1], l2)
    penalty[:2] = 1e-6  # bias and FS log-odds are not shrunk
    for _ in range(iters):
        p = 1.0 / (1.0 + np.exp(-np.clip(x @ beta, -50, 50)))
        grad = x.T @ (w * (p - y)) + penalty * beta
        hess = (x * (w * p * (1 - p))[:, None]).T @ x + np.diag(penalty)
        step = np.linalg.solve(hess, grad)
        beta -= step
        if np.max(np.abs(step)) < 1e-8:
            break
    return Logistic(beta)

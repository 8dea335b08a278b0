"""The shrink factor for dependent fields, against scikit-learn's logistic regression."""

from __future__ import annotations

import numpy as np
from sklearn.linear_model import LogisticRegression

from docket.core.matching.dependence import fit_shrink


def _reference(x: np.ndarray, t: np.ndarray, w: np.ndarray) -> tuple[float, float]:
    # Soft targets as two weighted rows per pattern (y = 1 with weight w*t, y = 0 with
    # w*(1-t)): the same weighted cross-entropy, fitted by scikit-learn with no real penalty.
    xx = np.concatenate([x, x])[:, None]
    yy = np.concatenate([np.ones(len(x)), np.zeros(len(x))])
    ww = np.concatenate([w * t, w * (1 - t)])
    lr = LogisticRegression(C=1e12, tol=1e-10, max_iter=1000).fit(xx, yy, sample_weight=ww)
    return float(lr.coef_[0, 0]), float(lr.intercept_[0])


def test_the_factor_is_the_unpenalised_logistic_fit_when_inside_its_bounds() -> None:
    rng = np.random.default_rng(3)
    x = rng.normal(0, 6, 300)
    t = 1 / (1 + np.exp(-(0.6 * x - 1.5)))  # the summed weights overstate the evidence
    w = rng.integers(1, 50, 300).astype(float)
    factor, base = fit_shrink(x, -3.0, t, w)
    ref_factor, ref_base = _reference(x, t, w)
    assert abs(factor - ref_factor) < 1e-4 and abs(base - ref_base) < 1e-3
    assert abs(factor - 0.6) < 1e-3


def test_the_factor_never_strengthens_the_fields() -> None:
    # Targets sharper than the weights would need a factor above 1: it stays at 1.
    x = np.linspace(-10, 10, 41)
    t = 1 / (1 + np.exp(-2.0 * x))
    factor, _ = fit_shrink(x, 0.0, t, np.ones_like(x))
    assert factor == 1.0


def test_nothing_to_fit_leaves_the_weights_alone() -> None:
    assert fit_shrink(np.array([2.0, 2.0]), -1.0, np.array([0.2, 0.9]), np.ones(2)) == (1.0, -1.0)

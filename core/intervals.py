"""Confidence intervals for a single proportion."""

from __future__ import annotations

import math
from statistics import NormalDist


def z_value(confidence: float) -> float:
    """Two-sided standard normal quantile for ``confidence`` (0.95 gives 1.959964)."""
    if not 0.0 < confidence < 1.0:
        raise ValueError(f"confidence must lie strictly between 0 and 1, got {confidence}")
    return NormalDist().inv_cdf(0.5 + confidence / 2.0)


def wilson(x: float, n: float, confidence: float = 0.95) -> tuple[float, float]:
    """Wilson score interval for the proportion x / n, without continuity correction.

    ``x`` and ``n`` may be fractional (an effective count from a weighted sample). The bounds
    are clipped to [0, 1]; with ``n == 0`` nothing is known and the interval is (0.0, 1.0).
    """
    if n < 0 or x < 0 or x > n * (1.0 + 1e-9) + 1e-12:
        raise ValueError(f"need 0 <= x <= n, got x={x}, n={n}")
    x = min(x, n)  # p * n_eff can pass n_eff by a rounding error when p == 1
    z = z_value(confidence)
    if n == 0:
        return (0.0, 1.0)
    p = x / n
    z2n = z * z / n
    centre = p + z2n / 2.0
    half = z * math.sqrt(p * (1.0 - p) / n + z2n / (4.0 * n))
    denom = 1.0 + z2n
    # at x = 0 or x = n the bound is exactly 0 or 1; rounding would leave a 1e-17 residue
    low = 0.0 if x == 0 else max(0.0, (centre - half) / denom)
    high = 1.0 if x == n else min(1.0, (centre + half) / denom)
    return (low, high)


def beta_quantile(q: float, a: float, b: float) -> float:
    """The q-quantile of Beta(a, b) (scipy's inverse regularised incomplete beta)."""
    from scipy.special import betaincinv  # imported on first use: the review screen never needs it

    return float(betaincinv(a, b, q))


def clopper_pearson(x: float, n: float, confidence: float = 0.95) -> tuple[float, float]:
    """Clopper–Pearson ("exact") interval for x / n from Beta quantiles.

    Fractional ``x`` and ``n`` are allowed, as the Korn–Graubard interval for a survey estimate
    needs (the counts are then an effective sample). With ``n == 0`` the interval is (0.0, 1.0).
    """
    if n < 0 or x < 0 or x > n * (1.0 + 1e-9) + 1e-12:
        raise ValueError(f"need 0 <= x <= n, got x={x}, n={n}")
    x = min(x, n)  # p * n_eff can pass n_eff by a rounding error when p == 1
    if not 0.0 < confidence < 1.0:
        raise ValueError(f"confidence must lie strictly between 0 and 1, got {confidence}")
    if n == 0:
        return (0.0, 1.0)
    alpha = 1.0 - confidence
    low = 0.0 if x == 0 else beta_quantile(alpha / 2.0, x, n - x + 1.0)
    high = 1.0 if x == n else beta_quantile(1.0 - alpha / 2.0, x + 1.0, n - x)
    return (low, high)

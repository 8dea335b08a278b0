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


def _beta_cf(a: float, b: float, x: float) -> float:
    """Continued fraction of the incomplete beta function (modified Lentz)."""
    tiny, eps = 1e-300, 1e-15
    c, d = 1.0, 1.0 - (a + b) * x / (a + 1.0)
    d = 1.0 / (d if abs(d) > tiny else tiny)
    h = d
    for m in range(1, 100_000):
        for num in (
            m * (b - m) * x / ((a + 2 * m - 1.0) * (a + 2 * m)),
            -(a + m) * (a + b + m) * x / ((a + 2 * m) * (a + 2 * m + 1.0)),
        ):
            d = 1.0 + num * d
            d = 1.0 / (d if abs(d) > tiny else tiny)
            c = 1.0 + num / c
            c = c if abs(c) > tiny else tiny
            h *= c * d
        if abs(c * d - 1.0) < eps:
            break
    return h


def beta_cdf(x: float, a: float, b: float) -> float:
    """Regularised incomplete beta function I_x(a, b), the Beta(a, b) distribution function."""
    if x <= 0.0:
        return 0.0
    if x >= 1.0:
        return 1.0
    log_front = (math.lgamma(a + b) - math.lgamma(a) - math.lgamma(b)
                 + a * math.log(x) + b * math.log1p(-x))
    # the continued fraction converges fast only on one side of the mean; use symmetry beyond it
    if x < (a + 1.0) / (a + b + 2.0):
        return math.exp(log_front) * _beta_cf(a, b, x) / a
    return 1.0 - math.exp(log_front) * _beta_cf(b, a, 1.0 - x) / b


def beta_quantile(q: float, a: float, b: float) -> float:
    """Inverse of ``beta_cdf`` in x, by bisection (the distribution function is monotone)."""
    lo, hi = 0.0, 1.0
    for _ in range(200):
        mid = (lo + hi) / 2.0
        if beta_cdf(mid, a, b) < q:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-13:
            break
    return (lo + hi) / 2.0


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

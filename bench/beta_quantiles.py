"""Clopper–Pearson bounds: scipy's inverse incomplete beta against the bisection over a
hand-written continued fraction that docket used before, side by side on the same inputs.

    python bench/beta_quantiles.py
"""

from __future__ import annotations

import math
import random
import time

from docket.core.intervals import beta_quantile


def _cf(a: float, b: float, x: float) -> float:
    tiny, eps = 1e-300, 1e-15
    c, d = 1.0, 1.0 - (a + b) * x / (a + 1.0)
    d = 1.0 / (d if abs(d) > tiny else tiny)
    h = d
    for m in range(1, 100_000):
        for num in (m * (b - m) * x / ((a + 2 * m - 1.0) * (a + 2 * m)),
                    -(a + m) * (a + b + m) * x / ((a + 2 * m) * (a + 2 * m + 1.0))):
            d = 1.0 + num * d
            d = 1.0 / (d if abs(d) > tiny else tiny)
            c = 1.0 + num / c
            c = c if abs(c) > tiny else tiny
            h *= c * d
        if abs(c * d - 1.0) < eps:
            break
    return h


def _cdf(x: float, a: float, b: float) -> float:
    if x <= 0.0:
        return 0.0
    if x >= 1.0:
        return 1.0
    front = (math.lgamma(a + b) - math.lgamma(a) - math.lgamma(b) + a * math.log(x)
             + b * math.log1p(-x))
    if x < (a + 1.0) / (a + b + 2.0):
        return math.exp(front) * _cf(a, b, x) / a
    return 1.0 - math.exp(front) * _cf(b, a, 1.0 - x) / b


def bisection(q: float, a: float, b: float) -> float:
    lo, hi = 0.0, 1.0
    for _ in range(200):
        mid = (lo + hi) / 2.0
        lo, hi = (mid, hi) if _cdf(mid, a, b) < q else (lo, mid)
        if hi - lo < 1e-13:
            break
    return (lo + hi) / 2.0


def main() -> None:
    rng = random.Random(5)
    cases = []
    for _ in range(300):
        n = rng.randint(5, 5000)
        x = rng.randint(1, n - 1)
        cases.append((0.025, x, n - x + 1.0))
        cases.append((0.975, x + 1.0, n - x))
    beta_quantile(0.5, 2.0, 3.0)  # the import, outside the timing
    t0 = time.perf_counter()
    ours = [beta_quantile(*c) for c in cases]
    t1 = time.perf_counter()
    old = [bisection(*c) for c in cases]
    t2 = time.perf_counter()
    worst = max(abs(p - q) for p, q in zip(ours, old, strict=True))
    print(f"{len(cases)} quantiles: scipy {t1 - t0:.4f} s, bisection {t2 - t1:.4f} s, "
          f"scipy is {(t2 - t1) / (t1 - t0):.0f}x faster; largest difference {worst:.1e}")


if __name__ == "__main__":
    main()

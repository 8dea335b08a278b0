"""Coverage of the agreement intervals by simulation.

Cohen's kappa: 2,000 tables per setting from the common-correlation model (two reviewers
sharing the prevalence), at n = 60 with kappa 0.9 and n = 200 with 3 % prevalence, among
others; target >= 93 % and no bound outside [-1, 1]. Dawid–Skene: three reviewers of known
rates on docket's default overlap design (20 % of pairs decided by two of them), 30 reps;
target: the intervals hold the true rates >= 90 % of the time. Fleiss' kappa and
Krippendorff's alpha on the same tables as pairs of two ratings each, 1,000 per setting
(target >= 93 %).

    python bench/coverage_agreement.py
"""

from __future__ import annotations

import time

from _common import REPO  # noqa: F401  (puts the repository on the path)

from tests.reviewer_sim import kappa_coverage, many_coverage, rates_coverage

SETTINGS = ((60, 0.5, 0.9), (60, 0.3, 0.9), (200, 0.03, 0.9), (200, 0.03, 0.6),
            (500, 0.02, 0.8), (30, 0.5, 0.6))


def main() -> None:
    for n, prevalence, kappa in SETTINGS:
        t = time.perf_counter()
        cov, outside, undefined = kappa_coverage(n, prevalence, kappa, 2000, seed=n)
        print(f"kappa n={n:<4} prevalence {prevalence:<5} kappa {kappa}: coverage {cov:.3f}, "
              f"bounds outside [-1, 1]: {outside}, undefined: {undefined} "
              f"({time.perf_counter() - t:.1f} s)", flush=True)
    for n, prevalence, kappa in ((15, 0.4, 0.9), *SETTINGS):
        t = time.perf_counter()
        f_cov, a_cov = many_coverage(n, prevalence, kappa, 1000, seed=n)
        print(f"Fleiss / alpha, 2 ratings each, n={n:<4} prevalence {prevalence:<5} kappa "
              f"{kappa}: coverage {f_cov:.3f} / {a_cov:.3f} ({time.perf_counter() - t:.1f} s)",
              flush=True)
    t = time.perf_counter()
    print(f"Dawid–Skene rates, 3 reviewers, default overlap design, 30 reps: coverage "
          f"{rates_coverage(30, seed=1):.3f} ({time.perf_counter() - t:.0f} s)")


if __name__ == "__main__":
    main()

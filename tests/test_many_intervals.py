"""Fleiss' kappa and Krippendorff's alpha intervals: with two ratings of every pair over two
categories, the goodness-of-fit interval; not [1, 1] for a small table in perfect agreement."""

from __future__ import annotations

import krippendorff
import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.stats import chi2
from statsmodels.stats.inter_rater import fleiss_kappa

from docket.core.reviewing.agreement_intervals import BOOT, GOF
from docket.core.reviewing.agreement_summary import overall_agreement
from tests.reviewer_sim import many_coverage


def _two_reviewers(cells: tuple[int, int, int]) -> dict[str, dict[int, str]]:
    """Both say match on cells[0] pairs, they split on cells[1], both say non-match on the rest."""
    a: dict[int, str] = {}
    b: dict[int, str] = {}
    unit = 0
    for kind, n in zip(("mm", "mn", "nn"), cells, strict=True):
        for _ in range(n):
            a[unit] = "match" if kind[0] == "m" else "non-match"
            b[unit] = "match" if kind[1] == "m" else "non-match"
            unit += 1
    return {"ana": a, "ben": b}


def _gof_low(cells: tuple[int, int, int]) -> float:
    # Donner & Eliasziw (1992, from memory), solved with scipy apart from docket's bisection:
    # the kappa_0 at which the chi-square (1 df) of (both match, split, both non-match)
    # against n (p^2 + pq k0, 2pq (1 - k0), q^2 + pq k0), p the pooled share of matches,
    # reaches chi2.ppf(0.95, 1).
    n = sum(cells)
    p = (2 * cells[0] + cells[1]) / (2 * n)
    pq = p * (1 - p)

    def excess(k0: float) -> float:
        want = (n * (p * p + pq * k0), n * 2 * pq * (1 - k0), n * ((1 - p) ** 2 + pq * k0))
        return sum((o - e) ** 2 / e for o, e in zip(cells, want, strict=True)) \
            - chi2.ppf(0.95, 1)

    # between the least kappa the share allows and the one that fits the cells exactly
    floor = max(-1.0, -p / (1 - p), -(1 - p) / p) + 1e-9
    centre = min(0.999, 1 - cells[1] / (2 * n * pq))
    return floor if excess(floor) <= 0 else float(brentq(excess, floor, centre))


def test_perfect_agreement_on_fifteen_pairs_is_not_certain() -> None:
    # before: the percentile bootstrap resampled 15 agreeing pairs into [1.0, 1.0]
    got = overall_agreement(_two_reviewers((6, 0, 9)))
    assert got.fleiss_kappa == 1.0 and got.krippendorff_alpha == 1.0
    assert got.fleiss_ci_method == got.alpha_ci_method == GOF
    assert got.fleiss_low == pytest.approx(_gof_low((6, 0, 9)), abs=1e-6)
    assert got.fleiss_low == pytest.approx(0.5798, abs=1e-4)  # as Cohen's (test_agreement_*)
    assert got.fleiss_high == got.alpha_high == 1.0


@pytest.mark.parametrize("cells", [(8, 3, 11), (2, 1, 40), (12, 6, 12)])
def test_two_ratings_each_get_the_goodness_of_fit_interval(cells: tuple[int, int, int]) -> None:
    got = overall_agreement(_two_reviewers(cells))
    # the estimates themselves: statsmodels' fleiss_kappa and the krippendorff package
    table = np.array([[2, 0]] * cells[0] + [[1, 1]] * cells[1] + [[0, 2]] * cells[2])
    assert got.fleiss_kappa == pytest.approx(fleiss_kappa(table), abs=1e-12)
    labels = _two_reviewers(cells)
    data = [[1.0 if labels[r][u] == "match" else 0.0 for u in range(sum(cells))]
            for r in ("ana", "ben")]
    alpha = krippendorff.alpha(reliability_data=data, level_of_measurement="nominal")
    assert got.krippendorff_alpha == pytest.approx(alpha, abs=1e-12)
    low = _gof_low(cells)
    assert got.fleiss_low == pytest.approx(min(low, got.fleiss_kappa), abs=1e-6)
    assert got.alpha_low == pytest.approx(min(low, got.krippendorff_alpha), abs=1e-6)
    assert got.fleiss_low <= got.fleiss_kappa <= got.fleiss_high <= 1.0


def test_three_ratings_of_a_pair_keep_the_bootstrap() -> None:
    labels = _two_reviewers((8, 3, 11))
    labels["cy"] = dict(labels["ana"])
    got = overall_agreement(labels)
    assert got.fleiss_raters == 3 and got.fleiss_ci_method == BOOT


def test_the_interval_covers_a_high_kappa_on_small_tables() -> None:
    # 200 tables of 15 pairs from the common-correlation model, kappa 0.9 and 40 % matches
    # (half of them in perfect agreement): the bootstrap held 0.9 in about half
    # (bench/coverage_agreement.py); a 95 % interval should hold it near 95 % of the time.
    fleiss_cov, alpha_cov = many_coverage(15, 0.4, 0.9, 200, seed=15)
    assert fleiss_cov >= 0.9 and alpha_cov >= 0.9

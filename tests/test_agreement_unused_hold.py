"""With holds counted (--include-hold) but held by no one, kappa's interval is the one two
categories get: the empty hold row and column change nothing about kappa, so they must not
change its interval either."""

from __future__ import annotations

import pytest
from scipy.optimize import brentq
from scipy.stats import chi2
from sklearn.metrics import cohen_kappa_score

from docket.core.reviewing.agreement import DECIDED, WITH_HOLD, cohen_kappa
from docket.core.reviewing.agreement_intervals import BOOT, GOF


@pytest.mark.parametrize("two", [[[6, 0], [0, 9]], [[7, 2], [2, 9]], [[2, 0], [3, 10]]])
def test_an_unused_hold_leaves_the_two_category_interval(two: list[list[int]]) -> None:
    three = [[*two[0], 0], [*two[1], 0], [0, 0, 0]]
    plain, held = cohen_kappa(two, DECIDED), cohen_kappa(three, WITH_HOLD)
    # kappa itself: scikit-learn's cohen_kappa_score on the same ratings (reference library)
    a = [c for i, row in enumerate(two) for j, n in enumerate(row) for c in [DECIDED[i]] * n]
    b = [c for i, row in enumerate(two) for j, n in enumerate(row) for c in [DECIDED[j]] * n]
    assert held.kappa == pytest.approx(cohen_kappa_score(a, b), abs=1e-12)
    assert held.kappa == pytest.approx(plain.kappa, abs=1e-12)
    assert held.ci_method == GOF
    assert (held.ci_low, held.ci_high) == pytest.approx((plain.ci_low, plain.ci_high), abs=1e-12)


def test_perfect_agreement_on_fifteen_pairs_is_not_certain() -> None:
    # 6 matches and 9 non-matches, both reviewers alike: before, with the hold category in the
    # table, the percentile bootstrap gave [1.0, 1.0].
    held = cohen_kappa([[6, 0, 0], [0, 9, 0], [0, 0, 0]], WITH_HOLD)
    assert held.kappa == 1.0 and held.ci_high == 1.0
    # Donner & Eliasziw (1992, from memory): the lower bound is the kappa_0 at which the
    # chi-square (1 df) of the cells (both match, split, both non-match) = (6, 0, 9) against
    # n (p^2 + pq k0, 2pq (1 - k0), q^2 + pq k0), p = 12/30, reaches chi2.ppf(0.95, 1); solved
    # here with scipy, apart from docket's bisection.
    p, n = 12 / 30, 15
    pq = p * (1 - p)

    def excess(k0: float) -> float:
        want = (n * (p * p + pq * k0), n * 2 * pq * (1 - k0), n * ((1 - p) ** 2 + pq * k0))
        return sum((o - e) ** 2 / e for o, e in zip((6, 0, 9), want, strict=True)) \
            - chi2.ppf(0.95, 1)

    assert held.ci_low == pytest.approx(brentq(excess, 0.0, 0.999), abs=1e-6)
    assert held.ci_low == pytest.approx(0.5798, abs=1e-4)


def test_a_hold_someone_used_keeps_the_bootstrap() -> None:
    held = cohen_kappa([[6, 1, 1], [0, 9, 0], [0, 1, 2]], WITH_HOLD)
    assert held.ci_method == BOOT

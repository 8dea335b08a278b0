"""Wilson score interval: published values and the reference library."""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from statsmodels.stats.proportion import proportion_confint

from docket.core.intervals import clopper_pearson, wilson, z_value


@pytest.mark.parametrize(
    ("x", "n", "low", "high", "digits"),
    [
        (81, 263, 0.2553, 0.3662, 4),  # Newcombe 1998, from memory
        (15, 148, 0.0624, 0.1605, 4),  # Newcombe 1998, from memory
        (0, 20, 0.0000, 0.1611, 4),  # Newcombe 1998, from memory
        (1, 29, 0.0061, 0.1718, 4),  # Newcombe 1998, from memory
        # statsmodels test vs R 4.3.3 DescTools::BinomCI
        (100, 200, 0.4313609, 0.5686391, 7),
        # VassarStats example input; the interval is computed only: a check against statsmodels
        (23, 60, 0.2709, 0.5098, 4),
    ],
)
def test_published_values(x: int, n: int, low: float, high: float, digits: int) -> None:
    got = wilson(x, n)
    assert (round(got[0], digits), round(got[1], digits)) == (low, high)


def test_z_is_the_exact_normal_quantile() -> None:
    assert z_value(0.95) == pytest.approx(1.959964, abs=1e-6)


def test_bounds_at_the_edges_are_exact() -> None:
    assert wilson(0, 20)[0] == 0.0
    assert wilson(38, 38)[1] == 1.0
    # statsmodels clips to [0, 1]: 38/38 gives 0.9082 - 1.0000 (statsmodels GH 7386)
    assert wilson(38, 38)[0] == pytest.approx(0.9082, abs=5e-5)


def test_empty_sample_knows_nothing() -> None:
    assert wilson(0, 0) == (0.0, 1.0)


@pytest.mark.parametrize(("x", "n", "confidence"), [(-1, 5, 0.95), (6, 5, 0.95), (1, 5, 1.0)])
def test_rejects_impossible_input(x: int, n: int, confidence: float) -> None:
    with pytest.raises(ValueError):
        wilson(x, n, confidence)


@settings(max_examples=100, deadline=None)
@given(
    n=st.integers(min_value=1, max_value=5000),
    share=st.floats(min_value=0.0, max_value=1.0),
    confidence=st.sampled_from([0.8, 0.9, 0.95, 0.99]),
)
def test_matches_statsmodels(n: int, share: float, confidence: float) -> None:
    x = round(share * n)
    # reference library: statsmodels proportion_confint(method="wilson")
    expected = proportion_confint(x, n, alpha=1 - confidence, method="wilson")
    got = wilson(x, n, confidence)
    assert got[0] == pytest.approx(expected[0], abs=1e-10)
    assert got[1] == pytest.approx(expected[1], abs=1e-10)
    assert 0.0 <= got[0] <= x / n <= got[1] <= 1.0


@settings(max_examples=50, deadline=None)
@given(n=st.floats(min_value=0.5, max_value=1e4), share=st.floats(min_value=0.0, max_value=1.0))
def test_fractional_counts_follow_the_same_formula(n: float, share: float) -> None:
    # effective (Kish) sizes are fractional; statsmodels accepts them too
    x = share * n
    expected = proportion_confint(x, n, alpha=0.05, method="wilson")
    got = wilson(x, n)
    assert got[0] == pytest.approx(expected[0], abs=1e-9)
    assert got[1] == pytest.approx(expected[1], abs=1e-9)


@settings(max_examples=100, deadline=None)
@given(
    n=st.floats(min_value=0.5, max_value=2e4),
    permille=st.integers(min_value=0, max_value=1000),
    confidence=st.sampled_from([0.8, 0.9, 0.95, 0.99]),
)
def test_clopper_pearson_matches_statsmodels(n: float, permille: int, confidence: float) -> None:
    # fractional counts are what the Korn–Graubard interval feeds in
    x = permille / 1000 * n
    # reference library: statsmodels proportion_confint(method="beta")
    expected = proportion_confint(x, n, alpha=1 - confidence, method="beta")
    got = clopper_pearson(x, n, confidence)
    assert got[0] == pytest.approx(expected[0], abs=1e-9)
    assert got[1] == pytest.approx(expected[1], abs=1e-9)


def test_clopper_pearson_edges() -> None:
    assert clopper_pearson(0, 0) == (0.0, 1.0)
    low, high = clopper_pearson(0, 20)
    assert low == 0.0
    # with no success the upper bound is 1 - (alpha / 2) ** (1 / n): common practice
    assert high == pytest.approx(1 - 0.025 ** (1 / 20), abs=1e-12)
    with pytest.raises(ValueError):
        clopper_pearson(3, 2)

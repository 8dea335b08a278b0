"""Agreement statistics: invariants, and cross-checks against the reference libraries.

The cross-checks are computed values checked against the library
named (scikit-learn, statsmodels, krippendorff), on random label vectors.
"""

from __future__ import annotations

import math
import warnings

import krippendorff
import numpy as np
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from sklearn.metrics import cohen_kappa_score
from statsmodels.stats.inter_rater import aggregate_raters, cohens_kappa
from statsmodels.stats.inter_rater import fleiss_kappa as sm_fleiss_kappa

from docket.core.reviewing.agreement import cohen_kappa, confusion, pabak
from docket.core.reviewing.agreement_many import (
    fleiss_kappa,
    krippendorff_alpha_nominal,
    rating_counts,
)

SETTINGS = settings(max_examples=60, deadline=None)


@st.composite
def two_reviewers(draw: st.DrawFn) -> tuple[int, list[int], list[int]]:
    """k categories and two label vectors over the same units, labels 0..k-1."""
    k = draw(st.integers(2, 4))
    n = draw(st.integers(1, 60))
    labels = st.lists(st.integers(0, k - 1), min_size=n, max_size=n)
    return k, draw(labels), draw(labels)


def _table(k: int, a: list[int], b: list[int]) -> np.ndarray:
    return confusion([str(x) for x in a], [str(x) for x in b], [str(i) for i in range(k)])


def _defined(k: int, a: list[int], b: list[int]) -> np.ndarray:
    table = _table(k, a, b)
    assume(not math.isnan(cohen_kappa(table).kappa))  # guard p_e == 1
    return table


@SETTINGS
@given(two_reviewers())
def test_kappa_matches_sklearn(draw: tuple[int, list[int], list[int]]) -> None:
    k, a, b = draw
    table = _defined(k, a, b)
    expected = cohen_kappa_score(a, b, labels=list(range(k)))
    assert math.isclose(cohen_kappa(table).kappa, expected, abs_tol=1e-12)


@SETTINGS
@given(two_reviewers())
def test_standard_errors_match_statsmodels(draw: tuple[int, list[int], list[int]]) -> None:
    k, a, b = draw
    table = _defined(k, a, b)
    got = cohen_kappa(table)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RuntimeWarning)  # statsmodels divides by a zero SE0
        ref = cohens_kappa(table)

    def finite(x: float) -> float:  # statsmodels takes sqrt of a -0.0 variance as NaN
        return 0.0 if math.isnan(x) else float(x)

    assert math.isclose(got.kappa, ref.kappa, abs_tol=1e-12)
    assert math.isclose(got.se, finite(ref.std_kappa), abs_tol=1e-7)
    assert math.isclose(got.se0, finite(ref.std_kappa0), abs_tol=1e-7)
    if got.se > 0:
        assert math.isclose(got.wald_low, ref.kappa_low, abs_tol=1e-9)
        assert math.isclose(got.wald_high, ref.kappa_upp, abs_tol=1e-9)
    if math.isnan(got.ci_low):  # no interval: a single pair, or too few resamples defined
        assert math.isnan(got.ci_high) and (got.n < 2 or got.ci_method.startswith("percentile"))
    else:
        assert -1.0 <= got.ci_low <= got.kappa <= got.ci_high <= 1.0
    if got.se0 > 0:
        assert math.isclose(got.z, ref.z_value, rel_tol=1e-9, abs_tol=1e-9)


@st.composite
def rated_subjects(draw: st.DrawFn) -> tuple[int, list[list[int]]]:
    """k categories and, for each subject, the labels of the same number of raters."""
    k = draw(st.integers(2, 5))
    raters = draw(st.integers(2, 8))
    row = st.lists(st.integers(0, k - 1), min_size=raters, max_size=raters)
    return k, draw(st.lists(row, min_size=1, max_size=30))


@SETTINGS
@given(rated_subjects())
def test_fleiss_matches_statsmodels(draw: tuple[int, list[list[int]]]) -> None:
    k, ratings = draw
    counts = rating_counts(ratings, list(range(k)))
    ours = fleiss_kappa(counts)
    assume(not math.isnan(ours))  # every rating in one category
    assert math.isclose(ours, sm_fleiss_kappa(counts), abs_tol=1e-12)


@SETTINGS
@given(two_reviewers())
def test_pabak_matches_uniform_fleiss(draw: tuple[int, list[int], list[int]]) -> None:
    # statsmodels: fleiss_kappa(aggregate_raters(pairs, n_cat=k)[0], method='uniform')
    k, a, b = draw
    pairs = np.column_stack([a, b])
    expected = sm_fleiss_kappa(aggregate_raters(pairs, n_cat=k)[0], method="uniform")
    assert math.isclose(pabak(_table(k, a, b)).pabak, expected, abs_tol=1e-12)


@st.composite
def reliability_data(draw: st.DrawFn) -> np.ndarray:
    raters = draw(st.integers(2, 5))
    units = draw(st.integers(1, 20))
    cell = st.one_of(st.none(), st.integers(0, 3))
    row = st.lists(cell, min_size=units, max_size=units)
    rows = draw(st.lists(row, min_size=raters, max_size=raters))
    return np.array([[np.nan if v is None else float(v) for v in row] for row in rows])


@SETTINGS
@given(reliability_data())
def test_alpha_matches_krippendorff_package(data: np.ndarray) -> None:
    pairable = np.sum(~np.isnan(data), axis=0) >= 2
    values = data[:, pairable]
    assume(np.unique(values[~np.isnan(values)]).size >= 2)  # alpha needs two values in play
    expected = krippendorff.alpha(reliability_data=data, level_of_measurement="nominal")
    assert math.isclose(krippendorff_alpha_nominal(data), expected, abs_tol=1e-9)


# --- invariants ------------------------------------------------------------------------------


@SETTINGS
@given(two_reviewers())
def test_kappa_is_symmetric_in_the_two_reviewers(draw: tuple[int, list[int], list[int]]) -> None:
    k, a, b = draw
    table = _defined(k, a, b)
    one, other = cohen_kappa(table), cohen_kappa(table.T)
    assert math.isclose(one.kappa, other.kappa, abs_tol=1e-12)
    assert math.isclose(one.se, other.se, abs_tol=1e-12)
    assert math.isclose(one.se0, other.se0, abs_tol=1e-12)


@SETTINGS
@given(two_reviewers())
def test_kappa_at_most_one_and_blind_to_category_order(
    draw: tuple[int, list[int], list[int]],
) -> None:
    k, a, b = draw
    table = _defined(k, a, b)
    got = cohen_kappa(table)
    assert got.kappa <= 1.0 + 1e-12
    if not math.isnan(got.ci_low):  # NaN: no interval from so few pairs (see above)
        assert got.ci_low <= got.kappa <= got.ci_high
    order = np.arange(k)[::-1]
    assert math.isclose(cohen_kappa(table[np.ix_(order, order)]).kappa, got.kappa, abs_tol=1e-12)


@SETTINGS
@given(two_reviewers())
def test_identical_labels_give_kappa_one(draw: tuple[int, list[int], list[int]]) -> None:
    k, a, _ = draw
    assume(len(set(a)) >= 2)  # one category only is the undefined p_e == 1 case
    got = cohen_kappa(_table(k, a, a))
    assert got.kappa == 1.0
    assert got.se == 0.0
    assert got.band == "Almost perfect"


@SETTINGS
@given(two_reviewers())
def test_pabak_prevalence_bias_relation(draw: tuple[int, list[int], list[int]]) -> None:
    # κ = (PABAK − PI² + BI²)/(1 − PI² + BI²): Byrt, Bishop & Carlin 1993, from memory
    _, a, b = draw
    a2, b2 = [x % 2 for x in a], [x % 2 for x in b]
    table = _defined(2, a2, b2)
    got = pabak(table)
    assert got.prevalence_index is not None and got.bias_index is not None
    pi2, bi2 = got.prevalence_index**2, got.bias_index**2
    expected = (got.pabak - pi2 + bi2) / (1 - pi2 + bi2)
    assert math.isclose(cohen_kappa(table).kappa, expected, abs_tol=1e-9)

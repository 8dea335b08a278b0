"""Agreement of two reviewers against published worked examples (Cohen 1960; Landis & Koch
1977; Byrt, Bishop & Carlin 1993; each value's source beside it). Many raters (Fleiss,
Krippendorff) and the summaries over reviewers are in test_agreement_many_raters.py."""

from __future__ import annotations

import math

import pytest

from docket.core.reviewing.agreement import (
    cohen_kappa,
    confusion,
    landis_koch,
    pabak,
)

WIKI_2X2 = [[20, 5], [10, 15]]
SAS_3X3 = [[0, 4, 1], [0, 8, 0], [0, 1, 5]]
STATA_2X2 = [[1395, 118], [261, 158]]
COHEN_1968 = [[88, 14, 18], [10, 40, 10], [2, 6, 12]]
SKIN_4X4 = [[10, 4, 1, 0], [5, 10, 12, 2], [2, 4, 12, 5], [0, 2, 6, 13]]
FCE_1969 = [[106, 10, 4], [22, 28, 10], [2, 12, 6]]

# --- §1a / §1b: kappa ------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("table", "p_o", "p_e", "kappa"),
    [
        # Wikipedia "Cohen's kappa" 2×2 [S]: table and p_o reproduced at howcodex.com
        (WIKI_2X2, 0.70, 0.50, 0.4000),
        # Wikipedia "same p_o, different κ", from memory; values confirmed by computation
        ([[45, 15], [25, 15]], 0.60, 0.54, 0.1304),
        ([[25, 35], [5, 35]], 0.60, 0.46, 0.2593),
        # "Statistics for Data Science", Table 6.1 [S] (prevalence paradox)
        ([[20, 5], [10, 65]], 0.85, 0.60, 0.6250),
        # Cohen (1968) Table 1 [S data: R psych docs, "cohen reports .492"]
        (COHEN_1968, 0.70, 0.41, 0.4915),
        # Fleiss, Cohen & Everitt (1969) [S data: R psych docs]; κ [C], checked against statsmodels
        (FCE_1969, 0.70, 0.475, 0.4286),
    ],
)
def test_kappa_worked_examples(
    table: list[list[int]], p_o: float, p_e: float, kappa: float
) -> None:
    got = cohen_kappa(table)
    assert got.observed == pytest.approx(p_o, abs=5e-5)
    assert got.expected == pytest.approx(p_e, abs=5e-5)
    assert round(got.kappa, 4) == kappa


def _as_printed(value: float, printed: str) -> bool:
    """True when ``value`` rounds to ``printed`` at the number of decimals printed."""
    return round(value, len(printed.split(".")[1])) == float(printed)


@pytest.mark.parametrize(
    ("table", "printed"),
    [
        # Wikipedia 2×2: SE, CI and SE0 [C], checked against statsmodels cohens_kappa
        (WIKI_2X2, "0.4000 0.1270 0.1511 0.6489 0.1386 2.8868"),
        # SAS printout in statsmodels/stats/tests/test_inter_rater.py, TestUnweightedCohens [S]
        (SAS_3X3, "0.4842 0.1380 0.2137 0.7547 0.1484 3.2626"),
        # Statalist archive 2009-12, msg00320, Stata kapci / kap output [S]
        (STATA_2X2, "0.34120 0.026291 0.28967 0.39273 0.022037 15.483"),
        # Cohen 1968 Table 1 [S data]; ASE, CI and SE0 [C], checked against statsmodels
        (COHEN_1968, "0.4915 0.0510 0.3916 0.5915 0.0520 -"),
        # FCE 1969 data [S data]; ASE, CI and SE0 [C], checked against statsmodels
        (FCE_1969, "0.4286 0.0537 0.3233 0.5338 0.0555 -"),
        # SAS PROC FREQ skin condition [S data]; κ, ASE and CL as SAS prints them, from memory;
        # SE0 [C], checked against statsmodels
        (SKIN_4X4, "0.3449 0.0724 0.2030 0.4868 0.0612 -"),
    ],
)
def test_standard_errors_and_interval(table: list[list[int]], printed: str) -> None:
    """Columns: κ, ASE (Fleiss, Cohen & Everitt 1969), its 95% CI, SE0 (null), z = κ/SE0."""
    got = cohen_kappa(table)
    values = (got.kappa, got.se, got.wald_low, got.wald_high, got.se0, got.z)
    for value, expected in zip(values, printed.split(), strict=True):
        assert expected == "-" or _as_printed(value, expected), (value, expected)


def test_large_sample_interval_uses_the_exact_normal_quantile() -> None:
    got = cohen_kappa(SAS_3X3)
    assert (got.wald_high - got.kappa) / got.se == pytest.approx(1.959964, abs=1e-6)
    assert got.wald_high - got.kappa == pytest.approx(got.kappa - got.wald_low)


def test_result_carries_table_and_band() -> None:
    got = cohen_kappa(WIKI_2X2, ["yes", "no"])
    assert got.n == 50
    assert got.categories == ("yes", "no")
    assert got.table == WIKI_2X2
    assert got.band == "Fair"


def test_confusion_counts_rows_by_first_sequence() -> None:
    a = ["match", "match", "non-match", "match"]
    b = ["match", "non-match", "non-match", "match"]
    assert confusion(a, b, ["match", "non-match"]).tolist() == [[2, 1], [0, 1]]
    assert confusion([], [], ["match", "non-match"]).tolist() == [[0, 0], [0, 0]]
    with pytest.raises(ValueError, match="not one of"):
        confusion(["maybe"], ["match"], ["match", "non-match"])
    with pytest.raises(ValueError, match="length"):
        confusion(["match"], [], ["match", "non-match"])


@pytest.mark.parametrize("table", [[[0, 0], [0, 0]], [[7, 0], [0, 0]], [[0, 0], [0, 3]]])
def test_degenerate_kappa_is_nan_and_undefined(table: list[list[int]]) -> None:
    got = cohen_kappa(table)
    assert math.isnan(got.kappa) and math.isnan(got.se) and math.isnan(got.z)
    assert got.band == "undefined"
    assert got.to_dict()["kappa"] is None


def test_constant_reviewer_has_zero_kappa_and_no_z() -> None:
    # One reviewer said match throughout: p_o equals p_e, and the null SE is exactly 0.
    got = cohen_kappa([[6, 4], [0, 0]])
    assert got.kappa == pytest.approx(0.0, abs=1e-12)
    assert got.se0 == 0.0
    assert math.isnan(got.z)


def test_bad_tables_are_rejected() -> None:
    for bad in ([[1, 2, 3]], [[1, -1], [0, 2]], [[0.5, 1], [1, 1]]):
        with pytest.raises(ValueError):
            cohen_kappa(bad)


# --- §4: Landis & Koch -----------------------------------------------------------------------


@pytest.mark.parametrize(
    ("kappa", "band"),
    [
        # Landis & Koch (1977) table [S: BMC Health Serv. Res. 2016 Table 1]; the
        # upper-inclusive convention at the cut points is docket's own choice, not the source's
        (-0.0001, "Poor"),
        (-1.0, "Poor"),
        (0.0, "Slight"),
        (0.2, "Slight"),
        (0.2000001, "Fair"),
        (0.4, "Fair"),
        (0.4000001, "Moderate"),
        (0.6, "Moderate"),
        (0.6000001, "Substantial"),
        (0.8, "Substantial"),
        (0.8000001, "Almost perfect"),
        (1.0, "Almost perfect"),
        (float("nan"), "undefined"),
        (None, "undefined"),
    ],
)
def test_landis_koch_edges(kappa: float | None, band: str) -> None:
    assert landis_koch(kappa) == band


def test_landis_koch_ignores_float_noise_at_a_cut_point() -> None:
    noisy = 0.1 * 3 - 0.1
    assert noisy > 0.2  # 0.20000000000000004
    assert landis_koch(noisy) == "Slight"
    with pytest.raises(ValueError):
        landis_koch(1.01)


# --- §8: PABAK -------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("table", "kappa", "value", "pi", "bi"),
    [
        # Cunningham 2009 Fig. 2 [S table; results C]
        ([[95, 4], [1, 0]], -0.0163, 0.9000, 0.95, 0.03),
        # Wikipedia 2×2 [S via howcodex]; PABAK, PI, BI [C]
        (WIKI_2X2, 0.4000, 0.4000, 0.10, -0.10),
        # Wikipedia "same p_o" tables, from memory; PABAK, PI, BI [C]
        ([[45, 15], [25, 15]], 0.1304, 0.2000, 0.30, -0.10),
        ([[25, 35], [5, 35]], 0.2593, 0.2000, -0.10, 0.30),
        # [C], checked against statsmodels fleiss_kappa(method='uniform')
        ([[80, 10], [5, 5]], 0.3182, 0.7000, 0.75, 0.05),
    ],
)
def test_pabak_two_by_two(
    table: list[list[int]], kappa: float, value: float, pi: float, bi: float
) -> None:
    # Formulas PABAK = 2p_o − 1, PI = (a − d)/N, BI = (b − c)/N:
    # [S] Statalist 2013-07 msg01157, citing Cunningham (2009)
    got = pabak(table)
    assert round(got.pabak, 4) == value
    assert got.prevalence_index == pytest.approx(pi)
    assert got.bias_index == pytest.approx(bi)
    k = cohen_kappa(table).kappa
    assert round(k, 4) == kappa
    # κ = (PABAK − PI² + BI²)/(1 − PI² + BI²): Byrt, Bishop & Carlin 1993, from memory
    pi2, bi2 = got.prevalence_index**2, got.bias_index**2
    assert k == pytest.approx((got.pabak - pi2 + bi2) / (1 - pi2 + bi2))


def test_pabak_k_categories() -> None:
    # (k p_o − 1)/(k − 1) [S, stats.stackexchange q/19601]; SAS 3×3 value [C], checked
    # against statsmodels fleiss_kappa(method='uniform')
    got = pabak(SAS_3X3)
    assert round(got.pabak, 4) == 0.5263
    assert got.k == 3
    assert got.prevalence_index is None and got.bias_index is None


def test_pabak_of_empty_table_is_nan() -> None:
    assert math.isnan(pabak([[0, 0], [0, 0]]).pabak)
    assert pabak([[0, 0], [0, 0]]).to_dict()["prevalence_index"] is None

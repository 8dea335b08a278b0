"""Agreement statistics against published worked examples (Cohen 1960; Fleiss 1971;
Krippendorff 2011; Landis & Koch 1977; Byrt, Bishop & Carlin 1993; each value's source beside
it)."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from docket.core.reviewing.agreement import (
    cohen_kappa,
    confusion,
    fleiss,
    fleiss_kappa,
    krippendorff_alpha_nominal,
    landis_koch,
    pabak,
    rating_counts,
)
from docket.core.reviewing.agreement_summary import overall_agreement, pairwise_agreement

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


# --- §2: Fleiss' kappa -----------------------------------------------------------------------

# Wikipedia "Fleiss' kappa" example, as table0 in statsmodels/stats/tests/test_inter_rater.py [S]
WIKI_FLEISS = [
    [0, 0, 0, 0, 14],
    [0, 2, 6, 4, 2],
    [0, 0, 3, 5, 6],
    [0, 3, 9, 2, 0],
    [2, 2, 8, 1, 1],
    [7, 7, 0, 0, 0],
    [3, 2, 6, 3, 0],
    [2, 5, 3, 2, 2],
    [6, 5, 2, 1, 0],
    [0, 2, 2, 3, 7],
]

# Fleiss 1971: 30 patients × 6 psychiatrists, diagnoses 1-5. Copied from the `diagnoses` array
# in statsmodels/stats/tests/test_inter_rater.py (commented "Fleiss 1971" there) [S]
DIAGNOSES = [
    [4, 4, 4, 4, 4, 4], [2, 2, 2, 5, 5, 5], [2, 3, 3, 3, 3, 5], [5, 5, 5, 5, 5, 5],
    [2, 2, 2, 4, 4, 4], [1, 1, 3, 3, 3, 3], [3, 3, 3, 3, 5, 5], [1, 1, 3, 3, 3, 4],
    [1, 1, 4, 4, 4, 4], [5, 5, 5, 5, 5, 5], [1, 4, 4, 4, 4, 4], [1, 2, 4, 4, 4, 4],
    [2, 2, 2, 3, 3, 3], [1, 4, 4, 4, 4, 4], [2, 2, 4, 4, 4, 5], [3, 3, 3, 3, 3, 5],
    [1, 1, 1, 4, 5, 5], [1, 1, 1, 1, 1, 2], [2, 2, 4, 4, 4, 4], [1, 3, 3, 5, 5, 5],
    [5, 5, 5, 5, 5, 5], [2, 4, 4, 4, 4, 4], [2, 2, 4, 5, 5, 5], [1, 1, 4, 4, 4, 4],
    [1, 4, 4, 4, 4, 5], [2, 2, 2, 2, 2, 4], [1, 1, 1, 1, 5, 5], [2, 2, 4, 4, 4, 4],
    [1, 3, 3, 3, 3, 3], [5, 5, 5, 5, 5, 5],
]  # fmt: skip


def test_fleiss_wikipedia_example() -> None:
    # κ 0.20993070442195522 [S, code docstrings]; P̄ and P̄e [C], checked against statsmodels
    got = fleiss(WIKI_FLEISS)
    assert round(got.p_bar, 4) == 0.3780
    assert round(got.p_bar_e, 4) == 0.2128
    assert round(got.kappa, 4) == 0.2099
    assert got.kappa == pytest.approx(0.20993070442195522, abs=1e-12)
    # null SE by the Fleiss–Nee–Landis 1979 form [C]
    assert got.se0 == pytest.approx(0.016965, abs=5e-7)
    assert got.z == pytest.approx(12.374, abs=5e-4)


def test_fleiss_1971_diagnoses() -> None:
    counts = rating_counts(DIAGNOSES, [1, 2, 3, 4, 5])
    assert counts.shape == (30, 5) and set(counts.sum(axis=1)) == {6}
    got = fleiss(counts)
    # R irr::kappam.fleiss κ = 0.4302445, z = 17.65183 [S, recorded in the statsmodels test file]
    assert got.kappa == pytest.approx(0.4302445, abs=5e-8)
    assert round(got.kappa, 4) == 0.4302
    assert got.z == pytest.approx(17.65183, abs=5e-6)
    assert got.se0 == pytest.approx(0.024374, abs=5e-7)  # [C]
    assert fleiss_kappa(counts) == got.kappa


def test_fleiss_rejects_uneven_or_thin_tables() -> None:
    with pytest.raises(ValueError, match=r"\[3, 2\] ratings"):
        fleiss_kappa(np.array([[2, 1], [1, 1]]))
    with pytest.raises(ValueError, match="at least two"):
        fleiss_kappa(np.array([[1, 0], [0, 1]]))
    with pytest.raises(ValueError):
        fleiss_kappa(np.zeros((0, 2)))
    with pytest.raises(ValueError, match="not one of"):
        rating_counts([["a", "b"]], ["a"])


def test_fleiss_single_category_is_undefined() -> None:
    got = fleiss([[3, 0], [3, 0]])
    assert math.isnan(got.kappa) and got.band == "undefined"


# --- §3: Krippendorff's alpha ----------------------------------------------------------------

# Krippendorff, "Computing Krippendorff's Alpha-Reliability", the "C" data [S: krippendorff
# package docstring, R irr / DescTools docs]; observers × units, None = missing
KRIPP_C = [
    [1, 2, 3, 3, 2, 1, 4, 1, 2, None, None, None],
    [1, 2, 3, 3, 2, 2, 4, 1, 2, 5, None, 3],
    [None, 3, 3, 3, 2, 3, 4, 2, 2, 5, 1, None],
    [1, 2, 3, 3, 2, 4, 4, 1, 2, 5, 1, None],
]


def test_krippendorff_nominal_example() -> None:
    # 0.743 [S, package docstring; M, paper]; 0.7434 = 904/1216 computed
    assert round(krippendorff_alpha_nominal(KRIPP_C), 4) == 0.7434
    assert krippendorff_alpha_nominal(KRIPP_C) == pytest.approx(904 / 1216, abs=1e-12)
    as_floats = np.array(KRIPP_C, dtype=float)  # None becomes NaN
    assert krippendorff_alpha_nominal(as_floats) == pytest.approx(904 / 1216, abs=1e-12)


def test_krippendorff_edge_cases() -> None:
    assert math.isnan(krippendorff_alpha_nominal([]))
    assert math.isnan(krippendorff_alpha_nominal([["a", None], [None, "b"]]))  # nothing pairable
    assert math.isnan(krippendorff_alpha_nominal([["a", "a"], ["a", "a"]]))  # one value only
    assert krippendorff_alpha_nominal([["a", "b"], ["a", "b"]]) == pytest.approx(1.0)
    with pytest.raises(ValueError):
        krippendorff_alpha_nominal([["a", "b"], ["a"]])


# --- summaries over reviewers (common practice: hold is reported beside kappa) --------------

M, N, H = "match", "non-match", "hold"
LABELS = {
    "maya": {1: M, 2: M, 3: N, 4: N, 5: H, 6: M, 7: N},
    "ravi": {1: M, 2: N, 3: N, 4: N, 5: M, 6: H, 8: M},
    "lena": {9: M, 10: N},
    "omar": {1: M, 2: M, 3: N, 4: M, 5: M, 6: M, 7: N},
}


def test_pairwise_excludes_hold_by_default() -> None:
    results = pairwise_agreement(LABELS)
    pairs = [(r.reviewer_a, r.reviewer_b) for r in results]
    assert pairs == [("maya", "ravi"), ("maya", "omar"), ("ravi", "omar")]  # lena shares nothing
    maya_ravi = results[0]
    assert maya_ravi.n_common == 6 and maya_ravi.n == 4
    assert maya_ravi.categories == ("match", "non-match")
    assert maya_ravi.table == [[1, 1], [0, 2]]
    assert maya_ravi.observed == pytest.approx(0.75)
    assert maya_ravi.hold_rate_a == pytest.approx(1 / 6)
    assert maya_ravi.hold_rate_b == pytest.approx(1 / 6)
    assert maya_ravi.cohen.kappa == pytest.approx(cohen_kappa([[1, 1], [0, 2]]).kappa)
    assert maya_ravi.pabak.pabak == pytest.approx(0.5)


def test_pairwise_with_hold_as_a_category() -> None:
    maya_ravi = pairwise_agreement(LABELS, include_hold=True)[0]
    assert maya_ravi.n == 6
    assert maya_ravi.categories == ("match", "non-match", "hold")
    assert maya_ravi.table == [[1, 1, 1], [0, 2, 0], [1, 0, 0]]
    assert maya_ravi.pabak.prevalence_index is None


def test_pairwise_rejects_unknown_labels() -> None:
    with pytest.raises(ValueError, match="maybe"):
        pairwise_agreement({"a": {1: "maybe"}, "b": {1: M}})


def test_pairwise_all_held_is_undefined_not_an_error() -> None:
    (result,) = pairwise_agreement({"a": {1: H}, "b": {1: M}})
    assert result.n == 0 and result.cohen.band == "undefined"
    assert json.loads(json.dumps(result.to_dict()))["cohen"]["kappa"] is None


def test_overall_uses_units_with_the_modal_number_of_ratings() -> None:
    got = overall_agreement(LABELS)
    # decided ratings per unit: 1-4 → 3, 5 → 2, 6 → 2, 7 → 2, 8/9/10 → 1
    assert (got.fleiss_units, got.fleiss_raters) == (4, 3)
    table = rating_counts([[M, M, M], [M, N, M], [N, N, N], [N, N, M]], ["match", "non-match"])
    assert got.fleiss_kappa == pytest.approx(fleiss_kappa(table))
    assert got.n_reviewers == 4 and got.n_units == 10 and got.alpha_units == 7
    data = [
        [M, M, N, N, None, M, N, None, None, None],
        [M, N, N, N, M, None, None, M, None, None],
        [None] * 8 + [M, N],
        [M, M, N, M, M, M, N, None, None, None],
    ]
    assert got.krippendorff_alpha == pytest.approx(krippendorff_alpha_nominal(data))


def test_overall_modal_tie_goes_to_more_ratings_and_hold_can_count() -> None:
    labels = {"a": {1: M, 2: N, 3: H}, "b": {1: M, 2: N, 3: H}, "c": {1: M, 3: H}}
    got = overall_agreement(labels)
    assert (got.fleiss_units, got.fleiss_raters) == (1, 3)  # sizes {3: 1, 2: 1}
    with_hold = overall_agreement(labels, include_hold=True)
    assert (with_hold.fleiss_units, with_hold.fleiss_raters) == (2, 3)
    assert with_hold.categories == ("match", "non-match", "hold")


def test_overall_with_no_overlap_is_undefined() -> None:
    got = overall_agreement({"a": {1: M}, "b": {2: N}})
    assert got.fleiss_units == 0 and math.isnan(got.fleiss_kappa)
    assert got.to_dict()["krippendorff_alpha"] is None


def test_every_result_serialises_to_json() -> None:
    for result in (
        cohen_kappa(SAS_3X3),
        pabak(WIKI_2X2),
        fleiss(WIKI_FLEISS),
        *pairwise_agreement(LABELS, include_hold=True),
        overall_agreement(LABELS),
    ):
        text = json.dumps(result.to_dict(), allow_nan=False)
        assert json.loads(text)

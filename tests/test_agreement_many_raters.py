"""Agreement of many raters against published worked examples (Fleiss 1971; Krippendorff 2011;
each value's source beside it), and the summaries over a project's reviewers."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from docket.core.reviewing.agreement import cohen_kappa, pabak
from docket.core.reviewing.agreement_many import (
    fleiss,
    fleiss_kappa,
    krippendorff_alpha_nominal,
    rating_counts,
)
from docket.core.reviewing.agreement_summary import overall_agreement, pairwise_agreement
from tests.test_agreement import SAS_3X3, WIKI_2X2

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

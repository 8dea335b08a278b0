"""Agreement summaries over reviewers: every pair of them, and all of them at once.

Built on the statistics in :mod:`agreement`; like it, pure and free of any project file.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Hashable, Mapping
from dataclasses import dataclass
from itertools import combinations
from typing import Any

import numpy as np

from .agreement import (
    _NAN,
    DECIDED,
    HOLD,
    UNDEFINED,
    WITH_HOLD,
    CohenResult,
    PabakResult,
    _ToDict,
    cohen_kappa,
    confusion,
    pabak,
)
from .agreement_intervals import (
    MIN_PAIRS,
    alpha_of_rows,
    fleiss_of_rows,
    many_interval,
    pabak_interval,
)
from .agreement_many import fleiss, krippendorff_alpha_nominal, rating_counts


@dataclass(frozen=True)
class PairwiseResult(_ToDict):
    """Agreement of two reviewers on the units both labelled.

    ``n_common`` units were labelled by both; ``n`` of them enter kappa (all of them with
    include_hold, else those where neither reviewer chose hold). Hold rates are shares of the
    common units.
    """

    reviewer_a: Hashable
    reviewer_b: Hashable
    include_hold: bool
    n_common: int
    n: int
    observed: float
    categories: tuple[str, ...]
    table: list[list[int]]  # rows: reviewer_a, columns: reviewer_b
    cohen: CohenResult
    pabak: PabakResult
    hold_rate_a: float
    hold_rate_b: float
    pabak_low: float | None = None
    pabak_high: float | None = None


@dataclass(frozen=True)
class OverallResult(_ToDict):
    """Agreement of all reviewers together.

    Fleiss' kappa needs the same number of ratings per unit, so it uses only the units with the
    modal number of ratings (ties go to the larger number): ``fleiss_units`` units with
    ``fleiss_raters`` ratings each. Krippendorff's alpha uses every unit, missing ratings
    allowed; ``alpha_units`` units had two or more ratings and so were pairable. Without
    include_hold a hold counts as no rating.
    """

    include_hold: bool
    categories: tuple[str, ...]
    n_reviewers: int
    n_units: int  # units with at least one rating counted
    fleiss_kappa: float
    fleiss_band: str
    fleiss_units: int
    fleiss_raters: int
    krippendorff_alpha: float
    alpha_units: int
    fleiss_low: float | None = None  # agreement_intervals.many_interval
    fleiss_high: float | None = None
    alpha_low: float | None = None
    alpha_high: float | None = None
    fleiss_ci_method: str | None = None
    alpha_ci_method: str | None = None


def _check_labels(labels: Mapping[Any, Mapping[Any, str]]) -> None:
    for reviewer, given in labels.items():
        for unit, label in given.items():
            if label not in WITH_HOLD:
                raise ValueError(
                    f"reviewer {reviewer!r} gave unit {unit!r} the label {label!r}; "
                    f"expected one of {list(WITH_HOLD)}"
                )


def pairwise_agreement(
    labels: Mapping[Any, Mapping[Any, str]], include_hold: bool = False
) -> list[PairwiseResult]:
    """Cohen's kappa, PABAK and the table for every two reviewers with units in common.

    ``labels`` maps reviewer -> unit -> "match" | "non-match" | "hold". By default kappa is over
    match / non-match on the units both reviewers decided, with each reviewer's hold rate on
    the common units reported beside it; with ``include_hold`` hold is a third category.
    Pairs come in the order of ``labels``; pairs with nothing in common are left out.
    """
    _check_labels(labels)
    categories = WITH_HOLD if include_hold else DECIDED
    results: list[PairwiseResult] = []
    for a, b in combinations(labels, 2):
        given_a, given_b = labels[a], labels[b]
        common = [unit for unit in given_a if unit in given_b]
        if not common:
            continue
        used = common
        if not include_hold:
            used = [u for u in common if given_a[u] != HOLD and given_b[u] != HOLD]
        table = confusion([given_a[u] for u in used], [given_b[u] for u in used], categories)
        cohen = cohen_kappa(table, categories)
        agree_low, agree_high = pabak_interval(int(np.trace(table)), len(used), len(categories))
        results.append(
            PairwiseResult(
                reviewer_a=a,
                reviewer_b=b,
                include_hold=include_hold,
                n_common=len(common),
                n=len(used),
                observed=cohen.observed,
                categories=categories,
                table=cohen.table,
                cohen=cohen,
                pabak=pabak(table),
                hold_rate_a=sum(given_a[u] == HOLD for u in common) / len(common),
                hold_rate_b=sum(given_b[u] == HOLD for u in common) / len(common),
                pabak_low=agree_low,
                pabak_high=agree_high,
            )
        )
    return results


def overall_agreement(
    labels: Mapping[Any, Mapping[Any, str]], include_hold: bool = False
) -> OverallResult:
    """Fleiss' kappa and Krippendorff's alpha (nominal) over all reviewers; see OverallResult."""
    _check_labels(labels)
    categories = WITH_HOLD if include_hold else DECIDED

    def counted(label: str | None) -> str | None:
        return label if label is not None and (include_hold or label != HOLD) else None

    per_unit: dict[Hashable, list[str]] = {}
    for given in labels.values():
        for unit, label in given.items():
            if counted(label) is not None:
                per_unit.setdefault(unit, []).append(label)
    sizes = Counter(len(v) for v in per_unit.values() if len(v) >= 2)
    kappa, band, modal, used = _NAN, UNDEFINED, 0, 0
    f_low = f_high = a_low = a_high = f_how = a_how = None
    if sizes:
        modal = max(sizes, key=lambda size: (sizes[size], size))
        chosen = [v for v in per_unit.values() if len(v) == modal]
        counts = rating_counts(chosen, categories)
        result = fleiss(counts)
        kappa, band, used = result.kappa, result.band, len(chosen)
        if used >= MIN_PAIRS:
            f_low, f_high, f_how = many_interval(counts, kappa, fleiss_of_rows(counts))
        pairable = rating_counts([v for v in per_unit.values() if len(v) >= 2], categories)
        if len(pairable) >= MIN_PAIRS:
            of_rows = alpha_of_rows(pairable.astype(float))
            a_low, a_high, a_how = many_interval(pairable, of_rows(np.arange(len(pairable))),
                                                 of_rows)
    data = [[counted(given.get(unit)) for unit in per_unit] for given in labels.values()]
    return OverallResult(
        include_hold=include_hold,
        categories=categories,
        n_reviewers=len(labels),
        n_units=len(per_unit),
        fleiss_kappa=kappa,
        fleiss_band=band,
        fleiss_units=used,
        fleiss_raters=modal,
        krippendorff_alpha=krippendorff_alpha_nominal(data),
        alpha_units=sum(len(v) >= 2 for v in per_unit.values()),
        fleiss_low=f_low,
        fleiss_high=f_high,
        alpha_low=a_low,
        alpha_high=a_high,
        fleiss_ci_method=f_how,
        alpha_ci_method=a_how,
    )

"""Agreement among many reviewers at once: Fleiss' kappa and Krippendorff's alpha (nominal).

Pure statistics like :mod:`agreement`, with its conventions: degenerate data never raises, and
an undefined coefficient is NaN with the band "undefined".
"""

from __future__ import annotations

import math
from collections.abc import Hashable, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from .agreement import _EPS, _NAN, UNDEFINED, _count_table, _ToDict, landis_koch


@dataclass(frozen=True)
class FleissResult(_ToDict):
    """Fleiss' (1971) kappa with its parts; se0 is the null SE of Fleiss, Nee & Landis (1979)."""

    n_subjects: int
    n_raters: int  # ratings per subject
    p_bar: float  # mean observed agreement over subjects
    p_bar_e: float  # chance agreement, sum of squared category shares
    kappa: float
    se0: float
    z: float
    band: str


def rating_counts(
    ratings: Sequence[Sequence[Hashable]], categories: Sequence[Hashable]
) -> np.ndarray:
    """Subjects x categories counts from one sequence of labels per subject (one per rater)."""
    index = {c: i for i, c in enumerate(categories)}
    out = np.zeros((len(ratings), len(index)), dtype=np.int64)
    for row, given in enumerate(ratings):
        for label in given:
            if label not in index:
                raise ValueError(f"label {label!r} is not one of {list(categories)}")
            out[row, index[label]] += 1
    return out


def fleiss(counts: Any) -> FleissResult:
    """Fleiss' kappa from a subjects x categories table of counts.

    Every subject must have the same number of ratings, at least 2; otherwise ValueError.
    Kappa is NaN (band "undefined") when every rating fell in one category.
    """
    table = _count_table(counts, square=False)
    per_subject = table.sum(axis=1)
    if table.size == 0 or np.any(per_subject != per_subject[0]) or per_subject[0] < 2:
        raise ValueError(
            "Fleiss' kappa needs at least one subject, and the same number of ratings for every"
            f" subject, at least two; got {per_subject.tolist()} ratings per subject"
        )
    m, n_sub = int(per_subject[0]), table.shape[0]
    shares = table.sum(axis=0) / (n_sub * m)
    p_bar = float(np.mean((np.sum(table.astype(float) ** 2, axis=1) - m) / (m * (m - 1))))
    p_bar_e = float(np.sum(shares**2))
    if 1.0 - p_bar_e < _EPS:
        return FleissResult(n_sub, m, p_bar, p_bar_e, _NAN, _NAN, _NAN, UNDEFINED)
    kappa = (p_bar - p_bar_e) / (1.0 - p_bar_e)
    pq = shares * (1.0 - shares)
    spread = float(pq.sum())
    var0 = 2.0 * (spread**2 - float(np.sum(pq * (1.0 - 2.0 * shares))))
    var0 /= n_sub * m * (m - 1) * spread**2
    se0 = math.sqrt(max(var0, 0.0))
    z = kappa / se0 if se0 > 0 else _NAN
    return FleissResult(n_sub, m, p_bar, p_bar_e, kappa, se0, z, landis_koch(kappa))


def fleiss_kappa(counts: Any) -> float:
    """Fleiss' kappa from a subjects x categories table of counts (see ``fleiss``)."""
    return fleiss(counts).kappa


def _missing(value: Any) -> bool:
    return value is None or (isinstance(value, (float, np.floating)) and math.isnan(value))


def krippendorff_alpha_nominal(data: Any) -> float:
    """Krippendorff's alpha for nominal values from reliability data (raters x units).

    Missing values are None or NaN; any other hashable value is a category. Units with fewer
    than two values are not pairable and drop out. NaN when nothing is pairable or only one
    value occurs.
    """
    rows = [list(row) for row in data]
    if not rows:
        return _NAN
    n_units = len(rows[0])
    if any(len(row) != n_units for row in rows):
        raise ValueError("reliability data must have one value (or None) per rater and unit")
    index: dict[Hashable, int] = {}
    units: list[int] = []
    values: list[int] = []
    for row in rows:
        for unit, value in enumerate(row):
            if not _missing(value):
                units.append(unit)
                values.append(index.setdefault(value, len(index)))
    counts = np.zeros((n_units, len(index)))
    np.add.at(counts, (np.asarray(units, dtype=np.intp), np.asarray(values, dtype=np.intp)), 1.0)
    per_unit = counts.sum(axis=1)
    pairable = per_unit >= 2
    counts, per_unit = counts[pairable], per_unit[pairable]
    n = float(per_unit.sum())
    # Coincidences: diagonal sum of the coincidence matrix, then alpha = 1 - D_o / D_e.
    agree = float(np.sum(np.sum(counts * (counts - 1.0), axis=1) / (per_unit - 1.0)))
    chance = n * n - float(np.sum(counts.sum(axis=0) ** 2))
    if n == 0 or chance <= 0:
        return _NAN
    return 1.0 - (n - 1.0) * (n - agree) / chance

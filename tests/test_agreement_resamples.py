"""Fleiss' kappa and Krippendorff's alpha of resampled rows, each row worked out once, are the
figures the resampled table gave, to the bit."""

from __future__ import annotations

import numpy as np
import pytest

from docket.core.reviewing.agreement_intervals import (
    alpha_from_counts,
    alpha_of_rows,
    bootstrap_interval,
    bootstrap_rows,
    fleiss_from_counts,
    fleiss_of_rows,
)


def _table(seed: int, n: int, raters: int, k: int) -> np.ndarray:
    rng = np.random.default_rng(seed)  # seeded ratings, mostly agreeing
    truth = rng.integers(0, k, n)
    ratings = np.where(rng.random((n, raters)) < 0.8, truth[:, None],
                       rng.integers(0, k, (n, raters)))
    return np.stack([np.bincount(r, minlength=k) for r in ratings]).astype(np.int64)


@pytest.mark.parametrize("seed, n, raters, k", [(1, 300, 2, 2), (2, 1000, 3, 3),
                                                 (3, 57, 4, 2), (4, 500, 2, 3)])
def test_each_resample_gives_the_figure_of_its_table(seed: int, n: int, raters: int,
                                                     k: int) -> None:
    table = _table(seed, n, raters, k)
    pairable = table.astype(float)
    fleiss, alpha = fleiss_of_rows(table), alpha_of_rows(pairable)
    rng = np.random.default_rng(seed + 100)
    for _ in range(50):
        rows = rng.integers(0, n, n)
        f, a = fleiss(rows), alpha(rows)
        assert f == fleiss_from_counts(table[rows]) or (np.isnan(f) and np.isnan(
            fleiss_from_counts(table[rows])))
        assert a == alpha_from_counts(pairable[rows])
    assert bootstrap_rows(n, fleiss, n_boot=300) == bootstrap_interval(
        table, fleiss_from_counts, n_boot=300)
    assert bootstrap_rows(n, alpha, n_boot=300) == bootstrap_interval(
        pairable, alpha_from_counts, n_boot=300)


def test_one_category_only_is_undefined_as_before() -> None:
    table = np.array([[2, 0]] * 40, dtype=np.int64)  # every rating the same: no chance term
    rows = np.arange(40)
    assert np.isnan(fleiss_of_rows(table)(rows)) and np.isnan(fleiss_from_counts(table))
    assert np.isnan(alpha_of_rows(table.astype(float))(rows))
    assert np.isnan(alpha_from_counts(table.astype(float)))

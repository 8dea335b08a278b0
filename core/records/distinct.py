"""Normalising a column: each distinct value once, through Arrow where that gives the same
answer as the per-value function (``normalise_arrow``), else value by value (``normalise``)."""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pandas as pd

from .normalise_arrow import apply

SMALL = 100


def per_distinct(values: pd.Series | list, func: Callable[[str], object]) -> np.ndarray:
    """Apply ``func`` to each distinct non-missing value once; missing stays None."""
    codes, uniques = pd.factorize(pd.Series(values, dtype=object), use_na_sentinel=True)
    uniques = np.asarray(uniques, dtype=object)
    # Arrow over many values where it is the same answer; below SMALL values its fixed cost
    # per call is more than normalising them one by one.
    many = apply(uniques, func) if len(uniques) >= SMALL else None
    done = np.array([*(many if many is not None else map(func, uniques)), None], dtype=object)
    return done[codes]  # code -1 (missing) picks the trailing None

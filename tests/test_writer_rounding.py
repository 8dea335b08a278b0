"""Stored similarities are Python's round(v, 4), missing as NULL, however they are computed."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.storage.writer import rounded_rows

# Python's built-in round is the reference (correctly rounded, Python documentation)
values = st.one_of(st.floats(0.0, 1.0), st.just(float("nan")),
                   st.integers(0, 100_000).map(lambda k: k / 100_000))  # many ties at the 5th place


@settings(max_examples=300, deadline=None)
@given(st.lists(st.lists(values, min_size=3, max_size=3), min_size=1, max_size=40))
def test_rounded_rows_equal_python_round(rows: list[list[float]]) -> None:
    s = np.array(rows, dtype=float)
    expected = [[None if np.isnan(v) else round(v, 4) for v in row] for row in rows]
    assert rounded_rows(s) == expected

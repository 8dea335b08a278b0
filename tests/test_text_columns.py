"""Record columns read into text: the column-at-a-time path gives what each cell alone gives."""

from __future__ import annotations

import sys

import numpy as np
import pandas as pd
from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.records import cell_text


def cell(v: object) -> str | None:
    # the rule stated cell by cell: missing or only whitespace is None, whole floats lose ".0"
    if v is None or (isinstance(v, float) and np.isnan(v)):
        return None
    if isinstance(v, float) and v.is_integer():
        v = int(v)
    if isinstance(v, bytes):  # UTF-8 text, or hexadecimal digits when it is not text
        v = v.decode() if v.isascii() else "0x" + v.hex()
    text = str(v)
    return None if text.strip() == "" else text


def test_blank_characters_are_pythons_whitespace() -> None:
    # str.isspace over every code point is the definition strip() uses (common practice)
    want = {chr(c) for c in range(sys.maxunicode + 1) if chr(c).isspace()}
    assert set(cell_text.BLANK) == want


texts = st.lists(st.one_of(st.none(), st.text(max_size=6),
                           st.sampled_from([" ", "\t", "\x1c", "\u3000 ", "\xa0x", "0", ""])),
                 min_size=1, max_size=30)


@settings(max_examples=60, deadline=None)
@given(texts)
def test_text_columns_match_cell_by_cell(values: list[str | None]) -> None:
    want = [cell(v) for v in values]
    for dtype in (object, "string"):
        got = cell_text.column_text(pd.Series(values, dtype=dtype)).tolist()
        assert got == want, dtype


@settings(max_examples=40, deadline=None)
@given(st.lists(st.one_of(st.floats(allow_nan=True, allow_infinity=True, width=64),
                          st.integers(-2**40, 2**40).map(float)), min_size=1, max_size=30))
def test_float_columns_match_cell_by_cell(values: list[float]) -> None:
    want = [cell(v) for v in values]
    assert cell_text.column_text(pd.Series(values, dtype=float)).tolist() == want
    as32 = pd.Series(np.clip(values, -1e30, 1e30), dtype=np.float32)
    assert cell_text.column_text(as32).tolist() == [cell(v) for v in as32.astype(object)]


def test_other_columns_match_cell_by_cell() -> None:
    cases = [pd.Series([1, 2, 1, -5]), pd.Series([True, False, True]),
             pd.Series(["a", 1, True, 1.0, None, b"x", " "], dtype=object),  # mixed: cell by cell
             pd.Series(["x", "\ud800"], dtype=object),  # a lone surrogate Arrow refuses
             pd.Series(pd.to_datetime(["2020-01-02", None])),
             pd.Series([None, None], dtype=object)]
    for s in cases:
        want = [None if pd.isna(v) else cell(v) for v in s.astype(object)]
        assert cell_text.column_text(s).tolist() == want, s.tolist()

"""Pair ids read as text and looked up in Arrow give what the per-id rule and pandas give."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pyarrow as pa
from hypothesis import given
from hypothesis import strategies as st

from docket.core.pairs.pair_files import _id_text, _lookup, _text

TRICKY = ["a1", "A", "0", " b", "b ", "", " ", "\t", "\x1c", "\x85", "\u00a0x", "\u3000",
          "é", "_x", "-1", None, np.nan, "Zz9", "\u2028"]


def _rule(values: list) -> list:
    # the rule the ids have always been read by: blank or missing is missing, else str(v)
    return [None if v is None or (isinstance(v, float) and np.isnan(v)) else _id_text(v)
            for v in values]


def _read(series: pd.Series) -> list:
    return [None if pd.isna(v) else v for v in series.tolist()]


def test_tricky_ids_are_read_as_the_rule_reads_them() -> None:
    series = pd.Series(TRICKY, dtype=object)
    assert _read(_text(series)) == _rule(TRICKY)
    arrow = pa.array(TRICKY, from_pandas=True)
    assert _read(_text(arrow.to_pandas(), arrow)) == _rule(TRICKY)


@given(st.lists(st.one_of(st.none(), st.text(max_size=4)), max_size=30))
def test_any_text_ids_are_read_as_the_rule_reads_them(values: list) -> None:
    assert _read(_text(pd.Series(values, dtype=object))) == _rule(values)


def test_mixed_values_fall_back_to_the_rule() -> None:
    values = ["x", 3, None, " "]
    assert _read(_text(pd.Series(values, dtype=object))) == ["x", "3", None, None]


@given(st.lists(st.text(max_size=3), unique=True, max_size=20),
       st.lists(st.text(max_size=3), max_size=30))
def test_ids_are_found_where_pandas_finds_them(records: list, ids: list) -> None:
    index = pd.Index(records, dtype=object)
    wanted = pd.Series(ids, dtype=object)
    assert _lookup(index, wanted).tolist() == index.get_indexer(wanted.to_numpy()).tolist()

"""The normalisers of :mod:`normalise` over many values at once, where Arrow gives the same result.

For ASCII text, folding is lower case and Python's ``\\w``, ``\\s`` and ``\\d`` are fixed sets of
characters, so one Arrow call per step over all the distinct values gives exactly what the
per-value functions give (tests/test_normalise_arrow.py compares them value by value). Other
values (accents, HTML entities, other scripts) still go through the per-value function.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc

from . import normalise

# Python's \s over ASCII (str.isspace: tab to carriage return, the four separators, space)
_ASCII_SPACE = r"\t\n\x0b\x0c\r\x1c-\x1f "
_NOT_WORD = r"[^0-9a-z_]+"  # after lower case: the ASCII characters \w leaves out
_SEPARATORS = rf"[{_ASCII_SPACE}\-./()_]+"
_PHONE = r"^\+?[0-9]{7,}$"


def _fast(values: pa.Array) -> np.ndarray:
    """Which values the Arrow path may take: ASCII, and (for HTML entities) no '&'."""
    ok = pc.and_(pc.string_is_ascii(values), pc.invert(pc.match_substring(values, "&")))
    return ok.to_numpy(zero_copy_only=False)


def _none_if_empty(values: pa.Array) -> np.ndarray:
    empty = pc.equal(values, "")
    return pc.if_else(empty, pa.scalar(None, values.type), values).to_numpy(
        zero_copy_only=False)


def words_many(values: pa.Array) -> np.ndarray:
    spaced = pc.replace_substring_regex(pc.ascii_lower(values), _NOT_WORD, " ")
    return _none_if_empty(pc.utf8_trim(spaced, " "))


def name_many(values: pa.Array) -> np.ndarray:
    out = words_many(values)
    several = np.flatnonzero(pc.match_substring(pa.array(out, pa.large_string()), " ")
                             .fill_null(False).to_numpy(zero_copy_only=False))
    out[several] = [" ".join(sorted(out[i].split())) for i in several]
    return out


def code_many(values: pa.Array) -> np.ndarray:
    text = pc.replace_substring_regex(pc.ascii_lower(values), _SEPARATORS, "")
    phone = pc.match_substring_regex(text, _PHONE)
    return _none_if_empty(pc.if_else(phone, pc.utf8_slice_codeunits(text, start=-9), text))


MANY: dict[Callable, Callable[[pa.Array], np.ndarray]] = {
    normalise.words: words_many, normalise.name: name_many, normalise.code: code_many}


def apply(uniques: np.ndarray, func: Callable[[str], object]) -> list[object] | None:
    """``func`` of each value (distinct, none missing), or None where no Arrow path applies."""
    many = MANY.get(func)
    if many is None or len(uniques) == 0 or pd.api.types.infer_dtype(uniques) != "string":
        return None
    try:
        values = pa.array(uniques, type=pa.large_string())
    except (pa.ArrowInvalid, pa.ArrowTypeError, UnicodeEncodeError):
        return None
    fast = _fast(values)
    out = np.empty(len(uniques), dtype=object)
    ix = np.flatnonzero(fast)
    if len(ix):
        out[ix] = many(values.take(pa.array(ix)))
    rest = np.flatnonzero(~fast)
    out[rest] = [func(uniques[i]) for i in rest]
    return out.tolist()

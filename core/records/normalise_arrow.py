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
_ASCII_BLANK = "\t\n\x0b\x0c\r\x1c\x1d\x1e\x1f "
_ASCII_SPACE = r"\t\n\x0b\x0c\r\x1c-\x1f "  # the same characters, as a regular expression
_SEPARATORS = rf"[{_ASCII_SPACE}\-./()_]+"
_PHONE = r"^\+?[0-9]{7,}$"
# where normalise.words drops a separator beside a digit ('DC-3716'): those values take the
# per-value path, which is one pattern with look-arounds
_CODE_JOINED = r"[0-9][-./][0-9A-Za-z_]|[0-9A-Za-z_][-./][0-9]"


def _fast(values: pa.Array, worded: bool) -> np.ndarray:
    """Which values the Arrow path may take: ASCII, (for HTML entities) no '&', and for words
    no separator joining a code."""
    ok = pc.and_(pc.string_is_ascii(values), pc.invert(pc.match_substring(values, "&")))
    if worded:
        ok = pc.and_(ok, pc.invert(pc.match_substring_regex(values, _CODE_JOINED)))
    return ok.to_numpy(zero_copy_only=False)


def _none_if_empty(values: pa.Array) -> np.ndarray:
    empty = pc.equal(values, "")
    return pc.if_else(empty, pa.scalar(None, values.type), values).to_numpy(
        zero_copy_only=False)


# Byte by byte, ASCII letters to lower case, digits and '_' kept, the rest (what \w leaves out)
# to a space: one translation of the array's whole data buffer, lengths and offsets unchanged.
_WORD_BYTES = bytes(b + 32 if 65 <= b <= 90 else
                    b if 48 <= b <= 57 or 97 <= b <= 122 or b == 95 else 32 for b in range(256))


def _words(values: pa.Array) -> pa.Array:
    """:func:`normalise.words` of ASCII values (none missing), "" where nothing is left: words one
    space apart (twice as fast as replacing a pattern, for titles)."""
    validity, offsets, data = values.buffers()
    text = b"" if data is None else data.to_pybytes().translate(_WORD_BYTES)
    spaced = pa.LargeStringArray.from_buffers(len(values), offsets, pa.py_buffer(text),
                                              validity, values.null_count, values.offset)
    parts = pc.split_pattern(spaced, " ")
    flat = pc.list_flatten(parts)
    kept = pc.not_equal(flat, "")  # runs of spaces and the ends give empty pieces
    counts = np.bincount(pc.list_parent_indices(parts).filter(kept).to_numpy(),
                         minlength=len(values))
    ends = np.zeros(len(values) + 1, dtype=np.int64)
    np.cumsum(counts, out=ends[1:])
    words = pa.LargeListArray.from_arrays(pa.array(ends), flat.filter(kept))
    return pc.binary_join(words, pa.scalar(" ", pa.large_string()))


def words_many(values: pa.Array) -> np.ndarray:
    return _none_if_empty(_words(values))


def name_many(values: pa.Array) -> np.ndarray:
    """Each value's words sorted within it: one sort of all words by (value, word), where
    Arrow's byte order is Python's order for ASCII."""
    parts = pc.split_pattern(_words(values), " ")
    flat = pc.list_flatten(parts)
    order = pc.sort_indices(pa.table({"value": pc.list_parent_indices(parts), "word": flat}),
                            sort_keys=[("value", "ascending"), ("word", "ascending")])
    sorted_words = pa.ListArray.from_arrays(parts.offsets, flat.take(order))
    return _none_if_empty(pc.binary_join(sorted_words, pa.scalar(" ", pa.large_string())))


def code_many(values: pa.Array) -> np.ndarray:
    text = pc.replace_substring_regex(pc.ascii_lower(values), _SEPARATORS, "")
    phone = pc.match_substring_regex(text, _PHONE)
    return _none_if_empty(pc.if_else(phone, pc.utf8_slice_codeunits(text, start=-9), text))


def iso_days(values: pa.Array) -> tuple[np.ndarray, np.ndarray]:
    """:func:`normalise.date` of values that begin "yyyy-m-d" after trimming: days since
    1970-01-01 (NaN for a date no calendar has), and which values begin so (the others need
    the per-value rules: day/month/year, words)."""
    text = pc.utf8_trim(values, _ASCII_BLANK)  # str.strip() for ASCII
    parts = pc.extract_regex(text, r"^(?P<y>[0-9]{4})-(?P<m>[0-9]{1,2})-(?P<d>[0-9]{1,2})")
    iso = pc.is_valid(parts).to_numpy(zero_copy_only=False)
    y, m, d = (pc.cast(pc.struct_field(parts, k), pa.int64()).fill_null(0).to_numpy()
               for k in ("y", "m", "d"))
    leap = (y % 4 == 0) & ((y % 100 != 0) | (y % 400 == 0))
    month_days = np.array([0, 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])
    ok = (y >= 1) & (m >= 1) & (m <= 12) & (d >= 1)
    ok &= d <= month_days[np.clip(m, 0, 12)] + (leap & (m == 2))
    # days from the civil calendar (proleptic Gregorian, as datetime.date counts them)
    yy = y - (m <= 2)
    era = yy // 400
    yoe = yy - era * 400
    doy = (153 * (m + np.where(m > 2, -3, 9)) + 2) // 5 + d - 1
    days = (era * 146097 + yoe * 365 + yoe // 4 - yoe // 100 + doy - 719468).astype(float)
    return np.where(ok, days, np.nan), iso


def date_many(values: pa.Array, read: Callable[[str], float | None] = normalise.date
              ) -> np.ndarray:
    days, iso = iso_days(values)
    out = np.empty(len(days), dtype=object)
    out[:] = [None if np.isnan(v) else float(v) for v in days.tolist()]
    rest = np.flatnonzero(~iso)
    if len(rest):
        strings = values.take(pa.array(rest)).to_pylist()
        out[rest] = [read(v) for v in strings]
    return out


def date_many_month_first(values: pa.Array) -> np.ndarray:
    return date_many(values, normalise.date_month_first)


MANY: dict[Callable, Callable[[pa.Array], np.ndarray]] = {
    normalise.words: words_many, normalise.name: name_many, normalise.code: code_many,
    normalise.date: date_many, normalise.date_month_first: date_many_month_first}


def apply(uniques: np.ndarray, func: Callable[[str], object]) -> list[object] | None:
    """``func`` of each value (distinct, none missing), or None where no Arrow path applies."""
    many = MANY.get(func)
    if many is None or len(uniques) == 0 or pd.api.types.infer_dtype(uniques) != "string":
        return None
    try:
        values = pa.array(uniques, type=pa.large_string())
    except (pa.ArrowInvalid, pa.ArrowTypeError, UnicodeEncodeError):
        return None
    fast = _fast(values, many in (words_many, name_many))
    out = np.empty(len(uniques), dtype=object)
    ix = np.flatnonzero(fast)
    if len(ix):
        out[ix] = many(values.take(pa.array(ix)))
    rest = np.flatnonzero(~fast)
    out[rest] = [func(uniques[i]) for i in rest]
    return out.tolist()

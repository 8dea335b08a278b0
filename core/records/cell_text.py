"""Cells of a table read as text: str, or None for a missing value.

Every value docket compares is text; a number, a Parquet list or a byte string is written the
way a person would read it (whole floats without '.0', lists as JSON, bytes as UTF-8 or hex).
"""

from __future__ import annotations

import json

import numpy as np
import pandas as pd
import pyarrow as pa
import pyarrow.compute as pc

# The characters str.isspace() accepts: a value made only of them is missing, as
# value.strip() == "" says (tests/test_text_columns.py checks the list against Python's)
BLANK = ("\t\n\x0b\x0c\r\x1c\x1d\x1e\x1f \x85\xa0\u1680\u2000\u2001\u2002\u2003\u2004"
         "\u2005\u2006\u2007\u2008\u2009\u200a\u2028\u2029\u202f\u205f\u3000")


def as_text(frame: pd.DataFrame) -> pd.DataFrame:
    # object columns of str and None: pandas would otherwise infer its own string dtype
    return pd.DataFrame({col: pd.Series(column_text(frame[col]), index=frame.index,
                                        dtype=object) for col in frame.columns},
                        index=frame.index)


def column_text(s: pd.Series) -> np.ndarray:
    """One column as str or None, exactly as :func:`_text` gives each cell.

    Text columns go through Arrow in one call per step (a Python call per cell was a quarter of
    reading a large table); numbers through their distinct values; anything else cell by cell.
    """
    if _is_text(s):
        try:
            arr = pa.array(s, type=pa.large_string(), from_pandas=True)
        except (pa.ArrowInvalid, pa.ArrowTypeError, UnicodeEncodeError):  # a lone surrogate
            pass
        else:
            blank = pc.equal(pc.utf8_trim(arr, BLANK), "")
            return pc.if_else(blank, pa.scalar(None, pa.large_string()), arr).to_numpy(
                zero_copy_only=False)
    if s.dtype == np.float16:  # Parquet's half floats: pandas builds no index of them (a
        # traceback); whole numbers exactly (65504, whose shortest text is 6.55e+04), others
        # by their shortest text, so 0.1 stays 0.1, not 0.0999755859375
        exact = s.astype(np.float64)
        s = exact.where(exact.mod(1).eq(0) | exact.isna(), s.astype(str).astype(np.float64))
    if s.dtype.kind in "iufb":
        codes, uniques = pd.factorize(s, use_na_sentinel=True)
        done = pd.Series(uniques, dtype=s.dtype).astype(object).map(_text).tolist()
        return np.array([*done, None], dtype=object)[codes]
    mask = s.isna().to_numpy()
    out = np.empty(len(s), dtype=object)
    out[:] = [None if m else _text(v) for v, m in zip(s.astype(object), mask, strict=True)]
    return out


def _is_text(s: pd.Series) -> bool:
    if isinstance(s.dtype, pd.StringDtype):
        return True
    return s.dtype == object and pd.api.types.infer_dtype(s, skipna=True) in ("string", "empty")


def _text(v: object) -> str | None:
    if isinstance(v, float) and v.is_integer():
        v = int(v)
    if isinstance(v, (np.ndarray, list, tuple, dict)):
        # a Parquet list, map or struct: JSON text, not numpy's "['a' 'b']"
        s = json.dumps(_plain(v), ensure_ascii=False, default=str)
    elif isinstance(v, bytes):
        s = _bytes_text(v)
    else:
        s = str(v)
    return s if s.strip() != "" else None


def _plain(v: object) -> object:
    if isinstance(v, np.ndarray | list | tuple):
        return [_plain(x) for x in v]
    if isinstance(v, dict):
        return {str(k): _plain(x) for k, x in v.items()}
    if isinstance(v, bytes):
        return _bytes_text(v)
    if isinstance(v, np.generic):
        return v.item()
    if isinstance(v, float) and not np.isfinite(v):
        return None if np.isnan(v) else str(v)
    return v


def _bytes_text(v: bytes) -> str:
    """Bytes as their UTF-8 text, or as hexadecimal digits when they are not text."""
    try:
        return v.decode("utf-8")
    except UnicodeDecodeError:
        return "0x" + v.hex()

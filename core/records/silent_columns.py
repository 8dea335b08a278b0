"""Columns that cannot tell one pair from another: no value in them, or one value in every
record. Compared, such a column gave every pair the same level, which the model still
weighed and the screens showed on every pair."""

from __future__ import annotations

import numpy as np
import pandas as pd

from .. import wording


def has_values(values: pd.Series) -> bool:
    # Stops at the first value with text, which nearly always answers. The column is not
    # copied: dropping its missing values (a new Series and index per column) and a string
    # copy of it raised a 2 x 250,000-record build's peak memory by 50 MB.
    column = values.to_numpy()
    return any(str(column[i]).strip() for i in np.flatnonzero(values.notna().to_numpy()))


def without_values(left: pd.DataFrame, right: pd.DataFrame | None, lcol: str, rcol: str,
                   left_name: str, right_name: str | None) -> str | None:
    """Why a column cannot be compared for want of values, or None when both sides have some."""
    if right is None:
        return None if has_values(left[lcol]) else f"{left_name}: column '{lcol}' holds no value"
    sides = ((left, lcol, left_name), (right, rcol, right_name or "the right table"))
    missing = [name if col == lcol else f"{name} (as '{col}')" for frame, col, name in sides
               if not has_values(frame[col])]
    if not missing:
        return None
    return f"column '{lcol}' holds no value in {' or in '.join(missing)}"


FEW = 20  # records: in fewer, one value throughout may be chance (a toy table all in Oslo)


def _one_value(values: pd.Series) -> str | None:
    """The value every record holds (``FEW`` records or more, none missing), else None."""
    if len(values) < FEW or values.isna().any():
        return None
    first = values.iloc[0]
    return str(first) if bool((values == first).all()) else None


def one_value(left: pd.DataFrame, right: pd.DataFrame | None, lcol: str, rcol: str,
              left_name: str, right_name: str | None) -> str | None:
    """Why a column tells no pair apart, every record of each side holding one value (a
    'country' of 'NO' throughout, a 'source' naming its file), or None."""
    sides = [(left, lcol, left_name)] if right is None else [
        (left, lcol, left_name), (right, rcol, right_name or "the right table")]
    held = [_one_value(frame[col]) for frame, col, _ in sides]
    if any(v is None for v in held):
        return None
    where = " and of ".join(f"{name} ({wording.quoted([v])})"
                            for (_, _, name), v in zip(sides, held, strict=True))
    return f"column '{lcol}' holds one value in every record of {where}, which tells no pair apart"


def silent_lines(left_out: dict[str, str], constant: list[str], most: int = 3) -> list[str]:
    """The warnings for columns left out (``left_out``: column -> why): one a column, but
    the columns of one value throughout in one line when more than ``most`` (a wide export
    held 28, each a line)."""
    grouped = len(constant) > most
    lines = [f"{why}; not compared (give --field {col}:KIND to compare it anyway)"
             for col, why in left_out.items() if not (grouped and col in constant)]
    if grouped:
        lines.append(f"{len(constant):,} columns hold one value in every record, which tells "
                     f"no pair apart: {', '.join(repr(c) for c in constant[:3])} and "
                     f"{len(constant) - 3:,} "
                     "more; not compared (give --field COL:KIND to compare one anyway)")
    return lines

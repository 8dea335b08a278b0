"""The pure scorer: (pairs, the records they name, a model) -> similarities, levels, scores.

No project-file access here, so the same functions run over a chunk of a Parquet file or as a
per-partition map on a distributed engine.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pandas as pd

from ..records import distinct, normalise
from ..types import FieldSpec
from . import compare, name_swap

CHUNK = 250_000


def normalised(fields: list[FieldSpec], frame: pd.DataFrame, side: str) -> dict[str, np.ndarray]:
    """One normalised value per record and field (each distinct raw value normalised once)."""
    out = {}
    for f in fields:
        column = f.left_column if side == "left" else f.right_column
        values = frame[column]
        out[f.name] = distinct.per_distinct(values, normalise.reader(f.kind, values))
    return out


def prepare(fields: list[FieldSpec], left_norm: dict[str, np.ndarray],
            right_norm: dict[str, np.ndarray]) -> dict[str, compare.Prepared]:
    """Per field, the work done once per record rather than once per pair (and the codes of
    name fields beside each other, for :mod:`name_swap`)."""
    out = {f.name: compare.prepare(f.kind, left_norm[f.name], right_norm[f.name])
           for f in fields}
    out.update(name_swap.prepare(fields, left_norm, right_norm))
    return out


def compare_pairs(fields: list[FieldSpec], left_norm: dict[str, np.ndarray],
                  right_norm: dict[str, np.ndarray], li: np.ndarray, ri: np.ndarray,
                  progress: Callable[[int, int], None] | None = None,
                  frequent: dict[str, list] | None = None,
                  prepared: dict[str, compare.Prepared] | None = None
                  ) -> tuple[np.ndarray, np.ndarray]:
    """Similarities (float32, NaN = missing) and levels (int8), shape (pairs, fields).

    ``frequent`` names, per field, the values whose exact agreement is the level "exact,
    common" (see :mod:`random_pairs`); every other level of that field moves down by one.
    ``prepared`` (from :func:`prepare`) lets several calls share the per-record work.
    """
    n = len(li)
    frequent = frequent or {}
    is_common = {name: pd.Series(left_norm[name], dtype=object).isin(values).to_numpy()
                 for name, values in frequent.items()}
    sims = np.empty((n, len(fields)), dtype=np.float32)
    levels = np.empty((n, len(fields)), dtype=np.int8)
    steps = max(1, -(-n // CHUNK)) * len(fields)
    done = 0
    prepared = prepared or prepare(fields, left_norm, right_norm)
    for start in range(0, max(n, 1), CHUNK):
        sl = slice(start, min(n, start + CHUNK))
        for j, f in enumerate(fields):
            s, lv = compare.compare_field(f.kind, left_norm[f.name], right_norm[f.name],
                                          li[sl], ri[sl], prepared[f.name])
            if f.name in is_common:
                lv = np.where(lv == 0, is_common[f.name][li[sl]].astype(np.int8),
                              lv + 1).astype(np.int8)
            sims[sl, j] = s
            levels[sl, j] = lv
            done += 1
            if progress:
                progress(done, steps)
        name_swap.apply(fields, li[sl], ri[sl], sims[sl], levels[sl], frequent, prepared,
                        (left_norm, right_norm))
    return sims, levels


def pattern_codes(levels: np.ndarray, radix: int | list[int] = 16) -> np.ndarray:
    """One int64 per pair for its level vector, for fast grouping: one base for all fields, or
    one per field (mixed radix); every level must be below its base and the product of the
    bases within int64 (``group_patterns`` checks for its own use)."""
    code = np.zeros(len(levels), dtype=np.int64)
    for j in range(levels.shape[1]):
        base = radix if isinstance(radix, int) else radix[j]
        code = code * base + levels[:, j].astype(np.int64)
    return code


def level_counts(fields: list[FieldSpec], frequent: dict[str, list]) -> list[int]:
    """How many levels (missing included) each field's comparison gives."""
    return [len(compare.level_names(f.kind)) + (f.name in frequent) for f in fields]


def group_patterns(levels: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Distinct level vectors, the pattern index of each pair, and each pattern's count."""
    radix = int(levels.max()) + 1 if levels.size else 1
    if levels.shape[1] * max(radix - 1, 1).bit_length() < 63:  # one int64 per pair: much faster
        _, first, inverse, counts = np.unique(pattern_codes(levels, max(radix, 2)),
                                              return_index=True, return_inverse=True,
                                              return_counts=True)
    else:
        _, first, inverse, counts = np.unique(levels, axis=0, return_index=True,
                                              return_inverse=True, return_counts=True)
        inverse = inverse.reshape(-1)
    return levels[first].astype(np.int64), inverse, counts

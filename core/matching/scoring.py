"""The pure scorer: (pairs, the records they name, a model) -> similarities, levels, scores.

No project-file access here, so the same functions run over a chunk of a Parquet file or as a
per-partition map on a distributed engine.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import pandas as pd

from ..records import normalise
from ..types import FieldSpec
from . import compare
from .model import FSModel

CHUNK = 250_000


def normalised(fields: list[FieldSpec], frame: pd.DataFrame, side: str) -> dict[str, np.ndarray]:
    """One normalised value per record and field (each distinct raw value normalised once)."""
    out = {}
    for f in fields:
        column = f.left_column if side == "left" else f.right_column
        out[f.name] = normalise.per_distinct(frame[column], normalise.NORMALISERS[f.kind])
    return out


def compare_pairs(fields: list[FieldSpec], left_norm: dict[str, np.ndarray],
                  right_norm: dict[str, np.ndarray], li: np.ndarray, ri: np.ndarray,
                  progress: Callable[[int, int], None] | None = None
                  ) -> tuple[np.ndarray, np.ndarray]:
    """Similarities (float32, NaN = missing) and levels (int8), shape (pairs, fields)."""
    n = len(li)
    sims = np.empty((n, len(fields)), dtype=np.float32)
    levels = np.empty((n, len(fields)), dtype=np.int8)
    steps = max(1, -(-n // CHUNK)) * len(fields)
    done = 0
    for start in range(0, max(n, 1), CHUNK):
        sl = slice(start, min(n, start + CHUNK))
        for j, f in enumerate(fields):
            s, lv = compare.compare_field(f.kind, left_norm[f.name], right_norm[f.name],
                                          li[sl], ri[sl])
            sims[sl, j] = s
            levels[sl, j] = lv
            done += 1
            if progress:
                progress(done, steps)
    return sims, levels


def pattern_codes(levels: np.ndarray, radix: int = 8) -> np.ndarray:
    """One int64 per pair for its level vector (mixed radix), for fast grouping."""
    code = np.zeros(len(levels), dtype=np.int64)
    for j in range(levels.shape[1]):
        code = code * radix + levels[:, j].astype(np.int64)
    return code


def group_patterns(levels: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Distinct level vectors, the pattern index of each pair, and each pattern's count."""
    codes = pattern_codes(levels)
    _, first, inverse, counts = np.unique(codes, return_index=True, return_inverse=True,
                                          return_counts=True)
    return levels[first].astype(np.int64), inverse, counts


def score_levels(model: FSModel, levels: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Total match weight and match probability for rows of levels."""
    levels = np.asarray(levels, dtype=np.int64)
    return model.pattern_weight(levels), model.probability(levels)

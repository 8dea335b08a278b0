"""Sets of record pairs as position arrays: every pair of the records, each pair once."""

from __future__ import annotations

import numpy as np

from ..errors import DocketError

EVERY = "*"  # the rule that compares every pair: small tables need no blocking


def every_pair(n_left: int, n_right: int | None, max_pairs: int
               ) -> tuple[np.ndarray, np.ndarray]:
    """All pairs of the records (each unordered pair once in dedupe mode, n_right None)."""
    possible = n_left * (n_left - 1) // 2 if n_right is None else n_left * n_right
    if possible > max_pairs:
        raise DocketError(f"--block '{EVERY}' makes all {possible:,} pairs, over the cap of "
                          f"{max_pairs:,}; give blocking rules instead or raise --max-pairs")
    if n_right is None:
        li, ri = np.triu_indices(n_left, k=1)
        return li.astype(np.int64), ri.astype(np.int64)
    li, ri = np.divmod(np.arange(possible, dtype=np.int64), max(1, n_right))
    return li, ri


def dedupe_pairs(li: np.ndarray, ri: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    if len(li) == 0:
        return li, ri
    code = np.unique(li.astype(np.int64) * (int(ri.max()) + 1) + ri)
    width = int(ri.max()) + 1
    return code // width, code % width

"""The decision rule: which scored pairs count as predicted matches.

Shared by the scores export and by evaluation, so both read the same rule.
"""

from __future__ import annotations

import numpy as np
import pandas as pd


def predicted(frame: pd.DataFrame, threshold: float, one_to_one: bool) -> np.ndarray:
    """Predicted match at the threshold; with one-to-one, only mutual best pairs qualify."""
    yes = frame["probability"].to_numpy() >= threshold
    if not one_to_one:
        return yes
    order = frame.sort_values(["probability", "pair_id"], ascending=[False, True])
    best_left = ~order.duplicated("left_id")
    best_right = ~order.duplicated("right_id")
    mutual = pd.Series(best_left & best_right).reindex(frame.index).to_numpy()
    return yes & mutual

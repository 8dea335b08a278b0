"""The decision rule: which scored pairs count as predicted matches.

Shared by the scores export and by evaluation, so both read the same rule.
"""

from __future__ import annotations

from dataclasses import dataclass

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


DUPLICATE_FREE = 0.05  # a table whose records repeat another's values less often looks clean


def repeated_share(norm: dict[str, np.ndarray]) -> float:
    """Share of one table's records whose compared values (all of them, normalised) are those
    of another record of the same table: exact duplicates within the table."""
    frame = pd.DataFrame({k: pd.Series(v, dtype=object).astype(str) for k, v in norm.items()})
    if frame.empty:
        return 0.0
    return float(frame.duplicated(keep=False).mean())


@dataclass
class OneToOneHint:
    """Whether ``--one-to-one`` looks right for a link project before any label."""

    left_repeated: float
    right_repeated: float
    several: int  # records with more than one predicted match
    suggest: bool

    def to_dict(self) -> dict:
        return self.__dict__.copy()


def one_to_one_hint(lnorm: dict[str, np.ndarray], rnorm: dict[str, np.ndarray],
                    li: np.ndarray, ri: np.ndarray, yes: np.ndarray) -> OneToOneHint:
    """Suggest one-to-one when neither table repeats its own records and yet some records have
    several predicted matches (in a clean pair of tables, at most one of them can be right)."""
    left, right = repeated_share(lnorm), repeated_share(rnorm)
    several = int((np.bincount(li[yes]) > 1).sum() + (np.bincount(ri[yes]) > 1).sum()) \
        if yes.any() else 0
    clean = left < DUPLICATE_FREE and right < DUPLICATE_FREE
    return OneToOneHint(left, right, several, bool(clean and several > 0))


CROWDED = 3.0  # predicted matches per record that has one, past which the build says so


@dataclass
class Crowding:
    """How many predicted matches each record with one has, on average, before any label.

    Duplicates come a few to a record (over the bench scenarios 1.00 to 1.38, DBLP-ACM 1.11).
    Many more per record mean EM's match class is a value many records share (a town), not
    what makes records one: a supplier table whose copies all keep their town had 8.5 each.
    """

    predicted: int
    per_record: float

    def to_dict(self) -> dict:
        return self.__dict__.copy()


def crowding(li: np.ndarray, ri: np.ndarray, yes: np.ndarray, link: bool) -> Crowding:
    """Predicted matches per record that has one (in a link, the larger of the two sides')."""
    li, ri = np.asarray(li)[yes], np.asarray(ri)[yes]
    if not len(li):
        return Crowding(0, 0.0)
    sides = [li, ri] if link else [np.concatenate([li, ri])]
    per = max(float(len(ids) / len(np.unique(ids))) for ids in sides)
    return Crowding(len(li), per)

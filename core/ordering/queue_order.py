"""Which order a reviewer's queue follows: the model's uncertain pairs first (the default), or
the pairs machine raters disagree on first (``docket matchers PROJECT queue disagreement``).

Pure: the split shares from the raters' predictions, and the description ``evaluate`` prints
from what the project's meta records.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np

MODES = ("uncertain", "disagreement")
WORDS = {"uncertain": "the model's uncertain pairs first",
         "disagreement": "pairs the machine raters disagree on first, then the model's "
                         "uncertain pairs"}


def split_shares(predicted: Sequence[np.ndarray]) -> np.ndarray:
    """Per pair, the share of raters in the minority (0: all agree, 0.5: evenly split)."""
    votes = np.sum(predicted, axis=0)
    k = len(predicted)
    return np.minimum(votes, k - votes) / k


def split_first(first: list, rest: list, n: int) -> tuple[list, set[int]]:
    """The rows of split pairs, then ``rest`` without them, ``n`` at most; and the split ids."""
    ids = {r[0] for r in first}
    return (first + [r for r in rest if r[0] not in ids])[:n], ids


def describe(meta: dict[str, Any]) -> dict[str, Any]:
    """Which queue order the project uses, since when, and every earlier one."""
    current = meta.get("queue_order") or {"mode": "uncertain", "since": None, "raters": [],
                                          "split_pairs": 0}
    history = meta.get("queue_order_history", [])
    used = sorted({h["mode"] for h in history} | {current["mode"]})
    text = WORDS[current["mode"]]
    if current["since"]:
        text += f" (since {current['since'][:19]} UTC"
        text += f"; before that: {' then '.join(h['mode'] for h in history[:-1])})" \
            if len(history) > 1 else ")"
    return {**current, "history": history, "modes_used": used, "text": text,
            "audit_slice": "untouched by the order: drawn at creation, shown at a fixed rate"}

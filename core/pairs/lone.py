"""Which records no shared word pairs with another: the ones ``lone(col)`` searches for.

A name whose one distinctive word carries a typo shares no word with its copy (the other words,
"cafe" or "the", are held by too many records to be keys), so ``tokens(col)`` never pairs them.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..types import FieldSpec
from .neighbours import NEAR_KINDS
from .rules import Key, Rule, _drop_common_tokens, exploded


def alone(column: str, left: pd.DataFrame, right: pd.DataFrame | None,
          fields: list[FieldSpec]) -> tuple[np.ndarray, np.ndarray]:
    """Which records (left, right; the same in dedupe mode) no word of ``column`` pairs with
    another under ``tokens(column)``, words held by too many records left out as there."""
    rule = Rule((Key("tokens", column),))
    words_l, words_r = exploded(rule, left, right, fields)
    lk, rk = _drop_common_tokens(rule, words_l, words_r, 0.01)
    if rk is None:
        shared = lk.groupby("key")["pos"].transform("nunique") > 1
        paired_l = paired_r = lk["pos"][shared].to_numpy()
    else:
        paired_l = lk["pos"][lk["key"].isin(rk["key"])].to_numpy()
        paired_r = rk["pos"][rk["key"].isin(lk["key"])].to_numpy()

    def mask(n: int, words: pd.DataFrame, paired: np.ndarray) -> np.ndarray:
        out = np.zeros(n, dtype=bool)
        out[words["pos"].to_numpy()] = True  # a record with no word at all meets no one
        out[paired] = False
        return out

    out_l = mask(len(left), words_l, paired_l)
    return out_l, (out_l if right is None or words_r is None else
                   mask(len(right), words_r, paired_r))


def left_alone(rules: list[Rule], left: pd.DataFrame, right: pd.DataFrame | None,
               fields: list[FieldSpec], li: np.ndarray, ri: np.ndarray) -> dict[str, int]:
    """Per name or long-text ``col`` of a word rule (and no ``lone(col)``): the records that
    hold a value of it and are in no candidate pair (``li``, ``ri``). The word rule found them
    no partner, so no uncommon word of theirs is shared: the records ``lone(col)`` serves."""
    unpaired_l = np.ones(len(left), dtype=bool)
    unpaired_r = unpaired_l if right is None else np.ones(len(right), dtype=bool)
    unpaired_l[li] = False
    unpaired_r[ri] = False
    lone = {r.keys[0].column for r in rules if r.keys[0].func == "lone"}
    out = {}
    for f in fields:
        worded = any(len(r.keys) == 1 and r.keys[0].func == "tokens" and
                     r.keys[0].column == f.name for r in rules)
        if worded and f.kind in NEAR_KINDS and f.name not in lone:
            held_l = left[f.left_column].notna().to_numpy()
            out[f.name] = int((unpaired_l & held_l).sum())
            if right is not None:
                out[f.name] += int((unpaired_r & right[f.right_column].notna().to_numpy()).sum())
    return out

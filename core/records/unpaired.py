"""Columns of a link that no column of the other table is paired with, and --map pairs to offer.

Two shops or two registers seldom name their columns alike ('title' and 'name'); a build that
paired only the columns named alike compared one field of four and said nothing of the rest.
"""

from __future__ import annotations

import re
import shlex

import pandas as pd

_WORD = re.compile(r"\w+")
SAMPLE = 1000  # values read per column: enough words to tell which columns hold the same thing
MOST = 30  # columns per side looked at for a suggestion, so a wide table stays cheap
SHOWN = 8  # column names listed per side
AT_LEAST = 0.1  # the least share of words in common for a pair to be offered


def _words(values: pd.Series) -> set[str]:
    sample = values.dropna().astype(str).head(SAMPLE)
    return {w for v in sample for w in _WORD.findall(v.casefold())}


def suggested_pairs(left: pd.DataFrame, right: pd.DataFrame, left_cols: list[str],
                    right_cols: list[str]) -> list[tuple[str, str]]:
    """Unpaired columns whose values share the most words (by Jaccard), best first, each
    column in one pair at most; none below ``AT_LEAST``."""
    lw = {c: _words(left[c]) for c in left_cols[:MOST]}
    rw = {c: _words(right[c]) for c in right_cols[:MOST]}
    scored = []
    for lc, a in lw.items():
        for rc, b in rw.items():
            union = len(a | b)
            if union:
                scored.append((len(a & b) / union, lc, rc))
    out: list[tuple[str, str]] = []
    used_l: set[str] = set()
    used_r: set[str] = set()
    for share, lc, rc in sorted(scored, key=lambda t: -t[0]):
        if share < AT_LEAST:
            break
        if lc not in used_l and rc not in used_r:
            out.append((lc, rc))
            used_l.add(lc)
            used_r.add(rc)
    order = {c: i for i, c in enumerate(left_cols)}
    return sorted(out, key=lambda pair: order[pair[0]])  # read in the left table's order


def _names(cols: list[str]) -> str:
    shown = ", ".join(cols[:SHOWN])
    return shown + (f" and {len(cols) - SHOWN} more" if len(cols) > SHOWN else "")


def unpaired_warning(left: pd.DataFrame, right: pd.DataFrame, pairs: list[tuple[str, str]],
                     left_name: str, right_name: str) -> str | None:
    """One line naming the columns on both sides that are left out for want of a partner, with
    --map pairs to try; None when one side has none left (nothing there could be paired)."""
    lcols = [str(c) for c in left.columns if c not in {p[0] for p in pairs}]
    rcols = [str(c) for c in right.columns if c not in {p[1] for p in pairs}]
    if not lcols or not rcols:
        return None
    return (f"columns not compared, as the other table has none of that name: {left_name} "
            f"{_names(lcols)}; {right_name} {_names(rcols)}; "
            f"{map_advice(left, right, lcols, rcols)}")


def map_advice(left: pd.DataFrame, right: pd.DataFrame, left_cols: list[str],
               right_cols: list[str]) -> str:
    """What to pass: the --map pairs whose values share words, or the bare syntax."""
    offer = suggested_pairs(left, right, left_cols, right_cols)
    if not offer:
        return "pair the ones that hold the same thing with --map LEFT=RIGHT"
    maps = " ".join(f"--map {shlex.quote(f'{lc}={rc}')}" for lc, rc in offer)
    return (f"pair them with --map LEFT=RIGHT, for example {maps} (the columns whose values "
            "share the most words)")

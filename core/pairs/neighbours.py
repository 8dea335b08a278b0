"""Nearest neighbours by TF-IDF similarity: candidate pairs for free text.

Shared-word keys pair every two records that hold any one word in common: on titles or
descriptions that is either far too many pairs (common words) or too few (a typo in the one
rare word). Here each record meets instead the few records whose character 3-gram TF-IDF
vectors are closest to its own, whatever words they share. The rule ``near(col)`` stands
alone (it is not joined with other keys by ``&``).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from ..records import distinct, normalise, text_vectors

NEAR_K = 10  # neighbours per record (each side's records look for theirs in link mode)
# lone(col): a record that shares no word with any other meets only its very nearest
LONE_K = 3
NEAR_KINDS = ("longtext", "name")  # the kinds whose records near() and lone() compare
NEAR_FLOOR = 0.2  # cosine below which a neighbour is no candidate at all
# 3-grams held by more than a tenth of the values ("ing", " th") barely tell records apart
# but make the search's products dense: leaving them out makes it several times faster.
NEAR_MAX_SHARE = 0.1


def _texts(values: pd.Series) -> list[str]:
    done = distinct.per_distinct(values, normalise.words)
    return ["" if v is None else str(v) for v in done]


def near_pairs(left: pd.Series, right: pd.Series | None, k: int = NEAR_K,
               floor: float = NEAR_FLOOR,
               queries: tuple[np.ndarray, np.ndarray] | None = None
               ) -> tuple[np.ndarray, np.ndarray]:
    """Record positions (left, right) of each record's ``k`` nearest records on the other side
    (the same table in dedupe mode, each pair once with left < right); empty values meet none.

    ``queries`` (a mask of left and of right records; in dedupe mode both the same): only
    those records look for their nearest, among all records of the other side.
    """
    lt = _texts(left)
    rt = lt if right is None else _texts(right)
    vec = text_vectors.vectors(lt, rt, "char", NEAR_MAX_SHARE)
    if queries is not None:
        li, ri = _nearest_of(vec, right is None, queries, k, floor)
    elif right is None:
        a, b, _ = text_vectors.neighbours(vec.left, None, k, floor)
        li, ri = np.minimum(a, b), np.maximum(a, b)
    else:
        a, b, _ = text_vectors.neighbours(vec.left, vec.right, k, floor)
        c, d, _ = text_vectors.neighbours(vec.right, vec.left, k, floor)
        li, ri = np.concatenate([a, d]), np.concatenate([b, c])
    keep = np.array([bool(lt[i]) for i in li] if len(li) else [], dtype=bool)
    keep &= np.array([bool(rt[j]) for j in ri] if len(ri) else [], dtype=bool)
    return li[keep], ri[keep]


def _nearest_of(vec: text_vectors.Vectors, dedupe: bool, queries: tuple[np.ndarray, np.ndarray],
                k: int, floor: float) -> tuple[np.ndarray, np.ndarray]:
    """Pairs of each queried record with its ``k`` nearest on the other side (all of them)."""
    ql, qr = (np.flatnonzero(q) for q in queries)
    if dedupe:
        # the table is its own other side: a record's nearest is itself, asked one more
        a, b, _ = text_vectors.neighbours(vec.left[ql], vec.left, k + 1, floor)
        a = ql[a]
        other = a != b
        a, b = a[other], b[other]
        return np.minimum(a, b), np.maximum(a, b)
    a, b, _ = text_vectors.neighbours(vec.left[ql], vec.right, k, floor)
    c, d, _ = text_vectors.neighbours(vec.right[qr], vec.left, k, floor)
    return np.concatenate([ql[a], d]), np.concatenate([b, qr[c]])

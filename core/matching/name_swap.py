"""Two name fields written in each other's columns are read as the same names, 'close'.

A clerk who types the family name in the given name's box and the given name in the family
name's gives two records that disagree on both fields as written. With no labels, 11 of the 29
missed pairs of the invented people (``bench/invented_people.py``) and 7 of the registers' 12
were exactly such swaps. So where two name fields of a pair each hold exactly the other's value
(after normalising: sorted, case- and accent-folded words) and neither agrees as written, both
count as 'close', not 'exact': the swap is itself a slip. Exact values only: two integer
comparisons per pair on codes made once per record. A swap with a typo in it ('kolwick polan'
beside 'polan kolwlck') counts too where each crossed value is as similar as 'close' asks
(Jaro–Winkler 0.92), compared only for pairs whose two names both disagree as written and are
all present: 24 of the people's 140 misses with no labels were such.
"""

from __future__ import annotations

import numpy as np
from rapidfuzz.distance import JaroWinkler

from ..records import normalise
from ..types import FieldSpec
from . import compare

SWAPPED = "close, swapped"  # the level name the pair card shows for such a field
CLOSE = compare.KINDS["name"].cuts[0]  # a name's 'close': the least a crossed value may be


def cross_key(a: str, b: str) -> str:
    """The key of the codes of field ``a`` on the left beside field ``b`` on the right."""
    return f"{a}\x00{b}"


def name_pairs(fields: list[FieldSpec]) -> list[tuple[int, int]]:
    """Every two name fields, by position."""
    names = [i for i, f in enumerate(fields) if f.kind == "name"]
    return [(a, b) for k, a in enumerate(names) for b in names[k + 1:]]


def prepare(fields: list[FieldSpec], left_norm: dict[str, np.ndarray],
            right_norm: dict[str, np.ndarray]) -> dict[str, compare.Prepared]:
    """Codes of each name field's values beside each other name field's, one numbering each."""
    out: dict[str, compare.Prepared] = {}
    for a, b in name_pairs(fields):
        for x, y in ((fields[a].name, fields[b].name), (fields[b].name, fields[a].name)):
            out[cross_key(x, y)] = compare.prepare("code", left_norm[x], right_norm[y])
    return out


def close_level(field: FieldSpec, frequent: dict[str, list]) -> int:
    """The level 'close' of a name field: after 'exact', or 'exact, rare' and 'exact, common'."""
    return 2 if field.name in frequent else 1


def apply(fields: list[FieldSpec], li: np.ndarray, ri: np.ndarray, sims: np.ndarray,
          levels: np.ndarray, frequent: dict[str, list],
          prepared: dict[str, compare.Prepared],
          norm: tuple[dict[str, np.ndarray], dict[str, np.ndarray]] | None = None) -> None:
    """Set swapped name fields of the pairs (``li``, ``ri``) to 'close', in place; ``prepared``
    holds the codes :func:`prepare` makes (``scoring.prepare`` includes them). With ``norm``
    (each side's normalised values), a swap with a typo counts too: each crossed value at
    least as similar as 'close' asks ('kolwick polan' beside 'polan kolwlck')."""
    for a, b in name_pairs(fields):
        fa, fb = fields[a].name, fields[b].name
        ab, ba = prepared[cross_key(fa, fb)], prepared[cross_key(fb, fa)]
        la, lb = close_level(fields[a], frequent), close_level(fields[b], frequent)
        apart = (levels[:, a] > la) & (levels[:, b] > lb)
        hit = ((ab.lcodes[li] >= 0) & (ab.lcodes[li] == ab.rcodes[ri]) &
               (ba.lcodes[li] >= 0) & (ba.lcodes[li] == ba.rcodes[ri]) & apart)
        rows = np.flatnonzero(hit)
        if len(rows):
            levels[rows, a], levels[rows, b] = la, lb
            sims[rows, a] = sims[rows, b] = np.float32(0.999)  # equal, but not as written
        if norm is None:
            continue
        # the rest: every value present (a code of -1 is a missing value)
        rest = np.flatnonzero(apart & ~hit & (ab.lcodes[li] >= 0) & (ab.rcodes[ri] >= 0) &
                              (ba.lcodes[li] >= 0) & (ba.rcodes[ri] >= 0))
        if not len(rest):
            continue
        left, right = norm
        # the name comparator's own scorer (Jaro–Winkler, on the threads it is allowed)
        score = compare.SCORERS["name"]
        x = score(left[fa][li[rest]].tolist(), right[fb][ri[rest]].tolist())
        y = score(left[fb][li[rest]].tolist(), right[fa][ri[rest]].tolist())
        near = (x >= CLOSE) & (y >= CLOSE)
        rows = rest[near]
        if len(rows):
            levels[rows, a], levels[rows, b] = la, lb
            cap = np.float32(0.999)  # one crossed value may be equal: still not as written
            sims[rows, a], sims[rows, b] = np.minimum(x[near], cap), np.minimum(y[near], cap)


def swapped_fields(fields: list[FieldSpec], left: dict[str, str | None],
                   right: dict[str, str | None]) -> set[str]:
    """The name fields of one pair that :func:`apply` reads as swapped, from the two records'
    values as read (the pair card's view of them)."""
    out: set[str] = set()

    def norm(record: dict[str, str | None], f: FieldSpec, side: str) -> str | None:
        value = record.get(f.left_column if side == "left" else f.right_column)
        return normalise.name(value) if isinstance(value, str) else None

    for a, b in name_pairs(fields):
        fa, fb = fields[a], fields[b]
        la, lb = norm(left, fa, "left"), norm(left, fb, "left")
        ra, rb = norm(right, fa, "right"), norm(right, fb, "right")
        if la is None or lb is None or ra is None or rb is None or la == ra or lb == rb:
            continue
        if (la == rb and lb == ra) or (
                JaroWinkler.normalized_similarity(la, rb) >= CLOSE and
                JaroWinkler.normalized_similarity(lb, ra) >= CLOSE and
                not (JaroWinkler.normalized_similarity(la, ra) >= CLOSE or
                     JaroWinkler.normalized_similarity(lb, rb) >= CLOSE)):
            out |= {fa.name, fb.name}
    return out

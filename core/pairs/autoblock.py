"""Choosing blocking rules from the data when the user gives none."""

from __future__ import annotations

from typing import Any

import pandas as pd

from ..types import FieldSpec
from .blocking import rule_pairs
from .neighbours import NEAR_K, NEAR_KINDS
from .pair_sets import EVERY
from .rules import Rule, _drop_common_tokens, estimate_pairs, exploded, parse_rule

NEAR_MAX_RECORDS = 20_000  # both sides together: the exact search grows with their square

MAX_EXACT = 3
MAX_TOKENS = 2


def _filled(f: FieldSpec, left: pd.DataFrame, right: pd.DataFrame | None) -> float:
    """The share of records holding a value of ``f``, on the emptier side."""
    other = left if right is None else right
    return float(min(left[f.left_column].notna().mean(), other[f.right_column].notna().mean()))


def _budget(n_left: int, n_right: int, max_pairs: int) -> int:
    # Enough for every record to meet a few dozen candidates, far below all possible pairs.
    return min(max_pairs, max(10_000, 40 * (n_left + n_right)))


def choose_rules(left: pd.DataFrame, right: pd.DataFrame | None, fields: list[FieldSpec],
                 max_pairs: int) -> list[Rule]:
    """Cheap exact keys on distinctive fields, plus shared-word keys on name-like fields.

    Exact keys (codes, dates, distinctive numbers) catch pairs whose text is garbled; word keys
    catch pairs whose codes changed. On long text and names, nearest neighbours by TF-IDF
    similarity (``near``) take the word key's place where shared words cover less than half of
    the records or give each record more pairs than its few nearest. Each must cover at least
    half of the records, and their estimated pairs together stay within a budget that grows
    with the number of records. When no rule fits and all possible pairs fit in that budget
    (small tables), every pair is compared.
    """
    n_right = len(left) if right is None else len(right)
    budget = _budget(len(left), n_right, max_pairs)
    exact: list[Any] = []
    tokens: list[Any] = []
    for f in fields:
        lvals = left[f.left_column]
        if _filled(f, left, right) < 0.5:
            continue
        if f.kind in ("code", "date", "number"):
            distinct = lvals.nunique() / max(1, lvals.notna().sum())
            if distinct < 0.5:
                continue
            text, bucket = f.name, exact
        else:
            text, bucket = f"tokens({f.name})", tokens
        rule = parse_rule(text, fields)
        lk, rk = exploded(rule, left, right, fields)
        lk, rk = _drop_common_tokens(rule, lk, rk, 0.01)
        covered = lk["pos"].nunique() / max(1, len(left))
        words_fit = covered >= 0.5 and estimate_pairs(lk, rk) <= max_pairs
        # The estimate counts a pair once per shared word; the real join is what costs.
        found = len(rule_pairs(rule, left, right, fields, max_pairs)[0]) if words_fit else 0
        near_cap = NEAR_K * (len(left) + (0 if right is None else n_right))
        if bucket is tokens and f.kind in NEAR_KINDS and near_cap <= max_pairs and \
                len(left) + n_right <= NEAR_MAX_RECORDS and (not words_fit or found > near_cap):
            # Shared words cover too few records, or pair each with more than its few
            # nearest: the nearest by TF-IDF similarity are the better candidates.
            rule = parse_rule(f"near({f.name})", fields)
            found = len(rule_pairs(rule, left, right, fields, max_pairs)[0])
        elif not words_fit:
            continue
        if found == 0:  # a key no two records share finds nothing
            continue
        bucket.append((found, f.kind != "name", rule))
    chosen: list[Rule] = []
    spent = 0
    for pool, limit in ((sorted(exact, key=lambda t: t[0]), MAX_EXACT),
                        (sorted(tokens, key=lambda t: (t[1], t[0])), MAX_TOKENS)):
        taken = 0
        for pairs, _, rule in pool:
            if taken < limit and spent + pairs <= budget:
                chosen.append(rule)
                spent += pairs
                taken += 1
    possible = len(left) * (len(left) - 1) // 2 if right is None else len(left) * n_right
    if not chosen and possible <= budget:
        # No key covers the records, but there are few enough pairs to compare them all.
        chosen.append(parse_rule(EVERY, fields))
    return chosen


def unread_names(rules: list[Rule], left: pd.DataFrame, right: pd.DataFrame | None,
                 fields: list[FieldSpec], max_pairs: int) -> dict[str, int]:
    """When no chosen rule reads any name field (mostly filled): the narrowest join of one
    name's words with another name's words (else with a date's year) and the pairs it would
    make, as ``{rule: pairs}``. In a table of 170,000 invented people a family name's words
    alone would pair 29 million; no rule read a name and 7 % of the true pairs were no
    candidates (with ``tokens(given_name) & tokens(family_name)``, 139,797 more pairs: 2.5 %).
    Not chosen for the user: F1 before labels fell (DEVELOPERS.md, "Names in large tables")."""
    read = {k.column for r in rules for k in r.keys}
    names = [f for f in fields if f.kind == "name" and _filled(f, left, right) >= 0.5]
    if not names or any(f.name in read for f in names):
        return {}
    dates = [f for f in fields if f.kind == "date" and _filled(f, left, right) >= 0.5]
    joins = [(a, f"tokens({b.name})") for i, a in enumerate(names) for b in names[i + 1:]]
    for keys in (joins, [(a, f"year({d.name})") for a in names for d in dates]):
        best: tuple[int, Rule] | None = None
        for f, partner in keys:
            rule = parse_rule(f"tokens({f.name}) & {partner}", fields)
            lk, rk = _drop_common_tokens(rule, *exploded(rule, left, right, fields), 0.01)
            pairs = estimate_pairs(lk, rk)
            if lk["pos"].nunique() >= 0.5 * len(left) and 0 < pairs <= max_pairs and \
                    (best is None or pairs < best[0]):
                best = (pairs, rule)
        if best is not None:
            return {str(best[1]): best[0]}
    return {}

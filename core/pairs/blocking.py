"""Blocking: which record pairs become candidate pairs.

A rule is one or more keys joined by ``&``; records whose keys are all equal form a pair. Several
rules are OR-ed. Keys:

  ``col``           the normalised value
  ``col[:N]``       its first N characters
  ``tokens(col)``   any one shared word (words held by too many records are skipped)
                    or code split by spaces ('kx 450 b' meets 'KX-450B')
  ``digits(col)``   only its digits
  ``year(col)``     the year of a date
  ``near(col)``     each record's nearest records by TF-IDF similarity (a rule of its own, not
                    joined with ``&``; see :mod:`neighbours`)
  ``lone(col)``     ``near(col)`` for only the records that no shared word of ``col`` pairs
                    with another (a typo in the one distinctive word); a rule of its own

Example: ``--block "postcode" --block "tokens(owner) & year(born)"``.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..types import FieldSpec
from .lone import alone, left_alone
from .pair_sets import dedupe_pairs, every_pair
from .rules import Key, Rule, _drop_common_tokens, estimate_pairs, exploded, parse_rule

# rules.py and pair_sets.py hold these since blocking.py was split; read here by the package
# and the tests
__all__ = ["Key", "Rule", "every_pair", "parse_rule"]

DEFAULT_MAX_PAIRS = 5_000_000


@dataclass
class BlockingReport:
    rules: list[str]
    auto: bool
    pairs: int
    possible: int
    per_rule: dict[str, int] = field(default_factory=dict)  # pairs each rule finds on its own
    # per name or long-text field of a word rule: records in no pair whom no shared word of it
    # pairs with another (their copies with a typo in that word are found only by lone(col))
    alone: dict[str, int] = field(default_factory=dict)
    # chosen rules only: a narrower word rule (and its estimated pairs) per name no rule reads
    unread_names: dict[str, int] = field(default_factory=dict)

    @property
    def reduction_ratio(self) -> float:
        return 1.0 - self.pairs / self.possible if self.possible else 0.0

    def to_dict(self) -> dict:
        return {"rules": self.rules, "auto": self.auto, "pairs": self.pairs,
                "possible": self.possible, "reduction_ratio": self.reduction_ratio,
                "per_rule": self.per_rule, "alone": self.alone,
                "unread_names": self.unread_names}


def rule_keys(rule: Rule, left: pd.DataFrame, right: pd.DataFrame | None,
              fields: list[FieldSpec], max_pairs: int, token_share: float = 0.01
              ) -> tuple[pd.DataFrame, pd.DataFrame | None]:
    """Each record's keys under one rule, (pos, key) per side, checked against the pair cap.

    Joining the two on ``key`` gives the rule's pairs: in this process (``rule_pairs``) or
    as a distributed join (``dask_engine``).
    """
    if rule.keys[0].func in ("near", "lone", "every"):  # no key: nothing to join on
        raise DocketError(f"--block {str(rule)!r} runs in this process only; use it without "
                          "--engine dask, or give a word key such as tokens(...)")
    lk, rk = exploded(rule, left, right, fields)
    lk, rk = _drop_common_tokens(rule, lk, rk, token_share)
    expected = estimate_pairs(lk, rk)
    if expected > max_pairs:
        # one common value ('Quillsby' in a fifth of the towns) is often most of them
        sizes = lk["key"].value_counts() + (0 if rk is None else rk["key"].value_counts()
                                            .reindex(lk["key"].unique(), fill_value=0))
        top = sizes.idxmax()
        raise DocketError(f"--block {str(rule)!r} would make about {expected:,} pairs, over the "
                          f"cap of {max_pairs:,} (the key {str(top)!r} alone is held by "
                          f"{int(sizes.max()):,} records); add a key with & (for example "
                          f"'{rule} & {fields[0].name}[:2]') or raise --max-pairs")
    return lk, rk


def rule_pairs(rule: Rule, left: pd.DataFrame, right: pd.DataFrame | None,
               fields: list[FieldSpec], max_pairs: int, token_share: float = 0.01
               ) -> tuple[np.ndarray, np.ndarray]:
    """Record positions (left, right) of the pairs one rule finds; dedupe mode when no right."""
    if rule.keys[0].func in ("near", "lone"):
        return _near(rule, left, right, fields, max_pairs)
    if rule.keys[0].func == "every":
        return every_pair(len(left), None if right is None else len(right), max_pairs)
    lk, rk = rule_keys(rule, left, right, fields, max_pairs, token_share)
    joined = lk.merge(lk if rk is None else rk, on="key", suffixes=("_l", "_r"))
    li = joined["pos_l"].to_numpy(np.int64)
    ri = joined["pos_r"].to_numpy(np.int64)
    if rk is None:
        keep = li < ri
        li, ri = li[keep], ri[keep]
    return dedupe_pairs(li, ri)


def _near(rule: Rule, left: pd.DataFrame, right: pd.DataFrame | None,
          fields: list[FieldSpec], max_pairs: int) -> tuple[np.ndarray, np.ndarray]:
    from .neighbours import LONE_K, NEAR_K, near_pairs

    spec = next(f for f in fields if f.name == rule.keys[0].column)
    queries = None
    if rule.keys[0].func == "lone":
        queries = alone(spec.name, left, right, fields)
        expected = LONE_K * sum(int(q.sum()) for q in queries)
    else:
        expected = NEAR_K * (len(left) + (0 if right is None else len(right)))
    if expected > max_pairs:
        raise DocketError(f"--block {str(rule)!r} could make up to {expected:,} pairs, over "
                          f"the cap of {max_pairs:,}; raise --max-pairs")
    li, ri = near_pairs(left[spec.left_column],
                        None if right is None else right[spec.right_column],
                        k=NEAR_K if queries is None else LONE_K, queries=queries)
    return dedupe_pairs(li, ri)


def check_total(n: int, max_pairs: int) -> None:
    if n > max_pairs:
        raise DocketError(f"the rules together make {n:,} pairs, over the cap of "
                          f"{max_pairs:,}; use tighter rules or raise --max-pairs")


def block(rules: list[Rule], left: pd.DataFrame, right: pd.DataFrame | None,
          fields: list[FieldSpec], max_pairs: int = DEFAULT_MAX_PAIRS, auto: bool = False,
          progress: Callable[[int, int], None] | None = None
          ) -> tuple[np.ndarray, np.ndarray, np.ndarray, BlockingReport]:
    """OR of the rules: positions of left and right records, the first rule index, a report."""
    parts_l, parts_r, parts_rule = [], [], []
    per_rule: dict[str, int] = {}
    for i, rule in enumerate(rules):
        li, ri = rule_pairs(rule, left, right, fields, max_pairs)
        per_rule[str(rule)] = len(li)
        parts_l.append(li)
        parts_r.append(ri)
        parts_rule.append(np.full(len(li), i, dtype=np.int16))
        if progress:
            progress(i + 1, len(rules))
    li = np.concatenate(parts_l) if parts_l else np.zeros(0, np.int64)
    ri = np.concatenate(parts_r) if parts_r else np.zeros(0, np.int64)
    rule_ix = np.concatenate(parts_rule) if parts_rule else np.zeros(0, np.int16)
    width = max(len(left), 0 if right is None else len(right)) + 1
    code = li * width + ri
    _, first = np.unique(code, return_index=True)
    first.sort()
    li, ri, rule_ix = li[first], ri[first], rule_ix[first]
    check_total(len(li), max_pairs)
    n_l = len(left)
    possible = n_l * (n_l - 1) // 2 if right is None else n_l * len(right)
    report = BlockingReport([str(r) for r in rules], auto, len(li), int(possible), per_rule,
                            left_alone(rules, left, right, fields, li, ri))
    return li, ri, rule_ix, report

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

Example: ``--block "postcode" --block "tokens(owner) & year(born)"``.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records import distinct, normalise
from ..types import FieldSpec
from .rule_keys import key_parts
from .word_keys import Lists, known_runs, token_lists

_KEY = re.compile(r"^\s*(?:(tokens|digits|year|near)\s*\(\s*([^()]+?)\s*\)|([^\[\]()&]+?)"
                  r"(?:\[\s*:\s*(\d+)\s*\])?)\s*$")
DEFAULT_MAX_PAIRS = 5_000_000
EVERY = "*"  # the rule that compares every pair: small tables need no blocking


@dataclass(frozen=True)
class Key:
    func: str  # "value", "prefix", "tokens", "digits", "year", "near", "every"
    column: str
    length: int = 0

    def __str__(self) -> str:
        if self.func == "every":
            return EVERY
        if self.func == "value":
            return self.column
        if self.func == "prefix":
            return f"{self.column}[:{self.length}]"
        return f"{self.func}({self.column})"


@dataclass(frozen=True)
class Rule:
    keys: tuple[Key, ...]

    def __str__(self) -> str:
        return " & ".join(str(k) for k in self.keys)


@dataclass
class BlockingReport:
    rules: list[str]
    auto: bool
    pairs: int
    possible: int
    per_rule: dict[str, int] = field(default_factory=dict)  # pairs each rule finds on its own

    @property
    def reduction_ratio(self) -> float:
        return 1.0 - self.pairs / self.possible if self.possible else 0.0

    def to_dict(self) -> dict:
        return {"rules": self.rules, "auto": self.auto, "pairs": self.pairs,
                "possible": self.possible, "reduction_ratio": self.reduction_ratio,
                "per_rule": self.per_rule}


def parse_rule(text: str, fields: list[FieldSpec]) -> Rule:
    if text.strip() == EVERY:
        return Rule((Key("every", EVERY),))
    if any(part.strip() == EVERY for part in text.split("&")):
        raise DocketError(f"--block {text!r}: {EVERY} (every pair) stands alone; give it as "
                          f"--block '{EVERY}'")
    names = {f.name for f in fields}
    keys = []
    for part, known in key_parts(text, names):
        m = None if known else _KEY.match(part)
        groups = known or (m.groups() if m else None)
        if groups is None:
            raise DocketError(f"--block {text!r}: cannot read '{part.strip()}'; write keys like "
                              "postcode, owner[:3], tokens(title), digits(phone), year(born), "
                              "joined by &")
        func, inner, col, length = groups
        column = (inner or col).strip()
        if column not in names:
            raise DocketError(f"--block {text!r}: no compared field '{column}'; "
                              f"fields are {', '.join(sorted(names))}")
        if length is not None and int(length) == 0:  # every value's first 0 characters: one key
            raise DocketError(f"--block {text!r}: {column}[:0] is the same key for every record; "
                              f"give at least one character, for example {column}[:3]")
        key = (Key(func, column) if func else Key("prefix", column, int(length)) if length
               else Key("value", column))
        if key in keys:  # a traceback (KeyError) while joining on it
            raise DocketError(f"--block {text!r}: the key {key} is given twice; give it once")
        keys.append(key)
    if len(keys) > 1 and any(k.func == "near" for k in keys):
        raise DocketError(f"--block {text!r}: near(...) stands alone; give it as a rule of its "
                          "own, for example --block 'near(title)'")
    return Rule(tuple(keys))


def _key_values(key: Key, values: pd.Series, kind: str) -> tuple[Lists, Lists]:
    """Each record's key strings (a list, because tokens give several), and for tokens the
    runs that become keys where another record holds them as a word."""
    norm: Callable[[str], object]
    if key.func == "digits":
        def norm(v: str) -> object:
            return "".join(ch for ch in v if ch.isdigit()) or None
    elif key.func == "year":
        def norm(v: str) -> object:
            d = normalise.date(v)
            if d is None:
                return None
            return str(np.datetime64(int(d), "D").astype("datetime64[Y]"))
    elif key.func == "tokens":
        norm = normalise.words
    elif kind in ("number", "date", "code"):
        norm = normalise.reader(kind, values)
    else:
        norm = normalise.words
    done = distinct.per_distinct(values, norm)
    if key.func == "tokens":
        return token_lists(done)
    out: Lists = []
    for v in done:
        if v is None:
            out.append([])
        elif key.func == "prefix":
            out.append([str(v)[: key.length]])
        else:
            out.append([str(v)])
    return out, [[] for _ in out]  # only words make runs


def _frame(rule: Rule, per_key: list[Lists]) -> pd.DataFrame:
    """Frame of (pos, key) with one row per record and combined key."""
    result: pd.DataFrame | None = None
    for key, lists in zip(rule.keys, per_key, strict=True):
        pos = np.repeat(np.arange(len(lists)), [len(x) for x in lists])
        flat = [k for x in lists for k in x]
        part = pd.DataFrame({"pos": pos, str(key): flat})
        result = part if result is None else result.merge(part, on="pos")
    assert result is not None
    cols = [str(k) for k in rule.keys]
    key = result[cols[0]].astype(str)
    for c in cols[1:]:
        key = key + "\x1f" + result[c].astype(str)
    return pd.DataFrame({"pos": result["pos"].to_numpy(), "key": key.to_numpy()})


def exploded(rule: Rule, left: pd.DataFrame, right: pd.DataFrame | None,
             fields: list[FieldSpec]) -> tuple[pd.DataFrame, pd.DataFrame | None]:
    """(pos, key) frames of each side under one rule, before common words are dropped."""
    kind_of = {f.name: f.kind for f in fields}
    frames = [(left, {f.name: f.left_column for f in fields})]
    if right is not None:
        frames.append((right, {f.name: f.right_column for f in fields}))
    per_side: list[list[Lists]] = [[] for _ in frames]
    for key in rule.keys:
        sides = [_key_values(key, frame[cols[key.column]], kind_of[key.column])
                 for frame, cols in frames]
        kept = known_runs(sides) if key.func == "tokens" else [keys for keys, _ in sides]
        for i, lists in enumerate(kept):
            per_side[i].append(lists)
    lk = _frame(rule, per_side[0])
    return lk, (None if right is None else _frame(rule, per_side[1]))


def _drop_common_tokens(rule: Rule, left: pd.DataFrame, right: pd.DataFrame | None,
                        max_share: float) -> tuple[pd.DataFrame, pd.DataFrame | None]:
    if not any(k.func == "tokens" for k in rule.keys):
        return left, right
    n = left["pos"].nunique() + (0 if right is None else right["pos"].nunique())
    limit = max(10, int(max_share * n))
    counts = left["key"].value_counts()
    if right is not None:
        counts = counts.add(right["key"].value_counts(), fill_value=0)
    keep = set(counts.index[counts <= limit])
    left = left[left["key"].isin(keep)]
    return left, (None if right is None else right[right["key"].isin(keep)])


def estimate_pairs(left: pd.DataFrame, right: pd.DataFrame | None) -> int:
    """How many pairs a key join would make, without making them."""
    lc = left.groupby("key").size()
    if right is None:
        return int((lc * (lc - 1) // 2).sum())
    rc = right.groupby("key").size()
    both = lc.to_frame("l").join(rc.to_frame("r"), how="inner")
    return int((both["l"] * both["r"]).sum())


def rule_keys(rule: Rule, left: pd.DataFrame, right: pd.DataFrame | None,
              fields: list[FieldSpec], max_pairs: int, token_share: float = 0.01
              ) -> tuple[pd.DataFrame, pd.DataFrame | None]:
    """Each record's keys under one rule, (pos, key) per side, checked against the pair cap.

    Joining the two on ``key`` gives the rule's pairs: in this process (``rule_pairs``) or
    as a distributed join (``dask_engine``).
    """
    if rule.keys[0].func in ("near", "every"):  # no key: nothing to join on
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
    if rule.keys[0].func == "near":
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
    from .neighbours import NEAR_K, near_pairs

    spec = next(f for f in fields if f.name == rule.keys[0].column)
    expected = NEAR_K * (len(left) + (0 if right is None else len(right)))
    if expected > max_pairs:
        raise DocketError(f"--block {str(rule)!r} could make up to {expected:,} pairs, over "
                          f"the cap of {max_pairs:,}; raise --max-pairs")
    li, ri = near_pairs(left[spec.left_column],
                        None if right is None else right[spec.right_column])
    return dedupe_pairs(li, ri)


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
    report = BlockingReport([str(r) for r in rules], auto, len(li), int(possible), per_rule)
    return li, ri, rule_ix, report

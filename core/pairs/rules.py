"""Blocking rules read from their text, and each record's keys under one rule.

See :mod:`blocking` for the key syntax; this module parses a rule and explodes each record into
its (position, key) rows, which a join (in this process or distributed) turns into pairs.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records import distinct, normalise
from ..types import FieldSpec
from .pair_sets import EVERY
from .rule_keys import key_parts
from .word_keys import Lists, known_runs, token_lists

_KEY = re.compile(r"^\s*(?:(tokens|digits|year|near|lone)\s*\(\s*([^()]+?)\s*\)|([^\[\]()&]+?)"
                  r"(?:\[\s*:\s*(\d+)\s*\])?)\s*$")


@dataclass(frozen=True)
class Key:
    func: str  # "value", "prefix", "tokens", "digits", "year", "near", "lone", "every"
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
    alone = next((k.func for k in keys if k.func in ("near", "lone")), None)
    if len(keys) > 1 and alone:
        raise DocketError(f"--block {text!r}: {alone}(...) stands alone; give it as a rule of "
                          f"its own, for example --block '{alone}(title)'")
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

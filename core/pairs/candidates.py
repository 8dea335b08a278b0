"""Candidate pairs as keys, in this process: from a pairs file (streamed) or from blocking."""

from __future__ import annotations

import warnings
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records.sources import Table
from ..types import FieldSpec
from . import autoblock, blocking
from .pair_files import PairSource, id_batches, open_pairs, positions

Step = Callable[..., None]


def possible_pairs(left: Table, right: Table | None) -> int:
    n_l = len(left)
    return n_l * (n_l - 1) // 2 if right is None else n_l * len(right)


def width_of(left: Table, right: Table | None) -> int:
    return len(left) if right is None else len(right)


def given_keys(path: Path, left: Table, right: Table | None, step: Step
               ) -> tuple[np.ndarray, blocking.BlockingReport]:
    """Distinct pair keys of a pairs file, read batch by batch (8 bytes per pair held).

    Self pairs (one table: a record with itself) and repeated pairs are left out, counted and
    named in one warning.
    """
    source = open_pairs(path)
    other = left if right is None else right
    lindex, rindex = pd.Index(left.frame.index), pd.Index(other.frame.index)
    width = np.int64(width_of(left, right))
    parts: list[np.ndarray] = []
    batches: list[tuple[Path, int, np.ndarray]] = []  # part, its first row number, kept rows
    self_rows: list[str] = []
    n_self = done = row_in_part = 0
    last = None
    for part, a, b in id_batches(source):
        row_in_part = 0 if part != last else row_in_part
        last = part
        first_row = row_in_part + (1 if source.is_parquet else 2)
        li, ri = positions(part, a.reset_index(drop=True), b.reset_index(drop=True), lindex,
                           rindex, left.path.name, other.path.name, first_row)
        keep = np.ones(len(li), dtype=bool)
        if right is None:  # one table: (a, b) and (b, a) are the same pair
            li, ri = np.minimum(li, ri), np.maximum(li, ri)
            keep = li != ri
            n_self += int((~keep).sum())
            self_rows += [_row(source, part, first_row + int(i))
                          for i in np.flatnonzero(~keep)[:5 - len(self_rows)]]
        parts.append(li[keep] * width + ri[keep])
        batches.append((part, first_row, np.flatnonzero(keep)))
        row_in_part += len(a)
        done += len(a)
        step("reading candidate pairs", done, max(done, source.rows))
    every = np.concatenate(parts) if parts else np.zeros(0, dtype=np.int64)
    keys, first = np.unique(every, return_index=True)
    notes = []
    if n_self:
        notes.append(f"{n_self:,} pair(s) a record with itself, row(s) "
                     f"{', '.join(self_rows)}{'…' if n_self > 5 else ''}")
    if len(every) > len(keys):
        again = np.ones(len(every), dtype=bool)
        again[first] = False
        rows = [_row_at(source, batches, int(i)) for i in np.flatnonzero(again)[:5]]
        n_again = len(every) - len(keys)
        notes.append(f"{n_again:,} pair(s) given before (the same two ids, in either order), "
                     f"row(s) {', '.join(rows)}{'…' if n_again > 5 else ''}")
    if notes:
        warnings.warn(f"{path}: left out {'; and '.join(notes)}; each pair counts once",
                      UserWarning, stacklevel=3)
    report = blocking.BlockingReport(["given"], False, len(keys),
                                     int(possible_pairs(left, right)), {"given": len(keys)})
    return keys, report


def _row(source: PairSource, part: Path, row: int) -> str:
    return str(row) if len(source.parts) <= 1 else f"{part.name}:{row}"


def _row_at(source: PairSource, batches: list[tuple[Path, int, np.ndarray]], i: int) -> str:
    """The row of the i-th kept pair, counted over every batch."""
    for part, first_row, kept in batches:
        if i < len(kept):
            return _row(source, part, first_row + int(kept[i]))
        i -= len(kept)
    return "?"  # pragma: no cover - i is always within the batches


def rules_for(spec_rules: list[str], left: Table, right: Table | None, fields: list[FieldSpec],
              max_pairs: int, step: Step) -> tuple[list[blocking.Rule], bool]:
    if spec_rules:
        return [blocking.parse_rule(r, fields) for r in spec_rules], False
    step("choosing blocking rules")
    rules = autoblock.choose_rules(left.frame, None if right is None else right.frame, fields,
                                   max_pairs)
    if not rules:
        raise DocketError("no blocking rule could be chosen from the data; give one "
                          "with --block (for example --block 'tokens(name)')")
    return rules, True


def blocked_keys(rules: list[blocking.Rule], auto: bool, left: Table, right: Table | None,
                 fields: list[FieldSpec], max_pairs: int, step: Step
                 ) -> tuple[np.ndarray, np.ndarray, blocking.BlockingReport]:
    li, ri, rule_ix, report = blocking.block(
        rules, left.frame, None if right is None else right.frame, fields, max_pairs, auto,
        lambda d, t: step("blocking", d, t))
    return li * np.int64(width_of(left, right)) + ri, rule_ix, report

"""Candidate pairs as keys, in this process: from a pairs file (streamed) or from blocking."""

from __future__ import annotations

import bisect
import warnings
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records.sources import Table
from ..types import FieldSpec
from ..wording import many, noun
from . import autoblock, blocking
from .pair_files import PairSource, id_batches, positions, refuse_headless

Step = Callable[..., None]


def possible_pairs(left: Table, right: Table | None) -> int:
    n_l = len(left)
    return n_l * (n_l - 1) // 2 if right is None else n_l * len(right)


def width_of(left: Table, right: Table | None) -> int:
    return len(left) if right is None else len(right)


@dataclass
class GivenReader:
    """A pairs file read batch by batch into pair keys, with each kept pair's row number.

    Self pairs (one table: a record with itself) are dropped and counted here; repeated
    pairs are found by whoever collects the keys (all at once, or bucket by bucket), and both
    are named in one warning by :meth:`warn`.
    """

    source: PairSource  # opened (every part's footer checked) by the caller
    left: Table
    right: Table | None
    starts: list[tuple[Path, int, int]] = field(default_factory=list)  # part, row, first read
    self_rows: list[str] = field(default_factory=list)
    n_self: int = 0

    def batches(self, step: Step) -> Iterator[tuple[np.ndarray, np.ndarray]]:
        """(keys, read positions) per batch; a read position counts every row read."""
        left, right, source = self.left, self.right, self.source
        other = left if right is None else right
        lindex, rindex = pd.Index(left.frame.index), pd.Index(other.frame.index)
        width = np.int64(width_of(left, right))
        done = row_in_part = 0
        last = None
        for part, a, b in id_batches(source):
            if last is None:
                refuse_headless(source, lindex, rindex)
            row_in_part = 0 if part != last else row_in_part
            last = part
            first_row = row_in_part + (1 if source.is_parquet else 2)
            self.starts.append((part, first_row, done))
            li, ri = positions(part, a.reset_index(drop=True), b.reset_index(drop=True),
                               lindex, rindex, left.path.name, other.path.name, first_row)
            read = np.arange(done, done + len(li), dtype=np.int64)
            if right is None:  # one table: (a, b) and (b, a) are the same pair
                li, ri = np.minimum(li, ri), np.maximum(li, ri)
                keep = li != ri
                self.n_self += int((~keep).sum())
                self.self_rows += [self.row_name(int(i)) for i in
                                   read[~keep][:5 - len(self.self_rows)]]
                li, ri, read = li[keep], ri[keep], read[keep]
            yield li * width + ri, read
            row_in_part += len(a)
            done += len(a)
            step("reading candidate pairs", done, max(done, source.rows))

    def row_name(self, read: int) -> str:
        """The file row (``part:row`` for a folder of parts) of a read position."""
        i = bisect.bisect_right([s[2] for s in self.starts], read) - 1
        part, first_row, begun = self.starts[i]
        row = first_row + read - begun
        return str(row) if len(self.source.parts) <= 1 else f"{part.name}:{row}"

    def warn(self, n_again: int, again_rows: list[int]) -> None:
        notes = []
        if self.n_self:
            notes.append(f"{many(self.n_self, 'pair')} of a record with itself, "
                         f"{noun(self.n_self, 'row')} "
                         f"{', '.join(self.self_rows)}{'…' if self.n_self > 5 else ''}")
        if n_again:
            rows = [self.row_name(r) for r in sorted(again_rows)[:5]]
            notes.append(f"{many(n_again, 'pair')} given before (the same two ids, in either "
                         f"order), {noun(n_again, 'row')} "
                         f"{', '.join(rows)}{'…' if n_again > 5 else ''}")
        if notes:
            warnings.warn(f"{self.source.path}: left out {'; and '.join(notes)}; each pair "
                          "counts once", UserWarning, stacklevel=4)

    def nothing_left(self) -> DocketError:
        """The refusal of a pairs file that leaves no pair to review."""
        why = (f" ({many(self.n_self, 'pair')} of a record with itself, left out)"
               if self.n_self else "")
        return DocketError(f"{self.source.path}: holds no pair of two different records{why}; "
                           "give rows of a left id and a right id, one pair per row")

    def report(self, n_pairs: int) -> blocking.BlockingReport:
        return blocking.BlockingReport(["given"], False, n_pairs,
                                       int(possible_pairs(self.left, self.right)),
                                       {"given": n_pairs})


def first_seen(keys: np.ndarray, read: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Distinct keys (sorted) and the read positions of the repeats (every later sighting)."""
    distinct, first = np.unique(keys, return_index=True)
    if len(distinct) == len(keys):
        return distinct, np.zeros(0, dtype=np.int64)
    again = np.ones(len(keys), dtype=bool)
    again[first] = False
    return distinct, read[again]


def given_keys(source: PairSource, left: Table, right: Table | None, step: Step
               ) -> tuple[np.ndarray, blocking.BlockingReport]:
    """Distinct pair keys of a pairs file, all in memory (16 bytes per pair while reading)."""
    reader = GivenReader(source, left, right)
    keys, reads = [], []
    for k, r in reader.batches(step):
        keys.append(k)
        reads.append(r)
    every = np.concatenate(keys) if keys else np.zeros(0, dtype=np.int64)
    read = np.concatenate(reads) if reads else np.zeros(0, dtype=np.int64)
    distinct, again = first_seen(every, read)
    if not len(distinct):
        raise reader.nothing_left()
    reader.warn(len(again), again[:5].tolist())
    return distinct, reader.report(len(distinct))


def rule_fields(rule_names: list[str], fields: list[FieldSpec]) -> list[list[str]]:
    """The fields each rule's key reads, by its name ([] for given pairs and '*')."""
    out: list[list[str]] = []
    for name in rule_names:
        try:
            rule = blocking.parse_rule(name, fields)
        except DocketError:  # 'given': pairs from a file
            out.append([])
            continue
        out.append([k.column for k in rule.keys if k.func != "every"])
    return out


def rules_for(spec_rules: list[str], left: Table, right: Table | None, fields: list[FieldSpec],
              max_pairs: int, step: Step) -> tuple[list[blocking.Rule], bool]:
    if spec_rules:
        return [blocking.parse_rule(r, fields) for r in spec_rules], False
    step("choosing blocking rules")
    rules = autoblock.choose_rules(left.frame, None if right is None else right.frame, fields,
                                   max_pairs)
    if not rules:
        raise DocketError(_no_rule(left, right, fields, max_pairs))
    return rules, True


def _no_rule(left: Table, right: Table | None, fields: list[FieldSpec], max_pairs: int) -> str:
    """Why no rule was chosen, with an example that names a field of these tables: the line
    suggested 'tokens(name)' to a table of amounts and dates, and said nothing of why."""
    def empty(f: FieldSpec) -> float:
        shares = [left.frame[f.left_column].isna().mean()]
        if right is not None:
            shares.append(right.frame[f.right_column].isna().mean())
        return float(max(shares))

    first = fields[0]
    example = f"tokens({first.name})" if first.kind in ("name", "text", "longtext") else \
        first.name
    out = "no blocking rule could be chosen from the data"
    sparse = [(f.name, empty(f)) for f in fields]
    if sparse and all(share > 0.5 for _, share in sparse):
        out += (": every compared field is empty in more than half of the records ("
                + ", ".join(f"{name} {share:.0%}" for name, share in sparse[:6])
                + "), and a key must cover most of them")
    possible = possible_pairs(left, right)
    every = f", or --block '*' to compare all {possible:,} pairs" if possible <= max_pairs \
        else ""
    return f"{out}; give one with --block (for example --block '{example}'){every}"


def blocked_keys(rules: list[blocking.Rule], auto: bool, left: Table, right: Table | None,
                 fields: list[FieldSpec], max_pairs: int, step: Step
                 ) -> tuple[np.ndarray, np.ndarray, blocking.BlockingReport]:
    li, ri, rule_ix, report = blocking.block(
        rules, left.frame, None if right is None else right.frame, fields, max_pairs, auto,
        lambda d, t: step("blocking", d, t))
    if auto:
        report.unread_names = autoblock.unread_names(
            rules, left.frame, None if right is None else right.frame, fields, max_pairs)
    return li * np.int64(width_of(left, right)) + ri, rule_ix, report

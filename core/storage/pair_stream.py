"""Scoring every candidate pair in bounded chunks, in this process.

A pair is carried as its *key* (``left position * width + right position``, int64). The chunk
scorer turns keys into pattern codes through the pure scorer; the engine keeps one key, one
rule index and one pattern code per pair (18 bytes), counts the patterns, and hands back the
pairs a :class:`~docket.core.ordering.sampling.SamplePlan` keeps. ``dask_engine`` does the same on
Dask partitions with the same :class:`ChunkScorer`, so both give the same pairs and levels.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..matching import scoring
from ..ordering.sampling import SamplePlan, pick
from ..types import FieldSpec

CHUNK = 250_000


@dataclass
class ChunkScorer:
    """All a worker needs to score pairs: the fields and each record's normalised values."""

    fields: list[FieldSpec]
    left_norm: dict[str, np.ndarray]
    right_norm: dict[str, np.ndarray]
    width: int  # records on the right (the left table again in dedupe mode)
    frequent: dict[str, list] = field(default_factory=dict)  # values with a level "exact, common"
    prepared: dict[str, Any] | None = None  # per-record work shared by every chunk

    def positions(self, keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        keys = np.asarray(keys, dtype=np.int64)
        return keys // self.width, keys % self.width

    def compare(self, keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Similarities and levels of these pairs (the pure scorer)."""
        li, ri = self.positions(keys)
        return scoring.compare_pairs(self.fields, self.left_norm, self.right_norm, li, ri,
                                     frequent=self.frequent, prepared=self.prepared)

    @property
    def radix(self) -> list[int]:
        """Pattern codes: one mixed-radix digit per field, its base the field's level count."""
        return scoring.level_counts(self.fields, self.frequent)

    def codes(self, keys: np.ndarray) -> np.ndarray:
        return scoring.pattern_codes(self.compare(keys)[1], self.radix)


def levels_of(codes: np.ndarray, radix: list[int]) -> np.ndarray:
    """The level vectors of pattern codes (the inverse of ``scoring.pattern_codes``)."""
    codes = np.asarray(codes, dtype=np.int64).copy()
    out = np.zeros((len(codes), len(radix)), dtype=np.int64)
    for j in range(len(radix) - 1, -1, -1):
        out[:, j] = codes % radix[j]
        codes //= radix[j]
    return out


@dataclass
class Kept:
    """The pairs a build keeps, in the order pair ids are dealt: by first rule, then key."""

    keys: np.ndarray
    rule_ix: np.ndarray
    codes: np.ndarray
    sims: np.ndarray | None  # kept from the scoring pass when every pair is kept


def order_kept(keys: np.ndarray, rule_ix: np.ndarray, codes: np.ndarray,
               sims: np.ndarray | None = None) -> Kept:
    order = np.lexsort((keys, rule_ix))
    return Kept(keys[order], rule_ix[order], codes[order],
                None if sims is None else sims[order])


class InProcess:
    """Every pair's key, rule and pattern code in this process's memory, scored in chunks."""

    name = "in-process"

    def __init__(self, keys: np.ndarray, rule_ix: np.ndarray, keep_sims: bool) -> None:
        self.keys = np.asarray(keys, dtype=np.int64)
        self.rule_ix = np.asarray(rule_ix, dtype=np.int16)
        self.codes = np.zeros(len(self.keys), dtype=np.int64)
        self.keep_sims = keep_sims
        self.sims: np.ndarray | None = None

    def __len__(self) -> int:
        return len(self.keys)

    def score(self, scorer: ChunkScorer, progress: Callable[[int, int], None] | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
        """Distinct pattern codes (sorted) and how many pairs have each."""
        n = len(self.keys)
        if self.keep_sims:
            self.sims = np.empty((n, len(scorer.fields)), dtype=np.float32)
        for start in range(0, n, CHUNK):
            sl = slice(start, min(n, start + CHUNK))
            sims, levels = scorer.compare(self.keys[sl])
            self.codes[sl] = scoring.pattern_codes(levels, scorer.radix)
            if self.sims is not None:
                self.sims[sl] = sims
            if progress:
                progress(sl.stop, n)
        codes, counts = np.unique(self.codes, return_counts=True)
        return codes, counts

    def keep(self, plan: SamplePlan) -> Kept:
        ix = pick(self.keys, self.codes, plan)
        return order_kept(self.keys[ix], self.rule_ix[ix], self.codes[ix],
                          None if self.sims is None else self.sims[ix])

    def close(self) -> None:
        pass


def similarities(scorer: ChunkScorer, keys: np.ndarray,
                 progress: Callable[[int, int], None] | None = None) -> np.ndarray:
    """Similarities of the kept pairs, in chunks (the scoring pass kept only their codes)."""
    n = len(keys)
    out = np.empty((n, len(scorer.fields)), dtype=np.float32)
    for start in range(0, n, CHUNK):
        sl = slice(start, min(n, start + CHUNK))
        out[sl] = scorer.compare(keys[sl])[0]
        if progress:
            progress(sl.stop, n)
    return out

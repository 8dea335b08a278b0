"""Scoring every candidate pair in bounded chunks, in this process.

A pair is carried as its *key* (``left position * width + right position``, int64). The chunk
scorer turns keys into pattern codes through the pure scorer; the engine keeps one key, one
rule index and one pattern code per pair (18 bytes), counts the patterns, and hands back the
pairs a :class:`~docket.core.ordering.sampling.SamplePlan` keeps. ``dask_engine`` does the same on
Dask partitions with the same :class:`ChunkScorer`, so both give the same pairs and levels;
``spilled`` keeps a large pairs file's keys in bucket files on disk instead of in memory.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from ..matching import scoring
from ..matching.rule_classes import RuleRows
from ..ordering.sampling import Held, SamplePlan, pick
from ..types import FieldSpec
from .score_pool import score_all, workers_for

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
    sims: np.ndarray | None  # None: to be compared again (the Dask engine keeps none)


def order_kept(keys: np.ndarray, rule_ix: np.ndarray, codes: np.ndarray,
               sims: np.ndarray | None = None) -> Kept:
    order = np.lexsort((keys, rule_ix))
    return Kept(keys[order], rule_ix[order], codes[order],
                None if sims is None else sims[order])


class InProcess:
    """Every pair's key, rule and pattern code in this process's memory, scored in chunks.

    ``held`` says whose similarities the scoring pass keeps: every pair's when every pair will
    be kept; on a sampled build only those of the pairs whose sample hash is low (the sample
    keeps the lowest hashes of each stratum), so most kept pairs are not compared twice and
    memory stays bounded by the sample's size, not by the pairs'.
    """

    name = "in-process"

    def __init__(self, keys: np.ndarray, rule_ix: np.ndarray, held: Held,
                 workers: int | None = None) -> None:
        self.keys = np.asarray(keys, dtype=np.int64)
        self.rule_ix = np.asarray(rule_ix, dtype=np.int16)
        self.codes = np.zeros(len(self.keys), dtype=np.int64)
        self.held = held
        self.workers = workers_for(len(self.keys), workers)
        self.held_at = np.zeros(0, dtype=np.int64)  # positions whose similarities are held
        self.held_sims: np.ndarray | None = None

    def __len__(self) -> int:
        return len(self.keys)

    def score(self, scorer: ChunkScorer, progress: Callable[[int, int], None] | None = None
              ) -> tuple[np.ndarray, np.ndarray]:
        """Distinct pattern codes (sorted) and how many pairs have each."""
        at, sims = [], []
        for part in score_all(scorer, self.keys, self.held, self.workers, progress):
            self.codes[part.start:part.start + len(part.codes)] = part.codes
            at.append(part.held + part.start)
            sims.append(part.sims)
        if at:
            self.held_at = np.concatenate(at)
            self.held_sims = np.concatenate(sims)
        codes, counts = np.unique(self.codes, return_counts=True)
        return codes, counts

    def rule_rows(self, codes: np.ndarray, keys: list[list[str]]) -> RuleRows | None:
        """After :meth:`score`: the pairs counted by pattern and by the rule that found them."""
        return RuleRows.of(self.codes, self.rule_ix, codes, keys)

    def keep(self, plan: SamplePlan, scorer: ChunkScorer | None = None,
             progress: Callable[[int, int], None] | None = None) -> Kept:
        """The kept pairs with their similarities: held ones from the scoring pass, the rest
        (given a ``scorer``) compared again."""
        ix = pick(self.keys, self.codes, plan)
        sims = None
        if self.held_sims is not None and scorer is not None:
            sims = held_or_compared(self.held_at, self.held_sims, ix, self.keys[ix], scorer,
                                    progress, self.workers)
        self.held_sims = None
        return order_kept(self.keys[ix], self.rule_ix[ix], self.codes[ix], sims)

    def close(self) -> None:
        pass


def held_or_compared(held: np.ndarray, held_sims: np.ndarray | None, wanted: np.ndarray,
                     keys: np.ndarray, scorer: ChunkScorer,
                     progress: Callable[[int, int], None] | None, workers: int | None
                     ) -> np.ndarray:
    """Similarities of the ``wanted`` pairs (``keys`` theirs): from the scoring pass where it
    held them (``held`` sorted, rows of ``held_sims`` beside it), the rest compared again."""
    sims = np.empty((len(wanted), len(scorer.fields)), dtype=np.float32)
    where = np.searchsorted(held, wanted)
    hit = where < len(held)
    hit[hit] = held[where[hit]] == wanted[hit]
    if held_sims is not None:
        sims[hit] = held_sims[where[hit]]
    missing = np.flatnonzero(~hit)
    if len(missing):
        sims[missing] = similarities(scorer, keys[missing], progress, workers)
    return sims


def similarities(scorer: ChunkScorer, keys: np.ndarray,
                 progress: Callable[[int, int], None] | None = None,
                 workers: int | None = 1) -> np.ndarray:
    """Similarities of these pairs, in chunks (on ``workers`` processes when many)."""
    out = np.empty((len(keys), len(scorer.fields)), dtype=np.float32)
    for part in score_all(scorer, keys, Held(all=True), workers_for(len(keys), workers),
                          progress):
        out[part.start:part.start + len(part.codes)] = part.sims
    return out

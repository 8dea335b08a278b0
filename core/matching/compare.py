"""Comparators: per-field similarity and its discrete levels, vectorised over pairs.

This module is the pure scorer's first half: arrays of normalised values in, similarities and
levels out. It never touches the project file, so the same code runs over any chunk of pairs.
"""

from __future__ import annotations

from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Any

import numpy as np
import pandas as pd
from rapidfuzz import fuzz, process
from rapidfuzz.distance import OSA, JaroWinkler, Levenshtein

from ..records import text_vectors
from . import word_match

MISSING = "missing"

# rapidfuzz's threads per call: every core by default; a process that is one of several
# scoring workers (a pool, a Dask worker) asks for one, or the cores are asked for twice over.
_THREADS = {"workers": -1}


def use_threads(n: int) -> None:
    """How many threads each rapidfuzz call of this process may use (-1: every core)."""
    _THREADS["workers"] = int(n)


@contextmanager
def one_thread() -> Iterator[None]:
    """rapidfuzz on one thread for the duration (a task among many parallel ones)."""
    before = _THREADS["workers"]
    use_threads(1)
    try:
        yield
    finally:
        use_threads(before)


@dataclass(frozen=True)
class KindRule:
    """How one field kind is compared and cut into levels (best level first)."""

    levels: tuple[str, ...]
    cuts: tuple[float, ...]  # similarity lower bounds for levels[1:-1]; levels[0] means sim == 1


def _string_scorer(scorer: Callable, scale: float = 1.0) -> Callable[[list, list], np.ndarray]:
    def run(a: list, b: list) -> np.ndarray:
        if not a:
            return np.zeros(0, dtype=np.float32)
        out = process.cpdist(a, b, scorer=scorer, workers=_THREADS["workers"],
                             dtype=np.float32)
        return out / np.float32(scale) if scale != 1.0 else out
    return run


def _bands(cuts: tuple[float, ...]) -> tuple[str, ...]:
    return tuple(f"≥ {c:.2f}" for c in cuts)


# Fine bands keep most of the ranking a continuous similarity holds: the model weighs each band
# on its own (kept in order), so a pair at 0.93 is not lumped with one at 0.71.
LONG_CUTS = (0.90, 0.80, 0.70, 0.60, 0.50, 0.40, 0.30)
KINDS: dict[str, KindRule] = {
    "name": KindRule(("exact", "close", "similar", "different"), (0.92, 0.80)),
    "text": KindRule(("exact", "close", "similar", "different"), (0.90, 0.70)),
    "longtext": KindRule(("exact", *_bands(LONG_CUTS), "different"), LONG_CUTS),
    "code": KindRule(("exact", "one edit", "different"), ()),
    "number": KindRule(("exact", "near", "roughly", "different"), ()),
    "date": KindRule(("exact", "day/month swapped", "within a month", "different"), ()),
}

SCORERS: dict[str, Callable[[list, list], np.ndarray]] = {
    "name": _string_scorer(JaroWinkler.normalized_similarity),
    "text": _string_scorer(Levenshtein.normalized_similarity),
    "longtext": _string_scorer(fuzz.token_set_ratio, 100.0),
    "code": _string_scorer(OSA.normalized_similarity),
}


def level_names(kind: str) -> tuple[str, ...]:
    """All levels of a kind, the missing level last."""
    return (*KINDS[kind].levels, MISSING)


def _string_levels(kind: str, sim: np.ndarray, dist: np.ndarray | None) -> np.ndarray:
    """Levels of pairs of unequal values (equal ones are level 0 without being scored);
    ``dist``: the edit distance of codes."""
    rule = KINDS[kind]
    lv = np.full(len(sim), len(rule.levels) - 1, dtype=np.int8)
    for i, cut in reversed(list(enumerate(rule.cuts, start=1))):
        lv[sim >= cut] = i
    if dist is not None:
        lv[dist <= 1] = 1
    return lv


def _code_similarity(a: list, b: list) -> tuple[np.ndarray, np.ndarray]:
    """OSA distance and normalised similarity (1 - distance / longer length, as rapidfuzz's
    ``normalized_similarity`` works it out) from one pass of rapidfuzz instead of two."""
    dist = process.cpdist(a, b, scorer=OSA.distance, workers=_THREADS["workers"])
    longer = np.maximum(np.fromiter(map(len, a), np.int64, len(a)),
                        np.fromiter(map(len, b), np.int64, len(b)))
    return (1.0 - dist / np.maximum(longer, 1)).astype(np.float32), dist


def _compare_strings(kind: str, a: np.ndarray, b: np.ndarray, extra: Indexed | None,
                     same: np.ndarray | None) -> tuple[np.ndarray, np.ndarray]:
    """Similarity and level of present string values. Equal values are level 0 at 1.0 without
    being scored: a table's exact duplicates cost nothing."""
    if extra is None and kind in PER_VALUE:  # the corpus is every value, equal ones included
        extra = Indexed.of(kind, a.tolist(), b.tolist())
    if same is None:
        same = np.asarray(a == b, dtype=bool)
    sim = np.ones(len(a), dtype=np.float32)
    lv = np.zeros(len(a), dtype=np.int8)
    d = np.flatnonzero(~same)
    if len(d):
        la, lb = a[d].tolist(), b[d].tolist()
        dist = None
        if kind == "code":
            sd, dist = _code_similarity(la, lb)
        else:
            sd = _text_similarity(kind, la, lb, None if extra is None else extra.take(d))
        lv[d] = _string_levels(kind, sd, dist)
        sim[d] = np.minimum(sd, np.float32(0.999))  # unequal values are never shown as 1.00
    return sim, lv


def _number(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    a = a.astype(float)
    b = b.astype(float)
    diff = np.abs(a - b)
    # Integers such as years or ages are near within one unit; other numbers within 1 %. Decided
    # per pair: one 12.5 elsewhere in the column must not change how 2000 and 2019 compare.
    integers = (np.mod(a, 1) == 0) & (np.mod(b, 1) == 0)
    tol = np.where(integers, 1.0, 0.01 * np.maximum(np.abs(a), np.abs(b)))
    tol = np.where(tol == 0, 1e-9, tol)
    sim = (1.0 / (1.0 + diff / tol)).astype(np.float32)
    # 'roughly': a price or weight taken at another time or in another shop is a few percent
    # off, which says more than a number of another size altogether
    rough = 0.1 * np.maximum(np.abs(a), np.abs(b))
    lv = np.where(diff == 0, 0, np.where(diff <= tol, 1, np.where(diff <= rough, 2, 3)))
    lv = lv.astype(np.int8)
    return sim, lv


def _ymd(days: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    d = days.astype("int64").astype("datetime64[D]")
    months = d.astype("datetime64[M]")
    years = d.astype("datetime64[Y]")
    return (years.astype("int64"), (months - years.astype("datetime64[M]")).astype("int64") + 1,
            (d - months.astype("datetime64[D]")).astype("int64") + 1)


def _date(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    # numpy's day resolution holds any year to 9999 (nanosecond timestamps end in 2262)
    ya, ma, da = _ymd(a)
    yb, mb, db = _ymd(b)
    diff = np.abs(a.astype(float) - b.astype(float))
    swapped = (da == mb) & (ma == db) & (ya == yb) & (da != ma)
    lv = np.full(len(a), 3, dtype=np.int8)
    lv[diff <= 31] = 2
    lv[swapped] = 1
    lv[diff == 0] = 0
    sim = np.choose(lv, [1.0, 0.8, 0.6, 0.0]).astype(np.float32)
    near = lv == 2
    sim[near] = (0.6 + 0.2 * (1 - diff[near] / 31.0)).astype(np.float32)
    return sim, lv


def _text_similarity(kind: str, a: list, b: list, extra: Indexed | None) -> np.ndarray:
    """Long text: the mean of TF-IDF cosine over words and the token set ratio, so that rare
    shared words weigh more than common ones and a typo costs only its word. Names: the better
    of Jaro–Winkler on the sorted words and the word-by-word best match."""
    if extra is None:
        return SCORERS[kind](a, b)
    if kind == "name":
        whole = SCORERS[kind](a, b)
        # Two one-word names: word by word is the whole-string measure again.
        count = extra.data.count
        several = np.flatnonzero((count[extra.ia] > 1) | (count[extra.ib] > 1))
        words = word_match.best_match(extra.data, extra.ia[several], extra.ib[several],
                                      _THREADS["workers"])
        whole[several] = np.maximum(whole[several], words)
        initial = np.flatnonzero(word_match.initials(extra.data, extra.ia, extra.ib))
        whole[initial] = np.maximum(whole[initial], word_match.INITIAL)
        whole[word_match.generations_apart(extra.data, extra.ia, extra.ib)] = 0.0
        return whole
    cosine = text_vectors.row_cosine(extra.data, extra.data, extra.ia, extra.ib)
    tokens = SCORERS[kind](a, b)
    return ((cosine + tokens) / np.float32(2.0)).astype(np.float32)


def per_value(kind: str, distinct: list, spaced: bool = False) -> Any:
    """What a kind works out once per distinct value: long text its TF-IDF row, a name its
    words; None for other kinds. ``spaced``: the values are normalised (words one space apart).
    """
    if kind == "longtext":
        return text_vectors.corpus_rows(distinct, "word", spaced=spaced)
    if kind == "name":
        return word_match.name_words(distinct, spaced=spaced)
    return None


PER_VALUE = ("longtext", "name")


@dataclass
class Indexed:
    """A field's :func:`per_value` data, and which distinct value each compared value is."""

    data: Any
    ia: np.ndarray
    ib: np.ndarray

    def take(self, ix: np.ndarray) -> Indexed:
        return Indexed(self.data, self.ia[ix], self.ib[ix])

    @classmethod
    def of(cls, kind: str, a: list, b: list) -> Indexed:
        """The data of the values ``a`` and ``b`` alone, their own corpus."""
        corpus = list(dict.fromkeys([*a, *b]))
        at = {v: i for i, v in enumerate(corpus)}
        return cls(per_value(kind, corpus), np.array([at[v] for v in a], dtype=np.int64),
                   np.array([at[v] for v in b], dtype=np.int64))


def compare_values(kind: str, a: np.ndarray, b: np.ndarray, extra: Indexed | None = None,
                   codes: tuple[np.ndarray, np.ndarray] | None = None
                   ) -> tuple[np.ndarray, np.ndarray]:
    """Similarity (float32, NaN when missing) and level (int8) for aligned value arrays.

    ``extra`` (long text and names) holds the :func:`per_value` data of the field's distinct
    values and the entry of each of ``a`` and ``b``; without it the corpus is ``a`` and ``b``
    themselves. ``codes``: each
    value's position in one list of distinct values shared by both sides (-1 when missing), so
    that presence and exact agreement are integer comparisons.
    """
    n = len(a)
    sim = np.full(n, np.nan, dtype=np.float32)
    lv = np.full(n, len(KINDS[kind].levels), dtype=np.int8)  # the missing level
    if codes is None:
        present = np.asarray((a != None) & (b != None), dtype=bool)  # noqa: E711 - elementwise
    else:
        present = (codes[0] >= 0) & (codes[1] >= 0)
    if not present.any():
        return sim, lv
    pa, pb = a[present], b[present]
    if kind == "number":
        s, lvl = _number(pa, pb)
    elif kind == "date":
        s, lvl = _date(pa, pb)
    else:
        same = None if codes is None else codes[0][present] == codes[1][present]
        s, lvl = _compare_strings(kind, pa, pb, None if extra is None else extra.take(present),
                                  same)
    sim[present] = s
    lv[present] = lvl
    return sim, lv


@dataclass
class Prepared:
    """One field's values made ready once for all chunks of pairs: each record's code in one
    list of the distinct values of both sides (-1 when missing), and the :func:`per_value`
    data of those values."""

    lcodes: np.ndarray
    rcodes: np.ndarray
    values: np.ndarray  # object: the distinct values, then None (what code -1 picks)
    data: Any


def prepare(kind: str, left_norm: np.ndarray, right_norm: np.ndarray) -> Prepared:
    both = left_norm if right_norm is left_norm else np.concatenate([left_norm, right_norm])
    codes, uniques = pd.factorize(pd.Series(both, dtype=object), use_na_sentinel=True)
    codes = codes.astype(np.int64)
    lcodes, rcodes = codes[:len(left_norm)], codes[len(both) - len(right_norm):]
    distinct = np.asarray(uniques, dtype=object).tolist()
    values = np.array([*distinct, None], dtype=object)
    return Prepared(lcodes, rcodes, values, per_value(kind, distinct, spaced=True))


def compare_field(kind: str, left_norm: np.ndarray, right_norm: np.ndarray,
                  li: np.ndarray, ri: np.ndarray, prepared: Prepared | None = None
                  ) -> tuple[np.ndarray, np.ndarray]:
    """Compare one field over pairs given as record positions, each distinct value pair once.

    ``left_norm``/``right_norm`` hold one normalised value per record. Many pairs repeat the same
    two values (towns, species, years), so only distinct combinations are scored. ``prepared``
    (from :func:`prepare`) saves redoing the per-record work for every chunk of pairs.
    """
    prep = prepared or prepare(kind, left_norm, right_norm)
    width = len(prep.values)  # codes + 1 run from 0 (missing) to len(values) - 1
    combo = (prep.lcodes[li] + 1) * width + (prep.rcodes[ri] + 1)
    inverse, uniq = pd.factorize(combo)  # hashing: several times faster than sorting here
    ul = uniq // width - 1
    ur = uniq % width - 1
    extra = None
    if prep.data is not None:
        extra = Indexed(prep.data, np.maximum(ul, 0), np.maximum(ur, 0))
    sim, lv = compare_values(kind, prep.values[ul], prep.values[ur], extra, (ul, ur))
    return sim[inverse], lv[inverse]

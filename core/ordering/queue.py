"""Queue arithmetic: uncertainty priority, the audit slice and the overlap share.

Pure functions over arrays; the project facade stores what they return.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

STRATUM_EDGES = (0.0, 0.01, 0.1, 0.5, 0.9, 0.99)  # lower edges of probability strata
AUDIT_SHARE = 0.05
AUDIT_MAX = 1000
AUDIT_EVERY = 5  # every fifth pair a reviewer is shown comes from the audit slice
MIN_PER_STRATUM = 5


AUDIT_AND_OVERLAP = "audit, overlap"
UNCERTAIN_BAND = 0.35  # |p - threshold| below this is called "uncertain"


def reason_for(probability: float, threshold: float, audit: bool, second_look: bool,
               split: bool = False) -> str:
    """Why a pair is offered: named for what it is, "uncertain" only near the boundary.

    An audit pair that waits for a second reviewer is both, and is named so: the reviewer's
    label counts twice over (the estimates and the agreement figures).
    """
    if audit:
        return AUDIT_AND_OVERLAP if second_look else "audit"
    if second_look:
        return "overlap"
    if split:  # machine raters disagree on it (the disagreement-first order)
        return "disagreement"
    if abs(probability - threshold) < UNCERTAIN_BAND:
        return "uncertain"
    return "likely match" if probability >= threshold else "likely non-match"


ALIKE = 3  # at most this many look-alike pairs among a reviewer's last WINDOW...
WINDOW = 10  # ... while pairs that look otherwise are in reach
POOL = 60  # how far down the uncertain queue a pair may be brought forward


def look(probability: float) -> float:
    """Pairs whose probabilities agree to two decimals look alike to the model (levels pooled
    to one weight give different patterns the very same probability)."""
    return round(float(probability), 2)


def diversified(keys: list, recent: list, n: int, alike: int = ALIKE, window: int = WINDOW
                ) -> list[int]:
    """Positions in ``keys`` (the queue's next pairs, best first, by :func:`look`) to show.

    Look-alike pairs teach the model the same thing and tire the reviewer, so a pair is brought
    forward past those whose look already fills ``alike`` of the last ``window`` pairs
    (counting ``recent``, the reviewer's last pairs, oldest first): the best placed pair of
    another look. Only when the pool holds no other look does the queue's order stand.
    """
    history = list(recent)
    taken: list[int] = []
    left = list(range(len(keys)))
    while left and len(taken) < n:
        last = history[-window:]
        pick = next((i for i in left if last.count(keys[i]) < alike), left[0])
        left.remove(pick)
        taken.append(pick)
        history.append(keys[pick])
    return taken


def runs_broken(rows: list, recent: list[float], n: int) -> list:
    """Queue rows (probability fourth) in the order of :func:`diversified`."""
    keys = [look(r[3]) for r in rows]
    return [rows[i] for i in diversified(keys, [look(p) for p in recent], n)]


def priority(probability: np.ndarray, threshold: float) -> np.ndarray:
    """Distance from the decision boundary: the smallest is the most uncertain, shown first."""
    return np.abs(np.asarray(probability, dtype=float) - threshold)


def unit_hash(ids: np.ndarray, salt: int) -> np.ndarray:
    """A deterministic uniform number in [0, 1) per id (splitmix64), independent of order."""
    with np.errstate(over="ignore"):
        z = np.asarray(ids, dtype=np.uint64) + np.uint64(salt & 0xFFFFFFFFFFFFFFFF)
        z = z + np.uint64(0x9E3779B97F4A7C15)
        z = (z ^ (z >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
        z = (z ^ (z >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
        z = z ^ (z >> np.uint64(31))
    return (z >> np.uint64(11)).astype(np.float64) / float(1 << 53)


def stratum_of(probability: np.ndarray) -> np.ndarray:
    return np.searchsorted(np.asarray(STRATUM_EDGES[1:]), probability, side="right")


@dataclass
class AuditSlice:
    selected: np.ndarray  # bool per pair
    stratum: np.ndarray  # int per pair (every pair has a stratum)
    inclusion: np.ndarray  # inclusion probability of the pair's stratum, per pair
    order: np.ndarray  # position in the audit stream for selected pairs, -1 otherwise
    sizes: dict[int, tuple[int, int]]  # stratum -> (pairs in it, pairs drawn)


def default_audit_size(n_pairs: int) -> int:
    return int(min(AUDIT_MAX, max(min(n_pairs, 50), round(AUDIT_SHARE * n_pairs))))


def draw_audit(probability: np.ndarray, size: int, seed: int) -> AuditSlice:
    """Stratified random sample over probability strata.

    Half the slice is spread equally over the non-empty strata, half by Neyman allocation
    (N_h times the stratum's mean sqrt(p(1−p)), floored). The equal half makes sure the thin
    strata, where precision is decided, get enough pairs; the Neyman half follows where the
    uncertainty about the number of matches is. Every stratum gets at least a few pairs, and
    none gives more than half of its pairs (small strata excepted).
    """
    probability = np.asarray(probability, dtype=float)
    n = len(probability)
    stratum = stratum_of(probability)
    size = int(min(max(size, 0), n))
    selected = np.zeros(n, dtype=bool)
    inclusion = np.zeros(n, dtype=float)
    order = np.full(n, -1, dtype=np.int64)
    sizes: dict[int, tuple[int, int]] = {}
    if n == 0 or size == 0:
        return AuditSlice(selected, stratum, inclusion, order, sizes)
    rng = np.random.default_rng(seed)
    labels = np.unique(stratum)
    big_n = np.array([(stratum == h).sum() for h in labels])
    sd = np.array([np.sqrt(probability[stratum == h] * (1 - probability[stratum == h])).mean()
                   for h in labels])
    neyman = big_n * np.maximum(sd, 0.05)
    score = 0.5 * neyman / neyman.sum() + 0.5 / len(labels)
    # At most half of a stratum goes to the audit slice (small strata excepted), so that the
    # uncertain queue, which never takes audit pairs, keeps pairs near the threshold.
    caps = np.maximum(np.minimum(big_n, 2 * MIN_PER_STRATUM), big_n // 2)
    size = int(min(size, caps.sum()))
    alloc = _allocate(size, caps, score)
    for h, n_h, big in zip(labels, alloc, big_n, strict=True):
        members = np.flatnonzero(stratum == h)
        picked = rng.choice(members, size=int(n_h), replace=False)
        selected[picked] = True
        inclusion[members] = n_h / big
        sizes[int(h)] = (int(big), int(n_h))
    # Shown round-robin over strata (random within each), so that however few audit pairs
    # have been labelled, they already span the whole score range.
    chosen = rng.permutation(np.flatnonzero(selected))
    rank_in_stratum = np.zeros(len(chosen), dtype=np.int64)
    for h in labels:
        in_h = stratum[chosen] == h
        rank_in_stratum[in_h] = np.arange(in_h.sum())
    sequence = chosen[np.lexsort((stratum[chosen], rank_in_stratum))]
    order[sequence] = np.arange(len(sequence))
    return AuditSlice(selected, stratum, inclusion, order, sizes)


def _allocate(size: int, caps: np.ndarray, score: np.ndarray) -> np.ndarray:
    """Integer allocation summing to ``size``, within caps, at least a floor each."""
    alloc = np.minimum(caps, MIN_PER_STRATUM)
    if alloc.sum() >= size:  # too small a slice for the floor: spread it evenly
        alloc = np.zeros_like(caps)
        for i in range(size):
            open_ = np.flatnonzero(alloc < caps)
            alloc[open_[i % len(open_)]] += 1
        return alloc
    while alloc.sum() < size:
        room = caps - alloc
        active = room > 0
        want = score * active
        share = (size - alloc.sum()) * want / want.sum()
        add = np.minimum(np.floor(share).astype(np.int64), room)
        if add.sum() == 0:
            add[np.argmax(np.where(active, share - np.floor(share), -1))] = 1
        alloc = alloc + add
    return alloc


def overlap_flags(pair_ids: np.ndarray, share: float, salt: int) -> np.ndarray:
    """Which pairs stay in the queue until two reviewers have decided them (deterministic)."""
    return unit_hash(pair_ids, salt ^ 0x5EED) < share

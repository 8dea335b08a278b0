"""A project that stays small: every pair's pattern counted, a stratified sample of pairs kept.

The strata are the audit slice's probability strata under the model fitted on the counts of
*all* pairs. Within a stratum the kept pairs are a simple random sample without replacement:
the ones whose hash ``unit_hash(key, salt)`` is smallest (a bottom-k sample). The hash depends on
the pair alone, so the draw does not depend on the order or partitioning of the input, and the
bottom-k of each partition's bottom-k is the global one: in-process and on a cluster the same
pairs are kept.

The audit slice is then drawn from the kept pairs, within the same strata. A simple random
sample of a simple random sample is one, so an audit pair's inclusion probability is
a_h / N_h (drawn / all pairs of its stratum) and the estimators' stratum sizes are the
population's N_h: the estimates weigh up to all candidate pairs, not to the kept ones.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .queue import AuditSlice, stratum_of, unit_hash

DEFAULT_SAMPLE_ABOVE = 1_000_000
SALT = 0x5A3D_1E57


@dataclass
class Held:
    """Which pairs' similarities a scoring pass returns: all, none, or those whose sample hash
    is below ``below`` (the pairs a sample is likely to keep)."""

    all: bool = False
    salt: int = 0
    below: float = 0.0


@dataclass
class SamplePlan:
    """Which pairs a build keeps: per stratum, how many of how many."""

    codes: np.ndarray  # sorted distinct pattern codes
    stratum: np.ndarray  # the stratum of each code
    population: dict[int, int]  # stratum -> pairs in it (N_h)
    take: dict[int, int]  # stratum -> pairs kept (n_h <= N_h)
    salt: int

    @property
    def keeps_all(self) -> bool:
        return all(self.take[h] >= n for h, n in self.population.items())

    @property
    def kept(self) -> int:
        return int(sum(self.take.values()))

    @property
    def total(self) -> int:
        return int(sum(self.population.values()))

    def describe(self, sample_above: int) -> dict:
        """What ``status`` and ``evaluate`` print about the sample (stored in the project)."""
        return {
            "sampled": not self.keeps_all, "sample_above": int(sample_above),
            "population_pairs": self.total, "kept_pairs": self.kept,
            "strata": {str(h): [int(self.population[h]), int(self.take[h])]
                       for h in sorted(self.population)},
            "method": "every pair's comparison pattern counted; per model-probability stratum "
                      "a simple random sample of pairs kept (smallest pair hashes), inclusion "
                      "n_h / N_h; the audit slice is drawn from the kept pairs and weighted "
                      "to all pairs",
        }


def sampling_note(described: dict | None) -> dict | None:
    """``describe``'s record with the line ``evaluate`` prints (None: every pair kept)."""
    if not described:
        return None
    return {**described, "note": f"sampled project: {described['kept_pairs']:,} of "
                                 f"{described['population_pairs']:,} candidate pairs kept; "
                                 "audit pairs weigh n/N of their stratum over all pairs, so "
                                 "the estimates are of all candidate pairs"}


def allocate(sizes: dict[int, int], budget: int) -> dict[int, int]:
    """Spread ``budget`` over strata equally; a stratum smaller than its share is kept whole.

    The strata near the threshold are thin and are what reviewers see, so they are usually
    kept entirely; the mass of clear non-matches gives up most of its pairs.
    """
    take: dict[int, int] = {}
    left = max(0, int(budget))
    order = sorted(sizes, key=lambda h: (sizes[h], h))
    for i, h in enumerate(order):
        share = left // (len(order) - i)
        take[h] = int(min(sizes[h], share))
        left -= take[h]
    return take


def salt_of(seed: int) -> int:
    """The sample hash's salt for a build's seed."""
    return (int(seed) * 0x9E3779B1 + SALT) & 0xFFFFFFFF


def held_for(pairs: int, sample_above: int, seed: int) -> Held:
    """Whose similarities a scoring pass keeps: every pair's when all are kept; else those of
    the pairs whose hash is below twice the share kept overall. The sample keeps each
    stratum's lowest hashes, so a stratum thinned below that share finds all its kept pairs
    there; the rest (strata kept whole or nearly) are compared again. Memory: about twice the
    sample's pairs, however many pairs there are."""
    if pairs <= sample_above:
        return Held(all=True)
    return Held(salt=salt_of(seed), below=min(1.0, 2.0 * sample_above / pairs))


def make_plan(codes: np.ndarray, counts: np.ndarray, probability: np.ndarray, budget: int,
              seed: int) -> SamplePlan:
    """The sample for distinct pattern ``codes`` with their pair ``counts`` and probabilities."""
    stratum = stratum_of(np.asarray(probability, dtype=float))
    sizes: dict[int, int] = {}
    for h, n in zip(stratum.tolist(), np.asarray(counts).tolist(), strict=True):
        sizes[int(h)] = sizes.get(int(h), 0) + int(n)
    total = sum(sizes.values())
    take = dict(sizes) if total <= budget else allocate(sizes, budget)
    return SamplePlan(np.asarray(codes, dtype=np.int64), stratum.astype(np.int64), sizes, take,
                      salt_of(seed))


def pick(keys: np.ndarray, codes: np.ndarray, plan: SamplePlan) -> np.ndarray:
    """Positions (ascending) of the pairs ``plan`` keeps among these, by their keys and codes.

    Run on a part of the pairs it keeps a superset of that part's share of the global sample;
    run again on the union of the parts' picks it gives exactly the global sample.
    """
    keys = np.asarray(keys, dtype=np.int64)
    if plan.keeps_all or len(keys) == 0:
        return np.arange(len(keys))
    h = plan.stratum[np.searchsorted(plan.codes, np.asarray(codes, dtype=np.int64))]
    u = unit_hash(keys, plan.salt)
    out = []
    for s in np.unique(h).tolist():
        members = np.flatnonzero(h == s)
        k = plan.take.get(int(s), 0)
        if len(members) > k:
            members = members[np.lexsort((keys[members], u[members]))[:k]]
        out.append(members)
    return np.sort(np.concatenate(out)) if out else np.zeros(0, dtype=np.int64)


def weighted_to_population(audit: AuditSlice, plan: SamplePlan) -> AuditSlice:
    """The audit slice of the kept pairs, its inclusion probabilities and sizes taken to all
    pairs (see the module docstring)."""
    if plan.keeps_all:
        return audit
    inclusion = audit.inclusion.copy()
    sizes: dict[int, tuple[int, int]] = {}
    for h, (_, drawn) in audit.sizes.items():
        big = plan.population[h]
        inclusion[audit.stratum == h] = drawn / big
        sizes[h] = (int(big), int(drawn))
    for h, big in plan.population.items():  # a stratum with no kept pair still has its N_h
        sizes.setdefault(int(h), (int(big), 0))
    return AuditSlice(audit.selected, audit.stratum, inclusion, audit.order, sizes)

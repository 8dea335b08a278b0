"""The labelled audit slice as a sample, and the plain results estimated from it.

Kept apart from :mod:`estimates` (the estimators), so the data a caller builds and the
numbers it gets back can be read without the statistics.
"""

from __future__ import annotations

from collections.abc import Hashable, Mapping, Sequence
from dataclasses import asdict, dataclass, field, replace
from typing import Any

import numpy as np


def _sorted(v: np.ndarray) -> np.ndarray:
    # a sample made from another (with_held, for each bound) had its 1,000,000 scores sorted
    # again, 22 times in one evaluate; a check is one pass
    return v if v.size < 2 or bool(np.all(v[1:] >= v[:-1])) else np.sort(v)


@dataclass(frozen=True, eq=False)
class AuditSample:
    """The labelled pairs of the audit slice and the design they were drawn under.

    ``score``, ``label`` (1 match, 0 non-match), ``stratum`` and ``inclusion_probability``
    (pi = n_h / N_h) hold one entry per *labelled* audit pair. ``stratum_sizes`` gives N_h, the
    candidate pairs in each stratum, and ``drawn`` gives n_h, the audit pairs drawn there.

    Drawn pairs not reviewed yet are treated as missing at random within their stratum: the m_h
    labelled pairs of stratum h are taken as a simple random sample of its N_h pairs, so each
    weighs N_h / m_h rather than 1 / pi. Strata with no label at all cannot be reweighted;
    estimates then speak only for the strata that have labels, and the notes say which were left
    out. Held pairs (a reviewer could not tell, no one has settled them) are not missing at
    random: ``held_score`` and ``held_stratum`` keep them apart, for bounds.

    ``population`` (optional) holds the score of every candidate pair of each stratum, labelled
    or not. With it the number of predicted matches in each stratum is known exactly at every
    threshold, not estimated, and a stratum whose labels hold no predicted match is not lost.
    """

    score: np.ndarray
    label: np.ndarray
    stratum: np.ndarray
    inclusion_probability: np.ndarray
    stratum_sizes: Mapping[Any, int]
    drawn: Mapping[Any, int]
    held_score: np.ndarray = field(default_factory=lambda: np.zeros(0))
    held_stratum: np.ndarray = field(default_factory=lambda: np.zeros(0, dtype=np.int64))
    population: Mapping[Any, np.ndarray] | None = None

    def __post_init__(self) -> None:
        set_ = object.__setattr__  # frozen: coerce once here, never again
        for name, dtype in (("score", float), ("label", None), ("stratum", None),
                            ("inclusion_probability", float)):
            set_(self, name, np.asarray(getattr(self, name), dtype=dtype))
            if getattr(self, name).shape != (self.score.size,):
                raise ValueError(f"{name} must be one-dimensional and as long as score")
        set_(self, "held_score", np.asarray(self.held_score, dtype=float).reshape(-1))
        set_(self, "held_stratum", np.asarray(self.held_stratum).reshape(-1))
        if self.held_stratum.size != self.held_score.size:
            raise ValueError("held_stratum must be as long as held_score")
        if self.population is not None:
            set_(self, "population", {h: _sorted(np.asarray(v, dtype=float))
                                      for h, v in self.population.items()})
        set_(self, "stratum_sizes", {k: int(v) for k, v in self.stratum_sizes.items()})
        set_(self, "drawn", {k: int(v) for k, v in self.drawn.items()})
        self._validate()
        set_(self, "label", self.label.astype(np.int8))

    def _validate(self) -> None:
        if not np.all(np.isfinite(self.score)):
            raise ValueError("score holds a missing or infinite value")
        if not np.all(np.isin(self.label, (0, 1))):
            raise ValueError("label must be 1 (match) or 0 (non-match) for every labelled pair")
        pi = self.inclusion_probability
        if np.any(~(pi > 0) | (pi > 1)):
            raise ValueError("inclusion_probability must lie in (0, 1]")
        labelled = self.labelled_counts()
        for h, m_h in labelled.items():
            if h not in self.stratum_sizes or h not in self.drawn:
                raise ValueError(f"stratum {h!r} has no population size or drawn count")
            big_n, n_h = self.stratum_sizes[h], self.drawn[h]
            if not m_h <= n_h <= big_n:
                raise ValueError(f"stratum {h!r}: need labelled ({m_h}) <= drawn ({n_h}) "
                                 f"<= size ({big_n})")
            if not np.allclose(pi[self.stratum == h], n_h / big_n, rtol=1e-6, atol=0.0):
                raise ValueError(f"stratum {h!r}: inclusion probability is not drawn / size")

    @classmethod
    def from_audit(
        cls,
        score: Sequence[float] | np.ndarray,
        label: Sequence[float | None] | np.ndarray,
        stratum: Sequence[Hashable] | np.ndarray,
        inclusion_probability: Sequence[float] | np.ndarray,
        held: Sequence[bool] | np.ndarray | None = None,
    ) -> AuditSample:
        """Build from every drawn audit pair, labelled or not (label None or NaN when not).

        n_h is the count of drawn pairs per stratum and N_h = n_h / pi, rounded. ``held`` marks
        the unlabelled pairs that are on hold.
        """
        lab = np.asarray(label, dtype=float)  # None becomes NaN
        strata = np.asarray(stratum)
        pi = np.asarray(inclusion_probability, dtype=float)
        sizes: dict[Hashable, int] = {}
        drawn: dict[Hashable, int] = {}
        for h in np.unique(strata).tolist():
            in_h = strata == h
            if not np.allclose(pi[in_h], pi[in_h][0], rtol=1e-9, atol=0.0):
                raise ValueError(f"stratum {h!r}: inclusion probability differs within it")
            drawn[h] = int(in_h.sum())
            sizes[h] = round(drawn[h] / pi[in_h][0])
        keep = ~np.isnan(lab)
        on_hold = np.zeros(lab.size, dtype=bool) if held is None else np.asarray(held, bool)
        on_hold &= ~keep
        score = np.asarray(score, dtype=float)
        return cls(score[keep], lab[keep], strata[keep], pi[keep], sizes, drawn,
                   score[on_hold], strata[on_hold])

    @property
    def n_labelled(self) -> int:
        return int(self.score.size)

    @property
    def n_held(self) -> int:
        return int(self.held_score.size)

    def n_pairs(self) -> int:
        """Candidate pairs in the strata that have labels: what the estimates speak for."""
        return int(sum(self.stratum_sizes[h] for h in self.labelled_counts()))

    def held_counts(self) -> dict[Hashable, int]:
        values, counts = np.unique(self.held_stratum, return_counts=True)
        return dict(zip(values.tolist(), counts.tolist(), strict=True))

    def predicted_counts(self, threshold: float) -> dict[Hashable, int] | None:
        """Candidate pairs scoring at or above ``threshold`` in each stratum (None: unknown)."""
        if self.population is None:
            return None
        return {h: int(v.size - np.searchsorted(v, threshold, side="left"))
                for h, v in self.population.items()}

    def stratum_index(self) -> dict[Hashable, np.ndarray]:
        """Positions of each stratum's labelled pairs, strata in a stable order."""
        keys = sorted(self.labelled_counts(), key=str)
        return {h: np.flatnonzero(self.stratum == h) for h in keys}

    def with_held(self, labels: np.ndarray) -> AuditSample:
        """The sample with the held pairs labelled as given (for bounds), none held."""
        lab = np.asarray(labels)
        pi = np.array([self.drawn[h] / self.stratum_sizes[h] for h in self.held_stratum.tolist()],
                      dtype=float)
        return AuditSample(np.concatenate([self.score, self.held_score]),
                           np.concatenate([self.label, lab]).astype(np.int8),
                           np.concatenate([self.stratum, self.held_stratum]),
                           np.concatenate([self.inclusion_probability, pi]),
                           self.stratum_sizes, self.drawn, population=self.population)

    def rescored(self, score: np.ndarray, held_score: np.ndarray | None = None,
                 population: Mapping[Any, np.ndarray] | None = None) -> AuditSample:
        """The same labelled pairs and design, scored by another matcher (same order);
        ``population`` as in the class notes, for that matcher."""
        held = self.held_score if held_score is None else held_score
        return replace(self, score=np.asarray(score, dtype=float),
                       held_score=np.asarray(held, dtype=float), population=population)

    def same_design(self, other: AuditSample) -> bool:
        return (np.array_equal(self.label, other.label)
                and np.array_equal(self.stratum, other.stratum)
                and dict(self.stratum_sizes) == dict(other.stratum_sizes))

    def labelled_counts(self) -> dict[Hashable, int]:
        """m_h: labelled pairs per stratum, for the strata that have any."""
        values, counts = np.unique(self.stratum, return_counts=True)
        return dict(zip(values.tolist(), counts.tolist(), strict=True))

    def weights(self) -> np.ndarray:
        """Design weight N_h / m_h of each labelled pair (1 / pi when all drawn are labelled)."""
        m = self.labelled_counts()
        per_stratum = {h: self.stratum_sizes[h] / m_h for h, m_h in m.items()}
        return np.array([per_stratum[h] for h in self.stratum.tolist()], dtype=float)

    def is_self_weighting(self) -> bool:
        """True when all labelled pairs weigh the same (e.g. all pi equal and all labelled)."""
        w = self.weights()
        return w.size > 0 and bool(np.allclose(w, w[0], rtol=1e-9, atol=0.0))


@dataclass(frozen=True)
class Interval:
    """A point estimate with its confidence interval; None where it is undefined."""

    value: float | None
    low: float | None
    high: float | None
    method: str


@dataclass(frozen=True)
class Bounds:
    """A figure with every held pair counted wrong (``worst``) and right (``best``), and the
    lower interval bound of the first and the upper of the second."""

    worst: float | None
    best: float | None
    low: float | None
    high: float | None


@dataclass(frozen=True)
class QualityEstimate:
    """Precision, recall and F1 of the rule "score >= threshold", with intervals.

    ``true_matches``, ``predicted_positives`` and ``true_positives`` are estimated totals over the
    ``n_pairs`` candidate pairs the estimate speaks for. ``biased`` marks a figure that is not a
    design-based estimate (see ``naive_estimate``). ``held`` audit pairs are on hold; with
    any, ``*_bounds`` give each figure with all of them wrong and all right.
    """

    threshold: float
    precision: Interval
    recall: Interval
    f1: Interval
    true_matches: Interval
    predicted_positives: float
    true_positives: float
    n_labelled: int
    n_pairs: int
    confidence: float
    method: str
    biased: bool = False
    held: int = 0
    precision_bounds: Bounds | None = None
    recall_bounds: Bounds | None = None
    f1_bounds: Bounds | None = None

    def to_dict(self) -> dict[str, Any]:
        """Plain built-in types only (undefined values are None), ready for ``json.dumps``."""
        return asdict(self)

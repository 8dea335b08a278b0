"""Fellegi–Sunter: m- and u-probabilities per level, match weights, EM with optional labels.

The model works on *patterns*: distinct vectors of levels, each with a count. A million pairs
usually hold a few thousand patterns, so a fit takes milliseconds and its result is written
back as one row per pattern, never one per pair.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

SMOOTH = 0.5  # pseudo-count per level, so no level has m or u of exactly zero


@dataclass
class FSModel:
    """m[f][l] and u[f][l] over the non-missing levels of field f; prior = P(match)."""

    fields: list[str]
    level_names: list[list[str]]  # per field, non-missing levels then "missing"
    m: list[list[float]]
    u: list[list[float]]
    prior: float
    iterations: int = 0
    labels_used: int = 0

    def weights(self) -> list[np.ndarray]:
        """log2(m/u) per field and level; the missing level weighs 0."""
        out = []
        for m, u in zip(self.m, self.u, strict=True):
            w = np.log2(np.asarray(m) / np.asarray(u))
            out.append(np.append(w, 0.0))
        return out

    @property
    def prior_weight(self) -> float:
        return math.log2(self.prior / (1.0 - self.prior))

    def pattern_weight(self, patterns: np.ndarray) -> np.ndarray:
        """Total match weight of each pattern (rows of levels, missing = last level)."""
        total = np.zeros(len(patterns))
        for f, w in enumerate(self.weights()):
            total += w[patterns[:, f]]
        return total

    def probability(self, patterns: np.ndarray) -> np.ndarray:
        return posterior(self.pattern_weight(patterns), self.prior)

    def to_dict(self) -> dict:
        return {"fields": self.fields, "level_names": self.level_names, "m": self.m,
                "u": self.u, "prior": self.prior, "iterations": self.iterations,
                "labels_used": self.labels_used}

    @classmethod
    def from_dict(cls, d: dict) -> FSModel:
        return cls(d["fields"], d["level_names"], d["m"], d["u"], d["prior"],
                   d.get("iterations", 0), d.get("labels_used", 0))


def posterior(weight: np.ndarray | float, prior: float) -> np.ndarray:
    """P(match | pattern) from the total match weight (base 2) and the prior."""
    logit2 = np.asarray(weight, dtype=float) + math.log2(prior / (1.0 - prior))
    return 1.0 / (1.0 + np.exp2(-np.clip(logit2, -1000, 1000)))


def _level_counts(patterns: np.ndarray, weights: np.ndarray, n_levels: int, f: int) -> np.ndarray:
    return np.bincount(patterns[:, f], weights=weights, minlength=n_levels + 1)[:n_levels]


def fit_em(patterns: np.ndarray, counts: np.ndarray, level_names: list[list[str]],
           fields: list[str], matches: np.ndarray | None = None,
           non_matches: np.ndarray | None = None, max_iter: int = 500, tol: float = 1e-7,
           start: FSModel | None = None) -> FSModel:
    """EM over patterns; ``matches``/``non_matches`` count labelled pairs per pattern.

    Labelled pairs keep their class in every E-step (semi-supervised EM). The fit is a pure
    function of its inputs, so a refit on the same data gives the same parameters.
    """
    patterns = np.asarray(patterns, dtype=np.int64)
    counts = np.asarray(counts, dtype=float)
    lab_m = np.zeros(len(counts)) if matches is None else np.asarray(matches, dtype=float)
    lab_n = np.zeros(len(counts)) if non_matches is None else np.asarray(non_matches, dtype=float)
    free = counts - lab_m - lab_n
    n_lv = [len(names) - 1 for names in level_names]
    if start is None:
        m = [_initial_m(k) for k in n_lv]
        u = []
        for f, k in enumerate(n_lv):
            c = _level_counts(patterns, counts, k, f) + SMOOTH
            u.append(c / c.sum())
        prior = 0.1
    else:
        m = [np.asarray(x, dtype=float) for x in start.m]
        u = [np.asarray(x, dtype=float) for x in start.u]
        prior = start.prior
    it = 0
    for it in range(1, max_iter + 1):  # noqa: B007 - the count is reported
        model = FSModel(fields, level_names, [list(x) for x in m], [list(x) for x in u], prior)
        g = model.probability(patterns)
        wm = free * g + lab_m
        wu = free * (1.0 - g) + lab_n
        new_m, new_u = [], []
        for f, k in enumerate(n_lv):
            cm = _level_counts(patterns, wm, k, f) + SMOOTH
            cu = _level_counts(patterns, wu, k, f) + SMOOTH
            new_m.append(cm / cm.sum())
            new_u.append(cu / cu.sum())
        new_prior = float(np.clip(wm.sum() / counts.sum(), 1e-6, 1 - 1e-6))
        delta = max(abs(new_prior - prior),
                    *(float(np.max(np.abs(a - b))) for a, b in zip(new_m, m, strict=True)),
                    *(float(np.max(np.abs(a - b))) for a, b in zip(new_u, u, strict=True)))
        m, u, prior = new_m, new_u, new_prior
        if delta < tol:
            break
    for f, k in enumerate(n_lv):
        # A level no pair reaches carries no evidence: give it weight 0, not a smoothing artefact.
        unseen = _level_counts(patterns, counts, k, f) == 0
        m[f][unseen] = u[f][unseen] = np.minimum(m[f][unseen], u[f][unseen])
    model = FSModel(fields, level_names, [list(map(float, x)) for x in m],
                    [list(map(float, x)) for x in u], prior, it, int(lab_m.sum() + lab_n.sum()))
    return _oriented(model)


def _initial_m(k: int) -> np.ndarray:
    # Matches mostly agree: most mass on the best level, falling off geometrically.
    raw = 0.2 ** np.arange(k)
    return raw / raw.sum()


def _oriented(model: FSModel) -> FSModel:
    """EM's two classes have no names; call 'match' the one that agrees more on best levels."""
    agree = sum(m[0] - u[0] for m, u in zip(model.m, model.u, strict=True))
    if agree >= 0:
        return model
    return FSModel(model.fields, model.level_names, model.u, model.m, 1.0 - model.prior,
                   model.iterations, model.labels_used)

"""Fellegi–Sunter: m- and u-probabilities per level, match weights, EM with optional labels.

The model works on *patterns*: distinct vectors of levels, each with a count. A million pairs
usually hold a few thousand patterns, so a fit takes milliseconds and its result is written
back as one row per pattern, never one per pair.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from . import rule_classes
from . import together as together_mod
from .dependence import fit_shrink

SMOOTH = 0.5  # pseudo-count per level, so no level has m or u of exactly zero
EM_ROUNDS = 500  # at most; a fit that takes them all stops before it settles
EM_TOL = 1e-7  # it settles when no parameter moves by more than this in a round


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
    u_source: str = "candidates"  # "random pairs" when u came from a sample of all pairs
    pooled: list[list[str]] = field(default_factory=list)  # per field: levels merged to keep order
    sampled_pairs: int = 0  # size of the random sample u was measured on
    frequent: dict[str, list] = field(default_factory=dict)  # field -> values "exact, common"
    population: int = 0  # all possible record pairs (the prior is a share of these)
    shrink: float = 1.0  # every field's weight is log2(m/u) times this (see dependence.py)
    together: list[str] = field(default_factory=list)  # fields read as one (together.py)
    joint_u: float = 0.0  # chance that random records agree on all of ``together``
    factors: list[float] = field(default_factory=list)  # per field (together.py); [] = all 1
    rule_classes: int = 0  # EM's kinds of non-matches, one per blocking rule (0: one kind)

    def log_odds_table(self) -> tuple[float, list[np.ndarray]]:
        """Natural log-odds before the fields, and each field's contribution per level."""
        base = math.log(self.prior / (1.0 - self.prior))
        return base, [w * math.log(2.0) for w in self.weights()]

    def weights(self) -> list[np.ndarray]:
        """log2(m/u) per field and level, times the shrink factor; the missing level weighs 0."""
        out = []
        factors = self.factors or [1.0] * len(self.m)
        for m, u, c in zip(self.m, self.u, factors, strict=True):
            w = self.shrink * c * np.log2(np.asarray(m) / np.asarray(u))
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
                "labels_used": self.labels_used, "u_source": self.u_source,
                "pooled": self.pooled, "sampled_pairs": self.sampled_pairs,
                "frequent": self.frequent, "population": self.population,
                "shrink": self.shrink, "together": self.together, "joint_u": self.joint_u,
                "factors": self.factors, "rule_classes": self.rule_classes}

    @classmethod
    def from_dict(cls, d: dict) -> FSModel:
        return cls(d["fields"], d["level_names"], d["m"], d["u"], d["prior"],
                   d.get("iterations", 0), d.get("labels_used", 0),
                   d.get("u_source", "candidates"), d.get("pooled", []),
                   d.get("sampled_pairs", 0), d.get("frequent", {}), d.get("population", 0),
                   d.get("shrink", 1.0), list(d.get("together", [])),
                   float(d.get("joint_u", 0.0)), list(d.get("factors", [])),
                   int(d.get("rule_classes", 0)))


def posterior(weight: np.ndarray | float, prior: float) -> np.ndarray:
    """P(match | pattern) from the total match weight (base 2) and the prior."""
    logit2 = np.asarray(weight, dtype=float) + math.log2(prior / (1.0 - prior))
    return 1.0 / (1.0 + np.exp2(-np.clip(logit2, -1000, 1000)))


def _level_counts(patterns: np.ndarray, weights: np.ndarray, n_levels: int, f: int) -> np.ndarray:
    return np.bincount(patterns[:, f], weights=weights, minlength=n_levels + 1)[:n_levels]


def fit_em(patterns: np.ndarray, counts: np.ndarray, level_names: list[list[str]],
           fields: list[str], matches: np.ndarray | None = None,
           non_matches: np.ndarray | None = None, max_iter: int = EM_ROUNDS, tol: float = EM_TOL,
           start: FSModel | None = None, u_random: list[np.ndarray] | None = None,
           population: float | None = None, together: list[str] | None = None,
           joint_u: float = 0.0, by_rule: rule_classes.RuleRows | None = None) -> FSModel:
    """EM over patterns; ``matches``/``non_matches`` count labelled pairs per pattern.

    Labelled pairs keep their class in every E-step (semi-supervised EM). EM over candidates
    finds m well, but its u describes candidates, which were chosen because they agree. With
    ``u_random`` (u measured on a random sample of all record pairs) and ``population`` (the
    number of all possible pairs), the result uses that u instead, and the prior becomes the
    share of matches among all pairs (EM's matches among candidates over ``population``), so
    that agreement on a blocked field counts as the evidence it is; the summed weights are then
    shrunk by one factor fitted to EM's own view of the candidates (:mod:`dependence`). Levels
    are kept in order (a better level never weighs less than a worse one: pool adjacent
    violators). With ``together`` (fields that say where a record lives) and ``joint_u`` (the
    chance of agreeing on all of them), EM reads those fields as one column and their weights
    are scaled so that one home counts once (:mod:`together`). With ``by_rule`` (the pairs
    counted by pattern and by the blocking rule that found them) and no labels, EM reads one
    kind of non-match per rule (:mod:`rule_classes`). The fit is a pure function of its
    inputs, so a refit on the same data gives the same parameters.
    """
    patterns = np.asarray(patterns, dtype=np.int64)
    counts = np.asarray(counts, dtype=float)
    lab_m = np.zeros(len(counts)) if matches is None else np.asarray(matches, dtype=float)
    lab_n = np.zeros(len(counts)) if non_matches is None else np.asarray(non_matches, dtype=float)
    free = counts - lab_m - lab_n
    n_lv = [len(names) - 1 for names in level_names]
    # EM reads the fields of one home as one column, or its classes become "same home" and
    # "not": housemates agree on four fields and disagree on two (together.py)
    members = [fields.index(n) for n in (together or []) if n in fields]
    seen, seen_names = patterns, level_names
    if len(members) >= 2 and start is None:
        seen, seen_names = together_mod.composite(patterns, level_names, members)
    seen_lv = [len(names) - 1 for names in seen_names]
    if start is None:
        m = [_initial_m(k) for k in seen_lv]
        u = []
        for f, k in enumerate(seen_lv):
            c = _level_counts(seen, counts, k, f) + SMOOTH
            u.append(c / c.sum())
        prior = 0.1
    else:
        m = [np.asarray(x, dtype=float) for x in start.m]
        u = [np.asarray(x, dtype=float) for x in start.u]
        prior = start.prior
    it = 0
    # one class of non-matches per blocking rule, where EM reads enough columns (rule_classes)
    rules = by_rule if (start is None and not (lab_m.sum() or lab_n.sum())
                        and rule_classes.usable(by_rule, len(seen_lv))) else None
    for it in range(1, 0 if rules is not None else max_iter + 1):  # noqa: B007 - reported
        g = FSModel(fields, seen_names, [list(x) for x in m], [list(x) for x in u],
                    prior).probability(seen)
        new_m, new_u, new_prior = _m_step(seen, seen_lv, free * g + lab_m,
                                          free * (1.0 - g) + lab_n)
        delta = max(abs(new_prior - prior),
                    *(float(np.max(np.abs(a - b))) for a, b in zip(new_m, m, strict=True)),
                    *(float(np.max(np.abs(a - b))) for a, b in zip(new_u, u, strict=True)))
        m, u, prior = new_m, new_u, new_prior
        if delta < tol:
            break
    view = None  # EM's share of matches per pattern, where the model alone does not give it
    if rules is not None:
        seen_fields = ([n for i, n in enumerate(fields) if i not in members] + ["home"]
                       if seen is not patterns else list(fields))
        home = set(together or []) if seen is not patterns else set()
        keyed = rule_classes.keyed_columns(rules.keys, seen_fields, home)
        post, it = rule_classes.fit(seen[rules.pattern], rules, keyed, seen_lv, m, max_iter,
                                    tol)
        view = rule_classes.per_pattern(rules, post, len(counts))
        m, u, prior = _m_step(seen, seen_lv, free * view + lab_m, free * (1.0 - view) + lab_n)
    if seen is not patterns:  # every field's own m and u, from EM's view of each pattern
        g = view if view is not None else FSModel(
            fields, seen_names, [list(x) for x in m], [list(x) for x in u],
            prior).probability(seen)
        m, u, prior = _m_step(patterns, n_lv, free * g + lab_m, free * (1.0 - g) + lab_n)
    fitted = FSModel(fields, level_names, [list(x) for x in m], [list(x) for x in u], prior,
                     it, int(lab_m.sum() + lab_n.sum()))
    model = _oriented(fitted)
    if model is not fitted and view is not None:  # the classes swapped names: so does the view
        view = 1.0 - view
    m = [np.asarray(x) for x in model.m]
    u = [np.asarray(x) for x in model.u]
    prior = model.prior
    source = "candidates"
    if u_random is not None and population:
        u = [np.asarray(x, dtype=float) for x in u_random]
        prior = float(np.clip(prior * counts.sum() / population, 1e-12, 1 - 1e-6))
        source = "random pairs"
    m = [monotone_m(mf, uf) for mf, uf in zip(m, u, strict=True)]
    pooled = [_pooled_names(m[f], u[f], level_names[f]) for f in range(len(n_lv))]
    out = FSModel(fields, level_names, [list(map(float, x)) for x in m],
                  [list(map(float, x)) for x in u], prior, it, model.labels_used, source,
                  pooled)
    if rules is not None:
        out.rule_classes = len(rules.keys)
    if source == "random pairs":
        if together:
            out.together, out.joint_u = list(together), float(joint_u)
            out.factors = together_mod.factors(fields, level_names, m, u, out.together,
                                               joint_u)
        # EM's share of matches per pattern among the candidates, labels as they are
        if view is None:
            view = model.probability(patterns)
        share = (free * view + lab_m) / np.maximum(counts, 1e-12)
        base = math.log(out.prior / (1.0 - out.prior))
        fields_sum = out.pattern_weight(patterns) * math.log(2.0)
        out.shrink, base = fit_shrink(fields_sum, base, share, counts)
        out.prior = float(np.clip(1.0 / (1.0 + math.exp(-base)), 1e-12, 1 - 1e-6))
    return out


def _m_step(patterns: np.ndarray, n_lv: list[int], wm: np.ndarray, wu: np.ndarray
            ) -> tuple[list[np.ndarray], list[np.ndarray], float]:
    """m and u per field from pairs weighted by how much each is a match (or not)."""
    new_m, new_u = [], []
    for f, k in enumerate(n_lv):
        cm = _level_counts(patterns, wm, k, f) + SMOOTH
        cu = _level_counts(patterns, wu, k, f) + SMOOTH
        new_m.append(cm / cm.sum())
        new_u.append(cu / cu.sum())
    total = wm.sum() + wu.sum()
    return new_m, new_u, float(np.clip(wm.sum() / max(total, 1e-300), 1e-6, 1 - 1e-6))


def monotone_m(m: np.ndarray, u: np.ndarray) -> np.ndarray:
    """m adjusted so that m/u never rises from a level to the next worse one.

    Weighted isotonic regression of the ratio m/u (weights u, decreasing over levels) is pool
    adjacent violators on likelihood ratios: a pooled run gets sum(m)/sum(u), and the total of
    m is unchanged, so it stays a distribution.
    """
    ratio = m / u
    if np.all(np.diff(ratio) <= 0):
        return m
    # scipy's PAV rather than scikit-learn's: a build imports scipy.optimize anyway, and
    # scikit-learn's import alone was about 1.4 s of every build (same answer: tests pin it)
    from scipy.optimize import isotonic_regression  # only fitting needs it

    fitted = isotonic_regression(ratio, weights=u, increasing=False).x
    out = fitted * u
    return out / out.sum()


def _pooled_names(m: np.ndarray, u: np.ndarray, names: list[str]) -> list[str]:
    """Groups of adjacent levels that ended up with one weight (for status to report)."""
    w = np.log(np.asarray(m) / np.asarray(u))
    groups, run = [], [names[0]]
    for i in range(1, len(w)):
        if abs(w[i] - w[i - 1]) < 1e-9:
            run.append(names[i])
        else:
            groups.append(run)
            run = [names[i]]
    groups.append(run)
    return [" + ".join(g) for g in groups if len(g) > 1]


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
                   model.iterations, model.labels_used, model.u_source, model.pooled,
                   model.sampled_pairs, model.frequent, model.population, model.shrink,
                   model.together, model.joint_u, model.factors)

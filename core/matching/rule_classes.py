"""EM that knows which blocking rule found each pair: one class of non-matches per rule.

Candidates are not one population of non-matches. Pairs found because they share a family
name agree on it and seldom on the given name; pairs found by a given name, the other way
round; pairs found by a birth date agree on that. One u for all of them is a blend that fits
none, and EM's match class then takes in whichever non-matches agree on more than the blend
expects (twins, housemates): its m says true pairs disagree on a given name or a national
number far more often than they do. Here m is shared, while each rule has its own share of
matches and its own u on the fields its key reads; on the other fields every rule shares one
u. (A u free on every field lets a rule whose pairs are nearly all matches call its own class
the matches' profile, and a rule's u fixed to random pairs counts housemates as matches: both
measured worse.) Each pair belongs to the first rule that found it.

EM needs enough fields beside a rule's key to tell its classes apart; with fewer than
``MIN_COLUMNS`` columns the build keeps plain two-class EM (a table of a name and a price).
Only the build's EM, before any label, reads the rules: with labels, the refit's EM reads one
class of non-matches, which measured as well or better after 200 labels (DEVELOPERS.md).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

SMOOTH = 0.5
MIN_COLUMNS = 3  # columns EM reads (a home read together is one) for this to be identified


@dataclass(frozen=True)
class RuleRows:
    """Candidate pairs counted by pattern and by the rule that found them first."""

    pattern: np.ndarray  # per row: the index of its pattern in the patterns given to fit_em
    rule: np.ndarray  # per row: the rule's index
    counts: np.ndarray  # per row: pairs
    keys: list[list[str]]  # per rule: the fields its key reads

    @classmethod
    def of(cls, codes: np.ndarray, rules: np.ndarray, pattern_codes: np.ndarray,
           keys: list[list[str]], pairs: np.ndarray | None = None) -> RuleRows | None:
        """Rows from each pair's pattern code and rule (or from counted rows, ``pairs`` pairs
        each); None where one rule found them all."""
        codes = np.asarray(codes, dtype=np.int64)
        rules = np.asarray(rules, dtype=np.int64)
        if len(keys) < 2 or len(codes) == 0 or np.all(rules == rules[0]):
            return None
        # by pattern index, not code: a code of many fields times the rules passes int64
        at = np.searchsorted(pattern_codes, codes).astype(np.int64)
        uniq, inverse = np.unique(at * len(keys) + rules, return_inverse=True)
        counts = np.bincount(inverse, weights=None if pairs is None else
                             np.asarray(pairs, dtype=float), minlength=len(uniq))
        return cls(uniq // len(keys), uniq % len(keys), counts.astype(float),
                   [list(k) for k in keys])


def usable(rows: RuleRows | None, columns: int) -> bool:
    return rows is not None and columns >= MIN_COLUMNS


def keyed_columns(keys: list[list[str]], seen_fields: list[str], home: set[str]
                  ) -> list[set[int]]:
    """Per rule, the columns EM reads that its key reads (the home's column for a home field)."""
    out = []
    for names in keys:
        cols = {seen_fields.index(n) for n in names if n in seen_fields}
        if home and any(n in home for n in names):
            cols.add(len(seen_fields) - 1)  # the home is read as the last column
        out.append(cols)
    return out


def _normal(c: np.ndarray) -> np.ndarray:
    c = c + SMOOTH
    return c / c.sum()


def _counts(levels: np.ndarray, weights: np.ndarray, k: int) -> np.ndarray:
    return np.bincount(levels, weights=weights, minlength=k + 1)[:k]


def fit(seen: np.ndarray, rows: RuleRows, keyed: list[set[int]], n_lv: list[int],
        m_start: list[np.ndarray], max_iter: int, tol: float) -> tuple[np.ndarray, int]:
    """Each row's probability of being a match (rows as in ``rows``; ``seen`` the levels of
    each row, as EM reads them), and the rounds taken."""
    n_rules = len(rows.keys)
    group, w = rows.rule, rows.counts
    of_rule = [group == g for g in range(n_rules)]
    totals = np.bincount(group, weights=w, minlength=n_rules)
    m = [np.asarray(x, dtype=float) for x in m_start]
    u = [[_normal(_counts(seen[of_rule[g], f], w[of_rule[g]], k)) for f, k in enumerate(n_lv)]
         for g in range(n_rules)]
    prior = np.full(n_rules, 0.1)
    it = 0
    post = np.zeros(len(w))
    for it in range(1, max_iter + 1):  # noqa: B007 - the count is reported
        logit = np.log(prior[group] / (1.0 - prior[group]))
        for f, k in enumerate(n_lv):
            lv = seen[:, f]
            present = lv < k
            at = np.minimum(lv, k - 1)
            lu = np.stack([np.log(u[g][f]) for g in range(n_rules)])[group, at]
            logit += np.where(present, np.log(m[f])[at] - lu, 0.0)
        post = 1.0 / (1.0 + np.exp(-np.clip(logit, -700.0, 700.0)))
        wm, wu = w * post, w * (1.0 - post)
        new_m = [_normal(_counts(seen[:, f], wm, k)) for f, k in enumerate(n_lv)]
        shared = [_normal(_counts(seen[:, f], wu, k)) for f, k in enumerate(n_lv)]
        new_u = [[_normal(_counts(seen[of_rule[g], f], wu[of_rule[g]], k))
                  if f in keyed[g] else shared[f] for f, k in enumerate(n_lv)]
                 for g in range(n_rules)]
        new_prior = np.clip(np.bincount(group, weights=wm, minlength=n_rules)
                            / np.maximum(totals, 1e-300), 1e-6, 1 - 1e-6)
        delta = max(float(np.max(np.abs(new_prior - prior))),
                    *(float(np.max(np.abs(a - b))) for a, b in zip(new_m, m, strict=True)))
        m, u, prior = new_m, new_u, new_prior
        if delta < tol:
            break
    return post, it


def per_pattern(rows: RuleRows, post: np.ndarray, n_patterns: int) -> np.ndarray:
    """Each pattern's share of matches, its rows' posteriors weighted by their pairs."""
    wm = np.bincount(rows.pattern, weights=rows.counts * post, minlength=n_patterns)
    n = np.bincount(rows.pattern, weights=rows.counts, minlength=n_patterns)
    return wm / np.maximum(n, 1e-300)

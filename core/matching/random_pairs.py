"""u-probabilities from all record pairs, and the frequent values that get a level of their own.

Candidate pairs were chosen because they agree on something, so among them even non-matches
agree often: u measured there makes agreement on a blocked field look like evidence *against* a
match. Here u comes from a seeded random sample of all record pairs (nearly all non-matches),
with the exact level computed from value frequencies instead (a random sample would hardly ever
meet two records that agree exactly on a name).

Frequency-aware exact agreement: agreeing on a rare value is stronger evidence than agreeing on
a common one (the trade's term-frequency adjustment). Values whose chance agreement is above the
field's average become the level "exact, common"; the others "exact, rare".
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from ..types import FieldSpec
from . import compare, scoring
from .compare import MISSING, level_names
from .together import joint_chance

SAMPLE_PAIRS = 100_000
SMOOTH = 0.5
FREQUENT_KINDS = ("name", "text", "longtext", "code")
MAX_FREQUENT = 2000  # frequent values kept per field (the model file stays small)
RARE, COMMON = "exact, rare", "exact, common"


@dataclass
class Baseline:
    """What the random sample measured: u per field (non-missing levels) and frequent values."""

    u: list[np.ndarray]
    level_names: list[list[str]]
    frequent: dict[str, list]
    sampled: int
    together: list[str] = field(default_factory=list)  # fields read as one (together.py)
    joint_u: float = 0.0  # P(two random records agree on every field of ``together``)


def sample_pairs(n_left: int, n_right: int, dedupe: bool, n: int, seed: int
                 ) -> tuple[np.ndarray, np.ndarray]:
    """``n`` record pairs drawn uniformly with replacement from all possible pairs."""
    rng = np.random.default_rng(seed)
    li = rng.integers(0, n_left, n)
    if not dedupe:
        return li, rng.integers(0, n_right, n)
    ri = rng.integers(0, n_left - 1, n)
    ri = ri + (ri >= li)  # never a record with itself
    return np.minimum(li, ri), np.maximum(li, ri)


def _chance_agreement(left: np.ndarray, right: np.ndarray, dedupe: bool) -> pd.Series:
    """P(two random records, one from each side, both hold value v), per value."""
    lc = pd.Series(left, dtype=object).dropna().value_counts()
    if dedupe:
        n = lc.sum()
        return (lc * (lc - 1)) / max(1, n * (n - 1))
    rc = pd.Series(right, dtype=object).dropna().value_counts()
    both = lc.index.intersection(rc.index)
    return (lc[both] / lc.sum()) * (rc[both] / rc.sum())


def frequent_values(fields: list[FieldSpec], lnorm: dict[str, np.ndarray],
                    rnorm: dict[str, np.ndarray], dedupe: bool,
                    chances: dict[str, pd.Series] | None = None) -> dict[str, list]:
    """Per field of a frequency-aware kind: the values whose chance agreement is above average.

    ``chances`` holds each field's :func:`_chance_agreement` where the caller has it already.
    """
    out: dict[str, list] = {}
    for f in fields:
        if f.kind not in FREQUENT_KINDS:
            continue
        chance = (chances[f.name] if chances is not None
                  else _chance_agreement(lnorm[f.name], rnorm[f.name], dedupe))
        total = float(chance.sum())
        if total <= 0:
            continue
        share = chance / total  # of all chance exact agreements on this field
        common = chance[share > share.pow(2).sum() / max(share.sum(), 1e-300)]
        common = common.sort_values(ascending=False).head(MAX_FREQUENT)
        if 0 < len(common) < len(chance):
            out[f.name] = sorted(common.index.tolist(), key=str)
    return out


def names_with_frequent(fields: list[FieldSpec], frequent: dict[str, list]) -> list[list[str]]:
    """Level names of each field, with the exact level split where values are frequency-aware."""
    out = []
    for f in fields:
        names = list(level_names(f.kind))
        if f.name in frequent:
            names = [RARE, COMMON, *names[1:]]
        out.append(names)
    return out


def baseline(fields: list[FieldSpec], lnorm: dict[str, np.ndarray],
             rnorm: dict[str, np.ndarray], n_left: int, n_right: int, dedupe: bool,
             seed: int, n: int = SAMPLE_PAIRS,
             prepared: dict[str, compare.Prepared] | None = None,
             together: list[str] | None = None) -> Baseline:
    """Measure u on a random sample of all pairs; exact levels from value frequencies, and
    the chance of agreeing on every field of ``together`` at once."""
    # counted once per field: the value counts were a fifth of a large build's fixed cost
    chances = {f.name: _chance_agreement(lnorm[f.name], rnorm[f.name], dedupe) for f in fields}
    frequent = frequent_values(fields, lnorm, rnorm, dedupe, chances)
    names = names_with_frequent(fields, frequent)
    possible = n_left * (n_left - 1) // 2 if dedupe else n_left * n_right
    li, ri = sample_pairs(n_left, n_right, dedupe, int(min(n, max(possible, 1))), seed)
    _, levels = scoring.compare_pairs(fields, lnorm, rnorm, li, ri, frequent=frequent,
                                      prepared=prepared)
    u = []
    for j, f in enumerate(fields):
        k = len(names[j]) - 1
        assert names[j][-1] == MISSING
        counts = np.bincount(levels[:, j], minlength=k + 1)[:k].astype(float)
        chance = chances[f.name]
        if f.name in frequent:
            is_common = chance.index.isin(frequent[f.name])
            exact = [float(chance[~is_common].sum()), float(chance[is_common].sum())]
        else:
            exact = [float(chance.sum())]
        rest = counts[len(exact):] + SMOOTH
        rest = rest / rest.sum() * max(1e-12, 1.0 - sum(exact))
        # A value no two records share still needs a u above zero for the ratio m/u.
        floor = SMOOTH / max(1.0, float(possible))
        u.append(np.concatenate([np.maximum(exact, floor), rest]))
        u[-1] = u[-1] / u[-1].sum()
    joint = 0.0
    if together:
        ready = prepared or {}
        codes = {n: ready[n] if n in ready else compare.prepare("code", lnorm[n], rnorm[n])
                 for n in together}
        joint = joint_chance([codes[n].lcodes for n in together],
                             None if dedupe else [codes[n].rcodes for n in together])
    return Baseline(u, names, frequent, len(li), list(together or []), joint)

"""A matcher scored like a reviewer: Cohen's kappa of its labels against the gold labels.

The gold labels as a whole are no sample of the candidate pairs (the queue chose most of them
because the model was unsure), so the kappa that speaks for the candidate pairs is the one on
the audit slice, each labelled audit pair weighted N_h / m_h: ``kappa`` and its interval. Its
interval is the percentile interval of a stratified rescaling bootstrap (Rao–Wu: m_h - 1 draws
with replacement within each stratum, weights rescaled with the finite-population correction),
seeded, clipped to [-1, 1]; below ``MIN_PAIRS`` labelled audit pairs it reads "too few pairs to
say". The plain kappa over every gold label is given beside it, marked
as describing only the labelled pairs, with no interval.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import pandas as pd

from ..reviewing.agreement import cohen_kappa, landis_koch
from ..reviewing.agreement_intervals import MIN_PAIRS, table_kappa
from ..reviewing.gold import gold_labels
from ..storage.project_file import ProjectFile

N_BOOT = 2000


def _rescaled(stratum: np.ndarray, sizes: dict[int, int], rng: np.random.Generator,
              n_boot: int) -> np.ndarray:
    """(n_boot, n) Rao–Wu replicate weights of the labelled audit pairs."""
    out = np.zeros((n_boot, stratum.size))
    for h in np.unique(stratum).tolist():
        idx = np.flatnonzero(stratum == h)
        m_h, big = idx.size, sizes[h]
        base = big / m_h
        if m_h < 2:
            out[:, idx] = base
            continue
        lam = math.sqrt(max(0.0, 1.0 - m_h / big))
        draws = rng.multinomial(m_h - 1, np.full(m_h, 1.0 / m_h), size=n_boot)
        out[:, idx] = base * ((1.0 - lam) + lam * m_h / (m_h - 1) * draws)
    return out


def machine_rater(project: ProjectFile, predicted_match: pd.Series, seed: int = 0,
                  confidence: float = 0.95) -> dict[str, Any]:
    """Design-weighted kappa on the audit slice, and the plain kappa over all gold labels.

    ``predicted_match`` is a bool per pair id. Rows of each ``table`` are the machine rater,
    columns the gold labels, both in the order match, non-match; ``table`` on the audit slice
    holds estimated counts of candidate pairs.
    """
    gold = {g.pair_id: g.label == "match" for g in gold_labels(project.connection)}
    ids = list(gold)
    machine = predicted_match.reindex(ids).fillna(False).to_numpy(dtype=bool)
    truth = np.array([gold[i] for i in ids], dtype=bool)
    plain = [[int(np.sum(machine & truth)), int(np.sum(machine & ~truth))],
             [int(np.sum(~machine & truth)), int(np.sum(~machine & ~truth))]]
    k_all = cohen_kappa(plain, ("match", "non-match"))
    rows = project.connection.execute(
        "SELECT pair_id, stratum FROM pairs WHERE audit = 1 ORDER BY pair_id").fetchall()
    audit = [(pid, h) for pid, h in rows if pid in gold]
    sizes = {int(h): int(v[0]) for h, v in project.meta.get("audit_strata", {}).items()}
    out: dict[str, Any] = {
        "scope": "audit slice, design-weighted: speaks for the candidate pairs",
        "n": len(audit), "kappa": None, "ci_low": None, "ci_high": None, "band": "undefined",
        "table": None, "ci_method": f"percentile of a stratified rescaling bootstrap, {N_BOOT} "
                                    "replicates",
        "all_gold": {"n": k_all.n, "kappa": k_all.kappa, "table": plain,
                     "observed_agreement": k_all.observed,
                     "scope": "every gold label, unweighted: describes only the labelled pairs "
                              "(most chosen by the queue), so no interval is given"},
        "rows": "machine rater (match, non-match)", "columns": "gold label (match, non-match)"}
    if len(audit) < MIN_PAIRS:  # as for the reviewers' agreement: no figure from a handful
        out["band"] = "too few pairs to say"
        return out
    a_ids = [pid for pid, _ in audit]
    stratum = np.array([h for _, h in audit], dtype=np.int64)
    m = predicted_match.reindex(a_ids).fillna(False).to_numpy(dtype=bool)
    y = np.array([gold[p] for p in a_ids], dtype=bool)
    cells = np.stack([m & y, m & ~y, ~m & y, ~m & ~y], axis=1).astype(float)
    counts = np.bincount(stratum)
    w = np.array([sizes[h] / counts[h] for h in stratum.tolist()])
    table = (w @ cells).reshape(2, 2)
    kappa = table_kappa(table)
    reps = _rescaled(stratum, sizes, np.random.default_rng(seed), N_BOOT) @ cells
    values = np.array([table_kappa(r.reshape(2, 2)) for r in reps])
    values = values[np.isfinite(values)]
    alpha = 1.0 - confidence
    if math.isfinite(kappa) and values.size:
        low, high = np.quantile(values, [alpha / 2, 1 - alpha / 2])
        out.update(kappa=kappa, ci_low=max(-1.0, min(float(low), kappa)),
                   ci_high=min(1.0, max(float(high), kappa)), band=landis_koch(kappa))
    out["table"] = table.tolist()
    return out

"""Refitting with labels: semi-supervised Fellegi–Sunter, and a logistic ranker when it is better.

Labels are taken per pair: an adjudicator's label wins; otherwise the reviewers' majority of
match / non-match (a tie or a hold leaves the pair unlabelled for fitting).
"""

from __future__ import annotations

import sqlite3
from dataclasses import dataclass

import numpy as np

from ..matching.logistic import fit_logistic, one_hot
from ..matching.model import FSModel, fit_em
from ..ordering import queue
from . import store
from .writer import write_model

FOLDS = 5
MIN_PER_CLASS = 5
MIN_AUDIT = 3  # audit labels of each class before the logistic ranker can be judged
PATTERN_PRIOR = 2.0  # how many labels the model's own estimate is worth within one pattern


@dataclass
class RefitResult:
    ranker: str
    labels: int
    matches: int
    fs_loss: float | None
    logistic_loss: float | None
    iterations: int

    def to_dict(self) -> dict:
        return self.__dict__.copy()


def fitting_labels(conn: sqlite3.Connection) -> dict[int, int]:
    """pair_id -> 1 (match) / 0 (non-match) for the pairs whose label is settled enough to fit."""
    votes: dict[int, list[int]] = {}
    final: dict[int, int] = {}
    for pair_id, role, label in conn.execute("SELECT pair_id, role, label FROM current"):
        if label == "hold":
            continue
        y = 1 if label == "match" else 0
        if role == "adjudicator":
            final[pair_id] = y
        else:
            votes.setdefault(pair_id, []).append(y)
    for pair_id, ys in votes.items():
        if pair_id not in final and 2 * sum(ys) != len(ys):
            final[pair_id] = int(2 * sum(ys) > len(ys))
    return final


def _load(conn: sqlite3.Connection) -> tuple[np.ndarray, np.ndarray]:
    rows = conn.execute("SELECT pattern_id, levels, n_pairs FROM patterns ORDER BY pattern_id")
    pats, counts = [], []
    for _, levels, n in rows:
        pats.append([int(x) for x in levels.split(",")])
        counts.append(n)
    return np.array(pats, dtype=np.int64), np.array(counts, dtype=float)


def _log_loss(p: np.ndarray, y: np.ndarray, w: np.ndarray) -> float:
    p = np.clip(p, 1e-6, 1 - 1e-6)
    return float(-np.average(y * np.log(p) + (1 - y) * np.log(1 - p), weights=w))


def _training_weights(design: np.ndarray) -> np.ndarray:
    """Uncertainty labels weigh 1 each; audit labels together weigh as much as all of them,
    shared in proportion to 1/π, so the fit sees the whole score range in its true mix."""
    audit = design > 0
    w = np.ones(len(design))
    if audit.any():
        w[audit] = design[audit] / design[audit].sum() * max(1, (~audit).sum())
    return w


def pattern_calibrated(prob: np.ndarray, lab_pat: np.ndarray, lab_y: np.ndarray,
                       n_patterns: int) -> np.ndarray:
    """Blend each pattern's model probability with the labels of its own pairs.

    All pairs of a pattern look the same to the model, and the queue draws them in random
    order, so their labels estimate the pattern's match rate directly. Without this, a
    pattern the model cannot separate would stay at the top of the queue however many of its
    pairs were labelled.
    """
    k = np.bincount(lab_pat, minlength=n_patterns).astype(float)
    km = np.bincount(lab_pat, weights=lab_y, minlength=n_patterns)
    return (km + PATTERN_PRIOR * prob) / (k + PATTERN_PRIOR)


def refit(conn: sqlite3.Connection) -> RefitResult:
    """Refit from the current labels and rewrite every pattern's probability and priority."""
    meta = store.get_meta(conn)
    base = FSModel.from_dict(meta["fs_model"])
    patterns, counts = _load(conn)
    labels = fitting_labels(conn)
    lab_pairs = np.array(sorted(labels), dtype=np.int64)
    lab_y = np.array([labels[p] for p in lab_pairs], dtype=float)
    lab_pat = np.zeros(0, dtype=np.int64)
    lab_w = np.ones(len(lab_pairs))  # design weight: 1/π for audit pairs, 0 for the rest
    if len(lab_pairs):
        found = {r[0]: r[1:] for r in conn.execute(
            f"SELECT pair_id, pattern_id, audit, inclusion FROM pairs WHERE pair_id IN "
            f"({','.join(map(str, lab_pairs.tolist()))})")}
        lab_pat = np.array([found[int(p)][0] for p in lab_pairs], dtype=np.int64)
        lab_w = np.array([1.0 / found[int(p)][2] if found[int(p)][1] else 0.0
                          for p in lab_pairs])
    is_audit = lab_w > 0

    def fs_fit(mask: np.ndarray) -> FSModel:
        m = np.bincount(lab_pat[mask], weights=lab_y[mask], minlength=len(counts))
        n = np.bincount(lab_pat[mask], weights=1 - lab_y[mask], minlength=len(counts))
        return fit_em(patterns, counts, base.level_names, base.fields, m, n)

    everything = np.ones(len(lab_pairs), dtype=bool)
    fs = fs_fit(everything)
    fs_prob = fs.probability(patterns)
    prob, ranker = fs_prob, "fellegi-sunter"
    fs_loss = lr_loss = None
    n_match = int(lab_y.sum())
    n_levels = [len(x) for x in base.level_names]
    audit_m = int(lab_y[is_audit].sum())
    if (n_match >= MIN_PER_CLASS and len(lab_y) - n_match >= MIN_PER_CLASS
            and audit_m >= MIN_AUDIT and is_audit.sum() - audit_m >= MIN_AUDIT):
        q = np.clip(fs_prob, 1e-13, 1 - 1e-13)
        logit = np.log(q) - np.log1p(-q)
        x_all = one_hot(patterns, n_levels, logit)
        train_w = _training_weights(lab_w)
        fold = lab_pairs % FOLDS
        fs_pred = np.zeros(len(lab_y))
        lr_pred = np.zeros(len(lab_y))
        for k in range(FOLDS):
            test = fold == k
            if not test.any():
                continue
            fs_pred[test] = fs_fit(~test).probability(patterns[lab_pat[test]])
            lr = fit_logistic(x_all[lab_pat[~test]], lab_y[~test], train_w[~test])
            lr_pred[test] = lr.probability(x_all[lab_pat[test]])
        # Judged on the audit labels with their design weights: the uncertainty-chosen labels
        # are a biased sample, on which a model can look good and rank the population badly.
        fs_loss = _log_loss(fs_pred[is_audit], lab_y[is_audit], lab_w[is_audit])
        lr_loss = _log_loss(lr_pred[is_audit], lab_y[is_audit], lab_w[is_audit])
        if lr_loss < fs_loss:
            prob = fit_logistic(x_all[lab_pat], lab_y, train_w).probability(x_all)
            ranker = "logistic"
    prob = pattern_calibrated(prob, lab_pat, lab_y, len(counts))
    weight = fs.pattern_weight(patterns)
    prio = queue.priority(prob, float(meta["threshold"]))
    conn.execute("BEGIN IMMEDIATE")
    try:
        conn.executemany(
            "UPDATE patterns SET weight = ?, fs_probability = ?, probability = ?, priority = ? "
            "WHERE pattern_id = ?",
            [(float(weight[i]), float(fs_prob[i]), float(prob[i]), float(prio[i]), i)
             for i in range(len(patterns))])
        write_model(conn, fs)
        note = (f"{len(lab_y)} labels; held-out log loss FS {fs_loss:.3f}, logistic "
                f"{lr_loss:.3f}" if fs_loss is not None and lr_loss is not None
                else f"{len(lab_y)} labels; too few of each class for the logistic ranker")
        store.set_meta(conn, fs_model=fs.to_dict(), ranker=ranker, ranker_note=note,
                       refits=int(meta.get("refits", 0)) + 1)
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    return RefitResult(ranker, len(lab_y), n_match, fs_loss, lr_loss, fs.iterations)

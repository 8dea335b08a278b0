"""Refitting with labels: semi-supervised Fellegi–Sunter, and a logistic ranker when it is better.

Labels come from the caller, one per pair, under the fitting rule of ``reviewing.labels``.

Honest by cross-fitting: the audit slice's labels help fit the model that ranks the queue, but
``evaluate`` judges each labelled audit pair by the score of a model fitted without its fifth of
the slice (five parts by pair id), its ranker (Fellegi–Sunter or logistic) chosen without that
part too, so no audit label is judged by a score it trained or a choice it made. Five parts,
not two: a model fitted on half the audit labels misses more matches than the one it stands
for, and its misses made ``evaluate`` read recall low (bench/refit_bias.py).
Blind: labels on pairs still open for another reviewer (overlap pairs) never reach a fit, so
one reviewer's label cannot move the probability the next reviewer is shown for that pair.
"""

from __future__ import annotations

import contextlib
import sqlite3
from dataclasses import dataclass

import numpy as np

from ..matching.explain import LogOddsTable
from ..matching.logistic import fit_logistic, one_hot, ordered_bounds
from ..matching.model import FSModel, fit_em
from ..ordering import queue
from . import store
from .writer import write_model

FOLDS = 5  # of the labels, to choose the ranker by held-out loss
CROSS_PARTS = 5  # of the audit slice, to score each part by a fit without it
MIN_PER_CLASS = 5


@dataclass
class RefitResult:
    ranker: str
    labels: int
    matches: int
    fs_loss: float | None
    logistic_loss: float | None
    iterations: int
    set_aside: int = 0  # labels not used: audit slice, or pairs still open for others
    superseded: bool = False  # not written: a refit on later decisions had already been

    def to_dict(self) -> dict:
        return self.__dict__.copy()


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


def _fold_losses(x: np.ndarray, fs_fit, lab_pat: np.ndarray, lab_y: np.ndarray,
                 lab_pairs: np.ndarray, patterns: np.ndarray, bounds: list
                 ) -> tuple[float, float]:
    """Held-out log loss of each model, five folds by pair id, on the fitting labels."""
    fold = lab_pairs % FOLDS
    fs_pred = np.zeros(len(lab_y))
    lr_pred = np.zeros(len(lab_y))
    ones = np.ones(len(lab_y))
    for k in range(FOLDS):
        test = fold == k
        if not test.any():
            continue
        fs_pred[test] = fs_fit(~test).probability(patterns[lab_pat[test]])
        lr_pred[test] = fit_logistic(x[lab_pat[~test]], lab_y[~test], bounds=bounds).probability(
            x[lab_pat[test]])
    return _log_loss(fs_pred, lab_y, ones), _log_loss(lr_pred, lab_y, ones)


def decision_mark(conn: sqlite3.Connection) -> int:
    """How far the decision log goes: it is only appended to, so a later state has a higher
    mark. Read before the labels, a refit's mark is at most the log those labels came from."""
    return int(conn.execute("SELECT coalesce(max(rowid), 0) FROM decisions").fetchone()[0])


def one_blas_thread() -> contextlib.AbstractContextManager[object]:
    """BLAS on one thread while the models are fitted. Their products are small (labels by
    about twenty columns, a hundred times per fit) and OpenBLAS's threads, waiting on each
    other and on whatever else shares the cores, made them slow: a refit on 23,000 labels
    took 4.1-7.8 s on two shared cores and 1.5-2.0 s on one thread, every figure the same."""
    # scipy's own BLAS loaded now: the limit holds only for libraries loaded before it
    import scipy.linalg  # noqa: F401
    from threadpoolctl import threadpool_limits
    return threadpool_limits(limits=1, user_api="blas")


def refit(conn: sqlite3.Connection, labels: dict[int, int], mark: int | None = None
          ) -> RefitResult:
    """Refit from ``labels`` (pair_id -> 1 match / 0 non-match, the fitting rule of
    ``reviewing.labels``) and rewrite every pattern's probability and priority.

    ``mark`` (``decision_mark`` read before the labels): two processes refit at once (two
    label commands, a review screen beside a merge), and the one that read its labels first
    may finish last; it then writes nothing, so the model stays the one fitted on more.
    """
    with one_blas_thread():
        return _refit(conn, labels, mark)


def _refit(conn: sqlite3.Connection, labels: dict[int, int], mark: int | None) -> RefitResult:
    meta = store.get_meta(conn)
    base = FSModel.from_dict(meta["fs_model"])
    patterns, counts = _load(conn)
    info: dict[int, tuple[int, int, int]] = {}
    if labels:
        ids = ",".join(map(str, sorted(labels)))
        info = {r[0]: r[1:] for r in conn.execute(
            f"SELECT pair_id, pattern_id, audit, open FROM pairs WHERE pair_id IN ({ids})")}
    held = {p for p, (_, _, is_open) in info.items() if is_open}
    lab_pairs = np.array(sorted(set(labels) - held), dtype=np.int64)
    lab_y = np.array([labels[p] for p in lab_pairs], dtype=float)
    lab_pat = np.array([info[int(p)][0] for p in lab_pairs], dtype=np.int64)
    is_audit = np.array([bool(info[int(p)][1]) for p in lab_pairs], dtype=bool)
    part = lab_pairs % CROSS_PARTS
    u_random = [np.asarray(u) for u in base.u] if base.u_source == "random pairs" else None
    n_levels = [len(x) for x in base.level_names]
    bounds = ordered_bounds(n_levels)  # the ranker's levels kept in order, as the model's are

    fitted_on: dict[bytes, FSModel] = {}  # the ranker's choice and its fit share a mask's fit

    def fs_fit(mask: np.ndarray) -> FSModel:
        key = np.packbits(mask).tobytes()  # one length of mask within a refit
        if key not in fitted_on:
            fitted_on[key] = _fs_fit(mask)
        return fitted_on[key]

    def _fs_fit(mask: np.ndarray) -> FSModel:
        m = np.bincount(lab_pat[mask], weights=lab_y[mask], minlength=len(counts))
        n = np.bincount(lab_pat[mask], weights=1 - lab_y[mask], minlength=len(counts))
        fitted = fit_em(patterns, counts, base.level_names, base.fields, m, n,
                        u_random=u_random, population=base.population,
                        together=base.together, joint_u=base.joint_u)
        fitted.sampled_pairs, fitted.frequent = base.sampled_pairs, base.frequent
        fitted.population = base.population
        return fitted

    def table_fit(mask: np.ndarray, ranker: str) -> tuple[FSModel, LogOddsTable]:
        fs = fs_fit(mask)
        fs_table = LogOddsTable.from_fs(fs)
        if ranker == "fellegi-sunter":
            return fs, fs_table
        x = one_hot(patterns, n_levels, fs_table.log_odds(patterns))
        coef = fit_logistic(x[lab_pat[mask]], lab_y[mask], bounds=bounds).coef
        return fs, LogOddsTable.from_logistic(fs_table, coef, n_levels)

    def choose(mask: np.ndarray) -> tuple[str, float | None, float | None]:
        """The ranker that predicts held-out labels better, from the labels in ``mask``."""
        y = lab_y[mask]
        if y.sum() < MIN_PER_CLASS or len(y) - y.sum() < MIN_PER_CLASS:
            return "fellegi-sunter", None, None

        def fit_within(inner: np.ndarray) -> FSModel:
            whole = np.zeros(len(lab_y), dtype=bool)
            whole[np.flatnonzero(mask)[inner]] = True
            return fs_fit(whole)

        fs0 = LogOddsTable.from_fs(fs_fit(mask))
        x_all = one_hot(patterns, n_levels, fs0.log_odds(patterns))
        fs_l, lr_l = _fold_losses(x_all, fit_within, lab_pat[mask], y, lab_pairs[mask],
                                  patterns, bounds)
        return ("logistic" if lr_l < fs_l else "fellegi-sunter"), fs_l, lr_l

    everything = np.ones(len(lab_pairs), dtype=bool)
    n_match = int(lab_y.sum())
    ranker, fs_loss, lr_loss = choose(everything)
    fs, table = table_fit(everything, ranker)
    crossed: dict[str, float] = {}
    for k in range(CROSS_PARTS):
        judged = is_audit & (part == k)
        if judged.any():
            # the part's own labels choose neither the ranker nor its fit (cross-fitting)
            _, other = table_fit(~judged, choose(~judged)[0])
            p_k = other.probability(patterns[lab_pat[judged]])
            crossed.update({str(int(p)): float(q) for p, q in zip(lab_pairs[judged], p_k,
                                                                   strict=True)})
    log_odds = table.log_odds(patterns)
    prob = table.probability(patterns)
    fs_prob = LogOddsTable.from_fs(fs).probability(patterns)
    prio = queue.priority(prob, float(meta["threshold"]))
    conn.execute("BEGIN IMMEDIATE")
    try:
        standing = store.get_meta(conn).get("refit_mark")
        if mark is not None and standing is not None and int(standing) > mark:
            conn.execute("ROLLBACK")
            return RefitResult(table.model, len(lab_y), n_match, fs_loss, lr_loss,
                               fs.iterations, len(held), superseded=True)
        conn.executemany(
            "UPDATE patterns SET weight = ?, fs_probability = ?, probability = ?, priority = ? "
            "WHERE pattern_id = ?",
            [(float(log_odds[i]), float(fs_prob[i]), float(prob[i]), float(prio[i]), i)
             for i in range(len(patterns))])
        write_model(conn, fs)
        aside = f"; {len(held)} set aside while open for another reviewer" if held else ""
        note = (f"{len(lab_y)} labels{aside}; held-out log loss Fellegi–Sunter "
                f"{fs_loss:.3f}, logistic {lr_loss:.3f}"
                if fs_loss is not None and lr_loss is not None
                else f"{len(lab_y)} labels{aside}; too few of each class for the logistic "
                     "ranker")
        store.set_meta(conn, fs_model=fs.to_dict(), ranker=table.model, ranker_note=note,
                       explain=table.to_dict(), audit_scores=crossed,
                       refits=int(meta.get("refits", 0)) + 1,
                       **({} if mark is None else {"refit_mark": mark}))
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    return RefitResult(table.model, len(lab_y), n_match, fs_loss, lr_loss, fs.iterations,
                       len(held))


def audit_scores(meta: dict) -> dict[int, float]:
    """Cross-fitted probability of each labelled audit pair (fitted without its part)."""
    return {int(k): float(v) for k, v in meta.get("audit_scores", {}).items()}

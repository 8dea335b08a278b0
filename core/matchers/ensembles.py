"""Ensembles of machine raters: majority vote and Dawid–Skene, stored as matchers of their own
(kind ``ensemble``), so the side-by-side report judges them like any other.

Majority vote: the score is the share of members calling the pair a match, and the ensemble
predicts a match when more than half do (a tie is a non-match). A member that said nothing
about a pair votes non-match, as it counts everywhere else.

Dawid–Skene (``core.dawid_skene``): each rater's confusion matrix and each pair's probability
of being a match, fitted without the gold labels; the score is that probability, threshold
0.5. A million pairs rated by a handful of raters hold only a few distinct label patterns, so
the model is fitted on the patterns, each weighted by how many pairs share it. A member's
missing answer is left out of the pattern here (Dawid–Skene needs no complete ratings), and
with ``with_reviewers`` every reviewer's standing match / non-match joins as one more rater.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from ..errors import DocketError
from ..reviewing.dawid_skene import dawid_skene
from ..storage import store
from ..storage.project_file import ProjectFile
from . import catalogue
from .judged import predictions

METHODS = ("vote", "dawid-skene")
MISSING, NON_MATCH, MATCH = -1, 0, 1


def majority_vote(predicted: Sequence[np.ndarray]) -> tuple[np.ndarray, float]:
    """(vote share per pair, threshold at which the share is a strict majority)."""
    k = len(predicted)
    share = np.sum(predicted, axis=0) / k
    return share, (k // 2 + 1) / k


def pattern_dawid_skene(codes: np.ndarray, names: Sequence[str]) -> tuple[np.ndarray, dict]:
    """P(match) per row of ``codes`` (rows: pairs, columns: raters; MATCH, NON_MATCH or
    MISSING), fitted on the distinct rows; and the fitted model as a dict."""
    patterns, inverse, counts = np.unique(codes, axis=0, return_inverse=True,
                                          return_counts=True)
    ratings = [(u, names[r], "match" if patterns[u, r] == MATCH else "non-match")
               for u in range(len(patterns)) for r in range(len(names))
               if patterns[u, r] != MISSING]
    if not ratings:
        raise DocketError("the ensemble's members gave no answer on any pair")
    fit = dawid_skene(ratings, ("match", "non-match"),
                      unit_weights={u: float(c) for u, c in enumerate(counts)})
    post = np.array([fit.posteriors.get(u, {"match": fit.priors["match"]})["match"]
                     for u in range(len(patterns))])
    return post[inverse.ravel()], fit.to_dict()


def _reviewer_codes(project: ProjectFile, ids: np.ndarray) -> tuple[list[str], list[np.ndarray]]:
    rows = project.connection.execute(
        "SELECT pair_id, reviewer, label FROM current WHERE role = 'reviewer' "
        "AND label IN ('match', 'non-match')").fetchall()
    names = sorted({r for _, r, _ in rows})
    cols = {n: np.full(ids.size, MISSING, dtype=np.int8) for n in names}
    for pid, reviewer, label in rows:
        cols[reviewer][np.searchsorted(ids, pid)] = MATCH if label == "match" else NON_MATCH
    return [f"reviewer {n}" for n in names], [cols[n] for n in names]


def ensemble_scores(project: ProjectFile, members: Sequence[str], method: str,
                    with_reviewers: bool = False) -> tuple[np.ndarray, float, str]:
    """(score per candidate pair, threshold, description) of an ensemble of ``members``."""
    if method not in METHODS:
        raise DocketError(f"--method {method}: use vote or dawid-skene")
    if len(set(members)) < 2:
        raise DocketError("an ensemble needs at least two different matchers in --of")
    if with_reviewers and method != "dawid-skene":
        raise DocketError("--with-reviewers goes with --method dawid-skene")
    conn = project.connection
    infos = {m.name: m for m in catalogue.matchers(conn)}
    scores = catalogue.load_scores(conn, list(members))
    predicted = [predictions(scores[m], infos[m].threshold) for m in members]
    if method == "vote":
        share, threshold = majority_vote(predicted)
        return share, threshold, f"majority vote of {', '.join(members)}"
    codes = [np.where(np.isnan(scores[m]), MISSING, p.astype(np.int8))
             for m, p in zip(members, predicted, strict=True)]
    names = list(members)
    if with_reviewers:
        extra_names, extra = _reviewer_codes(project, catalogue.pair_ids(conn))
        names += extra_names
        codes += extra
    post, _ = pattern_dawid_skene(np.stack(codes, axis=1).astype(np.int8), names)
    who = ", ".join(members) + (" and the reviewers" if with_reviewers else "")
    return post, 0.5, f"Dawid-Skene over {who}"


def store_ensemble(project: ProjectFile, name: str, members: Sequence[str], method: str,
                   with_reviewers: bool = False, replace: bool = False) -> None:
    name = name.strip()
    if name in members:
        raise DocketError(f"ensemble {name!r} cannot be one of its own members")
    scores, threshold, source = ensemble_scores(project, members, method, with_reviewers)
    with project.transaction() as conn:
        if not replace and any(m.name == name for m in catalogue.matchers(conn)):
            raise DocketError(f"matcher {name!r} is already stored; pass --replace to "
                              "replace it")
        info = catalogue.MatcherInfo(name, "ensemble", threshold, None, None, source,
                                     int(scores.size), int(scores.size), 0, 0, store.now())
        catalogue.save(conn, info, scores)

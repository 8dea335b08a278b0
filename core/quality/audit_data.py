"""The audit slice as the project holds it: its labelled pairs, strata and every pair's score.

``audit_sample`` reads the standing gold labels of the slice with their strata and inclusion
probabilities, keeps held pairs apart (for bounds), and adds every candidate pair's score as
the sample's population, so predicted matches per stratum are counted, not estimated.
"""

from __future__ import annotations

from collections.abc import Hashable, Mapping, Sequence
from dataclasses import replace
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..matching.decision_rule import predicted
from ..reviewing.gold import gold_labels, standing
from ..storage.project_file import ProjectFile
from ..storage.refit import audit_scores
from ..wording import many
from .audit_sample import AuditSample


def sample_from(score: Sequence[float] | np.ndarray, label: Sequence[int | None],
                stratum: Sequence[Hashable] | np.ndarray,
                inclusion: Sequence[float] | np.ndarray,
                strata: Mapping[Any, Sequence[int]]) -> AuditSample:
    """An ``AuditSample`` from every drawn audit pair (label 1, 0 or None when not settled).

    ``strata`` maps each stratum to (N_h pairs in it, n_h drawn), as stored at creation.
    """
    lab = np.array([np.nan if v is None else float(v) for v in label], dtype=float)
    keep = ~np.isnan(lab)
    sizes = {h: int(v[0]) for h, v in strata.items()}
    drawn = {h: int(v[1]) for h, v in strata.items()}
    return AuditSample(np.asarray(score, dtype=float)[keep], lab[keep],
                                 np.asarray(stratum)[keep],
                                 np.asarray(inclusion, dtype=float)[keep], sizes, drawn)


def gold_y(project: ProjectFile) -> dict[int, int]:
    """pair_id -> 1 (match) / 0 (non-match) for every gold label."""
    return {g.pair_id: int(g.label == "match") for g in gold_labels(project.connection)}


def audit_rows(project: ProjectFile) -> pd.DataFrame:
    return pd.read_sql_query(
        "SELECT pair_id, stratum, inclusion FROM pairs WHERE audit = 1 ORDER BY pair_id",
        project.connection)


def audit_strata(project: ProjectFile) -> dict[int, list[int]]:
    return {int(h): v for h, v in project.meta.get("audit_strata", {}).items()}


def model_scores(project: ProjectFile) -> pd.Series:
    """The model's score per pair id, as the project predicts with it.

    Plain projects: the match probability. One-to-one projects: the probability where the pair
    is both records' best candidate and 0 elsewhere, so "score >= t" is the one-to-one
    prediction (``core.matching.decision_rule.predicted``) at every threshold t > 0.
    """
    one_to_one = bool(project.meta.get("one_to_one"))
    # the record ids only where the rule needs them: 1,000,000 pairs' ids took half the time
    frame = pd.read_sql_query(
        f"SELECT p.pair_id, {'p.left_id, p.right_id, ' if one_to_one else ''}t.probability "
        "FROM pairs p JOIN patterns t ON t.pattern_id = p.pattern_id", project.connection)
    # Labelled audit pairs are judged by a model fitted without them (see core.refit).
    crossed = audit_scores(project.meta)
    if crossed:
        frame["probability"] = frame["pair_id"].map(crossed).fillna(frame["probability"])
    score = frame["probability"].to_numpy(dtype=float)
    if one_to_one:
        score = np.where(predicted(frame, 0.0, True), score, 0.0)
    return pd.Series(score, index=frame["pair_id"].to_numpy())


def held_pairs(project: ProjectFile, gold: Mapping[int, int]) -> set[int]:
    """Pairs with a standing hold and no gold label."""
    return {pid for pid, e in standing(project.connection).items() if pid not in gold and
            "hold" in (*e.reviewers.values(), *e.adjudicators.values())}


def disputed_pairs(project: ProjectFile, gold: Mapping[int, int]) -> set[int]:
    """Pairs whose reviewers disagree (a match beside a non-match), with no gold label and no
    hold: they wait for an adjudicator, and count as not yet labelled."""
    return {pid for pid, e in standing(project.connection).items() if pid not in gold and
            {"match", "non-match"} <= set(e.reviewers.values()) and
            "hold" not in (*e.reviewers.values(), *e.adjudicators.values())}


def no_gold_yet(project: ProjectFile, drawn: int) -> DocketError:
    """The one line for an audit slice with no gold label, counting the held audit pairs."""
    audit = set(audit_rows(project)["pair_id"].tolist())
    held = len(held_pairs(project, {}) & audit)
    holds = (f"; {many(held, 'audit pair')} {'is' if held == 1 else 'are'} on hold, and a "
             "hold is no gold label: decide them or adjudicate" if held else "")
    return DocketError(f"the audit slice has no gold labels yet (0 of {drawn:,} drawn pairs"
                       f"{holds}); review some: every fifth pair of a reviewer's queue is an "
                       "audit pair")


def audit_sample(project: ProjectFile, scores: pd.Series | None = None,
                 gold: Mapping[int, int] | None = None) -> AuditSample:
    """The audit slice's standing gold labels with their strata and inclusion probabilities.

    ``scores`` (by pair id) defaults to ``model_scores``; every candidate pair's score goes in
    as the sample's ``population``, so predicted matches per stratum are counted, not
    estimated. Audit pairs not reviewed yet or in disagreement count as missing at random
    within their stratum (``disputed_pairs`` for the notes); held ones are kept apart, for
    bounds.
    """
    scores = model_scores(project) if scores is None else scores
    rows = audit_rows(project)
    gold = gold_y(project) if gold is None else gold  # (``gold_y``, when the caller has it)
    held = held_pairs(project, gold)
    base = sample_from(scores.reindex(rows["pair_id"]).to_numpy(),
                       [gold.get(int(p)) for p in rows["pair_id"]], rows["stratum"].to_numpy(),
                       rows["inclusion"].to_numpy(), audit_strata(project))
    on_hold = rows[rows["pair_id"].isin(held)]
    every = pd.read_sql_query("SELECT pair_id, stratum FROM pairs", project.connection)
    every["score"] = scores.reindex(every["pair_id"]).to_numpy()
    population = {int(h): g["score"].to_numpy() for h, g in every.groupby("stratum")}
    return replace(base, held_score=scores.reindex(on_hold["pair_id"]).to_numpy(),
                   held_stratum=on_hold["stratum"].to_numpy(), population=population)

"""Honest quality of the project's model, or of any matcher's output, from the audit slice.

The design-based figures come from ``quality.estimates`` (Horvitz–Thompson ratios over the audit
slice's strata, intervals named per figure). Beside them sits the naive figure from every gold
label, unweighted, marked biased: the queue shows uncertain pairs first, so the labelled pairs
are not a sample of the candidate pairs.

Recall here is recall *within the candidate pairs*: a true match that blocking never paired is
in no stratum and no estimate can see it. The blocking rules' reach is reported beside it.
"""

from __future__ import annotations

from collections.abc import Hashable, Mapping, Sequence
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..matching.decision_rule import predicted
from ..ordering.queue_order import describe
from ..ordering.sampling import sampling_note
from ..records.sources import read_frame
from ..reviewing.agreement import cohen_kappa, json_ready
from ..reviewing.gold import gold_labels
from ..storage import store
from ..storage.project_file import ProjectFile
from ..storage.refit import audit_scores
from . import estimates
from .intervals import clopper_pearson

DEFAULT_THRESHOLDS = (0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 0.99)
WITHIN_CANDIDATES = ("recall is measured within the candidate pairs: true matches that the "
                     "blocking rules never paired are outside it and not counted")
NAIVE_MARK = ("biased by the queue order: unweighted over every gold label, most of them chosen "
              "because the model was unsure, so it describes the labelled pairs, not the "
              "candidate pairs")
METHODS = {
    "point": "Horvitz–Thompson ratio estimates over the audit slice's strata (weights N_h / m_h)",
    "precision_recall": "Korn–Graubard interval from a stratified rescaling bootstrap (Wilson "
                        "when the labelled pairs are self-weighting); see each interval's method",
    "f1": "percentile interval of the stratified rescaling bootstrap",
    "naive": "plain proportions with Wilson intervals over all gold labels: biased",
}
SCORE_COLUMNS = ("score", "probability")
LABEL_COLUMNS = ("label", "predicted")
TRUE_WORDS = {"match", "1", "true", "yes", "y", "t"}
FALSE_WORDS = {"non-match", "nonmatch", "non_match", "0", "false", "no", "n", "f"}


# -- the audit sample ---------------------------------------------------------------------------
def sample_from(score: Sequence[float] | np.ndarray, label: Sequence[int | None],
                stratum: Sequence[Hashable] | np.ndarray,
                inclusion: Sequence[float] | np.ndarray,
                strata: Mapping[Any, Sequence[int]]) -> estimates.AuditSample:
    """An ``AuditSample`` from every drawn audit pair (label 1, 0 or None when not settled).

    ``strata`` maps each stratum to (N_h pairs in it, n_h drawn), as stored at creation.
    """
    lab = np.array([np.nan if v is None else float(v) for v in label], dtype=float)
    keep = ~np.isnan(lab)
    sizes = {h: int(v[0]) for h, v in strata.items()}
    drawn = {h: int(v[1]) for h, v in strata.items()}
    return estimates.AuditSample(np.asarray(score, dtype=float)[keep], lab[keep],
                                 np.asarray(stratum)[keep],
                                 np.asarray(inclusion, dtype=float)[keep], sizes, drawn)


def _gold_y(project: ProjectFile) -> dict[int, int]:
    """pair_id -> 1 (match) / 0 (non-match) for every gold label."""
    return {g.pair_id: int(g.label == "match") for g in gold_labels(project.connection)}


def _audit_rows(project: ProjectFile) -> pd.DataFrame:
    return pd.read_sql_query(
        "SELECT pair_id, stratum, inclusion FROM pairs WHERE audit = 1 ORDER BY pair_id",
        project.connection)


def _strata(project: ProjectFile) -> dict[int, list[int]]:
    return {int(h): v for h, v in project.meta.get("audit_strata", {}).items()}


def model_scores(project: ProjectFile) -> pd.Series:
    """The model's score per pair id, as the project predicts with it.

    Plain projects: the match probability. One-to-one projects: the probability where the pair
    is both records' best candidate and 0 elsewhere, so "score >= t" is the one-to-one
    prediction (``core.matching.decision_rule.predicted``) at every threshold t > 0.
    """
    frame = pd.read_sql_query(
        "SELECT p.pair_id, p.left_id, p.right_id, t.probability FROM pairs p "
        "JOIN patterns t ON t.pattern_id = p.pattern_id", project.connection)
    # Labelled audit pairs are judged by a model fitted without them (see core.refit).
    crossed = audit_scores(project.meta)
    if crossed:
        frame["probability"] = frame["pair_id"].map(crossed).fillna(frame["probability"])
    score = frame["probability"].to_numpy(dtype=float)
    if project.meta.get("one_to_one"):
        score = np.where(predicted(frame, 0.0, True), score, 0.0)
    return pd.Series(score, index=frame["pair_id"].to_numpy())


def audit_sample(project: ProjectFile, scores: pd.Series | None = None) -> estimates.AuditSample:
    """The audit slice's standing gold labels with their strata and inclusion probabilities.

    ``scores`` (by pair id) defaults to ``model_scores``. Audit pairs without a gold label (not
    reviewed yet, on hold, in disagreement) count as missing at random within their stratum.
    """
    scores = model_scores(project) if scores is None else scores
    rows = _audit_rows(project)
    gold = _gold_y(project)
    return sample_from(scores.reindex(rows["pair_id"]).to_numpy(),
                       [gold.get(int(p)) for p in rows["pair_id"]], rows["stratum"].to_numpy(),
                       rows["inclusion"].to_numpy(), _strata(project))


# -- the report ---------------------------------------------------------------------------------
def _thresholds(given: Sequence[float] | None, extra: float | None) -> list[float]:
    ts = list(DEFAULT_THRESHOLDS if given is None else given)
    if extra is not None:
        ts.append(extra)
    return sorted({round(float(t), 12) for t in ts})


def _naive(scores: np.ndarray, y: np.ndarray, t: float, confidence: float) -> dict[str, Any]:
    d = estimates.naive_estimate(scores, y, t, confidence).to_dict()
    d["note"] = NAIVE_MARK
    return d


def rare_error_notes(sample: estimates.AuditSample, threshold: float,
                     confidence: float = 0.95) -> list[str]:
    """Where a stratum shows no error of a kind, the interval cannot see the errors it hides.

    A stratum whose labelled predicted matches hold no false positive (or whose labelled
    matches hold no missed match) adds nothing to the variance, so with rare errors the
    interval comes out too narrow; the note bounds how many such errors could hide there.
    """
    pred = sample.score >= threshold
    kinds = (("false positive", "predicted matches", "precision", pred, sample.label == 0),
             ("missed match", "matches", "recall", sample.label == 1, ~pred))
    notes = []
    for error, among, measure, inside, wrong in kinds:
        hidden, where = 0.0, []
        for h, m_h in sorted(sample.labelled_counts().items(), key=lambda kv: str(kv[0])):
            big = sample.stratum_sizes[h]
            in_h = (sample.stratum == h) & inside
            k = int(in_h.sum())
            if big > m_h and k and not (in_h & wrong).any():
                where.append(h)
                hidden += big * k / m_h * clopper_pearson(0, k, confidence)[1]
        if where and hidden >= 1:
            notes.append(f"no {error} among the labelled {among} of strata {where}: up to "
                         f"{hidden:.0f} could hide there ({confidence:.0%} bound per stratum), "
                         f"which the {measure} interval does not reflect")
    return notes


def _blocking(project: ProjectFile) -> dict[str, Any]:
    b = project.meta.get("blocking", {})
    return {"rules": b.get("rules", []), "pairs_per_rule": b.get("per_rule", {}),
            "candidate_pairs": b.get("pairs"), "possible_pairs": b.get("possible"),
            "reduction_ratio": b.get("reduction_ratio")}


def _check_target(name: str, value: float | None) -> None:
    if value is not None and not 0.0 < value <= 1.0:
        raise DocketError(f"--target-{name} {value}: give a share above 0, at most 1")


def _report(project: ProjectFile, scores: pd.Series, threshold: float,
            thresholds: Sequence[float] | None, target_precision: float | None,
            target_recall: float | None, confidence: float, n_boot: int,
            seed: int) -> dict[str, Any]:
    _check_target("precision", target_precision)
    _check_target("recall", target_recall)
    if target_precision is not None and target_recall is not None:
        raise DocketError("give --target-precision or --target-recall, not both")
    sample = audit_sample(project, scores)
    drawn = sum(v[1] for v in _strata(project).values())
    if sample.n_labelled == 0:
        raise DocketError(f"the audit slice has no gold labels yet (0 of {drawn:,} drawn "
                          "pairs); review some: every fifth pair of a reviewer's queue is "
                          "an audit pair")
    ts = _thresholds(thresholds, threshold)
    table = estimates.threshold_table(sample, ts, confidence, n_boot, seed)
    rows = [e.to_dict() for e in table]
    for row in rows:
        parts = [row["note"], *rare_error_notes(sample, row["threshold"], confidence)]
        row["note"] = "; ".join(p for p in parts if p)
    gold = _gold_y(project)
    g_ids = np.fromiter(gold, dtype=np.int64, count=len(gold))
    g_y = np.fromiter(gold.values(), dtype=np.int64, count=len(gold))
    g_s = scores.reindex(g_ids).to_numpy(dtype=float)
    naive = [_naive(g_s, g_y, t, confidence) for t in ts]
    at = ts.index(round(float(threshold), 12))
    defined = [r for r in rows if r["f1"]["value"] is not None]
    best = max(defined, key=lambda r: r["f1"]["value"]) if defined else None
    suggested = None
    if target_precision is not None or target_recall is not None:
        t = estimates.suggest_threshold(sample, target_precision, target_recall)
        which = "precision" if target_precision is not None else "recall"
        goal = target_precision if target_precision is not None else target_recall
        suggested = {
            "target": which, "goal": goal, "threshold": t,
            "estimate": None if t is None else
            estimates.estimate_at(sample, t, confidence, n_boot, seed).to_dict(),
            "note": (f"no threshold reaches estimated {which} {goal}" if t is None else
                     "chosen on the point estimates of this sample: read the interval at it "
                     "before relying on it")}
    counts = sample.labelled_counts()
    strata = [{"stratum": h, "pairs": v[0], "drawn": v[1], "labelled": int(counts.get(h, 0))}
              for h, v in sorted(_strata(project).items())]
    return {
        "project": str(project.path),
        "mode": project.meta.get("mode"),
        "confidence": confidence,
        "threshold": float(threshold),
        "audit": {"drawn": int(drawn), "labelled": sample.n_labelled,
                  "matches": int(sample.label.sum()), "strata": strata},
        "estimates": rows,
        "at_threshold": rows[at],
        "naive": naive,
        "naive_at_threshold": naive[at],
        "best_f1": None if best is None else {"threshold": best["threshold"],
                                              "f1": best["f1"]["value"]},
        "suggested": suggested,
        "scope": {"recall_within": "candidate pairs", "note": WITHIN_CANDIDATES,
                  "blocking": _blocking(project)},
        "methods": METHODS,
        "gold_labels": len(gold),
        "sampling": sampling_note(project.meta.get("sampling")),
    }


def evaluate(project: ProjectFile, thresholds: Sequence[float] | None = None,
             target_precision: float | None = None, target_recall: float | None = None,
             confidence: float = 0.95, n_boot: int = 2000, seed: int = 0) -> dict[str, Any]:
    """The project's model judged on the audit slice: a JSON-ready dict.

    Keys: ``estimates`` (design-based precision, recall and F1 per threshold, each interval
    naming its method), ``at_threshold`` (the project threshold's row), ``naive`` and
    ``naive_at_threshold`` (all gold labels, unweighted, ``biased`` true), ``suggested`` (for a
    target precision or recall, else None), ``best_f1``, ``scope`` (recall is within the
    candidate pairs; the blocking rules' reach), ``audit``, ``methods`` and ``model``.
    """
    scores = model_scores(project)
    out = _report(project, scores, project.threshold, thresholds, target_precision,
                  target_recall, confidence, n_boot, seed)
    one = bool(project.meta.get("one_to_one"))
    out["queue_order"] = describe(project.meta)
    out["model"] = {"ranker": project.meta.get("ranker"), "one_to_one": one,
                    "audit_labels": "cross-fitted: each labelled audit pair is scored by a "
                                    "model fitted without its half of the audit slice",
                    "score": "match probability, kept only on each record's mutual best pair"
                    if one else "match probability"}
    return json_ready(out)


# -- any matcher's output -----------------------------------------------------------------------
def _flag(values: pd.Series, path: Path) -> np.ndarray:
    text = values.map(lambda v: None if v is None else str(v).strip().lower())
    bad = sorted({v for v in text if v not in TRUE_WORDS and v not in FALSE_WORDS}, key=str)
    if bad:
        raise DocketError(f"{path}: {len(bad)} label value(s) not understood: "
                          f"{', '.join(map(str, bad[:5]))}; use match / non-match (or 1 / 0)")
    return text.isin(TRUE_WORDS).to_numpy()


def _numbers(values: pd.Series, column: str, path: Path) -> np.ndarray:
    num = pd.to_numeric(values, errors="coerce")
    bad = values[num.isna() | ~np.isfinite(num.fillna(0.0))]
    if len(bad):
        raise DocketError(f"{path}: column {column} needs a number on every row; row "
                          f"{int(bad.index[0]) + 2} has {bad.iloc[0]!r}")
    return num.to_numpy(dtype=float)


def _known_ids(project: ProjectFile, side: str) -> set[str]:
    table = "right_records" if side == "right" and project.link else "left_records"
    key = project.meta["right_id_column" if table == "right_records" else "left_id_column"]
    return {r for (r,) in project.connection.execute(f"SELECT {store.quote(key)} FROM {table}")}


def read_predictions(project: ProjectFile, path: str | Path) -> tuple[pd.Series, dict[str, Any]]:
    """Scores per candidate pair id from a matcher's file, and what was read.

    The file (CSV, Parquet or JSONL) has left_id, right_id and a score (``score`` or
    ``probability``) or a label (``label`` or ``predicted``: match / non-match, 1 / 0). A label
    becomes score 1 or 0. Candidate pairs absent from the file get a score below every other:
    a predicted non-match. Ids that name no record are an error; pairs of known records that
    are not candidate pairs are counted and left out (no audit stratum holds them).
    """
    path = Path(path)
    frame = read_frame(path)
    if not {"left_id", "right_id"} <= set(frame.columns):
        raise DocketError(f"{path}: needs columns left_id and right_id (found "
                          f"{', '.join(frame.columns[:8])})")
    kind = next((c for c in SCORE_COLUMNS if c in frame.columns), None)
    label_col = next((c for c in LABEL_COLUMNS if c in frame.columns), None)
    if kind is None and label_col is None:
        raise DocketError(f"{path}: needs a score column ({' or '.join(SCORE_COLUMNS)}) or a "
                          f"label column ({' or '.join(LABEL_COLUMNS)})")
    for side in ("left", "right"):
        ids = frame[f"{side}_id"]
        if ids.isna().any():
            row = int(np.flatnonzero(ids.isna().to_numpy())[0]) + 2
            raise DocketError(f"{path}: row {row} has no {side}_id")
        unknown = sorted(set(ids) - _known_ids(project, side))
        if unknown:
            more = "…" if len(unknown) > 5 else ""
            raise DocketError(f"{path}: {len(unknown)} {side} id(s) name no record: "
                              f"{', '.join(unknown[:5])}{more}")
    if kind is not None:
        score = _numbers(frame[kind], kind, path)
    else:
        kind = label_col
        score = _flag(frame[label_col], path).astype(float)
    pairs = pd.read_sql_query("SELECT pair_id, left_id, right_id FROM pairs", project.connection)
    keyed = pairs.set_index(["left_id", "right_id"])["pair_id"]
    a, b = frame["left_id"].to_numpy(), frame["right_id"].to_numpy()
    found = keyed.reindex(pd.MultiIndex.from_arrays([a, b])).to_numpy(dtype=float)
    if not project.link:  # one table: a pair may be written either way round
        swapped = keyed.reindex(pd.MultiIndex.from_arrays([b, a])).to_numpy(dtype=float)
        found = np.where(np.isnan(found), swapped, found)
    inside = ~np.isnan(found)
    ids = found[inside].astype(np.int64)
    dupes = pd.Series(ids).duplicated()
    if dupes.any():
        first = int(ids[dupes.to_numpy()][0])
        raise DocketError(f"{path}: pair {first} appears more than once; give one prediction "
                          "per pair")
    given = pd.Series(score[inside], index=ids)
    floor = (min(0.0, float(score.min())) if score.size else 0.0) - 1.0
    full = given.reindex(pairs["pair_id"].to_numpy()).fillna(floor)
    info = {"file": str(path), "column": kind, "rows": len(frame),
            "candidate_pairs_given": int(inside.sum()),
            "outside_candidates": int((~inside).sum()),
            "absent_count_as_non_match": int(len(pairs) - inside.sum()),
            "labels_only": kind in LABEL_COLUMNS,
            "scores_in_unit_interval": bool(score.size == 0 or
                                            (score.min() >= 0 and score.max() <= 1))}
    return full, info


def machine_rater(project: ProjectFile, predicted_match: pd.Series) -> dict[str, Any]:
    """Cohen's kappa of a matcher's labels against the gold labels: a machine rater.

    ``predicted_match`` is a bool per pair id. Rows of ``table`` are the machine rater, columns
    the gold labels, both in the order match, non-match.
    """
    gold = _gold_y(project)
    ids = list(gold)
    machine = predicted_match.reindex(ids).fillna(False).to_numpy(dtype=bool)
    truth = np.array([gold[i] == 1 for i in ids], dtype=bool)
    table = [[int(np.sum(machine & truth)), int(np.sum(machine & ~truth))],
             [int(np.sum(~machine & truth)), int(np.sum(~machine & ~truth))]]
    k = cohen_kappa(table, ("match", "non-match"))
    return {"n": k.n, "kappa": k.kappa, "se": k.se, "ci_low": k.ci_low, "ci_high": k.ci_high,
            "band": k.band, "observed_agreement": k.observed, "chance_agreement": k.expected,
            "table": table, "rows": "machine rater (match, non-match)",
            "columns": "gold label (match, non-match)",
            "se_method": "Fleiss, Cohen & Everitt (1969) large-sample standard error"}


def evaluate_predictions(project: ProjectFile, path: str | Path, threshold: float | None = None,
                         thresholds: Sequence[float] | None = None,
                         target_precision: float | None = None,
                         target_recall: float | None = None, confidence: float = 0.95,
                         n_boot: int = 2000, seed: int = 0) -> dict[str, Any]:
    """A matcher's output judged like the model (see ``evaluate``), plus its kappa.

    ``threshold`` is where the file's score becomes a predicted match (default: the project's
    threshold for scores in [0, 1]; a label column needs none). The result adds
    ``predictions`` (what was read) and ``machine_rater`` (``machine_rater``).
    """
    scores, info = read_predictions(project, path)
    if info["labels_only"]:
        threshold, thresholds = 0.5, [0.5]
    elif threshold is None:
        if not info["scores_in_unit_interval"]:
            raise DocketError(f"{path}: scores lie outside 0…1; give --threshold for them")
        threshold = project.threshold
    if thresholds is None and not info["scores_in_unit_interval"]:
        given = scores[scores > scores.min()] if scores.nunique() > 1 else scores
        thresholds = sorted({float(q) for q in np.quantile(given, np.linspace(0.1, 0.9, 9))})
    out = _report(project, scores, float(threshold), thresholds, target_precision,
                  target_recall, confidence, n_boot, seed)
    out["predictions"] = info
    out["machine_rater"] = machine_rater(project, scores >= float(threshold))
    out["model"] = {"ranker": "predictions", "one_to_one": False,
                    "score": "the file's label (1 match, 0 non-match)" if info["labels_only"]
                    else f"the file's {info['column']} column"}
    return json_ready(out)


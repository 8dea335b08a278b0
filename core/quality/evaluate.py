"""Honest quality of the project's model, or of any matcher's output, from the audit slice.

The design-based figures come from ``quality.estimates`` (Horvitz–Thompson ratios over the audit
slice's strata, intervals named per figure). Beside them sits the naive figure from every gold
label, unweighted, marked biased: the queue shows uncertain pairs first, so the labelled pairs
are not a sample of the candidate pairs.

Recall here is recall *within the candidate pairs*: a true match that blocking never paired is
in no stratum and no estimate can see it. The blocking rules' reach is reported beside it.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..ordering.queue_order import describe
from ..ordering.sampling import sampling_note
from ..reviewing import missed
from ..reviewing.agreement import json_ready
from ..storage.project_file import ProjectFile
from . import estimates
from .audit_data import (
    audit_rows,
    audit_sample,
    audit_strata,
    disputed_pairs,
    gold_y,
    no_gold_yet,
)
from .audit_data import model_scores as model_scores  # part of this module's API
from .audit_data import sample_from as sample_from  # part of this module's API
from .machine_rater import machine_rater
from .predictions_file import read_predictions
from .quality_notes import design_notes

DEFAULT_THRESHOLDS = (0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 0.95, 0.99)
WITHIN_CANDIDATES = ("recall is measured within the candidate pairs: true matches that the "
                     "blocking rules never paired are outside it and not counted")
NAIVE_QUEUE = ("biased: unweighted over every gold label, many of them chosen by the queue "
               "because the model was unsure, so it describes the labelled pairs, not the "
               "candidate pairs")
NAIVE_WEIGHTS = ("biased: unweighted over the gold labels, all from the audit slice, whose "
                 "strata were drawn at unequal rates (thin strata over-represented), so it "
                 "describes the labelled pairs, not the candidate pairs")
OPTIMISTIC = ("optimistic: the best of the table, chosen on the same labels that measure it; "
              "the F1 a fresh sample would show at this threshold is likely lower")
METHODS = {
    "point": "within each stratum of the audit slice, the share of matches among its labelled "
             "predicted matches and among its other labelled pairs, times the exact number of "
             "candidate pairs of each kind there",
    "precision_recall": "Korn–Graubard interval (Clopper–Pearson at the effective sample size) "
                        "on the linearised variance, with an allowance for strata that show no "
                        "error of a kind or no predicted match",
    "f1": "the same linearised Korn–Graubard interval as precision and recall",
    "naive": "plain proportions with Wilson intervals over all gold labels: biased",
}


# -- the report ---------------------------------------------------------------------------------
def _thresholds(given: Sequence[float] | None, extra: float | None) -> list[float]:
    ts = list(DEFAULT_THRESHOLDS if given is None else given)
    if extra is not None:
        ts.append(extra)
    return sorted({round(float(t), 12) for t in ts})


def _naive(scores: np.ndarray, y: np.ndarray, t: float, confidence: float,
           mark: str) -> dict[str, Any]:
    d = estimates.naive_estimate(scores, y, t, confidence).to_dict()
    d["note"] = mark
    return d


def _blocking(project: ProjectFile, gold: Mapping[int, int]) -> dict[str, Any]:
    b = project.meta.get("blocking", {})
    # the only reach docket can give: gold matches against those recorded as missed
    found = len(missed.listing(project.connection))
    matches = sum(gold.values())
    return {"rules": b.get("rules", []), "pairs_per_rule": b.get("per_rule", {}),
            "candidate_pairs": b.get("pairs"), "possible_pairs": b.get("possible"),
            "reduction_ratio": b.get("reduction_ratio"),
            "missed": {"count": found, "gold_matches": matches,
                       "reach": missed.reach(matches, found)}}


def _unreached(which: str, goal: float | None, sample: estimates.AuditSample) -> str:
    # with no labelled match, recall is undefined at every threshold, not short of the goal
    if which == "recall" and not sample.label.any():
        return ("no audit pair is labelled a match yet, so recall cannot be estimated at any "
                "threshold")
    return f"no threshold reaches estimated {which} {goal}"


def _check_target(name: str, value: float | None) -> None:
    if value is not None and not 0.0 < value <= 1.0:
        raise DocketError(f"--target-{name} {value}: give a share above 0, at most 1")


def _report(project: ProjectFile, scores: pd.Series, threshold: float,
            thresholds: Sequence[float] | None, target_precision: float | None,
            target_recall: float | None, confidence: float,
            design: tuple[estimates.AuditSample, Mapping[Any, Any]] | None = None
            ) -> dict[str, Any]:
    _check_target("precision", target_precision)
    _check_target("recall", target_recall)
    if target_precision is not None and target_recall is not None:
        raise DocketError("give --target-precision or --target-recall, not both")
    gold = gold_y(project)  # once: every gold label worked out took 0.5 s at 28,000
    sample, design_strata = design or (audit_sample(project, scores, gold),
                                       audit_strata(project))
    drawn = sum(v[1] for v in design_strata.values())
    if sample.n_labelled == 0:
        raise no_gold_yet(project, drawn)
    ts = _thresholds(thresholds, threshold)
    table = estimates.threshold_table(sample, ts, confidence)
    rows = [e.to_dict() for e in table]
    audit_ids = set(audit_rows(project)["pair_id"].tolist())
    disputed = len(disputed_pairs(project, gold) & audit_ids)
    for row in rows:
        row["note"] = "; ".join(design_notes(sample, row["threshold"], confidence, disputed))
    g_ids = np.fromiter(gold, dtype=np.int64, count=len(gold))
    g_y = np.fromiter(gold.values(), dtype=np.int64, count=len(gold))
    g_s = scores.reindex(g_ids).to_numpy(dtype=float)
    mark = NAIVE_WEIGHTS if set(gold) <= audit_ids else NAIVE_QUEUE
    naive = [_naive(g_s, g_y, t, confidence, mark) for t in ts]
    at = ts.index(round(float(threshold), 12))
    # an F1 of 0 everywhere (no labelled match found at any threshold) has no best row: "the
    # highest F1 0.000 at 0.1, optimistic, likely lower" named the first of equal rows
    defined = [r for r in rows if r["f1"]["value"]]
    best = max(defined, key=lambda r: r["f1"]["value"]) if defined else None
    suggested = None
    if target_precision is not None or target_recall is not None:
        t = estimates.suggest_threshold(sample, target_precision, target_recall)
        which = "precision" if target_precision is not None else "recall"
        goal = target_precision if target_precision is not None else target_recall
        suggested = {
            "target": which, "goal": goal, "threshold": t,
            "estimate": None if t is None else
            estimates.estimate_at(sample, t, confidence).to_dict(),
            "note": (_unreached(which, goal, sample) if t is None else
                     "chosen on the point estimates of this sample: read the interval at it "
                     "before relying on it")}
    counts, held = sample.labelled_counts(), sample.held_counts()
    strata = [{"stratum": h, "pairs": v[0], "drawn": v[1], "labelled": int(counts.get(h, 0)),
               "held": int(held.get(h, 0))} for h, v in sorted(design_strata.items())]
    return {
        "project": str(project.path),
        "mode": project.meta.get("mode"),
        "confidence": confidence,
        "threshold": float(threshold),
        "audit": {"drawn": int(drawn), "labelled": sample.n_labelled,
                  "matches": int(sample.label.sum()), "held": sample.n_held, "strata": strata},
        "estimates": rows,
        "at_threshold": rows[at],
        "naive": naive,
        "naive_at_threshold": naive[at],
        "best_f1": None if best is None else {"threshold": best["threshold"],
                                              "f1": best["f1"]["value"], "note": OPTIMISTIC},
        "suggested": suggested,
        "scope": {"recall_within": "candidate pairs", "note": WITHIN_CANDIDATES,
                  "blocking": _blocking(project, gold)},
        "methods": METHODS,
        "gold_labels": len(gold),
        "sampling": sampling_note(project.meta.get("sampling")),
    }


def evaluate(project: ProjectFile, thresholds: Sequence[float] | None = None,
             target_precision: float | None = None, target_recall: float | None = None,
             confidence: float = 0.95, scores: pd.Series | None = None) -> dict[str, Any]:
    """The project's model judged on the audit slice: a JSON-ready dict. ``scores`` (from
    ``model_scores``) spares reading every pair again for a second evaluation.

    Keys: ``estimates`` (design-based precision, recall and F1 per threshold, each interval
    naming its method), ``at_threshold`` (the project threshold's row), ``naive`` and
    ``naive_at_threshold`` (all gold labels, unweighted, ``biased`` true), ``suggested`` (for a
    target precision or recall, else None), ``best_f1``, ``scope`` (recall is within the
    candidate pairs; the blocking rules' reach), ``audit``, ``methods`` and ``model``.
    """
    scores = model_scores(project) if scores is None else scores
    out = _report(project, scores, project.threshold, thresholds, target_precision,
                  target_recall, confidence)
    one = bool(project.meta.get("one_to_one"))
    out["queue_order"] = describe(project.meta)
    out["model"] = {"ranker": project.meta.get("ranker"), "one_to_one": one,
                    "audit_labels": "cross-fitted: each labelled audit pair is scored by a "
                                    "model fitted without its fifth of the audit slice",
                    "score": "match probability, kept only on each record's mutual best pair"
                    if one else "match probability"}
    return json_ready(out)


def evaluate_predictions(project: ProjectFile, path: str | Path, threshold: float | None = None,
                         thresholds: Sequence[float] | None = None,
                         target_precision: float | None = None,
                         target_recall: float | None = None,
                         confidence: float = 0.95, supplement: bool = False) -> dict[str, Any]:
    """A matcher's output judged like the model (see ``evaluate``), plus its kappa.

    ``threshold`` is where the file's score becomes a predicted match (default: the project's
    threshold for scores in [0, 1]; a label column needs none). The result adds
    ``predictions`` (what was read) and ``machine_rater`` (``machine_rater``). With
    ``supplement`` the figures come from the audit slice and the supplement drawn on the file's
    scores together (``quality.union_design``); ``audit["sample"]`` says so.
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
    design, made = None, None
    if supplement:
        from .supplement import supplement_sample
        sample, made, cells = supplement_sample(project, scores, path)
        design = (sample, cells)
    out = _report(project, scores, float(threshold), thresholds, target_precision,
                  target_recall, confidence, design)
    if made is not None:
        out["audit"]["sample"] = (f"the audit slice and the supplement drawn on {made.file}'s "
                                  "scores, together")
        out["audit"]["strata_are"] = ("cells 'h:g' of audit stratum h and supplement stratum g "
                                      "(small cells merged along g)")
        out["audit"]["supplement"] = made.to_dict()
    outside = info.pop("_outside_scores")
    k = int(np.sum(outside >= float(threshold)))
    info["outside_predicted_matches"] = k
    at = out["at_threshold"]
    tp, pp = at["true_positives"], at["predicted_positives"]
    info["scope"] = (f"precision and recall speak for the candidate pairs only; {k:,} of the "
                     "file's predicted matches name pairs outside them and are not evaluated"
                     + (f": over all its predicted matches precision could be as low as "
                        f"{tp / (pp + k):.3f}" if k and pp + k > 0 else ""))
    out["predictions"] = info
    out["machine_rater"] = machine_rater(project, scores >= float(threshold))
    out["model"] = {"ranker": "predictions", "one_to_one": False,
                    "score": "the file's label (1 match, 0 non-match)" if info["labels_only"]
                    else f"the file's {info['column']} column"}
    return json_ready(out)


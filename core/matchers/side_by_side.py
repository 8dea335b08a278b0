"""Every stored matcher judged on the audit slice, against the gold and against each other.

Per matcher: design-based precision, recall and F1 at its own threshold (``quality.estimates``,
the same estimators and intervals as ``docket evaluate``), the audit pairs they rest on,
Cohen's kappa against the gold labels and against every other matcher; then the paired
differences of every two matchers (``paired``), so that one is said to beat another only when
the interval of the difference excludes 0.
"""

from __future__ import annotations

from collections.abc import Sequence
from itertools import combinations
from typing import Any

import numpy as np

from ..errors import DocketError
from ..ordering.queue_order import describe
from ..quality import estimates
from ..quality.quality_notes import design_notes
from ..reviewing.agreement import cohen_kappa, json_ready
from ..storage.project_file import ProjectFile
from . import catalogue
from .distillation import distillation
from .judged import Judged, gather
from .paired import MEASURES, METHOD, paired_difference
from .stability import variants

KAPPA_GOLD_NOTE = ("over every gold label, unweighted: the queue chose most of them, so it "
                   "describes the labelled pairs")
KAPPA_PAIR_NOTE = "over every candidate pair: a census, so no interval is needed"


def kappa_of(a: np.ndarray, b: np.ndarray) -> dict[str, Any]:
    """Cohen's kappa of two bool vectors (match / non-match), as a plain dict."""
    table = [[int(np.sum(a & b)), int(np.sum(a & ~b))],
             [int(np.sum(~a & b)), int(np.sum(~a & ~b))]]
    k = cohen_kappa(table, ("match", "non-match"))
    return {"kappa": k.kappa, "low": k.ci_low, "high": k.ci_high, "n": k.n, "band": k.band,
            "observed_agreement": k.observed, "table": table}


def figures(judged: Judged, name: str, confidence: float = 0.95) -> dict[str, Any]:
    """One matcher's row: P, R, F1 with intervals, audit pairs used, kappa against the gold."""
    pred = judged.predicted[name]
    sample = judged.sample_for(name)
    e = estimates.estimate_at(sample, 0.5, confidence)
    info = judged.infos[name]
    gold = judged.gold_y == 1
    return {
        "name": name,
        "kind": "model" if info is None else info.kind,
        "threshold": None if info is None else info.threshold,
        "group": None if info is None else info.variant_group,
        "role": None if info is None else info.role,
        "audit_pairs": e.n_labelled,
        "precision": e.precision.__dict__, "recall": e.recall.__dict__, "f1": e.f1.__dict__,
        "predicted_matches": float(pred.sum()),
        "estimated_true_matches": e.true_matches.value,
        "kappa_gold": kappa_of(pred[judged.gold_at], gold),
        "note": "; ".join(design_notes(sample, 0.5, confidence)),
    }


def between(judged: Judged) -> list[dict[str, Any]]:
    """Cohen's kappa of every two matchers over all candidate pairs."""
    out = []
    for a, b in combinations(judged.names, 2):
        k = kappa_of(judged.predicted[a], judged.predicted[b])
        out.append({"first": a, "second": b, **k})
    return out


def differences(judged: Judged, confidence: float = 0.95) -> list[dict[str, Any]]:
    out = []
    samples = {n: judged.sample_for(n) for n in judged.names}
    for a, b in combinations(judged.names, 2):
        for measure in MEASURES:
            out.append(paired_difference(samples[a], a, samples[b], b, measure,
                                         confidence).to_dict())
    return out


def side_by_side(project: ProjectFile, names: Sequence[str] | None = None,
                 confidence: float = 0.95) -> dict[str, Any]:
    """The report of ``docket evaluate --matchers``: a JSON-ready dict."""
    if not catalogue.matchers(project.connection):
        raise DocketError("no matchers stored in this project; add some with 'docket "
                          "matchers PROJECT import FILE'")
    judged = gather(project, names)
    drawn = sum(v[1] for v in project.meta.get("audit_strata", {}).values())
    return json_ready({
        "project": str(project.path),
        "confidence": confidence,
        "audit": {"drawn": int(drawn), "labelled": judged.sample.n_labelled,
                  "matches": int(judged.sample.label.sum())},
        "gold_labels": int(judged.gold_y.size),
        "matchers": [figures(judged, n, confidence) for n in judged.names],
        "kappa_between": between(judged),
        "differences": differences(judged, confidence),
        "variants": variants(project, judged),
        "distillation": distillation(project, judged, confidence),
        "queue_order": describe(project.meta),
        "notes": {"kappa_gold": KAPPA_GOLD_NOTE, "kappa_between": KAPPA_PAIR_NOTE,
                  "differences": "each difference is first minus second on the same labelled "
                                 "audit pairs; intervals are not adjusted for the number of "
                                 "comparisons"},
        "methods": {"precision_recall": "as docket evaluate: see each interval's method",
                    "differences": METHOD},
    })

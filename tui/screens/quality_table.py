"""The quality screen's threshold table: design-based figures per threshold, wide or narrow.

At 80 columns every column stays: intervals take two decimals (``0.92 [.88–.95]``) and the
decision threshold's mark joins the threshold, rather than a column being cut.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.widgets import DataTable

from docket.core import DEFAULT_THRESHOLDS
from docket.core.results import Evaluation

from ..diff import PLAIN, Palette
from ..evaluation_text import blocking_reach, blocking_size
from ..figures import among_pairs, bounds, estimate, many, narrow_estimate, short_number

NARROW_BELOW = 110  # screen widths below this get the narrow threshold table
WIDE_LABELS = ("", "threshold", "precision [95 % CI]", "recall [95 % CI]", "F1 [95 % CI]",
               "predicted", "naive P / R (biased)")
NARROW_LABELS = ("p ≥", "precision", "recall", "F1 [95 % CI]", "predicted", "naive P/R")


def fill_threshold_table(table: DataTable, report: Evaluation, palette: Palette,
                         narrow: bool) -> None:
    """The table's columns and one row per threshold shown (the defaults and the project's)."""
    p = palette
    labels = NARROW_LABELS if narrow else WIDE_LABELS
    for label in labels:
        table.add_column(Text(label, p.negative if label.startswith("naive") else p.muted))
    shown = set(DEFAULT_THRESHOLDS) | {report.threshold}
    for e, n in zip(report.estimates, report.naive, strict=True):
        if e["threshold"] not in shown:
            continue
        mark = "*" if e["threshold"] == report.threshold else ""
        figures = [interval(e[k], narrow) for k in ("precision", "recall", "f1")]
        predicted = Text(f"{e['predicted_positives']:,.0f}")
        if narrow:  # the mark joins the threshold: 80 columns hold every column
            naive = f"{_point(n['precision'], 2)}/{_point(n['recall'], 2)}"
            table.add_row(Text(f"{e['threshold']:g}{' ' + mark if mark else ''}"),
                          *figures, predicted, Text(naive, p.muted),
                          key=str(e["threshold"]))
        else:
            table.add_row(Text(mark, p.heading), Text(f"{e['threshold']:g}"), *figures,
                          predicted,
                          Text(f"{_point(n['precision'])} / {_point(n['recall'])}", p.muted),
                          key=str(e["threshold"]))


def interval(d: dict[str, Any], narrow: bool = False) -> Text:
    """``0.923 [0.880, 0.951]``, or at narrow widths ``0.92 [.88–.95]``."""
    return Text(narrow_estimate(d) if narrow else estimate(d))


def _point(d: dict[str, Any], digits: int = 3) -> str:
    if d.get("value") is None:
        return "—"
    return f"{d['value']:.{digits}f}" if digits == 3 else short_number(d["value"])


def notes_text(report: Evaluation, palette: Palette = PLAIN) -> Text:
    p = palette
    at, naive = report.at_threshold, report.naive_at_threshold
    text = Text(f"* the project's decision threshold, {report.threshold:g}. Intervals: "
                f"{at['precision']['method']} for precision, recall and F1. Predicted: "
                f"matches predicted {among_pairs(at['n_pairs'], report.audit.get('strata', []))}"
                ".\n", p.muted)
    if at.get("held"):
        text.append(f"{many(at['held'], 'held audit pair')}, all wrong … all right: precision "
                    f"{bounds(at['precision_bounds'])}, recall {bounds(at['recall_bounds'])}, "
                    f"F1 {bounds(at['f1_bounds'])}: these bounds are what the labels vouch "
                    "for; adjudicate the holds to narrow them\n", p.heading)
    s, best = report.suggested, report.best_f1
    if s is not None and s["threshold"] is not None:
        text.append(f"suggested threshold {s['threshold']:.4g} for {s['target']} ≥ "
                    f"{s['goal']:g} ({s['note']})\n")
    elif best is not None:
        text.append(f"highest estimated F1 in the table: {best['f1']:.3f} at threshold "
                    f"{best['threshold']:g}, {best['note']} (docket evaluate "
                    "--target-precision P or --target-recall R suggests one for a goal)\n")
    text.append("naive column: ", p.heading)
    text.append(f"precision / recall {naive['note']}; their Wilson intervals are in "
                "docket evaluate --json.\n", p.muted)
    scope = report.scope
    text.append(scope["note"].capitalize() + ".", p.heading)
    b = scope["blocking"]
    if b.get("candidate_pairs") is not None:  # in the words of docket evaluate
        reach = blocking_reach(b.get("missed"), report.project)
        text.append(f" Blocking: {blocking_size(b)}. {reach[0].upper()}{reach[1:]}.", p.muted)
    for note in (n for n in at["note"].split("; ") if n):
        text.append(f"\nat {at['threshold']:g}: {note}", p.muted)
    return text



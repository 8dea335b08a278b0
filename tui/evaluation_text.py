"""``docket evaluate`` as text: the threshold table, the suggestion, the naive line, the scope
and, for a matcher's file, its figures as a machine rater. JSON is ``Evaluation.to_dict``; the
quality screen draws the same object (``screens/quality_table.py``)."""

from __future__ import annotations

import shlex
from typing import Any

from docket.core.results import Evaluation

from .figures import (
    among_pairs,
    bounds,
    estimate,
    interval,
    labelled_text,
    many,
    narrow_estimate,
    noun,
    number,
)
from .terminal import padded


# -- text -------------------------------------------------------------------------------
def _iv(d: dict[str, Any]) -> str:
    return f"{estimate(d):<22}"


def _row(e: dict[str, Any], mark: str) -> str:
    return (f"{mark} {e['threshold']:>8.4g}  {_iv(e['precision']):<24}{_iv(e['recall']):<24}"
            f"{_iv(e['f1']):<24}{e['predicted_positives']:>12,.0f}")


WIDE_HEAD = f"{'precision':<24}{'recall':<24}{'F1':<24}{'predicted':>12}"
NARROW_HEAD = f"{'precision':<16}{'recall':<16}{'F1':<16}{'predicted':>11}"
WIDE = 12 + len(WIDE_HEAD)  # 96 cells: what a terminal needs for the table in full


def _narrow_row(e: dict[str, Any], mark: str) -> str:
    """A row of the table as the quality screen's narrow one writes it (``0.92 [.88–.95]``):
    the wide row is 96 cells, and folded at 80 columns each threshold took two lines."""
    figures = "".join(f"{narrow_estimate(e[k]):<16}" for k in ("precision", "recall", "f1"))
    return f"{mark} {e['threshold']:>8.4g}  {figures}{e['predicted_positives']:>11,.0f}"


NARROW_NOTE = (f", to two decimals with their ends rounded outwards to fit the terminal (three on "
               f"one of {WIDE} columns, in a pipe or with --json)")


def _table(report: Evaluation, width: int | None) -> list[str]:
    """The threshold table; below ``WIDE`` columns with two decimals, so it fits 80."""
    narrow = width is not None and width < WIDE
    head, row = (NARROW_HEAD, _narrow_row) if narrow else (WIDE_HEAD, _row)
    return [f"{'threshold':>10}  {head}",
            *(row(e, "*" if e["threshold"] == report.threshold else " ")
              for e in report.estimates)]


def _short(e: dict[str, Any]) -> str:
    return (f"precision {estimate(e['precision'])}, recall {estimate(e['recall'])}, "
            f"F1 {estimate(e['f1'])}")


def held_line(e: dict[str, Any]) -> str | None:
    """The bounds at one threshold when audit pairs are held, else None."""
    if not e.get("held"):
        return None
    return (f"with the {many(e['held'], 'held audit pair')} all wrong … all right: precision "
            f"{bounds(e['precision_bounds'])}, recall {bounds(e['recall_bounds'])}, F1 "
            f"{bounds(e['f1_bounds'])} (these bounds, not the intervals above, are what the "
            "labels can vouch for)")


def evaluation_lines(report: Evaluation, name: str, width: int | None = None) -> list[str]:
    """The evaluation as lines of text: table, suggestion, naive line, scope, machine rater;
    for a terminal of ``width`` columns, a table that fits it (None: in a pipe, in full)."""
    a = report.audit
    conf = f"{report.confidence:.0%}"
    held = f"; {a['held']:,} held" if a.get("held") else ""
    out = [f"{name} · quality from {a.get('sample', 'the audit slice')}: "
           f"{labelled_text(a, held)}; {conf} intervals",
           f"score: {report.model['score']}; decision threshold {report.threshold:g}", ""]
    out += _table(report, width)
    first = report.at_threshold
    narrow = width is not None and width < WIDE
    out.append(f"  * decision threshold. Intervals: {first['precision']['method']} for "
               f"precision, recall and F1 (linearised variance, with an allowance for strata "
               f"that show no error){NARROW_NOTE if narrow else ''}; predicted matches "
               f"{among_pairs(first['n_pairs'], a.get('strata', []))}.")
    bound = held_line(first)
    if bound:
        out.append(bound)
    s = report.suggested
    if s is not None:
        if s["threshold"] is None:
            out.append(f"suggested threshold: none — {s['note']}")
        else:
            out.append(f"suggested threshold: {s['threshold']:.4g} for {s['target']} ≥ "
                       f"{s['goal']:g}: {_short(s['estimate'])} ({s['note']})")
    elif report.best_f1 is not None:
        b = report.best_f1
        out.append(f"highest estimated F1 in the table: {b['f1']:.3f} at {b['threshold']:g}, "
                   f"{b['note']}; pass --target-precision or --target-recall to aim at one")
    n = report.naive_at_threshold
    out.append(f"naive ({many(report.gold_labels, 'gold label')}, unweighted) at "
               f"{n['threshold']:g}: {_short(n)} — {n['note']}")
    notes = [t for t in first["note"].split("; ") if t]
    out += [f"note at {first['threshold']:g}: {t}" for t in notes]
    if report.sampling:
        out.append(report.sampling["note"] + ".")
    sc = report.scope
    b = sc["blocking"]
    out += ["", f"{sc['note']}."]
    if b.get("candidate_pairs") is not None:
        out.append(f"blocking: {blocking_size(b)}")
    for rule, k in b.get("pairs_per_rule", {}).items():
        out.append(f"  {padded(rule, 40)} {k:>12,} {noun(k, 'pair')}")
    if b.get("candidate_pairs") is not None:
        out.append(blocking_reach(b.get("missed"), report.project))
    if report.queue_order is not None:
        out.append(f"queue order: {report.queue_order['text']}")
    if report.machine_rater is not None:
        out += ["", *_machine_lines(report)]
    return out


def blocking_size(b: dict) -> str:
    """How far the blocking rules narrowed the pairs (which is not their reach)."""
    return (f"{many(b['candidate_pairs'], 'candidate pair')} of {b['possible_pairs']:,} "
            f"possible (reduction ratio {b['reduction_ratio']:.4f})")


def blocking_reach(m: dict | None, project: str) -> str:
    """The blocking rules' reach as far as it is known: the line was headed 'blocking reach'
    and gave the reduction ratio, which says nothing of the matches left out."""
    if not m or not m["count"]:
        return ("blocking reach (the share of true matches that are candidates) is not measured: "
                f"record matches blocking left out with docket missed {shlex.quote(str(project))} "
                "add LEFT RIGHT")
    return (f"blocking reach: the candidates hold {m['reach']:.1%} of the "
            f"{many(m['gold_matches'] + m['count'], 'match')} known ({m['count']:,} recorded "
            "with docket missed; rough, and if anything too high)")


def _machine_lines(report: Evaluation) -> list[str]:
    p, m = report.predictions, report.machine_rater
    absent = p["absent_count_as_non_match"]
    out = [f"machine rater {p['file']}: {many(p['candidate_pairs_given'], 'candidate pair')} "
           f"given ({p['column']} column); {many(absent, 'absent pair')} "
           f"{'counts' if absent == 1 else 'count'} as predicted non-matches", f"  {p['scope']}"]
    if m["kappa"] is None:
        out.append(f"Cohen's kappa on {many(m['n'], 'audit pair')}: undefined ({m['band']})")
    else:
        out.append(f"Cohen's kappa on {many(m['n'], 'audit pair')}, design-weighted: "
                   f"{interval(m['kappa'], m['ci_low'], m['ci_high'])} ({m['band']}); "
                   f"{m['scope']}")
    g = m["all_gold"]
    out.append(f"  over all {many(g['n'], 'gold label')}, unweighted: {number(g['kappa'])} "
               f"({g['scope']})")
    if m["table"] is not None:
        (tp, fp), (fn, tn) = m["table"]
        out += [f"  estimated candidate pairs{'':<4}{'gold match':>12}{'gold non-match':>16}",
                f"  {'predicted match':<29}{tp:>12,.0f}{fp:>16,.0f}",
                f"  {'predicted non-match':<29}{fn:>12,.0f}{tn:>16,.0f}"]
    return out

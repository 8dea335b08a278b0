"""``docket evaluate --matchers``: the side-by-side report as text or JSON."""

from __future__ import annotations

import argparse
from typing import Any

from .characters import visible
from .figures import labelled_text, many
from .terminal import json_text


def evaluate_matchers(args: argparse.Namespace) -> int:
    from docket.core import DocketError, Project
    for option in ("predictions", "threshold", "thresholds", "target_precision",
                   "target_recall"):
        if getattr(args, option, None) is not None:
            raise DocketError(f"--{option.replace('_', '-')} does not go with --matchers; "
                              "each matcher is judged at its own threshold (docket matchers "
                              "PROJECT mark NAME --threshold T)")
    with Project.open(args.project, readonly=True) as project:
        report = project.side_by_side()
        name = project.meta.get("name") or project.path.stem
    if args.json:
        print(json_text(report))
    else:
        from .folding import echo
        echo("\n".join(render(report, name)))
    return 0


def _iv(d: dict[str, Any]) -> str:
    if d.get("value") is None:
        return "—"
    if d.get("low") is None:
        return f"{d['value']:.3f}"
    return f"{d['value']:.3f} [{d['low']:.3f}, {d['high']:.3f}]"


def _kappa(k: dict[str, Any]) -> str:
    if k["kappa"] is None:
        return "—"
    return f"{k['kappa']:.3f}"


def matcher_rows(report: dict[str, Any]) -> list[list[str]]:
    """One row of cells per matcher: name, threshold, P, R, F1, kappa, audit pairs."""
    rows = []
    for m in report["matchers"]:
        t = "" if m["threshold"] is None else f"{m['threshold']:g}"
        rows.append([visible(m["name"]), m["kind"], t, _iv(m["precision"]), _iv(m["recall"]),
                     _iv(m["f1"]), _kappa(m["kappa_gold"]), f"{m['audit_pairs']:,}"])
    return rows


HEADERS = ["matcher", "kind", "thr", "precision", "recall", "F1", "κ gold", "audit"]


def render(report: dict[str, Any], name: str) -> list[str]:
    a = report["audit"]
    conf = f"{report['confidence']:.0%}"
    out = [f"{name} · matchers side by side on the audit slice: {labelled_text(a)}; "
           f"{conf} intervals", ""]
    widths = [22, 9, 5, 24, 24, 24, 7, 6]
    out.append(" ".join(h.ljust(w) for h, w in zip(HEADERS, widths, strict=True)))
    for row in matcher_rows(report):
        out.append(" ".join(c.ljust(w) for c, w in zip(row, widths, strict=True)))
    out.append(f"κ gold: Cohen's kappa {report['notes']['kappa_gold']}.")
    out += ["", "paired differences (first minus second, same audit pairs):"]
    shown = [d for d in report["differences"] if d["measure"] == "f1"]
    for d in shown:
        value = "—" if d["difference"] is None else \
            f"{d['difference']:+.3f} [{d['low']:+.3f}, {d['high']:+.3f}]"
        out.append(f"  F1 {visible(d['first'])} − {visible(d['second'])}: {value}  "
                   f"({many(d['disagreeing_audit_pairs'], 'audit pair')} split them) → "
                   f"{visible(d['verdict'])}")
    out.append(f"  ({report['notes']['differences']}; precision and recall differences in "
               "--json)")
    out += ["", f"kappa between matchers ({report['notes']['kappa_between']}):"]
    for k in report["kappa_between"]:
        out.append(f"  {visible(k['first'])} · {visible(k['second'])}: {_kappa(k)} "
                   f"(agree on {k['observed_agreement']:.1%})")
    for v in report["variants"]:
        out += ["", f"variants {visible(v['group'])}: {', '.join(map(visible, v['members']))}"]
        if "note" in v:
            out.append(f"  {v['note']}")
            continue
        among = v["flip_share_among_any_match"]
        out.append(f"  answer flips on {v['flipping_pairs']:,} of {many(v['pairs'], 'pair')} "
                   f"({v['flip_share']:.2%}); among pairs any variant calls a match: "
                   + ("—" if among is None else f"{among:.1%}"))
        fk = v["fleiss_kappa"]
        out.append("  Fleiss' kappa among them: " + ("undefined" if fk is None else
                                                     f"{fk:.3f} ({v['band']})"))
    d = report["distillation"]
    if d is not None:
        out += ["", *distillation_lines(d)]
    out += ["", f"queue order: {report['queue_order']['text']}; the audit slice is untouched "
            "by it"]
    return out


def _share(s: dict[str, Any]) -> str:
    if s["value"] is None:
        return "— (none)"
    return f"{s['value']:.3f} [{s['low']:.3f}, {s['high']:.3f}] ({s['count']:,} of {s['of']:,})"


def distillation_lines(d: dict[str, Any]) -> list[str]:
    scope = "every candidate pair" if d["census"] else \
        f"the {many(d['pairs_both_scored'], 'pair')} both scored"
    return [f"distillation: student {visible(d['student'])} against teacher "
            f"{visible(d['teacher'])}, over {scope}",
            f"  agreement {_share(d['agreement'])}",
            f"  teacher match → student copies {_share(d['teacher_match']['copied'])}; "
            f"says non-match {_share(d['teacher_match']['student_says_non_match'])}",
            f"  teacher non-match → student copies {_share(d['teacher_non_match']['copied'])}"
            f"; says match {_share(d['teacher_non_match']['student_says_match'])}"]

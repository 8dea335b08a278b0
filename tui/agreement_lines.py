"""``docket agreement`` as text, drawn from the facade's ``AgreementReport``; the agreement
screen draws the same object (``screens/agreement.py``)."""

from __future__ import annotations

from typing import Any

from docket.core.results import AgreementReport

from .figures import TOO_FEW, counted, counted_band, interval, many, number, percent
from .terminal import padded


def _pair_lines(r: dict[str, Any], floor: int, out: list[str]) -> None:
    a, b = r["reviewer_a"], r["reviewer_b"]
    out.append(f"{a} × {b}: {many(r['n'], 'pair')} used of {r['n_common']:,} in common")
    if r["too_few"]:
        out.append(f"  Cohen's kappa and PABAK: {TOO_FEW} (n {r['n']:,}; needs {floor})")
    else:
        out.append(f"  Cohen's kappa {interval(r['kappa'], r['ci_low'], r['ci_high'], 4)} "
                   f"(n {r['n']:,}; {r['band']}); SE {number(r['se'], 4)}")
        # PABAK's chance is 1 / k: with hold a category, k is 3 whether or not anyone held
        k = len(r["confusion"]["categories"])
        over = f" over {k} categories" if k > 2 else ""
        out.append(f"  observed {number(r['observed'], 4)}  chance {number(r['expected'], 4)}  "
                   f"PABAK{over} {interval(r['pabak'], r['pabak_low'], r['pabak_high'], 4)}  "
                   "prevalence "
                   f"index {number(r['prevalence_index'], 4)}  bias index "
                   f"{number(r['bias_index'], 4)}")
    out.append(f"  holds: {a} {percent(r['hold_rate_a'])}, {b} {percent(r['hold_rate_b'])}")
    conf = r["confusion"]
    cats = conf["categories"]
    width = max(len(c) for c in cats) + 2
    out.append(f"  confusion (rows {a}, columns {b}):")
    out.append(f"    {'':<{width}}" + "".join(f"{c:>11}" for c in cats))
    for cat, row in zip(cats, conf["table"], strict=True):
        out.append(f"    {cat:<{width}}" + "".join(f"{n:>11,}" for n in row))


def _rate_lines(ds: dict[str, Any] | None, out: list[str]) -> None:
    if not ds:
        return
    if not ds["identified"]:
        out.append(f"\nDawid–Skene: {ds['reason']} ({many(ds['units'], 'pair')}, "
                   f"{ds['units_rated_twice']:,} with two or more labels)")
        return
    state = "converged" if ds["converged"] else "not converged"
    out.append(f"\nDawid–Skene ({many(ds['iterations'], 'EM round')}, {state}; "
               f"{many(ds['units'], 'pair')}, "
               f"{ds['units_rated_twice']:,} with two or more labels)")
    holds = ds["reviewers"] and ds["reviewers"][0]["hold_rate_match"] is not None
    out.append(f"  {'reviewer':<18} {'sensitivity':>22} {'specificity':>22}"
               + ("  holds (match / non-match)" if holds else ""))
    for v in ds["reviewers"]:
        sens, spec = v["sensitivity"], v["specificity"]
        line = (f"  {padded(v['name'], 18)} "
                f"{interval(sens['value'], sens['low'], sens['high']):>22} "
                f"{interval(spec['value'], spec['low'], spec['high']):>22}")
        if holds:
            line += f"  {percent(v['hold_rate_match'])} / {percent(v['hold_rate_non_match'])}"
        out.append(line)
    out.append(f"  {ds['method']}")
    if ds["warning"]:
        out.append(f"  warning: {ds['warning']}")


def no_two_ratings(report: AgreementReport) -> str:
    """Fleiss' kappa where no pair has two ratings; beside pairs two reviewers labelled, that
    is their holds, which rate nothing."""
    held = not report.include_hold and any(v["holds"] for v in report.reviewers.values())
    return "— (no pair has two ratings yet" + ("; a hold counts as no rating)" if held else ")")


def agreement_lines(report: AgreementReport) -> list[str]:
    """The agreement report as lines of text (JSON is its ``to_dict``)."""
    out: list[str] = []
    names = list(report.reviewers)
    if not names:
        out.append(f"agreement · {report.name} · no reviewer labels yet")
        return out
    floor = report.min_pairs
    # holds are among the labels counted, yet rate nothing: "bob 8 labels" were 8 holds
    out.append(f"agreement · {report.name} · {many(len(names), 'reviewer')}: " + ", ".join(
             f"{n} {many(v['labels'], 'label')}"
             + (f" ({v['holds']:,} of them {'a hold' if v['holds'] == 1 else 'holds'})"
                if v["holds"] else "")
             for n, v in report.reviewers.items()))
    out.append(f"({report.conventions['holds']})")
    if not report.reviewer_pairs:
        out.append("\nno two reviewers have pairs in common yet")
    for r in report.reviewer_pairs:
        out.append("")
        _pair_lines(r, floor, out)
    o = report.overall
    out.append("\nall reviewers")
    if o["fleiss_units"]:
        fleiss = counted_band(o["fleiss_kappa"], o["fleiss_low"], o["fleiss_high"],
                              o["fleiss_units"], floor, o["fleiss_band"])
        out.append(f"  Fleiss' kappa {fleiss} on pairs with "
                   f"{o['fleiss_raters']} ratings each")
    else:
        out.append(f"  Fleiss' kappa {no_two_ratings(report)}")
    alpha = counted(o["krippendorff_alpha"], o["alpha_low"], o["alpha_high"], o["alpha_units"],
                    floor)
    out.append(f"  Krippendorff's alpha (nominal) {alpha} on pairs with two or more ratings")
    _rate_lines(report.dawid_skene, out)
    c = report.conventions
    out.append(f"\nSE: {c['se']}.\nCI: {c['ci']}.\nbands: {c['bands']}.")
    return out

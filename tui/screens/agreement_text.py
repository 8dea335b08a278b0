"""The agreement report as Rich text for the agreement screen: a matrix cell, the detail of two
reviewers, and the line for all reviewers. Names pass ``literal`` (never markup); figures are
written by ``tui.figures``, as the command line writes them.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text

from docket.core.results import AgreementReport

from .. import literal
from ..agreement_lines import no_two_ratings
from ..diff import PLAIN, Palette
from ..figures import TOO_FEW, counted, counted_band, interval, many, number, percent

NAME_WIDTH = 18


def cell_text(entry: dict[str, Any] | None, palette: Palette = PLAIN) -> Text:
    """One matrix cell: ``0.62 [0.48, 0.76]`` over ``n 40 · Substantial``."""
    if entry is None:
        return Text("no pairs\nin common", palette.muted)
    if entry["too_few"]:
        top = Text(TOO_FEW, palette.muted)
    elif entry["kappa"] is None:
        top = Text("kappa undefined", palette.muted)
    else:
        top = Text(f"{entry['kappa']:.2f} ", palette.heading)
        top.append(f"[{number(entry['ci_low'], 2)}, {number(entry['ci_high'], 2)}]")
    # a band beside "too few pairs to say" would claim what the count cannot carry
    below = "" if entry["too_few"] else f" · {entry['band']}"
    top.append(f"\nn {entry['n']:,}{below}", palette.muted)
    return top


def detail_text(entry: dict[str, Any], shown: dict[str, str], palette: Palette = PLAIN
                ) -> Text:
    """Every figure for the highlighted reviewer pair; names as ``shown`` maps them."""
    p = palette
    a = shown.get(entry["reviewer_a"], entry["reviewer_a"])
    b = shown.get(entry["reviewer_b"], entry["reviewer_b"])
    text = literal.record_id(a, NAME_WIDTH, p.escape)
    text.append(" × ")
    text.append_text(literal.record_id(b, NAME_WIDTH, p.escape))
    text.append(f": {many(entry['n'], 'pair')} used of {entry['n_common']:,} in common\n", p.muted)
    text.append("Cohen's kappa ", p.muted)
    if entry["too_few"]:
        text.append(f"{TOO_FEW} (n {entry['n']:,})\n", p.heading)
    else:
        text.append(number(entry["kappa"]), p.heading)
        text.append(f"  95 % CI [{number(entry['ci_low'])}, {number(entry['ci_high'])}]  "
                    f"SE {number(entry['se'])}  {entry['band']}\n")
        pabak = interval(entry["pabak"], entry["pabak_low"], entry["pabak_high"])
        text.append(f"observed {number(entry['observed'])}  chance "
                    f"{number(entry['expected'])}  PABAK {pabak}  prevalence index "
                    f"{number(entry['prevalence_index'])}  bias index "
                    f"{number(entry['bias_index'])}\n", p.muted)
    text.append("holds on the pairs in common: ", p.muted)
    text.append_text(literal.record_id(a, NAME_WIDTH, p.escape))
    text.append(f" {percent(entry['hold_rate_a'], ' ')}, ", p.muted)
    text.append_text(literal.record_id(b, NAME_WIDTH, p.escape))
    text.append(f" {percent(entry['hold_rate_b'], ' ')} · Enter lists their disagreements",
                p.muted)
    return text


def overall_text(report: AgreementReport, shown: dict[str, str],
                 palette: Palette = PLAIN) -> Text:
    p = palette
    o = report.overall
    text = Text("all reviewers  ", p.muted)
    floor = report.min_pairs
    if o["fleiss_units"]:
        fleiss = counted_band(o["fleiss_kappa"], o["fleiss_low"], o["fleiss_high"],
                              o["fleiss_units"], floor, o["fleiss_band"])
        text.append(f"Fleiss' kappa {fleiss}, {o['fleiss_raters']} "
                    "ratings each")
    else:
        text.append(f"Fleiss' kappa {no_two_ratings(report)}")
    alpha = counted(o["krippendorff_alpha"], o["alpha_low"], o["alpha_high"], o["alpha_units"],
                    floor)
    text.append(f" · Krippendorff's alpha (nominal) {alpha}\n")
    ds = report.dawid_skene
    if ds and not ds["identified"]:
        text.append(f"Dawid–Skene: {ds['reason']}\n", p.muted)
    elif ds:
        text.append("Dawid–Skene  ", p.muted)
        parts = []
        for v in sorted(ds["reviewers"], key=lambda r: shown.get(r["name"], r["name"])):
            part = literal.record_id(shown.get(v["name"], v["name"]), NAME_WIDTH, p.escape)
            sens, spec = v["sensitivity"], v["specificity"]
            part.append(f" sensitivity {interval(sens['value'], sens['low'], sens['high'], 2)}, "
                        f"specificity {interval(spec['value'], spec['low'], spec['high'], 2)}")
            parts.append(part)
        text.append_text(Text("; ").join(parts))
        text.append("\n")
        if ds["warning"]:
            text.append(f"warning: {ds['warning']}\n", p.heading)
    c = report.conventions
    text.append(f"{c['holds']}.\nSE: {c['se']}. CI: {c['ci']}.\nBands: {c['bands']}.",
                p.muted)
    return text

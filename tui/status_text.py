"""``docket status`` as text, drawn from the facade's ``StatusReport`` (JSON is its
``to_dict``)."""

from __future__ import annotations

import math

from docket.core import MODEL_NAMES, factor_text, odds_text
from docket.core.results import StatusReport

from .figures import many, ratio_text
from .terminal import padded, shown


def status_lines(info: StatusReport) -> list[str]:
    rec, pairs, dec, model = info.records, info.pairs, info.decisions, info.model
    out = [f"{info.name} · {info.mode} mode · {info.project}",
           f"records      left {rec['left']:,}" + (f", right {rec['right']:,}"
                                                     if info.mode == "link" else ""),
           f"pairs        {many(pairs['candidates'], 'candidate')}, {pairs['open']:,} still "
           "queued, "
           f"audit slice {pairs['audit']:,}, overlap {pairs['overlap']:,}"]
    if info.sampling:
        s = info.sampling
        strata = ", ".join(f"{h}: {v[1]:,}/{v[0]:,}" for h, v in s["strata"].items())
        out.append(f"sampled      {s['kept_pairs']:,} of {s['population_pairs']:,} candidate "
                   f"pairs kept (--sample-above {s['sample_above']:,}); kept/all per stratum "
                   f"{strata}; estimates weigh to all pairs")
    out.append(f"blocking     {'; '.join(shown(r) for r in info.blocking['rules'])} "
               f"(reduction ratio {ratio_text(info.blocking['reduction_ratio'])})")
    out.append(f"decisions    {many(dec['current_labels'], 'standing label')} on "
               f"{many(dec['pairs_decided'], 'pair')} "
               f"({many(dec['log_entries'], 'log entry', 'log entries')}, "
               f"{many(dec['retractions'], 'retraction')})")
    for name, c in dec["per_reviewer"].items():
        counts = ", ".join(f"{k} {v:,}" for k, v in c.items() if k != "role")
        out.append(f"  {padded(name, 16)} {c['role']:<12} {counts}")
    for name, c in dec.get("per_adjudicator", {}).items():
        counts = ", ".join(f"{k} {v:,}" for k, v in c.items())
        out.append(f"  {padded(name, 16)} {'adjudicated':<12} {counts}")
    out.append(f"model        {MODEL_NAMES.get(model['ranker'], model['ranker'])} ranks the "
               f"queue ({model['ranker_note']}); threshold {model['threshold']}"
               + ("; one-to-one" if model["one_to_one"] else ""))
    out += [f"  {shown(line)}" for line in model["how_fitted"]]  # they name the columns
    if model.get("one_to_one_suggested"):
        out.append(f"  suggestion: {model['one_to_one_suggested']}")
    if model.get("crowded"):
        out.append(f"  caution: {shown(model['crowded'])}")
    out.append(f"odds before the fields {odds_text(math.log(model['odds_before_fields']))}; "
               "each field's level multiplies them:")
    for f in model["fields"]:
        levels = " · ".join(f"{lv['level']} {factor_text(math.log(lv['odds_factor']))}"
                            for lv in f["levels"])
        out.append(f"  {padded(f['field'], 14)} {levels}")
    pol = info.gold_policy
    out.append(f"gold labels  {info.gold_labels:,} (policy: at least {pol['min_reviews']} "
               f"{'review' if pol['min_reviews'] == 1 else 'reviews'}; {pol['rules']})")
    m = info.missed_matches
    if m["count"]:
        out.append(f"missed       true matches outside the candidates: {m['count']:,} (docket "
                   f"missed); the candidates hold {m['reach']:.1%} of the "
                   f"{many(m['gold_matches'] + m['count'], 'match')} known")
    if info.matchers:
        from .cli_matchers import table_lines
        out.append(f"matchers     {len(info.matchers)} stored (docket evaluate --matchers)")
        out.append("\n".join(table_lines(info.matchers)))
    return out

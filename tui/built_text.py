"""What ``docket new`` and ``docket demo`` print once a project is built: the records, the
blocking rules and their pairs, the model's start, and the notes a practitioner should read."""

from __future__ import annotations

import math
import shlex
from typing import Any

from .figures import many, noun
from .figures import ratio_text as _ratio
from .terminal import padded, shown

# a word rule leaving this share of records unpaired is named after the build
ALONE_NOTE = 0.1



def print_built(built: Any) -> None:
    from .folding import echo  # on a terminal the caution and the notes fold at word ends
    r = built.blocking
    how = "chosen from the data" if r.auto else "given"
    echo(f"created {built.path} ({built.mode} mode): {built.n_left:,} left and "
          f"{many(built.n_right, 'right record')}" if built.mode == "link" else
          f"created {built.path} (dedupe mode): {many(built.n_left, 'record')}")
    echo(_ids_line(built))
    echo("fields compared: " + ", ".join(f"{shown(f.name)} ({f.kind})" for f in built.fields))
    echo(f"blocking rules ({how}):")
    for rule, n in r.per_rule.items():
        echo(f"  {padded(rule, 40)} {n:>10,} {noun(n, 'pair')}")
    echo(f"candidate pairs: {r.pairs:,} of {r.possible:,} possible "
          f"(reduction ratio {_ratio(r.reduction_ratio)}; "
          f"{100 * r.pairs / max(1, r.possible):.3g} % of all pairs)")
    for col, n in r.alone.items():
        records = built.n_left + (built.n_right if built.mode == "link" else 0)
        if n >= ALONE_NOTE * records:
            other = "record of the other table" if built.mode == "link" else "other record"
            rules = _with_rules(r.rules, f"lone({col})")
            echo(f"note: {many(n, 'record')} ({n / records:.0%}) are in no candidate pair and "
                 f"share no uncommon word of {shown(col)} with any {other}: where one has a copy "
                 f"with a typo in that word, nothing pairs the two. {shown(rules)} also pairs "
                 "each such record with its 3 nearest by spelling")
    for rule, n in r.unread_names.items():
        echo(f"note: no rule reads a name: their words alone would pair too many records. "
             f"{shown(_with_rules(r.rules, rule))} would add about {n:,} pairs (more true "
             "pairs found, and more look-alikes to tell apart)")
    if built.sampling:
        s = built.sampling
        echo(f"sampled: {s['kept_pairs']:,} of {s['population_pairs']:,} pairs kept "
              f"(--sample-above {s['sample_above']:,}); every pair's pattern is counted "
              "and estimates are weighted to all pairs")
    from docket.core import (
        CAUTION,
        crowded_note,
        em_rounds,
        flat_note,
        odds_text,
        one_field_note,
        one_to_one_suggestion,
    )
    prior = min(max(built.model.prior, 1e-300), 1 - 1e-16)
    echo(f"model: odds of a match before the fields "
          f"{odds_text(math.log(prior / (1 - prior)))} (fitted in "
          f"{em_rounds(built.model.iterations)}); audit slice "
          f"{many(built.audit_size, 'pair')}; overlap {many(built.overlap_pairs, 'pair')}")
    crowd = None if built.crowding is None else built.crowding.to_dict()
    for few in (one_field_note(len(built.fields), 0), flat_note(built.model.to_dict()),
                crowded_note(crowd, built.model.to_dict(), 0)):
        if few:
            echo(f"note: {few}")
    hint = built.one_to_one_hint
    if hint is not None and hint.suggest:
        echo(f"suggestion: {one_to_one_suggestion({'one_to_one_hint': hint.to_dict()}, 0)}")
    echo(f"note: {CAUTION}")


def _with_rules(rules: list[str], extra: str) -> str:
    return " ".join(f"--block {shlex.quote(x)}" for x in [*rules, extra])


def _ids_line(built: Any) -> str:
    left, right = built.id_columns
    how = ["chosen by docket" if g else "given" for g in built.ids_guessed]
    if right is None:
        line = f"id column: {left} ({how[0]})"
    elif left == right and how[0] == how[1]:
        line = f"id column: {left} in both tables ({how[0]})"
    else:
        line = f"id columns: {left} on the left ({how[0]}), {right} on the right ({how[1]})"
    if any(built.ids_guessed):
        line += "; pass --id (or --left-id / --right-id) to use another"
    return line

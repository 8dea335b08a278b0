"""Values a number or date field cannot read: they count as missing, which should be said.

A shop that writes prices '$1,299.00' or '1.299,00 EUR' beside another's '1299.00', compared
as numbers, had every price of one side missing: no evidence on any pair, while status still
printed the field's odds as if it weighed something.
"""

from __future__ import annotations

import shlex

import pandas as pd

from . import normalise

SAMPLE = 2000  # values read per side, as for detecting a kind
AT_MOST = 0.05  # the share of unreadable values let pass unsaid (detection allows as much)
READ_AS = {"number": "no number", "date": "no date"}


def unreadable_warning(field: str, kind: str, values: pd.Series, table: str,
                       column: str) -> str | None:
    """One line when more than ``AT_MOST`` of a side's non-empty values read as no value of
    ``kind``; None otherwise, and for kinds that read any text."""
    if kind not in READ_AS:
        return None
    texts = pd.Series(values.to_numpy(dtype=object)).dropna().astype(str)
    texts = texts[texts.str.strip() != ""]
    sampled = len(texts) > SAMPLE
    if sampled:
        texts = texts.sample(SAMPLE, random_state=0)
    if texts.empty:
        return None
    read = normalise.NORMALISERS[kind]
    results = {v: read(v) is None for v in texts.unique()}
    bad = texts[texts.map(results)]
    if len(bad) <= AT_MOST * len(texts):
        return None
    where = table if column == field else f"{table} (as '{column}')"
    counted = (f"{len(bad):,} of {len(texts):,} values drawn from it" if sampled else
               f"{len(bad):,} of its {len(texts):,} values")
    return (f"{field}, compared as {kind}: in {where}, {counted} read as {READ_AS[kind]} "
            f"(for example '{bad.iloc[0]}'); they count as missing, evidence neither way; "
            f"write them as plain {kind}s, or compare the column as text "
            f"(--field {shlex.quote(f'{field}:text')})")

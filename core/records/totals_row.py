"""A spreadsheet's totals row saved below the records: 'Total' and sums, no record.

A sheet exported as CSV keeps the row its author added under the data ('Total,,2,940,532.38');
docket read it as one more record, id 'Total', and put it in pairs with every record sharing
an amount, unsaid. Only the last row is looked at, and only a row whose one word is such a
label, every other value in it a number: a supplier named 'Total' has an address too.
"""

from __future__ import annotations

import pandas as pd

from .normalise import number, visible

# common practice in spreadsheets' own languages (from memory): English, German, Dutch,
# French, Italian, Spanish and Portuguese, the Nordic languages
TOTAL_WORDS = frozenset({
    "total", "totals", "grand total", "subtotal", "sub-total", "sum", "summe", "gesamt",
    "gesamtsumme", "totaal", "som", "somme", "totale", "suma", "soma", "totalt", "summa",
    "i alt", "yhteensä",
})


def totals_row(frame: pd.DataFrame, delimited: bool) -> str | None:
    """What the last row of a text table holds when it reads as a totals row ("'Total' and
    numbers alone"), or None."""
    if not delimited or len(frame) < 2:
        return None
    cells = [str(v).strip() for v in frame.iloc[-1].tolist() if pd.notna(v)]
    labels = [i for i, c in enumerate(cells) if c.casefold().rstrip(":").strip() in TOTAL_WORDS]
    if len(labels) != 1:
        return None
    rest = cells[:labels[0]] + cells[labels[0] + 1:]
    if any(number(c) is None for c in rest):
        return None
    return f"'{visible(cells[labels[0]])}' and " + ("numbers alone" if rest else "nothing else")

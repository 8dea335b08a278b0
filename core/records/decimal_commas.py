"""Scores written with a decimal comma ('0,87'), as a spreadsheet in many European locales
saves them beside semicolons: they were refused as "'0,87' is not a number"."""

from __future__ import annotations

from collections.abc import Iterable

import pyarrow as pa
import pyarrow.compute as pc

# a number whose one comma is its decimal mark (no point, no second comma), or a whole
# number, which a spreadsheet writes without one ('0', '1' beside '0,87')
PATTERN = r"^[+-]?(\d+(,\d+)?|,\d+)$"


def written_so(values: Iterable[object]) -> bool:
    """True when every value that is not blank is such a number, and one has a comma."""
    import re
    comma = False
    for v in values:
        text = "" if v is None else str(v).strip()
        if not text:
            continue
        if not re.fullmatch(PATTERN, text):
            return False
        comma = comma or "," in text
    return comma


def read_arrow(column: pa.ChunkedArray | pa.Array) -> pa.Array | None:
    """The column as numbers when it is written with decimal commas throughout, else None."""
    text = pc.utf8_trim_whitespace(column)
    filled = pc.drop_null(text)
    if not len(filled) or not pc.all(pc.match_substring_regex(filled, PATTERN)).as_py() \
            or not pc.any(pc.match_substring(filled, ",")).as_py():
        return None
    return pc.cast(pc.replace_substring(text, ",", "."), pa.float64())

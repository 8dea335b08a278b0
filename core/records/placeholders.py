"""Values that stand for 'not known' ('N/A', 'unknown', '-', '0', 'XX1 1XX'), read as missing.

A register that writes 'N/A' in 30 % of its phone numbers, or a form's 'XX1 1XX' in half its
postcodes, makes every two such records agree exactly on the field: the comparison counts that
as evidence of a match, and blocking on the field joins tens of thousands of records into one
block, so a key that would pair true matches cheaply is refused as too costly. A value is read
as missing when it looks like a placeholder *and* covers a share of its column: a stray 'n/a'
does no harm, and a frequent value that looks real (a common family name) is evidence the
model weighs by its frequency.
"""

from __future__ import annotations

import re
import shlex

import pandas as pd

from .normalise import date, fold

MIN_SHARE = 0.01  # of a side's values in the column: below this a placeholder does no harm
MIN_COUNT = 2  # two records at least: one cannot agree with itself
# what people write for 'no value', compared after folding and keeping only letters and digits
WORDS = frozenset({
    "na", "nk", "nil", "none", "null", "nan", "unknown", "unk", "notknown", "notavailable",
    "notapplicable", "notgiven", "notstated", "notrecorded", "notspecified", "unspecified",
    "missing", "tbc", "tba", "tbd", "nodata", "noinfo", "undefined", "blank", "empty", "void"})
# letters and digits of any script: kept to a-z and 0-9, every Cyrillic, Greek, Arabic, Hebrew
# or CJK value was 'punctuation alone', so a frequent one ('Москва' in a third of a column of
# towns) was read as missing, and a column of such values was left out as all placeholders
_NOT_ALNUM = re.compile(r"[\W_]+")
# dates that forms and databases write for 'not known': 1 January 1900 (and the day before, a
# spreadsheet's day 0), 1 January 1800, 31 December 9999; days since 1970-01-01
SENTINEL_DAYS = frozenset({-25567.0, -25568.0, -62091.0, 2932896.0})


def looks_like_placeholder(value: str) -> bool:
    """Punctuation alone ('-', '?'), a word for 'no value' ('N/A', 'Unknown', 'NULL'), a date
    that stands for none ('1900-01-01'), or a filler of zeros, nines, one repeated digit, or
    x's ('0', '0000', '9999999', 'XX1 1XX')."""
    text = _NOT_ALNUM.sub("", fold(value))
    if not text:
        return True
    if text in WORDS:
        return True
    if len(text) >= 6 and text.isdigit() and date(value) in SENTINEL_DAYS:
        return True  # '1900-01-01', '01/01/1900', '9999-12-31'
    letters = {ch for ch in text if not ch.isdigit()}
    digits = {ch for ch in text if ch.isdigit()}
    if letters - {"x"} or len(digits) > 1:
        return False
    if not digits:
        return len(text) >= 2  # 'X' alone is a value in many columns (a sex, a grade)
    digit = next(iter(digits))
    if letters:
        return True  # x's and one digit: 'XX1 1XX', 'X0X 0X0'
    return digit in "09" or len(text) >= 4


def _is_digits(value: str) -> bool:
    return bool(_NOT_ALNUM.sub("", fold(value)).isdigit())


def _counts(values: pd.Series) -> pd.Series:
    counts = values.value_counts()  # distinct values first: far fewer to trim than cells
    counts.index = pd.Index(counts.index.astype(str)).str.strip()
    return counts.groupby(level=0).sum().sort_values(ascending=False, kind="stable")


def found(values: pd.Series) -> dict[str, float]:
    """The placeholders of one side's column that cover at least ``MIN_SHARE`` of its values,
    each with its share, most common first (values as written, spaces around them trimmed)."""
    counts = _counts(values)
    total = int(counts.sum())
    common = counts[counts >= max(MIN_COUNT, MIN_SHARE * total)]
    return {str(v): float(n) / total for v, n in common.items()
            if looks_like_placeholder(str(v))}


def only_placeholders(values: pd.Series, kind: str) -> bool:
    """Whether every value of the column (there are some) is a placeholder of ``kind``."""
    counts = _counts(values)
    return bool(len(counts)) and len(for_kind({str(v): 1.0 for v in counts.index
                                               if looks_like_placeholder(str(v))},
                                              kind)) == len(counts)


def for_kind(shares: dict[str, float], kind: str) -> dict[str, float]:
    """Of the placeholders found, those that are no value of ``kind``: in a number column '0'
    and '9999' are numbers, and among names a bare 'Na' is a family name ('N/A' is not)."""
    if kind == "number":
        return {v: s for v, s in shares.items() if not _is_digits(v)}
    if kind == "name":
        return {v: s for v, s in shares.items() if fold(v).strip() != "na"}
    return shares


def without(values: pd.Series, placeholders: tuple[str, ...] | list[str]) -> pd.Series:
    """The column with its placeholders missing (the same Series when it has none)."""
    if not placeholders:
        return values
    codes, uniques = pd.factorize(values, use_na_sentinel=True)
    drop = pd.Index(uniques).astype(str).str.strip().isin(list(placeholders))
    hit = (codes >= 0) & drop[codes.clip(min=0)]
    if not hit.any():
        return values
    return values.mask(pd.Series(hit, index=values.index))


def warning(field: str, sides: list[tuple[str, str, dict[str, float]]]) -> str:
    """One line for a field: each side's (table, column, placeholders with their shares)."""
    sides = [side for side in sides if side[2]]
    columns = {column for _, column, _ in sides}
    where = (f"{' and '.join(table for table, _, _ in sides)}, column '{columns.pop()}'"
             if len(columns) == 1 else
             " and ".join(f"{table}, column '{column}'" for table, column, _ in sides))
    where += "" if all(column == field for _, column, _ in sides) else f" (field '{field}')"
    values = list(dict.fromkeys(v for _, _, shares in sides for v in shares))

    def share(v: str) -> str:
        if len(sides) == 1:
            return f"{sides[0][2][v]:.1%}"
        return " and ".join(f"{shares[v]:.1%}" if v in shares else f"none in {table}"
                            for table, _, shares in sides)
    shown = ", ".join(f"{v!r} ({share(v)})" for v in values)  # repr: no raw controls
    one = len(values) == 1
    return (f"{where}: {shown} {'stands' if one else 'stand'} for no value, so "
            f"{'it is' if one else 'they are'} compared as missing, not as agreement (give "
            f"--keep-placeholders to compare {'it' if one else 'them'} as written, or --field "
            f"{shlex.quote(f'{field}:skip')} to leave the field out)")

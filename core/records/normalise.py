"""Normalising raw values before comparison, once per distinct value.

Each function maps one raw string to its comparable form, or None when nothing comparable is
left. Callers apply them through ``distinct.per_distinct``, which normalises each distinct
value once and takes the results back by index: far cheaper than once per record or per pair.
"""

from __future__ import annotations

import datetime as dt
import html
import re
import unicodedata
from collections.abc import Callable, Iterable

import numpy as np
import pandas as pd

_NON_WORD = re.compile(r"[^\w]+", re.UNICODE)
# A hyphen, dot or slash beside a digit inside a word ('DC-3716', 'KDL-40V4100', '1.7L') is
# part of a code written one of several ways: drop it, so that 'DC-3716' and 'dc3716' meet.
_CODE_JOIN = re.compile(r"(?<=\d)[-./](?=\w)|(?<=\w)[-./](?=\d)", re.UNICODE)
_SEPARATORS = re.compile(r"[\s\-./()_]+")
_PHONE = re.compile(r"^\+?\d{7,}$")
_ISO = re.compile(r"^(\d{4})-(\d{1,2})-(\d{1,2})")
_DMY = re.compile(r"^(\d{1,2})[/.\-](\d{1,2})[/.\-](\d{4}|\d{2})$")


# The combining diacritical marks block but U+034F (a joiner of combining class 0): the marks
# that accented Latin letters decompose into, each of nonzero combining class.
_DIACRITICS = re.compile("[\u0300-\u034e\u0350-\u036f]")


# Invisible format characters that copying from web pages, PDFs and word processors leaves in
# values: soft hyphen, zero-width space and joiners, direction marks, word joiner, byte-order
# mark. Unicode calls them default ignorable (UAX #44); a reviewer cannot see them, so they
# are dropped before comparing ('QX12\u200b34' is 'QX1234', 'Ann\u00ada' is 'Anna').
_INVISIBLE = re.compile("[\u00ad\u061c\u180e\u200b-\u200f\u202a-\u202e\u2060-\u2064"
                        "\u2066-\u206f\ufeff\U000e0000-\U000e007f]")


def visible(value: str) -> str:
    """The value without its invisible format characters."""
    return value if value.isascii() else _INVISIBLE.sub("", value)


def fold(value: str) -> str:
    """Case-fold and strip diacritics (characters of nonzero combining class after NFKD) and
    invisible format characters, so that 'Zoë' and 'ZOE' compare equal."""
    if value.isascii():  # nothing to decompose: the common case, many times faster
        return value.lower()
    decomposed = _DIACRITICS.sub("", unicodedata.normalize("NFKD", visible(value)))
    if not decomposed.isascii():  # marks outside that block may remain: look at each character
        decomposed = "".join(ch for ch in decomposed if not unicodedata.combining(ch))
    return decomposed.casefold()


def words(value: str) -> str | None:
    text = fold(html.unescape(value) if "&" in value else value)
    text = _NON_WORD.sub(" ", _CODE_JOIN.sub("", text)).strip()
    return " ".join(text.split()) or None


def name(value: str) -> str | None:
    """Words in sorted order: 'Nowak, Kasia' and 'Kasia Nowak' become the same string."""
    w = words(value)
    return " ".join(sorted(w.split())) if w else None


def code(value: str) -> str | None:
    """Separators removed; phone-like codes keep their last nine digits (drops +44 / 0 prefixes)."""
    text = _SEPARATORS.sub("", fold(value))
    if not text:
        return None
    if _PHONE.match(text):
        return text[-9:]
    return text


# a currency sign or code before or after an amount ('$1,299.00', '12,50 EUR'): ISO 4217's
# codes of the most traded currencies, so that a code such as 'ABC123' stays no number
_MONEY = r"(?:USD|EUR|GBP|JPY|CNY|CHF|CAD|AUD|NZD|SEK|NOK|DKK|PLN|CZK|HUF|INR|BRL|ZAR|MXN)"
_SIGN = "[$\u00a2-\u00a5\u20a0-\u20c0]"  # dollar, cent to yen, the currency symbols block
_CURRENCY = re.compile(rf"^\s*(?:{_MONEY}\s?)?{_SIGN}?|{_SIGN}?(?:\s?{_MONEY})?\s*$")
# a comma with one or two digits after it, ending the number: a decimal comma ('2.132,07')
_DECIMAL_COMMA = re.compile(r"^[-+]?[\d.\s\u00a0']*\d,\d{1,2}$")
_THOUSANDS = re.compile(r"[.\s\u00a0']")  # what groups thousands beside a decimal comma


# an apostrophe grouping thousands before a decimal point, as Swiss amounts are written
# ('1'234.50', common practice there; also with the typographic one, U+2019)
_APOSTROPHES = re.compile(r"(?<=\d)['\u2019](?=\d{3}(?!\d))")


def number(value: str) -> float | None:
    """A number as written in most places: '1,299.00', '1.299,00', '$1,299', '12,5 EUR', and
    the negative amounts spreadsheets write: '(1,299.00)', '-$1,299', U+2212 for '-'."""
    try:  # a plain number, the common case: no pattern needed
        x = float(value)
        return x if np.isfinite(x) else None
    except ValueError:
        pass
    text, sign = visible(value).strip().replace("\u2212", "-"), ""
    if len(text) > 2 and text[0] == "(" and text[-1] == ")":  # an accountant's negative
        text, sign = text[1:-1], "-"
    text = _CURRENCY.sub("", text).strip()
    if text[:1] in ("+", "-") and not sign:  # the sign before the currency: '-$12.00'
        text, sign = _CURRENCY.sub("", text[1:]).strip(), text[0]
    if _DECIMAL_COMMA.match(text):
        text = _THOUSANDS.sub("", text).replace(",", ".")
    else:
        text = _APOSTROPHES.sub("", text).replace(",", "")
    try:
        x = float(sign + text)
    except ValueError:
        return None
    return x if np.isfinite(x) else None


LONGEST_DATE = 64  # characters: 'Wednesday, 12 September 2024, 10:30:00 +01:00' is 45


def date(value: str) -> float | None:
    """Days since 1970-01-01. ISO first, then day/month/year (the usual order outside the US),
    read as month/day/year only where the middle number cannot be a month; None for words."""
    return _date(value, month_first=False)


def date_month_first(value: str) -> float | None:
    """:func:`date` for a column written month/day/year: 03/04/1980 is 4 March."""
    return _date(value, month_first=True)


def date_reader(values: Iterable[object]) -> Callable[[str], float | None]:
    """How a column's numeric dates are read, from the dates that can only be read one way.

    A value such as 03/04/1980 reads either way; 25/03/1980 only day first, 03/25/1980 only
    month first. Where a column holds the month-first kind (two or more) and hardly any of
    the other (one in twenty), every ambiguous value of it is read month first too: a register
    that writes US dates was read day first wherever the day was 12 or less, so its 4 March
    met the other register's 1980-03-04 only as 'day/month swapped'."""
    day_first = month_first = 0
    for v in values:
        m = _DMY.match(v.strip()) if isinstance(v, str) else None
        if m:
            a, b = int(m[1]), int(m[2])
            day_first += a > 12 >= b
            month_first += b > 12 >= a
    return date_month_first if month_first >= 2 and 20 * day_first <= month_first else date


def _date(value: str, month_first: bool) -> float | None:
    text = visible(value).strip()
    if len(text) > LONGEST_DATE:  # no date; the parser took 110 s over 2,000,000 digits
        return None
    m = _ISO.match(text)
    parts: tuple[int, int, int] | None = None
    if m:
        parts = (int(m[1]), int(m[2]), int(m[3]))
    else:
        m = _DMY.match(text)
        if m:
            # two digits of a year too: '07/03/84' went to the parser below, which reads the US
            # order, so it was 3 July where '07/03/1984' in the same column is 7 March
            day, month = int(m[1]), int(m[2])
            year = int(m[3]) if len(m[3]) == 4 else _full_year(int(m[3]))
            # day/month/year unless the month cannot be one and the day can: then the US order
            # (12/31/1990), which is unambiguous there
            if month_first:  # the column's order, unless this value can only be the other
                parts = (year, day, month) if not day > 12 >= month else (year, month, day)
            else:
                parts = (year, day, month) if month > 12 >= day else (year, month, day)
    if parts is None:
        if not any(ch.isdigit() for ch in text):  # "now", "today": words are not dates
            return None
        try:
            ts = pd.Timestamp(text)
        except (ValueError, TypeError):
            return None
        if pd.isna(ts) or ts.year < 1000:  # a guess: "2.132,07" (an amount) read as 0001-02-07
            return None
        parts = (ts.year, ts.month, ts.day)
    try:
        return float(dt.date(*parts).toordinal() - 719163)
    except ValueError:
        return None


def _full_year(two_digits: int) -> int:
    """A two-digit year as the latest such year not after this one: '40' is 1940. The parser
    pandas uses puts it within 50 years of this year, so a birth in 1940 written '12/05/40'
    was 2040 beside the other register's '1940-05-12'. A date written short in records of
    people is nearly always past; a short year meant to lie ahead is read a century early."""
    now = dt.date.today().year
    year = two_digits + now // 100 * 100
    return year - 100 if year > now else year


def reader(kind: str, values: pd.Series) -> Callable[[str], object]:
    """The normaliser of a kind for one side's column (a date column's order is its own)."""
    return date_reader(values.unique()) if kind == "date" else NORMALISERS[kind]


NORMALISERS: dict[str, Callable[[str], object]] = {
    "name": name,
    "text": words,
    "longtext": words,
    "code": code,
    "number": number,
    "date": date,
}

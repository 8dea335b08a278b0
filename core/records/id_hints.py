"""Hints for ids in a label, predictions, matcher or missed-match file that name no record but
nearly do: the same id in another Unicode form or with invisible characters in it, with its
leading zeros dropped or written as a decimal number, with spaces at its ends or in other letter
case."""

from __future__ import annotations

import unicodedata
from collections.abc import Collection, Iterable

from .normalise import visible


def form_hint(given: Iterable[object], known: Collection[str]) -> str:
    """A hint for ids that name records but in another Unicode form: a file saved with each
    accent as a separate mark (NFD: 'e' + U+0308 for 'ë') names no record whose id composes it
    (NFC), and the message showed two ids that look the same. "" when no id is such a twin."""
    composed: dict[str, str] | None = None
    for value in given:
        text = str(value)
        if text in known or text.isascii():
            continue
        if composed is None:
            composed = {unicodedata.normalize("NFC", k): k for k in known}
        twin = composed.get(unicodedata.normalize("NFC", text))
        if twin is not None:
            return (f"; {text!a} is the record id {twin!a} in another Unicode form "
                    "(its accents stored as separate marks, or the other way round): save the "
                    "file with its characters as the records have them (composed, NFC, as most "
                    "systems write them)")
        seen = visible(text)
        if seen != text and seen in known:
            return (f"; {text!a} is the record id {seen!a} with invisible characters in it "
                    "(copied from a web page or a document, perhaps): remove them from the file")
    return _zeros_hint(given, known) or _decimal_hint(given, known) or \
        _written_hint(given, known)


def _decimal_hint(given: Iterable[object], known: Collection[str]) -> str:
    """A hint for an id that is a record's id written as a decimal number ('17.0' for '17'),
    as a spreadsheet or a float column writes a whole number."""
    for value in given:
        text = str(value).strip()
        whole, dot, zeros = text.partition(".")
        if text in known or not dot or not whole.isdigit() or zeros.strip("0"):
            continue
        if whole in known:
            return (f"; '{text}' looks like the record id '{whole}' written as a decimal "
                    "number, as a spreadsheet or a column of floats writes it: keep the ids as "
                    "text")
    return ""


def _zeros_hint(given: Iterable[object], known: Collection[str]) -> str:
    """A hint for an id that is a record's id with its leading zeros dropped, as a spreadsheet
    does to a column it takes for numbers: '7' for '000007' was refused as naming no pair."""
    padded: dict[str, str | None] | None = None
    for value in given:
        text = str(value).strip()
        if text in known or not text.isdigit():
            continue
        if padded is None:
            padded = {}
            for k in known:
                if k.isdigit() and k.startswith("0"):
                    short = k.lstrip("0")
                    padded[short] = None if short in padded else k  # two: cannot tell which
        twin = padded.get(text.lstrip("0"))
        if twin is not None:
            return (f"; '{text}' looks like the record id '{twin}' with its leading zeros "
                    "dropped, as a spreadsheet does to numbers: keep the ids as text")
    return ""


def _written_hint(given: Iterable[object], known: Collection[str]) -> str:
    """A hint for an id that is a record's id but for spaces at its ends or letter case ('N-7 ',
    'n-7' for 'N-7'): the message quoted it beside the pair and left the user to spot it."""
    folded: dict[str, str | None] | None = None
    for value in given:
        text = str(value)
        if text in known:
            continue
        if text.strip() in known:
            return (f"; '{text}' has spaces at its ends, and the record id is "
                    f"'{text.strip()}': trim the file's ids")
        if folded is None:
            folded = {}
            for k in known:
                key = k.casefold()
                folded[key] = None if key in folded else k  # two: cannot tell which
        twin = folded.get(text.strip().casefold())
        if twin is not None:
            return (f"; '{text}' is the record id '{twin}' in other letter case: write it as "
                    "the records have it")
    return ""

"""Hints for ids in a label, predictions, matcher or missed-match file that name no record but
nearly do: the same id in another Unicode form or with invisible characters in it, with its
leading zeros dropped or written as a decimal number (or the other way round), with spaces at
its ends or in other letter case."""

from __future__ import annotations

import unicodedata
from collections.abc import Callable, Collection, Iterable

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
    return _whole_hint(given, known)


def _whole_hint(given: Iterable[object], known: Collection[str]) -> str:
    """The other way round: records whose ids a float column wrote as '17.0' (a CSV saved from
    one, read as text and kept as written), named in a file as '17'."""
    def whole(k: str) -> str | None:
        number, dot, zeros = k.partition(".")
        return number.lstrip("0") if dot and number.isdigit() and zeros and \
            not zeros.strip("0") else None
    found = _digit_twin(given, known, whole)
    return "" if found is None else (
        f"; '{found[0]}' looks like the record id '{found[1]}', which the table writes as a "
        "decimal number (a column of floats saved as text): write the ids as the table has "
        f"them ('{found[1]}'), or save the table with whole-number ids and build the project "
        "again")


def _zeros_hint(given: Iterable[object], known: Collection[str]) -> str:
    """A hint for an id that is a record's id with its leading zeros dropped, as a spreadsheet
    does to a column it takes for numbers: '7' for '000007' was refused as naming no pair."""
    found = _digit_twin(given, known, lambda k: k.lstrip("0") if k.isdigit() and
                        k.startswith("0") else None)
    return "" if found is None else (
        f"; '{found[0]}' looks like the record id '{found[1]}' with its leading zeros "
        "dropped, as a spreadsheet does to numbers: keep the ids as text")


def _digit_twin(given: Iterable[object], known: Collection[str],
                key: Callable[[str], str | None]) -> tuple[str, str] | None:
    """The first id given, all digits, that names no record while its digits are a record's
    id as ``key`` reads it (None: an id it does not read), with that record's id. Digits that
    two records' ids share name neither: which one was meant cannot be told."""
    twins: dict[str, str | None] | None = None
    for value in given:
        text = str(value).strip()
        if text in known or not text.isdigit():
            continue
        if twins is None:
            twins = {}
            for k in known:
                short = key(k)
                if short is not None:
                    twins[short] = None if short in twins else k
        twin = twins.get(text.lstrip("0"))
        if twin is not None:
            return text, twin
    return None


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

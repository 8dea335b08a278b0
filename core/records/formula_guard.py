"""The formula guard of CSV exports, and taking it off ids read back.

A CSV export starts a text cell that a spreadsheet would run as a formula with an apostrophe
(common practice against CSV injection, OWASP "CSV Injection": cells beginning with = + - @
tab or CR). Ids are such cells too ('@anna', '-17', '+4420...'), and a label or predictions
file made from an export then named '@anna as an id no record has. A file docket reads takes
an id written so as the record's id when the apostrophe is the guard: the rest begins as a
guarded cell does, the rest is a record's id, and the whole is not.
"""

from __future__ import annotations

from collections.abc import Collection, Iterable

FORMULA_START = ("=", "+", "-", "@", "\t", "\r")  # what a spreadsheet may take for a formula
GUARD = "'"  # the usual guard: a leading apostrophe makes a spreadsheet show the cell as text


def is_guarded(value: object, known: Collection[str]) -> bool:
    """True for a guarded id: apostrophe, then a record's id that begins as a formula does."""
    return (isinstance(value, str) and value.startswith(GUARD) and value not in known
            and value[1:].startswith(FORMULA_START) and value[1:] in known)


def unguarded(values: Iterable[object], known: Collection[str]) -> list[object]:
    """``values`` with each guarded id (``is_guarded``) read as the id it guards."""
    return [v[1:] if is_guarded(v, known) else v for v in values]  # type: ignore[index]

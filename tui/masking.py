"""``--mask COL,...`` (repeatable): hide the middle of sensitive values on screen, keep their shape.

Masking decides, per character, whether it is shown or replaced by ``•``. It is applied after
the differences have been worked out on the real values, so a masked character that differs
from the other side still carries the highlight: the reviewer sees *where* two e-mail
addresses or phone numbers differ without seeing them whole. Nothing is masked in the project
file; this only changes what is painted.
"""

from __future__ import annotations

import difflib
import re
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any

from docket.core.errors import DocketError

MASK_CHAR = "•"
KEEP_DIGITS = 2  # digits kept at each end of a phone number or other digit string
_WORD = re.compile(r"\S+")


@dataclass(frozen=True)
class Mask:
    """Which columns are masked; names compared case-insensitively."""

    columns: frozenset[str] = field(default_factory=frozenset)

    @classmethod
    def of(cls, names: Iterable[str]) -> Mask:
        return cls(frozenset(n.strip().casefold() for n in names if n and n.strip()))

    def __bool__(self) -> bool:
        return bool(self.columns)

    def applies(self, *names: str) -> bool:
        """True if any of ``names`` (a field name, its left or right column) is masked."""
        return any(n.casefold() in self.columns for n in names)


def record_columns(project: Any) -> list[str]:
    """Every column of the project's records, left table first (ids included)."""
    return list(project.record_columns())


def expand_mask(project: Any, values: Sequence[str]) -> list[str]:
    """``--mask`` values checked against the project, each name widened to both sides of its
    field.

    A value is one column's whole name if there is such a column (a name may hold a comma:
    ``--mask "last, first"``), else names joined by commas. A name may be a field, or a column
    of either table: ``--mask owner_name`` masks the field compared with it, whichever side it
    came from. An unknown name is an error (a typo must not leave a column silently
    unmasked), with the nearest column suggested.
    """
    columns = record_columns(project)
    known = {c.casefold(): c for c in columns}
    sides = [(f.name, f.left_column, f.right_column) for f in project.fields]
    known.update({f[0].casefold(): f[0] for f in sides})
    out: list[str] = []
    for value in values:
        if not value.replace(",", "").strip():  # '--mask "$COLS"' with COLS unset masked nothing
            raise DocketError(f"--mask {value!r} names no column; give the columns to mask, "
                              "for example --mask email,phone")
        whole = value.strip().casefold() in known
        for name in [value] if whole else value.split(","):
            if not name.strip():
                continue
            if name.strip().casefold() not in known:
                raise DocketError(_unknown(name, value, known, columns))
            key = name.strip().casefold()
            out.append(name.strip())
            for group in sides:
                if key in (g.casefold() for g in group):
                    out += group
    return list(dict.fromkeys(out))


def _unknown(name: str, value: str, known: dict[str, str], columns: list[str]) -> str:
    near = difflib.get_close_matches(name.strip().casefold(), list(known), n=1, cutoff=0.6)
    hint = f"did you mean '{known[near[0]]}'? " if near else ""
    if any("," in c for c in columns):  # listed as written, so no comma reads as a separator
        listed = ", ".join(f"'{c}'" for c in columns)
        hint += "a name that holds a comma goes whole in a --mask of its own; "
    else:
        listed = ", ".join(columns)
    given = f" (in '{value.strip()}')" if name.strip() != value.strip() and "," in value else ""
    return f"--mask {name.strip()}{given}: no such column; {hint}columns are {listed}"


def parse_mask(option: str | Sequence[str] | None) -> list[str]:
    """The ``--mask`` values as given, every time the option is (``expand_mask`` splits them
    at commas, knowing the columns)."""
    return [option] if isinstance(option, str) else list(option or [])


def _email(value: str, at: int) -> list[bool]:
    flags = [False] * len(value)
    local = range(0, at)
    for i in local[1:] if len(local) <= 2 else local[1:-1]:
        flags[i] = value[i].isalnum()
    return flags


def _digits(value: str) -> list[bool]:
    positions = [i for i, c in enumerate(value) if c.isdigit()]
    flags = [False] * len(value)
    keep = KEEP_DIGITS if len(positions) > 2 * KEEP_DIGITS else max(0, len(positions) // 4)
    hidden = positions[keep:len(positions) - keep] if keep else positions
    for i in hidden:
        flags[i] = True
    return flags


def _words(value: str) -> list[bool]:
    flags = [False] * len(value)
    for m in _WORD.finditer(value):
        start, end = m.span()
        n = end - start
        if n >= 4:
            hide = range(start + 1, end - 1)
        elif n >= 2:
            hide = range(start + 1, end)
        else:
            hide = range(0)
        for i in hide:
            flags[i] = value[i].isalnum()
    return flags


def mask_flags(value: str) -> list[bool]:
    """Per character of ``value``: True where it is to be hidden.

    E-mail addresses keep the first and last character of the local part and the whole
    domain; values that are mostly digits (phones, account numbers) keep two digits at each
    end; anything else keeps the first and last letter of each word. Punctuation and spaces
    are never hidden, so the shape of the value stays readable.
    """
    at = value.find("@")
    if 0 < at < len(value) - 1 and " " not in value.strip():
        return _email(value, at)
    digits = sum(c.isdigit() for c in value)
    letters = sum(c.isalpha() for c in value)
    if digits >= 4 and digits >= letters:
        return _digits(value)
    return _words(value)


def masked(value: str) -> str:
    """The value as painted when masked (for one-line lists)."""
    return "".join(MASK_CHAR if hide else c
                   for c, hide in zip(value, mask_flags(value), strict=True))

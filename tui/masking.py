"""``--mask COL,...``: hide the middle of sensitive values on screen, keep their shape.

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


def expand_mask(project: Any, names: Sequence[str]) -> list[str]:
    """``--mask`` names checked against the project, each widened to both sides of its field.

    A name may be a field, or a column of either table: ``--mask owner_name`` masks the field
    compared with it, whichever side it came from. An unknown name is an error (a typo must
    not leave a column silently unmasked), with the nearest column suggested.
    """
    columns = record_columns(project)
    known = {c.casefold(): c for c in columns}
    sides = [(f.name, f.left_column, f.right_column) for f in project.fields]
    known.update({f[0].casefold(): f[0] for f in sides})
    out: list[str] = []
    for name in names:
        if name.strip().casefold() not in known:
            near = difflib.get_close_matches(name.casefold(), list(known), n=1, cutoff=0.6)
            hint = f"did you mean '{known[near[0]]}'? " if near else ""
            raise DocketError(f"--mask {name}: no such column; {hint}columns are "
                              f"{', '.join(columns)}")
        key = name.strip().casefold()
        out.append(name.strip())
        for group in sides:
            if key in (g.casefold() for g in group):
                out += group
    return list(dict.fromkeys(out))


def parse_mask(option: str | None) -> list[str]:
    """``"email, phone"`` → ``["email", "phone"]`` (for the CLI's ``--mask``)."""
    return [part.strip() for part in (option or "").split(",") if part.strip()]


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

"""A blocking rule's keys read on fields whose names the key syntax cannot hold.

Spreadsheets name columns 'town (home)' or 'R&D': 'tokens(town (home))', chosen by docket
itself, was refused as unreadable, and 'a&b' read as two keys 'a' and 'b'.
"""

from __future__ import annotations

import re
from typing import Any

_CALL = re.compile(r"^\s*(tokens|digits|year|near|lone)\s*\((.*)\)\s*$", re.S)
_FIRST = re.compile(r"^(.*?)\[\s*:\s*(\d+)\s*\]\s*$", re.S)
Groups = tuple[Any, ...]  # (func, inside the call, column, length), as rules._KEY's


def _known(part: str, names: set[str]) -> Groups | None:
    """``part`` read as a key on a field of exactly that name: one with brackets or an &
    ('town (home)', 'a&b'), which the key syntax cannot hold, is read too."""
    call = _CALL.match(part)
    if call and call[2].strip() in names:
        return call[1], call[2], None, None
    if part.strip() in names:
        return None, None, part, None
    first = _FIRST.match(part)
    if first and first[1].strip() in names:
        return None, None, first[1], first[2]
    return None


def key_parts(text: str, names: set[str]) -> list[tuple[str, Groups | None]]:
    """A rule's keys: the text cut at each & that joins two keys, the longest key on a known
    field first: docket chose 'tokens(town (home))' for such a column and could not read it."""
    pieces = text.split("&")
    out: list[tuple[str, Groups | None]] = []
    i = 0
    while i < len(pieces):
        for j in range(len(pieces), i, -1):
            known = _known("&".join(pieces[i:j]), names)
            if known:
                out.append(("&".join(pieces[i:j]), known))
                i = j
                break
        else:
            out.append((pieces[i], None))
            i += 1
    return out

"""Which characters a terminal or a layout could act on, and the visible stand-in for each.

Shared by the screens (``literal.py``) and the command line (``terminal.py``), which have no
other code in common: this module imports neither Rich nor Textual, so plain commands stay
quick to start.
"""

from __future__ import annotations

import unicodedata
from functools import lru_cache

NAMED = {"\t": "\\t", "\n": "\\n", "\r": "\\r"}


@lru_cache(maxsize=4096)
def stand_in(char: str) -> str | None:
    """The visible form of a character that must not reach the terminal as is; None if safe."""
    if char in NAMED:
        return NAMED[char]
    code = ord(char)
    category = unicodedata.category(char)
    if category == "Cc":
        return f"\\x{code:02x}"
    if category in ("Cf", "Zl", "Zp", "Cs", "Co", "Cn") and not _harmless_unassigned(char):
        return f"⟨U+{code:04X}⟩"
    return None


def _harmless_unassigned(char: str) -> bool:
    # Unassigned code points ("Cn") in this Python's Unicode table may be assigned later;
    # only the noncharacters and the specials block are worth flagging.
    if unicodedata.category(char) != "Cn":
        return False
    code = ord(char)
    return not (0xFDD0 <= code <= 0xFDEF or (code & 0xFFFE) == 0xFFFE or code >= 0xFFF0)


def is_plain(value: str) -> bool:
    """True when no character of ``value`` can need a stand-in (the fast path).

    ``str.isprintable`` is False for every category ``stand_in`` looks at (and for spaces
    other than U+0020, which then simply take the slow path and are shown as they are).
    """
    return value.isprintable()


def visible(value: str) -> str:
    """``value`` with every unsafe character replaced by its stand-in (no styling)."""
    if is_plain(value):
        return value
    return "".join(stand_in(c) or c for c in value)

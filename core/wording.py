"""Counts in messages agree with their nouns: "1 pair", "3 pairs", "row 4", "rows 4, 7".

Plain text only; the front ends word their own counts through the same two functions.
"""

from __future__ import annotations

from collections.abc import Sequence


def noun(n: int, word: str, plural: str = "") -> str:
    """``word`` for one, its plural for every other count (0 included): English usage."""
    if n == 1:
        return word
    return plural or word + ("es" if word.endswith(("ch", "sh", "s", "x")) else "s")


def many(n: int, word: str, plural: str = "") -> str:
    """A count with its noun in agreement: "1 audit pair", "2 audit pairs", "1,500 matches"."""
    return f"{n:,} {noun(n, word, plural)}"


def quoted(values: Sequence[object], most: int = 5) -> str:
    """The first few values in quotes, so a space at either end shows: "'1', ' 2'…"."""
    shown = ", ".join(f"'{v}'" for v in values[:most])
    return shown + ("…" if len(values) > most else "")

"""Words as blocking keys, and codes split by spaces joined again.

A model code is written 'KX-450B' in one file and 'kx 450 b' in another: normalise.words makes
the first one word ('kx450b'), the second stays three words that share no key with it. Here the
second also offers its joined runs, which become keys where some record holds them as a word.
"""

from __future__ import annotations

import re
from collections.abc import Iterable

_DIGIT = re.compile(r"\d")
_RUN_WORD = 4  # the longest word that a run of code parts may hold ('2000' in 'kx 2000 b')

Lists = list[list[str]]


def word_keys(words: str) -> tuple[list[str], list[str]]:
    """The keys of tokens(col), and the runs that may join them.

    Keys: each word of two characters or more. Runs: two or three short words joined where a
    letter meets a digit across the space ('kx 450 b': kx450, 450b, kx450b). A run becomes a
    key only where some record holds it as a word (``known_runs``): '55 led' is a screen size
    beside a word, not a code anyone wrote joined, and as a key it would pair every 55-inch
    set."""
    parts = words.split()
    keys = sorted({t for t in parts if len(t) > 1})
    if _DIGIT.search(words) is None:  # most values: no digit, so no code split
        return keys, []
    n = len(parts)
    # seam[i]: parts i and i + 1 are short and meet letter to digit or digit to letter
    seam = [len(parts[i]) <= _RUN_WORD and len(parts[i + 1]) <= _RUN_WORD
            and parts[i][-1].isdigit() != parts[i + 1][0].isdigit() for i in range(n - 1)]
    runs: set[str] = set()
    for i in range(n - 1):
        if seam[i]:
            runs.add(parts[i] + parts[i + 1])
            if i + 2 < n and seam[i + 1]:
                runs.add(parts[i] + parts[i + 1] + parts[i + 2])
    return keys, sorted(runs)


def token_lists(values: Iterable[object]) -> tuple[Lists, Lists]:
    """Each record's keys and runs (``word_keys``) from its normalised words (None: none)."""
    seen: dict[object, tuple[list[str], list[str]]] = {}  # records repeat their values
    keys: Lists = []
    runs: Lists = []
    for v in values:
        k, r = ([], []) if v is None else seen.get(v) or seen.setdefault(v, word_keys(str(v)))
        keys.append(k)
        runs.append(r)
    return keys, runs


def known_runs(sides: list[tuple[Lists, Lists]]) -> list[Lists]:
    """Each side's keys with the runs that some record, on either side, holds as a word."""
    if not any(any(r) for _, runs in sides for r in runs):
        return [keys for keys, _ in sides]
    words = {w for keys, _ in sides for x in keys for w in x}
    return [[x + [r for r in joined if r in words] if joined else x
             for x, joined in zip(keys, runs, strict=True)] for keys, runs in sides]

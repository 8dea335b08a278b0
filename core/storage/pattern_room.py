"""Whether the fields' level patterns fit the one 64-bit code per pair that counts them.

Each pair's levels are packed into one int64 (a digit per field, its base the field's number
of levels): a table of 199 compared columns has some 10^150 patterns, far past 2^63, and the
codes wrapped round unsaid, so every pair was shown and weighed with the levels of another
pattern (a pair that differed everywhere read 'exact' on every field, probability 1).
"""

from __future__ import annotations

from ..errors import DocketError

ROOM = 2 ** 63  # codes are int64


def check_room(names: list[str], radix: list[int], where: str) -> None:
    """Refuse, in one line naming how many fields fit, when the patterns overflow the code."""
    product, fit = 1, 0
    for base in radix:
        product *= base
        if product < ROOM:
            fit += 1
    if product < ROOM:
        return
    raise DocketError(f"{where}: {len(names):,} fields to compare give more level patterns than "
                      f"docket can count in one 64-bit code per pair; the first {fit} fit (up "
                      f"to '{names[fit - 1]}'): name the columns worth comparing with "
                      "--compare COLS (comma-separated), or leave some out with --field COL:skip")

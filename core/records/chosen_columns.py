"""``--compare COLS``: only the columns named are compared, the others kept as shown.

A table of many columns (an export of 200 from a CRM) gave more fields than the level
patterns can count, and the way out was a ``--field COL:skip`` for each of 172 columns.
"""

from __future__ import annotations

from ..errors import DocketError


def chosen(pairs: list[tuple[str, str]], only: list[str]) -> list[tuple[str, str]]:
    """The (left, right) column pairs that ``only`` names, by either side's column name, in
    the tables' order; a name that is no column the tables share is refused."""
    by_name: dict[str, tuple[str, str]] = {}
    for pair in pairs:
        for name in pair:
            by_name.setdefault(name, pair)
    unknown = [name for name in only if name not in by_name]
    if unknown:
        folded = {name.casefold(): name for name in by_name}
        near = folded.get(unknown[0].casefold())
        shared = ", ".join(left for left, _ in pairs[:12]) + ("…" if len(pairs) > 12 else "")
        raise DocketError(f"--compare {unknown[0]}: no column to compare of that name"
                          + (f"; did you mean '{near}'?" if near else "")
                          + f" (the columns to choose from: {shared or 'none'})")
    keep = {by_name[name] for name in only}
    return [pair for pair in pairs if pair in keep]

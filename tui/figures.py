"""How a figure is written, the same in the CLI and on the screens: numbers, shares, intervals.

Undefined values (None) are a dash; a figure resting on too few pairs says so instead of a
number, with the count beside it.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

# counts are worded in the core, so its messages and the screens agree
from docket.core import many as many
from docket.core import noun as noun

DASH = "—"
TOO_FEW = "too few pairs to say"


def probability_text(prob: float) -> str:
    """Three decimals; towards 0 or 1, the digits it takes to show the distance to the end.

    0.9994, not "1 - 6e-04": read left to right like any other probability, at most ten
    characters wide, and never a bare 1 or 0 the model did not give.
    """
    if 0.001 <= prob <= 0.999:
        return f"{prob:.3f}"
    if prob <= 0.0 or prob >= 1.0:
        return "0" if prob <= 0.0 else "1"
    gap = min(prob, 1.0 - prob)
    if gap < 1e-6:
        return "< 0.000001" if prob < 0.5 else "> 0.999999"
    digits = max(4, -math.floor(math.log10(gap)))
    return f"{prob:.{digits}f}"


def among_pairs(n_pairs: int, strata: list[Mapping[str, Any]]) -> str:
    """"among N candidate pairs", saying when N is only those of the strata with labels: after
    a few labels evaluate said "among 440 candidate pairs" of a project that holds 2,690."""
    total = sum(int(s.get("pairs", 0)) for s in strata)
    text = f"among {many(n_pairs, 'candidate pair')}"
    if 0 < n_pairs < total:
        text += (f", those of the strata with labels ({total - n_pairs:,} of the {total:,} lie "
                 "in strata with none)")
    return text


def number(value: float | None, digits: int = 3) -> str:
    return DASH if value is None else f"{value:.{digits}f}"


def percent(value: float | None, space: str = "") -> str:
    return DASH if value is None else f"{100 * value:.1f}{space}%"


def interval(value: float | None, low: float | None, high: float | None,
             digits: int = 3) -> str:
    """``0.412 [0.301, 0.530]``; the point alone when there is no interval; a dash if neither."""
    if value is None:
        return DASH
    if low is None or high is None:
        return number(value, digits)
    return f"{value:.{digits}f} [{low:.{digits}f}, {high:.{digits}f}]"


def short_number(x: float) -> str:
    """0.88 as .88 and 1.00 as 1 (inside an interval, where the leading zero and the trailing
    zeros only take room: 80 columns must hold every column)."""
    text = f"{x:.2f}"
    return "1" if text == "1.00" else text.removeprefix("0")


def _bound(x: float, up: bool) -> str:
    """An interval's end at two decimals, rounded outwards: a low of 0.995 shown as 1 would
    claim a certainty the labels do not give (the 1e-9 keeps float noise from moving it)."""
    hundredths = math.ceil(x * 100 - 1e-9) if up else math.floor(x * 100 + 1e-9)
    return short_number(hundredths / 100)


def narrow_estimate(d: Mapping[str, Any]) -> str:
    """An ``Interval`` as a dict in the fewest cells: ``0.92 [.88–.95]`` for 80 columns."""
    if d.get("value") is None:
        return DASH
    if d.get("low") is None or d.get("high") is None:
        return f"{d['value']:.2f}"
    return f"{d['value']:.2f} [{_bound(d['low'], False)}–{_bound(d['high'], True)}]"


def estimate(d: Mapping[str, Any], digits: int = 3) -> str:
    """An ``Interval`` as a dict (value, low, high)."""
    return interval(d.get("value"), d.get("low"), d.get("high"), digits)


def counted(value: float | None, low: float | None, high: float | None, n: int,
            floor: int, digits: int = 3) -> str:
    """A coefficient with its interval and count, or "too few pairs to say" below ``floor``."""
    if n < floor:
        return f"{TOO_FEW} (n {n:,}; needs {floor})"
    if value is None:  # enough pairs, but no figure: every rating fell in one category
        return f"{DASH} (n {n:,}; undefined)"
    return f"{interval(value, low, high, digits)} (n {n:,})"


def counted_band(value: float | None, low: float | None, high: float | None, n: int,
                 floor: int, band: str) -> str:
    """``counted`` with its band beside it, but none beside "too few pairs to say": a band
    there ("(Poor)") would claim what the count cannot carry."""
    text = counted(value, low, high, n, floor)
    return text if n < floor or value is None else f"{text} ({band})"


def bounds(b: Mapping[str, Any] | None, digits: int = 3) -> str:
    """Hold bounds: the interval from all held pairs wrong to all of them right."""
    if not b or b.get("low") is None:
        return DASH
    return f"[{b['low']:.{digits}f}, {b['high']:.{digits}f}]"


def ratio_text(value: float) -> str:
    """Enough decimals that a ratio of 0.99998 does not print as 1.0000."""
    digits = 4
    while digits < 9 and round(value, digits) == 1.0 and value < 1.0:
        digits += 1
    return f"{value:.{digits}f}"


def labelled_text(audit: Mapping[str, Any], held: str = "") -> str:
    """How much of a drawn sample people have labelled: "12 of 40 drawn pairs have gold labels
    (5 matches)"; ``held`` is added inside the brackets."""
    have = "has" if audit["labelled"] == 1 else "have"
    return (f"{audit['labelled']:,} of {many(audit['drawn'], 'drawn pair')} {have} gold labels "
            f"({many(audit['matches'], 'match')}{held})")


def tallest_bin(values: list[float], bins: int) -> int:
    """The count of the fullest of ``bins`` equal bins from min(values) to max(values), the
    binning of the plotting library's histogram (the largest value in the last bin)."""
    if not values:
        return 0
    low, high = min(values), max(values)
    counts = [0] * bins
    for v in values:
        i = bins - 1 if v == high or high == low else int((v - low) / (high - low) * bins)
        counts[min(i, bins - 1)] += 1
    return max(counts)


def count_ticks(top: int, most: int = 5) -> list[int]:
    """Whole-number axis ticks from 0 to at most ``top``, at a step of 1, 2 or 5 times a power
    of ten, no more than ``most`` of them: the plotting library put counts of pairs at
    '248.0, 206.7, 165.3'."""
    if top <= 0:
        return [0]
    step = 1
    while top // step + 1 > most:
        step = _next_step(step)
    return list(range(0, top + 1, step))


def _next_step(step: int) -> int:
    """1, 2, 5, 10, 20, 50, ..."""
    digits = str(step)
    lead, zeros = int(digits[0]), len(digits) - 1
    return (2 if lead == 1 else 5 if lead == 2 else 10) * 10 ** zeros


@dataclass(frozen=True)
class ShareAxis:
    """An axis of shares (precision, recall) from ``low`` to 1, with its ticks."""

    low: float
    ticks: list[float]

    @property
    def zoomed(self) -> bool:
        return self.low > 0

    def labels(self) -> list[str]:
        return [f"{t:.2f}" for t in self.ticks]


def share_axis(values: list[float]) -> ShareAxis:
    """From 0 to 1, or, when every value lies in the top half, from a round value below the
    least of them: the demo's curve sat in the top-right eighth of a 0-to-1 plot, two dozen
    points in a few cells. The axis spans at least 0.2, so that a few hundredths do not fill
    it; ticks at a step of 0.05 (a span up to 0.25) or 0.1, the start among them."""
    least = min(values, default=0.0) - 0.01  # a margin: no point on the axis line itself
    if least < 0.5:
        return ShareAxis(0.0, [0.0, 0.25, 0.5, 0.75, 1.0])
    step = 0.05 if least >= 0.75 else 0.1
    low = min(0.8, math.floor(round(least / step, 9)) * step)
    count = round((1 - low) / step)
    return ShareAxis(round(low, 2), [round(low + i * step, 2) for i in range(count + 1)])

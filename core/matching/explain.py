"""The one table that both ranks the queue and explains each pair.

Whichever model ranks the queue, its score is written as log-odds *before the fields* plus one
contribution per field and level; the probability shown is the logistic function of that sum.
The pair card and evidence panel read the same table, so what they show adds up, exactly, to
the probability on screen. For Fellegi–Sunter the parts are ln(prior odds) and ln(m/u); for the
logistic ranker (whose inputs are the Fellegi–Sunter log-odds and one indicator per field and
level) each field's part is its share of the first input plus its own indicator's coefficient.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .logistic import level_effects
from .model import FSModel

MODEL_NAMES = {
    "fellegi-sunter": "Fellegi–Sunter on field levels",
    "logistic": "logistic regression on field levels, fitted to reviewers' labels",
}


@dataclass
class LogOddsTable:
    model: str  # "fellegi-sunter" or "logistic"
    base: float  # natural log-odds before any field is looked at
    parts: list[list[float]]  # per field, per level (missing last): added log-odds

    def log_odds(self, patterns: np.ndarray) -> np.ndarray:
        patterns = np.asarray(patterns, dtype=np.int64)
        total = np.full(len(patterns), self.base, dtype=float)
        for f, part in enumerate(self.parts):
            total += np.asarray(part, dtype=float)[patterns[:, f]]
        return total

    def probability(self, patterns: np.ndarray) -> np.ndarray:
        return probability_of(self.log_odds(patterns))

    def to_dict(self) -> dict:
        return {"model": self.model, "base": self.base, "parts": self.parts}

    @classmethod
    def from_dict(cls, d: dict) -> LogOddsTable:
        return cls(d["model"], float(d["base"]), [list(map(float, p)) for p in d["parts"]])

    @classmethod
    def from_fs(cls, fs: FSModel) -> LogOddsTable:
        base, parts = fs.log_odds_table()
        return cls("fellegi-sunter", base, [list(map(float, p)) for p in parts])

    @classmethod
    def from_logistic(cls, fs: LogOddsTable, coef: np.ndarray, n_levels: list[int]
                      ) -> LogOddsTable:
        """Coefficients laid out as :func:`logistic.one_hot` lays out its columns."""
        scale = float(coef[1])
        parts, at = [], 2
        for f, k in enumerate(n_levels):  # k levels (missing last) take k - 1 columns
            own = level_effects(coef[at:at + k - 1])
            parts.append(list(map(float, scale * np.asarray(fs.parts[f]) + own)))
            at += k - 1
        return cls("logistic", float(coef[0]) + scale * fs.base, parts)


def explanation(meta: dict) -> LogOddsTable:
    """The table of the model ranking this project's queue (older files: their FS model)."""
    if "explain" in meta:
        return LogOddsTable.from_dict(meta["explain"])
    return LogOddsTable.from_fs(FSModel.from_dict(meta["fs_model"]))


def probability_of(log_odds: np.ndarray | float) -> np.ndarray:
    x = np.clip(np.asarray(log_odds, dtype=float), -700, 700)
    return 1.0 / (1.0 + np.exp(-x))


def odds_text(log_odds: float) -> str:
    """Odds in words a reviewer reads at a glance: "3 to 1", "1 to 24", "1 to 1"."""
    if abs(log_odds) < math.log(1.05):
        return "1 to 1"
    odds = math.exp(min(abs(log_odds), 700))
    return f"{_count(odds)} to 1" if log_odds > 0 else f"1 to {_count(odds)}"


def factor_text(part: float) -> str:
    """How much one field multiplies the odds: '×12', '÷3.5', '×1'."""
    f = math.exp(min(abs(part), 700))
    if f < 1.05:
        return "×1"
    return ("×" if part > 0 else "÷") + _count(f)


def _count(x: float) -> str:
    """At most four characters, so that a factor fits a narrow column: 3.5, 240, 3.1k, 2e9."""
    if x < 9.95:
        return f"{x:.1f}".rstrip("0").rstrip(".")
    if x < 999.5:
        return f"{x:.0f}"
    if x < 9950:
        return f"{x / 1000:.1f}k"
    if x < 999_500:
        return f"{x / 1000:.0f}k"
    exp = math.floor(math.log10(x))
    mantissa = round(x / 10 ** exp)
    if mantissa == 10:  # 999,999 is "1e6", not "10e5"
        mantissa, exp = 1, exp + 1
    return f"{mantissa}e{exp}"

"""The project's current model as a small file, and the pure function that scores with it.

The file (JSON) holds the compared fields, the values that get the level "exact, common", and
the one log-odds table that ranks the queue (Fellegi–Sunter, or the logistic ranker a refit
chose): the base log-odds plus one part per field and level. Any pattern, seen in the project
or not, is scored by adding up its parts, so the probability of a pair the project holds is
exactly the one its reviewers were shown. The file is a few kilobytes to a few hundred (the
frequent values) whatever the number of pairs, so it ships to every worker of a cluster; it
names no record.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..types import FieldSpec
from .compare import KINDS, level_names
from .explain import LogOddsTable, explanation
from .scoring import compare_pairs

FORMAT = "docket-model"
VERSION = 3  # 3: numbers have a level 'roughly' (within 10 %)
HOW_TO = "export one with 'docket export PROJECT --what model -o FILE'"


@dataclass
class ScoringModel:
    fields: list[FieldSpec]
    frequent: dict[str, list]  # field -> normalised values whose exact agreement is "common"
    table: LogOddsTable
    threshold: float

    @property
    def ranker(self) -> str:
        return self.table.model

    def to_dict(self) -> dict[str, Any]:
        return {"format": FORMAT, "version": VERSION,
                "fields": [f.to_dict() for f in self.fields], "frequent": self.frequent,
                "log_odds": self.table.to_dict(), "threshold": self.threshold}

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> ScoringModel:
        return cls([FieldSpec(**f) for f in d["fields"]], dict(d.get("frequent", {})),
                   LogOddsTable.from_dict(d["log_odds"]), float(d["threshold"]))

    @classmethod
    def load(cls, path: str | Path) -> ScoringModel:
        path = Path(path)
        try:
            d = json.loads(path.read_text(encoding="utf-8"))
        except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
            raise DocketError(f"{path}: cannot read a model file ({exc}); {HOW_TO}") from None
        if not isinstance(d, dict) or d.get("format") != FORMAT:
            raise DocketError(f"{path}: not a docket model file; {HOW_TO}")
        if int(d.get("version", 0)) != VERSION:
            newer = int(d.get("version", 0)) > VERSION
            raise DocketError(f"{path}: a model file of version {d.get('version')}, this "
                              f"docket reads version {VERSION}; " +
                              ("upgrade docket to read it" if newer else HOW_TO + " again"))
        try:
            model = cls.from_dict(d)
        except (KeyError, TypeError, ValueError, AttributeError) as exc:
            what = f"no {exc}" if isinstance(exc, KeyError) else str(exc)
            raise DocketError(f"{path}: a damaged model file ({what}); {HOW_TO}") from None
        problem = model.problem()
        if problem:
            raise DocketError(f"{path}: a damaged model file ({problem}); {HOW_TO}")
        return model

    def problem(self) -> str:
        """What makes the model unusable (a hand-edited or damaged file), or ''."""
        if not 0.0 < self.threshold < 1.0:
            return f"threshold {self.threshold} is not between 0 and 1"
        if not isinstance(self.frequent, dict):
            return "its frequent values are no table of fields"
        if len(self.table.parts) != len(self.fields):
            return (f"{len(self.fields)} fields but log-odds for {len(self.table.parts)}")
        for f, part in zip(self.fields, self.table.parts, strict=True):
            if f.kind not in KINDS:
                return f"field {f.name!r} has the unknown kind {f.kind!r}"
            levels = len(level_names(f.kind)) + (1 if f.name in self.frequent else 0)
            if len(part) != levels:
                return (f"field {f.name!r} ({f.kind}) has {len(part)} log-odds for "
                        f"{levels} levels")
        if not all(np.isfinite([self.table.base, *(x for p in self.table.parts for x in p)])):
            return "a log-odds that is not a finite number"
        return ""

    def score_levels(self, levels: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Log-odds and probability of rows of levels."""
        levels = np.asarray(levels, dtype=np.int64)
        return self.table.log_odds(levels), self.table.probability(levels)


def from_meta(meta: dict[str, Any]) -> ScoringModel:
    """The model a project scores with now, from its meta (read-only)."""
    model = ScoringModel([FieldSpec(**f) for f in meta["fields"]],
                         dict(meta["fs_model"].get("frequent", {})), explanation(meta),
                         float(meta["threshold"]))
    problem = model.problem()
    if problem:  # levels this docket no longer gives: scoring would read the wrong weights
        raise DocketError(f"this project was built by an older docket ({problem}); build it "
                          "again with 'docket new ... --force' to score pairs or export its "
                          "model")
    return model


def score_pairs(model: ScoringModel, left_norm: dict[str, np.ndarray],
                right_norm: dict[str, np.ndarray], li: np.ndarray, ri: np.ndarray
                ) -> pd.DataFrame:
    """The pure scorer with a fitted model: one row per pair, in the order given."""
    _, levels = compare_pairs(model.fields, left_norm, right_norm, li, ri,
                              frequent=model.frequent)
    log_odds, prob = model.score_levels(levels)
    return pd.DataFrame({"log_odds": log_odds, "probability": prob,
                         "predicted": prob >= model.threshold})

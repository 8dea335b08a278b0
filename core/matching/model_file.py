"""The project's current model as a small file, and the pure function that scores with it.

The file (JSON) holds the compared fields, the Fellegi–Sunter model and the probability of
every comparison pattern the project knows, as refits have left them (a logistic ranker and
the labels' calibration included). A pattern the project never saw gets the Fellegi–Sunter
probability. The file is a few kilobytes to a few megabytes whatever the number of pairs, so
it ships to every worker of a cluster; nothing in it names a record.
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
from .model import FSModel
from .scoring import compare_pairs, pattern_codes

FORMAT = "docket-model"
VERSION = 1


@dataclass
class ScoringModel:
    fields: list[FieldSpec]
    fs: FSModel
    codes: np.ndarray  # sorted pattern codes
    probability: np.ndarray  # per code: the project's current probability
    threshold: float
    ranker: str

    def to_dict(self) -> dict[str, Any]:
        return {"format": FORMAT, "version": VERSION,
                "fields": [f.to_dict() for f in self.fields], "fs_model": self.fs.to_dict(),
                "threshold": self.threshold, "ranker": self.ranker,
                "patterns": {"codes": self.codes.tolist(),
                             "probability": self.probability.tolist()}}

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> ScoringModel:
        p = d["patterns"]
        return cls([FieldSpec(**f) for f in d["fields"]], FSModel.from_dict(d["fs_model"]),
                   np.asarray(p["codes"], dtype=np.int64),
                   np.asarray(p["probability"], dtype=float), float(d["threshold"]),
                   str(d.get("ranker", "")))

    @classmethod
    def load(cls, path: str | Path) -> ScoringModel:
        path = Path(path)
        try:
            d = json.loads(path.read_text(encoding="utf-8"))
        except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
            raise DocketError(f"{path}: cannot read a model file ({exc}); export one with "
                              "'docket export PROJECT --what model -o FILE'") from None
        if not isinstance(d, dict) or d.get("format") != FORMAT:
            raise DocketError(f"{path}: not a docket model file; export one with "
                              "'docket export PROJECT --what model -o FILE'")
        if int(d.get("version", 0)) > VERSION:
            raise DocketError(f"{path}: written by a newer docket; upgrade docket to read it")
        return cls.from_dict(d)

    def score_levels(self, levels: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Match weight and probability of rows of levels."""
        levels = np.asarray(levels, dtype=np.int64)
        weight = self.fs.pattern_weight(levels)
        prob = self.fs.probability(levels)
        if len(self.codes):
            codes = pattern_codes(levels)
            at = np.minimum(np.searchsorted(self.codes, codes), len(self.codes) - 1)
            known = self.codes[at] == codes
            prob = np.where(known, self.probability[at], prob)
        return weight, prob


def from_project(conn: Any, meta: dict[str, Any]) -> ScoringModel:
    """The model a project scores with now (read-only)."""
    rows = conn.execute("SELECT levels, probability FROM patterns").fetchall()
    fields = [FieldSpec(**f) for f in meta["fields"]]
    levels = np.array([[int(x) for x in lv.split(",")] for lv, _ in rows],
                      dtype=np.int64).reshape(len(rows), len(fields))
    codes = pattern_codes(levels)
    order = np.argsort(codes)
    prob = np.array([p for _, p in rows], dtype=float)
    return ScoringModel(fields, FSModel.from_dict(meta["fs_model"]), codes[order], prob[order],
                        float(meta["threshold"]), str(meta.get("ranker", "")))


def score_pairs(model: ScoringModel, left_norm: dict[str, np.ndarray],
                right_norm: dict[str, np.ndarray], li: np.ndarray, ri: np.ndarray
                ) -> pd.DataFrame:
    """The pure scorer with a fitted model: one row per pair, in the order given."""
    _, levels = compare_pairs(model.fields, left_norm, right_norm, li, ri)
    weight, prob = model.score_levels(levels)
    return pd.DataFrame({"match_weight": weight, "probability": prob,
                         "predicted": prob >= model.threshold})

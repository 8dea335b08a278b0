"""Helpers for the machine-rater tests: a labelled sample project and matcher files."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from docket.core import NewProject, Project
from tests.conftest import SAMPLE
from tests.quality import load_truth

SAMPLE_TRUTH = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")


def answer_audit(project: Project, truth: set[tuple[str, str]], reviewer: str = "oracle") -> None:
    for pid, a, b in project.connection.execute(
            "SELECT pair_id, left_id, right_id FROM pairs WHERE audit = 1").fetchall():
        project.decide(pid, reviewer, "match" if (a, b) in truth else "non-match")


def candidates(project: Project) -> pd.DataFrame:
    return pd.read_sql_query("SELECT pair_id, left_id, right_id FROM pairs ORDER BY pair_id",
                             project.connection)


def is_match(frame: pd.DataFrame, truth: set[tuple[str, str]]) -> np.ndarray:
    return np.array([(a, b) in truth for a, b in zip(frame.left_id, frame.right_id,
                                                     strict=True)])


def flipped(y: np.ndarray, rate: float, seed: int) -> np.ndarray:
    """The truth with each answer flipped independently with probability ``rate``."""
    return y ^ (np.random.default_rng(seed).random(y.size) < rate)


def label_file(path: Path, frame: pd.DataFrame, labels: dict[str, np.ndarray]) -> Path:
    """A long file: one row per matcher and candidate pair, label match / non-match."""
    parts = [pd.DataFrame({"left_id": frame.left_id, "right_id": frame.right_id,
                           "matcher": name, "label": np.where(y, "match", "non-match")})
             for name, y in labels.items()]
    pd.concat(parts).to_csv(path, index=False)
    return path


def dblp_arrays(source: Path, path: Path) -> tuple[np.ndarray, np.ndarray]:
    """(model probability, is a true match) per candidate pair of the DBLP-ACM project at
    ``path``, in pair-id order; built there with the defaults unless it exists."""
    if not path.exists():
        Project.create(NewProject(path=path, left=source / "dblp.csv",
                                  right=source / "acm.csv", id_column="id"))
    truth = load_truth(source / "matches.csv", "dblp_id", "acm_id")
    with Project.open(path, readonly=True) as p:
        frame = candidates(p)
        prob = pd.read_sql_query("SELECT t.probability FROM pairs p JOIN patterns t "
                                 "USING (pattern_id) ORDER BY p.pair_id", p.connection)
    return prob["probability"].to_numpy(), is_match(frame, truth)

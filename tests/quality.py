"""Helpers for quality checks: F1 of a project against a truth file, and an oracle reviewer."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from docket.core import Project
from docket.core.exports.exporting import scores_frame


def load_truth(path: Path, left: str, right: str) -> set[tuple[str, str]]:
    frame = pd.read_csv(path, dtype=str)
    return set(zip(frame[left], frame[right], strict=True))


def measure(project: Project, truth: set[tuple[str, str]]) -> dict[str, float]:
    s = scores_frame(project)
    cand = set(zip(s.left_id, s.right_id, strict=True))
    yes = s.predicted == "match"
    pred = set(zip(s.left_id[yes], s.right_id[yes], strict=True))
    tp = len(pred & truth)
    precision = tp / max(1, len(pred))
    recall = tp / len(truth)
    return {"precision": precision, "recall": recall,
            "f1": 2 * precision * recall / max(1e-12, precision + recall),
            "blocking_recall": len(cand & truth) / len(truth), "pairs": len(s)}


def answer_in_queue_order(project: Project, truth: set[tuple[str, str]], n: int,
                          refit_every: int = 25, reviewer: str = "oracle") -> None:
    """Label ``n`` pairs as the queue offers them, answering from the truth, refitting as the
    review screen does."""
    for i in range(n):
        item = project.next_pairs(reviewer, 1)[0]
        label = "match" if (item.left_id, item.right_id) in truth else "non-match"
        project.decide(item.pair_id, reviewer, label)
        if (i + 1) % refit_every == 0:
            project.refit()
    project.refit()

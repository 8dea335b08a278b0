"""Distillation check: a small matcher (the student) trained to copy a large one (the teacher).

Over the candidate pairs both scored: how often the student gives the teacher's answer, and,
by the teacher's predicted class, the share the student copies and its disagreements (missed
teacher matches, added matches). Wilson intervals treat those pairs as a simple random sample
of the candidate pairs, which they are when the teacher was run on a random sample of them to
save cost; when both scored every candidate pair the shares are exact (a census), and the
intervals then describe a fresh draw of pairs like these. Whether the student is as good as the
teacher against the gold is the paired difference of the two in the side-by-side report.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..intervals import wilson
from ..storage.project_file import ProjectFile
from .judged import Judged


def _share(x: int, n: int, confidence: float) -> dict[str, Any]:
    if n == 0:
        return {"value": None, "low": None, "high": None, "count": 0, "of": 0}
    low, high = wilson(x, n, confidence)
    return {"value": x / n, "low": low, "high": high, "count": int(x), "of": int(n),
            "method": "wilson"}


def compare(teacher: np.ndarray, student: np.ndarray, both: np.ndarray,
            confidence: float = 0.95) -> dict[str, Any]:
    """Teacher and student predictions (bool per pair) over the pairs ``both`` marks."""
    t, s = teacher[both], student[both]
    n = int(both.sum())
    t_match, t_non = int(t.sum()), int((~t).sum())
    return {
        "pairs_both_scored": n,
        "agreement": _share(int(np.sum(t == s)), n, confidence),
        "teacher_match": {
            "copied": _share(int(np.sum(t & s)), t_match, confidence),
            "student_says_non_match": _share(int(np.sum(t & ~s)), t_match, confidence)},
        "teacher_non_match": {
            "copied": _share(int(np.sum(~t & ~s)), t_non, confidence),
            "student_says_match": _share(int(np.sum(~t & s)), t_non, confidence)},
        "census": bool(n == teacher.size),
    }


def distillation(project: ProjectFile, judged: Judged, confidence: float = 0.95
                 ) -> dict[str, Any] | None:
    """The check for the matchers marked teacher and student; None when either is missing."""
    roles = {info.role: name for name, info in judged.infos.items()
             if info is not None and info.role}
    if "teacher" not in roles or "student" not in roles:
        return None
    t, s = roles["teacher"], roles["student"]
    both = judged.given[t] & judged.given[s]
    out = {"teacher": t, "student": s,
           **compare(judged.predicted[t], judged.predicted[s], both, confidence)}
    return out

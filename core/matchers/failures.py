"""Where a matcher fails: the gold-labelled pairs on which it disagrees with the gold label,
grouped by the fields whose values differ between the two records.

A field "differs" when its comparison level is no exact one (exact, exact and rare, exact and
common) and not the missing level (nothing to compare). Groups come largest first, so the most
common way a matcher errs heads the list: e.g. "street, postcode" for clients who moved.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..matching.compare import MISSING
from ..reviewing.gold import gold_labels
from ..storage.project_file import ProjectFile
from . import catalogue
from .judged import MODEL, predictions


@dataclass(frozen=True)
class Failure:
    """One pair the matcher got wrong: ``kind`` is "false match" or "missed match"."""

    pair_id: int
    left_id: str
    right_id: str
    kind: str
    differing: tuple[str, ...]


@dataclass(frozen=True)
class FailureGroup:
    differing: tuple[str, ...]  # empty: every compared field agrees (or is missing)
    failures: tuple[Failure, ...]

    @property
    def label(self) -> str:
        return ", ".join(self.differing) + " differ" if self.differing else \
            "no compared field differs"


def _differs(level_name: str) -> bool:
    """Not agreement and not missing. Where frequent values have their own level, 'exact,
    common' is level 1, not 0: two records of one owner, 'Osric Stobwell' on both sides, were
    listed under 'owner differ'."""
    return level_name != MISSING and not level_name.startswith("exact")


def _predicted(project: ProjectFile, name: str) -> dict[int, bool]:
    conn = project.connection
    ids = catalogue.pair_ids(conn)
    if name == MODEL:
        from ..quality.evaluate import model_scores
        scores = model_scores(project).reindex(ids).to_numpy(dtype=float)
        pred = scores >= project.threshold
    else:
        info = next((m for m in catalogue.matchers(conn) if m.name == name), None)
        scores = catalogue.load_scores(conn, [name])[name]
        pred = predictions(scores, info.threshold if info else 0.5)
    return dict(zip(ids.tolist(), np.asarray(pred).tolist(), strict=True))


def failures(project: ProjectFile, name: str) -> list[FailureGroup]:
    """The matcher's disagreements with the gold labels, grouped, largest group first."""
    conn = project.connection
    pred = _predicted(project, name)
    wrong = {g.pair_id: g.label for g in gold_labels(conn)
             if pred.get(g.pair_id, False) != (g.label == "match")}
    if not wrong:
        return []
    names = {(f, lv): n for f, lv, n in conn.execute("SELECT field, level, level_name FROM model")}
    fields = [f.name for f in project.fields]
    marks = ",".join("?" * len(wrong))
    rows = conn.execute(
        "SELECT p.pair_id, p.left_id, p.right_id, t.levels FROM pairs p JOIN patterns t "
        f"ON t.pattern_id = p.pattern_id WHERE p.pair_id IN ({marks}) ORDER BY p.pair_id",
        list(wrong)).fetchall()
    groups: dict[tuple[str, ...], list[Failure]] = {}
    for pid, a, b, levels in rows:
        lv = [int(x) for x in levels.split(",")]
        differing = tuple(f for f, level in zip(fields, lv, strict=True)
                          if _differs(names.get((f, level), "")))
        kind = "missed match" if wrong[pid] == "match" else "false match"
        groups.setdefault(differing, []).append(Failure(pid, a, b, kind, differing))
    ordered = sorted(groups.items(), key=lambda kv: (-len(kv[1]), kv[0]))
    return [FailureGroup(k, tuple(v)) for k, v in ordered]

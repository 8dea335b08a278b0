"""A second audit sample, stratified on one matcher's own score (``docket supplement``).

The audit slice is stratified on the project's model. A matcher that errs where the model is
sure puts its errors in the model's large, thinly sampled strata, and its figures from the
slice come out wide or bounded. A supplement is a second stratified random sample of the
candidate pairs, drawn independently of the slice on the matcher's own score (the slice's
strata and allocation, ``queue.draw_audit``), stored with its strata, sizes N_h, drawn counts
n_h and inclusion probabilities n_h / N_h. Its pairs join the audit share of every reviewer's
queue; once labelled they and the audit slice's labelled pairs give design-based figures for
that matcher together (``union_design``: the cells of the two stratifications as post-strata,
the estimators of ``estimates.threshold_table``, every candidate pair's score as the
population, so predicted matches per cell are counted).

A supplement pair's label counts however it was reached (in the queue, in the audit slice): the
design chose the pair, the label only measures it. The supplement belongs to the scores it was
drawn on (a fingerprint of them); other scores need a supplement of their own.
"""

from __future__ import annotations

import hashlib
import shlex
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..ordering import queue
from ..storage import store
from ..storage.project_file import ProjectFile
from .audit_data import gold_y, held_pairs
from .audit_sample import AuditSample
from .predictions_file import read_predictions
from .union_design import UnionDesign, union_sample

TABLE = "supplement_pairs"
SCHEMA = (f"CREATE TABLE IF NOT EXISTS {TABLE} (fingerprint TEXT NOT NULL, "
          "pair_id INTEGER NOT NULL, stratum INTEGER NOT NULL, inclusion REAL NOT NULL, "
          "draw_order INTEGER NOT NULL, PRIMARY KEY (fingerprint, pair_id))")
INDEX = f"CREATE INDEX IF NOT EXISTS {TABLE}_pair ON {TABLE}(pair_id)"


@dataclass(frozen=True)
class Supplement:
    """One drawn supplement: the scores' fingerprint, the file read, and its design."""

    fingerprint: str
    file: str
    size: int
    seed: int
    strata: dict[int, tuple[int, int]]  # stratum -> (N_h candidate pairs, n_h drawn)

    def to_dict(self) -> dict[str, Any]:
        return {"fingerprint": self.fingerprint, "file": self.file, "size": self.size,
                "seed": self.seed, "strata": {str(h): list(v) for h, v in self.strata.items()}}

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> Supplement:
        return cls(d["fingerprint"], d["file"], int(d["size"]), int(d["seed"]),
                   {int(h): (int(v[0]), int(v[1])) for h, v in d["strata"].items()})


def fingerprint(scores: pd.Series) -> str:
    """The same scores on the same pairs give the same text, whatever the file's row order."""
    s = scores.sort_index()
    digest = hashlib.sha256(np.asarray(s.index, dtype=np.int64).tobytes())
    digest.update(np.asarray(s.to_numpy(), dtype=np.float64).tobytes())
    return digest.hexdigest()[:16]


def strata_score(scores: pd.Series) -> np.ndarray:
    """What the strata are drawn on: candidate pairs the file leaves out count as score 0."""
    return np.clip(scores.to_numpy(dtype=float), 0.0, 1.0)


def _scores(project: ProjectFile, path: str | Path) -> pd.Series:
    scores, info = read_predictions(project, path)
    if not info["scores_in_unit_interval"]:
        raise DocketError(f"{path}: scores lie outside 0…1; a supplement is stratified on "
                          "scores in 0…1 or on a label column: rescale the scores first")
    return scores


def stored(project: ProjectFile) -> dict[str, Supplement]:
    """Every supplement drawn in the project, by fingerprint."""
    return {k: Supplement.from_dict(v) for k, v in project.meta.get("supplements", {}).items()}


def draw_supplement(project: ProjectFile, path: str | Path, size: int | None = None,
                    seed: int | None = None) -> Supplement:
    """Draw and store a supplement on the scores of ``path`` (see the module notes).

    ``size`` defaults to the audit slice's rule (5 % of the candidate pairs, 50 to 1,000);
    ``seed`` to a number taken from the scores' fingerprint, so the draw can be repeated.
    """
    scores = _scores(project, path)
    key = fingerprint(scores)
    if key in stored(project):
        s = stored(project)[key]
        raise DocketError(f"{path}: a supplement of {s.size:,} pairs was drawn on these scores "
                          f"already; review its pairs, then docket evaluate --predictions "
                          f"{path} --supplement")
    n = int(scores.size)
    size = queue.default_audit_size(n) if size is None else int(size)
    if not 1 <= size <= n:
        raise DocketError(f"--size {size}: give a number of pairs from 1 to {n:,}")
    seed = int(key[:8], 16) if seed is None else int(seed)
    drawn = queue.draw_audit(strata_score(scores), size, seed)
    picked = np.flatnonzero(drawn.selected)
    ids = scores.index.to_numpy(dtype=np.int64)
    rows = [(key, int(ids[i]), int(drawn.stratum[i]), float(drawn.inclusion[i]),
             int(drawn.order[i])) for i in picked]
    made = Supplement(key, str(path), len(rows), seed,
                      {int(h): (int(v[0]), int(v[1])) for h, v in drawn.sizes.items()})
    with project.transaction() as conn:
        conn.execute(SCHEMA)
        conn.execute(INDEX)
        conn.executemany(f"INSERT INTO {TABLE} VALUES (?, ?, ?, ?, ?)", rows)
        every = {k: v.to_dict() for k, v in stored(project).items()} | {key: made.to_dict()}
        store.set_meta(conn, supplements=every)
    project.reload()
    return made


def supplement_sample(project: ProjectFile, scores: pd.Series, path: str | Path
                      ) -> tuple[AuditSample, Supplement, dict[str, tuple[int, int]]]:
    """The audit slice and the supplement drawn on ``scores``, judged together as one sample
    (``union_design``), with the supplement and the design (post-stratum -> (N, drawn)).

    Labelled pairs are those of either sample with a standing gold label; pairs held and not
    settled are kept apart, for bounds; the others count as missing at random within their
    post-stratum.
    """
    key = fingerprint(scores)
    made = stored(project).get(key)
    if made is None:
        raise DocketError(f"{path}: no supplement was drawn on these scores; draw one with "
                          f"docket supplement {shlex.quote(str(project.path))} --predictions "
                          f"{shlex.quote(str(path))}, then "
                          "review its pairs")
    every = pd.read_sql_query("SELECT pair_id, stratum, audit FROM pairs ORDER BY pair_id",
                              project.connection)
    drawn = pd.read_sql_query(f"SELECT pair_id FROM {TABLE} WHERE fingerprint = ?",
                              project.connection, params=(key,))["pair_id"]
    gold = gold_y(project)
    held = held_pairs(project, gold)
    ids = every["pair_id"]
    in_supplement = ids.isin(drawn).to_numpy()
    label = ids.map(gold).to_numpy(dtype=float)
    if not (in_supplement & ~np.isnan(label)).any():
        raise DocketError(f"{path}: the supplement's {made.size:,} pairs have no gold labels "
                          "yet; review them: they come in the audit share of every reviewer's "
                          "queue")
    score = scores.reindex(ids).to_numpy(dtype=float)
    design = UnionDesign(score, label, ids.isin(held).to_numpy(),
                         every["stratum"].to_numpy(dtype=np.int64),
                         queue.stratum_of(strata_score(scores.reindex(ids))),
                         every["audit"].to_numpy(dtype=bool), in_supplement)
    sample, cells = union_sample(design)
    return sample, made, cells

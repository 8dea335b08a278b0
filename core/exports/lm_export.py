"""``--for-lm``: the pairs of any export that has pairs, as prompts from one template.

Every record holds ``pair_id``, ``left_id``, ``right_id`` and ``prompt`` (the template filled
in, see ``lm_text``); then, by what is exported:

- ``scores``: every candidate pair, with ``probability`` (the model's): prompts to be labelled;
- ``gold``: the gold pairs, with ``label`` and ``how`` (unanimous, single, adjudicated):
  prompts to measure a model against;
- ``training``: the gold pairs, with ``label`` and ``split`` (train or test, see ``split``):
  prompts to fine-tune on.

Clusters and conflicts hold records, not pairs, and have no such form.
"""

from __future__ import annotations

from typing import Any

import pandas as pd

from ..errors import DocketError
from ..storage.project_file import ProjectFile
from .gold_export import _records, gold_frame, gold_split
from .lm_text import LmTemplate

FOR_LM = ("scores", "gold", "training")


def _pairs(project: ProjectFile) -> pd.DataFrame:
    return pd.read_sql_query(
        "SELECT p.pair_id, p.left_id, p.right_id, t.probability FROM pairs p JOIN patterns t "
        "ON t.pattern_id = p.pattern_id ORDER BY p.pair_id", project.connection)


def lm_records(project: ProjectFile, what: str = "training", template: LmTemplate | None = None,
               test_share: float = 0.2, seed: int = 0,
               split_by: str = "record") -> list[dict[str, Any]]:
    """One dict per pair of the ``what`` export, in pair id order (see the module notes)."""
    if what not in FOR_LM:
        raise DocketError(f"--for-lm writes pairs: it goes with --what {', '.join(FOR_LM)}, "
                          f"not {what} (which lists records)")
    template = template or LmTemplate.load(None)
    table = _pairs(project) if what == "scores" else gold_frame(project)
    left = _records(project, "left", table["left_id"])
    right = _records(project, "right", table["right_id"])
    names = [f.name for f in project.fields]
    extra: dict[str, list[Any]]
    if what == "scores":
        extra = {"probability": [float(p) for p in table["probability"]]}
    elif what == "gold":
        extra = {"label": table["label"].tolist(), "how": table["how"].tolist()}
    else:
        extra = {"label": table["label"].tolist(),
                 "split": list(gold_split(project, table, test_share, seed, split_by))}
    # each side's values in pair order, one array per side: a lookup per pair and field
    # (DataFrame.at) was four fifths of a 60,000-pair export's 35 s
    firsts = _in_pair_order(left, table["left_id"], [f.left_column for f in project.fields])
    seconds = _in_pair_order(right, table["right_id"], [f.right_column for f in project.fields])
    out = []
    for i, (pair_id, left_id, right_id) in enumerate(zip(
            table["pair_id"].tolist(), table["left_id"].tolist(), table["right_id"].tolist(),
            strict=True)):
        out.append({"pair_id": int(pair_id), "left_id": left_id, "right_id": right_id,
                    "prompt": template.fill(names, firsts[i], seconds[i]),
                    **{k: v[i] for k, v in extra.items()}})
    return out


def _in_pair_order(records: pd.DataFrame, ids: pd.Series, columns: list[str]) -> list[list[Any]]:
    """The ``columns`` of the record each id names, one list per pair."""
    rows = records.index.get_indexer(ids)
    return records[columns].to_numpy(dtype=object)[rows].tolist()

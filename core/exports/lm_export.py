"""``--for-lm``: the pairs of any export that has pairs, as prompts from one template.

Every record holds ``pair_id``, ``left_id``, ``right_id`` and ``prompt`` (the template filled
in, see ``lm_text``); then, by what is exported:

- ``scores``: every candidate pair, with ``probability`` (the model's): prompts to be labelled;
- ``gold``: the gold pairs, with ``label`` and ``how`` (unanimous, single, adjudicated):
  prompts to measure a model against;
- ``training``: the gold pairs, with ``label`` and ``split`` (train or test, see ``split``):
  prompts to fine-tune on.

Clusters and conflicts hold records, not pairs, and have no such form.

The prompts are made a chunk of pairs at a time, as they are written (``LmRows.chunks``):
a million of them held at once took 3.6 GB.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

import pandas as pd

from ..errors import DocketError
from ..storage.project_file import ProjectFile
from .gold_export import _records, gold_frame, gold_split
from .lm_text import LmTemplate

FOR_LM = ("scores", "gold", "training")
CHUNK = 10_000  # pairs whose prompts are held at once
PAIRS = ("SELECT p.pair_id, p.left_id, p.right_id, t.probability FROM pairs p JOIN patterns t "
         "ON t.pattern_id = p.pattern_id ORDER BY p.pair_id")


@dataclass(frozen=True)
class LmRows:
    """The records of one ``--for-lm`` export, not yet made. ``gold`` is None for scores,
    whose pairs are read as they are written; otherwise the gold pairs, with ``extra``'s
    columns beside them (the split needs every gold pair, so those are known before the
    first line is written, and a bad --test-share fails before it)."""
    project: ProjectFile
    template: LmTemplate
    gold: pd.DataFrame | None
    extra: dict[str, list[Any]]
    size: int = CHUNK

    def chunks(self) -> Iterator[list[dict[str, Any]]]:
        """The records, at most ``size`` to a list, in pair id order."""
        if self.gold is not None:
            for start in range(0, len(self.gold), self.size):
                part = slice(start, start + self.size)
                yield self._made(self.gold.iloc[part],
                                 {k: v[part] for k, v in self.extra.items()})
            return
        # one statement read in parts: every chunk comes from the same state of the file,
        # whatever a refit writes meanwhile
        cursor = self.project.connection.execute(PAIRS)
        try:
            while rows := cursor.fetchmany(self.size):
                table = pd.DataFrame(rows, columns=["pair_id", "left_id", "right_id", "p"])
                yield self._made(table, {"probability": [float(p) for p in table["p"]]})
        finally:
            cursor.close()

    def records(self) -> list[dict[str, Any]]:
        return [r for chunk in self.chunks() for r in chunk]

    def _made(self, table: pd.DataFrame, extra: dict[str, list[Any]]) -> list[dict[str, Any]]:
        project = self.project
        left = _records(project, "left", table["left_id"])
        right = _records(project, "right", table["right_id"])
        names = [f.name for f in project.fields]
        # each side's values in pair order, one array per side: a lookup per pair and field
        # (DataFrame.at) was four fifths of a 60,000-pair export's 35 s
        firsts = _in_pair_order(left, table["left_id"], [f.left_column for f in project.fields])
        seconds = _in_pair_order(right, table["right_id"],
                                 [f.right_column for f in project.fields])
        out = []
        for i, (pair_id, left_id, right_id) in enumerate(zip(
                table["pair_id"].tolist(), table["left_id"].tolist(),
                table["right_id"].tolist(), strict=True)):
            out.append({"pair_id": int(pair_id), "left_id": left_id, "right_id": right_id,
                        "prompt": self.template.fill(names, firsts[i], seconds[i]),
                        **{k: v[i] for k, v in extra.items()}})
        return out


def lm_rows(project: ProjectFile, what: str = "training", template: LmTemplate | None = None,
            test_share: float = 0.2, seed: int = 0, split_by: str = "record") -> LmRows:
    """The ``what`` export's records to be made (see the module notes); a wrong ``what`` or
    split is refused here, before anything is written."""
    if what not in FOR_LM:
        raise DocketError(f"--for-lm writes pairs: it goes with --what {', '.join(FOR_LM)}, "
                          f"not {what} (which lists records)")
    template = template or LmTemplate.load(None)
    if what == "scores":
        return LmRows(project, template, None, {})
    gold = gold_frame(project)
    extra: dict[str, list[Any]] = {"label": gold["label"].tolist()}
    if what == "gold":
        extra["how"] = gold["how"].tolist()
    else:
        extra["split"] = list(gold_split(project, gold, test_share, seed, split_by))
    return LmRows(project, template, gold[["pair_id", "left_id", "right_id"]], extra)


def lm_records(project: ProjectFile, what: str = "training", template: LmTemplate | None = None,
               test_share: float = 0.2, seed: int = 0,
               split_by: str = "record") -> list[dict[str, Any]]:
    """Every record of the ``what`` export at once, in pair id order."""
    return lm_rows(project, what, template, test_share, seed, split_by).records()


def _in_pair_order(records: pd.DataFrame, ids: pd.Series, columns: list[str]) -> list[list[Any]]:
    """The ``columns`` of the record each id names, one list per pair."""
    rows = records.index.get_indexer(ids)
    return records[columns].to_numpy(dtype=object)[rows].tolist()

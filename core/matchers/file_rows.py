"""Where a matcher file's rows sit among the candidate pairs, checked, and how a bad row is
named: the reading side of ``importing``."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pyarrow as pa
import pyarrow.compute as pc

from ..errors import DocketError
from ..records.formula_guard import GUARD, unguarded
from ..records.id_hints import form_hint
from ..records.sources import row_named
from ..storage.pair_keys import PairKeys, lookup_many
from ..storage.project_file import ProjectFile


def fail(path: Path, position: int, what: str) -> DocketError:
    return DocketError(f"{path}: {row_named(path, position)}: {what}")


def first(mask: pa.Array | np.ndarray) -> int | None:
    where = np.flatnonzero(np.asarray(mask, dtype=bool))
    return int(where[0]) if where.size else None


def check_ids(table: pa.Table, path: Path) -> None:
    for side in ("left", "right"):
        empty = first(pc.equal(pc.utf8_trim_whitespace(table[f"{side}_id"]), "").to_numpy(
            zero_copy_only=False))
        if empty is not None:
            raise fail(path, empty, f"no {side}_id")


@dataclass
class Reader:
    """Reads matcher files against one project's candidate pairs. The rows of several files
    are found in one lookup (one hash of the candidate keys for all of them); a file that
    lists the same pairs in the same order as the one before (matchers run over one export)
    reuses its positions."""

    project: ProjectFile
    index: PairKeys
    last: tuple[pa.ChunkedArray, pa.ChunkedArray, np.ndarray] | None = None
    known: dict[str, set[str]] = field(default_factory=dict)

    def positions(self, batch: Sequence[tuple[pa.Table, Path]]) -> list[np.ndarray]:
        """Each file's position in pair-id order of each row (-1: not a candidate pair)."""
        slots: list[int] = []  # per file: which lookup it uses (-1: the previous batch's last)
        todo: list[tuple[pa.ChunkedArray, pa.ChunkedArray, Path]] = []
        prev = None if self.last is None else (self.last[0], self.last[1], -1)
        for table, path in batch:
            a, b = table["left_id"], table["right_id"]
            if prev is not None and prev[0].equals(a) and prev[1].equals(b):
                slots.append(prev[2])
            else:
                todo.append((a, b, path))
                slots.append(len(todo) - 1)
            prev = (a, b, slots[-1])
        found = lookup_many(self.index, [(a, b) for a, b, _ in todo])
        for (a, b, path), pos in zip(todo, found, strict=True):
            self._known_records(a, b, pos, path)
        out = [found[s] if s >= 0 else self.last[2] for s in slots]  # type: ignore[index]
        if batch:
            table = batch[-1][0]
            self.last = (table["left_id"], table["right_id"], out[-1])
        return out

    def unguarded(self, table: pa.Table) -> pa.Table:
        """``table`` with each id a CSV export guarded ("'@anna") read as the record's id it
        guards, where the id as written names no record (``records.formula_guard``)."""
        for side in ("left", "right"):
            name = f"{side}_id"
            ids = table[name]
            if not pc.any(pc.starts_with(ids, GUARD)).as_py():
                continue
            if side not in self.known:
                self.known[side] = self.project.record_ids(side)
            fixed = pa.array(unguarded(ids.to_pylist(), self.known[side]), type=ids.type)
            table = table.set_column(table.schema.get_field_index(name), name, fixed)
        return table

    def _known_records(self, a: pa.ChunkedArray, b: pa.ChunkedArray, pos: np.ndarray,
                       path: Path) -> None:
        """Rows that are no candidate pair must still name records of the project."""
        miss = np.flatnonzero(pos < 0)
        if not miss.size:
            return
        for side, ids in (("left", a), ("right", b)):
            if side not in self.known:
                self.known[side] = self.project.record_ids(side)
            values = ids.take(pa.array(miss)).to_pylist()
            unknown = [i for i, v in zip(miss, values, strict=True) if v not in self.known[side]]
            if unknown:
                raise fail(path, int(unknown[0]), f"{side}_id {ids[unknown[0]].as_py()!r} "
                            "names no record of the project; check the ids (or the file's "
                            "sides)" + form_hint([ids[unknown[0]].as_py()], self.known[side]))

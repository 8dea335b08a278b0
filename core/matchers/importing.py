"""Reading matcher outputs: one long file (a ``matcher`` column) or one file per matcher.

Every row is checked before anything is stored: ids that name no record, a label other than
match / non-match, a score outside [0, 1] or not a number, two rows for one matcher and pair.
Each is one line naming the file and row. Rows naming two known records that are not a
candidate pair are counted and reported (no audit stratum holds them, so no estimate can use
them), never silently dropped.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import DocketError
from ..records.sources import detect_format, read_frame
from ..storage import store
from ..storage.project_file import ProjectFile
from . import catalogue

SCORE = "score"
LABEL = "label"
LABELS = {"match": 1.0, "non-match": 0.0}
MAX_NAME = 60


@dataclass
class ReadMatcher:
    """One matcher's output read from a file, aligned with ``catalogue.pair_ids``."""

    name: str
    kind: str
    scores: np.ndarray
    source: str
    rows: int
    given: int
    outside: int
    outside_examples: list[tuple[str, str]] = field(default_factory=list)

    @property
    def absent(self) -> int:
        return int(self.scores.size - self.given)


@dataclass
class PairIndex:
    """Candidate pairs keyed for a fast lookup of many (left id, right id) rows."""

    left: pd.Index
    right: pd.Index
    keys: np.ndarray  # sorted pair keys
    position: np.ndarray  # position in pair-id order of each sorted key
    n_pairs: int
    link: bool


def pair_index(project: ProjectFile) -> PairIndex:
    frame = pd.read_sql_query("SELECT left_id, right_id FROM pairs ORDER BY pair_id",
                              project.connection)
    if project.link:
        left, right = pd.Index(frame.left_id.unique()), pd.Index(frame.right_id.unique())
    else:  # one table: both sides share one set of ids
        left = right = pd.Index(pd.unique(np.concatenate([frame.left_id, frame.right_id])))
    key = left.get_indexer(frame.left_id).astype(np.int64) * len(right) + \
        right.get_indexer(frame.right_id)
    order = np.argsort(key, kind="stable")
    return PairIndex(left, right, key[order], order, len(frame), project.link)


def _lookup(index: PairIndex, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Position in pair-id order of each (a, b), -1 where it is no candidate pair."""
    la, rb = index.left.get_indexer(a), index.right.get_indexer(b)
    key = la.astype(np.int64) * len(index.right) + rb
    at = np.searchsorted(index.keys, key).clip(0, max(len(index.keys) - 1, 0))
    hit = (la >= 0) & (rb >= 0) & (index.keys[at] == key) if len(index.keys) else la < -1
    return np.where(hit, index.position[at] if len(index.keys) else -1, -1)


def _read(path: Path) -> pd.DataFrame:
    """The file with text columns (a score column may stay numeric). CSV/TSV through pyarrow
    and Parquet column-wise: millions of rows in seconds, where the general reader converts
    value by value."""
    if not path.is_file():
        return read_frame(path)  # its one-line message for a missing file or a folder
    fmt = detect_format(path)
    if fmt not in ("csv", "tsv", "parquet"):
        return read_frame(path)
    try:
        if fmt == "parquet":
            frame = pd.read_parquet(path)
            for col in frame.columns:
                if col != SCORE or not pd.api.types.is_numeric_dtype(frame[col]):
                    frame[col] = frame[col].astype(str).where(frame[col].notna(), "")
        else:
            frame = pd.read_csv(path, dtype=str, sep="\t" if fmt == "tsv" else ",",
                                engine="pyarrow", keep_default_na=False)
    except (ValueError, OSError, pd.errors.ParserError):
        return read_frame(path)  # other encodings, ragged rows: the general reader says why
    frame.columns = [str(c).strip() for c in frame.columns]
    return frame


def _row(position: int) -> int:
    return position + 2  # the header is line 1


def _fail(path: Path, position: int, what: str) -> DocketError:
    return DocketError(f"{path}: row {_row(position)}: {what}")


def _values(frame: pd.DataFrame, path: Path) -> tuple[str, np.ndarray]:
    has_score, has_label = SCORE in frame.columns, LABEL in frame.columns
    if has_score == has_label:
        raise DocketError(f"{path}: needs one column named {SCORE} (0 to 1) or {LABEL} "
                          "(match / non-match), not " + ("both" if has_score else "neither"))
    if has_label:
        text = frame[LABEL].fillna("").astype(str).str.strip().str.lower()
        value = text.map(LABELS)
        bad = np.flatnonzero(value.isna().to_numpy())
        if bad.size:
            given = frame[LABEL].iloc[bad[0]]
            raise _fail(path, int(bad[0]), f"label {given!r} is not match or non-match")
        return LABEL, value.to_numpy(dtype=float)
    raw = frame[SCORE]
    num = pd.to_numeric(raw, errors="coerce").to_numpy(dtype=float)
    bad = np.flatnonzero(~np.isfinite(num))
    if bad.size:
        raise _fail(path, int(bad[0]), f"score {raw.iloc[bad[0]]!r} is not a number")
    bad = np.flatnonzero((num < 0.0) | (num > 1.0))
    if bad.size:
        raise _fail(path, int(bad[0]), f"score {raw.iloc[bad[0]]} lies outside 0 to 1; "
                    "rescale the matcher's scores into [0, 1]")
    return SCORE, num


def _known(project: ProjectFile, side: str) -> set[str]:
    table = "right_records" if side == "right" and project.link else "left_records"
    key = project.meta["right_id_column" if table == "right_records" else "left_id_column"]
    return {r for (r,) in project.connection.execute(f"SELECT {store.quote(key)} FROM {table}")}


def _positions(project: ProjectFile, index: PairIndex, frame: pd.DataFrame,
               path: Path) -> np.ndarray:
    for side in ("left", "right"):
        empty = np.flatnonzero((frame[f"{side}_id"].fillna("").str.strip() == "").to_numpy())
        if empty.size:
            raise _fail(path, int(empty[0]), f"no {side}_id")
    a, b = frame["left_id"].to_numpy(), frame["right_id"].to_numpy()
    pos = _lookup(index, a, b)
    if not index.link:  # one table: a pair may be written either way round
        pos = np.where(pos < 0, _lookup(index, b, a), pos)
    miss = np.flatnonzero(pos < 0)
    if miss.size:  # not candidate pairs: are the records known at all?
        for side, ids in (("left", a), ("right", b)):
            known = _known(project, side)
            unknown = [i for i in miss if ids[i] not in known]
            if unknown:
                raise _fail(path, int(unknown[0]), f"{side}_id {ids[unknown[0]]!r} names no "
                            "record of the project; check the ids (or the file's sides)")
    return pos


def _one(name: str, kind: str, values: np.ndarray, pos: np.ndarray, rows: np.ndarray,
         frame: pd.DataFrame, path: Path, n_pairs: int) -> ReadMatcher:
    inside = pos >= 0
    seen = pd.Series(pos[inside])
    dup = seen.duplicated(keep=False).to_numpy()
    if dup.any():
        first = seen[dup].iloc[0]
        where = rows[inside][dup][seen[dup].to_numpy() == first][:2]
        raise _fail(path, int(where[1]), f"matcher {name!r} already gave this pair on row "
                    f"{_row(int(where[0]))}; give one row per matcher and pair")
    scores = np.full(n_pairs, np.nan)
    scores[pos[inside]] = values[inside]
    out_rows = rows[~inside]
    examples = [(str(frame["left_id"].iat[i]), str(frame["right_id"].iat[i]))
                for i in out_rows[:5]]
    return ReadMatcher(name, kind, scores, str(path), int(rows.size), int(inside.sum()),
                       int(out_rows.size), examples)


def _check_name(name: str, path: Path) -> str:
    name = name.strip()
    if not name or len(name) > MAX_NAME or any(ch in name for ch in ",=\n\r\t"):
        raise DocketError(f"{path}: matcher name {name!r}: use 1 to {MAX_NAME} characters "
                          "without commas, '=' or line breaks")
    return name


def read_file(project: ProjectFile, index: PairIndex, path: str | Path,
              name: str | None = None) -> list[ReadMatcher]:
    """The matchers in one file: several when it has a ``matcher`` column, else one (named
    ``name``, or the file's stem)."""
    path = Path(path)
    frame = _read(path).reset_index(drop=True)
    missing = [c for c in ("left_id", "right_id") if c not in frame.columns]
    if missing:
        raise DocketError(f"{path}: needs columns left_id and right_id (missing "
                          f"{', '.join(missing)}; found {', '.join(frame.columns[:8])})")
    kind, values = _values(frame, path)
    pos = _positions(project, index, frame, path)
    rows = np.arange(len(frame))
    if "matcher" not in frame.columns:
        label = _check_name(name if name is not None else path.stem, path)
        return [_one(label, kind, values, pos, rows, frame, path, index.n_pairs)]
    if name is not None:
        raise DocketError(f"{path}: has a matcher column, so --name does not apply; the "
                          "column names each matcher")
    names = frame["matcher"].fillna("").astype(str).str.strip()
    blank = np.flatnonzero((names == "").to_numpy())
    if blank.size:
        raise _fail(path, int(blank[0]), "no matcher name")
    out = []
    for label, members in names.groupby(names, sort=True).indices.items():
        members = np.asarray(members)
        out.append(_one(_check_name(str(label), path), kind, values[members], pos[members],
                        members, frame, path, index.n_pairs))
    return out


def read_files(project: ProjectFile, paths: Sequence[str | Path],
               name: str | None = None) -> list[ReadMatcher]:
    """Every matcher in ``paths``, all checked; a name given twice is an error."""
    if name is not None and len(paths) != 1:
        raise DocketError("--name names the matcher of one file; with several files each "
                          "is named after its file (or its matcher column)")
    index = pair_index(project)
    found: dict[str, ReadMatcher] = {}
    for path in paths:
        for m in read_file(project, index, path, name):
            if m.name in found:
                raise DocketError(f"{path}: matcher {m.name!r} is also in "
                                  f"{found[m.name].source}; give each matcher once")
            found[m.name] = m
    return list(found.values())


def import_matchers(project: ProjectFile, paths: Sequence[str | Path], *, name: str | None = None,
                    replace: bool = False, threshold: float = 0.5, group: str | None = None,
                    role: str | None = None) -> list[ReadMatcher]:
    """Read, check and store matchers in one transaction: all of them, or none."""
    if not 0.0 <= threshold <= 1.0:
        raise DocketError(f"--threshold {threshold}: give a score from 0 to 1")
    read = read_files(project, paths, name)
    if role is not None and len(read) != 1:
        raise DocketError(f"--role names one matcher; these files hold {len(read)}")
    with project.transaction() as conn:
        stored = {m.name for m in catalogue.matchers(conn)}
        clash = [m.name for m in read if m.name in stored]
        if clash and not replace:
            raise DocketError(f"matcher {clash[0]!r} is already stored; pass --replace to "
                              "replace it")
        for m in read:
            info = catalogue.MatcherInfo(
                m.name, m.kind, threshold if m.kind == SCORE else 0.5, None, None, m.source,
                m.rows, m.given, m.outside, m.absent, store.now())
            catalogue.save(conn, info, m.scores)
            if group is not None or role is not None:
                catalogue.mark(conn, m.name, group=group, role=role)
    return read

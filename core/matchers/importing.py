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
import pyarrow as pa
import pyarrow.compute as pc
import pyarrow.parquet as pq

from ..errors import DocketError
from ..quality.predictions_file import FALSE_WORDS, TRUE_WORDS
from ..records import decimal_commas
from ..records.sources import detect_format, read_frame, row_named
from ..records.text_tables import HEAD_BYTES, plain_names, separator_hint
from ..storage import store
from ..storage.pair_keys import pair_keys
from ..storage.project_file import ProjectFile
from . import catalogue
from .file_rows import Reader, check_ids, fail, first

SCORE = "score"
LABEL = "label"
ALIASES = {"probability": SCORE, "predicted": LABEL}  # in this order (see _aliased)
# the words 'evaluate --predictions' reads in a label column, so one matcher file serves both:
# 'nonmatch' and '0' were refused here and read there
LABELS = {**dict.fromkeys(sorted(TRUE_WORDS), 1.0), **dict.fromkeys(sorted(FALSE_WORDS), 0.0)}
MAX_NAME = 60
# Rows looked up together: one hash of the candidate keys serves them all, and memory stays
# bounded (a batch's files are held until their rows are found).
BATCH_ROWS = 4_000_000


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


def _strings(column: pa.ChunkedArray) -> pa.Array:
    """A column as text, missing values as empty strings."""
    if not (pa.types.is_string(column.type) or pa.types.is_large_string(column.type)):
        column = pc.cast(column, pa.large_string())
    return pc.fill_null(column, "").combine_chunks()


def _read(path: Path) -> pa.Table:
    """The file as columns of text (a numeric score column stays numeric). CSV/TSV through
    pyarrow and Parquet column-wise: millions of rows in seconds, where the general reader
    converts value by value."""
    if not path.is_file():
        read_frame(path)  # its one-line message for a missing file or a folder
    fmt = detect_format(path)
    table = None
    try:
        if fmt == "parquet":
            table = pq.read_table(path)
        elif fmt in ("csv", "tsv") and _plain_header(path, "\t" if fmt == "tsv" else ","):
            table = pa.Table.from_pandas(
                pd.read_csv(path, dtype=str, sep="\t" if fmt == "tsv" else ",",
                            engine="pyarrow", keep_default_na=False), preserve_index=False)
    except (ValueError, OSError, pd.errors.ParserError, pa.ArrowException):
        table = None  # other encodings, ragged rows: the general reader says why
    if table is None:
        table = pa.Table.from_pandas(read_frame(path), preserve_index=False)
    names = _aliased(plain_names([str(c).strip() for c in table.column_names],
                                 ("left_id", "right_id", "matcher", SCORE, LABEL, *ALIASES)))
    return pa.table({name: col if name == SCORE and _numeric(col) else _strings(col)
                     for name, col in zip(names, table.columns, strict=True)})


def _aliased(names: list[str]) -> list[str]:
    """The names 'evaluate --predictions' reads as a score or label (``ALIASES``) taken as
    those, where the file has no column of that name: docket's own scores export (probability
    and predicted) was refused as having 'neither'. A probability is read before a predicted
    label made from it, as there."""
    out = list(names)
    for alias, meant in ALIASES.items():
        if alias in out and SCORE not in out and LABEL not in out:
            out[out.index(alias)] = meant
    return out


def _plain_header(path: Path, sep: str) -> bool:
    """Whether the fast reader reads the file right: its header is split by ``sep`` and comes
    first. A header split by semicolons (a spreadsheet's CSV in many locales) was read as one
    column, 'left_id;right_id;score', and refused as naming none; a first line 'sep=;' was
    read as the header. The general reader takes both."""
    with path.open("rb") as f:
        head = f.read(HEAD_BYTES).decode("utf-8", errors="replace")
    return separator_hint(head) is None and sep in head.split("\n", 1)[0]


def _numeric(column: pa.ChunkedArray) -> bool:
    return pa.types.is_floating(column.type) or pa.types.is_integer(column.type)


def _values(table: pa.Table, path: Path) -> tuple[str, np.ndarray]:
    names = table.column_names
    has_score, has_label = SCORE in names, LABEL in names
    if has_score == has_label:
        raise DocketError(f"{path}: needs one column named {SCORE} (0 to 1) or {LABEL} "
                          "(match / non-match), " + ("not both" if has_score else
                                                     "and has neither"))
    if has_label:
        text = pc.utf8_lower(pc.utf8_trim_whitespace(table[LABEL]))
        code = pc.index_in(text, value_set=pa.array(list(LABELS), pa.large_string()))
        bad = first(pc.is_null(code).to_numpy(zero_copy_only=False))
        if bad is not None:
            raise fail(path, bad, f"label {table[LABEL][bad].as_py()!r} is not match or "
                        "non-match (or 1 / 0)")
        return LABEL, np.array(list(LABELS.values()))[code.to_numpy(zero_copy_only=False)]
    raw = table[SCORE]
    if _numeric(raw):
        num = raw.to_numpy().astype(float)
    else:
        try:  # arrow parses decimal text exactly; pandas 2's to_numeric may lose the last bit
            num = pc.cast(pc.utf8_trim_whitespace(raw), pa.float64()).to_numpy()
        except pa.ArrowInvalid:  # blanks or words: find the first bad row below
            commas = decimal_commas.read_arrow(raw)  # '0,87', as a spreadsheet saved it
            num = (commas.to_numpy(zero_copy_only=False) if commas is not None else
                   pd.to_numeric(raw.to_pandas(), errors="coerce").to_numpy(dtype=float))
    bad = first(~np.isfinite(num))
    if bad is not None:
        raise fail(path, bad, f"score {raw[bad].as_py()!r} is not a number")
    bad = first((num < 0.0) | (num > 1.0))
    if bad is not None:
        raise fail(path, bad, f"score {raw[bad].as_py()} lies outside 0 to 1; "
                    "rescale the matcher's scores into [0, 1]")
    return SCORE, num


def _one(name: str, kind: str, values: np.ndarray, pos: np.ndarray, rows: np.ndarray,
         table: pa.Table, path: Path, n_pairs: int) -> ReadMatcher:
    inside = pos >= 0
    at = pos[inside]
    repeated = np.bincount(at, minlength=n_pairs)[at] > 1
    if repeated.any():
        first = at[repeated][0]
        where = rows[inside][at == first][:2]
        raise fail(path, int(where[1]), f"matcher {name!r} already gave this pair on "
                    f"{row_named(path, int(where[0]))}; give one row per matcher and pair")
    scores = np.full(n_pairs, np.nan)
    scores[at] = values[inside]
    out_rows = rows[~inside]
    sample = pa.array(out_rows[:5], pa.int64())
    examples = list(zip(table["left_id"].take(sample).to_pylist(),
                        table["right_id"].take(sample).to_pylist(), strict=True))
    return ReadMatcher(name, kind, scores, str(path), int(rows.size), int(inside.sum()),
                       int(out_rows.size), examples)


def _check_name(name: str, path: Path) -> str:
    name = name.strip()
    if (not name or len(name) > MAX_NAME or any(ch in name for ch in ",=")
            or not name.isprintable()):  # an escape sequence would act on every listing
        raise DocketError(f"{path}: matcher name {name!r}: use 1 to {MAX_NAME} characters "
                          "without commas, '=', line breaks or control characters")
    return name


@dataclass
class _File:
    """One file read and checked, waiting for its rows to be found among the candidates."""

    path: Path
    table: pa.Table
    kind: str
    values: np.ndarray


def _prepare(path: Path) -> _File:
    table = _read(path)
    missing = [c for c in ("left_id", "right_id") if c not in table.column_names]
    if missing:
        raise DocketError(f"{path}: needs columns left_id and right_id (missing "
                          f"{', '.join(missing)}; found {', '.join(table.column_names[:8])})")
    if not table.num_rows:
        raise DocketError(f"{path}: a header and no rows; give one row per pair")
    kind, values = _values(table, path)
    check_ids(table, path)
    return _File(path, table, kind, values)


def _matchers(f: _File, pos: np.ndarray, n_pairs: int, name: str | None) -> list[ReadMatcher]:
    """The matchers in one file: several when it has a ``matcher`` column, else one (named
    ``name``, or the file's stem)."""
    path, table = f.path, f.table
    rows = np.arange(table.num_rows)
    if "matcher" not in table.column_names:
        label = _check_name(name if name is not None else path.stem, path)
        return [_one(label, f.kind, f.values, pos, rows, table, path, n_pairs)]
    if name is not None:
        raise DocketError(f"{path}: has a matcher column, so --name does not apply; the "
                          "column names each matcher")
    names = pc.dictionary_encode(pc.utf8_trim_whitespace(table["matcher"])).combine_chunks()
    labels = names.dictionary.to_pylist()
    codes = names.indices.to_numpy(zero_copy_only=False)
    blank = first(codes == labels.index("")) if "" in labels else None
    if blank is not None:
        raise fail(path, blank, "no matcher name")
    out = []
    for code in np.argsort(np.array(labels, dtype=object), kind="stable"):
        members = np.flatnonzero(codes == code)
        out.append(_one(_check_name(labels[code], path), f.kind, f.values[members],
                        pos[members], members, table, path, n_pairs))
    return out


def read_files(project: ProjectFile, paths: Sequence[str | Path],
               name: str | None = None) -> list[ReadMatcher]:
    """Every matcher in ``paths``, all checked; a name given twice is an error. Files are
    read in batches of about ``BATCH_ROWS`` rows, whose rows are found in one lookup."""
    if name is not None and len(paths) != 1:
        raise DocketError("--name names the matcher of one file; with several files each "
                          "is named after its file (or its matcher column)")
    with project.reading() as conn:
        reader = Reader(project, pair_keys(conn, project.link))
    found: dict[str, ReadMatcher] = {}
    batch: list[_File] = []

    def flush() -> None:
        places = reader.positions([(f.table, f.path) for f in batch])
        for f, pos in zip(batch, places, strict=True):
            for m in _matchers(f, pos, reader.index.n_pairs, name):
                if m.name in found:
                    raise DocketError(f"{f.path}: matcher {m.name!r} is also in "
                                      f"{found[m.name].source}; give each matcher once")
                found[m.name] = m
        batch.clear()

    for path in paths:
        batch.append(prepared := _prepare(Path(path)))
        prepared.table = reader.unguarded(prepared.table)  # a CSV export's ids, guarded
        if sum(f.table.num_rows for f in batch) >= BATCH_ROWS:
            flush()
    flush()
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

"""Bulk decisions from a file: all of them checked first, then written in short batches.

A file of 25,000 rows written in one transaction held the write lock for minutes, and a
reviewer's decision meanwhile failed as "database is locked". Each batch is its own short
transaction, and a pause between batches lets another process's write in (SQLite's busy
handler retries every few milliseconds). The command still changes all or nothing: should a
batch fail (a full disk, say), the batches already written are retracted, so every standing
label is as it was; the log keeps both, as it keeps every undo.
"""

from __future__ import annotations

import contextlib
import sqlite3
import time
import warnings
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from ..errors import DocketError
from ..records.formula_guard import GUARD, unguarded
from ..records.id_hints import form_hint
from ..records.sources import read_frame, row_named, row_word
from ..records.text_tables import plain_names
from ..storage import claims, file_health, roles
from ..storage import decisions as log
from ..storage.project_file import ProjectFile
from ..types import LABELS
from ..wording import many
from .label_columns import check_columns, check_filled
from .label_pairs import check_ids_agree, ends_of_ids, ids_of_ends

BATCH_ROWS = 500  # at most, per transaction
BATCH_S = 0.02  # a batch held the write lock this long or less: the next is twice as large;
# over twice this, half as large
FIRST_BATCH = 100
PAUSE_S = 0.005  # between batches: a waiting writer asks every millisecond (ProjectFile)
# Room a decision takes, measured: 510 bytes without a note (the log row, its indexes, the
# current label); and the write-ahead log grows to SQLite's checkpoint size, 1,000 pages.
DECISION_BYTES = 600
LOG_BYTES = 1000 * 4096

ALIASES = {"non_match": "non-match", "nonmatch": "non-match", "no-match": "non-match"}


@dataclass
class BulkRow:
    pair_id: int
    label: str
    note: str


def _unguard_ids(project: ProjectFile, frame: pd.DataFrame) -> None:
    """Ids as a CSV export guarded them ("'@anna" for '@anna') read as the records' ids: the
    gold or scores export given back as a label file was refused as naming no pair."""
    for side in ("left", "right"):
        col = f"{side}_id"
        if col in frame.columns and frame[col].astype(str).str.startswith(GUARD).any():
            frame[col] = unguarded(frame[col], project.record_ids(side))


def read_rows(project: ProjectFile, path: Path, reviewer: str | None = None) -> list[BulkRow]:
    """The rows of a label file, every one checked; ``reviewer`` (whom they are for) is
    checked against a column naming reviewers."""
    frame = read_frame(path)
    frame.columns = plain_names(list(frame.columns),
                                ("pair_id", "label", "note", "left_id", "right_id"))
    cols = set(frame.columns)
    if "label" not in cols:
        said = [str(c) for c in frame.columns
                if ALIASES.get(str(c).strip().lower(), str(c).strip().lower()) in LABELS]
        if said:  # '1,match' on the first line: a decision, read as the header
            raise DocketError(f"{path}: its first line reads as a decision ('{said[0]}'), not "
                              "a header; add a header row: pair_id,label (or left_id,"
                              "right_id,label), with note if the file has notes")
        raise DocketError(f"{path}: needs a 'label' column (with pair_id, or left_id and "
                          "right_id)")
    if not len(frame):
        raise DocketError(f"{path}: a header and no rows; give one decision per row")
    check_filled(path, frame)
    _unguard_ids(project, frame)
    if "pair_id" in cols:
        ids = pd.to_numeric(frame["pair_id"], errors="coerce")
        bad_rows = [i for i in range(len(ids))
                    if pd.isna(ids.iloc[i]) or not float(ids.iloc[i]).is_integer()]
        if bad_rows:
            raise DocketError(f"{path}: {row_named(path, bad_rows[0])}: pair_id "
                              f"{frame['pair_id'].iloc[bad_rows[0]]!r} must be a whole "
                              "number (the pair_id column of 'docket next' or the scores "
                              "export)")
        pair_ids = [int(x) for x in ids]
        ends = ends_of_ids(project.connection, pair_ids)
        # named as written: "1e23" read as a number would be shown as 99999999999999991611392
        unknown = [str(t) for p, t in zip(pair_ids, frame["pair_id"], strict=True)
                   if p not in ends]
        if unknown:
            raise DocketError(f"{path}: {many(len(unknown), 'unknown pair id')}: "
                              f"{', '.join(unknown[:5])}; nothing was written")
        if {"left_id", "right_id"} <= cols:
            check_ids_agree(project, path, frame, pair_ids, ends)
    elif {"left_id", "right_id"} <= cols:
        named = list(zip(frame["left_id"], frame["right_id"], strict=True))
        # both ways round: a dedupe pair may be named right id first, and a link row so named
        # is said to be
        lookup = ids_of_ends(project.connection, [*named, *((b, a) for a, b in named)])
        pair_ids = []
        missing: list[str] = []
        swapped = 0  # link rows naming a pair right id first
        astray: list[tuple[str, str]] = []  # the others that name no pair
        for i, (a, b) in enumerate(named):
            p = lookup.get((a, b))
            if p is None and not project.link:
                p = lookup.get((b, a))
            if p is None:
                missing.append(f"{row_named(path, i)} ({a}, {b})")
                turned = project.link and (b, a) in lookup
                swapped += turned
                if not turned:
                    astray.append((a, b))
            else:
                pair_ids.append(p)
        if missing:
            are = "1 pair is not a candidate pair" if len(missing) == 1 else \
                f"{len(missing)} pairs are not candidate pairs"
            # side by side: a link's left ids written '17.0' and right ids '17' hid the
            # left_id '17' that names no left record among the right's ids
            hint = form_hint([a for a, _ in astray], project.record_ids("left")) or \
                form_hint([b for _, b in astray], project.record_ids("right")) or (
                f"; {many(swapped, 'of them is', 'of them are')} a pair with its ids the other "
                "way round: left_id takes the left table's id, right_id the right's"
                if swapped else "")
            raise DocketError(f"{path}: {are} of this project: {', '.join(missing[:3])}"
                              f"{hint}; nothing was written")
    else:
        raise DocketError(f"{path}: needs pair_id, or left_id and right_id, beside 'label'")
    rows = []
    notes = frame["note"] if "note" in cols else pd.Series([""] * len(frame))
    for i, (pid, label, note) in enumerate(zip(pair_ids, frame["label"], notes, strict=True)):
        lab = str(label or "").strip().lower()
        lab = ALIASES.get(lab, lab)
        if lab not in LABELS:
            raise DocketError(f"{path}: {row_named(path, i)}: label '{label}' is not one of "
                              f"{', '.join(LABELS)}; nothing was written")
        rows.append(BulkRow(int(pid), lab, "" if note is None or pd.isna(note) else str(note)))
    check_columns(path, frame, reviewer)  # last: a warning, then a refusal, was two lines
    return _one_row_per_pair(path, rows)


def _one_row_per_pair(path: Path, rows: list[BulkRow]) -> list[BulkRow]:
    """A row given twice (a file pasted into itself, two exports joined) is one decision: it
    was logged twice, and the reviewer's count doubled. One file giving one pair two labels,
    or one label with two notes, is refused: which the reviewer meant cannot be told."""
    first: dict[int, int] = {}
    kept: list[BulkRow] = []
    for i, r in enumerate(rows):
        j = first.setdefault(r.pair_id, i)
        if j == i:
            kept.append(r)
            continue
        said = (f"label pair {r.pair_id} {rows[j].label} and {r.label}"
                if rows[j].label != r.label else
                f"give pair {r.pair_id} the notes {rows[j].note!r} and {r.note!r}"
                if rows[j].note != r.note else "")
        if said:
            word, at = row_word(path)
            raise DocketError(f"{path}: {word}s {j + at} and {i + at} {said}; keep the one "
                              "meant; nothing was written")
    if len(kept) < len(rows):
        repeats = len(rows) - len(kept)
        warnings.warn(f"{path}: {many(repeats, 'row repeats', 'rows repeat')} an earlier row "
                      "for the same pair and label; each pair was read once", stacklevel=2)
    return kept


def apply_rows(project: ProjectFile, reviewer: str, rows: list[BulkRow], role: str = "reviewer",
               batch: int = BATCH_ROWS, seconds: float = BATCH_S, pause: float = PAUSE_S,
               progress: Callable[[int], None] | None = None) -> int:
    """Record ``rows`` for ``reviewer`` in batches of at most ``batch`` rows and about
    ``seconds`` of writing each, ``pause`` apart; on any failure, none of them stands.
    ``progress`` hears the rows gone through after each batch. Returns the decisions
    recorded: a row whose label and note stand already for the reviewer is passed over in
    the transaction itself, so that one file run twice at once is logged once."""
    reviewer = roles.plain_name(reviewer)
    with project.reading():
        reviewer = roles.as_kept(project.connection, reviewer)
    _check_room(project, rows)
    written: list[tuple[int, str]] = []
    at = 0  # rows gone through, written or standing already
    size = max(1, batch if seconds == float("inf") else min(batch, FIRST_BATCH))
    try:
        while at < len(rows):
            if at and pause:
                time.sleep(pause)
            part = rows[at:at + size]
            with project.transaction() as conn:
                began = time.monotonic()
                roles.register(conn, reviewer)
                claims.release_many(conn, reviewer, [r.pair_id for r in part])
                prior = log.current_many(conn, [r.pair_id for r in part], reviewer, role)
                done = log.append_many(conn, reviewer, role, [
                    (r.pair_id, r.label, r.note, d.decision_id if d else None)
                    for r in part if (d := prior.get(r.pair_id)) is None
                    # a row standing already: another process wrote it meanwhile
                    or (d.label, d.note or "") != (r.label, r.note)])
            # committed: a failed batch was rolled back whole
            written += [(d.pair_id, d.decision_id) for d in done]
            at += len(part)
            # a batch is a few statements that cannot stop part way: the next one is sized by
            # how long this one held the write lock, its commit included
            took = time.monotonic() - began
            size = max(1, size // 2) if took > 2 * seconds else \
                min(max(1, batch), size * 2) if took < seconds else size
            if progress:
                progress(at)
    except BaseException as exc:
        try:
            _retract(project, reviewer, role, written)
        except (DocketError, sqlite3.Error, KeyboardInterrupt) as again:
            # "disk full; nothing was saved" was said of 849 labels that stood
            raise DocketError(_left_standing(project, reviewer, len(written), len(rows), again)
                              ) from exc
        raise
    return len(written)


def _check_room(project: ProjectFile, rows: list[BulkRow]) -> None:
    # a disk that filled half way left the batches written, and had no room to take them back
    wal = Path(f"{project.path}-wal")
    log_room = max(0, LOG_BYTES - (wal.stat().st_size if wal.exists() else 0))
    need = sum(DECISION_BYTES + len(r.note.encode()) for r in rows) + log_room
    file_health.check_room(project.path, need, f"recording {many(len(rows), 'decision')}")


def _retract(project: ProjectFile, reviewer: str, role: str, written: list[tuple[int, str]]
             ) -> None:
    """Take back the committed decisions of a bulk run that did not finish, latest first."""
    if not written:
        return
    try:
        _append_retractions(project, reviewer, role, written)
    except DocketError as exc:
        if not file_health.disk_full(exc):
            raise
        # the disk filled: a checkpoint folds the write-ahead log into the file and lets the
        # log start again from its beginning, which frees the room the failed batch took
        with project.reading() as conn, contextlib.suppress(sqlite3.Error):
            conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
        _append_retractions(project, reviewer, role, written)


def _append_retractions(project: ProjectFile, reviewer: str, role: str,
                        written: list[tuple[int, str]]) -> None:
    with project.transaction() as conn:
        log.append_many(conn, reviewer, role, [(pair_id, None, "", decision_id)
                                               for pair_id, decision_id in reversed(written)])


def _left_standing(project: ProjectFile, reviewer: str, n: int, total: int,
                   exc: BaseException) -> str:
    why = ("the disk is full" if file_health.disk_full(exc)
           else "the command was interrupted" if isinstance(exc, KeyboardInterrupt)
           else f"of an error ({exc})")
    return (f"{project.path}: {many(n, 'decision')} of the {total:,} for {reviewer} were recorded "
            f"and could not be taken back, as {why}: they stand; "
            + ("free some space, then " if why == "the disk is full" else "")
            + "run the same docket label again to record the rest (rows recorded already "
            "are not recorded again)")


def label_once(project: ProjectFile, name: str, path: Path, adjudicator: str | None = None
               ) -> int:
    """``name``'s labels from ``path``, unless ``name`` has decisions already (a file applied
    before); ``adjudicator``, when another person, gets the adjudicator role. Returns the number
    of labels recorded. No refit: the caller decides when the queue is re-ranked."""
    from .team import add_reviewer
    if adjudicator and adjudicator != name:
        add_reviewer(project, adjudicator, "adjudicator", granted_by="docket demo")
    with project.reading() as conn:
        if conn.execute("SELECT 1 FROM decisions WHERE reviewer = ? LIMIT 1",
                        (name,)).fetchone():
            return 0
    # named on purpose: the demo's 'ines' beside a user 'inez' is two people
    add_reviewer(project, name, "reviewer", granted_by="docket demo")
    return apply_rows(project, name, read_rows(project, path, name))

"""Bringing in decisions that reviewers made offline, in copies of the same project.

Decision ids are UUIDs, so the merged log is the union of the logs: a decision already present
is skipped, which makes merging idempotent, and a union does not depend on order. ``current``
is then rebuilt from the whole log for every (pair, reviewer, role) a new decision touches;
since the log's order is (decided_at, decision_id), the result is the same whatever order the
files come in.

Roles are the receiving project's: a merge registers a new name as a reviewer, and a copy's
role changes (its grants unknown here, or roles differing from ours) are reported and left out
unless ``accept_roles`` is given. Names whose files hold adjudications but who are not
adjudicators here are reported too; their adjudications are kept in the log but settle nothing
(``core.gold`` judges each by the role held when it was made). A copy is refused whole if its
records differ (the records fingerprint is recomputed from the copy, never read from it), or
if it holds an unknown role or a time too far ahead of the clock (``merge_checks``).
"""

from __future__ import annotations

import sqlite3
from collections import Counter
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

from ..errors import DocketError
from ..storage import decisions as log
from ..storage import roles, store
from ..storage.file_health import close_reader, same_file
from ..storage.fingerprint import records_fingerprint
from ..storage.project_file import ProjectFile
from .merge_checks import RoleChange, accepted_grants, check_copy, read_grants, role_changes

COLUMNS = ("decision_id", "pair_id", "reviewer", "role", "label", "note", "decided_at",
           "seconds", "supersedes")
_SELECT = f"SELECT {', '.join(COLUMNS)} FROM decisions"
_CHUNK = 500  # ids per IN (...) query, well under SQLite's parameter limit
CACHE_KIB = 64 * 1024

Row = tuple[Any, ...]


@dataclass(frozen=True)
class FileMerge:
    path: str
    decisions: int  # decisions in that file
    new: int  # of them, new to this project (and to the files merged before it in this call)


@dataclass(frozen=True)
class MergeResult:
    project: str
    files: tuple[FileMerge, ...]
    added: int
    by_reviewer: dict[str, int]
    pairs_touched: int
    new_reviewers: tuple[str, ...]
    unconfirmed_adjudicators: tuple[str, ...] = field(default=())
    # (new name, name already here) equal but for letter case or Unicode form: a copy made
    # before such names were refused; they count as two reviewers
    alike_names: tuple[tuple[str, str], ...] = field(default=())
    role_changes: tuple[RoleChange, ...] = field(default=())
    roles_accepted: bool = False

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


@dataclass
class _Other:
    path: Path
    decisions: list[Row]
    reviewers: list[Row]
    pairs: dict[int, tuple[str, str]]
    grants: list[roles.Grant] = field(default_factory=list)


def _chunks(values: list[Any]) -> list[list[Any]]:
    return [values[i:i + _CHUNK] for i in range(0, len(values), _CHUNK)]


def _pairs_of(conn: sqlite3.Connection, ids: list[int]) -> dict[int, tuple[str, str]]:
    out: dict[int, tuple[str, str]] = {}
    for part in _chunks(ids):
        marks = ",".join("?" * len(part))
        out.update({int(p): (a, b) for p, a, b in conn.execute(
            f"SELECT pair_id, left_id, right_id FROM pairs WHERE pair_id IN ({marks})", part)})
    return out


def _read(path: Path, project: ProjectFile) -> _Other:
    """Everything needed from one other file, opened read-only and checked."""
    if same_file(path, project.path):
        raise DocketError(f"{path}: is this project itself; give the copies other reviewers "
                          "worked in")
    if not path.is_file():
        what = ("a folder" if path.is_dir() else "a device, pipe or socket, not a file"
                if path.exists() else "no such file")  # not 'no such file' for /dev/null
        raise DocketError(f"{path}: {what}; give the path of a copy of this project")
    conn = store.open_file(path, readonly=True)  # never written to, nor upgraded
    try:
        meta = store.get_meta(conn)
        ours = project.meta.get("records_fingerprint") or records_fingerprint(
            project.connection)
        if (meta.get("fingerprint") != project.meta.get("fingerprint")
                or records_fingerprint(conn) != ours):
            raise DocketError(f"{path}: a different project (its records or candidate pairs "
                              f"differ from those of {project.path}); merge only copies of "
                              "this project; nothing was merged")
        rows = conn.execute(_SELECT).fetchall()
        reviewers = conn.execute("SELECT name, role, added_at FROM reviewers").fetchall()
        grants = read_grants(conn)
        pairs = _pairs_of(conn, sorted({int(r[1]) for r in rows}))
    except (sqlite3.DatabaseError, KeyError, TypeError) as exc:
        raise DocketError(f"{path}: cannot be read as a project ({exc}); nothing was "
                          "merged") from None
    finally:
        close_reader(conn, path)
    check_copy(path, rows, reviewers, grants)
    return _Other(path, rows, reviewers, pairs, grants)


def _check_pairs(project: ProjectFile, other: _Other) -> None:
    ours = _pairs_of(project.connection, sorted(other.pairs))
    for pid, ids in sorted(other.pairs.items()):
        if ours.get(pid) != ids:
            here = "missing here" if pid not in ours else f"({ours[pid][0]}, {ours[pid][1]}) here"
            raise DocketError(f"{other.path}: pair {pid} is ({ids[0]}, {ids[1]}) there but "
                              f"{here}: the files number their pairs differently (built with "
                              "another --seed?); nothing was merged")


def _existing(conn: sqlite3.Connection, ids: list[str]) -> dict[str, Row]:
    out: dict[str, Row] = {}
    for part in _chunks(ids):
        marks = ",".join("?" * len(part))
        out.update({r[0]: tuple(r) for r in conn.execute(
            f"{_SELECT} WHERE decision_id IN ({marks})", part)})
    return out


@contextmanager
def _roomy_cache(conn: sqlite3.Connection) -> Iterator[None]:
    # With SQLite's 2 MB default a 25,000-decision merge spills index pages mid-transaction
    # (measured: 0.5 of 2.9 CPU s); the room is given back when the merge is done.
    before = conn.execute("PRAGMA cache_size").fetchone()[0]
    conn.execute(f"PRAGMA cache_size = {-CACHE_KIB}")
    try:
        yield
    finally:
        conn.execute(f"PRAGMA cache_size = {int(before)}")


def merge(project: ProjectFile, others: list[Path], accept_roles: bool = False) -> MergeResult:
    """Bring in the decisions (and reviewers) of ``others``; all of them or, on error, none.

    ``accept_roles`` also brings in the copies' role changes (see the module docstring).
    """
    if not others:
        raise DocketError("give at least one project copy to merge")
    read = [_read(Path(p), project) for p in others]  # every file checked before any write
    with project.reading():
        for other in read:
            _check_pairs(project, other)
        known = _existing(project.connection, sorted({r[0] for o in read for r in o.decisions}))
        changes: list[RoleChange] = []
        for other in read:
            seen = {c.grant_id for c in changes}
            changes += [c for c in role_changes(other.path, other.reviewers, other.grants,
                                                project.connection)
                        if c.grant_id is None or c.grant_id not in seen]
    fresh: list[Row] = []
    files = []
    for other in read:
        new = 0
        for row in other.decisions:
            row = tuple(row)
            before = known.get(row[0])
            if before is None:
                known[row[0]] = row
                fresh.append(row)
                new += 1
            elif before != row:
                raise DocketError(f"{other.path}: decision {row[0]} differs from the one with "
                                  "the same id already merged or recorded here (was a file "
                                  "edited by hand?); nothing was merged")
        files.append(FileMerge(str(other.path), len(other.decisions), new))

    adjudicating = {r[2] for r in fresh if r[3] == "adjudicator"}
    first_seen: dict[str, str] = {}
    for other in read:
        for name, _, added in other.reviewers:
            first_seen[name] = min(added, first_seen.get(name, added))
    for row in fresh:  # a name with decisions but no reviewers row (hand-made files)
        first_seen.setdefault(row[2], row[6])
    touched = sorted({(int(r[1]), r[2], r[3]) for r in fresh})
    with project.transaction() as conn, _roomy_cache(conn):
        present = dict(conn.execute("SELECT name, role FROM reviewers").fetchall())
        added_at = dict(conn.execute("SELECT name, added_at FROM reviewers").fetchall())
        new_names = sorted(n for n in first_seen if n not in present)
        for name in sorted(first_seen):
            if name in present:  # keep the earliest sighting, so the order of merges is moot
                if first_seen[name] < added_at[name]:
                    conn.execute("UPDATE reviewers SET added_at = ? WHERE name = ?",
                                 (first_seen[name], name))
            else:
                conn.execute("INSERT INTO reviewers (name, role, added_at) "
                             "VALUES (?, 'reviewer', ?)",
                             (name, first_seen[name]))
        if accept_roles and changes:
            roles.insert(conn, accepted_grants(changes, log.stamp()))
            roles_now = dict(conn.execute("SELECT name, role FROM reviewers").fetchall())
        else:
            roles_now = present
        conn.executemany(f"INSERT INTO decisions ({', '.join(COLUMNS)}) "
                         f"VALUES ({','.join('?' * len(COLUMNS))})", sorted(fresh))
        log.refresh_many(conn, touched)
    return MergeResult(
        project=str(project.path), files=tuple(files), added=len(fresh),
        by_reviewer=dict(sorted(Counter(r[2] for r in fresh).items())),
        pairs_touched=len({t[0] for t in touched}), new_reviewers=tuple(new_names),
        unconfirmed_adjudicators=tuple(sorted(n for n in adjudicating
                                              if roles_now.get(n) != "adjudicator")),
        role_changes=tuple(changes), roles_accepted=bool(accept_roles and changes),
        alike_names=tuple((n, here) for n in new_names
                          if (here := roles.alike(n, sorted(present))) is not None))

"""Who held which role, and since when: the role grants log.

``reviewers.role`` is a person's present role; ``role_grants`` is every change of it, with who
made the change and when. A decision is judged by the role its maker held at the moment it was
made: an adjudication by someone who was not (or no longer) an adjudicator then settles nothing,
whatever role the decision row itself claims. A name without any grant is a reviewer.

These are records kept in the project file, not security: anyone who can write the file can
edit them, and a name is not proof of who typed it.
"""

from __future__ import annotations

import bisect
import os
import shlex
import sqlite3
import unicodedata
import uuid
from dataclasses import asdict, dataclass
from typing import Any

from ..errors import DocketError
from ..types import ROLES
from . import store
from .decisions import stamp
from .migrations import MIGRATED_GRANTOR

__all__ = ["MIGRATED_GRANTOR", "ROLES", "Grant", "as_kept", "enter", "grant", "history",
           "plain_name", "register", "role_at", "short"]
DEFAULT_ROLE = "reviewer"


History = dict[str, list[tuple[str, str]]]  # name -> [(granted_at, role)], oldest first


@dataclass(frozen=True)
class Grant:
    grant_id: str
    name: str
    role: str
    granted_by: str
    granted_at: str

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


GRANT_COLUMNS = "grant_id, name, role, granted_by, granted_at"


def plain_name(name: str, how: str = "pass --reviewer NAME") -> str:
    """A person's name trimmed and in Unicode NFC, refused when empty or holding control
    characters (an escape sequence in a name would act on every terminal that lists the
    reviewers). NFC because one keyboard types "é" as one character and another as "e" and a
    combining accent: the same name to the eye."""
    name = unicodedata.normalize("NFC", (name or "").strip())
    if not name:
        raise DocketError(f"a reviewer needs a name; {how}")
    if any(not ch.isprintable() for ch in name):
        raise DocketError(f"reviewer name {name!r} holds control characters; use plain text")
    return name


def _folded(name: str) -> str:
    # letter case and accents aside: 'inés' typed on one keyboard, 'ines' on another
    bare = unicodedata.normalize("NFD", name.casefold())
    return unicodedata.normalize("NFC", "".join(c for c in bare if not unicodedata.combining(c)))


def alike(name: str, known: list[str]) -> str | None:
    """The first of ``known`` (another name) that ``name`` equals but for letter case,
    accents or Unicode form."""
    folded = _folded(name)
    return next((k for k in known if k != name and _folded(k) == folded), None)


MAX_NAME = 100  # characters, for a new name; names kept already stay usable


def near(name: str, known: list[str]) -> str | None:
    """The first of ``known`` one slip of the keyboard from ``name`` (a letter more, less,
    other, or two swapped; case and accents aside), for names of four letters or more:
    'ins' or 'inse' for 'ines'. Short names ('lee', 'leo') are often two people, and names
    that differ in their digits ('rater1', 'rater2') are numbered so on purpose."""
    from rapidfuzz.distance import OSA
    folded = _folded(name)
    return next((k for k in known if max(len(folded), len(_folded(k))) >= 4
                 and _digits(k) == _digits(name)  # 'rater1', 'rater2': numbered on purpose
                 and OSA.distance(folded, _folded(k), score_cutoff=1) == 1), None)


def _digits(name: str) -> str:
    return "".join(c for c in name if c.isdigit())


def _project_path(conn: sqlite3.Connection) -> str:
    """The file as the user is likely to have named it: under the working folder, relative to
    it (SQLite gives the whole path: 'docket review vets.docket' was told to run 'docket
    reviewers /home/.../vets.docket add ...')."""
    row = conn.execute("PRAGMA database_list").fetchone()
    if not row or not row[2]:
        return "PROJECT"
    try:
        near = os.path.relpath(row[2])
    except ValueError:  # another drive (Windows)
        return str(row[2])
    return str(row[2]) if near.startswith("..") else near


def as_kept(conn: sqlite3.Connection, name: str, added: bool = False) -> str:
    """``name`` as the project keeps it: a known name differing only in Unicode form (a file
    written before names were normalised) is that name; a new name equal to a known one but
    for letter case or accents is refused, since it is almost surely the same person typed
    otherwise (kept apart, one person's two names count as two reviewers of an overlap pair).
    A file already holding both spellings keeps working: an exact name is always taken. A new
    name one slip from a known one ('ins' beside 'ines') is refused too unless ``added``
    (``docket reviewers add``, where a person is named on purpose). A new name comes back in
    NFC."""
    if conn.execute("SELECT 1 FROM reviewers WHERE name = ?", (name,)).fetchone():
        return name
    known = [k for (k,) in conn.execute("SELECT name FROM reviewers ORDER BY name")]
    name = unicodedata.normalize("NFC", name)
    same = [k for k in known if unicodedata.normalize("NFC", k) == name]
    if same:
        return same[0]
    other = alike(name, known)
    if other is not None:
        raise DocketError(f"reviewer {name!r} differs only in letter case or accents from "
                          f"{other!r}, who is in this project already; use {other!r}, or a "
                          "name that differs in more than these")
    slip = None if added else near(name, known)
    if slip is not None:
        raise DocketError(
            f"reviewer {name!r} is new to this project, and one character from {slip!r}, who "
            f"is in it already: if that is you, use {slip!r}; if another person, add them "
            f"first with 'docket reviewers {shlex.quote(_project_path(conn))} add "
            f"{shlex.quote(name)}'")
    return short(name)


def short(name: str) -> str:
    """``name`` unless it is longer than a name is: a file's text given as the name ("$(cat
    notes)") widened every list it was shown in."""
    if len(name) > MAX_NAME:
        raise DocketError(f"reviewer name '{name[:20]}…' is {len(name):,} characters long; a "
                          f"name is at most {MAX_NAME}: give a shorter one")
    return name


def enter(conn: sqlite3.Connection, name: str) -> str:
    """Register a name someone typed, as ``as_kept`` reads it; returns the name to use."""
    name = as_kept(conn, name)
    register(conn, name)
    return name


def register(conn: sqlite3.Connection, name: str) -> None:
    """Make ``name`` known as a reviewer if it is new; roles are only ever granted."""
    conn.execute("INSERT OR IGNORE INTO reviewers (name, role, added_at) VALUES (?, ?, ?)",
                 (name, DEFAULT_ROLE, store.now()))


def grant(conn: sqlite3.Connection, name: str, role: str, granted_by: str) -> Grant:
    """Give ``name`` the role ``role`` from now on; no commit (call inside a transaction)."""
    if role not in ROLES:
        raise ValueError(f"unknown role {role!r}")
    g = Grant(str(uuid.uuid4()), name, role, granted_by, stamp())
    insert(conn, [g])
    return g


def insert(conn: sqlite3.Connection, grants: list[Grant]) -> None:
    """Record grants (from here or accepted from a copy) and bring present roles up to date."""
    conn.executemany(f"INSERT OR IGNORE INTO role_grants ({GRANT_COLUMNS}) VALUES (?, ?, ?, ?, ?)",
                     [(g.grant_id, g.name, g.role, g.granted_by, g.granted_at) for g in grants])
    for name in sorted({g.name for g in grants}):
        register(conn, name)
        conn.execute("UPDATE reviewers SET role = (SELECT role FROM role_grants WHERE name = ? "
                     "ORDER BY granted_at DESC, grant_id DESC LIMIT 1) WHERE name = ?",
                     (name, name))


def grants(conn: sqlite3.Connection) -> list[Grant]:
    """Every grant, oldest first. An older file, read as it is, has kept only present roles:
    they are read as the upgrade would record them, held since the person was added."""
    if not store.has_table(conn, "role_grants"):
        return [Grant(f"present:{name}", name, role, MIGRATED_GRANTOR, added_at)
                for name, role, added_at in conn.execute(
                    "SELECT name, role, added_at FROM reviewers WHERE role <> ? "
                    "ORDER BY added_at, name", (DEFAULT_ROLE,))]
    return [Grant(*row) for row in conn.execute(
        f"SELECT {GRANT_COLUMNS} FROM role_grants ORDER BY granted_at, grant_id")]


def history(conn: sqlite3.Connection) -> History:
    out: History = {}
    for g in grants(conn):
        out.setdefault(g.name, []).append((g.granted_at, g.role))
    return out


def role_at(past: History, name: str, when: str) -> str:
    """The role ``name`` held at ``when`` (ISO time): the latest grant made at or before it."""
    steps = past.get(name, [])
    i = bisect.bisect_right(steps, (when, "\uffff"))
    return steps[i - 1][1] if i else DEFAULT_ROLE


def latest_grant(conn: sqlite3.Connection, name: str) -> Grant | None:
    row = conn.execute(f"SELECT {GRANT_COLUMNS} FROM role_grants WHERE name = ? "
                       "ORDER BY granted_at DESC, grant_id DESC LIMIT 1", (name,)).fetchone()
    return None if row is None else Grant(*row)

"""What a merge refuses in a copy, and the role changes it finds there.

A copy is someone else's file: it may have been edited by hand. Before anything is written,
every decision, reviewer row and role grant in it is checked: roles must be ones docket knows,
labels valid, and times no further ahead of this machine's clock than ``CLOCK_TOLERANCE`` (a
decision dated 9999 would otherwise stand over every later one). Roles are the receiving
project's: a copy's role changes are reported, and brought in only when asked for.
"""

from __future__ import annotations

import sqlite3
from dataclasses import asdict, dataclass
from datetime import UTC, datetime, timedelta
from pathlib import Path
from typing import Any

from ..errors import DocketError
from ..storage import roles
from ..types import LABELS

CLOCK_TOLERANCE = timedelta(hours=1)
TOLERANCE_TEXT = "1 hour"


@dataclass(frozen=True)
class RoleChange:
    """A role a copy gives someone that this project does not (yet) record."""

    path: str
    name: str
    role: str
    granted_by: str
    granted_at: str
    grant_id: str | None  # None: the copy shows the role but holds no grant for it

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)

    @property
    def message(self) -> str:
        by = (f"granted by {self.granted_by} at {self.granted_at}" if self.grant_id
              else "with no record of who granted it")
        return f"{self.path}: {self.name} is {self.role} there ({by})"


def _time(text: Any) -> datetime | None:
    try:
        t = datetime.fromisoformat(str(text))
    except ValueError:
        return None
    return t if t.tzinfo is not None else t.replace(tzinfo=UTC)


def _refuse(path: Path, what: str) -> DocketError:
    return DocketError(f"{path}: {what}; nothing was merged")


def _check_time(path: Path, what: str, value: Any, limit: datetime) -> None:
    t = _time(value)
    if t is None:
        raise _refuse(path, f"{what} has no valid time ({value!r}); was the file edited?")
    if t > limit:
        raise _refuse(path, f"{what} is dated {value}, more than {TOLERANCE_TEXT} ahead of "
                      "this machine's clock; check the clock of the machine the copy was made "
                      "on (or whether the file was edited)")


def check_copy(path: Path, decisions: list[tuple], reviewers: list[tuple],
               grants: list[roles.Grant], now: datetime | None = None) -> None:
    """Raise on the first thing in the copy that a merge must not take in.

    ``decisions`` rows are (decision_id, pair_id, reviewer, role, label, note, decided_at, …).
    """
    limit = (now or datetime.now(UTC)) + CLOCK_TOLERANCE
    known = " or ".join(roles.ROLES)
    for row in decisions:
        did, name, role, label, at = row[0], row[2], row[3], row[4], row[6]
        if role not in roles.ROLES:
            raise _refuse(path, f"decision {did} by {name} has the role {role!r}, which docket "
                          f"does not know (only {known})")
        if label is not None and label not in LABELS:
            raise _refuse(path, f"decision {did} by {name} has the label {label!r}")
        _check_time(path, f"decision {did} by {name}", at, limit)
    for name, role, _ in reviewers:
        if role not in roles.ROLES:
            raise _refuse(path, f"reviewer {name} has the role {role!r}, which docket does not "
                          f"know (only {known})")
    for g in grants:
        if g.role not in roles.ROLES:
            raise _refuse(path, f"a grant gives {g.name} the role {g.role!r}, which docket "
                          f"does not know (only {known})")
        _check_time(path, f"the grant of {g.role} to {g.name}", g.granted_at, limit)


def read_grants(conn: sqlite3.Connection) -> list[roles.Grant]:
    """A copy's grants (from an older copy: its present roles, see ``roles.grants``)."""
    return roles.grants(conn)


def role_changes(path: Path, reviewers: list[tuple], grants: list[roles.Grant],
                 ours: sqlite3.Connection) -> list[RoleChange]:
    """The copy's grants unknown here, and present roles there that differ from ours."""
    have = {gid for (gid,) in ours.execute("SELECT grant_id FROM role_grants")}
    present = dict(ours.execute("SELECT name, role FROM reviewers").fetchall())
    out = [RoleChange(str(path), g.name, g.role, g.granted_by, g.granted_at, g.grant_id)
           for g in grants if g.grant_id not in have
           and not (g.granted_by == roles.MIGRATED_GRANTOR and present.get(g.name) == g.role)]
    explained = {c.name for c in out}
    for name, role, _ in sorted(reviewers):
        if name not in explained and role != present.get(name, roles.DEFAULT_ROLE):
            out.append(RoleChange(str(path), name, role, "", "", None))
    return out


def accepted_grants(changes: list[RoleChange], stamp: str) -> list[roles.Grant]:
    """The grants to record when the copy's role changes are accepted."""
    out = []
    for c in changes:
        if c.grant_id is not None:
            out.append(roles.Grant(c.grant_id, c.name, c.role, c.granted_by, c.granted_at))
        else:
            import uuid
            out.append(roles.Grant(str(uuid.uuid4()), c.name, c.role,
                                   f"accepted from {Path(c.path).name} in a merge", stamp))
    return out

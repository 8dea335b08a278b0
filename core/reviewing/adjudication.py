"""Adjudication: who may settle a pair, which pairs wait for it, and the settling itself.

An adjudication is a decision in the role 'adjudicator', with its reason stored as the
decision's note, so the log shows how every adjudicated gold label was reached. Which pairs
wait, and what becomes gold, is the policy of ``reviewing.gold``.
"""

from __future__ import annotations

import shlex

from ..errors import DocketError
from ..storage import claims, roles
from ..storage.project_file import ProjectFile
from ..types import LABELS, Decision, Review
from . import gold


def is_adjudicator(project: ProjectFile, name: str) -> bool:
    with project.reading():
        row = project.connection.execute("SELECT role FROM reviewers WHERE name = ?",
                                         (name.strip(),)).fetchone()
    return row is not None and row[0] == "adjudicator"


def require_adjudicator(project: ProjectFile, name: str) -> str:
    if not name.strip():
        raise DocketError("adjudication needs a name; pass --reviewer NAME")
    with project.reading():
        name = roles.as_kept(project.connection, roles.plain_name(name))
    if not is_adjudicator(project, name):
        raise DocketError(f"{name.strip()} is not an adjudicator of {project.path}, and only "
                          "adjudicators may settle pairs; add one with 'docket reviewers "
                          f"{shlex.quote(str(project.path))} add {shlex.quote(name.strip())} "
                          "--role adjudicator'")
    return name


def queue(project: ProjectFile, extra: set[int] | None = None) -> list[tuple[int, str]]:
    """(pair_id, why) for the pairs waiting for an adjudicator; see gold.needs_adjudication."""
    with project.reading():
        return gold.needs_adjudication(project.connection, extra)


def serve(project: ProjectFile, adjudicator: str, waiting: list[int]) -> int | None:
    """Claim and return the first of ``waiting`` that no other adjudicator holds (None when
    they hold them all); this adjudicator's earlier claim ends."""
    with project.transaction() as conn:
        return claims.claim_first_free(conn, adjudicator.strip(), waiting, "adjudicator")


def held_by_others(project: ProjectFile, adjudicator: str) -> set[int]:
    """Waiting pairs that another adjudicator has on screen now."""
    with project.reading():
        if not claims.kept(project.connection):
            return set()
        return claims.held_by_others(project.connection, adjudicator.strip(), "adjudicator")


def release(project: ProjectFile, adjudicator: str) -> None:
    """Give back every pair this adjudicator holds (on quitting)."""
    with project.transaction() as conn:
        claims.release(conn, adjudicator.strip(), None, "adjudicator")


def set_aside_for(project: ProjectFile, adjudicator: str) -> set[int]:
    """Pairs this adjudicator may not settle: under ``independent_adjudication``, those they
    decided as a reviewer; otherwise none (their own label is flagged instead)."""
    with project.reading():
        if not gold.policy(project.connection)["independent_adjudication"]:
            return set()
        return gold.reviewed_by(project.connection, adjudicator.strip())


def reviews_of(project: ProjectFile, pair_id: int, adjudicator: str) -> list[Review]:
    """Every standing label on the pair: reviewers' first, then adjudications; each by time."""
    with project.reading():
        rows = project.connection.execute(
            "SELECT d.reviewer, d.label, d.note, d.decided_at, d.role, ("
            "  SELECT coalesce(sum(s.seconds), 0) FROM decisions s WHERE s.pair_id = d.pair_id "
            "  AND s.reviewer = d.reviewer AND s.role = d.role) "
            "FROM current_labels d WHERE d.pair_id = ? "
            "ORDER BY d.role = 'adjudicator', d.decided_at, d.reviewer", (pair_id,)).fetchall()
    name = adjudicator.strip()
    return [Review(reviewer, label, note or "", float(seconds), decided_at,
                   reviewer == name and role == "reviewer", role)
            for reviewer, label, note, decided_at, role, seconds in rows]


def adjudicate(project: ProjectFile, pair_id: int, adjudicator: str, label: str, reason: str,
               seconds: float = 0.0) -> Decision:
    """Record the final label with its reason; a hold leaves the pair waiting."""
    require_adjudicator(project, adjudicator)
    if label not in LABELS:
        raise DocketError(f"unknown label '{label}'; use one of {', '.join(LABELS)}")
    reason = (reason or "").strip()
    if not reason:
        raise DocketError("an adjudication needs a short reason; say why this label")
    with project.reading():
        exists = project.connection.execute("SELECT 1 FROM pairs WHERE pair_id = ?",
                                            (pair_id,)).fetchone()
    if exists is None:
        raise DocketError(f"no pair {pair_id} in {project.path}")
    if pair_id in set_aside_for(project, adjudicator):
        raise DocketError(f"{adjudicator.strip()} decided pair {pair_id} as a reviewer, and the "
                          "project's policy asks for an independent adjudicator: another "
                          "adjudicator must settle it (docket policy "
                          f"{shlex.quote(str(project.path))} --adjudicator-may-settle-own "
                          "allows it)")
    return project.decide(pair_id, adjudicator.strip(), label, reason, seconds,
                          role="adjudicator")


def undo(project: ProjectFile, adjudicator: str) -> Decision | None:
    """Retract this adjudicator's latest standing adjudication; None when there is none."""
    require_adjudicator(project, adjudicator)
    return project.undo(adjudicator.strip(), role="adjudicator")

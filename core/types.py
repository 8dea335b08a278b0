"""Plain data passed between the core and the front ends.

Everything here is a frozen dataclass of built-in types, so the TUI and the CLI can draw or
serialise it without knowing how the project file is laid out.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field
from typing import Any, Literal

Label = Literal["match", "non-match", "hold"]
LABELS: tuple[str, ...] = ("match", "non-match", "hold")
ROLES: tuple[str, ...] = ("reviewer", "adjudicator")
KINDS: tuple[str, ...] = ("name", "text", "longtext", "code", "number", "date")
Reason = Literal["uncertain", "audit", "overlap", "audit, overlap", "disagreement"]


@dataclass(frozen=True)
class FieldComparison:
    """One compared field of one pair, as the pair card shows it."""

    field: str
    kind: str
    left: str | None  # raw value as read; None when missing
    right: str | None
    similarity: float | None  # None when either side is missing
    level: int  # index into the field's levels
    level_name: str  # "exact", "close", ..., "missing"
    contribution: float  # what this level adds to the log-odds shown (natural log; 0 missing)


@dataclass(frozen=True)
class PairCard:
    """Everything the review screen needs to show one candidate pair."""

    pair_id: int
    left_id: str
    right_id: str
    probability: float
    log_odds: float  # ln(probability / (1 - probability)) = base_log_odds + contributions
    base_log_odds: float  # the ranking model's log-odds before any field is looked at
    reason: str  # why it is in the queue: uncertain, audit, overlap, disagreement, ...
    fields: tuple[FieldComparison, ...]
    left_extra: dict[str, str | None] = field(default_factory=dict)  # columns not compared
    right_extra: dict[str, str | None] = field(default_factory=dict)
    left_candidates: int = 0  # other candidate pairs that name the left record
    right_candidates: int = 0
    link: bool = True  # two tables; False: one table deduplicated, no left or right side
    model: str = "fellegi-sunter"  # the model that ranks the queue and gives these numbers

    @property
    def sides(self) -> tuple[str, str]:
        """What to call the two records: left and right tables, or first and second of one."""
        return ("left", "right") if self.link else ("first", "second")


@dataclass(frozen=True)
class QueueItem:
    pair_id: int
    left_id: str
    right_id: str
    probability: float
    reason: str

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


@dataclass(frozen=True)
class Decision:
    """One row of the append-only decision log.

    A retraction has ``label`` None and ``supersedes`` the decision it takes back.
    """

    decision_id: str
    pair_id: int
    reviewer: str
    label: str | None
    note: str
    decided_at: str
    seconds: float
    supersedes: str | None = None
    role: str = "reviewer"

    @property
    def is_retraction(self) -> bool:
        return self.label is None

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)


@dataclass(frozen=True)
class Progress:
    """How far one reviewer has got."""

    reviewer: str
    decided: int  # pairs this reviewer currently has a label on
    remaining: int  # pairs still in this reviewer's queue
    total_pairs: int


@dataclass(frozen=True)
class FieldSpec:
    """A compared field: its name on each side and its kind."""

    name: str  # the name docket uses (the left column's name)
    left_column: str
    right_column: str
    kind: str
    # values as written ('N/A', 'XX1 1XX') compared as missing: placeholders, not agreement
    missing: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        object.__setattr__(self, "missing", tuple(self.missing))  # a list from JSON

    def to_dict(self) -> dict[str, Any]:
        d = asdict(self)
        if not self.missing:  # as projects and model files without placeholders always were
            del d["missing"]
        return d


@dataclass(frozen=True)
class Review:
    """One standing label on a pair, as the adjudication screen lists it.

    ``seconds`` is all the time this person spent on the pair in that role, retracted
    decisions included. ``own`` flags the adjudicator's own earlier reviewer label, which they
    are then asked to settle. Entries with role 'adjudicator' are standing adjudications: a
    hold that left the pair waiting, or a final label someone may overrule.
    """

    reviewer: str
    label: str
    note: str
    seconds: float
    decided_at: str
    own: bool
    role: str = "reviewer"


@dataclass(frozen=True)
class ClusterConflict:
    """A cluster of gold matches that holds a gold non-match between two of its members."""

    cluster: int
    members: tuple[tuple[str, str], ...]  # (side, record id); side is "" in dedupe mode
    non_match_pairs: tuple[int, ...]  # the gold non-matches inside the cluster
    match_pairs: tuple[int, ...]  # the gold matches that hold the cluster together

    def to_dict(self) -> dict[str, Any]:
        return asdict(self)

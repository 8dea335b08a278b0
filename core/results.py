"""The three reports as typed results: the project's status, an evaluation (of the model or of
a matcher's file) and the agreement report.

The facade returns these; each front end draws one with one function per medium (text, JSON,
screen). ``to_dict`` is the JSON form, key for key and in the order ``docket ... --json`` has
always printed. The sections inside stay JSON-ready dicts and lists; their keys are described
where each report is made (``report.status``, ``quality.evaluate``, ``reviewing.team``).
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields
from typing import Any, Self


def _plain(obj: Any, skip: tuple[str, ...] = ()) -> dict[str, Any]:
    return {f.name: getattr(obj, f.name) for f in fields(obj) if f.name not in skip}


class _Report:
    """The JSON round trip of a report whose fields are its sections, in order."""

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> Self:
        return cls(**d)

    def to_dict(self) -> dict[str, Any]:
        return _plain(self)


@dataclass(frozen=True)
class StatusReport(_Report):
    """``docket status``: records, pairs, decisions, the model, policies, matchers."""

    project: str
    name: str | None
    mode: str
    schema_version: int
    records: dict[str, int]  # left, right
    fields: list[dict[str, Any]]
    pairs: dict[str, int]  # candidates, open, audit, overlap
    blocking: dict[str, Any]
    sampling: dict[str, Any] | None
    decisions: dict[str, Any]  # log_entries, retractions, ..., per_reviewer, per_adjudicator
    model: dict[str, Any]
    settings: dict[str, Any]
    gold_policy: dict[str, Any]
    gold_labels: int
    matchers: list[dict[str, Any]]
    missed_matches: dict[str, Any]
    caution: str


@dataclass(frozen=True)
class Evaluation:
    """``docket evaluate``: design-based precision, recall and F1 from the audit slice.

    ``queue_order`` is set for the project's own model; ``predictions`` and ``machine_rater``
    for a matcher's file. ``more`` keeps, in order, any section a newer estimator adds.
    """

    project: str
    mode: str | None
    confidence: float
    threshold: float
    audit: dict[str, Any]  # drawn, labelled, matches, held, strata
    estimates: list[dict[str, Any]]  # one row per threshold
    at_threshold: dict[str, Any]  # the row at the decision threshold
    naive: list[dict[str, Any]]
    naive_at_threshold: dict[str, Any]
    best_f1: dict[str, Any] | None
    suggested: dict[str, Any] | None
    scope: dict[str, Any]
    methods: Any
    gold_labels: int
    sampling: dict[str, Any] | None
    model: dict[str, Any]
    queue_order: dict[str, Any] | None = None
    predictions: dict[str, Any] | None = None
    machine_rater: dict[str, Any] | None = None
    more: dict[str, Any] = field(default_factory=dict)

    _LATE = ("queue_order", "predictions", "machine_rater")

    @classmethod
    def from_dict(cls, d: dict[str, Any]) -> Self:
        known = {f.name for f in fields(cls)} - {"more"}
        return cls(**{k: v for k, v in d.items() if k in known},
                   more={k: v for k, v in d.items() if k not in known})

    def to_dict(self) -> dict[str, Any]:
        out = _plain(self, ("model", "more", *self._LATE))
        out.update({k: getattr(self, k) for k in self._LATE if getattr(self, k) is not None})
        out["model"] = self.model
        out.update(self.more)
        return out

    @property
    def judges_a_file(self) -> bool:
        """True for a matcher's file given with ``--predictions``."""
        return self.machine_rater is not None


@dataclass(frozen=True)
class AgreementReport(_Report):
    """``docket agreement``: kappa for every two reviewers, Fleiss and Krippendorff overall,
    each reviewer's rates (Dawid-Skene) where identified."""

    project: str
    name: str | None
    include_hold: bool
    categories: list[str]
    conventions: dict[str, str]
    reviewers: dict[str, dict[str, int]]  # name -> labels, holds
    reviewer_pairs: list[dict[str, Any]]
    overall: dict[str, Any]
    dawid_skene: dict[str, Any]
    min_pairs: int

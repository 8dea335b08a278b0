"""What "the label of a pair" is, for each purpose that reads one.

A pair carries standing labels: at most one per reviewer, and adjudications (the latest wins).
Three purposes read them, each by its own rule, on purpose:

- **gold** (exports, evaluation, clusters, ``status``): settled labels only. The latest
  adjudication decides when there is one, and an adjudicator's hold means no gold yet.
  Otherwise the reviewers must be unanimous, at least ``min_reviews`` of them, none on hold.
- **fitting** (the model's refit): the best signal available now. The gold label when there is
  one; otherwise the strict majority of the reviewers' match / non-match labels (a hold
  abstains), and a tie gives none. A pair waiting for adjudication still teaches the model the
  side most of its reviewers took.
- **agreement** (the crowd label that Dawid–Skene's posterior is compared with): the strict
  plurality of the reviewers' labels among the categories compared, hold included when it is
  one of them; a tie gives none.

So a gold label, when there is one, is also the fitting label; and unanimous reviewers give
the same label under all three rules.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Iterable
from dataclasses import dataclass, field


@dataclass
class PairLabels:
    """Every standing label on one pair, by role (adjudications in the order they were made)."""

    pair_id: int
    reviewers: dict[str, str] = field(default_factory=dict)  # reviewer -> label
    adjudicators: dict[str, str] = field(default_factory=dict)


def strict_plurality(votes: Iterable[str]) -> str | None:
    """The label given more often than any other; None for no votes or a tie at the top."""
    top = Counter(votes).most_common(2)
    if not top or (len(top) == 2 and top[0][1] == top[1][1]):
        return None
    return top[0][0]


def latest_adjudication(labels: PairLabels) -> str | None:
    """The adjudication made last (``adjudicators`` is kept in the order they were made)."""
    return list(labels.adjudicators.values())[-1] if labels.adjudicators else None


def gold_label(labels: PairLabels, min_reviews: int = 1) -> tuple[str, str] | None:
    """(label, how) under the gold rule, how being adjudicated, unanimous or single; or None."""
    final = latest_adjudication(labels)
    if final is not None:
        return None if final == "hold" else (final, "adjudicated")
    values = set(labels.reviewers.values())
    if len(labels.reviewers) < min_reviews or len(values) != 1 or "hold" in values:
        return None
    return values.pop(), "unanimous" if len(labels.reviewers) > 1 else "single"


def fitting_label(labels: PairLabels) -> str | None:
    """match / non-match under the fitting rule, or None."""
    gold = gold_label(labels)
    if gold is not None:
        return gold[0]
    return strict_plurality(v for v in labels.reviewers.values() if v != "hold")


def agreement_label(votes: Iterable[str]) -> str | None:
    """The reviewers' crowd label under the agreement rule."""
    return strict_plurality(votes)

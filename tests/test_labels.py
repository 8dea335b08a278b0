"""The label of a pair under each rule (gold, fitting, agreement), as core/reviewing/labels.py
states them; the properties below follow from those statements, not from the code."""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from docket.core.reviewing.labels import (
    PairLabels,
    agreement_label,
    fitting_label,
    gold_label,
    strict_plurality,
)

LABEL = st.sampled_from(["match", "non-match", "hold"])
REVIEWERS = st.dictionaries(st.sampled_from(["ana", "bo", "cy", "di", "ed"]), LABEL, max_size=5)
ADJUDICATIONS = st.lists(LABEL, max_size=3)


def _labels(reviewers: dict[str, str], adjudications: list[str]) -> PairLabels:
    return PairLabels(1, dict(reviewers), {f"adj{i}": a for i, a in enumerate(adjudications)})


@settings(max_examples=300, deadline=None)
@given(REVIEWERS, ADJUDICATIONS)
def test_a_gold_label_is_also_the_fitting_label(reviewers, adjudications) -> None:
    labels = _labels(reviewers, adjudications)
    gold = gold_label(labels)
    if gold is not None:
        assert fitting_label(labels) == gold[0]


@settings(max_examples=300, deadline=None)
@given(st.integers(1, 5), st.sampled_from(["match", "non-match"]))
def test_unanimous_reviewers_give_one_label_under_every_rule(n: int, label: str) -> None:
    labels = _labels({f"r{i}": label for i in range(n)}, [])
    assert gold_label(labels) == (label, "unanimous" if n > 1 else "single")
    assert fitting_label(labels) == label
    assert agreement_label(labels.reviewers.values()) == label


@settings(max_examples=300, deadline=None)
@given(REVIEWERS, ADJUDICATIONS)
def test_the_latest_adjudication_decides_gold(reviewers, adjudications) -> None:
    labels = _labels(reviewers, adjudications)
    if adjudications:
        last = adjudications[-1]
        assert gold_label(labels) == (None if last == "hold" else (last, "adjudicated"))


def test_holds_and_disagreement_never_become_gold_without_an_adjudicator() -> None:
    assert gold_label(_labels({"ana": "match", "bo": "hold"}, [])) is None
    assert gold_label(_labels({"ana": "match", "bo": "non-match"}, [])) is None
    assert gold_label(_labels({"ana": "match"}, []), min_reviews=2) is None


def test_fitting_takes_the_reviewers_strict_majority_while_gold_waits() -> None:
    # two of three say match: not gold (not unanimous), but the model may learn the side taken
    assert fitting_label(_labels({"a": "match", "b": "match", "c": "non-match"}, [])) == "match"
    # a hold abstains; a tie teaches nothing
    assert fitting_label(_labels({"a": "match", "b": "hold"}, [])) == "match"
    assert fitting_label(_labels({"a": "match", "b": "non-match"}, [])) is None
    # an adjudicator's hold leaves the reviewers' majority in place for fitting
    assert fitting_label(_labels({"a": "non-match"}, ["hold"])) == "non-match"


def test_agreement_counts_hold_as_a_category() -> None:
    assert agreement_label(["hold", "hold", "match"]) == "hold"
    assert strict_plurality([]) is None
    assert strict_plurality(["match", "non-match"]) is None


def test_the_model_learns_only_from_adjudications_that_settle(sample_project) -> None:
    # An "adjudication" by someone who never held the role settles nothing for gold; the
    # model must not learn from it either (the same rule reads both).
    from docket.core import Project
    from docket.core.reviewing.gold import fitting_labels

    with Project.open(sample_project) as p:
        pid = p.next_pairs("ana")[0].pair_id
        p.decide(pid, "ana", "match")
        p.decide(pid, "mallory", "non-match", role="adjudicator")
        assert fitting_labels(p.connection)[pid] == 1
        assert all(g.pair_id != pid or g.label == "match" for g in p.gold_labels())

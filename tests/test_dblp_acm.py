"""Outside check on the open DBLP-ACM benchmark (Köpcke, Thor & Rahm, PVLDB 3(1), 2010; see
../shared/data/dblp-acm/SOURCE.md). Truth is the published matches.csv."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.core import Project
from tests.quality import answer_in_queue_order, load_truth, measure

pytestmark = pytest.mark.outside


@pytest.fixture(scope="module")
def truth(dblp_acm: Path) -> set[tuple[str, str]]:
    return load_truth(dblp_acm / "matches.csv", "dblp_id", "acm_id")


# The projects are built once per session with the defaults (conftest: dblp_project_file,
# dblp11_project_file for --one-to-one); a test that labels works on its own copy.
def test_automatic_blocking_keeps_matches_and_cuts_pairs(dblp_project_file: Path, truth) -> None:
    with Project.open(dblp_project_file, readonly=True) as project:
        m = measure(project, truth)
        possible = project.meta["blocking"]["possible"]
    assert m["blocking_recall"] >= 0.995
    assert m["pairs"] <= 0.05 * possible


def test_unsupervised_f1_with_one_to_one(dblp11_project_file: Path, truth) -> None:
    # Both sources list each paper once, which is what --one-to-one is for. Without it the
    # label-free model reaches F1 0.86 here (fields are not independent: a journal and a
    # conference version of one paper agree on title and authors).
    with Project.open(dblp11_project_file, readonly=True) as project:
        assert measure(project, truth)["f1"] >= 0.90


def test_two_hundred_queue_labels_then_refit(dblp_project: Path, truth) -> None:
    with Project.open(dblp_project) as project:
        answer_in_queue_order(project, truth, 200)
        assert measure(project, truth)["f1"] >= 0.95

"""Outside check on the open DBLP-ACM benchmark (Köpcke, Thor & Rahm, PVLDB 3(1), 2010; see
../shared/data/dblp-acm/SOURCE.md). Truth is the published matches.csv."""

from __future__ import annotations

from pathlib import Path

import pytest

from docket.core import NewProject, Project
from tests.quality import answer_in_queue_order, load_truth, measure

pytestmark = pytest.mark.outside


def build(folder: Path, tmp: Path, one_to_one: bool) -> Project:
    path = tmp / ("dblp11.docket" if one_to_one else "dblp.docket")
    Project.create(NewProject(path=path, left=folder / "dblp.csv", right=folder / "acm.csv",
                              id_column="id", one_to_one=one_to_one))
    return Project.open(path)


@pytest.fixture(scope="module")
def truth(dblp_acm: Path) -> set[tuple[str, str]]:
    return load_truth(dblp_acm / "matches.csv", "dblp_id", "acm_id")


def test_automatic_blocking_keeps_matches_and_cuts_pairs(dblp_acm: Path, truth, tmp_path) -> None:
    with build(dblp_acm, tmp_path, one_to_one=False) as project:
        m = measure(project, truth)
        possible = project.meta["blocking"]["possible"]
    assert m["blocking_recall"] >= 0.995
    assert m["pairs"] <= 0.05 * possible


def test_unsupervised_f1_with_one_to_one(dblp_acm: Path, truth, tmp_path) -> None:
    # Both sources list each paper once, which is what --one-to-one is for. Without it the
    # label-free model reaches F1 0.86 here (fields are not independent: a journal and a
    # conference version of one paper agree on title and authors).
    with build(dblp_acm, tmp_path, one_to_one=True) as project:
        assert measure(project, truth)["f1"] >= 0.90


def test_two_hundred_queue_labels_then_refit(dblp_acm: Path, truth, tmp_path) -> None:
    with build(dblp_acm, tmp_path, one_to_one=False) as project:
        answer_in_queue_order(project, truth, 200)
        assert measure(project, truth)["f1"] >= 0.95

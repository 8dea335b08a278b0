"""Regression guard on the invented sample's truth file (not an outside check)."""

from __future__ import annotations

from pathlib import Path

from docket.core import Project
from tests.conftest import SAMPLE, sample_spec
from tests.quality import answer_in_queue_order, load_truth, measure

TRUTH = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")


def test_sample_blocking_and_unsupervised(sample_project_file: Path, tmp_path: Path) -> None:
    with Project.open(sample_project_file, readonly=True) as project:
        m = measure(project, TRUTH)
        possible = project.meta["blocking"]["possible"]
    assert m["blocking_recall"] >= 0.995 and m["pairs"] <= 0.05 * possible
    path = tmp_path / "one.docket"
    Project.create(sample_spec(path, one_to_one=True))
    with Project.open(path) as project:
        assert measure(project, TRUTH)["f1"] >= 0.90


def test_sample_after_two_hundred_labels(sample_project: Path) -> None:
    with Project.open(sample_project) as project:
        answer_in_queue_order(project, TRUTH, 200)
        assert measure(project, TRUTH)["f1"] >= 0.95

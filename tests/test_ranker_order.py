"""The logistic ranker reads the way the levels are named, as the Fellegi–Sunter model does:
after a refit on queue-order labels, a better level never adds less than a worse one and exact
agreement is never evidence against a match."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from docket.core import Project
from docket.core.matching.logistic import fit_logistic, ordered_bounds
from tests.conftest import SAMPLE
from tests.quality import answer_in_queue_order, load_truth


def assert_ranker_ordered(project: Project) -> None:
    table = project.meta["explain"]
    assert table["model"] == "logistic"
    names = project.meta["fs_model"]["level_names"]
    for field, levels, part in zip(project.meta["fs_model"]["fields"], names, table["parts"],
                                   strict=True):
        present = np.asarray(part[:-1])  # missing, last, is its own state: not ordered
        # Common practice (ordered comparison levels): a better level never weighs less than a
        # worse one, and exact agreement is never evidence against a match.
        assert np.all(np.diff(present) <= 1e-9), (field, dict(zip(levels, part, strict=True)))
        assert present[0] >= -1e-9, (field, present)


def test_ranker_levels_in_order_after_queue_labels_on_the_sample(sample_project: Path) -> None:
    # Unbounded, 400 queue-order labels taught it 'town exact ÷6.3, different ÷1.8': labels
    # near the threshold are households, whose members share a town and are not one client.
    truth = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")
    with Project.open(sample_project) as project:
        answer_in_queue_order(project, truth, 400, refit_every=100)
        assert_ranker_ordered(project)


@pytest.mark.outside
def test_ranker_levels_in_order_after_queue_labels_on_dblp_acm(dblp_acm: Path,
                                                               dblp_project: Path) -> None:
    # DBLP-ACM (Köpcke, Thor & Rahm, PVLDB 3(1), 2010), truth from its matches.csv
    truth = load_truth(dblp_acm / "matches.csv", "dblp_id", "acm_id")
    with Project.open(dblp_project) as project:
        answer_in_queue_order(project, truth, 200, refit_every=100)
        assert_ranker_ordered(project)


def test_ordered_bounds_follow_the_columns_of_one_hot() -> None:
    # one_hot's layout: bias, FS log-odds, then per field of k levels k - 2 steps and missing
    assert ordered_bounds([4, 2]) == [(None, None), (0.0, None), (0.0, None), (0.0, None),
                                      (None, None), (None, None)]


def test_bounded_fit_is_newtons_where_no_bound_holds() -> None:
    # Two solvers of one convex objective (numpy Newton; scipy's L-BFGS-B) meet at its minimum.
    rng = np.random.default_rng(7)
    x = np.column_stack([np.ones(300), rng.normal(size=(300, 4))])
    y = (rng.random(300) < 1 / (1 + np.exp(-(x @ [0.3, 1.0, -0.5, 0.8, 0.0])))).astype(float)
    newton = fit_logistic(x, y).coef
    free = fit_logistic(x, y, bounds=[(None, None)] * 5).coef
    assert free == pytest.approx(newton, abs=1e-5)
    held = fit_logistic(x, y, bounds=[(None, None), (None, None), (0.0, None), (None, None),
                                      (None, None)]).coef
    assert held[2] == pytest.approx(0.0, abs=1e-9)  # its unbounded value is negative

"""Evaluate reading less (record ids only for one-to-one, scores read once for the quality
screen, sorted scores not sorted again) gives the figures it gave."""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import numpy as np
import pandas as pd

from docket.core import Project
from docket.core.matching.decision_rule import predicted
from docket.core.quality.audit_data import audit_sample, model_scores
from docket.core.quality.evaluate import evaluate
from docket.core.storage import store
from docket.core.storage.refit import audit_scores
from docket.tui.screens.quality_data import CURVE, load_quality
from tests.conftest import SAMPLE
from tests.matchers_support import answer_audit
from tests.quality import answer_in_queue_order, load_truth

TRUTH = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")


def _scores_as_before(project: Project) -> pd.Series:
    """model_scores as it read every pair's record ids, whatever the rule."""
    frame = pd.read_sql_query(
        "SELECT p.pair_id, p.left_id, p.right_id, t.probability FROM pairs p "
        "JOIN patterns t ON t.pattern_id = p.pattern_id", project.connection)
    crossed = audit_scores(project.meta)
    if crossed:
        frame["probability"] = frame["pair_id"].map(crossed).fillna(frame["probability"])
    score = frame["probability"].to_numpy(dtype=float)
    if project.meta.get("one_to_one"):
        score = np.where(predicted(frame, 0.0, True), score, 0.0)
    return pd.Series(score, index=frame["pair_id"].to_numpy())


def test_scores_and_figures_are_those_read_before(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        answer_in_queue_order(p, TRUTH, 60, refit_every=1000, reviewer="maya")
        answer_audit(p, TRUTH)
        for one_to_one in (False, True):
            with p.transaction() as conn:
                store.set_meta(conn, one_to_one=one_to_one)
            pd.testing.assert_series_equal(model_scores(p), _scores_as_before(p))
        with p.transaction() as conn:
            store.set_meta(conn, one_to_one=False)
        data = load_quality(p)
        assert data.report is not None and data.curve is not None
        assert data.report.to_dict() == p.evaluate().to_dict()
        assert data.curve.to_dict() == p.evaluate(thresholds=CURVE).to_dict()
        assert evaluate(p, scores=model_scores(p)) == evaluate(p)


def test_a_population_sorted_already_is_kept_and_an_unsorted_one_sorted(
        sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        answer_audit(p, TRUTH)
        sample = audit_sample(p)
    assert sample.population is not None
    rng = np.random.default_rng(3)  # seeded shuffle
    shuffled = {h: rng.permutation(v) for h, v in sample.population.items()}
    again = replace(sample, population=shuffled)
    assert again.population is not None
    for h, v in sample.population.items():
        assert np.array_equal(again.population[h], v)
        assert np.array_equal(v, np.sort(v))
    held = sample.with_held(np.zeros(sample.n_held, dtype=np.int8))
    assert held.population is not None
    assert all(held.population[h] is v for h, v in sample.population.items())

"""A matcher's rows found by one hash join give the scores the pandas index of every pair gave."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import NewProject, Project
from docket.core.quality.predictions_file import read_predictions
from tests.conftest import SAMPLE


def _as_before(project: Project, frame: pd.DataFrame) -> pd.Series:
    """read_predictions' lookup as it was: every pair in a pandas index of its two ids."""
    pairs = pd.read_sql_query("SELECT pair_id, left_id, right_id FROM pairs", project.connection)
    keyed = pairs.set_index(["left_id", "right_id"])["pair_id"]
    a, b = frame["left_id"].to_numpy(), frame["right_id"].to_numpy()
    found = keyed.reindex(pd.MultiIndex.from_arrays([a, b])).to_numpy(dtype=float)
    if not project.link:
        swapped = keyed.reindex(pd.MultiIndex.from_arrays([b, a])).to_numpy(dtype=float)
        found = np.where(np.isnan(found), swapped, found)
    inside = ~np.isnan(found)
    score = frame["score"].to_numpy(dtype=float)
    given = pd.Series(score[inside], index=found[inside].astype(np.int64))
    floor = min(0.0, float(score.min())) - 1.0
    return given.reindex(pairs["pair_id"].to_numpy()).fillna(floor)


@pytest.mark.parametrize("link", [True, False])
def test_scores_found_as_the_index_of_every_pair_found_them(sample_project: Path,
                                                            tmp_path: Path, link: bool) -> None:
    path = sample_project
    if not link:  # one table: rows name a pair either way round
        path = tmp_path / "one.docket"
        Project.create(NewProject(path=path, left=SAMPLE / "practice_north.csv",
                                  left_id="client_id"))
    with Project.open(path) as p:
        pairs = pd.read_sql_query("SELECT left_id, right_id FROM pairs", p.connection)
        rng = np.random.default_rng(4)  # seeded: which pairs, which way round, their scores
        rows = pairs.sample(frac=0.6, random_state=4).reset_index(drop=True)
        if not link:
            turn = rng.random(len(rows)) < 0.5
            rows.loc[turn, ["left_id", "right_id"]] = rows.loc[turn, ["right_id",
                                                                      "left_id"]].to_numpy()
        # pairs of known records that are no candidates: counted, left out
        outside = pd.DataFrame({"left_id": rows["left_id"].to_numpy()[:30],
                                "right_id": rows["right_id"].to_numpy()[::-1][:30]})
        frame = pd.concat([rows, outside]).drop_duplicates(["left_id", "right_id"])
        frame["score"] = rng.random(len(frame)).round(6)
        source = tmp_path / "m.csv"
        frame.to_csv(source, index=False)
        full, info = read_predictions(p, source)
        before = _as_before(p, pd.read_csv(source, dtype={"left_id": str, "right_id": str}))
        pd.testing.assert_series_equal(full, before)
        assert info["candidate_pairs_given"] + info["outside_candidates"] == len(frame)
        assert info["absent_count_as_non_match"] == len(pairs) - info["candidate_pairs_given"]

"""Scores written with a decimal comma beside semicolons, as a spreadsheet saves them in many
European locales ('0,87', and '0' or '1' without one): they were refused as not numbers."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import Project
from docket.core.matchers.catalogue import load_scores
from docket.core.quality.predictions_file import read_predictions
from docket.core.records.decimal_commas import written_so
from docket.tui.cli import main


def _scores(project: Path, path: Path, how: str) -> Path:
    with Project.open(project, readonly=True) as p:
        pairs = pd.read_sql_query("SELECT left_id, right_id FROM pairs ORDER BY pair_id "
                                  "LIMIT 400", p.connection)
    values = [(k % 11) / 10 for k in range(len(pairs))]
    written = [f"{v:.2f}".replace(".", ",") if how == "commas" else f"{v:.2f}" for v in values]
    written = [{"0,00": "0", "1,00": "1"}.get(w, w) for w in written]  # whole numbers bare
    pairs.assign(score=written).to_csv(path, sep=";", index=False)
    return path


@pytest.mark.filterwarnings("ignore:.*separated by semicolons")
def test_decimal_commas_read_as_their_decimal_points(sample_project: Path,
                                                     tmp_path: Path) -> None:
    # a matcher file split by semicolons with decimal points was read as one column too
    commas = _scores(sample_project, tmp_path / "rater.csv", "commas")
    points = _scores(sample_project, tmp_path / "points.csv", "points")
    with Project.open(sample_project, readonly=True) as p:  # as evaluate and supplement read
        pd.testing.assert_series_equal(read_predictions(p, commas)[0],
                                       read_predictions(p, points)[0])
    assert main(["matchers", str(sample_project), "import", str(commas), str(points)]) == 0
    with Project.open(sample_project, readonly=True) as p:
        stored = load_scores(p.connection)
    np.testing.assert_array_equal(stored["rater"], stored["points"])


@pytest.mark.parametrize("values, read", [
    (["0,87", "1", "0", None, " "], True),
    (["0", "1"], False),  # no comma: plain numbers
    (["1,000.5"], False), (["0,5", "x"], False), (["1,2,3"], False), (["0.5", "0,5"], False),
])
def test_a_column_is_read_with_decimal_commas_only_when_all_of_it_is(values: list[object],
                                                                     read: bool) -> None:
    assert written_so(values) is read

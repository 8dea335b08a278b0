"""The scores export written a part at a time is the file the whole frame made."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from docket.core import Project
from docket.core.exports import scores_export
from docket.core.exports.exporting import scores_frame, write_frame
from docket.core.storage import store


@pytest.mark.parametrize("one_to_one", [False, True])
def test_parts_write_what_the_whole_frame_wrote(sample_project: Path, tmp_path: Path,
                                                monkeypatch: pytest.MonkeyPatch,
                                                one_to_one: bool) -> None:
    with Project.open(sample_project) as p:
        if one_to_one:  # predictions that depend on other pairs than the part's
            with p.transaction() as conn:
                store.set_meta(conn, one_to_one=True)
    real = scores_export.score_parts
    # parts of 997 pairs: many parts, the last one short
    monkeypatch.setattr(scores_export, "score_parts", lambda project: real(project, 997))
    with Project.open(sample_project) as p:
        whole = scores_frame(p)
        assert len(whole) > 3 * 997
        for name in ("s.csv", "s.jsonl", "s.parquet"):
            write_frame(whole, str(tmp_path / f"whole_{name}"))
            assert scores_export.write_scores(p, str(tmp_path / name), None) == len(whole)
        for name in ("s.csv", "s.jsonl"):
            assert (tmp_path / name).read_bytes() == (tmp_path / f"whole_{name}").read_bytes()
        pd.testing.assert_frame_equal(pd.read_parquet(tmp_path / "s.parquet"),
                                      pd.read_parquet(tmp_path / "whole_s.parquet"))
        if one_to_one:
            assert (whole["predicted"] == "match").sum() < (whole["probability"]
                                                            >= p.threshold).sum()


def test_numbers_formatted_once_each_are_the_text_pandas_wrote() -> None:
    from docket.core.exports.exporting import csv_text, guarded
    rng = np.random.default_rng(9)  # seeded values, many repeated, beside awkward ones
    awkward = [np.nan, -0.0, 0.0, np.inf, -np.inf, 1e-300, 0.1 + 0.2, 1e22, 3.0, -2.5, 5e-324]
    values = np.concatenate([rng.choice(rng.random(40), 500), awkward])
    frame = pd.DataFrame({"id": np.arange(values.size), "a": values, "b": values[::-1] * -7,
                          "text": ["-1", "=x", "plain"] * (values.size // 3) + ["x"] * (
                              values.size % 3), "small": values.astype(np.float32)})
    for guard in (True, False):
        before = (guarded(frame) if guard else frame).to_csv(index=False,
                                                            lineterminator="\r\n")
        assert csv_text(frame, guard) == before

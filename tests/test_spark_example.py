"""DEVELOPERS.md's Spark example: the scoring function through ``mapInPandas`` on a local session.

PySpark (and a Java runtime) are not docket's dependencies, not even for tests: where they are
missing this module is skipped with the reason.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pandas as pd
import pytest

from docket.core import Project
from docket.core.exports.score_all import make_job
from docket.core.matching.model_file import ScoringModel, from_meta
from docket.core.records.sources import load_table
from tests.conftest import SAMPLE

pyspark = pytest.importorskip("pyspark", reason="PySpark is not installed (pip install pyspark)")
if shutil.which("java") is None:
    pytest.skip("Spark needs a Java runtime", allow_module_level=True)


def test_map_in_pandas_scores_as_the_project_does(sample_project_file: Path,
                                                  tmp_path: Path) -> None:
    from pyspark.sql import SparkSession

    with Project.open(sample_project_file, readonly=True) as p:
        (tmp_path / "model.json").write_text(json.dumps(from_meta(p.meta).to_dict()),
                                             encoding="utf-8")
        with p.reading() as conn:
            expected = pd.read_sql_query(
                "SELECT p.left_id, p.right_id, t.probability FROM pairs p JOIN patterns t "
                "USING (pattern_id)", conn)
    expected[["left_id", "right_id"]].to_parquet(tmp_path / "pairs.parquet", index=False)
    spark = (SparkSession.builder.master("local[2]").appName("docket-example")
             .config("spark.ui.enabled", "false").getOrCreate())
    try:
        # -- as in DEVELOPERS.md ------------------------------------------------------------
        model = ScoringModel.load(tmp_path / "model.json")
        job = make_job(model, load_table(SAMPLE / "practice_north.csv", "client_id"),
                       load_table(SAMPLE / "practice_south.csv", "ref"), "pairs")
        shared = spark.sparkContext.broadcast(job)
        scored = spark.read.parquet(str(tmp_path / "pairs.parquet")).mapInPandas(
            lambda frames: (shared.value(f) for f in frames),
            schema="left_id string, right_id string, log_odds double, probability double, "
                   "predicted boolean")
        scored.write.parquet(str(tmp_path / "scored"))
        # ---------------------------------------------------------------------------------
    finally:
        spark.stop()
    got = pd.read_parquet(tmp_path / "scored")
    both = expected.merge(got, on=["left_id", "right_id"], suffixes=("", "_spark"))
    assert len(both) == len(expected) == len(got)
    assert (both["probability"] - both["probability_spark"]).abs().max() < 1e-12

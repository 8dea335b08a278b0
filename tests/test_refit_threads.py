"""A refit with BLAS on one thread fits what it fitted on the machine's threads."""

from __future__ import annotations

import contextlib
import shutil
import sqlite3
from pathlib import Path

import pytest
from threadpoolctl import threadpool_info

from docket.core import Project
from docket.core.storage import refit
from tests.conftest import SAMPLE
from tests.quality import answer_in_queue_order, load_truth

TRUTH = load_truth(SAMPLE / "truth.csv", "left_id", "right_id")


def _fitted(path: Path) -> tuple[list, list]:
    with contextlib.closing(sqlite3.connect(path)) as conn:
        return (conn.execute("SELECT * FROM patterns ORDER BY pattern_id").fetchall(),
                conn.execute("SELECT value FROM meta WHERE key IN ('explain', 'fs_model', "
                             "'audit_scores', 'ranker') ORDER BY key").fetchall())


def test_one_blas_thread_fits_the_same_model(sample_project: Path, tmp_path: Path,
                                             monkeypatch: pytest.MonkeyPatch) -> None:
    with Project.open(sample_project) as p:
        answer_in_queue_order(p, TRUTH, 300, refit_every=10 ** 6, reviewer="maya")
    other = tmp_path / "other.docket"
    shutil.copy(sample_project, other)
    with Project.open(sample_project) as p:
        with refit.one_blas_thread():  # the limit is in force while it fits
            assert all(i["num_threads"] == 1 for i in threadpool_info()
                       if i["user_api"] == "blas")
        assert p.refit().ranker == "logistic"  # the ranker's fits, where the time went
    monkeypatch.setattr(refit, "one_blas_thread", contextlib.nullcontext)
    with Project.open(other) as q:
        q.refit()
    assert _fitted(sample_project) == _fitted(other)

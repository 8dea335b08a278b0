"""A refit with BLAS on one thread fits what it fitted on the machine's threads."""

from __future__ import annotations

import contextlib
import json
import math
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
    # the same to the bit on the newest BLAS; an older one sums a product's parts in another
    # order on several threads, so the last bits of a float may differ (the floors' run)
    assert _close(_fitted(sample_project), _fitted(other))


def _close(a: object, b: object) -> bool:
    """Equal, floats within 1e-9 relative, JSON text read as its values."""
    if isinstance(a, str) and isinstance(b, str) and a[:1] in "[{" and b[:1] in "[{":
        a, b = json.loads(a), json.loads(b)
    if isinstance(a, float) or isinstance(b, float):
        return isinstance(a, int | float) and isinstance(b, int | float) and \
            math.isclose(a, b, rel_tol=1e-9, abs_tol=1e-12)
    if isinstance(a, dict) and isinstance(b, dict):
        return a.keys() == b.keys() and all(_close(a[k], b[k]) for k in a)
    if isinstance(a, list | tuple) and isinstance(b, list | tuple):
        return len(a) == len(b) and all(_close(x, y) for x, y in zip(a, b, strict=True))
    return a == b

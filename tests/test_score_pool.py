"""Comparing pairs on several processes gives the same project, byte for byte, as one process."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.matching import compare
from docket.core.ordering import sampling
from docket.core.storage import score_pool
from tests.conftest import sample_spec


def _tables(path: Path) -> tuple[list[tuple], list[tuple]]:
    with sqlite3.connect(path) as conn:
        pairs = conn.execute("SELECT * FROM pairs ORDER BY pair_id").fetchall()
        patterns = conn.execute("SELECT * FROM patterns ORDER BY pattern_id").fetchall()
    return pairs, patterns


@pytest.fixture
def pooled(monkeypatch: pytest.MonkeyPatch) -> None:
    """A pool for the sample's 25,000 pairs, in chunks small enough that there are many."""
    if not score_pool.can_fork():
        pytest.skip("processes are not forked on this platform: one process scores")
    monkeypatch.setattr(score_pool, "POOL_FROM", 0)
    monkeypatch.setattr(score_pool, "TASK", 3_000)


def test_two_processes_build_the_same_file_as_one(pooled: None, sample_project_file: Path,
                                                  tmp_path: Path) -> None:
    assert score_pool.workers_for(25_000, 2) == 2
    Project.create(sample_spec(tmp_path / "pool.docket", workers=2))
    assert _tables(tmp_path / "pool.docket") == _tables(sample_project_file)


def test_a_sampled_build_keeps_the_similarities_it_compared(
        pooled: None, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # the pool holds the similarities of low-hash pairs and compares the other kept pairs
    # again; one process holding none compares every kept pair again: the same file
    Project.create(sample_spec(tmp_path / "held.docket", workers=2, sample_above=2_000))
    held = sampling.held_for(25_000, 2_000, 0)
    assert 0 < held.below < 1
    monkeypatch.setattr(sampling, "held_for", lambda *a: sampling.Held())
    Project.create(sample_spec(tmp_path / "again.docket", workers=1, sample_above=2_000))
    pairs, patterns = _tables(tmp_path / "held.docket")
    assert len(pairs) == 2_000
    assert (pairs, patterns) == _tables(tmp_path / "again.docket")


def test_workers_and_dask_tasks_ask_rapidfuzz_for_one_thread(monkeypatch) -> None:
    monkeypatch.setitem(compare._THREADS, "workers", -1)
    with compare.one_thread():
        assert compare._THREADS["workers"] == 1
    assert compare._THREADS["workers"] == -1  # restored for the rest of the process
    monkeypatch.setattr(score_pool.signal, "signal", lambda *a: None)
    score_pool._start_worker()  # what each forked scoring worker runs first
    assert compare._THREADS["workers"] == 1

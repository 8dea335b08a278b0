"""``--engine dask`` gives the same pairs, levels and probabilities as the in-process path."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from docket.core import NewProject, Project
from tests.conftest import sample_spec
from tests.test_bad_input import assert_one_line_error, run
from tests.test_stream_pairs import _pairs, _parts, _spec

distributed = pytest.importorskip("distributed", reason="the optional extra docket[dask] is "
                                  "not installed: pip install 'docket[dask]'")


@pytest.fixture
def scheduler(dask_scheduler: str) -> str:
    return dask_scheduler


def rows(path: Path) -> list[tuple]:
    with sqlite3.connect(path) as conn:
        return sorted(conn.execute(
            "SELECT p.pair_id, p.left_id, p.right_id, p.rule, p.audit, t.levels, t.probability "
            "FROM pairs p JOIN patterns t USING (pattern_id)"))


def test_sample_on_dask_matches_in_process(sample_project_file: Path, tmp_path: Path,
                                           scheduler: str) -> None:
    path = tmp_path / "dask.docket"
    built = Project.create(sample_spec(path, engine="dask", scheduler=scheduler))
    assert rows(path) == rows(sample_project_file)
    with Project.open(sample_project_file) as p:
        assert built.blocking.per_rule == p.meta["blocking"]["per_rule"]


@pytest.mark.outside
def test_dblp_acm_on_a_local_cluster_matches_in_process(dblp_acm: Path, dblp_project_file: Path,
                                                        tmp_path: Path, scheduler: str) -> None:
    # Outside data: DBLP-ACM benchmark, Köpcke, Thor & Rahm PVLDB 2010 (../shared/data).
    # The in-process side is the session's DBLP-ACM project, built with the same defaults.
    Project.create(NewProject(path=tmp_path / "b.docket", left=dblp_acm / "dblp.csv",
                              right=dblp_acm / "acm.csv", id_column="id", engine="dask",
                              scheduler=scheduler))  # the session's 2-worker local cluster
    a, b = rows(dblp_project_file), rows(tmp_path / "b.docket")
    assert len(a) > 10_000 and a == b


def test_sampled_parquet_parts_keep_the_same_sample(tmp_path: Path, scheduler: str) -> None:
    folder = _parts(_pairs(60), tmp_path / "pairs", 5)
    Project.create(_spec(tmp_path / "a.docket", folder, sample_above=400))
    Project.create(_spec(tmp_path / "b.docket", folder, sample_above=400, engine="dask",
                         scheduler=scheduler))
    a, b = rows(tmp_path / "a.docket"), rows(tmp_path / "b.docket")
    assert len(a) == 400 and a == b


def test_unknown_id_in_a_part_on_dask(tmp_path: Path, scheduler: str, capsys) -> None:
    frame = _pairs(10)
    frame.loc[3, "left_id"] = "N-nope"
    folder = _parts(frame, tmp_path / "pairs", 2)
    sample = Path(__file__).resolve().parent.parent / "sample"
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left",
                    str(sample / "practice_north.csv"), "--right",
                    str(sample / "practice_south.csv"), "--left-id", "client_id",
                    "--right-id", "ref", "--map", "owner=owner_name", "--map",
                    "born=date_of_birth", "--pairs", str(folder), "--engine", "dask",
                    "--scheduler", scheduler)
    assert_one_line_error(code, err, "N-nope")
    assert [p.name for p in tmp_path.iterdir() if "docket" in p.name] == []


def test_a_file_of_self_pairs_only_on_dask_is_named_so(tmp_path: Path, scheduler: str,
                                                       capsys) -> None:
    from tests.test_spilled_pairs import _self_pairs
    table, pairs = _self_pairs(tmp_path)
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(table), "--id",
                    "id", "--pairs", str(pairs), "--engine", "dask", "--scheduler", scheduler)
    assert_one_line_error(code, err, f"{pairs}: holds no pair of two different records")
    assert "blocking" not in err
    assert [p.name for p in tmp_path.iterdir() if "docket" in p.name] == []


def test_a_local_cluster_leaves_a_failed_task_to_the_commands_one_line(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # the worker logged 'Compute Failed' and the task's traceback (8 lines) on standard error
    # before docket's own line naming the ids a pairs part got wrong
    import logging

    from docket.core.storage import dask_engine
    seen: dict[str, object] = {}

    class Cluster:
        def __init__(self, **options: object) -> None:
            seen.update(options)

    monkeypatch.setattr(distributed, "LocalCluster", Cluster)
    monkeypatch.setattr(distributed, "Client", lambda cluster: "client")
    client, _cluster = dask_engine.connect(2, None)
    assert client == "client"
    assert seen["silence_logs"] == logging.CRITICAL


def test_the_local_clusters_workers_start_writing_nowhere_and_no_gc_callback_is_left(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # the terminal sends Ctrl-C to every process of the command: each worker printed
    # tracebacks (up to 99 lines) before docket's 'interrupted'; and the scheduler's garbage
    # collection callback swallowed a KeyboardInterrupt raised in it, so a 'new --force' went
    # on and replaced the project
    import os

    from distributed import gc as dask_gc

    from docket.core.storage import dask_engine
    during: list[bool] = []

    class Cluster:
        def __init__(self, **_options: object) -> None:
            # what a spawned worker inherits as its standard error
            during.append(os.path.samestat(os.fstat(2), os.stat(os.devnull)))
            dask_gc.enable_gc_diagnosis()  # as the scheduler does when it starts

    monkeypatch.setattr(distributed, "LocalCluster", Cluster)
    monkeypatch.setattr(distributed, "Client", lambda cluster: "client")
    before = os.fstat(2)
    dask_engine.connect(2, None)
    assert during == [True]
    assert os.path.samestat(os.fstat(2), before)
    assert not dask_gc._gc_diagnosis.enabled


def test_a_cluster_cut_short_in_its_start_is_not_closed_again_at_exit(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # distributed's exit hook failed on the half-made cluster: 'AssertionError: Status.init'
    # and its traceback after 'interrupted by SIGTERM'
    from distributed.deploy.spec import SpecCluster

    from docket.core.storage import dask_engine
    made: list[object] = []

    class Cluster:
        shutdown_on_close = True

        def __init__(self, **_options: object) -> None:
            made.append(self)
            SpecCluster._instances.add(self)  # type: ignore[arg-type]
            raise KeyboardInterrupt  # the signal, half way through the start

        def close(self, timeout: float | None = None) -> None:
            raise AssertionError("Status.init")

    class Theirs:  # a cluster the process held before: closing it broke the suite's own
        shutdown_on_close = True
        closed = False

        def close(self, timeout: float | None = None) -> None:
            self.closed = True

    theirs = Theirs()
    SpecCluster._instances.add(theirs)  # type: ignore[arg-type]
    monkeypatch.setattr(distributed, "LocalCluster", Cluster)
    with pytest.raises(KeyboardInterrupt):
        dask_engine.connect(2, None)
    (cluster,) = made
    assert cluster.shutdown_on_close is False  # type: ignore[attr-defined]
    assert not theirs.closed and theirs.shutdown_on_close
    SpecCluster._instances.discard(cluster)  # type: ignore[arg-type]
    SpecCluster._instances.discard(theirs)  # type: ignore[arg-type]

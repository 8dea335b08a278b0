"""Shared fixtures: the outside benchmark's location and small projects built once per session."""

from __future__ import annotations

import os
import shutil
from collections.abc import Iterator
from pathlib import Path

import pytest

from docket.core import NewProject, Project

# The fixtures shared by several test files live beside their helpers; registered here, a test
# names them as arguments and imports only the helpers.
pytest_plugins = ["tests.fixtures_review", "tests.screens_support", "tests.gold_fixtures",
                  "tests.odd_data"]

REPO = Path(__file__).resolve().parent.parent
SAMPLE = REPO / "sample"


def pytest_collection_modifyitems(items: list[pytest.Item]) -> None:
    # Snapshots are exact to one Textual release, so the run on the declared minimum versions
    # leaves them out with -m "not snapshot"; every other test runs on both.
    for item in items:
        if "snap_compare" in getattr(item, "fixturenames", ()):
            item.add_marker(pytest.mark.snapshot)


def data_dir() -> Path:
    return Path(os.environ.get("DOCKET_DATA", REPO.parent / "shared" / "data"))


@pytest.fixture(scope="session")
def dblp_acm() -> Path:
    """The DBLP-ACM benchmark (outside data, never copied into the repository)."""
    folder = data_dir() / "dblp-acm"
    if not (folder / "matches.csv").exists():
        pytest.skip(f"outside data absent: set DOCKET_DATA to the folder holding dblp-acm/ "
                    f"(looked in {folder})")
    return folder


def sample_spec(path: Path, **kw) -> NewProject:
    return NewProject(path=path, left=SAMPLE / "practice_north.csv",
                      right=SAMPLE / "practice_south.csv", left_id="client_id", right_id="ref",
                      column_map={"owner": "owner_name", "born": "date_of_birth"}, **kw)


@pytest.fixture(scope="session")
def sample_project_file(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("sample") / "vet.docket"
    Project.create(sample_spec(path))
    return path


@pytest.fixture
def sample_project(sample_project_file: Path, tmp_path: Path) -> Path:
    """A private copy of the sample project that a test may change."""
    copy = tmp_path / "vet.docket"
    shutil.copy(sample_project_file, copy)
    return copy


@pytest.fixture
def tiny_tables(tmp_path: Path) -> tuple[Path, Path]:
    left = tmp_path / "left.csv"
    right = tmp_path / "right.csv"
    left.write_text("id,name,town,born\n1,Anna Berg,Oslo,1980-01-02\n2,Jon Dahl,Bergen,1975-05-06\n"
                    "3,Kari Lund,Oslo,1990-12-11\n", encoding="utf-8")
    right.write_text("id,name,town,born\na,Anna Berg,Oslo,1980-01-02\nb,Jon Dal,Bergen,1975-06-05\n"
                     "c,Per Moe,Tromsø,1966-03-03\n", encoding="utf-8")
    return left, right


@pytest.fixture(scope="session")
def dblp_project_file(dblp_acm: Path, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """DBLP-ACM built once with the defaults; tests open it read-only or copy it."""
    path = tmp_path_factory.mktemp("dblp") / "dblp.docket"
    Project.create(NewProject(path=path, left=dblp_acm / "dblp.csv", right=dblp_acm / "acm.csv",
                              id_column="id"))
    return path


@pytest.fixture(scope="session")
def dblp11_project_file(dblp_acm: Path, tmp_path_factory: pytest.TempPathFactory) -> Path:
    """DBLP-ACM built once with --one-to-one; tests open it read-only or copy it."""
    path = tmp_path_factory.mktemp("dblp11") / "dblp11.docket"
    Project.create(NewProject(path=path, left=dblp_acm / "dblp.csv", right=dblp_acm / "acm.csv",
                              id_column="id", one_to_one=True))
    return path


@pytest.fixture
def dblp_project(dblp_project_file: Path, tmp_path: Path) -> Path:
    """A private copy of the DBLP-ACM project that a test may change (a build takes seconds;
    a copy, milliseconds)."""
    copy = tmp_path / "dblp.docket"
    shutil.copy(dblp_project_file, copy)
    return copy


@pytest.fixture(scope="session")
def dask_scheduler() -> Iterator[str]:
    """One 2-worker local Dask cluster for the session, reached as an existing scheduler."""
    import logging
    distributed = pytest.importorskip("distributed", reason="the optional extra docket[dask] "
                                      "is not installed: pip install 'docket[dask]'")
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       dashboard_address=":0", silence_logs=logging.ERROR)
    yield cluster.scheduler_address
    cluster.close()


@pytest.fixture
def good(tmp_path: Path) -> Path:
    """A small well-formed table of three records (the bad-input tests' control)."""
    path = tmp_path / "good.csv"
    path.write_text("id,name,town\n1,Anna,Oslo\n2,Jon,Bergen\n3,Anne,Oslo\n", encoding="utf-8")
    return path

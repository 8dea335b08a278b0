"""A rebuild over a project whose last user crashed must not inherit the old write-ahead log."""

from __future__ import annotations

import os
import signal
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.intervals import clopper_pearson
from tests.conftest import sample_spec

# A child that commits a decision in WAL mode and is then killed before it can checkpoint, so
# the project's -wal file holds committed pages of the old database.
_CRASHER = """
import os, signal, sqlite3, sys
conn = sqlite3.connect(sys.argv[1], isolation_level=None)
conn.execute("PRAGMA wal_autocheckpoint = 0")
for i in range(200):
    conn.execute("INSERT INTO meta VALUES (?, ?)", (f"crash-{i}", "x" * 500))
print("ready", flush=True)
os.kill(os.getpid(), signal.SIGKILL)
"""


def test_kill_then_force_rebuild_opens(tmp_path: Path) -> None:
    path = tmp_path / "p.docket"
    Project.create(sample_spec(path, audit=50))
    run = subprocess.run([sys.executable, "-c", _CRASHER, str(path)], capture_output=True,
                         text=True)
    assert run.returncode == -signal.SIGKILL and "ready" in run.stdout
    assert Path(f"{path}-wal").stat().st_size > 0  # the crash left committed pages behind

    Project.create(sample_spec(path, audit=60, force=True))
    with Project.open(path) as project:
        assert project.connection.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
        crashed = project.connection.execute(
            "SELECT count(*) FROM meta WHERE key LIKE 'crash-%'").fetchone()[0]
        assert crashed == 0  # nothing of the old file came back
    assert not list(tmp_path.glob(".p.docket.*"))


def test_stale_hidden_build_copies_are_removed(tmp_path: Path) -> None:
    path = tmp_path / "p.docket"
    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"],
                          capture_output=True, text=True).stdout.strip()
    stale = tmp_path / f".p.docket.{dead}.building"
    stale.write_bytes(b"records of a crashed build")
    Path(f"{stale}-wal").write_bytes(b"")
    Project.create(sample_spec(path, audit=50))
    assert not stale.exists() and not Path(f"{stale}-wal").exists()
    with Project.open(path) as project:
        assert project.connection.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    assert os.stat(path).st_mode & 0o777 == 0o600


def test_clopper_pearson_takes_a_rounded_full_count() -> None:
    # The demo's evaluate reached x = p * n_eff just above n_eff with p == 1 (a rounding error).
    n = 6.598805646036919
    low, high = clopper_pearson(6.59880564603692, n)
    assert high == 1.0 and 0.0 < low < 1.0
    # Exactness where it matters: x = n = 10 gives (alpha/2)^(1/n) as the lower bound
    # (Clopper & Pearson 1934; the closed form for x = n is common practice).
    assert abs(clopper_pearson(10, 10)[0] - 0.025 ** (1 / 10)) < 1e-9
    try:
        clopper_pearson(7.0, n)
    except ValueError:
        pass
    else:
        raise AssertionError("a count well above n must still be refused")


def test_sqlite_sees_no_wal_of_the_old_file(tmp_path: Path) -> None:
    path = tmp_path / "p.docket"
    Project.create(sample_spec(path, audit=50))
    Path(f"{path}-wal").write_bytes(b"\0" * 4096)  # junk an older crash might leave
    Project.create(sample_spec(path, audit=50, force=True))
    conn = sqlite3.connect(path)
    assert conn.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    conn.close()


def test_a_project_another_process_is_writing_to_is_not_replaced(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    # --force renamed the new file over it and removed its -wal: what the writer was saving
    # (a label file's batches) went into a file no longer there
    from docket.core import DocketError
    monkeypatch.setattr("docket.core.storage.build_files.WAIT_S", 0.05)
    path = tmp_path / "p.docket"
    Project.create(sample_spec(path, audit=50))
    writer = sqlite3.connect(path, isolation_level=None)
    writer.execute("BEGIN IMMEDIATE")
    writer.execute("INSERT INTO meta VALUES ('saving', '\"1\"')")
    with pytest.raises(DocketError, match=r"another docket kept the project locked .* it was "
                                          "not replaced"):
        Project.create(sample_spec(path, audit=60, force=True))
    writer.execute("COMMIT")
    writer.close()
    with Project.open(path, readonly=True) as project:  # the writer's work stands
        assert project.connection.execute(
            "SELECT value FROM meta WHERE key = 'saving'").fetchone() == ('"1"',)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["p.docket"]


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the -shm lock is read on Linux")
def test_a_project_another_process_has_open_is_not_replaced(tmp_path: Path) -> None:
    # A review screen left open holds no write lock between decisions: --force replaced the
    # file under it, and the reviewer's next decisions went into a file no longer there.
    from docket.core import DocketError
    path = tmp_path / "p.docket"
    Project.create(sample_spec(path, audit=50))
    holder = subprocess.Popen(
        [sys.executable, "-c", "import sqlite3, sys; c = sqlite3.connect(sys.argv[1]); "
         "c.execute('SELECT count(*) FROM meta').fetchone(); print('open', flush=True); "
         "sys.stdin.read()", str(path)],
        stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    try:
        assert holder.stdout is not None and holder.stdout.readline().strip() == "open"
        before = path.read_bytes()
        with pytest.raises(DocketError, match=r"another process has the project open .* it was "
                                              "not replaced"):
            Project.create(sample_spec(path, audit=60, force=True))
        assert path.read_bytes() == before
    finally:
        assert holder.stdin is not None
        holder.stdin.close()
        holder.wait()
    Project.create(sample_spec(path, audit=60, force=True))  # closed: replaced as asked
    with Project.open(path, readonly=True) as project:
        assert project.connection.execute(
            "SELECT count(*) FROM pairs WHERE audit = 1").fetchone()[0] == 60

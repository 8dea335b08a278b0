"""A command that only reads a project leaves no ``-wal`` or ``-shm`` beside it, and never at the
cost of a writer working on the file at the same time.

A read-only SQLite connection makes both files to read a WAL database but may not remove them
when it closes, so status, evaluate, export and agreement each left two files behind.
"""

from __future__ import annotations

import hashlib
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main


def _beside(path: Path) -> list[str]:
    return sorted(s for s in ("-wal", "-shm") if Path(f"{path}{s}").exists())


def _digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


@pytest.fixture
def clean(team: tuple[Path, object]) -> Path:
    path = team[0]  # reviewed and adjudicated in part: every report has figures to show
    with Project.open(path):  # the last writer to close removes both
        pass
    assert _beside(path) == []
    return path


@pytest.mark.parametrize("argv", [["status"], ["evaluate"], ["agreement"],
                                  ["next", "--reviewer", "maya"],
                                  ["export", "--what", "gold", "-o", "{out}"]])
def test_a_reading_command_leaves_the_file_alone(clean: Path, tmp_path: Path, argv: list[str],
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    before, mtime = _digest(clean), clean.stat().st_mtime_ns
    args = [a.replace("{out}", str(tmp_path / "gold.csv")) for a in argv]
    assert main([args[0], str(clean), *args[1:]]) == 0
    capsys.readouterr()
    assert _beside(clean) == []
    assert _digest(clean) == before and clean.stat().st_mtime_ns == mtime


_WRITER = """
import sqlite3, sys
c = sqlite3.connect(sys.argv[1], isolation_level=None)
c.execute("BEGIN IMMEDIATE")
c.execute("INSERT INTO meta VALUES ('written_meanwhile', '1')")
print("ready", flush=True)
sys.stdin.readline()
c.execute("COMMIT")
print(c.execute("PRAGMA integrity_check").fetchone()[0], flush=True)
c.close()
"""


def test_a_writer_at_work_keeps_its_files_and_its_write(clean: Path,
                                                        capsys: pytest.CaptureFixture[str]
                                                        ) -> None:
    writer = subprocess.Popen([sys.executable, "-c", _WRITER, str(clean)],
                              stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    try:
        assert writer.stdout is not None and writer.stdout.readline().strip() == "ready"
        assert main(["status", str(clean)]) == 0
        assert _beside(clean) == ["-shm", "-wal"]  # the writer's, while it works
        out, _ = writer.communicate("go\n", timeout=60)
    finally:
        if writer.poll() is None:
            writer.kill()
    capsys.readouterr()
    assert writer.returncode == 0 and out.strip() == "ok"
    with Project.open(clean, readonly=True) as p:
        assert p.meta["written_meanwhile"] == 1
    assert _beside(clean) == []  # the writer, closing last, removed them


def test_a_connection_of_this_process_keeps_them_too(clean: Path) -> None:
    # the review screen reads on a second connection while its own stays open
    other = sqlite3.connect(clean, isolation_level=None)
    try:
        other.execute("SELECT count(*) FROM pairs").fetchone()
        with Project.open(clean, readonly=True) as p:
            p.status()
        assert _beside(clean) == ["-shm", "-wal"]
        other.execute("INSERT INTO meta VALUES ('after', '2')")
    finally:
        other.close()
    assert _beside(clean) == []
    with Project.open(clean, readonly=True) as p:
        assert p.meta["after"] == 2


_CRASHED = """
import os, sqlite3, sys
c = sqlite3.connect(sys.argv[1], isolation_level=None)
c.execute("PRAGMA wal_autocheckpoint = 0")
c.execute("INSERT INTO meta VALUES ('framed', '3')")
os._exit(0)  # ended before any checkpoint: the committed row is only in the -wal
"""


def test_frames_a_writer_left_are_not_checkpointed_by_a_reader(clean: Path) -> None:
    # a reading command writes nothing into the file, not even a writer's committed frames
    subprocess.run([sys.executable, "-c", _CRASHED, str(clean)], check=True, timeout=60)
    before = _digest(clean)
    assert Path(f"{clean}-wal").stat().st_size > 0
    with Project.open(clean, readonly=True) as p:
        assert p.meta["framed"] == 3
    assert _digest(clean) == before and Path(f"{clean}-wal").stat().st_size > 0

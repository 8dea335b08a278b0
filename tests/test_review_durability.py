"""A review process killed with SIGKILL loses no decision it has shown as made.

A subprocess runs the real app (``tests/review_driver.py``) on a copy of the sample project and
reports each decision once the next pair is painted; after K of them the test kills it with
SIGKILL, mid-session, with the background refit possibly running (K = 25 is the refit
point). Reopening must show exactly K decisions, an intact file, and the queue resumed.
"""

from __future__ import annotations

import os
import queue
import signal
import sqlite3
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from docket.core import Project

DRIVER = Path(__file__).with_name("review_driver.py")
REPO = Path(__file__).resolve().parents[1]
WAIT = 60.0  # seconds for one line from the driver: generous for a loaded machine


def _lines(proc: subprocess.Popen[str]) -> queue.Queue[str]:
    out: queue.Queue[str] = queue.Queue()

    def pump() -> None:
        assert proc.stdout is not None
        for line in proc.stdout:
            out.put(line.strip())
        out.put("<eof>")

    threading.Thread(target=pump, daemon=True).start()
    return out


def _expect(lines: queue.Queue[str], want: str, proc: subprocess.Popen[str]) -> None:
    got = lines.get(timeout=WAIT)
    if got != want:
        proc.kill()
        err = proc.stderr.read() if proc.stderr else ""
        raise AssertionError(f"driver said {got!r}, expected {want!r}\n{err[-3000:]}")


@pytest.mark.parametrize("k", [1, 9, 25])
def test_sigkill_after_k_decisions_keeps_exactly_k(review_sample: Path, k: int):
    env = {**os.environ, "PYTHONPATH": os.pathsep.join(
        [str(REPO), os.environ.get("PYTHONPATH", "")])}
    proc = subprocess.Popen([sys.executable, str(DRIVER), str(review_sample), "kim"],
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, env=env)
    lines = _lines(proc)
    try:
        _expect(lines, "ready", proc)
        assert proc.stdin is not None
        for i in range(1, k + 1):
            proc.stdin.write("go\n")
            proc.stdin.flush()
            _expect(lines, f"decided {i}", proc)
        proc.send_signal(signal.SIGKILL)
        assert proc.wait(timeout=WAIT) == -signal.SIGKILL
    finally:
        if proc.poll() is None:
            proc.kill()

    with sqlite3.connect(review_sample) as conn:
        assert conn.execute("PRAGMA integrity_check").fetchone() == ("ok",)
        made = conn.execute("SELECT pair_id, label, seconds FROM decisions WHERE reviewer = ? "
                            "ORDER BY decided_at", ("kim",)).fetchall()
    assert len(made) == k
    assert [label for _, label, _ in made] == [("match", "non-match", "match", "hold")[i % 4]
                                               for i in range(k)]
    assert all(seconds >= 0 for *_, seconds in made)
    with Project.open(review_sample) as project:
        assert project.progress("kim")[0] == k
        resumed = project.next_pairs("kim", 1)[0].pair_id
        assert resumed not in {pair for pair, *_ in made}

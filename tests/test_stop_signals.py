"""SIGTERM and SIGHUP end a command as Ctrl-C does: roll-backs and clean-ups run, one line,
exit 128 + the signal. Each signal is raised in this process at a chosen point
(``signal.raise_signal`` runs the handler before the next line), never timed."""

from __future__ import annotations

import asyncio
import signal
import threading
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.errors import Interrupted
from docket.core.exports import exporting
from docket.core.reviewing import bulk
from docket.core.storage import score_pool
from docket.tui import stopping
from docket.tui.cli import main


def _standing(p: Project, reviewer: str) -> tuple[int, int]:
    """(labels that stand, entries in the log) of ``reviewer``."""
    (standing,) = p.connection.execute(
        "SELECT count(*) FROM current WHERE reviewer = ? AND label IS NOT NULL",
        (reviewer,)).fetchone()
    return standing, sum(1 for d in p.decisions() if d.reviewer == reviewer)


def test_sigterm_in_label_takes_back_the_batches_written(
        sample_project: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    # killed by default, a label run kept the batches it had committed (6,129 of 118,591 rows)
    with Project.open(sample_project) as p:
        ids = [i.pair_id for i in p.next_pairs("ana", 1_200)]
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n" + "".join(f"{i},match\n" for i in ids), encoding="utf-8")
    calls = {"n": 0}
    real = bulk.claims.release_many

    def release(*args: object) -> None:
        calls["n"] += 1
        if calls["n"] == 2:  # batches hold at most 500 rows: one is committed
            signal.raise_signal(signal.SIGTERM)
        real(*args)  # type: ignore[arg-type]

    monkeypatch.setattr(bulk.claims, "release_many", release)
    monkeypatch.setattr(bulk.time, "sleep", lambda _s: None)
    assert main(["label", str(sample_project), "--reviewer", "ana", "--from", str(rows)]) == 143
    assert capsys.readouterr().err == (
        "docket: interrupted by SIGTERM; nothing was half-written\n")
    with Project.open(sample_project) as p:
        standing, logged = _standing(p, "ana")
    assert standing == 0 and logged > 0  # written, then taken back
    assert signal.getsignal(signal.SIGTERM) is signal.SIG_DFL  # given back after the command


def test_sighup_in_export_leaves_no_temporary_and_the_old_file(
        sample_project: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "scores.csv"
    target.write_text("the old export\n", encoding="utf-8")
    real = exporting.guarded

    def guarded(frame: object) -> object:
        signal.raise_signal(signal.SIGHUP)  # the terminal closed while the rows were made
        return real(frame)  # type: ignore[arg-type]

    monkeypatch.setattr(exporting, "guarded", guarded)
    assert main(["export", str(sample_project), "-o", str(target)]) == 128 + signal.SIGHUP
    assert capsys.readouterr().err == "docket: interrupted by SIGHUP; nothing was half-written\n"
    assert target.read_text(encoding="utf-8") == "the old export\n"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []


def test_an_ignored_sigterm_stays_ignored(sample_project: Path,
                                          monkeypatch: pytest.MonkeyPatch) -> None:
    # nohup or a supervisor chose to ignore it: the command must not take that back
    seen: list[object] = []
    real = Project.status

    def status(self: Project) -> object:
        seen.append(signal.getsignal(signal.SIGTERM))
        return real(self)

    monkeypatch.setattr(Project, "status", status)
    previous = signal.signal(signal.SIGTERM, signal.SIG_IGN)
    try:
        assert main(["status", str(sample_project)]) == 0
        assert seen == [signal.SIG_IGN]
    finally:
        signal.signal(signal.SIGTERM, previous)


def test_a_screen_is_asked_to_quit_then_the_command_ends_interrupted() -> None:
    # a screen killed outright left the terminal reporting the mouse, its cursor hidden
    quits: list[str] = []

    async def screen() -> None:
        signal.raise_signal(signal.SIGTERM)  # returns: the screen goes on to its next step
        quits.append("after the signal")
        await asyncio.sleep(0)  # the loop runs the quit it was handed

    with stopping.stop_signals():
        with pytest.raises(Interrupted, match="every decision made on it is saved"), \
                stopping.quitting_screen(lambda: quits.append("quit")):
            asyncio.run(screen())
        assert stopping.received() == "SIGTERM" and stopping.exit_code() == 143
    assert quits == ["after the signal", "quit"]
    assert stopping.received() is None


def test_a_screen_whose_quit_hangs_is_ended_with_the_signals_code(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # Seen in tmux: kill-session (SIGHUP) left a review screen alive for good, Textual's quit
    # waiting on a writer thread that had died on the closed terminal. The hang is played
    # here by a screen that waits; the watchdog is given no grace.
    ended = threading.Event()
    codes: list[int] = []

    def hard_exit(code: int) -> None:
        codes.append(code)
        ended.set()

    monkeypatch.setattr(stopping, "GRACE", 0.0)
    monkeypatch.setattr(stopping, "_hard_exit", hard_exit)

    async def hanging_screen() -> None:
        signal.raise_signal(signal.SIGHUP)
        await asyncio.get_running_loop().run_in_executor(None, ended.wait, 10)

    with stopping.stop_signals(), pytest.raises(Interrupted), \
            stopping.quitting_screen(lambda: None):
        asyncio.run(hanging_screen())
    assert codes == [129]  # 128 + SIGHUP, as a shell reports it


def test_a_screen_that_quits_is_not_ended_by_the_watchdog(
        monkeypatch: pytest.MonkeyPatch) -> None:
    codes: list[int] = []
    monkeypatch.setattr(stopping, "_hard_exit", codes.append)

    async def screen() -> None:
        signal.raise_signal(signal.SIGTERM)
        await asyncio.sleep(0)

    with stopping.stop_signals(), pytest.raises(Interrupted), \
            stopping.quitting_screen(lambda: None):
        asyncio.run(screen())
    assert stopping._watchdog == [] and codes == []  # the timer was cancelled with the screen


def test_pool_workers_end_on_the_pools_sigterm(monkeypatch: pytest.MonkeyPatch) -> None:
    # forked with the front end's handler, each worker turned the pool's SIGTERM into a
    # KeyboardInterrupt and a traceback
    monkeypatch.setattr(score_pool.compare, "use_threads", lambda _n: None)
    handlers = {s: signal.getsignal(s) for s in (signal.SIGINT, signal.SIGTERM, signal.SIGHUP)}
    try:
        with stopping.stop_signals():
            score_pool._start_worker()
            assert signal.getsignal(signal.SIGTERM) is signal.SIG_DFL
            assert signal.getsignal(signal.SIGHUP) is signal.SIG_DFL
    finally:
        for number, handler in handlers.items():
            signal.signal(number, handler)


def test_a_sigterm_after_the_result_is_printed_leaves_the_commands_own_code(
        sample_project: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    # the work was complete, yet the command ended 'interrupted' (or, a moment later, killed
    # with 143 and no line): the result stands, and so does its code
    from docket.tui import cli
    real = cli.work_done

    def done(code: int) -> None:
        real(code)
        signal.raise_signal(signal.SIGTERM)

    monkeypatch.setattr(cli, "work_done", done)
    assert main(["status", str(sample_project)]) == 0
    out, err = capsys.readouterr()
    assert "pairs" in out and err == ""
    assert main(["status", str(sample_project / "nope.docket")]) == 2  # an error's code too
    assert capsys.readouterr().err.startswith("docket: ")
    assert signal.getsignal(signal.SIGTERM) is signal.SIG_DFL  # given back after the command

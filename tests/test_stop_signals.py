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
from tests.conftest import SAMPLE


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


_INSTALLED = """
import atexit, os, signal, sys
from docket.tui import cli
real = cli.main
stop = getattr(signal, sys.argv[2])
def main(*args, **kw):
    # runs at exit before docket's own last hook, as a library's clean-up would
    atexit.register(lambda: os.kill(os.getpid(), stop))
    return real(*args, **kw)
class Late:  # dropped as the interpreter clears this module, after every exit hook
    def __del__(self, kill=os.kill, pid=os.getpid(), term=stop):
        kill(pid, term)
if sys.argv[1] == "teardown":
    late = Late()
else:
    cli.main = main
sys.argv = ["docket", *sys.argv[3:]]
cli.run()
"""


def test_a_ctrl_c_after_the_result_is_printed_leaves_the_commands_own_code(
        sample_project: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    # Python's own handler raised KeyboardInterrupt there: a finished command said
    # 'interrupted; nothing was half-written' and ended 130, its work done and kept
    from docket.tui import cli
    real = cli.work_done

    def done(code: int) -> None:
        real(code)
        signal.raise_signal(signal.SIGINT)

    monkeypatch.setattr(cli, "work_done", done)
    assert main(["status", str(sample_project)]) == 0
    out, err = capsys.readouterr()
    assert "pairs" in out and err == ""
    assert signal.getsignal(signal.SIGINT) is signal.default_int_handler  # given back


def test_a_ctrl_c_turned_into_an_import_error_is_one_line(
        tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    # A Ctrl-C at 2.0 s into 'docket new' on the sample ended in a traceback and exit 1:
    # "ImportError: initialization failed", pybind11's word for a KeyboardInterrupt met while
    # it loads a module (scipy.optimize's _pava_pybind, loaded on first use), kept as the cause
    from docket.core.storage import build

    def fit(*_args: object, **_kw: object) -> None:
        try:
            raise KeyboardInterrupt
        except KeyboardInterrupt as exc:
            raise ImportError("initialization failed") from exc

    monkeypatch.setattr(build, "fit_em", fit)
    target = tmp_path / "vets.docket"
    code = main(["new", str(target), "--left", str(SAMPLE / "practice_north.csv"),
                 "--right", str(SAMPLE / "practice_south.csv"), "--left-id", "client_id",
                 "--right-id", "ref"])
    assert code == 130
    assert capsys.readouterr().err.splitlines()[-1] == (
        "docket: interrupted; nothing was half-written")
    assert list(tmp_path.iterdir()) == []


def test_an_import_error_of_its_own_is_not_taken_for_a_ctrl_c(
        sample_project: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    def status(_self: Project) -> None:
        raise ImportError("a library is missing")

    monkeypatch.setattr(Project, "status", status)
    with pytest.raises(ImportError, match="missing"):
        main(["status", str(sample_project)])


def test_a_ctrl_c_sent_to_a_screen_asks_it_to_quit() -> None:
    # kill -INT (Ctrl-C itself is a key on the screen) raised KeyboardInterrupt inside the
    # screen's loop, which left the terminal as the screen had set it
    quits: list[str] = []

    async def screen() -> None:
        signal.raise_signal(signal.SIGINT)
        quits.append("after the signal")
        await asyncio.sleep(0)

    with stopping.stop_signals():
        with pytest.raises(Interrupted), stopping.quitting_screen(lambda: quits.append("quit")):
            asyncio.run(screen())
        assert stopping.received() is None and stopping.exit_code() == 130
    assert quits == ["after the signal", "quit"]


@pytest.mark.parametrize("stop", ["SIGTERM", "SIGINT"])
@pytest.mark.parametrize("when", ["exit", "teardown"])
def test_the_installed_command_ends_with_its_code_when_a_sigterm_comes_at_exit(
        sample_project_file: Path, tmp_path: Path, when: str, stop: str) -> None:
    # at exit, or in the interpreter's own clean-up (where Python has set its handlers back to
    # the default), a signal ended a finished command as killed (-15: the shell's 143; a
    # Ctrl-C's -2, seen on 3 of 40 'docket new' runs of the sample given one at 1.5 to 2.2 s),
    # with nothing said
    import subprocess
    import sys
    for args, code in ((["status", str(sample_project_file)], 0),
                       (["status", str(tmp_path / "nope.docket")], 2)):
        done = subprocess.run([sys.executable, "-c", _INSTALLED, when, stop, *args],
                              capture_output=True, text=True, timeout=120)
        assert done.returncode == code, done.stderr
        assert (code == 0) == ("pairs" in done.stdout)
        assert "interrupted" not in done.stderr and "Traceback" not in done.stderr


_STARTING = """
import importlib, sys
class Pressed:  # Ctrl-C while the command line is still loading its libraries
    def find_spec(self, name, path=None, target=None):
        if name == "pandas" and sys.argv[2] == "plain":
            raise KeyboardInterrupt
        if name == "pandas":  # as pybind11 reports a Ctrl-C met while its module loads
            try:
                raise KeyboardInterrupt
            except KeyboardInterrupt as exc:
                raise ImportError("initialization failed") from exc
sys.meta_path.insert(0, Pressed())
module, function = sys.argv[1].split(":")
sys.argv = ["docket", "status", "nope.docket"]
getattr(importlib.import_module(module), function)()
"""


@pytest.mark.parametrize("how", ["plain", "as an import error"])
def test_ctrl_c_while_the_command_is_starting_is_one_line(tmp_path: Path, how: str) -> None:
    # the first half second of any command (importing pandas and numpy) ended in a traceback
    import subprocess
    import sys
    import tomllib
    pyproject = Path(__file__).parent.parent / "pyproject.toml"
    entry = tomllib.loads(pyproject.read_text())["project"]["scripts"]["docket"]
    done = subprocess.run([sys.executable, "-c", _STARTING, entry, how], capture_output=True,
                          text=True, timeout=120, cwd=tmp_path)
    assert done.returncode == 130, done.stderr
    assert done.stderr == "docket: interrupted while starting; nothing was done\n"

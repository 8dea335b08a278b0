"""Ctrl-C and stop signals at a command's edges: after its work is done, at exit, while it
starts, inside a library that reports them as its own error, and sent to a screen."""

from __future__ import annotations

import asyncio
import signal
from pathlib import Path

import pytest

from docket.core import Project
from docket.core.errors import Interrupted
from docket.tui import stopping
from docket.tui.cli import main
from tests.conftest import SAMPLE

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

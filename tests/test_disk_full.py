"""A full disk met while writing output: one line naming what was written and that the disk is
full, never a traceback, never a silent success. The full disk is simulated (ENOSPC raised by
the stream or the writer), as a real one needs a mounted file system."""

from __future__ import annotations

import errno
import io
import sys
from pathlib import Path

import pytest

from docket.core import DocketError
from docket.core.exports import exporting, score_all
from docket.tui.cli import main
from docket.tui.terminal import SafeStream

FULL = OSError(errno.ENOSPC, "No space left on device")


class FillingDisk(io.RawIOBase):
    """A file on a disk with ``room`` bytes left: a write takes what fits, then fails."""

    def __init__(self, room: int) -> None:
        self.room = room
        self.got = b""

    def writable(self) -> bool:
        return True

    def write(self, data: object) -> int:
        if not self.room:
            raise OSError(errno.ENOSPC, "No space left on device")
        view = memoryview(data).cast("B")  # type: ignore[arg-type]
        n = min(self.room, len(view))
        self.got += bytes(view[:n])
        self.room -= n
        return n


class Stdout(io.TextIOWrapper):
    def isatty(self) -> bool:
        return False


class RawStdout:
    """Standard output whose binary stream is ``buffer`` itself: a file's write may return
    having taken only part of the data, as the real one did (98,304 of 3,596,550 bytes)."""

    def __init__(self, buffer: FillingDisk) -> None:
        self.buffer = buffer

    def isatty(self) -> bool:
        return False

    def flush(self) -> None:
        pass


def test_export_to_standard_output_on_a_filling_disk_says_it_is_cut_short(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # 98 KB of a 3.6 MB export went out; the command said nothing and ended with 0
    disk = FillingDisk(room=1_000)
    monkeypatch.setattr(sys, "stdout", RawStdout(disk))
    with pytest.raises(DocketError) as caught:
        exporting.to_stdout("x" * 5_000)
    assert str(caught.value) == ("standard output: disk full; what was written there is cut "
                                 "short; free some space and run the command again")
    assert disk.got == b"x" * 1_000


def test_write_all_goes_on_after_a_partial_write() -> None:
    class Halves(io.RawIOBase):
        def __init__(self) -> None:
            self.got = b""

        def writable(self) -> bool:
            return True

        def write(self, data: object) -> int:
            view = memoryview(data).cast("B")  # type: ignore[arg-type]
            n = max(1, len(view) // 2)
            self.got += bytes(view[:n])
            return n

    out = Halves()
    exporting.write_all(out, b"0123456789" * 100)
    assert out.got == b"0123456789" * 100


def test_printed_output_on_a_full_disk_is_one_line(
        sample_project: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    # 'docket status > file' on a full disk ended in a traceback
    capsys.readouterr()
    monkeypatch.setattr(sys, "stdout", Stdout(io.BufferedWriter(FillingDisk(room=0), 64),
                                              encoding="utf-8"))
    assert main(["status", str(sample_project)]) == 2
    assert capsys.readouterr().err == (
        "docket: standard output: disk full; what was written there is cut short; free some "
        "space and run the command again\n")


def test_a_safe_stream_lets_a_broken_pipe_through() -> None:
    class Gone(io.StringIO):
        def write(self, _text: str) -> int:
            raise BrokenPipeError

    with pytest.raises(BrokenPipeError):
        SafeStream(Gone()).write("a line\n")


@pytest.mark.parametrize("error", [
    FULL, OSError("Error writing bytes to file. Detail: [errno 28] No space left on device")])
def test_an_export_on_a_full_disk_says_so_and_leaves_no_temporary(
        tmp_path: Path, error: OSError) -> None:
    # pyarrow's words were shown as they were; a plain ENOSPC as 'cannot write (...)'
    target = tmp_path / "gold.parquet"
    target.write_text("the old export", encoding="utf-8")

    def write(tmp: Path) -> None:
        tmp.write_text("part of it", encoding="utf-8")
        raise error

    with pytest.raises(DocketError) as caught:
        exporting.atomic_write(target, write)
    assert str(caught.value) == (f"{target}: disk full; nothing was written; free some space, "
                                 "or write the export elsewhere")
    assert [p.name for p in tmp_path.iterdir()] == ["gold.parquet"]
    assert target.read_text(encoding="utf-8") == "the old export"


def test_scored_parts_on_a_full_disk_say_so(tmp_path: Path) -> None:
    with pytest.raises(DocketError) as caught, score_all._writing(tmp_path / "scored"):
        raise FULL
    assert str(caught.value) == (f"{tmp_path / 'scored'}: disk full while writing the scored "
                                 "parts; nothing was written; free some space, or give a "
                                 "folder on another disk")


def test_a_reader_that_stops_early_ends_the_command_quietly(
        sample_project: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    # 'docket status PROJECT | head -2' once ended in a BrokenPipeError traceback: the clause
    # for an error a Ctrl-C caused stood before the one for a closed pipe, and re-raised
    class Gone(io.StringIO):
        def write(self, _text: str) -> int:
            raise BrokenPipeError

        def fileno(self) -> int:
            return devnull

    import os
    devnull = os.open(os.devnull, os.O_WRONLY)
    monkeypatch.setattr(sys, "stdout", Gone())
    monkeypatch.setattr(os, "dup2", lambda _fd, _to: None)  # pytest's own stdout stays
    try:
        assert main(["status", str(sample_project)]) == 0
    finally:
        os.close(devnull)
    assert "Traceback" not in capsys.readouterr().err

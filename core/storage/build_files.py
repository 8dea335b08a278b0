"""The files a build leaves beside the project: the finished file put in place, and leftovers
of builds whose process died (hidden copies, spilled pairs) removed."""

from __future__ import annotations

import os
import shutil
import sqlite3
import struct
import sys
from pathlib import Path

from .file_health import ProjectFileError, holds_database, uri
from .store import BUSY_TIMEOUT_MS

WAIT_S = BUSY_TIMEOUT_MS / 1000  # as long as any command waits for the project's lock


def replace_project_file(new: Path, target: Path) -> None:
    """Put a finished build at ``target``, taking the old file's ``-wal``/``-shm`` with it.

    SQLite would replay an old write-ahead log into the new file ("database disk image is
    malformed"), so the old file is moved aside first and its side files removed before the new
    one takes its name.
    """
    refuse_if_in_use(target)
    if target.exists():
        aside = target.with_name(f".{target.name}.{os.getpid()}.replaced")
        os.replace(target, aside)
        for extra in ("", "-wal", "-shm", "-journal"):
            Path(f"{aside}{extra}").unlink(missing_ok=True)
    for extra in ("-wal", "-shm", "-journal"):
        Path(f"{target}{extra}").unlink(missing_ok=True)
    os.replace(new, target)


def refuse_if_in_use(target: Path) -> None:
    """Refuse to replace a project while another process has it open or holds its write
    lock: the rename went ahead and removed that process's -wal, so what it was saving (a label
    file's batches, a merge, a reviewer's next decision) was committed into a file no longer
    there."""
    if not holds_database(target):
        return
    if open_elsewhere(target):
        raise ProjectFileError(f"{target}: another process has the project open (a review "
                               "screen left open, perhaps); it was not replaced, since what "
                               "that process saves next would go into a file no longer there; "
                               "close it and try again")
    try:
        conn = sqlite3.connect(uri(target, "rw"), uri=True, isolation_level=None,
                               timeout=WAIT_S)
    except sqlite3.Error:
        return  # a file this user may not write: nobody else is writing through us either
    try:
        conn.execute("BEGIN IMMEDIATE")
        conn.execute("ROLLBACK")
    except sqlite3.OperationalError as exc:
        if "locked" in str(exc) or "busy" in str(exc):
            raise ProjectFileError(f"{target}: another docket kept the project locked for "
                                   f"more than {WAIT_S:g} s, writing to it; it was not "
                                   "replaced; try again when that command is done") from None
    finally:
        conn.close()


# SQLite keeps a read lock on this byte of the -shm file for as long as a connection has a
# database in WAL mode open (the unix VFS's "dead man switch", UNIX_SHM_DMS = 128 in os_unix.c).
_SHM_DMS = 128
_FLOCK = "hhqqi4x"  # struct flock on Linux: l_type, l_whence, l_start, l_len, l_pid


def open_elsewhere(target: Path) -> bool:
    """Whether another process has the project open: an idle review screen holds no write
    lock, so only the -shm lock shows it. The lock is queried, never taken (F_GETLK), so it
    cannot disturb that process; locks of this process are not reported. Linux only, where
    the layout of ``struct flock`` is known; elsewhere False."""
    if not sys.platform.startswith("linux"):
        return False
    import fcntl

    try:
        fd = os.open(f"{target}-shm", os.O_RDONLY)
    except OSError:
        return False  # no -shm: no connection in WAL mode
    try:
        query = struct.pack(_FLOCK, fcntl.F_WRLCK, os.SEEK_SET, _SHM_DMS, 1, 0)
        answer = fcntl.fcntl(fd, fcntl.F_GETLK, query)
        return struct.unpack(_FLOCK, answer)[0] != fcntl.F_UNLCK
    except OSError:
        return False
    finally:
        os.close(fd)  # this process holds no connection to a project it is about to replace


def remove_stale_builds(target: Path) -> None:
    """Delete hidden copies left by builds whose process has died (``.NAME.PID.building``)."""
    for leftover in target.parent.glob(f".{target.name}.*"):
        rest = leftover.name[len(target.name) + 2:]
        for extra in ("-wal", "-shm", "-journal"):
            rest = rest.removesuffix(extra)
        parts = rest.split(".")
        if len(parts) < 2 or parts[1] not in {"building", "replaced", "spill"} or \
                not parts[0].isdigit():
            continue
        if int(parts[0]) != os.getpid() and _alive(int(parts[0])):
            continue
        if leftover.is_dir():
            shutil.rmtree(leftover, ignore_errors=True)
        else:
            leftover.unlink(missing_ok=True)


def _alive(pid: int) -> bool:
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True

"""Whether a project file can be opened and written, and what an SQLite error means to a user.

Checked when a project is opened, before any command writes: the folder exists, a command that
writes has a writable file and folder (SQLite keeps its journal, ``-wal`` and ``-shm``, beside
the file), and the file is not damaged. The permission bits are honoured even where the user
could write regardless (root): a file marked read-only is treated as read-only.
"""

from __future__ import annotations

import errno
import os
import shutil
import sqlite3
import stat
from collections.abc import Sequence
from pathlib import Path

from ..errors import DocketError
from ..wording import many

# A whole-file check reads every page: about 0.1 s for the demo, seconds for millions of pairs.
# Above this size only the tables that commands write are checked on opening; damage elsewhere
# is reported, as one line, when a command reaches it, and its transaction is rolled back.
FULL_CHECK_BYTES = 64 * 1024 * 1024
WRITTEN_TABLES = ("meta", "migrations", "reviewers", "role_grants", "claims", "decisions",
                  "current", "patterns", "model", "fields")
READING = "status, next without --claim, export, agreement, evaluate"


class ProjectFileError(DocketError):
    """The project file cannot be used as asked (damaged, read-only, full disk, busy)."""


def _marked_writable(path: Path) -> bool:
    try:
        mode = path.stat().st_mode
    except OSError:
        return False
    return bool(mode & (stat.S_IWUSR | stat.S_IWGRP | stat.S_IWOTH)) and os.access(path, os.W_OK)


def _folder(path: Path) -> Path:
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise ProjectFileError(f"{path}: the folder {folder} does not exist; check the path")
    return folder


def uri(path: Path, mode: str | None = None) -> str:
    """``path`` as an SQLite URI, with ``?mode=`` when given. A '#', '?' or '%' in the name is
    written out: 'a#1.docket' was built, then every command opened 'a' (an empty file it made)."""
    named = Path(os.path.abspath(path)).as_uri()  # abspath: a link stays a link, as SQLite sees it
    return f"{named}?mode={mode}" if mode else named


def holds_database(path: Path) -> bool:
    """Whether ``path`` is an SQLite database (a damaged one too). Asked through SQLite, never
    with open(): closing another handle on a file this process has open in SQLite would drop
    the process's locks on it (POSIX advisory locks are per process)."""
    try:
        if not path.is_file() or path.stat().st_size == 0:
            return False
        probe = sqlite3.connect(uri(path, "ro"), uri=True)
    except (OSError, sqlite3.Error):
        return False
    try:  # SQLite reads a file of a few bytes as an empty database: no page, no database
        return int(probe.execute("PRAGMA page_count").fetchone()[0]) > 0
    except sqlite3.DatabaseError as exc:
        name = getattr(exc, "sqlite_errorname", "") or ""
        return not (name == "SQLITE_NOTADB" or "not a database" in str(exc))
    finally:  # --force over a project that the build then refused left both beside it
        close_reader(probe, path)


def close_reader(conn: sqlite3.Connection, path: Path) -> None:
    """Close a read-only connection without leaving ``-wal`` and ``-shm`` beside the file.

    A read-only connection to a WAL file makes both (it cannot read without them) but may not
    remove them on closing last, as any other connection does. A plain connection that only
    reads, closed after it, removes them, and safely: SQLite does so only as the file's last
    connection in any process, under an exclusive lock, so a writer at work keeps them. Only an
    empty ``-wal`` is tidied so: frames in it are a writer's, to be checkpointed by writers,
    and a command that reads writes nothing into the file.
    """
    conn.close()
    wal, shm = Path(f"{path}-wal"), Path(f"{path}-shm")
    try:
        if wal.stat().st_size > 0:
            return
    except FileNotFoundError:
        if not shm.exists():
            return  # nothing was left
    except OSError:
        return
    try:
        tidy = sqlite3.connect(uri(path, "rw"), uri=True, isolation_level=None)
    except sqlite3.Error:
        return  # a file this user may only read: the files stay, as they must
    try:
        tidy.execute("SELECT count(*) FROM sqlite_master").fetchone()
    except sqlite3.Error:
        pass  # tidying only: whatever stands in its way is left as it was
    finally:
        tidy.close()


def same_file(a: Path, b: Path) -> bool:
    try:
        return a.samefile(b)
    except OSError:
        return False


def special_file(path: Path) -> bool:
    """Whether ``path`` names a device, pipe or socket (what a symbolic link leads to counts):
    something to write into, never to replace."""
    try:
        mode = path.stat().st_mode
    except OSError:
        return False
    return not (stat.S_ISREG(mode) or stat.S_ISDIR(mode))


def application_id(path: Path) -> int | None:
    """The application id in the header of the SQLite database ``path`` (0 for most
    programs' files), or None when it cannot be read."""
    try:
        probe = sqlite3.connect(uri(path, "ro"), uri=True)
    except sqlite3.Error:
        return None
    try:
        return int(probe.execute("PRAGMA application_id").fetchone()[0])
    except sqlite3.Error:
        return None
    finally:
        close_reader(probe, path)


def check_new(path: Path, force: bool = False, inputs: Sequence[Path] = (),
              ours: int | None = None) -> None:
    """A project about to be built: its folder exists and can be written, and what ``path``
    names already is replaced only when asked and only if it is a project (its application id
    ``ours``) or empty: never a file the build reads, nor, say, a table of records given the
    project's name, nor another program's database."""
    folder = _folder(path)
    if not _marked_writable(folder):
        raise ProjectFileError(f"{path}: the folder {folder} is read-only; build the project "
                               "in a folder you can write to")
    if not path.exists():
        return
    if path.is_dir():
        raise DocketError(f"{path}: is a folder; give a file name for the project")
    if special_file(path):  # --force replaced /dev/null itself with the project
        raise DocketError(f"{path}: is a device, pipe or socket, not a file; give a file name "
                          "for the project")
    if any(same_file(path, given) for given in inputs):
        raise DocketError(f"{path}: is a file this project is built from; give the project "
                          f"another name (for example {path.stem}.docket)")
    if not force:
        raise DocketError(f"{path}: already exists; pass --force to replace it")
    if path.stat().st_size and not holds_database(path):
        raise DocketError(f"{path}: is not a docket project, and --force replaces only a "
                          "project; give the project another name")
    if path.stat().st_size and ours is not None and application_id(path) not in (None, ours):
        # another program's database, which --force replaced with the project
        raise DocketError(f"{path}: is an SQLite database of another program, not a docket "
                          "project, and --force replaces only a project; give the project "
                          "another name")


def check_place(path: Path, write: bool) -> None:
    """The folder exists; for a command that writes, file and folder are writable."""
    folder = _folder(path)
    if not write or not path.exists():
        return
    if not _marked_writable(path):
        raise ProjectFileError(f"{path}: the project file is read-only and this command writes "
                               f"to it; ask for write access, or use a reading command "
                               f"({READING})")
    if not _marked_writable(folder):
        raise ProjectFileError(f"{path}: the folder {folder} is read-only, and docket keeps the "
                               "project's journal (-wal, -shm) beside it; move the project to a "
                               "folder you can write to")


def identity(path: Path) -> tuple[int, int] | None:
    """Which file ``path`` names now (device and inode), or None when it names none."""
    try:
        st = path.stat()
    except OSError:
        return None
    return st.st_dev, st.st_ino


def check_still_writable(path: Path, opened: tuple[int, int] | None) -> None:
    """Before a write: an open connection keeps writing to a file that another process has
    deleted or replaced, and every decision would then vanish when the screen closes."""
    if opened is not None and identity(path) != opened:
        raise ProjectFileError(f"{path}: the project file was deleted, moved or replaced "
                               "while it was open; nothing was written; put it back (or open "
                               "the project again) and decide again")
    if opened is not None and not _marked_writable(path):
        raise ProjectFileError(f"{path}: the project file was made read-only while it was "
                               "open; nothing was written; ask for write access and try again")


def check_integrity(conn: sqlite3.Connection, path: Path) -> None:
    """Refuse a damaged file: the whole file when small enough, else the written tables."""
    try:
        size = path.stat().st_size
        if size <= FULL_CHECK_BYTES:
            found = [r[0] for r in conn.execute("PRAGMA quick_check(5)")]
        else:
            present = {n for (n,) in conn.execute("SELECT name FROM sqlite_master "
                                                 "WHERE type = 'table'")}
            found = [r[0] for t in WRITTEN_TABLES if t in present
                     for r in conn.execute(f"PRAGMA quick_check({t})")]
    except sqlite3.DatabaseError as exc:
        raise ProjectFileError(explain(exc, path)) from None
    # SQLite reports each problem on a line of its own, under a "*** in database ***" header.
    problems = [line for f in found if f != "ok" for line in f.splitlines()
                if line.strip() and not line.startswith("***")]
    if problems:
        more = f", and {many(len(problems) - 1, 'more problem')}" if len(problems) > 1 else ""
        raise ProjectFileError(damaged(path, problems[0] + more))


def damaged(path: Path, detail: str) -> str:
    return (f"{path}: the project file is damaged ({detail}); nothing was changed; restore it "
            "from a backup, or build it again and bring decisions back from a copy with "
            "'docket merge'")


def check_room(path: Path, need: int, work: str) -> None:
    """Refuse, before anything is written, work the disk has no room for: a disk that fills
    half way through leaves what was written, since taking it back needs room too."""
    try:
        free = shutil.disk_usage(path.resolve().parent).free
    except OSError:  # nothing to go by: the work is tried, and a full disk met is reported
        return
    if free < need:
        raise ProjectFileError(f"{path}: disk full: {work} needs about {need / 1e6:,.1f} MB "
                               f"and {free / 1e6:,.1f} MB are free; free some space and try "
                               "again; nothing was written")


def no_room(exc: OSError) -> bool:
    """Whether writing a file failed for want of room (a full disk, or the user's quota).
    pyarrow words it 'Error writing bytes to file. Detail: [errno 28] No space left on
    device', with no errno of its own."""
    return exc.errno in (errno.ENOSPC, errno.EDQUOT) or any(
        f"[errno {n}]" in str(exc) for n in (errno.ENOSPC, errno.EDQUOT))


def output_cut_short(exc: OSError, stream: str = "standard output") -> str:
    """One line for output that could not all be written (standard output sent to a file on a
    full disk): what did go out is cut short, which a reader of it must know."""
    why = "disk full" if no_room(exc) else f"cannot write ({exc.strerror or exc})"
    return (f"{stream}: {why}; what was written there is cut short; "
            + ("free some space and " if no_room(exc) else "") + "run the command again")


def disk_full(exc: BaseException) -> bool:
    """Whether ``exc`` (an SQLite error, or the ``ProjectFileError`` made of one) is a full
    disk."""
    if isinstance(exc, ProjectFileError) and isinstance(exc.__cause__, sqlite3.Error):
        exc = exc.__cause__
    return isinstance(exc, sqlite3.Error) and (
        getattr(exc, "sqlite_errorname", "") == "SQLITE_FULL" or "disk is full" in str(exc))


def explain(exc: sqlite3.Error, path: Path | str) -> str:
    """One line for the user: what went wrong with the file, and what to do."""
    name = getattr(exc, "sqlite_errorname", "") or ""
    text = str(exc)
    if disk_full(exc):
        return f"{path}: disk full; nothing was saved; free some space and try again"
    if name.startswith("SQLITE_CORRUPT") or "malformed" in text:
        return damaged(Path(path), text)
    if name == "SQLITE_NOTADB" or "not a database" in text:
        return (f"{path}: not a docket project (not an SQLite file); check the path, or "
                "create one with 'docket new'")
    if name.startswith("SQLITE_READONLY") or "readonly" in text:
        return (f"{path}: the project file cannot be written (read-only file, folder or disk); "
                f"ask for write access, or use a reading command ({READING})")
    if name.startswith("SQLITE_BUSY") or "locked" in text:
        return (f"{path}: busy: another docket kept the project locked for more than 5 s; "
                "nothing was saved; try again")
    if name.startswith("SQLITE_CANTOPEN") or "unable to open" in text:
        return (f"{path}: cannot be opened (is the folder readable and writable?); check the "
                "permissions of the file and its folder")
    if name.startswith("SQLITE_IOERR") or "disk I/O" in text:
        return f"{path}: the disk reported an error ({text}); nothing was saved; check the disk"
    return f"{path}: {text}"

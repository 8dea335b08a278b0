"""A project file damaged, read-only, in a missing folder or on a full disk: one line, exit 2,
nothing changed, and the damage found before any command writes."""

from __future__ import annotations

import os
import sqlite3
import stat
from pathlib import Path

import pytest

from docket.core import DocketError, Project
from docket.tui.cli import main

PAGE = 4096


def _settled(path: Path) -> bytes:
    """The file's bytes with its write-ahead log folded in, so that a byte compare is fair."""
    with sqlite3.connect(path) as conn:
        conn.execute("PRAGMA wal_checkpoint(TRUNCATE)")
    return path.read_bytes()


def _damage(path: Path) -> None:
    # Garbage over the cell pointers of a page in the middle of the pairs table: the kind of
    # damage a torn copy or a failing disk leaves (common practice for corruption tests).
    _settled(path)
    pages = path.stat().st_size // PAGE
    with open(path, "r+b") as f:
        f.seek(PAGE * (pages // 2) + 8)
        f.write(b"\xff" * 1000)


def _one_line(capsys: pytest.CaptureFixture[str]) -> str:
    err = capsys.readouterr().err.strip()
    assert "Traceback" not in err and len(err.splitlines()) == 1, err
    return err


DAMAGED_COMMANDS = [
    ["status"], ["next", "--reviewer", "ana"], ["next", "--reviewer", "ana", "--claim"],
    ["reviewers", "{p}", "add", "zed"], ["reviewers", "{p}", "list"], ["agreement"],
    ["evaluate"], ["export", "--what", "gold", "-o", "{d}/gold.csv"],
    ["label", "--reviewer", "ana", "--from", "{d}/labels.csv"],
]


def test_a_damaged_project_is_refused_before_any_write(sample_project: Path, capsys) -> None:
    folder = sample_project.parent
    (folder / "labels.csv").write_text("pair_id,label\n1,match\n", encoding="utf-8")
    _damage(sample_project)
    before = sample_project.read_bytes()
    for command in DAMAGED_COMMANDS:
        args = [a.format(p=sample_project, d=folder) for a in command]
        if "{p}" not in command:
            args.insert(1, str(sample_project))
        assert main(args) == 2, args
        assert "damaged" in _one_line(capsys), args
        assert sample_project.read_bytes() == before, args
    assert not (folder / "gold.csv").exists()


def test_a_read_only_project_reads_but_refuses_writes(sample_project: Path, capsys) -> None:
    _settled(sample_project)
    os.chmod(sample_project, stat.S_IRUSR)
    try:
        assert main(["status", str(sample_project)]) == 0
        capsys.readouterr()
        for args in (["reviewers", str(sample_project), "add", "zed"],
                     ["next", str(sample_project), "--reviewer", "ana", "--claim"]):
            assert main(args) == 2
            assert "read-only" in _one_line(capsys)
    finally:
        os.chmod(sample_project, stat.S_IRUSR | stat.S_IWUSR)


def test_a_read_only_folder_is_named_as_such(sample_project: Path, capsys) -> None:
    folder = sample_project.parent
    os.chmod(folder, stat.S_IRUSR | stat.S_IXUSR)
    try:
        assert main(["reviewers", str(sample_project), "add", "zed"]) == 2
        err = _one_line(capsys)
    finally:
        os.chmod(folder, stat.S_IRWXU)
    assert "folder" in err and "read-only" in err and "SQLite" not in err


def test_a_project_in_a_missing_folder(tmp_path: Path, capsys) -> None:
    path = tmp_path / "nowhere" / "p.docket"
    assert main(["status", str(path)]) == 2
    assert "does not exist" in _one_line(capsys)
    assert not path.parent.exists()


def test_a_full_disk_is_called_so_and_nothing_is_saved(sample_project: Path) -> None:
    with Project.open(sample_project) as p:
        (item,) = p.next_pairs("ana", 1)
        pages = p.connection.execute("PRAGMA page_count").fetchone()[0]
        # A ceiling on the file's pages is how SQLite lets a test fill the disk.
        p.connection.execute(f"PRAGMA max_page_count = {pages}")
        with pytest.raises(DocketError, match="disk full; nothing was saved"):
            p.decide(item.pair_id, "ana", "match", "n" * 200_000)
        assert not p.connection.in_transaction
        assert p.current_label(item.pair_id, "ana") is None
        p.connection.execute(f"PRAGMA max_page_count = {pages * 10}")
        p.decide(item.pair_id, "ana", "match", "checked")
        assert p.current_label(item.pair_id, "ana") is not None


def test_new_into_a_missing_or_read_only_folder(tmp_path: Path, capsys) -> None:
    from tests.conftest import SAMPLE

    tables = ["--left", str(SAMPLE / "practice_north.csv"), "--right",
              str(SAMPLE / "practice_south.csv"), "--left-id", "client_id", "--right-id", "ref"]
    assert main(["new", str(tmp_path / "nowhere" / "p.docket"), *tables]) == 2
    assert "does not exist" in _one_line(capsys)
    folder = tmp_path / "locked"
    folder.mkdir()
    os.chmod(folder, stat.S_IRUSR | stat.S_IXUSR)
    try:
        assert main(["new", str(folder / "p.docket"), *tables]) == 2
        assert "read-only" in _one_line(capsys)
    finally:
        os.chmod(folder, stat.S_IRWXU)
    assert list(folder.iterdir()) == [] and not (tmp_path / "nowhere").exists()


def test_a_refused_file_is_left_without_a_journal_beside_it(sample_project: Path,
                                                            tmp_path: Path, capsys) -> None:
    # Refusing one still opened it read-only, which leaves -wal and -shm beside a WAL file:
    # another program's database, a newer docket's project, or the project that a --force
    # build then refused for its input
    other = tmp_path / "notes.db"
    conn = sqlite3.connect(other)
    conn.execute("PRAGMA journal_mode = WAL")
    conn.execute("CREATE TABLE note (body TEXT)")
    conn.close()
    newer = tmp_path / "newer.docket"
    newer.write_bytes(sample_project.read_bytes())
    conn = sqlite3.connect(newer)
    conn.execute("PRAGMA user_version = 99")
    conn.close()
    bad = tmp_path / "bad.csv"
    bad.write_text("id,name\n1,Tove\n1,Ivo\n", encoding="utf-8")
    for argv in (["status", str(other)], ["status", str(newer)],
                 ["new", str(sample_project), "--force", "--left", str(bad), "--id", "id"]):
        assert main(argv) == 2
        _one_line(capsys)
        assert sorted(p.name for p in tmp_path.iterdir()) == \
            ["bad.csv", "newer.docket", "notes.db", "vet.docket"], argv


@pytest.mark.parametrize("name", ["a#1.docket", "b?x=1.docket", "c%20d.docket"])
def test_a_project_named_with_uri_characters_opens(name: str, tmp_path: Path, capsys) -> None:
    # the file was built, then each command opened the name cut at '#' or '?' (an empty file
    # it made, read as "not a docket project") or with '%20' read as a space
    left = tmp_path / "t.csv"
    left.write_text("id,name,town\n1,Tove Marsk,Oslo\n2,Tove Mask,Oslo\n", encoding="utf-8")
    project = tmp_path / name
    assert main(["new", str(project), "--left", str(left), "--id", "id"]) == 0
    copy = tmp_path / f"copy#{name}"
    copy.write_bytes(project.read_bytes())
    for argv in (["status", str(project)], ["reviewers", str(project), "add", "bo"],
                 ["next", str(project), "--reviewer", "bo", "--claim"],
                 ["merge", str(project), str(copy)]):
        assert main(argv) == 0, capsys.readouterr().err
    capsys.readouterr()
    with Project.open(project, readonly=True) as opened:
        assert opened.record("left", "2") == {"name": "Tove Mask", "town": "Oslo"}
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted([copy.name, name, "t.csv"])


@pytest.mark.parametrize("edit", [
    "DELETE FROM meta WHERE key = 'fields'", "DELETE FROM meta WHERE key = 'threshold'",
    "UPDATE meta SET value = '{' WHERE key = 'mode'", "DROP TABLE meta"])
@pytest.mark.parametrize("command", ["status", "label"])
def test_a_project_whose_settings_were_cut_is_called_damaged(
        sample_project: Path, tmp_path: Path, capsys, edit: str, command: str) -> None:
    # an SQLite tool's edit (anyone who can write the file can) left 'KeyError: fields' and a
    # traceback from every command
    with sqlite3.connect(sample_project) as conn:
        conn.execute(edit)
    conn.close()
    before = sample_project.read_bytes()
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n1,match\n", encoding="utf-8")
    args = [command, str(sample_project)] + (
        ["--reviewer", "ana", "--from", str(rows)] if command == "label" else [])
    assert main(args) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"docket: {sample_project}: the project file is damaged (its "
                          "settings ") and len(err.splitlines()) == 1, err
    assert sample_project.read_bytes() == before
    assert not Path(f"{sample_project}-wal").exists()  # refused, nothing left beside it
    assert not Path(f"{sample_project}-shm").exists()

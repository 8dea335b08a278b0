"""A project file replaced only when asked, and only when it is a project whose decisions may go."""

from __future__ import annotations

import hashlib
import sqlite3
from pathlib import Path

from docket.core import Project
from docket.tui.cli import main

from .test_bad_input import assert_one_line_error, run, write


def test_refuses_to_overwrite_and_keeps_the_file(tmp_path: Path, good: Path, capsys) -> None:
    project = tmp_path / "p.docket"
    assert main(["new", str(project), "--left", str(good), "--id", "id", "--block", "town"]) == 0
    before = hashlib.sha256(project.read_bytes()).hexdigest()
    code, err = run(capsys, "new", str(project), "--left", str(good), "--id", "id")
    assert_one_line_error(code, err, "already exists", "--force")
    # A failing --force build must not touch the existing project either.
    code, err = run(capsys, "new", str(project), "--left", str(tmp_path / "gone.csv"),
                    "--id", "id", "--force")
    assert code == 2
    assert hashlib.sha256(project.read_bytes()).hexdigest() == before


def test_new_never_replaces_its_own_input_nor_a_file_that_is_no_project(
        good: Path, tmp_path: Path, capsys) -> None:
    # 'docket new good.csv --left good.csv --force' replaced the table of records by the project
    before = good.read_bytes()
    for force in ([], ["--force"]):
        code, err = run(capsys, "new", str(good), "--left", str(good), "--id", "id",
                        "--block", "town", *force)
        assert_one_line_error(code, err, f"{good}: is a file this project is built from",
                              "good.docket")
    assert good.read_bytes() == before
    notes = write(tmp_path / "notes.docket", "not a project\n")
    code, err = run(capsys, "new", str(notes), "--left", str(good), "--id", "id", "--force")
    assert_one_line_error(code, err, "is not a docket project", "--force replaces only")
    assert notes.read_text(encoding="utf-8") == "not a project\n"
    project = tmp_path / "p.docket"
    project.write_bytes(b"")
    for _ in range(2):  # an empty file, then a project: both replaced when asked
        assert main(["new", str(project), "--left", str(good), "--id", "id", "--block", "town",
                     "--force"]) == 0
    capsys.readouterr()


def test_force_over_a_project_with_decisions_needs_discard_decisions(
        good: Path, tmp_path: Path, capsys) -> None:
    # --force rebuilt over the decisions silently: all of them lost
    project = tmp_path / "p.docket"
    argv = ["new", str(project), "--left", str(good), "--id", "id", "--block", "town"]
    assert main(argv) == 0
    with Project.open(project) as p:
        p.decide(p.next_pairs("maya", 1)[0].pair_id, "maya", "match")
    before = project.read_bytes()
    capsys.readouterr()
    code, err = run(capsys, *argv, "--force")
    assert_one_line_error(code, err, f"{project} holds 1 decision by 1 reviewer that --force "
                          "would discard", "--force --discard-decisions")
    assert project.read_bytes() == before
    assert main([*argv, "--force", "--discard-decisions"]) == 0
    with Project.open(project) as p:
        assert p.decisions() == []
    capsys.readouterr()


def test_force_never_replaces_another_programs_database(good: Path, tmp_path: Path,
                                                         capsys) -> None:
    # it was replaced by the project: any SQLite file passed as one
    other = tmp_path / "notes.db"
    conn = sqlite3.connect(other)
    conn.execute("CREATE TABLE note (body TEXT)")
    conn.commit()
    conn.close()
    before = other.read_bytes()
    code, err = run(capsys, "new", str(other), "--left", str(good), "--id", "id", "--force")
    assert_one_line_error(code, err, f"{other}: is an SQLite database of another program",
                          "--force replaces only a project")
    assert other.read_bytes() == before


def test_force_never_replaces_decisions_it_cannot_count(sample_project: Path, good: Path,
                                                       capsys) -> None:
    # a newer docket's project was replaced with its decisions, uncounted, so
    # --discard-decisions was not asked for
    with Project.open(sample_project) as project:
        item = project.next_pairs("ana", 1)[0]
        project.decide(item.pair_id, "ana", "match")
    conn = sqlite3.connect(sample_project)
    conn.execute("PRAGMA user_version = 99")
    conn.close()
    before = hashlib.sha256(sample_project.read_bytes()).hexdigest()
    code, err = run(capsys, "new", str(sample_project), "--left", str(good), "--id", "id",
                    "--force")
    assert_one_line_error(code, err, "written by a newer docket", "cannot tell what decisions",
                          "--force --discard-decisions")
    assert hashlib.sha256(sample_project.read_bytes()).hexdigest() == before
    assert main(["new", str(sample_project), "--left", str(good), "--id", "id", "--force",
                 "--discard-decisions"]) == 0  # said: replaced

"""Every user mistake: one line on stderr naming the file/row/column, exit code 2, and no
project file left behind (or the existing one unchanged)."""

from __future__ import annotations

import hashlib
import os
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main


def run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str]:
    code = main(list(argv))
    err = capsys.readouterr().err
    return code, err


def assert_one_line_error(code: int, err: str, *needles: str) -> None:
    lines = [x for x in err.splitlines() if x.strip()]
    assert code == 2, err
    assert len(lines) == 1, err
    for needle in needles:
        assert needle in lines[0], lines[0]


def write(path: Path, text: str, encoding: str = "utf-8") -> Path:
    path.write_text(text, encoding=encoding)
    return path


CASES = {
    "missing file": (lambda d: d / "nope.csv", ["nope.csv", "no such file"]),
    "unreadable format": (lambda d: write(d / "data.xyz", "x"),
                          ["data.xyz", "unknown file type"]),
    "spreadsheet": (lambda d: write(d / "data.xlsx", "x"),
                    ["data.xlsx: a spreadsheet; save the sheet as CSV"]),
    "compressed": (lambda d: write(d / "data.csv.gz", "x"),
                   ["data.csv.gz: a compressed file; unpack it first"]),
    "folder": (lambda d: (d / "parts").mkdir() or d / "parts",
               ["parts: is a folder, not a file of records", "join its parts into one"]),
    # a named pipe was read twice, and the second read waited for a writer for ever
    "named pipe": (lambda d: os.mkfifo(d / "fifo.csv") or d / "fifo.csv",
                   ["fifo.csv: a pipe or device, not a file; save what it gives to a file"]),
    "device": (lambda _d: Path("/dev/zero"), ["/dev/zero: a pipe or device, not a file"]),
    "garbled parquet": (lambda d: write(d / "bad.parquet", "not parquet"), ["bad.parquet"]),
    "id column missing": (lambda d: write(d / "noid.csv", "key,name\n1,a\n"), ["noid.csv", "'id'"]),
    "empty ids": (lambda d: write(d / "emptyid.csv", "id,name\n1,a\n,b\n"),
                  ["emptyid.csv", "empty on row 3 "]),
    # rows of commas below the data (a spreadsheet's leftovers) were said to lack an id
    "blank rows": (lambda d: write(d / "blank_rows.csv", "id,name\n1,a\n2,b\n,\n,\n"),
                   ["empty on rows 4, 5 (counting the header as row 1); they are empty in every "
                    "column: delete them"]),
    "duplicate ids": (lambda d: write(d / "dup.csv", "id,name\n1,a\n1,b\n2,c\n2,d\n"),
                      ["dup.csv", "duplicate ids", "1, 2"]),
    "empty table": (lambda d: write(d / "empty.csv", "id,name\n"), ["empty.csv", "no records"]),
    "one record": (lambda d: write(d / "one.csv", "id,name\n1,a\n"),
                   ["one.csv", "one record, so no pair", "--right"]),
    "empty file": (lambda d: write(d / "blank.csv", ""), ["blank.csv", "empty"]),
    "no value to compare": (lambda d: write(d / "hollow.csv", "id,email,phone\n1,,\n2, ,\n"),
                            ["hollow.csv", "no column to compare holds values",
                             "email, phone hold none"]),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_bad_left_table(case: str, tmp_path: Path, capsys) -> None:
    make, needles = CASES[case]
    bad = make(tmp_path)
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(bad), "--id", "id")
    assert_one_line_error(code, err, *needles)
    assert not project.exists()
    assert [p.name for p in tmp_path.iterdir() if "docket" in p.name] == []


def test_an_id_column_with_repeats_is_named_without_id(tmp_path: Path, capsys) -> None:
    # no --id: the id-like column is still the one the message is about, with its rows
    bad = write(tmp_path / "dup.csv", "id,name\n1,a\n1,b\n2,c\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(bad))
    assert_one_line_error(code, err, "dup.csv", "column 'id' has duplicate ids", "rows 2, 3")
    assert not (tmp_path / "p.docket").exists()


def test_no_columns_in_common(tmp_path: Path, good: Path, capsys) -> None:
    other = write(tmp_path / "other.csv", "id,colour\n9,red\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(good),
                    "--right", str(other), "--id", "id")
    assert_one_line_error(code, err, "no columns in common", "--map")
    assert not (tmp_path / "p.docket").exists()


@pytest.mark.parametrize(("extra", "needles"), [
    (["--map", "id=ref"], ["--map id=ref: names an id column", "not compared"]),
    (["--map", "name=ref"], ["--map name=ref: names an id column"]),  # (said it had no 'id')
    (["--map", "name=full", "--map", "name=town"],  # the last one won, unsaid
     ["--map pairs left column 'name' with 'full' and with 'town'; keep one"]),
    (["--map", "name=full", "--map", "town=full"],  # one right column compared twice, unsaid
     ["--map pairs right column 'full' with 'name' and with 'town'; keep one"]),
    (["--map", "name=full", "--field", "name:skip", "--field", "town:skip"],  # said "no columns
     ["--field ...:skip leaves no column to compare (skipped: name, town)"]),  # in common"
])
def test_a_map_or_skip_that_leaves_nothing_sensible_says_what(
        extra: list[str], needles: list[str], tmp_path: Path, good: Path, capsys) -> None:
    other = write(tmp_path / "other.csv", "ref,full,town\n9,Anna,Oslo\n8,Jon,Bergen\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(good),
                    "--right", str(other), "--left-id", "id", "--right-id", "ref", *extra)
    assert_one_line_error(code, err, *needles)
    assert not (tmp_path / "p.docket").exists()


@pytest.mark.parametrize(("extra", "said"), [
    (["--field", "name:name", "--field", "name:text"],  # the last one won, unsaid
     "--field gives column 'name' two kinds, name and text; keep one"),
    (["--right-id", "id"],  # ignored, and the id column guessed
     "--right-id id: names the id column of --right, and no --right table is given"),
])
def test_options_that_were_silently_overruled_or_ignored(
        extra: list[str], said: str, tmp_path: Path, good: Path, capsys) -> None:
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(good), *extra)
    assert_one_line_error(code, err, said)
    assert not (tmp_path / "p.docket").exists()


@pytest.mark.parametrize(("rule", "said"), [
    ("name&name", "the key name is given twice"),  # was a KeyError traceback
    ("tokens(name) & town & tokens( name )", "the key tokens(name) is given twice"),
    ("name[:0]", "name[:0] is the same key for every record"),  # paired every record
])
def test_a_blocking_rule_with_a_key_twice(
        rule: str, said: str, tmp_path: Path, good: Path, capsys) -> None:
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(good),
                    "--block", rule)
    assert_one_line_error(code, err, f"--block {rule!r}: {said}")
    assert not (tmp_path / "p.docket").exists()


def test_unknown_ids_in_pairs_file(tmp_path: Path, good: Path, capsys) -> None:
    pairs = write(tmp_path / "pairs.csv", "left_id,right_id\n1,2\n1,77\n99,3\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(good), "--id", "id",
                    "--pairs", str(pairs))
    assert_one_line_error(code, err, "pairs.csv", "99")
    assert not (tmp_path / "p.docket").exists()


def test_a_pairs_file_without_a_header_is_named(tmp_path: Path, good: Path, capsys) -> None:
    # its first pair was read as the header, and left out unsaid (98 of 99 pairs read)
    pairs = write(tmp_path / "pairs.csv", "1,2\n1,3\n2,3\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(good), "--id", "id",
                    "--pairs", str(pairs))
    assert_one_line_error(code, err, "pairs.csv: its first line (1, 2) names two records, so "
                          "it is a pair, not a header; add a first line left_id,right_id")
    assert not (tmp_path / "p.docket").exists()
    write(pairs, "left,right\n1,2\n1,3\n2,3\n")  # a header of other names still serves
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(good), "--id", "id",
                 "--pairs", str(pairs)]) == 0
    capsys.readouterr()
    write(pairs, "1,2\n1,3\n")
    code, err = run(capsys, "score", str(tmp_path / "p.docket"), "--pairs", str(pairs), "-o",
                    str(tmp_path / "scored"))
    assert_one_line_error(code, err, "its first line (1, 2) names two records")
    assert not (tmp_path / "scored").exists()


@pytest.mark.parametrize("command", ["label", "pairs", "matchers", "predictions", "model"])
def test_a_named_pipe_is_refused_by_every_reader(command: str, tmp_path: Path, good: Path,
                                                 capsys) -> None:
    fifo = tmp_path / "fifo.csv"
    os.mkfifo(fifo)
    project = tmp_path / "p.docket"
    if command != "pairs":
        assert main(["new", str(project), "--left", str(good), "--id", "id"]) == 0
        capsys.readouterr()
    argv = {"label": ["label", str(project), "--reviewer", "ana", "--from", str(fifo)],
            "model": ["score", str(project), "--pairs", str(good), "--model", "/dev/zero",
                      "-o", str(tmp_path / "scored")],
            "pairs": ["new", str(project), "--left", str(good), "--id", "id", "--pairs",
                      str(fifo)],
            "matchers": ["matchers", str(project), "import", str(fifo)],
            "predictions": ["evaluate", str(project), "--predictions", str(fifo)]}[command]
    code, err = run(capsys, *argv)
    # a model file is read once, but /dev/zero was read until memory ran out
    assert_one_line_error(code, err, f"{'/dev/zero' if command == 'model' else fifo}: a pipe "
                          "or device, not a file")


def test_rule_over_the_cap_suggests_a_tighter_rule(tmp_path: Path, capsys) -> None:
    oslo = write(tmp_path / "oslo.csv", "id,name,town\n1,Anna,Oslo\n2,Jon,Oslo\n3,Anne,Oslo\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(oslo), "--id", "id",
                    "--block", "town", "--max-pairs", "1")
    assert_one_line_error(code, err, "over the cap", "&")
    assert "the key 'oslo' alone is held by 3 records" in err  # the block that costs


def test_cp1252_file_is_read_with_a_warning(tmp_path: Path, capsys) -> None:
    left = write(tmp_path / "latin.csv", "id,name\n1,Zoë Ågren\n2,Zoe Agren\n3,Per Moe\n",
                 encoding="cp1252")
    code = main(["new", str(tmp_path / "p.docket"), "--left", str(left), "--id", "id",
                 "--block", "name[:1]"])
    assert code == 0
    assert "latin.csv: not valid UTF-8; read as cp1252" in capsys.readouterr().err
    with Project.open(tmp_path / "p.docket", readonly=True) as project:
        assert project.record("left", "1")["name"] == "Zoë Ågren"


def test_a_utf8_file_with_one_latin1_line_is_refused_naming_it(tmp_path: Path, capsys) -> None:
    # read whole as cp1252, every UTF-8 name elsewhere became mojibake ('Zoë' as 'ZoÃ«')
    path = tmp_path / "mixed.csv"
    path.write_bytes("id,name,town\n1,Zoë Ågren,Oslo\n2,Per Moe,Bergen\n".encode()
                     + "3,Per Moe,Tromsø\n".encode("latin-1") + b"4,Kari Lund,Oslo\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(path), "--id", "id")
    assert_one_line_error(code, err, "mixed.csv: line 4, column 'town', is not UTF-8, though the "
                          "file's other lines are", "mixes two encodings")
    assert not (tmp_path / "p.docket").exists()


def test_not_a_project_and_newer_version(tmp_path: Path, capsys) -> None:
    text = write(tmp_path / "notes.docket", "hello")
    code, err = run(capsys, "status", str(text))
    assert_one_line_error(code, err, "not a docket project")
    assert text.read_text() == "hello"
    other = tmp_path / "other.db"
    sqlite3.connect(other).execute("CREATE TABLE t (x)").connection.close()
    code, err = run(capsys, "status", str(other))
    assert_one_line_error(code, err, "not a docket project")


def test_a_pipe_or_device_is_called_so_not_missing_or_empty(sample_project: Path,
                                                             tmp_path: Path, capsys) -> None:
    # status said "an empty file" and merge "no such file" of /dev/null and named pipes
    pipe = tmp_path / "pipe.docket"
    os.mkfifo(pipe)
    for argv in (["status", str(pipe)], ["merge", str(sample_project), str(pipe)],
                 ["merge", str(sample_project), os.devnull]):
        code, err = run(capsys, *argv)
        assert_one_line_error(code, err, "a device, pipe or socket", "not")


@pytest.mark.parametrize("size, said", [(0, "an empty file"), (50, "only 50 bytes: not")])
def test_an_empty_or_cut_short_file_is_called_so(size: int, said: str, sample_project: Path,
                                                 tmp_path: Path, capsys) -> None:
    short = tmp_path / "short.docket"
    short.write_bytes(sample_project.read_bytes()[:size])  # the start of a real project
    code, err = run(capsys, "reviewers", str(short), "add", "zed")
    assert_one_line_error(code, err, "short.docket", said, "not a docket project", "backup")
    assert short.stat().st_size == size


def test_newer_schema_is_refused_untouched(sample_project: Path, capsys) -> None:
    conn = sqlite3.connect(sample_project)
    conn.execute("PRAGMA user_version = 99")
    conn.close()
    before = hashlib.sha256(sample_project.read_bytes()).hexdigest()
    code, err = run(capsys, "status", str(sample_project))
    assert_one_line_error(code, err, "newer docket")
    assert hashlib.sha256(sample_project.read_bytes()).hexdigest() == before


@pytest.mark.parametrize(("body", "needle"), [
    ("pair_id,label\n999999,match\n", "unknown pair id"),
    ("pair_id,label\n1,maybe\n", "label 'maybe'"),
    ("left_id,right_id,label\nN-00001,S-99999,match\n", "1 pair is not a candidate pair"),
    ("who,label\n1,match\n", "pair_id"),
])
def test_bad_label_file_writes_nothing(sample_project: Path, tmp_path: Path, capsys,
                                       body: str, needle: str) -> None:
    labels = write(tmp_path / "labels.csv", body)
    code, err = run(capsys, "label", str(sample_project), "--reviewer", "maya", "--from",
                    str(labels))
    assert_one_line_error(code, err, needle)
    n = sqlite3.connect(sample_project).execute("SELECT count(*) FROM decisions").fetchone()[0]
    assert n == 0


def test_real_process_exit_code_and_no_traceback(tmp_path: Path) -> None:
    done = subprocess.run([sys.executable, "-m", "docket.tui.cli", "new", str(tmp_path / "x"),
                           "--left", str(tmp_path / "missing.csv")], capture_output=True,
                          text=True)
    assert done.returncode == 2
    assert "Traceback" not in done.stderr and len(done.stderr.strip().splitlines()) == 1


def test_one_table_given_as_both_sides_is_refused(good: Path, tmp_path: Path, capsys) -> None:
    # linked with itself, every record was its own best candidate
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(good), "--right",
                    str(tmp_path / "." / good.name), "--id", "id")
    assert_one_line_error(code, err, "given as both --left and --right", "--left alone")
    assert not project.exists()


@pytest.mark.parametrize("argv", [
    ["label", "{p}", "--reviewer", "", "--from", "{labels}"],
    ["next", "{p}", "--reviewer", "", "--claim"],
    ["next", "{p}", "--reviewer", ""],
    ["missed", "{p}", "add", "N-00001", "S-10001", "--reviewer", ""],
    ["reviewers", "{p}", "add", "ines", "--by", ""],
])
def test_a_reviewer_given_empty_is_refused(argv: list[str], sample_project: Path,
                                           tmp_path: Path, capsys) -> None:
    # '--reviewer "$WHO"' with $WHO unset recorded a file of labels as the user's own name
    labels = write(tmp_path / "labels.csv", "pair_id,label\n1,match\n")
    before = hashlib.sha256(sample_project.read_bytes()).hexdigest()
    code, err = run(capsys, *[a.format(p=sample_project, labels=labels) for a in argv])
    option = "--by" if "--by" in argv else "--reviewer"
    assert_one_line_error(code, err, f"{option} '': a reviewer needs a name")
    assert hashlib.sha256(sample_project.read_bytes()).hexdigest() == before

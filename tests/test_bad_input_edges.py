"""The rest of the bad-input corpus: wide and oddly encoded files, colliding names, ids that
differ only in spaces, ragged rows, other separators, JSON arrays, pairs and label files with
odd rows, option values out of range and misspelled words. Refusals are one line, exit 2,
nothing written; what docket reads anyway it reads correctly and says how."""

from __future__ import annotations

import codecs
import gzip
import json
import sqlite3
from pathlib import Path

import pytest

from docket.core import Project
from docket.tui.cli import main

from .test_bad_input import assert_one_line_error, run, write


def _wide(d: Path) -> Path:
    cols = ["id"] + [f"c{i}" for i in range(2000)]  # a table too wide for one statement
    return write(d / "wide.csv", ",".join(cols) + "\n"
                 + "".join(",".join([str(r)] + ["v"] * 2000) + "\n" for r in range(3)))


def _utf16_no_bom(d: Path) -> Path:
    path = d / "nobom.csv"
    path.write_bytes("id,name\n1,Åse\n2,Ola\n".encode("utf-16-le"))
    return path


def _bytes(path: Path, data: bytes) -> Path:
    path.write_bytes(data)
    return path


CASES = {
    "2,001 columns": (_wide, ["wide.csv", "2,001 columns", "999"]),
    "names collide after trimming": (lambda d: write(d / "trim.csv", "id,name, name \n1,a,b\n"),
                                     ["trim.csv", "columns 2 and 3", "'name'", "rename"]),
    "names repeated": (lambda d: write(d / "rep.csv", "id,name,name\n1,a,b\n"),
                       ["rep.csv", "columns 2 and 3"]),
    "ids differ in spaces only": (lambda d: write(d / "sp.csv", "id,name\n1,a\n 1,b\n1 ,c\n"),
                                  ["sp.csv", "'1', ' 1', '1 '", "rows 2, 3, 4", "trim"]),
    # two records whose ids look alike on every screen: 'José' typed on two systems
    "ids differ in accent encoding only": (
        lambda d: write(d / "nfd.csv", "id,name\nJos\u00e9,a\nAnna,b\nJose\u0301,c\n"),
        ["nfd.csv: column 'id' holds ids that differ only in how their accents are encoded",
         "('Jos\\xe9', 'Jose\\u0301' on rows 2, 4", "composed (NFC)"]),
    "short row": (lambda d: write(d / "short.csv", "id,a,b,c,d,e,f,g\n1,2,3,4,5,6,7,8\n2,x,y\n"),
                  ["short.csv", "line 3", "3 of the header's 8"]),
    "long row": (lambda d: write(d / "long.csv", "id,a\n1,2\n2,3,4,5\n"),
                 ["long.csv", "line 3", "4 of the header's 2"]),
    # pandas said "EOF inside string starting at row 1"; a row that swallowed lines was
    # named by its last line, far from the quote
    "quote left open": (lambda d: write(d / "open.tsv", 'id\tname\n1\t"Ann\n2\tBo\n3\tCy\n'),
                        ["open.tsv: line 2: a value opens a quote that never closes"]),
    "quote closed late": (lambda d: write(d / "late.csv",
                                          'id,name,town\n1,"Ann,Oslo\n2,Bo,Oslo\n3,Cy",x,y\n'),
                          ["late.csv: line 2 has 4 of the header's 3 fields (a value there "
                           "opens a quote that closes only on line 4"]),
    "JSON array of numbers": (lambda d: write(d / "nums.json", json.dumps(list(range(305)))),
                              ["nums.json", "item 1", "is a number, not an object"]),
    "JSON object of records": (lambda d: write(d / "wrap.json", json.dumps(
        {"records": [{"id": 1, "name": "a"}, {"id": 2, "name": "b"}]})),
        ["wrap.json", "record 1, 'records' holds a list", "flat object"]),
    # the reader kept 'Bo' silently, where a CSV header with a column twice is refused
    "JSON lines with a key twice": (lambda d: write(d / "twice.jsonl", '{"id": 1, "name": "Ana"}\n'
                                                    '{"id": 2, "name": "Ana", "name": "Bo"}\n'),
                                    ["twice.jsonl: line 2 gives the key 'name' twice"]),
    "JSON array with a key twice": (lambda d: write(d / "twice.json", '[{"id": 1, "id": 2}]'),
                                    ["twice.json: an object gives the key 'id' twice"]),
    "JSON lines with a nested object": (lambda d: write(d / "nest.jsonl", '{"id": 1, "at": '
                                                        '{"town": "Oslo"}}\n{"id": 2}\n'),
                                        ["nest.jsonl", "record 1, 'at' holds an object"]),
    "UTF-16 without a mark": (_utf16_no_bom, ["nobom.csv", "byte-order mark", "UTF-8"]),
    "gzip under a .csv name": (lambda d: _bytes(d / "gz.csv", gzip.compress(b"id,name\n1,a\n")),
                               ["gz.csv", "gzip-compressed", "unpack it"]),
    # each was "not utf-8 text; save it as UTF-8"
    "gzip under a .jsonl name": (lambda d: _bytes(d / "gz.jsonl", gzip.compress(b'{"id": 1}\n')),
                                 ["gz.jsonl", "gzip-compressed", "unpack it"]),
    "Parquet under a .jsonl name": (lambda d: _bytes(d / "pq.jsonl", b"PAR1" + b"\0" * 40
                                                     + b"PAR1"),
                                    ["pq.jsonl: a Parquet file; name it .parquet"]),
    "a spreadsheet under a .csv name": (lambda d: _bytes(d / "s.csv", b"PK\x03\x04" + b"\0" * 40),
                                        ["s.csv", "zip archive", "save the sheet as CSV"]),
    "bytes that are no text": (lambda d: _bytes(d / "b.csv", b"id,name\n1,\xff\x81\n"),
                               ["b.csv", "neither UTF-8 nor cp1252"]),
    # pandas named a byte offset in the whole file, or ended in a TypeError traceback
    "JSON lines, one broken": (lambda d: write(d / "b.jsonl", '{"id": 1}\n\n{"id": 2,\n'),
                               ["b.jsonl: line 3 is not valid JSON", "one JSON object per line"]),
    "JSON lines, one a number": (lambda d: write(d / "n.jsonl", '{"id": 1}\n5\n'),
                                 ["n.jsonl: line 2 is a number, not an object"]),
    "JSON lines, one an array": (lambda d: write(d / "a.jsonl", '{"id": 1}\n[1, 2]\n'),
                                 ["a.jsonl: line 2 is an array, not an object"]),
    "a column named rowid": (lambda d: write(d / "rid.csv", "id,ROWID,town\n1,a,x\n2,b,x\n"),
                             ["rid.csv", "column 'ROWID'", "rename it"]),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_refused_tables(case: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    make, needles = CASES[case]
    bad = make(tmp_path)
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(bad), "--id", "id")
    assert_one_line_error(code, err, *needles)
    assert not project.exists()
    assert [p.name for p in tmp_path.iterdir() if "docket" in p.name] == []


def _build(capsys: pytest.CaptureFixture[str], tmp_path: Path, left: Path,
           *extra: str) -> tuple[Project, str]:
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--id", "id", "--block", "town",
                 *extra]) == 0, capsys.readouterr().err
    return Project.open(path, readonly=True), capsys.readouterr().err


TOWNS = "id,name,town\n1,Åse Berg,Oslo\n2,Ase Berg,Oslo\n3,Jon Ørn,Bergen\n4,Jon Orn,Bergen\n"


@pytest.mark.parametrize("encoding", ["utf-8-sig", "utf-16", "utf-16-be", "utf-32"])
def test_text_with_a_byte_order_mark_is_read_in_its_encoding(
        encoding: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "t.csv"
    data = TOWNS.encode(encoding)
    if encoding == "utf-16-be":  # Python writes no mark for an explicit byte order
        data = codecs.BOM_UTF16_BE + data
    path.write_bytes(data)
    project, err = _build(capsys, tmp_path, path)
    with project:
        assert project.record("left", "1")["name"] == "Åse Berg"
        assert project.record("left", "3")["town"] == "Bergen"
    assert "warning" not in err


@pytest.mark.parametrize("sep, said", [(";", "semicolons"), ("\t", "tabs"), ("|", "bars")])
def test_other_separators_in_a_csv_are_read_and_named(
        sep: str, said: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    left = write(tmp_path / "semi.csv", TOWNS.replace(",", sep))
    project, err = _build(capsys, tmp_path, left)
    with project:
        assert project.record("left", "2") == {"name": "Ase Berg", "town": "Oslo"}
    assert f"separated by {said}, not commas" in err and "semi.csv" in err


def test_json_array_of_objects_is_read(tmp_path: Path, capsys: pytest.CaptureFixture[str]
                                       ) -> None:
    rows = [dict(zip(["id", "name", "town"], line.split(","), strict=True))
            for line in TOWNS.splitlines()[1:]]
    left = write(tmp_path / "people.json", json.dumps(rows, indent=1))
    project, _ = _build(capsys, tmp_path, left)
    with project:
        assert project.record("left", "4") == {"name": "Jon Orn", "town": "Bergen"}


def test_self_and_repeated_pairs_are_counted_and_named(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]) -> None:
    left = write(tmp_path / "t.csv", TOWNS)
    pairs = write(tmp_path / "pairs.csv",
                  "left_id,right_id\n1,2\n3,3\n2,1\n3,4\n1,2\n4,4\n")
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--id", "id", "--pairs",
                 str(pairs)]) == 0
    err = capsys.readouterr().err
    assert "pairs.csv" in err and "2 pairs of a record with itself, rows 3, 7" in err
    assert "2 pairs given before" in err and "rows 4, 6" in err
    with Project.open(path, readonly=True) as project:
        assert project.connection.execute("SELECT count(*) FROM pairs").fetchone()[0] == 2


def test_one_self_pair_and_one_repeat_are_worded_in_the_singular(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    left = write(tmp_path / "t.csv", TOWNS)
    pairs = write(tmp_path / "pairs.csv", "left_id,right_id\n1,2\n3,3\n2,1\n")
    assert main(["new", str(tmp_path / "p.docket"), "--left", str(left), "--id", "id",
                 "--pairs", str(pairs)]) == 0
    err = capsys.readouterr().err
    assert "1 pair of a record with itself, row 3;" in err
    assert "1 pair given before (the same two ids, in either order), row 4;" in err


def test_label_refuses_a_fractional_pair_id(sample_project: Path, tmp_path: Path,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    labels = write(tmp_path / "labels.csv", "pair_id,label\n2,match\n1.7,match\n")
    code, err = run(capsys, "label", str(sample_project), "--reviewer", "maya",
                    "--from", str(labels))
    assert_one_line_error(code, err, "labels.csv", "row 3", "'1.7'", "whole number")
    with sqlite3.connect(sample_project) as conn:
        assert conn.execute("SELECT count(*) FROM decisions WHERE reviewer = 'maya'"
                            ).fetchone()[0] == 0


OPTION_CASES = {
    "threshold above 1": (["new", "P", "--left", "L", "--threshold", "1.5"],
                          ["--threshold", "1.5", "0 to 1"]),
    "threshold below 0": (["new", "P", "--left", "L", "--threshold", "-0.1"], ["--threshold"]),
    "threshold not a number": (["new", "P", "--left", "L", "--threshold", "half"],
                               ["--threshold", "'half' is not a number"]),
    "audit 0": (["new", "P", "--left", "L", "--audit", "0"], ["--audit", "1 or more"]),
    "overlap above 1": (["new", "P", "--left", "L", "--overlap", "2"], ["--overlap"]),
    "test share above 1": (["export", "P", "-o", "x.csv", "--test-share", "1.2"],
                           ["--test-share"]),
    "negative count": (["next", "P", "--reviewer", "m", "-n", "-1"], ["-n", "0 or more"]),
    "target precision": (["evaluate", "P", "--target-precision", "95"], ["--target-precision"]),
    "misspelled option": (["new", "P", "--left", "L", "--treshold", "0.5"],
                          ["--treshold", "did you mean --threshold?"]),
    "misspelled command": (["stauts", "P"], ["'stauts'", "did you mean 'status'?"]),
    "misspelled choice": (["export", "P", "-o", "x.csv", "--what", "gld"],
                          ["'gld'", "did you mean 'gold'?"]),
    "misspelled sub-command option": (["reviewers", "P", "add", "ines", "--roel", "adjudicator"],
                                      ["did you mean --role?"]),
    "count past SQLite's integers": (["next", "P", "--reviewer", "m", "-n", "9" * 20],
                                     ["-n", "too large", "1,000,000,000"]),
    "negative seed": (["new", "P", "--left", "L", "--seed", "-5"], ["--seed", "0 or more"]),
    "workers by the thousand": (["new", "P", "--left", "L", "--workers", "100000"],
                                ["--workers", "at most 256"]),
    # float() reads these, and the table then fell over formatting them (a traceback)
    "thresholds not a number": (["evaluate", "P", "--thresholds", "0.5,nan"],
                                ["--thresholds", "'0.5,nan': give numbers"]),
    "thresholds infinite": (["evaluate", "P", "--thresholds", "inf"], ["'inf': give numbers"]),
    "predictions threshold nan": (["evaluate", "P", "--predictions", "x.csv", "--threshold",
                                   "nan"], ["--threshold", "'nan' is not a number"]),
    # an unset shell variable: read as '.' ("a folder"), or an option left out altogether
    "empty predictions": (["evaluate", "P", "--predictions", ""],
                          ["argument --predictions: an empty path"]),
    "empty pairs": (["new", "P", "--left", "L", "--pairs", ""], ["argument --pairs: an empty"]),
    "empty project": (["reviewers", "", "list"], ["argument project: an empty path"]),
    "empty output": (["export", "P", "-o", " "], ["argument -o/--output: an empty path"]),
    "empty copy": (["merge", "P", "P", ""], ["argument OTHER: an empty path"]),
    # read as not given: the id column was guessed, every matcher taken
    "empty id column": (["new", "P", "--left", "L", "--left-id", " "],
                        ["argument --left-id: an empty column name; give one, or leave"]),
    "empty list of matchers": (["matchers", "P", "queue", "disagreement", "--of", ","],
                               ["argument --of: an empty list of names"]),
    "empty scheduler": (["new", "P", "--left", "L", "--engine", "dask", "--scheduler", ""],
                        ["argument --scheduler: an empty address"]),
}


@pytest.mark.parametrize("case", sorted(OPTION_CASES))
def test_option_mistakes(case: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    argv, needles = OPTION_CASES[case]
    argv = [str(tmp_path / "p.docket") if a == "P" else str(tmp_path / "l.csv") if a == "L"
            else a for a in argv]
    with pytest.raises(SystemExit) as done:
        main(argv)
    err = capsys.readouterr().err
    assert_one_line_error(int(done.value.code or 0), err, *needles)
    assert list(tmp_path.iterdir()) == []


def test_a_capped_audit_size_is_said(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    left = write(tmp_path / "t.csv", TOWNS)
    _, err = _build(capsys, tmp_path, left, "--audit", "999999")
    assert "--audit 999,999: capped at" in err


@pytest.mark.parametrize("rows, needles", [
    ("1,1\n2,2\n", ["2 pairs of a record with itself, left out", "no pair of two different"]),
    ("", ["holds no pair of two different records"]),
    ("1, 2\n", ["1 right id not in t.csv: ' 2'", "exactly as the records have them"]),
])
def test_a_pairs_file_with_nothing_to_review_is_one_line(
        rows: str, needles: list[str], tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    left = write(tmp_path / "t.csv", TOWNS)
    pairs = write(tmp_path / "pairs.csv", "left_id,right_id\n" + rows)
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--id", "id",
                    "--pairs", str(pairs))
    assert_one_line_error(code, err, "pairs.csv", *needles)
    assert not project.exists()


def test_columns_the_text_index_keeps_for_itself_are_read_and_found(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # FTS5 refuses columns named rank or after its own table ("reserved fts5 column name")
    left = write(tmp_path / "r.csv", "id,rank,left_records_fts,town\n1,first,p,Oslo\n"
                 "2,first,q,Oslo\n3,third,r,Bergen\n")
    project, _ = _build(capsys, tmp_path, left)
    with project:
        assert project.record("left", "1") == {"rank": "first", "left_records_fts": "p",
                                               "town": "Oslo"}
        assert project.find("first") == [1]  # by substring: the column is not in the index


def test_a_scheduler_without_dask_is_refused(tmp_path: Path,
                                             capsys: pytest.CaptureFixture[str]) -> None:
    left = write(tmp_path / "t.csv", TOWNS)
    project = tmp_path / "p.docket"
    code, err = run(capsys, "new", str(project), "--left", str(left), "--scheduler", "tcp://h:1")
    assert_one_line_error(code, err, "--scheduler tcp://h:1", "add --engine dask")
    assert not project.exists()


def test_the_model_is_not_written_in_another_format(sample_project: Path, tmp_path: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "model.parquet"
    code, err = run(capsys, "export", str(sample_project), "--what", "model", "-o", str(out),
                    "--format", "parquet")
    assert_one_line_error(code, err, "--format parquet", "always a JSON file")
    assert not out.exists()
    # named like a table, it was written as JSON all the same, unsaid
    out = tmp_path / "model.csv"
    code, err = run(capsys, "export", str(sample_project), "--what", "model", "-o", str(out))
    assert_one_line_error(code, err, "model.csv: the model is a JSON file, not a table",
                          f"name it {tmp_path / 'model.json'}")
    assert not out.exists()


def test_ids_that_differ_only_in_letter_case_are_read_and_named(tmp_path: Path,
                                                                 capsys) -> None:
    # read as two records, as ids are matched exactly, and said nothing of: a spreadsheet's
    # lookup, or a database's case-blind collation, takes 'ab12' and 'AB12' for one id
    left = write(tmp_path / "case.csv", "id,name\nab12,Ann Vale\nAB12,Ann Vale\nc3,Bo Moor\n"
                 "d4,Cy Ford\nX,Di Hale\nx,Di Hale\n")
    project = tmp_path / "p.docket"
    assert main(["new", str(project), "--left", str(left), "--id", "id"]) == 0
    err = capsys.readouterr().err
    assert (f"{left}: column 'id' holds ids that differ only in letter case ('ab12', 'AB12' "
            "on rows 2, 3 (counting the header as row 1), and 1 more such set); each is a "
            "record of its own") in err, err
    with Project.open(project, readonly=True) as p:
        assert {"ab12", "AB12", "X", "x"} <= p.record_ids("left")

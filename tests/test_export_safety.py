"""Exports hold records: private file mode, no spreadsheet formulas, exact CSV round trips,
and no shared temporary file between two exports to one path."""

from __future__ import annotations

import json
import os
import stat
from pathlib import Path

import pandas as pd
import pytest

from docket.core import DocketError, Project
from docket.core.exports.exporting import atomic_write
from docket.tui.cli import main

# Cells a spreadsheet would run (OWASP "CSV Injection": = + - @ tab CR), and values holding a
# bare CR or LF in the middle, which must be quoted to stay one row.
TRICKY = ["=HYPERLINK(\"http://x\")", "+41 22", "-3", "@SUM(A1)", "\tlead", "\rlead",
          "Anna\rBerg", "Jon\nDahl", "Kari\r\nLund", 'say "hi", then go', "plain", "Åse Ørn",
          "x\r"]


def _table(path: Path, prefix: str) -> Path:
    rows = [{"id": f"{prefix}{k}", "name": v, "town": "Oslo"} for k, v in enumerate(TRICKY)]
    path.write_text("".join(json.dumps(r) + "\n" for r in rows), encoding="utf-8")
    return path


@pytest.fixture
def project(tmp_path: Path) -> Path:
    left, right = _table(tmp_path / "l.jsonl", "L"), _table(tmp_path / "r.jsonl", "R")
    pairs = tmp_path / "pairs.csv"
    pairs.write_text("left_id,right_id\n" + "".join(f"L{k},R{k}\n" for k in range(len(TRICKY))),
                     encoding="utf-8")
    path = tmp_path / "p.docket"
    assert main(["new", str(path), "--left", str(left), "--right", str(right), "--id", "id",
                 "--pairs", str(pairs)]) == 0
    with Project.open(path) as opened:
        for item in opened.next_pairs("maya", 100):
            opened.decide(item.pair_id, "maya", "match")
    return path


def _read(path: Path) -> pd.DataFrame:
    return pd.read_csv(path, dtype=str, keep_default_na=False)


def test_exports_are_private_and_stay_private(project: Path, tmp_path: Path,
                                              capsys: pytest.CaptureFixture[str]) -> None:
    old = os.umask(0o022)  # the usual umask, under which a plain file would be 0644
    try:
        for what, name in (("scores", "s.csv"), ("gold", "g.parquet"), ("training", "t.jsonl"),
                           ("clusters", "c.csv")):
            target = tmp_path / name
            assert main(["export", str(project), "--what", what, "-o", str(target)]) == 0
            assert stat.S_IMODE(target.stat().st_mode) == 0o600, name
            assert main(["export", str(project), "--what", what, "-o", str(target)]) == 0
            assert stat.S_IMODE(target.stat().st_mode) == 0o600, f"{name} re-exported"
        lm = tmp_path / "lm.jsonl"
        assert main(["export", str(project), "--what", "gold", "--for-lm", "-o", str(lm)]) == 0
        assert stat.S_IMODE(lm.stat().st_mode) == 0o600
        wide = tmp_path / "wide.csv"
        wide.write_text("x")
        wide.chmod(0o644)
        assert main(["export", str(project), "-o", str(wide)]) == 0
        assert stat.S_IMODE(wide.stat().st_mode) == 0o600  # an export never widens, nor keeps wide
    finally:
        os.umask(old)
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".partial")] == []


def test_csv_round_trip_through_pandas_with_bare_cr(project: Path, tmp_path: Path) -> None:
    gold, training = tmp_path / "gold.csv", tmp_path / "training.csv"
    assert main(["export", str(project), "--what", "gold", "-o", str(gold)]) == 0
    assert len(_read(gold)) == len(TRICKY) == 13
    assert main(["export", str(project), "--what", "training", "-o", str(training),
                 "--no-formula-guard"]) == 0
    back = _read(training)
    assert len(back) == 13
    assert sorted(back["left_name"]) == sorted(TRICKY)
    assert sorted(back["right_name"]) == sorted(TRICKY)


def test_formula_guard_and_its_off_switch(project: Path, tmp_path: Path) -> None:
    guarded, raw = tmp_path / "guarded.csv", tmp_path / "raw.csv"
    assert main(["export", str(project), "--what", "training", "-o", str(guarded)]) == 0
    assert main(["export", str(project), "--what", "training", "-o", str(raw),
                 "--no-formula-guard"]) == 0
    shown = dict(zip(_read(raw)["left_name"], _read(guarded)["left_name"], strict=True))
    for value in TRICKY:
        risky = value[:1] in ("=", "+", "-", "@", "\t", "\r")
        assert shown[value] == ("'" + value if risky else value), repr(value)
    # Numbers are not formulas: a negative weight in the scores export stays a number.
    scores = tmp_path / "scores.csv"
    assert main(["export", str(project), "-o", str(scores)]) == 0
    assert pd.read_csv(scores)["log_odds"].dtype.kind == "f"
    # Parquet keeps values exact: no spreadsheet opens it as text.
    parquet = tmp_path / "t.parquet"
    assert main(["export", str(project), "--what", "training", "-o", str(parquet)]) == 0
    assert sorted(pd.read_parquet(parquet)["left_name"]) == sorted(TRICKY)


def test_two_exports_to_one_path_at_once_do_not_collide(tmp_path: Path) -> None:
    # The inner export runs while the outer one still has its temporary open: with one
    # shared temporary name the outer rename would find its file gone.
    target = tmp_path / "out.csv"
    seen: list[Path] = []

    def outer(tmp: Path) -> None:
        seen.append(tmp)
        tmp.write_text("outer\n", encoding="utf-8")
        atomic_write(target, inner)
        assert tmp.read_text(encoding="utf-8") == "outer\n"

    def inner(tmp: Path) -> None:
        seen.append(tmp)
        tmp.write_text("inner\n", encoding="utf-8")

    atomic_write(target, outer)
    assert seen[0] != seen[1]
    assert target.read_text(encoding="utf-8") == "outer\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out.csv"]


def test_a_failed_export_leaves_no_temporary(tmp_path: Path) -> None:
    def broken(tmp: Path) -> None:
        tmp.write_text("half", encoding="utf-8")
        raise OSError(28, "No space left on device")

    with pytest.raises(DocketError, match="disk full; nothing was written"):
        atomic_write(tmp_path / "out.csv", broken)
    assert list(tmp_path.iterdir()) == []


def test_an_export_into_a_missing_folder_names_the_folder(tmp_path: Path) -> None:
    target = tmp_path / "absent" / "gold.csv"
    with pytest.raises(DocketError, match=r"the folder .*absent does not exist"):
        atomic_write(target, lambda p: p.write_text("x", encoding="utf-8"))
    assert not (tmp_path / "absent").exists()


def test_an_export_never_replaces_a_project(sample_project: Path, tmp_path: Path,
                                            capsys) -> None:
    # '-o vets.docket --format csv' wrote the gold labels over the project and its decisions
    other = tmp_path / "other.docket"
    other.write_bytes(sample_project.read_bytes())
    for target, extra in ((sample_project, ["--format", "csv"]), (other, ["--format", "jsonl"]),
                          (other, ["--for-lm", "--format", "jsonl"])):
        before = target.read_bytes()
        assert main(["export", str(sample_project), "--what", "gold", "-o", str(target),
                     *extra]) == 2
        err = capsys.readouterr().err.strip()
        assert err == (f"docket: {target}: is an SQLite database (a docket project?), which an "
                       "export never replaces; write the export to another file")
        assert target.read_bytes() == before
    with pytest.raises(DocketError, match="never replaces"):
        atomic_write(other, lambda tmp: tmp.write_text("x", encoding="utf-8"))
    cut = tmp_path / "cut.docket"  # a damaged project is a project still
    cut.write_bytes(sample_project.read_bytes()[:50_000])
    with pytest.raises(DocketError, match="never replaces"):
        atomic_write(cut, lambda tmp: tmp.write_text("x", encoding="utf-8"))


def test_an_export_writes_into_a_pipe_or_device_and_keeps_a_link(project: Path,
                                                                  tmp_path: Path) -> None:
    # '-o /dev/null' renamed a temporary over /dev/null (as root: the device was gone), and a
    # named pipe or a symbolic link was replaced by a plain file the same way
    import threading
    pipe = tmp_path / "pipe"
    os.mkfifo(pipe)
    for fmt in ("csv", "parquet"):
        got: list[bytes] = []
        reader = threading.Thread(target=lambda got=got: got.append(pipe.read_bytes()))
        reader.start()
        assert main(["export", str(project), "--format", fmt, "-o", str(pipe)]) == 0
        reader.join(timeout=30)
        assert stat.S_ISFIFO(pipe.stat().st_mode), fmt  # still the pipe
        (tmp_path / f"read.{fmt}").write_bytes(got[0])
    assert len(pd.read_parquet(tmp_path / "read.parquet")) == len(_read(tmp_path / "read.csv"))
    real = tmp_path / "real.csv"
    real.write_text("old\n", encoding="utf-8")
    (tmp_path / "link.csv").symlink_to(real.name)
    assert main(["export", str(project), "-o", str(tmp_path / "link.csv")]) == 0
    assert (tmp_path / "link.csv").is_symlink() and real.read_text().startswith("pair_id,")


def test_an_export_to_a_terminal_device_or_a_project_on_a_pipe_is_refused(
        project: Path, tmp_path: Path, capsys) -> None:
    main_end, tty_end = os.openpty()
    try:
        assert main(["export", str(project), "--format", "csv", "-o", os.ttyname(tty_end)]) == 2
        assert "is a terminal; show the export there with -o -" in capsys.readouterr().err
    finally:
        os.close(main_end)
        os.close(tty_end)
    pipe = tmp_path / "pipe"
    os.mkfifo(pipe)
    left = tmp_path / "l.jsonl"
    assert main(["new", str(pipe), "--left", str(left), "--id", "id", "--force"]) == 2
    assert "is a device, pipe or socket, not a file" in capsys.readouterr().err
    assert stat.S_ISFIFO(pipe.stat().st_mode)


def _tiny_project(left: Path, right: Path, tmp_path: Path) -> Path:
    """A project of the two tiny tables, every pair a candidate."""
    project = tmp_path / "tiny.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "*"]) == 0
    return project


def test_an_export_never_replaces_a_table_the_project_was_built_from(
        tiny_tables: tuple[Path, Path], tmp_path: Path, capsys) -> None:
    # '-o left.csv' (a slip of tab completion) wrote the scores over the left table's records
    left, right = tiny_tables
    project = _tiny_project(left, right, tmp_path)
    tables = left.read_bytes(), right.read_bytes()
    capsys.readouterr()
    for what, target in (("scores", left), ("gold", right)):
        assert main(["export", str(project), "--what", what, "-o", str(target)]) == 2
        err = capsys.readouterr().err
        assert f"{target}: is the " in err and "which an export never replaces" in err, err
    assert (left.read_bytes(), right.read_bytes()) == tables
    # a file of that name elsewhere that does not hold the table's id column is replaced
    elsewhere = tmp_path / "other" / left.name
    elsewhere.parent.mkdir()
    elsewhere.write_text("pair_id,label\n", encoding="utf-8")
    assert main(["export", str(project), "--what", "scores", "-o", str(elsewhere)]) == 0


def test_an_export_through_a_link_never_replaces_a_table_either(
        tiny_tables: tuple[Path, Path], tmp_path: Path, capsys) -> None:
    # the export replaces the file a link names, and the check went by the link's own name:
    # '-o latest.csv', a link to the left table, wrote the scores over its records
    left, right = tiny_tables
    project = _tiny_project(left, right, tmp_path)
    table = left.read_bytes()
    link = tmp_path / "latest.csv"
    link.symlink_to(left)
    capsys.readouterr()
    assert main(["export", str(project), "--what", "scores", "-o", str(link)]) == 2
    err = capsys.readouterr().err
    assert f"{link}: is the left table this project was built from" in err, err
    assert left.read_bytes() == table and link.is_symlink()


def test_an_export_to_a_folder_asks_for_a_file_in_it(project: Path, tmp_path: Path,
                                                     capsys) -> None:
    # '-o .' was "cannot tell the format from the extension", and with --format csv
    # "cannot write (Device or resource busy)"
    folder = tmp_path / "out"
    folder.mkdir()
    for extra, example in (([], "scores.csv"), (["--format", "csv"], "scores.csv"),
                           (["--what", "gold", "--for-lm"], "gold.jsonl"),
                           (["--what", "model"], "model.json")):
        assert main(["export", str(project), "-o", str(folder), *extra]) == 2
        err = capsys.readouterr().err.strip()
        assert err == (f"docket: {folder}: is a folder; give the export a file name in it, as "
                       f"{folder / example}"), err
    assert list(folder.iterdir()) == []


def test_a_format_its_name_contradicts_is_refused(sample_project: Path, tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    # '-o x.parquet --format csv' wrote CSV into a file every Parquet reader then refused
    out = tmp_path / "x.parquet"
    assert main(["export", str(sample_project), "-o", str(out), "--format", "csv"]) == 2
    err = capsys.readouterr().err
    assert "its name says parquet but --format csv" in err and "x.csv" in err
    assert len(err.strip().splitlines()) == 1 and not out.exists()
    # a name that says no format is the user's choice
    assert main(["export", str(sample_project), "-o", str(tmp_path / "x.txt"),
                 "--format", "csv"]) == 0

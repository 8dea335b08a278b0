"""One label file run twice at once (two terminals, a script started twice): each decision is
logged once, whichever process writes it."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from docket.core import Project
from docket.core.reviewing.bulk import BulkRow, apply_rows
from docket.tui.cli import main

REPO = Path(__file__).resolve().parent.parent


def _log(path: Path, reviewer: str) -> list[int]:
    with Project.open(path) as p:
        return [int(pid) for (pid,) in p.connection.execute(
            "SELECT pair_id FROM decisions WHERE reviewer = ? ORDER BY pair_id", (reviewer,))]


def test_rows_written_meanwhile_by_another_process_are_not_logged_again(
        sample_project: Path) -> None:
    # The second process checked its rows before the first wrote them: 3,000 rows run twice at
    # once logged 6,000 decisions for 4,500 pairs, and both said 'recorded 3,000 decisions'.
    with Project.open(sample_project) as p:
        ids = [i.pair_id for i in p.next_pairs("ana", 40)]
        rows = [BulkRow(pid, "match" if k % 3 else "non-match", "") for k, pid in enumerate(ids)]
        assert apply_rows(p, "ana", rows[:30], batch=7, pause=0) == 30
        # rows 20-29 stand as given; 30-39 are new; 0-4 stand with another note
        changed = [BulkRow(r.pair_id, r.label, "on a second look") for r in rows[:5]]
        assert apply_rows(p, "ana", changed + rows[20:], batch=7, pause=0) == 15
    assert len(_log(sample_project, "ana")) == 45
    assert sorted(set(_log(sample_project, "ana"))) == sorted(ids)


def test_two_label_processes_on_one_file_log_each_row_once(tiny_tables: tuple[Path, Path],
                                                            tmp_path: Path) -> None:
    left, right = tiny_tables
    names = ["Anna Berg", "Jon Dahl", "Kari Lund", "Per Moe", "Ola Nord", "Eva Sund"]
    for path, key in ((left, "l"), (right, "r")):
        path.write_text("id,name\n" + "".join(f"{key}{k},{names[k % 6]} {k // 6}\n"
                                              for k in range(40)), encoding="utf-8")
    project = tmp_path / "p.docket"
    assert main(["new", str(project), "--left", str(left), "--right", str(right), "--id", "id",
                 "--block", "*"]) == 0
    labels = tmp_path / "labels.csv"  # 1,600 rows: more than three batches of 500
    labels.write_text("left_id,right_id,label\n" + "".join(
        f"l{a},r{b},{'match' if a == b else 'non-match'}\n" for a in range(40)
        for b in range(40)), encoding="utf-8")
    command = [sys.executable, "-m", "docket.tui.cli", "label", str(project), "--reviewer",
               "ana", "--from", str(labels)]
    runs = [subprocess.Popen(command, cwd=REPO, stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                             text=True) for _ in range(2)]
    said = [run.communicate(timeout=300) for run in runs]
    assert [run.returncode for run in runs] == [0, 0], said
    logged = _log(project, "ana")
    assert len(logged) == len(set(logged)) == 1600
    counts = [0 if "recorded no decision" in out else
              int(out.split("recorded ", 1)[1].split(" decision")[0].replace(",", ""))
              for out, _ in said]
    assert sum(counts) == 1600, said

"""Long commands show how far they are on a terminal and stay quiet when piped: label hears of
each batch of rows written; export and evaluate, which have no count, pulse with the time."""

from __future__ import annotations

import io
from pathlib import Path

import pandas as pd

from docket.core import Project
from docket.core.exports.exporting import scores_frame
from docket.tui import progress
from docket.tui.cli import main


def test_label_tells_each_step_and_batch(sample_project: Path, tmp_path: Path) -> None:
    with Project.open(sample_project) as project:
        pairs = scores_frame(project)["pair_id"].head(30)
    pd.DataFrame({"pair_id": pairs, "label": "non-match"}).to_csv(tmp_path / "l.csv",
                                                                  index=False)
    heard: list[tuple[str, int, int]] = []
    with Project.open(sample_project) as project:
        n, _ = project.label_from(tmp_path / "l.csv", "ana",
                                  lambda step, done, total: heard.append((step, done, total)))
    assert n == 30
    steps = [h[0] for h in heard]
    assert steps[0] == "checking the rows" and steps[-1] == "refitting the model"
    recorded = [h for h in heard if h[0] == "recording decisions"]
    assert recorded and recorded[-1] == ("recording decisions", 30, 30)
    assert [h[1] for h in recorded] == sorted(h[1] for h in recorded)


def test_working_is_quiet_off_a_terminal(monkeypatch) -> None:
    err = io.StringIO()
    monkeypatch.setattr("sys.stderr", err)
    with progress.working("evaluating"):
        pass
    assert err.getvalue() == ""


def test_piped_label_export_and_evaluate_print_no_bar(sample_project: Path, tmp_path: Path,
                                                      capsys) -> None:
    with Project.open(sample_project) as project:
        pairs = scores_frame(project)["pair_id"].head(5)
    pd.DataFrame({"pair_id": pairs, "label": "match"}).to_csv(tmp_path / "l.csv", index=False)
    assert main(["label", str(sample_project), "--reviewer", "ana", "--from",
                 str(tmp_path / "l.csv")]) == 0
    assert main(["export", str(sample_project), "-o", str(tmp_path / "s.csv")]) == 0
    main(["evaluate", str(sample_project)])  # no audit labels yet: one line, exit 2
    out = capsys.readouterr()
    assert "━" not in out.err and "━" not in out.out


def test_piped_merge_prints_no_bar(sample_project: Path, tmp_path: Path, capsys) -> None:
    copy = tmp_path / "copy.docket"
    copy.write_bytes(sample_project.read_bytes())
    assert main(["merge", str(sample_project), str(copy)]) == 0
    out = capsys.readouterr()
    assert "nothing new" in out.out and "━" not in out.err

"""A label file run again records only what changed."""

from __future__ import annotations

from pathlib import Path

from docket.core import Project
from docket.tui.cli import main


def test_rows_that_stand_already_are_not_recorded_again(sample_project: Path, tmp_path: Path,
                                                         capsys) -> None:
    # the second run logged all three rows again and said "recorded 3 decisions"
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label,note\n1,match,\n2,non-match,other town\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    capsys.readouterr()
    rows.write_text("pair_id,label,note\n1,match,\n2,non-match,moved\n3,hold,\n",
                    encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    out, err = capsys.readouterr()
    assert "recorded 2 decisions for maya" in out  # pair 2's note changed, pair 3 is new
    assert err == (f"docket: warning: {rows}: 1 row gives the label and note that stand "
                   "already for maya; not recorded again\n")
    with Project.open(sample_project) as p:
        logged = sorted((d.pair_id, d.label, d.note) for d in p.decisions())
    assert logged == [(1, "match", ""), (2, "non-match", "moved"), (2, "non-match", "other town"),
                      (3, "hold", "")]


def test_a_file_run_again_unchanged_records_nothing_and_skips_the_refit(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # it refit the model over labels that changed in nothing: 15 s of 15.6 on 24,952 rows
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label\n1,match\n2,non-match\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    with Project.open(sample_project) as p:
        refits = p.meta["refits"]
    capsys.readouterr()
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    out = capsys.readouterr().out
    assert out == "recorded no decision for maya: nothing new, so the model stays as it was\n"
    with Project.open(sample_project) as p:
        assert p.meta["refits"] == refits

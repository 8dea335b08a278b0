"""What a label file holds beyond its decisions: a row given twice, columns label does not read,
and docket's own scores export with labels filled in."""

from __future__ import annotations

from pathlib import Path

import pandas as pd

from docket.core import Project
from docket.tui.cli import main


def test_a_row_given_twice_is_one_decision_and_said(sample_project: Path, tmp_path: Path,
                                                   capsys) -> None:
    # Pasted twice, the second time spelled otherwise (Match, non_match): it made four log
    # entries for two pairs, and maya's count doubled.
    with Project.open(sample_project) as p:
        (a, b), (c, d) = p.connection.execute(
            "SELECT left_id, right_id FROM pairs WHERE pair_id IN (1, 2) ORDER BY pair_id")
    rows = tmp_path / "labels.csv"
    rows.write_text(f"left_id,right_id,label\n{a},{b},match\n{c},{d},non-match\n"
                    f"{a},{b},Match\n{c},{d},non_match\n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    out, err = capsys.readouterr()
    assert "recorded 2 decisions for maya" in out
    assert err.count("\n") == 1 and "2 rows repeat an earlier row" in err, err
    with Project.open(sample_project) as p:
        assert sorted((x.pair_id, x.label) for x in p.decisions()) == [(1, "match"),
                                                                      (2, "non-match")]
    rows.write_text("pair_id,label,note\n3,match,same phone\n3,match,\n", encoding="utf-8")
    before = sample_project.read_bytes()
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 2
    assert "rows 2 and 3 give pair 3 the notes 'same phone' and ''" in capsys.readouterr().err
    assert sample_project.read_bytes() == before



def test_columns_label_does_not_read_are_said_and_other_reviewers_refused(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # Both were dropped unsaid: the notes were lost, and bob's label was recorded as maya's.
    rows = tmp_path / "labels.csv"
    rows.write_text("pair_id,label,notes,Reviewer\n1,match,same phone, Maya \n", encoding="utf-8")
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 0
    err = capsys.readouterr().err
    assert err == (f"docket: warning: {rows}: 1 column not read: 'notes' (did you mean "
                   "'note'?); docket label reads pair_id, label, note, left_id, right_id\n")
    rows.write_text("pair_id,label,reviewer\n2,match,maya\n3,match,bob\n", encoding="utf-8")
    before = sample_project.read_bytes()
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(rows)]) == 2
    assert "column 'reviewer' names reviewer bob, but every row would be recorded for maya" \
        in capsys.readouterr().err
    assert sample_project.read_bytes() == before



def test_the_scores_export_with_labels_filled_in_reads_without_a_warning(
        sample_project: Path, tmp_path: Path, capsys) -> None:
    # its 13 columns of similarities and probabilities were each named as not read
    scores = tmp_path / "scores.csv"
    assert main(["export", str(sample_project), "--what", "scores", "-o", str(scores)]) == 0
    frame = pd.read_csv(scores, dtype=str).head(2).assign(label="match", a="1", b="", c="",
                                                          d="", e="", f="")
    frame.to_csv(scores, index=False)
    capsys.readouterr()
    assert main(["label", str(sample_project), "--reviewer", "maya", "--from", str(scores)]) == 0
    assert capsys.readouterr().err == (f"docket: warning: {scores}: 6 columns not read: 'a', "
                                       "'b', 'c', 'd', 'e' and 1 more; docket label reads "
                                       "pair_id, label, note, left_id, right_id\n")


def test_a_label_file_without_a_header_is_said_to_want_one(sample_project: Path,
                                                           tmp_path: Path, capsys) -> None:
    # typed by hand, '1,match' first: it was "needs a 'label' column"
    before = sample_project.read_bytes()
    for body, first in (("1,match\n2,non-match\n", "match"),
                        ("N-00001,S-10001,Non_Match,same\n", "Non_Match")):
        rows = tmp_path / "labels.csv"
        rows.write_text(body, encoding="utf-8")
        assert main(["label", str(sample_project), "--reviewer", "maya", "--from",
                     str(rows)]) == 2
        err = capsys.readouterr().err.strip()
        assert err == (f"docket: {rows}: its first line reads as a decision ('{first}'), not a "
                       "header; add a header row: pair_id,label (or left_id,right_id,label), "
                       "with note if the file has notes")
    assert sample_project.read_bytes() == before

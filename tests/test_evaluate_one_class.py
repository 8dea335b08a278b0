"""Evaluate after a few audit labels, or labels all of one class."""

from __future__ import annotations

from pathlib import Path

from docket.core import Project
from docket.tui.cli import main


def _label_audit(project: Path, label: str, n: int) -> None:
    with Project.open(project) as p:
        for (pid,) in p.connection.execute("SELECT pair_id FROM pairs WHERE audit = 1 "
                                           f"ORDER BY audit_order LIMIT {n}").fetchall():
            p.decide(pid, "ana", label)


def test_no_labelled_match_names_no_best_f1(sample_project: Path, capsys) -> None:
    # with every audit label a non-match, F1 is 0 at every threshold, and evaluate said "highest
    # estimated F1 in the table: 0.000 at 0.1, optimistic: ... likely lower"
    _label_audit(sample_project, "non-match", 8)
    assert main(["evaluate", str(sample_project)]) == 0
    out = capsys.readouterr().out
    assert "highest estimated F1" not in out and "no labelled match" in out
    with Project.open(sample_project, readonly=True) as p:
        assert p.evaluate().best_f1 is None


def test_labelled_matches_still_name_the_best_f1(sample_project: Path, capsys) -> None:
    _label_audit(sample_project, "match", 8)
    assert main(["evaluate", str(sample_project)]) == 0
    assert "highest estimated F1 in the table" in capsys.readouterr().out


def test_one_stratum_is_named_in_the_singular(sample_project: Path, capsys) -> None:
    # "strata 5 have one label each" was said of a single stratum
    _label_audit(sample_project, "match", 1)
    assert main(["evaluate", str(sample_project)]) == 0
    out = capsys.readouterr().out
    assert "has one label: its variance is not estimated" in out
    notes = [line for line in out.splitlines() if line.startswith("note at")]
    assert notes and not any("strata" in line for line in notes if "one label" in line)


def test_predicted_counts_say_they_cover_the_labelled_strata_only(sample_project: Path,
                                                                  capsys) -> None:
    # "predicted matches among 440 candidate pairs" of a project holding 2,690: the strata
    # without labels are left out, which the count did not say
    from docket.tui.screens.quality_table import notes_text
    _label_audit(sample_project, "match", 1)
    assert main(["evaluate", str(sample_project)]) == 0
    assert "those of the strata with labels (" in capsys.readouterr().out
    with Project.open(sample_project, readonly=True) as p:
        assert "those of the strata with labels (" in notes_text(p.evaluate()).plain


def test_a_recall_target_without_a_labelled_match_says_recall_is_undefined(
        sample_project: Path, capsys) -> None:
    # "no threshold reaches estimated recall 0.9", where no threshold has a recall at all
    _label_audit(sample_project, "non-match", 8)
    assert main(["evaluate", str(sample_project), "--target-recall", "0.9"]) == 0
    assert "recall cannot be estimated at any threshold" in capsys.readouterr().out
    assert main(["evaluate", str(sample_project), "--target-precision", "0.9"]) == 0
    assert "no threshold reaches estimated precision 0.9" in capsys.readouterr().out

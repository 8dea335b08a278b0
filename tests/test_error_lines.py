"""Errors that must reach the user whole and short: where output is closed, a project named
without its ending, and values or messages too long for one line."""

from __future__ import annotations

import hashlib
import sys
from pathlib import Path

import pytest

from docket.tui.cli import main
from tests.test_bad_input import assert_one_line_error, run, write


def test_a_closed_standard_output_is_refused_before_any_work(
        sample_project: Path, tmp_path: Path, capsys, monkeypatch: pytest.MonkeyPatch) -> None:
    # 'docket label ... >&-' recorded the labels, then ended in a traceback printing the line
    # that said so (Python gives a closed stream as None)
    labels = write(tmp_path / "labels.csv", "pair_id,label\n1,match\n")
    before = hashlib.sha256(sample_project.read_bytes()).hexdigest()
    monkeypatch.setattr(sys, "stdout", None)
    code, err = run(capsys, "label", str(sample_project), "--reviewer", "ana", "--from",
                    str(labels))
    assert_one_line_error(code, err, "standard output is closed", ">/dev/null")
    assert hashlib.sha256(sample_project.read_bytes()).hexdigest() == before
    monkeypatch.undo()
    monkeypatch.setattr(sys, "stderr", None)  # '2>&-': nowhere to say it, the code stands
    assert main(["status", str(tmp_path / "nope.docket")]) == 2
    assert main(["status", str(sample_project)]) == 0


def test_a_project_named_without_its_ending_is_pointed_to(sample_project: Path,
                                                        capsys) -> None:
    # 'docket status vets' beside vets.docket said to create it with 'docket new vets ...'
    bare = sample_project.with_suffix("")
    code, err = run(capsys, "status", str(bare))
    assert_one_line_error(code, err, f"{bare}: no such project; did you mean {sample_project}?")
    assert not bare.exists()
    code, err = run(capsys, "status", str(bare) + "x")
    assert_one_line_error(code, err, "no such project; create it with 'docket new")


def test_a_huge_value_in_an_error_is_cut_to_its_start_and_length(tmp_path: Path,
                                                                 capsys) -> None:
    # the line quoted both 1 MB ids whole: one line of two megabytes
    big = "Z" * 1_000_000
    dup = write(tmp_path / "dup.csv", f"id,name\n{big},a\n{big},b\n3,c\n")
    code, err = run(capsys, "new", str(tmp_path / "p.docket"), "--left", str(dup), "--id", "id")
    assert_one_line_error(code, err, f"{dup}: column 'id' has duplicate ids (ZZZZ",
                          "…(1,000,002 characters)", "on rows 2, 3", "ids must be unique")
    assert len(err) < 1000


def test_a_long_message_keeps_its_start_and_its_end() -> None:
    from docket.tui.terminal import said
    path = "/data/" + "a" * 150 + ".csv"  # a long path is shown whole
    assert said(f"{path}: bad") == f"{path}: bad"
    text = said("start " + "word " * 100_000 + "what to do")
    assert text.startswith("start word") and text.endswith("word what to do")
    assert "…(498,016 characters)…" in text and len(text) < 2100
